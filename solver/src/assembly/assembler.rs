//! The parallel element loop. Elements are processed in chunks: rayon
//! computes each element's force and tangent into a chunk buffer allocated
//! once, then the pattern's scatter plan adds the chunk to the global
//! arrays, its parts on rayon's threads without locks, every slot summed in
//! element order ([`super::scatter`]): the same bits on any number of
//! threads. The fixed chunk bounds memory whatever the mesh size.

use rayon::prelude::*;

use super::discretization::Discretization;
use super::dofs::{DofMap, NONE};
use super::error::AssemblyError;
use super::history::{ElementHistory, PointHistories};
use super::kernel::{element_cached_into, element_continuous_into, element_with_history_into, KernelError};
use super::pattern::Pattern;
use super::scatter::CHUNK;
use crate::element::{Formulation, MixedState};
use crate::shape::MAX_NODES;

/// Reusable buffers of the element loop.
#[derive(Debug)]
pub struct Assembler {
    kbuf: Vec<f64>,
    fbuf: Vec<f64>,
    status: Vec<Result<f64, KernelError>>,
    /// Stand-in states for condensed assembly, so both paths share one loop.
    unused_states: Vec<MixedState>,
    /// Stand-in history (one value per element) for models without history.
    unused_history: (Vec<f64>, Vec<f64>),
    /// Run the element loop on one thread (for the parallel/serial check).
    pub serial: bool,
}

impl Default for Assembler {
    fn default() -> Self {
        Self::new()
    }
}

/// What one assembly pass writes.
pub struct Outputs<'a> {
    /// Internal force at every global dof (prescribed ones give reactions).
    pub internal: &'a mut [f64],
    /// Tangent values in pattern order, if wanted.
    pub tangent: Option<&'a mut [f64]>,
    /// Tangent predictor: with the prescribed-dof change `du_p` (global
    /// vector, zero at free dofs), subtracts `K_fp du_p` from `rhs` (free dofs).
    pub predictor: Option<(&'a [f64], &'a mut [f64])>,
    /// Pressure and dilatation of every element carried as Newton unknowns
    /// (three-field form; one entry per element, ignored by displacement
    /// elements). `None` condenses them from u.
    pub mixed: Option<&'a mut [MixedState]>,
    /// Tangent–vector products at every dof (free and prescribed): with `m`
    /// global vectors `v` laid end to end, adds `K v_k` to `out` (same
    /// layout). Used for the rows and columns of constraint unknowns.
    pub products: Option<(&'a [f64], &'a mut [f64])>,
    /// History variables of the integration points (materials with memory):
    /// read at the last converged increment, written at `u`. `None`, or an
    /// empty store, evaluates every material without history.
    pub history: Option<&'a mut PointHistories>,
}

impl Assembler {
    /// An assembler with empty buffers, bound to no pattern yet.
    pub fn new() -> Self {
        Assembler {
            kbuf: Vec::new(),
            fbuf: Vec::new(),
            status: vec![Ok(0.0); CHUNK],
            unused_states: vec![MixedState::default(); CHUNK],
            unused_history: (vec![0.0; CHUNK], vec![0.0; CHUNK]),
            serial: false,
        }
    }

