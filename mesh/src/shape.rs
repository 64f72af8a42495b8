//! Shape functions, reference coordinates and Gauss rules for every element
//! kind, in VTK node order. The mesh crate needs them for quality checks
//! (Jacobians at corners and Gauss points) and for measuring areas and
//! volumes; the solver keeps its own hot-loop versions.
//!
//! Each shape function is written once over a small forward-mode dual number,
//! which yields values and exact reference derivatives together and keeps the
//! eleven kinds free of hand-differentiated (and error-prone) derivative tables.
//!
//! Reference domains: quads and hexes on [-1, 1]ⁿ; triangles and tetrahedra on
//! the unit simplex; the wedge is the unit triangle × [-1, 1] with VTK's node
//! order (node 1 at (0, 1), node 2 at (1, 0), so that the base triangle
//! 0-1-2 faces away from the top one, as VTK requires).

use crate::element::ElementKind;

/// Largest node count of any kind (hex27).
pub const MAX_NODES: usize = 27;

#[derive(Clone, Copy)]
struct D {
    v: f64,
    d: [f64; 3],
}

impl D {
    fn c(v: f64) -> D {
        D { v, d: [0.0; 3] }
    }
    fn var(v: f64, k: usize) -> D {
        let mut d = [0.0; 3];
        d[k] = 1.0;
        D { v, d }
    }
}
impl std::ops::Add for D {
    type Output = D;
    fn add(self, o: D) -> D {
        D { v: self.v + o.v, d: [self.d[0] + o.d[0], self.d[1] + o.d[1], self.d[2] + o.d[2]] }
    }
}
impl std::ops::Sub for D {
    type Output = D;
    fn sub(self, o: D) -> D {
        D { v: self.v - o.v, d: [self.d[0] - o.d[0], self.d[1] - o.d[1], self.d[2] - o.d[2]] }
    }
}
impl std::ops::Mul for D {
    type Output = D;
    // The product rule adds the two derivative terms.
    #[allow(clippy::suspicious_arithmetic_impl)]
    fn mul(self, o: D) -> D {
        let f = |k: usize| self.d[k] * o.v + self.v * o.d[k];
        D { v: self.v * o.v, d: [f(0), f(1), f(2)] }
    }
}
impl std::ops::Mul<D> for f64 {
    type Output = D;
    fn mul(self, o: D) -> D {
        D { v: self * o.v, d: [self * o.d[0], self * o.d[1], self * o.d[2]] }
    }
}

const Q4: [[f64; 3]; 4] = [[-1., -1., 0.], [1., -1., 0.], [1., 1., 0.], [-1., 1., 0.]];
const Q9: [[f64; 3]; 9] =
    [[-1., -1., 0.], [1., -1., 0.], [1., 1., 0.], [-1., 1., 0.], [0., -1., 0.], [1., 0., 0.], [0., 1., 0.], [-1., 0., 0.], [0., 0., 0.]];
const T6: [[f64; 3]; 6] = [[0., 0., 0.], [1., 0., 0.], [0., 1., 0.], [0.5, 0., 0.], [0.5, 0.5, 0.], [0., 0.5, 0.]];
const TET10: [[f64; 3]; 10] = [
    [0., 0., 0.],
    [1., 0., 0.],
    [0., 1., 0.],
    [0., 0., 1.],
    [0.5, 0., 0.],
    [0.5, 0.5, 0.],
    [0., 0.5, 0.],
    [0., 0., 0.5],
    [0.5, 0., 0.5],
    [0., 0.5, 0.5],
];
const W6: [[f64; 3]; 6] = [[0., 0., -1.], [0., 1., -1.], [1., 0., -1.], [0., 0., 1.], [0., 1., 1.], [1., 0., 1.]];
const H27: [[f64; 3]; 27] = [
    [-1., -1., -1.],
    [1., -1., -1.],
    [1., 1., -1.],
    [-1., 1., -1.],
    [-1., -1., 1.],
    [1., -1., 1.],
    [1., 1., 1.],
    [-1., 1., 1.],
    [0., -1., -1.],
    [1., 0., -1.],
    [0., 1., -1.],
    [-1., 0., -1.],
    [0., -1., 1.],
    [1., 0., 1.],
    [0., 1., 1.],
    [-1., 0., 1.],
    [-1., -1., 0.],
    [1., -1., 0.],
    [1., 1., 0.],
    [-1., 1., 0.],
    [-1., 0., 0.],
    [1., 0., 0.],
    [0., -1., 0.],
    [0., 1., 0.],
    [0., 0., -1.],
    [0., 0., 1.],
    [0., 0., 0.],
];

