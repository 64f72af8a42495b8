//! The scatter of element forces and tangents into the global arrays,
//! split among threads without locks. Elements are evaluated in chunks of
//! [`CHUNK`]; for every chunk the plan divides the tangent's storage slots
//! (and the force's global dofs) into `parts` contiguous ranges holding
//! about the same number of the chunk's entries, and lists, per part, the
//! entries that land in its range: `(target within the range, position in
//! the chunk's element buffer)`, element after element. Each part owns its
//! range (`split_at_mut`), so the parts run on any number of threads with
//! no lock and no atomic, and every slot still receives its terms in
//! ascending element order: the sums are the serial element-by-element
//! sums to the bit, whatever the number of parts or threads.
//!
//! Only the stored entries are listed: for the tangent, the pairs of free
//! dofs in the lower triangle of the global matrix (`row ≥ col`), about
//! half of an element's `nd²` (300 of 576 for a free hex8).

use rayon::prelude::*;

use super::discretization::Discretization;
use super::dofs::{DofMap, NONE};
use super::error::AssemblyError;
use crate::element::taylor_hood::MAX_PRESSURE_NODES;
use crate::element::MAX_DOFS;

/// Elements evaluated together before their results are scattered: bounds
/// the element buffers (`CHUNK · nd²` values) whatever the mesh size.
pub const CHUNK: usize = 1024;

/// One listed term: `array[target] += buffer[source]`, `target` counted
/// from the start of its part's range.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct Term {
    target: u32,
    source: u32,
}

/// The terms of one global array (tangent slots or force dofs) chunk by
/// chunk and part by part.
#[derive(Debug, Clone, Default)]
struct Split {
    /// Interior range bounds of every chunk: `parts − 1` per chunk (the
    /// first range starts at 0, the last ends at the array's end).
    bounds: Vec<usize>,
    /// Start of each (chunk, part) list in `terms`, and the end.
    starts: Vec<usize>,
    terms: Vec<Term>,
}

/// The element-to-storage scatter of one pattern, split into parts (see
/// the module docs).
#[derive(Debug, Clone)]
pub struct ScatterPlan {
    parts: usize,
    /// Element force buffer stride (the discretization's largest element).
    fstride: usize,
    tangent: Split,
    force: Split,
}

/// The parts of a plan built by [`ScatterPlan::build`]: two per worker
/// thread, so a thread slowed by other work on a shared machine leaves its
/// second part to the other. The sums do not depend on it.
pub fn default_parts() -> usize {
    (2 * rayon::current_num_threads()).clamp(2, 64)
}

impl ScatterPlan {
    /// The plan of every element of `disc` into the lower-triangle pattern
    /// (`col_ptr`, `row_idx`, rows sorted within a column) over the
    /// equations of `dofs`, with `parts` parts per chunk (at least one).
    pub fn build(disc: &Discretization, dofs: &DofMap, col_ptr: &[usize], row_idx: &[usize], parts: usize) -> Result<Self, AssemblyError> {
        let parts = parts.max(1);
        let fstride = disc.max_dofs;
        let kstride = fstride * fstride;
        let ne = disc.mesh().element_count();
        if CHUNK * kstride >= u32::MAX as usize || row_idx.len() >= u32::MAX as usize || dofs.eq.len() >= u32::MAX as usize {
            return Err(AssemblyError::PatternTooLarge(row_idx.len()));
        }
        let (mut tangent, mut force) = (Split::default(), Split::default());
        // A few chunks at a time, so the unsplit terms of the whole mesh
        // are never held at once.
        let chunks = ne.div_ceil(CHUNK);
        for first in (0..chunks).step_by(BATCH) {
            let batch: Vec<(Split, Split)> = (first..chunks.min(first + BATCH))
                .into_par_iter()
                .map(|chunk| {
                    let (slots, forces) = chunk_terms(disc, dofs, col_ptr, row_idx, chunk);
                    (Split::of_chunk(&slots, parts), Split::of_chunk(&forces, parts))
                })
                .collect();
            for (t, f) in batch {
                tangent.append(t);
                force.append(f);
            }
        }
        Ok(ScatterPlan { parts, fstride, tangent, force })
    }

    /// Number of parts per chunk.
    pub fn parts(&self) -> usize {
        self.parts
    }

    /// Element force buffer stride the plan was built for (its tangent
    /// buffer stride is the square).
    pub fn stride(&self) -> usize {
        self.fstride
    }

    /// Adds the element forces `fbuf` and tangents `kbuf` of chunk `chunk`
    /// (buffers strided by [`Self::stride`] and its square) to `internal`
    /// (every global dof) and, if given, `tangent` (pattern order). The
    /// parts run on rayon's threads, or one after the other when `serial`:
    /// the same sums either way.
    pub fn add_chunk(&self, chunk: usize, fbuf: &[f64], kbuf: &[f64], internal: &mut [f64], tangent: Option<&mut [f64]>, serial: bool) {
        let bounds = chunk * (self.parts - 1)..(chunk + 1) * (self.parts - 1);
        let job = Job {
            plan: self,
            chunk,
            fbuf,
            kbuf,
            force_bounds: &self.force.bounds[bounds.clone()],
            tangent_bounds: &self.tangent.bounds[bounds],
            serial,
        };
        job.run(0..self.parts, internal, 0, tangent, 0);
    }
}

/// Terms before their split: `(global target, source)`.
type Unsplit = Vec<(usize, u32)>;

/// Chunks whose terms are listed at once while a plan is built.
const BATCH: usize = 8;