    /// Internal forces (and tangent) at displacement `u` (global, all dofs).
    /// Returns the total strain energy.
    pub fn assemble(
        &mut self,
        disc: &Discretization,
        dofs: &DofMap,
        pattern: &Pattern,
        u: &[f64],
        out: Outputs,
    ) -> Result<f64, AssemblyError> {
        let Outputs { internal, mut tangent, mut predictor, mut mixed, mut products, history } = out;
        let mut history = history.filter(|h| !h.is_empty());
        let time_step = history.as_ref().map_or(0.0, |h| h.time_step);
        let tangent_kind = history.as_ref().map_or(Default::default(), |h| h.tangent);
        let hstride = history.as_ref().map_or(1, |h| h.stride());
        if let Some((_, out)) = products.as_mut() {
            out.fill(0.0);
        }
        internal.fill(0.0);
        if let Some(k) = tangent.as_deref_mut() {
            k.fill(0.0);
        }
        let want_k = tangent.is_some() || predictor.is_some() || products.is_some();
        let mesh = disc.mesh();
        let ne = mesh.element_count();
        let dim = dofs.dim;
        let mut energy = 0.0;
        // Buffers strided by the largest element of this mesh, so a mesh of
        // linear elements keeps the small stride.
        let fstride = pattern.scatter.stride();
        debug_assert_eq!(fstride, disc.max_dofs, "pattern built for this discretization");
        let kstride = fstride * fstride;
        if self.kbuf.len() < CHUNK * kstride {
            self.kbuf.resize(CHUNK * kstride, 0.0);
            self.fbuf.resize(CHUNK * fstride, 0.0);
        }
        let mut start = 0;
        let mut chunk = 0;
        while start < ne {
            let end = (start + CHUNK).min(ne);
            let count = end - start;
            type Slot<'s> = (
                usize,
                (((((&'s mut [f64], &'s mut [f64]), &'s mut Result<f64, KernelError>), &'s mut MixedState), &'s [f64]), &'s mut [f64]),
            );
            let carried = mixed.is_some();
            let with_history = history.is_some();
            let work = |(i, (((((k, f), st), ms), previous), current)): Slot| {
                let e = start + i;
                let ctx = disc.context(e);
                let state = if carried { Some(ms) } else { None };
                let mut element_history = ElementHistory { previous, current, time_step, tangent: tangent_kind };
                let history = if with_history { Some(&mut element_history) } else { None };
                let k = if want_k { Some(k) } else { None };
                if let Some(geometry) = disc.reference_geometry(e) {
                    let mut ue = [[0.0; 3]; MAX_NODES];
                    disc.gather_displacements(e, u, &mut ue);
                    *st = element_cached_into(&ctx, geometry, &ue, f, k, state, history);
                    return;
                }
                let (mut x, mut ue) = ([[0.0; 3]; MAX_NODES], [[0.0; 3]; MAX_NODES]);
                disc.gather(e, u, &mut x, &mut ue);
                *st = if ctx.formulation == Formulation::ContinuousPressure {
                    let mut p = [0.0; crate::element::taylor_hood::MAX_PRESSURE_NODES];
                    let np = disc.gather_pressures(e, u, &mut p);
                    element_continuous_into(&ctx, &x, &ue, &p[..np], disc.pressures.scale, f, k, history)
                } else {
                    element_with_history_into(&ctx, &x, &ue, f, k, state, history)
                };
            };
            let kb = &mut self.kbuf[..count * kstride];
            let fb = &mut self.fbuf[..count * fstride];
            let sb = &mut self.status[..count];
            let ms: &mut [MixedState] = match mixed.as_deref_mut() {
                Some(m) => &mut m[start..end],
                None => &mut self.unused_states[..count],
            };
            let (hp, hc): (&[f64], &mut [f64]) = match history.as_deref_mut() {
                Some(h) => h.split(start, end),
                None => (&self.unused_history.0[..count], &mut self.unused_history.1[..count]),
            };
            if self.serial {
                kb.chunks_mut(kstride)
                    .zip(fb.chunks_mut(fstride))
                    .zip(sb.iter_mut())
                    .zip(ms.iter_mut())
                    .zip(hp.chunks(hstride))
                    .zip(hc.chunks_mut(hstride))
                    .enumerate()
                    .for_each(work);
            } else {
                kb.par_chunks_mut(kstride)
                    .zip(fb.par_chunks_mut(fstride))
                    .zip(sb.par_iter_mut())
                    .zip(ms.par_iter_mut())
                    .zip(hp.par_chunks(hstride))
                    .zip(hc.par_chunks_mut(hstride))
                    .enumerate()
                    .for_each(work);
            }
            for (i, status) in self.status[..count].iter().enumerate() {
                match status {
                    Ok(w) => energy += w,
                    Err(err) => return Err(AssemblyError::in_element(start + i, err.clone())),
                }
            }
            pattern.scatter.add_chunk(chunk, &self.fbuf, &self.kbuf, internal, tangent.as_deref_mut(), self.serial);
            // The predictor and the products (rarely wanted) stay serial.
            let count_serial = if predictor.is_some() || products.is_some() { count } else { 0 };
            for i in 0..count_serial {
                let e = start + i;
                let nodes = mesh.element_nodes(e);
                let nu = nodes.len() * dim;
                let nd = nu + disc.element_pressures(e);
                let pressure_base = mesh.node_count() * dim;
                let gdof = |r: usize| {
                    if r < nu {
                        nodes[r / dim] * dim + r % dim
                    } else {
                        pressure_base + disc.pressures.of_node[nodes[r - nu]]
                    }
                };
                let k = &self.kbuf[i * kstride..i * kstride + nd * nd];
                if let Some((dup, rhs)) = predictor.as_mut() {
                    for c in 0..nd {
                        let d = dup[gdof(c)];
                        if d == 0.0 {
                            continue;
                        }
                        for r in 0..nd {
                            let q = dofs.eq[gdof(r)];
                            if q != NONE {
                                rhs[q] -= k[c * nd + r] * d;
                            }
                        }
                    }
                }
                if let Some((vectors, out)) = products.as_mut() {
                    let ndof = internal.len();
                    for (v, o) in vectors.chunks(ndof).zip(out.chunks_mut(ndof)) {
                        for c in 0..nd {
                            let d = v[gdof(c)];
                            if d != 0.0 {
                                for r in 0..nd {
                                    o[gdof(r)] += k[c * nd + r] * d;
                                }
                            }
                        }
                    }
                }
            }
            start = end;
            chunk += 1;
        }
        Ok(energy)
    }
}

#[cfg(test)]
mod tests {
    use std::sync::Arc;

