//! Follower pressure on one element side (a quad4 face in 3-D, a two-node edge
//! in 2-D), acting on the current surface.
//!
//! The nodal force is `f_a = −p ∫ N_a n da` over the deformed side, with `n da`
//! the current area vector (outward for the mesh's counter-clockwise side
//! numbering). Because `n da` depends on the node positions, the force has a
//! consistent load stiffness `∂f/∂u`, returned here in full (it is not
//! symmetric in general; its skew part vanishes on a pressurised surface
//! whose boundary is held, Schweizerhof & Ramm 1984, from memory).
//! Pressure is positive when it pushes on the surface (compression).

use std::f64::consts::PI;

use nalgebra::Vector3;

use crate::element::Analysis;
use crate::quadrature::{LINE2, SQUARE4};
use crate::shape::{line2, quad4};

/// Largest number of side degrees of freedom (quad face: 4 × 3).
pub const MAX_SIDE_DOFS: usize = 12;

/// Force of pressure `p` on one side into `force` (length nodes·dim) and,
/// if asked, `∂force/∂u` column-major into `stiffness`. `x` are the reference
/// positions and `u` the displacements of the side's nodes, corners in the
/// side order of the mesh model.
pub fn pressure_side_into(
    analysis: Analysis,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    p: f64,
    force: &mut [f64],
    mut stiffness: Option<&mut [f64]>,
) {
    let cur = |a: usize| Vector3::new(x[a][0] + u[a][0], x[a][1] + u[a][1], x[a][2] + u[a][2]);
    match analysis {
        Analysis::Solid3d => {
            let nd = 12;
            force[..nd].fill(0.0);
            if let Some(k) = stiffness.as_deref_mut() {
                k[..nd * nd].fill(0.0);
            }
            for q in SQUARE4 {
                let (n, d) = quad4::eval(q);
                let (mut ta, mut tb) = (Vector3::zeros(), Vector3::zeros());
                for a in 0..4 {
                    ta += cur(a) * d[a][0];
                    tb += cur(a) * d[a][1];
                }
                let area = ta.cross(&tb);
                for a in 0..4 {
                    for i in 0..3 {
                        force[3 * a + i] -= p * n[a] * area[i];
                    }
                }
                if let Some(k) = stiffness.as_deref_mut() {
                    for b in 0..4 {
                        for m in 0..3 {
                            let e = Vector3::from_fn(|r, _| if r == m { 1.0 } else { 0.0 });
                            let dn = e.cross(&tb) * d[b][0] + ta.cross(&e) * d[b][1];
                            let col = 3 * b + m;
                            for a in 0..4 {
                                for i in 0..3 {
                                    k[col * nd + 3 * a + i] -= p * n[a] * dn[i];
                                }
                            }
                        }
                    }
                }
            }
        }
        Analysis::Axisymmetric | Analysis::PlaneStrain { .. } => {
            let nd = 4;
            force[..nd].fill(0.0);
            if let Some(k) = stiffness.as_deref_mut() {
                k[..nd * nd].fill(0.0);
            }
            for s in LINE2 {
                let (n, d) = line2::eval(s);
                let (mut t, mut r) = ([0.0; 2], 0.0);
                for a in 0..2 {
                    let c = cur(a);
                    t[0] += c[0] * d[a];
                    t[1] += c[1] * d[a];
                    r += c[0] * n[a];
                }
                // Outward normal of a counter-clockwise element: the edge
                // direction turned clockwise.
                let nv = [t[1], -t[0]];
                let (scale, dscale_dr) = match analysis {
                    Analysis::Axisymmetric => (2.0 * PI * r, 2.0 * PI),
                    Analysis::PlaneStrain { thickness } => (thickness, 0.0),
                    Analysis::Solid3d => unreachable!(),
                };
                for a in 0..2 {
                    for i in 0..2 {
                        force[2 * a + i] -= p * n[a] * scale * nv[i];
                    }
                }
                if let Some(k) = stiffness.as_deref_mut() {
                    for b in 0..2 {
                        for m in 0..2 {
                            // ∂(scale·nv)/∂x_bm
                            let dnv = if m == 0 { [0.0, -d[b]] } else { [d[b], 0.0] };
                            let ds = if m == 0 { dscale_dr * n[b] } else { 0.0 };
                            let col = 2 * b + m;
                            for a in 0..2 {
                                for i in 0..2 {
                                    k[col * nd + 2 * a + i] -= p * n[a] * (ds * nv[i] + scale * dnv[i]);
                                }
                            }
                        }
                    }
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn check(analysis: Analysis, x: &[[f64; 3]], u: &[[f64; 3]], dim: usize) {
        let nd = x.len() * dim;
        let mut f = vec![0.0; nd];
        let mut k = vec![0.0; nd * nd];
        pressure_side_into(analysis, x, u, 1.7, &mut f, Some(&mut k));
        let kmax = k.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        let h = 1e-6;
        let (mut fp, mut fm) = (vec![0.0; nd], vec![0.0; nd]);
        for c in 0..nd {
            let (mut up, mut um) = (u.to_vec(), u.to_vec());
            up[c / dim][c % dim] += h;
            um[c / dim][c % dim] -= h;
            pressure_side_into(analysis, x, &up, 1.7, &mut fp, None);
            pressure_side_into(analysis, x, &um, 1.7, &mut fm, None);
            for r in 0..nd {
                let fd = (fp[r] - fm[r]) / (2.0 * h);
                // Same FD tolerance reasoning as the element checks.
                assert!((fd - k[c * nd + r]).abs() <= 1e-6 * kmax, "{analysis:?} [{r},{c}] {} vs {fd}", k[c * nd + r]);
            }
        }
    }

    #[test]
    fn face_load_stiffness_matches_finite_differences() {
        let x = [[0.0, 0.0, 1.0], [1.2, 0.1, 1.1], [1.0, 0.9, 0.8], [-0.1, 1.0, 1.0]];
        let u = [[0.1, 0.0, 0.05], [0.0, 0.2, -0.1], [0.05, -0.1, 0.0], [0.0, 0.0, 0.1]];
        check(Analysis::Solid3d, &x, &u, 3);
    }

    #[test]
    fn edge_load_stiffness_matches_finite_differences() {
        let x = [[1.0, 0.0, 0.0], [1.3, 0.8, 0.0]];
        let u = [[0.2, 0.1, 0.0], [-0.1, 0.05, 0.0]];
        check(Analysis::Axisymmetric, &x, &u, 2);
        check(Analysis::PlaneStrain { thickness: 3.0 }, &x, &u, 2);
    }

    #[test]
    fn unit_square_face_resultant_is_pressure_times_area() {
        // Face with outward normal +z (counter-clockwise seen from +z).
        let x = [[0.0, 0.0, 0.0], [2.0, 0.0, 0.0], [2.0, 1.0, 0.0], [0.0, 1.0, 0.0]];
        let mut f = [0.0; 12];
        pressure_side_into(Analysis::Solid3d, &x, &[[0.0; 3]; 4], 3.0, &mut f, None);
        let fz: f64 = (0..4).map(|a| f[3 * a + 2]).sum();
        assert!((fz + 6.0).abs() < 1e-12);
    }
}
