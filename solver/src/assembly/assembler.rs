//! The parallel element loop. Elements are processed in chunks: rayon
//! computes each element's force and tangent into a chunk buffer allocated
//! once, then one thread scatters the chunk through the precomputed map.
//! The scatter is a small fraction of the element work, and the fixed chunk
//! bounds memory whatever the mesh size.

use rayon::prelude::*;

use super::discretization::Discretization;
use super::dofs::{DofMap, NONE};
use super::pattern::{Pattern, SKIP};
use crate::element::{element_into, ElementError, MAX_DOFS};
use crate::error::SolveError;

const CHUNK: usize = 1024;
const KSTRIDE: usize = MAX_DOFS * MAX_DOFS;

/// Reusable buffers of the element loop.
#[derive(Debug)]
pub struct Assembler {
    kbuf: Vec<f64>,
    fbuf: Vec<f64>,
    status: Vec<Result<f64, ElementError>>,
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
}

impl Assembler {
    pub fn new() -> Self {
        Assembler {
            kbuf: vec![0.0; CHUNK * KSTRIDE],
            fbuf: vec![0.0; CHUNK * MAX_DOFS],
            status: vec![Ok(0.0); CHUNK],
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
    ) -> Result<f64, SolveError> {
        let Outputs { internal, mut tangent, mut predictor } = out;
        internal.fill(0.0);
        if let Some(k) = tangent.as_deref_mut() {
            k.fill(0.0);
        }
        let want_k = tangent.is_some() || predictor.is_some();
        let mesh = disc.mesh();
        let ne = mesh.element_count();
        let dim = dofs.dim;
        let mut energy = 0.0;
        let mut start = 0;
        while start < ne {
            let end = (start + CHUNK).min(ne);
            let count = end - start;
            let work = |(i, ((k, f), st)): (usize, ((&mut [f64], &mut [f64]), &mut Result<f64, ElementError>))| {
                let e = start + i;
                let (mut x, mut ue) = ([[0.0; 3]; 8], [[0.0; 3]; 8]);
                disc.gather(e, u, &mut x, &mut ue);
                let ctx = disc.context(e);
                *st = element_into(&ctx, &x, &ue, f, if want_k { Some(k) } else { None });
            };
            let kb = &mut self.kbuf[..count * KSTRIDE];
            let fb = &mut self.fbuf[..count * MAX_DOFS];
            let sb = &mut self.status[..count];
            if self.serial {
                kb.chunks_mut(KSTRIDE).zip(fb.chunks_mut(MAX_DOFS)).zip(sb.iter_mut()).enumerate().for_each(work);
            } else {
                kb.par_chunks_mut(KSTRIDE)
                    .zip(fb.par_chunks_mut(MAX_DOFS))
                    .zip(sb.par_iter_mut())
                    .enumerate()
                    .for_each(work);
            }
            for i in 0..count {
                let e = start + i;
                match &self.status[i] {
                    Ok(w) => energy += w,
                    Err(err) => return Err(SolveError::from_element(e, err.clone())),
                }
                let nodes = mesh.element_nodes(e);
                let nd = nodes.len() * dim;
                let f = &self.fbuf[i * MAX_DOFS..i * MAX_DOFS + nd];
                let gdof = |r: usize| nodes[r / dim] * dim + r % dim;
                for r in 0..nd {
                    internal[gdof(r)] += f[r];
                }
                let k = &self.kbuf[i * KSTRIDE..i * KSTRIDE + nd * nd];
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
            }
            start = end;
        }
        Ok(energy)
    }
}