/// The terms of chunk `chunk`, in element order: `(slot, position in the
/// tangent buffer)` of every stored tangent entry and `(global dof,
/// position in the force buffer)` of every force entry.
fn chunk_terms(disc: &Discretization, dofs: &DofMap, col_ptr: &[usize], row_idx: &[usize], chunk: usize) -> (Unsplit, Unsplit) {
    let fstride = disc.max_dofs;
    let kstride = fstride * fstride;
    let ne = disc.mesh().element_count();
    let (mut slots, mut forces) = (Vec::new(), Vec::new());
    let mut global = [0usize; MAX_DOFS + MAX_PRESSURE_NODES];
    let mut eq = [0usize; MAX_DOFS + MAX_PRESSURE_NODES];
    for (i, e) in (chunk * CHUNK..ne.min((chunk + 1) * CHUNK)).enumerate() {
        let nd = disc.element_dofs(e, &mut global);
        for (q, &d) in eq.iter_mut().zip(&global[..nd]) {
            *q = dofs.eq[d];
        }
        for (r, &d) in global[..nd].iter().enumerate() {
            forces.push((d, (i * fstride + r) as u32));
        }
        // Column-major over the element's dofs, as the kernels write.
        for c in 0..nd {
            for r in 0..nd {
                let (gr, gc) = (eq[r], eq[c]);
                if gr == NONE || gc == NONE || gr < gc {
                    continue;
                }
                if let Ok(k) = row_idx[col_ptr[gc]..col_ptr[gc + 1]].binary_search(&gr) {
                    slots.push((col_ptr[gc] + k, (i * kstride + c * nd + r) as u32));
                }
            }
        }
    }
    (slots, forces)
}

impl Split {
    /// Appends the split of a later chunk.
    fn append(&mut self, next: Split) {
        let base = self.terms.len();
        self.bounds.extend(next.bounds);
        self.starts.extend(next.starts.iter().map(|s| s + base));
        self.terms.extend(next.terms);
    }

    /// The split of one chunk's terms `(global target, source)`, given in element order.
    fn of_chunk(terms: &[(usize, u32)], parts: usize) -> Split {
        let mut split = Split::default();
        split.push_chunk(terms, parts);
        split
    }

    /// Appends one chunk's terms `(global target, source)`, in element order.
    fn push_chunk(&mut self, terms: &[(usize, u32)], parts: usize) {
        // Bounds at the quantiles of every 8th target, so the parts get
        // about as many terms each (any bounds give the same sums); all
        // terms of one target fall in one part.
        let mut targets: Vec<usize> = terms.iter().step_by(8).map(|t| t.0).collect();
        targets.sort_unstable();
        let first = self.bounds.len();
        for p in 1..parts {
            self.bounds.push(targets.get(p * targets.len() / parts).copied().unwrap_or(usize::MAX));
        }
        let bounds = &self.bounds[first..];
        let part_of = |t: usize| bounds.partition_point(|&b| b <= t);
        let lower = |p: usize| if p == 0 { 0 } else { bounds[p - 1] };
        // A counting sort by part keeps each part's terms in element order.
        let mut count = vec![0usize; parts + 1];
        for t in terms {
            count[part_of(t.0) + 1] += 1;
        }
        for p in 0..parts {
            count[p + 1] += count[p];
        }
        let base = self.terms.len();
        self.starts.extend(count[..parts].iter().map(|c| base + c));
        self.terms.resize(base + terms.len(), Term { target: 0, source: 0 });
        for &(t, source) in terms {
            let p = part_of(t);
            self.terms[base + count[p]] = Term { target: (t - lower(p)) as u32, source };
            count[p] += 1;
        }
    }

    /// The terms of part `p` of chunk `chunk` (`parts` per chunk).
    fn part(&self, chunk: usize, parts: usize, p: usize) -> &[Term] {
        let i = chunk * parts + p;
        let end = self.starts.get(i + 1).copied().unwrap_or(self.terms.len());
        &self.terms[self.starts[i]..end]
    }
}

/// One chunk's scatter, split recursively over ranges of parts.
struct Job<'a> {
    plan: &'a ScatterPlan,
    chunk: usize,
    fbuf: &'a [f64],
    kbuf: &'a [f64],
    force_bounds: &'a [usize],
    tangent_bounds: &'a [usize],
    serial: bool,
}

impl Job<'_> {
    /// Parts `parts` into `internal` (whose first entry is global dof
    /// `f0`) and `tangent` (first entry slot `k0`).
    fn run(&self, parts: std::ops::Range<usize>, internal: &mut [f64], f0: usize, tangent: Option<&mut [f64]>, k0: usize) {
        if parts.len() == 1 {
            let p = parts.start;
            let n = self.plan.parts;
            for t in self.plan.force.part(self.chunk, n, p) {
                internal[t.target as usize] += self.fbuf[t.source as usize];
            }
            if let Some(k) = tangent {
                for t in self.plan.tangent.part(self.chunk, n, p) {
                    k[t.target as usize] += self.kbuf[t.source as usize];
                }
            }
            return;
        }
        let mid = parts.start + parts.len() / 2;
        // Bound `mid − 1` starts part `mid`; clamped to the array, as
        // the last parts of a chunk with few terms may start past its end.
        let fcut = self.force_bounds[mid - 1].min(f0 + internal.len()) - f0;
        let (fl, fr) = internal.split_at_mut(fcut);
        let (kl, kr, kcut) = match tangent {
            Some(k) => {
                let cut = self.tangent_bounds[mid - 1].min(k0 + k.len()) - k0;
                let (l, r) = k.split_at_mut(cut);
                (Some(l), Some(r), cut)
            }
            None => (None, None, 0),
        };
        let left = || self.run(parts.start..mid, fl, f0, kl, k0);
        let right = || self.run(mid..parts.end, fr, f0 + fcut, kr, k0 + kcut);
        if self.serial {
            left();
            right();
        } else {
            rayon::join(left, right);
        }
    }
}