    use olli_mesh::{ElementKind, Mesh};

    use super::*;
    use crate::assembly::scatter::default_parts;
    use crate::assembly::{Discretization, DofMap, Pattern};
    use crate::material::{registry, VolumetricForm};
    use crate::model::{Analysis, Formulation, Model};

    /// A distorted n×n×n block of hex8 elements, its first layer of nodes
    /// held, a displacement field and carried pressure and dilatation
    /// states (three-field form, each element its own values).
    fn block(n: usize) -> (Model, Vec<bool>, Vec<f64>, Vec<MixedState>) {
        let mut mesh = Mesh::new(3);
        for k in 0..=n {
            for j in 0..=n {
                for i in 0..=n {
                    let w = ((i * 7 + j * 3 + k * 5) % 11) as f64 * 0.01;
                    mesh.add_node([i as f64 + w, j as f64 - w, k as f64 + 0.5 * w]);
                }
            }
        }
        let id = |i: usize, j: usize, k: usize| (k * (n + 1) + j) * (n + 1) + i;
        for k in 0..n {
            for j in 0..n {
                for i in 0..n {
                    mesh.add_element(
                        ElementKind::Hex8,
                        &[
                            id(i, j, k),
                            id(i + 1, j, k),
                            id(i + 1, j + 1, k),
                            id(i, j + 1, k),
                            id(i, j, k + 1),
                            id(i + 1, j, k + 1),
                            id(i + 1, j + 1, k + 1),
                            id(i, j + 1, k + 1),
                        ],
                    );
                }
            }
        }
        let mat = Arc::new(
            registry::material("neo-hookean", &[("shear_modulus", 1.0), ("bulk_modulus", 100.0)], VolumetricForm::Quadratic).unwrap(),
        );
        let model = Model::single_region(mesh, Analysis::Solid3d, mat, Formulation::Mixed);
        let ndof = model.mesh.node_count() * 3;
        let mut prescribed = vec![false; ndof];
        prescribed[..(n + 1) * (n + 1) * 3].iter_mut().for_each(|p| *p = true);
        let u: Vec<f64> = (0..ndof).map(|d| 0.01 * ((d * 13 % 17) as f64 - 8.0)).collect();
        let carried: Vec<MixedState> = (0..model.mesh.element_count())
            .map(|e| MixedState {
                pressure: 0.1 * ((e * 5 % 9) as f64 - 4.0),
                dilatation: 1.0 + 0.001 * (e % 7) as f64,
                ..Default::default()
            })
            .collect();
        (model, prescribed, u, carried)
    }

    /// Force, tangent (pattern order) and carried states of one assembly.
    type Assembled = (Vec<f64>, Vec<f64>, Option<Vec<MixedState>>);

    fn assemble(
        disc: &Discretization,
        dofs: &DofMap,
        pattern: &Pattern,
        u: &[f64],
        serial: bool,
        states: Option<&[MixedState]>,
        want_k: bool,
    ) -> Assembled {
        let mut asm = Assembler::new();
        asm.serial = serial;
        let mut f = vec![0.0; u.len()];
        let mut k = vec![0.0; pattern.nnz()];
        let mut states = states.map(|s| s.to_vec());
        asm.assemble(
            disc,
            dofs,
            pattern,
            u,
            Outputs {
                internal: &mut f,
                tangent: if want_k { Some(&mut k) } else { None },
                predictor: None,
                mixed: states.as_deref_mut(),
                products: None,
                history: None,
            },
        )
        .unwrap();
        (f, k, states)
    }

