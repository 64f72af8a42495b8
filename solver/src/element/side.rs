//! Integration over one element side — an edge of a 2-D section (line2,
//! line3) or a face of a solid (tri3, tri6, quad4, quad8, quad9) — with the
//! side shape's own functions and a Gauss rule on its reference domain.
//! Loads (follower, dead, fluid) and contact areas all integrate their sides
//! here.
//!
//! At every point the side's tangents `t_ξ = Σ x_a ∂N_a/∂ξ` (and `t_η` on a
//! face) give the area vector `n da`: `t_ξ × t_η · w` on a face (outward for
//! the mesh's counter-clockwise face numbering), and on an edge the tangent
//! turned clockwise, `(t_y, −t_x) · w`, times the section: the thickness in
//! plane strain, the ring `2πr` in axisymmetry (r = Σ N_a x_a, the full
//! revolution).

use std::f64::consts::PI;

use nalgebra::Vector3;

use super::Analysis;
use crate::shape::{ShapeKind, MAX_SIDE_NODES};

/// The side shape of `nodes` nodes in an analysis: an edge in 2-D, a face in 3-D.
pub fn side_kind(analysis: Analysis, nodes: usize) -> Option<ShapeKind> {
    ShapeKind::side_with_nodes(element_dimension(analysis), nodes)
}

/// Dimension of the elements whose sides are integrated (3 or 2).
fn element_dimension(analysis: Analysis) -> usize {
    if analysis == Analysis::Solid3d {
        3
    } else {
        2
    }
}

/// Which Gauss rule integrates a side.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SideRule {
    /// The side shape's own rule ([`ShapeKind::table`]: exact for its
    /// stiffness-like products, tabulated once).
    Own,
    /// The rule of at least this polynomial degree on the side's domain
    /// (e.g. 5 for the products `N_a N_b` of a quadratic side).
    Degree(usize),
}

/// The geometry of a side at one integration point.
#[derive(Debug, Clone, Copy)]
pub struct SidePoint<'a> {
    /// Shape function values at the point.
    pub values: &'a [f64],
    /// Reference derivatives `∂N_a/∂ξ`, `∂N_a/∂η`.
    pub derivatives: &'a [[f64; 3]],
    /// Quadrature weight.
    pub weight: f64,
    /// Tangents `∂x/∂ξ` and `∂x/∂η` (the second zero on an edge).
    pub tangents: [Vector3<f64>; 2],
    /// `Σ N_a x_a` (the radius r in axisymmetry).
    pub radius: f64,
    analysis: Analysis,
}

impl SidePoint<'_> {
    /// The section an edge stands for per unit length (thickness, or the
    /// ring `2πr`); 1 on a face.
    pub fn section(&self) -> f64 {
        match self.analysis {
            Analysis::Solid3d => 1.0,
            Analysis::PlaneStrain { thickness } => thickness,
            Analysis::Axisymmetric => 2.0 * PI * self.radius,
        }
    }

    /// The outward area vector `n da` at the point, weight and section included.
    pub fn area_vector(&self) -> Vector3<f64> {
        let [ta, tb] = self.tangents;
        match self.analysis {
            Analysis::Solid3d => ta.cross(&tb) * self.weight,
            _ => Vector3::new(ta[1], -ta[0], 0.0) * (self.weight * self.section()),
        }
    }

    /// The area element `da` (weight and section included).
    pub fn area(&self) -> f64 {
        let [ta, tb] = self.tangents;
        self.weight
            * match self.analysis {
                Analysis::Solid3d => ta.cross(&tb).norm(),
                _ => self.section() * ta.norm(),
            }
    }

    /// `∂(n da)/∂x_bm`: the change of the area vector with coordinate `m`
    /// of side node `b`.
    pub fn area_vector_derivative(&self, b: usize, m: usize) -> Vector3<f64> {
        let [ta, tb] = self.tangents;
        let d = self.derivatives[b];
        let e = Vector3::from_fn(|row, _| if row == m { 1.0 } else { 0.0 });
        match self.analysis {
            Analysis::Solid3d => (e.cross(&tb) * d[0] + ta.cross(&e) * d[1]) * self.weight,
            _ => {
                // ∂(t_y, −t_x)/∂x_bm, and the ring's 2π N_b for m = r.
                let turned = Vector3::new(e[1], -e[0], 0.0) * d[0];
                let ring = if m == 0 && self.analysis == Analysis::Axisymmetric { 2.0 * PI * self.values[b] } else { 0.0 };
                (turned * self.section() + Vector3::new(ta[1], -ta[0], 0.0) * ring) * self.weight
            }
        }
    }
}