/// Reference coordinates of every node of `kind`, in VTK order (a `const fn`,
/// so the solver's shape registry takes its tables from here).
pub const fn reference_nodes(kind: ElementKind) -> &'static [[f64; 3]] {
    match kind {
        ElementKind::Tri3 => T6.split_at(3).0,
        ElementKind::Tri6 => &T6,
        ElementKind::Quad4 => &Q4,
        ElementKind::Quad8 => Q9.split_at(8).0,
        ElementKind::Quad9 => &Q9,
        ElementKind::Tet4 => TET10.split_at(4).0,
        ElementKind::Tet10 => &TET10,
        ElementKind::Wedge6 => &W6,
        ElementKind::Hex8 => H27.split_at(8).0,
        ElementKind::Hex20 => H27.split_at(20).0,
        ElementKind::Hex27 => &H27,
    }
}

/// 1-D Lagrange basis on the nodes -1, 0, 1 (quadratic) or -1, 1 (linear),
/// evaluated for the node at `at`.
fn lagrange(x: D, at: f64, quadratic: bool) -> D {
    if !quadratic {
        0.5 * (D::c(1.0) + at * x)
    } else if at == 0.0 {
        D::c(1.0) - x * x
    } else {
        0.5 * x * (x + D::c(at))
    }
}

/// Values of all shape functions of `kind` at `xi`, as dual numbers.
fn eval(kind: ElementKind, xi: [f64; 3], out: &mut [D; MAX_NODES]) {
    let x = D::var(xi[0], 0);
    let y = D::var(xi[1], 1);
    let z = D::var(xi[2], 2);
    let one = D::c(1.0);
    let refs = reference_nodes(kind);
    match kind {
        ElementKind::Quad4 | ElementKind::Quad9 => {
            let q = kind == ElementKind::Quad9;
            for (i, r) in refs.iter().enumerate() {
                out[i] = lagrange(x, r[0], q) * lagrange(y, r[1], q);
            }
        }
        ElementKind::Hex8 | ElementKind::Hex27 => {
            let q = kind == ElementKind::Hex27;
            for (i, r) in refs.iter().enumerate() {
                out[i] = lagrange(x, r[0], q) * lagrange(y, r[1], q) * lagrange(z, r[2], q);
            }
        }
        ElementKind::Quad8 => {
            for (i, r) in refs.iter().enumerate() {
                let (a, b) = (one + r[0] * x, one + r[1] * y);
                out[i] = if i < 4 {
                    0.25 * a * b * (r[0] * x + r[1] * y - one)
                } else if r[0] == 0.0 {
                    0.5 * (one - x * x) * b
                } else {
                    0.5 * a * (one - y * y)
                };
            }
        }
        ElementKind::Hex20 => {
            for (i, r) in refs.iter().enumerate() {
                let (a, b, c) = (one + r[0] * x, one + r[1] * y, one + r[2] * z);
                out[i] = if i < 8 {
                    0.125 * a * b * c * (r[0] * x + r[1] * y + r[2] * z - D::c(2.0))
                } else if r[0] == 0.0 {
                    0.25 * (one - x * x) * b * c
                } else if r[1] == 0.0 {
                    0.25 * a * (one - y * y) * c
                } else {
                    0.25 * a * b * (one - z * z)
                };
            }
        }
        ElementKind::Tri3 | ElementKind::Tri6 => {
            let l = [one - x - y, x, y];
            simplex(&l, kind == ElementKind::Tri6, &[(0, 1), (1, 2), (2, 0)], out);
        }
        ElementKind::Tet4 | ElementKind::Tet10 => {
            let l = [one - x - y - z, x, y, z];
            let edges = [(0, 1), (1, 2), (2, 0), (0, 3), (1, 3), (2, 3)];
            simplex(&l, kind == ElementKind::Tet10, &edges, out);
        }
        ElementKind::Wedge6 => {
            // VTK order: node 1 sits at (0, 1), node 2 at (1, 0).
            let l = [one - x - y, y, x];
            for i in 0..6 {
                let h = if i < 3 { 0.5 * (one - z) } else { 0.5 * (one + z) };
                out[i] = l[i % 3] * h;
            }
        }
    }
}