    /// The textbook serial assembly, element after element through the
    /// kernel's entry point, each stored entry found by [`Pattern::slot`]:
    /// the reference the scatter plan must reproduce bit for bit.
    fn assemble_by_hand(disc: &Discretization, dofs: &DofMap, pattern: &Pattern, u: &[f64], states: Option<&[MixedState]>) -> Assembled {
        let mut f = vec![0.0; u.len()];
        let mut k = vec![0.0; pattern.nnz()];
        let mut states = states.map(|s| s.to_vec());
        let mut global = [0; 64];
        for e in 0..disc.mesh().element_count() {
            let nd = disc.element_dofs(e, &mut global);
            let (mut fe, mut ke) = (vec![0.0; nd], vec![0.0; nd * nd]);
            let mut ue = [[0.0; 3]; MAX_NODES];
            disc.gather_displacements(e, u, &mut ue);
            let geometry = disc.reference_geometry(e).expect("hex8 keeps its geometry");
            let state = states.as_mut().map(|s| &mut s[e]);
            element_cached_into(&disc.context(e), geometry, &ue, &mut fe, Some(&mut ke), state, None).unwrap();
            for r in 0..nd {
                f[global[r]] += fe[r];
                for c in 0..nd {
                    let (gr, gc) = (dofs.eq[global[r]], dofs.eq[global[c]]);
                    if gr != NONE && gc != NONE && gr >= gc {
                        k[pattern.slot(gr, gc).expect("in the pattern")] += ke[c * nd + r];
                    }
                }
            }
        }
        (f, k, states)
    }

    /// Parallel and serial element loops give the same residual and tangent
    /// (a practice of our code style), bit for bit, condensed and with
    /// carried pressure and dilatation states (three-field form), whose
    /// outputs must agree too, whatever the number of scatter parts (1, 3,
    /// the default, 7): every slot is summed in element order. Both equal the
    /// textbook serial assembly of the element matrices by [`Pattern::slot`]
    /// to the bit. The 13³ = 2197 elements span three element chunks
    /// ([`CHUNK`] = 1024), so the chunk boundaries are crossed too. The
    /// residual alone (no tangent wanted) is the same too.
    #[test]
    fn parallel_and_serial_assembly_agree() {
        let n = 13;
        let (model, prescribed, u, carried) = block(n);
        let disc = Discretization::new(&model).unwrap();
        let dofs = DofMap::new(3, &prescribed);
        let ne = model.mesh.element_count();
        assert!(ne > 2 * CHUNK, "several chunks");
        let patterns: Vec<Pattern> =
            [1, 3, default_parts(), 7].iter().map(|&p| Pattern::build_with_parts(&disc, &dofs, p).unwrap()).collect();
        let pattern = &patterns[0];
        for states in [None, Some(carried.as_slice())] {
            let (fh, kh, sh) = assemble_by_hand(&disc, &dofs, pattern, &u, states);
            assert!(kh.iter().any(|v| *v != 0.0));
            for (p, serial) in patterns.iter().flat_map(|p| [(p, true), (p, false)]) {
                let what = format!("{} parts, serial {serial}, carried {}", p.scatter.parts(), states.is_some());
                let (f, k, s) = assemble(&disc, &dofs, p, &u, serial, states, true);
                assert_eq!(f, fh, "{what}: residual");
                assert_eq!(k, kh, "{what}: tangent");
                assert_eq!(s, sh, "{what}: carried states");
                let (f_alone, _, _) = assemble(&disc, &dofs, p, &u, serial, states, false);
                assert_eq!(f_alone, fh, "{what}: residual alone");
            }
            if let Some(sh) = sh {
                assert!(sh.iter().all(|s| s.volume_ratio != 1.0), "state outputs written");
            }
        }
        // The carried pressures enter the tangent: the two forms differ.
        assert_ne!(
            assemble(&disc, &dofs, pattern, &u, false, None, true).1,
            assemble(&disc, &dofs, pattern, &u, false, Some(&carried), true).1
        );
    }
}