/// Calls `f` at every integration point of the side through the nodes `x`
/// (in the side shape's node order, their number fixing the shape; see
/// [`side_kind`]). Nothing is called for a node count that is no side.
pub fn for_each_point(analysis: Analysis, x: &[Vector3<f64>], rule: SideRule, mut f: impl FnMut(&SidePoint)) {
    let Some(kind) = side_kind(analysis, x.len()) else { return };
    let nn = x.len();
    let mut at = |values: &[f64], derivatives: &[[f64; 3]], weight: f64| {
        let (mut ta, mut tb, mut radius) = (Vector3::zeros(), Vector3::zeros(), 0.0);
        for a in 0..nn {
            ta += x[a] * derivatives[a][0];
            tb += x[a] * derivatives[a][1];
            radius += x[a][0] * values[a];
        }
        f(&SidePoint { values, derivatives, weight, tangents: [ta, tb], radius, analysis });
    };
    match rule {
        SideRule::Own => {
            let table = kind.table();
            for q in 0..table.len() {
                at(table.values(q), table.derivatives(q), table.weights[q]);
            }
        }
        SideRule::Degree(degree) => {
            let def = kind.def();
            let rule = crate::shape::rule::rule(def.domain, degree).expect("a rule of this degree on every side domain");
            let (mut values, mut derivatives) = ([0.0; MAX_SIDE_NODES], [[0.0; 3]; MAX_SIDE_NODES]);
            for (xi, &w) in rule.points.iter().zip(&rule.weights) {
                (def.eval)(*xi, &mut values[..nn], &mut derivatives[..nn]);
                at(&values[..nn], &derivatives[..nn], w);
            }
        }
    }
}

/// The consistent nodal areas `∫ N_a da` of the side through `x` into
/// `areas` (one per node, overwritten), with its own rule; returns the
/// side's area (their sum). On quadratic sides these are the nodal loads of
/// a uniform pressure: zero at tri6 corners, negative at quad8 corners.
pub fn nodal_areas(analysis: Analysis, x: &[Vector3<f64>], areas: &mut [f64]) -> f64 {
    areas[..x.len()].fill(0.0);
    let mut total = 0.0;
    for_each_point(analysis, x, SideRule::Own, |p| {
        let da = p.area();
        total += da;
        for (a, n) in p.values.iter().enumerate() {
            areas[a] += n * da;
        }
    });
    total
}

/// The area of the side through `x` (length × thickness, or the ring area
/// in axisymmetry; a face's area in 3-D), with its own rule.
pub fn area(analysis: Analysis, x: &[Vector3<f64>]) -> f64 {
    let mut total = 0.0;
    for_each_point(analysis, x, SideRule::Own, |p| total += p.area());
    total
}