/// Corner functions of a linear or quadratic simplex from its barycentric
/// coordinates `l`, then one function per edge for the quadratic one.
fn simplex(l: &[D], quadratic: bool, edges: &[(usize, usize)], out: &mut [D; MAX_NODES]) {
    for (i, &li) in l.iter().enumerate() {
        out[i] = if quadratic { li * (2.0 * li - D::c(1.0)) } else { li };
    }
    if quadratic {
        for (k, &(a, b)) in edges.iter().enumerate() {
            out[l.len() + k] = 4.0 * l[a] * l[b];
        }
    }
}

/// Shape function values `n` and reference derivatives `dn` of `kind` at `xi`;
/// only the first `kind.node_count()` entries are written.
pub fn shape_into(kind: ElementKind, xi: [f64; 3], n: &mut [f64; MAX_NODES], dn: &mut [[f64; 3]; MAX_NODES]) {
    let mut d = [D::c(0.0); MAX_NODES];
    eval(kind, xi, &mut d);
    for i in 0..kind.node_count() {
        n[i] = d[i].v;
        dn[i] = d[i].d;
    }
}

/// Determinant of the Jacobian dx/dξ at reference point `xi` for an element
/// with node coordinates `x` (2-D kinds use x and y only).
pub fn jacobian_det(kind: ElementKind, x: &[[f64; 3]], xi: [f64; 3]) -> f64 {
    let mut n = [0.0; MAX_NODES];
    let mut dn = [[0.0; 3]; MAX_NODES];
    shape_into(kind, xi, &mut n, &mut dn);
    let mut j = [[0.0; 3]; 3];
    for (a, xa) in x.iter().enumerate().take(kind.node_count()) {
        for r in 0..3 {
            for c in 0..3 {
                j[r][c] += xa[r] * dn[a][c];
            }
        }
    }
    if kind.dimension() == 2 {
        j[0][0] * j[1][1] - j[0][1] * j[1][0]
    } else {
        j[0][0] * (j[1][1] * j[2][2] - j[1][2] * j[2][1]) - j[0][1] * (j[1][0] * j[2][2] - j[1][2] * j[2][0])
            + j[0][2] * (j[1][0] * j[2][1] - j[1][1] * j[2][0])
    }
}

const G2: [(f64, f64); 2] = [(-0.577_350_269_189_625_8, 1.0), (0.577_350_269_189_625_8, 1.0)];
const G3: [(f64, f64); 3] = [(-0.774_596_669_241_483_4, 5.0 / 9.0), (0.0, 8.0 / 9.0), (0.774_596_669_241_483_4, 5.0 / 9.0)];

/// Gauss points `(ξ, weight)` of the rule a displacement element of `kind`
/// normally uses: 2ⁿ / 3ⁿ Gauss–Legendre for linear / quadratic quads and
/// hexes, the 3-point rule for triangles, the 4-point rule for tetrahedra
/// and 3 × 2 points for the wedge (rules from memory; their weights sum to
/// the reference measure, which `gauss_weights_sum_to_reference_measure` checks).
pub fn gauss_points(kind: ElementKind) -> Vec<([f64; 3], f64)> {
    gauss_rule(kind).to_vec()
}

/// A reference point and its weight.
pub type GaussPoint = ([f64; 3], f64);

/// [`gauss_points`] without allocating: the rules are built once.
pub fn gauss_rule(kind: ElementKind) -> &'static [([f64; 3], f64)] {
    static RULES: std::sync::OnceLock<Vec<Vec<GaussPoint>>> = std::sync::OnceLock::new();
    let rules = RULES.get_or_init(|| ElementKind::ALL.iter().map(|&k| build_gauss_points(k)).collect());
    let index = ElementKind::ALL.iter().position(|&k| k == kind).unwrap_or(0);
    &rules[index]
}

