//! Follower pressure on one element side (a face in 3-D, an edge in 2-D),
//! acting on the current surface.
//!
//! The nodal force is `f_a = −p ∫ N_a n da` over the deformed side, with `n da`
//! the current area vector (outward for the mesh's counter-clockwise side
//! numbering). Because `n da` depends on the node positions, the force has a
//! consistent load stiffness `∂f/∂u`, returned here in full (it is not
//! symmetric in general; its skew part vanishes on a pressurised surface
//! whose boundary is held, Schweizerhof & Ramm 1984, from memory).
//! Pressure is positive when it pushes on the surface (compression).

use nalgebra::Vector3;

use crate::element::side::{for_each_point, side_kind, SideRule};
use crate::element::Analysis;
use crate::shape::MAX_SIDE_NODES;

/// Largest number of side degrees of freedom (quad9 face: 9 × 3).
pub const MAX_SIDE_DOFS: usize = 3 * MAX_SIDE_NODES;

/// Force of pressure `p` on one side into `force` (length nodes·dim) and,
/// if asked, `∂force/∂u` column-major into `stiffness`. `x` are the reference
/// positions and `u` the displacements of the side's nodes in the side order
/// of the mesh model; their number fixes the side shape (line2/line3 edges in
/// 2-D; tri3, quad4, tri6, quad8, quad9 faces in 3-D), whose own shape
/// functions and quadrature rule integrate the load
/// ([`crate::element::side`]), so mid-side nodes get their consistent share.
pub fn pressure_side_into(
    analysis: Analysis,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    p: f64,
    force: &mut [f64],
    mut stiffness: Option<&mut [f64]>,
) {
    let dim = if analysis == Analysis::Solid3d { 3 } else { 2 };
    side_kind(analysis, x.len()).expect("a side of a supported element");
    let nn = x.len();
    let nd = nn * dim;
    let mut current = [Vector3::zeros(); MAX_SIDE_NODES];
    for a in 0..nn {
        current[a] = Vector3::new(x[a][0] + u[a][0], x[a][1] + u[a][1], x[a][2] + u[a][2]);
    }
    force[..nd].fill(0.0);
    if let Some(k) = stiffness.as_deref_mut() {
        k[..nd * nd].fill(0.0);
    }
    for_each_point(analysis, &current[..nn], SideRule::Own, |point| {
        let (n, area) = (point.values, point.area_vector());
        for a in 0..nn {
            for i in 0..dim {
                force[dim * a + i] -= p * n[a] * area[i];
            }
        }
        let Some(k) = stiffness.as_deref_mut() else { return };
        for b in 0..nn {
            for m in 0..dim {
                let da = point.area_vector_derivative(b, m);
                let col = dim * b + m;
                for a in 0..nn {
                    for i in 0..dim {
                        k[col * nd + dim * a + i] -= p * n[a] * da[i];
                    }
                }
            }
        }
    });
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
    fn quadratic_side_load_stiffness_matches_finite_differences() {
        // Curved tri6, quad8 and quad9 faces and a curved line3 edge.
        let corners = [[0.0, 0.0, 1.0], [1.2, 0.1, 1.1], [1.0, 0.9, 0.8], [-0.1, 1.0, 1.0]];
        let mid = |a: usize, b: usize, bulge: f64| -> [f64; 3] {
            std::array::from_fn(|c| 0.5 * (corners[a][c] + corners[b][c]) + if c == 2 { bulge } else { 0.0 })
        };
        let tri6 = [corners[0], corners[1], corners[2], mid(0, 1, 0.1), mid(1, 2, -0.05), mid(2, 0, 0.08)];
        let quad8 = [corners[0], corners[1], corners[2], corners[3], mid(0, 1, 0.1), mid(1, 2, -0.05), mid(2, 3, 0.02), mid(3, 0, 0.07)];
        let mut quad9 = quad8.to_vec();
        quad9.push([0.5, 0.5, 1.1]);
        for x in [&tri6[..], &quad8[..], &quad9[..]] {
            let u: Vec<[f64; 3]> = (0..x.len()).map(|a| [0.03 * a as f64, -0.02 * (a % 3) as f64, 0.05 * (a % 2) as f64]).collect();
            check(Analysis::Solid3d, x, &u, 3);
        }
        let x = [[1.0, 0.0, 0.0], [1.3, 0.8, 0.0], [1.2, 0.45, 0.0]];
        let u = [[0.2, 0.1, 0.0], [-0.1, 0.05, 0.0], [0.03, -0.02, 0.0]];
        check(Analysis::Axisymmetric, &x, &u, 2);
        check(Analysis::PlaneStrain { thickness: 3.0 }, &x, &u, 2);
    }

    /// Consistent nodal loads of a uniform pressure on flat quadratic sides:
    /// line3 L/6, L/6, 2L/3 (Simpson's rule); tri6 corners 0 and mid-sides
    /// A/3; quad8 corners −A/12 and mid-sides A/3 (Zienkiewicz & Taylor, The
    /// Finite Element Method, vol. 1, equivalent nodal forces of quadratic
    /// elements under uniform load; from memory, and each set sums to A).
    #[test]
    fn quadratic_sides_get_their_consistent_nodal_loads() {
        let p = 2.0;
        // Line3 of length 2 running up x = 1 (plane strain, thickness 1): outward normal +x.
        let x = [[1.0, 0.0, 0.0], [1.0, 2.0, 0.0], [1.0, 1.0, 0.0]];
        let mut f = [0.0; 6];
        pressure_side_into(Analysis::PlaneStrain { thickness: 1.0 }, &x, &[[0.0; 3]; 3], p, &mut f, None);
        let want = [2.0 / 6.0, 2.0 / 6.0, 4.0 / 3.0];
        for a in 0..3 {
            assert!((f[2 * a] + p * want[a]).abs() < 1e-12 && f[2 * a + 1].abs() < 1e-12, "line3 node {a}: {f:?}");
        }
        // Flat tri6 of area 2 in the plane z = 0, normal +z.
        let tri6 = [[0.0, 0.0, 0.0], [2.0, 0.0, 0.0], [0.0, 2.0, 0.0], [1.0, 0.0, 0.0], [1.0, 1.0, 0.0], [0.0, 1.0, 0.0]];
        let mut f = [0.0; 18];
        pressure_side_into(Analysis::Solid3d, &tri6, &[[0.0; 3]; 6], p, &mut f, None);
        for a in 0..6 {
            let want = if a < 3 { 0.0 } else { -p * 2.0 / 3.0 };
            assert!((f[3 * a + 2] - want).abs() < 1e-12, "tri6 node {a}: {}", f[3 * a + 2]);
        }
        // Flat quad8 of area 4 (the square [0, 2]²), normal +z.
        let quad8 = [
            [0.0, 0.0, 0.0],
            [2.0, 0.0, 0.0],
            [2.0, 2.0, 0.0],
            [0.0, 2.0, 0.0],
            [1.0, 0.0, 0.0],
            [2.0, 1.0, 0.0],
            [1.0, 2.0, 0.0],
            [0.0, 1.0, 0.0],
        ];
        let mut f = [0.0; 24];
        pressure_side_into(Analysis::Solid3d, &quad8, &[[0.0; 3]; 8], p, &mut f, None);
        for a in 0..8 {
            let want = if a < 4 { p * 4.0 / 12.0 } else { -p * 4.0 / 3.0 };
            assert!((f[3 * a + 2] - want).abs() < 1e-12, "quad8 node {a}: {}", f[3 * a + 2]);
        }
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