/// The plain measure of the side through `x`: its length in 2-D (no
/// thickness, no ring) or its area in 3-D.
pub fn measure(analysis: Analysis, x: &[Vector3<f64>]) -> f64 {
    let bare = if analysis == Analysis::Solid3d { Analysis::Solid3d } else { Analysis::PlaneStrain { thickness: 1.0 } };
    area(bare, x)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A square [0, 2]² in the plane z = 0 (counter-clockwise seen from +z)
    /// whose top edge bulges by `bulge` at its mid-side node: quad8 and
    /// quad9 faces (quad9 centre at (1, 1)) and, over its lower-left half, a
    /// tri6 face (0,0), (2,0), (0,2) whose hypotenuse bulges the same way.
    fn bulged_faces(bulge: f64) -> [Vec<Vector3<f64>>; 3] {
        let v = |x: f64, y: f64| Vector3::new(x, y, 0.0);
        let quad8 = vec![v(0., 0.), v(2., 0.), v(2., 2.), v(0., 2.), v(1., 0.), v(2., 1.), v(1., 2. + bulge), v(0., 1.)];
        let mut quad9 = quad8.clone();
        quad9.push(v(1., 1.));
        let h = bulge / std::f64::consts::SQRT_2;
        let tri6 = vec![v(0., 0.), v(2., 0.), v(0., 2.), v(1., 0.), v(1. + h, 1. + h), v(0., 1.)];
        [quad8, quad9, tri6]
    }

    /// Area and first moments of plane regions with one parabolic edge,
    /// against the closed forms: a parabolic arc over a chord of length L
    /// with sagitta δ adds the segment (2/3) L δ (Archimedes, *Quadrature of
    /// the Parabola*), and over the square the region 0 ≤ y ≤ 2 + δ(1 −
    /// (x−1)²) has ∫ y dA = ∫ (2 + δ s)²/2 dx = 4 + 8δ/3 + 8δ²/15 (with
    /// ∫ s dx = 4/3, ∫ s² dx = 16/15, s = 1 − (x−1)² on [0, 2]) and, by
    /// symmetry, ∫ x dA = area. For the tri6 the hypotenuse is a parabola
    /// of sagitta δ over the chord 2√2 from the triangle of area 2, and its
    /// centroid lies on the diagonal x = y. The isoparametric maps of these
    /// faces have polynomial Jacobians, so the Gauss rules must reproduce the
    /// closed forms to round-off.
    #[test]
    fn curved_quadratic_faces_have_their_exact_area_and_moments() {
        for bulge in [0.0, 0.3, -0.45] {
            let [quad8, quad9, tri6] = bulged_faces(bulge);
            for (name, x, area_exact, my_exact) in [
                ("quad8", &quad8, 4.0 + 4.0 * bulge / 3.0, 4.0 + 8.0 * bulge / 3.0 + 8.0 * bulge * bulge / 15.0),
                ("quad9", &quad9, 4.0 + 4.0 * bulge / 3.0, 4.0 + 8.0 * bulge / 3.0 + 8.0 * bulge * bulge / 15.0),
                ("tri6", &tri6, 2.0 + 2.0 * 2f64.sqrt() * bulge * 2.0 / 3.0, f64::NAN),
            ] {
                let (mut a, mut mx, mut my, mut nz) = (0.0, 0.0, 0.0, 0.0);
                for_each_point(Analysis::Solid3d, x, SideRule::Own, |p| {
                    let pos: Vector3<f64> = x.iter().zip(p.values).map(|(xa, n)| xa * *n).sum();
                    a += p.area();
                    mx += pos.x * p.area();
                    my += pos.y * p.area();
                    nz += p.area_vector().z;
                });
                assert!((a - area_exact).abs() < 1e-13, "{name} δ={bulge}: area {a} vs {area_exact}");
                assert!((nz - area_exact).abs() < 1e-13, "{name} δ={bulge}: area vector {nz} (outward +z)");
                let mut shares = [0.0; MAX_SIDE_NODES];
                let total = nodal_areas(Analysis::Solid3d, x, &mut shares);
                assert!((total - area_exact).abs() < 1e-13 && (shares.iter().sum::<f64>() - total).abs() < 1e-13);
                if name == "tri6" {
                    assert!((mx - my).abs() < 1e-13, "tri6 δ={bulge}: centroid off the diagonal {mx} {my}");
                } else {
                    assert!((mx - area_exact).abs() < 1e-13, "{name} δ={bulge}: ∫x dA {mx}");
                    assert!((my - my_exact).abs() < 1e-13, "{name} δ={bulge}: ∫y dA {my} vs {my_exact}");
                }
            }
        }
    }

    /// A curved line3 edge from (r, z) = (1, 0) to (1, 2) whose mid-side node
    /// sits at (1 + δ, 1): r = 1 + δ(1 − ξ²), z = 1 + ξ. Its ring area vector
    /// has the radial component ∫ 2πr dz = 2π(2 + 4δ/3) and the axial
    /// component −π(r₁² − r₀²) = 0 (the projected annulus, whatever the
    /// edge's shape); in plane strain it is the chord turned clockwise
    /// times the thickness, (Δz, −Δr)·t.
    #[test]
    fn curved_line3_edge_has_its_exact_ring_and_section_area_vector() {
        let v = |r: f64, z: f64| Vector3::new(r, z, 0.0);
        for bulge in [0.0, 0.25, -0.4] {
            let x = [v(1.0, 0.0), v(1.0, 2.0), v(1.0 + bulge, 1.0)];
            let mut ring = Vector3::zeros();
            for_each_point(Analysis::Axisymmetric, &x, SideRule::Own, |p| ring += p.area_vector());
            let radial = 2.0 * PI * (2.0 + 4.0 * bulge / 3.0);
            assert!((ring.x - radial).abs() < 1e-12 && ring.y.abs() < 1e-12, "δ={bulge}: {ring:?} vs ({radial}, 0)");
            // A sloped edge: the axial component is −π(r₁² − r₀²).
            let sloped = [v(1.0, 0.0), v(3.0, 2.0), v(2.0 - bulge, 1.0 + bulge)];
            let mut ring = Vector3::zeros();
            for_each_point(Analysis::Axisymmetric, &sloped, SideRule::Own, |p| ring += p.area_vector());
            assert!((ring.y + PI * 8.0).abs() < 1e-12, "δ={bulge}: axial {}", ring.y);
            let mut section = Vector3::zeros();
            for_each_point(Analysis::PlaneStrain { thickness: 3.0 }, &sloped, SideRule::Own, |p| section += p.area_vector());
            assert!((section - Vector3::new(6.0, -6.0, 0.0)).norm() < 1e-12, "δ={bulge}: {section:?}");
        }
        // A straight edge: length × thickness, and the ring area 2π r̄ L.
        let x = [v(1.0, 0.0), v(4.0, 4.0), v(2.5, 2.0)];
        assert!((area(Analysis::PlaneStrain { thickness: 2.0 }, &x) - 10.0).abs() < 1e-12);
        assert!((area(Analysis::Axisymmetric, &x) - 2.0 * PI * 2.5 * 5.0).abs() < 1e-12);
        assert!((measure(Analysis::Axisymmetric, &x) - 5.0).abs() < 1e-12);
    }

    /// `∂(n da)/∂x_bm` against central differences of the area vector, on
    /// curved sides of every quadratic kind and both sections.
    #[test]
    fn area_vector_derivative_matches_finite_differences() {
        let [quad8, quad9, tri6] = bulged_faces(0.3);
        let warp = |x: &Vec<Vector3<f64>>| -> Vec<Vector3<f64>> {
            x.iter().enumerate().map(|(a, p)| p + Vector3::new(0.01 * a as f64, -0.02 * (a % 3) as f64, 0.1 * (a % 2) as f64)).collect()
        };
        let line3 = vec![Vector3::new(1.0, 0.0, 0.0), Vector3::new(1.3, 0.8, 0.0), Vector3::new(1.25, 0.35, 0.0)];
        let cases = [
            (Analysis::Solid3d, warp(&quad8)),
            (Analysis::Solid3d, warp(&quad9)),
            (Analysis::Solid3d, warp(&tri6)),
            (Analysis::Axisymmetric, line3.clone()),
            (Analysis::PlaneStrain { thickness: 2.0 }, line3),
        ];
        let h = 1e-6;
        for (analysis, x) in cases {
            let dim = element_dimension(analysis);
            let total = |x: &[Vector3<f64>], q: usize| {
                let mut out = Vector3::zeros();
                let mut k = 0;
                for_each_point(analysis, x, SideRule::Own, |p| {
                    if k == q {
                        out = p.area_vector();
                    }
                    k += 1;
                });
                out
            };
            let points = side_kind(analysis, x.len()).unwrap().points();
            for q in 0..points {
                let mut exact = Vec::new();
                let mut k = 0;
                for_each_point(analysis, &x, SideRule::Own, |p| {
                    if k == q {
                        for b in 0..x.len() {
                            for m in 0..dim {
                                exact.push(p.area_vector_derivative(b, m));
                            }
                        }
                    }
                    k += 1;
                });
                for b in 0..x.len() {
                    for m in 0..dim {
                        let (mut xp, mut xm) = (x.clone(), x.clone());
                        xp[b][m] += h;
                        xm[b][m] -= h;
                        let fd = (total(&xp, q) - total(&xm, q)) / (2.0 * h);
                        let got = exact[b * dim + m];
                        assert!((fd - got).norm() < 1e-7, "{analysis:?} point {q} node {b} dir {m}: {got:?} vs {fd:?}");
                    }
                }
            }
        }
    }
}
