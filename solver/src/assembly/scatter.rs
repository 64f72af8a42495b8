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

/// The terms of one chunk into one global array (tangent slots or force
/// dofs), part by part.
#[derive(Debug, Clone, Default)]
struct Split {
    /// Interior range bounds, `parts − 1` (the first range starts at 0, the
    /// last ends at the array's end).
    bounds: Vec<usize>,
    /// Start of each part's list in `terms`, and the end.
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
    /// The splits of every chunk: (tangent, force).
    chunks: Vec<(Split, Split)>,
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
        // Each chunk's unsplit terms are dropped once split, so the
        // threads hold only a few chunks' at once.
        let chunks = (0..ne.div_ceil(CHUNK))
            .into_par_iter()
            .map(|chunk| {
                let (slots, forces) = chunk_terms(disc, dofs, col_ptr, row_idx, chunk);
                (Split::new(&slots, parts), Split::new(&forces, parts))
            })
            .collect();
        Ok(ScatterPlan { parts, fstride, chunks })
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
        let (tangent_terms, force) = &self.chunks[chunk];
        let job = Job { tangent: tangent_terms, force, fbuf, kbuf, serial };
        job.run(0..self.parts, internal, 0, tangent, 0);
    }
}

/// Terms before their split: `(global target, source)`.
type Unsplit = Vec<(usize, u32)>;

/// The terms of chunk `chunk`, in element order: `(slot, position in the
/// tangent buffer)` of every stored tangent entry and `(global dof,
/// position in the force buffer)` of every force entry.
fn chunk_terms(disc: &Discretization, dofs: &DofMap, col_ptr: &[usize], row_idx: &[usize], chunk: usize) -> (Unsplit, Unsplit) {
    let fstride = disc.max_dofs;
    let kstride = fstride * fstride;
    let ne = disc.mesh().element_count();
    let elements = chunk * CHUNK..ne.min((chunk + 1) * CHUNK);
    // At most the lower triangle and the diagonal of every element.
    let mut slots = Vec::with_capacity(elements.len() * fstride * (fstride + 1) / 2);
    let mut forces = Vec::with_capacity(elements.len() * fstride);
    let mut global = [0usize; MAX_DOFS + MAX_PRESSURE_NODES];
    let mut eq = [0usize; MAX_DOFS + MAX_PRESSURE_NODES];
    for (i, e) in elements.enumerate() {
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
    /// The split of one chunk's terms `(global target, source)`, given in
    /// element order, into `parts` parts.
    fn new(terms: &[(usize, u32)], parts: usize) -> Split {
        // Bounds at the quantiles of every 8th target, so the parts get
        // about as many terms each (any bounds give the same sums); all
        // terms of one target fall in one part.
        let mut targets: Vec<usize> = terms.iter().step_by(8).map(|t| t.0).collect();
        targets.sort_unstable();
        let bounds: Vec<usize> = (1..parts).map(|p| targets.get(p * targets.len() / parts).copied().unwrap_or(usize::MAX)).collect();
        let part_of = |t: usize| bounds.partition_point(|&b| b <= t);
        let lower = |p: usize| if p == 0 { 0 } else { bounds[p - 1] };
        // A counting sort by part keeps each part's terms in element order.
        let mut starts = vec![0usize; parts + 1];
        for t in terms {
            starts[part_of(t.0) + 1] += 1;
        }
        for p in 0..parts {
            starts[p + 1] += starts[p];
        }
        let mut next = starts.clone();
        let mut split = vec![Term { target: 0, source: 0 }; terms.len()];
        for &(t, source) in terms {
            let p = part_of(t);
            split[next[p]] = Term { target: (t - lower(p)) as u32, source };
            next[p] += 1;
        }
        Split { bounds, starts, terms: split }
    }

    /// The terms of part `p`.
    fn part(&self, p: usize) -> &[Term] {
        &self.terms[self.starts[p]..self.starts[p + 1]]
    }
}

/// One chunk's scatter, split recursively over ranges of parts.
struct Job<'a> {
    tangent: &'a Split,
    force: &'a Split,
    fbuf: &'a [f64],
    kbuf: &'a [f64],
    serial: bool,
}

impl Job<'_> {
    /// Parts `parts` into `internal` (whose first entry is global dof
    /// `f0`) and `tangent` (first entry slot `k0`).
    fn run(&self, parts: std::ops::Range<usize>, internal: &mut [f64], f0: usize, tangent: Option<&mut [f64]>, k0: usize) {
        if parts.len() == 1 {
            let p = parts.start;
            for t in self.force.part(p) {
                internal[t.target as usize] += self.fbuf[t.source as usize];
            }
            if let Some(k) = tangent {
                for t in self.tangent.part(p) {
                    k[t.target as usize] += self.kbuf[t.source as usize];
                }
            }
            return;
        }
        let mid = parts.start + parts.len() / 2;
        // Bound `mid − 1` starts part `mid`; clamped to the array, as
        // the last parts of a chunk with few terms may start past its end.
        let fcut = self.force.bounds[mid - 1].min(f0 + internal.len()) - f0;
        let (fl, fr) = internal.split_at_mut(fcut);
        let (kl, kr, kcut) = match tangent {
            Some(k) => {
                let cut = self.tangent.bounds[mid - 1].min(k0 + k.len()) - k0;
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