fn build_gauss_points(kind: ElementKind) -> Vec<([f64; 3], f64)> {
    let line: &[(f64, f64)] = match kind {
        ElementKind::Quad8 | ElementKind::Quad9 | ElementKind::Hex20 | ElementKind::Hex27 => &G3,
        _ => &G2,
    };
    let tri = [[1.0 / 6.0, 1.0 / 6.0], [2.0 / 3.0, 1.0 / 6.0], [1.0 / 6.0, 2.0 / 3.0]];
    let mut out = Vec::new();
    match kind {
        ElementKind::Quad4 | ElementKind::Quad8 | ElementKind::Quad9 => {
            for &(b, wb) in line {
                for &(a, wa) in line {
                    out.push(([a, b, 0.0], wa * wb));
                }
            }
        }
        ElementKind::Hex8 | ElementKind::Hex20 | ElementKind::Hex27 => {
            for &(c, wc) in line {
                for &(b, wb) in line {
                    for &(a, wa) in line {
                        out.push(([a, b, c], wa * wb * wc));
                    }
                }
            }
        }
        ElementKind::Tri3 | ElementKind::Tri6 => {
            out.extend(tri.iter().map(|p| ([p[0], p[1], 0.0], 1.0 / 6.0)));
        }
        ElementKind::Tet4 | ElementKind::Tet10 => {
            let (a, b) = (0.585_410_196_624_968_5, 0.138_196_601_125_010_5);
            for k in 0..4 {
                let mut p = [b; 3];
                if k < 3 {
                    p[k] = a;
                }
                out.push((p, 1.0 / 24.0));
            }
        }
        ElementKind::Wedge6 => {
            for &(c, wc) in &G2 {
                out.extend(tri.iter().map(|p| ([p[0], p[1], c], wc / 6.0)));
            }
        }
    }
    out
}

/// Area (2-D) or volume (3-D) of element `e` by Gauss quadrature of det J.
pub fn element_measure(kind: ElementKind, x: &[[f64; 3]]) -> f64 {
    gauss_rule(kind).iter().map(|&(p, w)| w * jacobian_det(kind, x, p)).sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Partition of unity and the Kronecker property N_i(ξ_j) = δ_ij hold for
    /// every kind (general property of nodal interpolation).
    #[test]
    fn shape_functions_are_nodal_and_sum_to_one() {
        for kind in ElementKind::ALL {
            let refs = reference_nodes(kind);
            assert_eq!(refs.len(), kind.node_count());
            let mut n = [0.0; MAX_NODES];
            let mut dn = [[0.0; 3]; MAX_NODES];
            for (j, &p) in refs.iter().enumerate() {
                shape_into(kind, p, &mut n, &mut dn);
                for i in 0..kind.node_count() {
                    let want = if i == j { 1.0 } else { 0.0 };
                    assert!((n[i] - want).abs() < 1e-12, "{kind} N{i} at node {j} = {}", n[i]);
                }
                let gsum: [f64; 3] =
                    (0..3).map(|c| (0..kind.node_count()).map(|i| dn[i][c]).sum::<f64>()).collect::<Vec<_>>().try_into().unwrap();
                assert!(gsum.iter().all(|g| g.abs() < 1e-12), "{kind} gradient sum {gsum:?}");
            }
        }
    }

    /// The reference element maps onto itself with det J = 1, so the Gauss
    /// weights must add up to the reference measure: 4 (square), 1/2 (triangle),
    /// 1/6 (tetrahedron), 1 (wedge), 8 (cube).
    #[test]
    fn gauss_weights_sum_to_reference_measure() {
        for kind in ElementKind::ALL {
            let want = match kind.corner_count() {
                3 => 0.5,
                4 if kind.dimension() == 2 => 4.0,
                4 => 1.0 / 6.0,
                6 => 1.0,
                _ => 8.0,
            };
            let got = element_measure(kind, reference_nodes(kind));
            assert!((got - want).abs() < 1e-12, "{kind}: {got} vs {want}");
            for &(p, _) in &gauss_points(kind) {
                assert!((jacobian_det(kind, reference_nodes(kind), p) - 1.0).abs() < 1e-12);
            }
        }
    }
}
