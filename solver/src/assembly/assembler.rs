//! The parallel element loop. Elements are processed in chunks: rayon
//! computes each element's force and tangent into a chunk buffer allocated
//! once, then one thread scatters the chunk through the precomputed map.
//! The scatter is a small fraction of the element work, and the fixed chunk
//! bounds memory whatever the mesh size.

use rayon::prelude::*;

use super::discretization::Discretization;
use super::dofs::{DofMap, NONE};
use super::error::AssemblyError;
use super::history::{ElementHistory, PointHistories};
use super::kernel::{element_cached_into, element_continuous_into, element_with_history_into, KernelError};
use super::pattern::{Pattern, SKIP};
use crate::element::{Formulation, MixedState};
use crate::shape::MAX_NODES;

const CHUNK: usize = 1024;

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
        let fstride = disc.max_dofs;
        let kstride = fstride * fstride;
        if self.kbuf.len() < CHUNK * kstride {
            self.kbuf.resize(CHUNK * kstride, 0.0);
            self.fbuf.resize(CHUNK * fstride, 0.0);
        }
        let mut start = 0;
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
            for i in 0..count {
                let e = start + i;
                match &self.status[i] {
                    Ok(w) => energy += w,
                    Err(err) => return Err(AssemblyError::in_element(e, err.clone())),
                }
                let nodes = mesh.element_nodes(e);
                let nu = nodes.len() * dim;
                let nd = nu + disc.element_pressures(e);
                let f = &self.fbuf[i * fstride..i * fstride + nd];
                let pressure_base = mesh.node_count() * dim;
                let gdof = |r: usize| {
                    if r < nu {
                        nodes[r / dim] * dim + r % dim
                    } else {
                        pressure_base + disc.pressures.of_node[nodes[r - nu]]
                    }
                };
                for r in 0..nd {
                    internal[gdof(r)] += f[r];
                }
                let k = &self.kbuf[i * kstride..i * kstride + nd * nd];
                if let Some(vals) = tangent.as_deref_mut() {
                    let map = &pattern.scatter[pattern.scatter_offset[e]..pattern.scatter_offset[e + 1]];
                    for (s, v) in map.iter().zip(k) {
                        if *s != SKIP {
                            vals[*s as usize] += v;
                        }
                    }
                }
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
        }
        Ok(energy)
    }
}

#[cfg(test)]
mod tests {
    use std::sync::Arc;

    use olli_mesh::{ElementKind, Mesh};

    use super::*;
    use crate::assembly::{Discretization, DofMap, Pattern};
    use crate::material::{registry, VolumetricForm};
    use crate::model::{Analysis, Formulation, Model};

    /// Parallel and serial element loops give the same residual and tangent
    /// (a practice of our code style): the scatter is serial, so they agree
    /// bit for bit, condensed and with carried pressure and dilatation
    /// states (three-field form, each element's own values), whose outputs
    /// must agree too. The 13³ = 2197 elements span three element chunks
    /// ([`CHUNK`] = 1024), so the chunk boundaries are crossed too.
    #[test]
    fn parallel_and_serial_assembly_agree() {
        let n = 13;
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
        let disc = Discretization::new(&model).unwrap();
        let ndof = model.mesh.node_count() * 3;
        let mut prescribed = vec![false; ndof];
        prescribed[..(n + 1) * (n + 1) * 3].iter_mut().for_each(|p| *p = true);
        let dofs = DofMap::new(3, &prescribed);
        let pattern = Pattern::build(&disc, &dofs).unwrap();
        let u: Vec<f64> = (0..ndof).map(|d| 0.01 * ((d * 13 % 17) as f64 - 8.0)).collect();
        let ne = model.mesh.element_count();
        let carried: Vec<MixedState> = (0..ne)
            .map(|e| MixedState {
                pressure: 0.1 * ((e * 5 % 9) as f64 - 4.0),
                dilatation: 1.0 + 0.001 * (e % 7) as f64,
                ..Default::default()
            })
            .collect();
        let run = |serial: bool, states: Option<&[MixedState]>| {
            let mut asm = Assembler::new();
            asm.serial = serial;
            let mut f = vec![0.0; ndof];
            let mut k = vec![0.0; pattern.nnz()];
            let mut states = states.map(|s| s.to_vec());
            asm.assemble(
                &disc,
                &dofs,
                &pattern,
                &u,
                Outputs {
                    internal: &mut f,
                    tangent: Some(&mut k),
                    predictor: None,
                    mixed: states.as_deref_mut(),
                    products: None,
                    history: None,
                },
            )
            .unwrap();
            (f, k, states)
        };
        assert!(ne > 2 * CHUNK, "several chunks");
        for states in [None, Some(carried.as_slice())] {
            let (fs, ks, ss) = run(true, states);
            let (fp, kp, sp) = run(false, states);
            assert_eq!(fs, fp);
            assert_eq!(ks, kp);
            assert_eq!(ss, sp);
            assert!(ks.iter().any(|v| *v != 0.0));
            if let Some(ss) = ss {
                assert!(ss.iter().all(|s| s.volume_ratio != 1.0), "state outputs written");
            }
        }
        // The carried pressures enter the tangent: the two forms differ.
        assert_ne!(run(false, None).1, run(false, Some(&carried)).1);
    }
}
