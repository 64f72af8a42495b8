//! Numerical inf-sup test of the mixed u–p pairs (Chapelle & Bathe 1993,
//! "The inf-sup test", Computers & Structures 47:537–545): on a sequence of
//! uniform meshes of the unit square or cube with all boundary displacements
//! held, the discrete inf-sup constant β_h is the square root of the
//! smallest non-zero eigenvalue of
//!
//! ```text
//! Gᵀ S⁻¹ G p = λ T p
//! ```
//!
//! with `G` the coupling ∫ q div v dV, `S` the H¹ semi-norm matrix
//! ∫ ∇v : ∇w dV of the displacements and `T` the L² mass matrix of the
//! pressures. (The constant pressure is in the kernel of a fully clamped
//! problem and gives λ = 0; it is skipped.) A stable pair keeps β_h bounded
//! away from zero as h → 0; a pair with spurious pressure modes shows β_h
//! falling with h. The test is run for the pairs olli uses and, as a
//! control that the test can fail, for quad4 with a constant pressure
//! (Q1/P0), whose β_h is known to decay like h on these meshes once the
//! checkerboard mode is filtered (Boffi, Brezzi & Fortin 2013, Mixed Finite
//! Element Methods and Applications, the Q1–P0 element; from memory).
//!
//! Thresholds (common practice in the inf-sup test): a stable pair keeps
//! β_h / β_2h above 0.85 on the last refinement; the Q1/P0 control falls
//! below 0.75.

use nalgebra::DMatrix;
use olli_mesh::{ElementKind, Mesh};
use olli_solver::element::pressure_space::{PressureBasis, PressureSpace};
use olli_solver::shape::ShapeKind;
use olli_verification::*;

/// The pressure unknowns of a mesh: their number, and for element `e` at
/// physical point `x` the (unknown, basis value) pairs (written to `out`).
trait Pressures {
    fn count(&self) -> usize;
    fn at(&self, e: usize, x: [f64; 3], out: &mut Vec<(usize, f64)>);
}

/// Discontinuous pressures: `space` on every element, no continuity.
struct Discontinuous {
    bases: Vec<PressureBasis>,
    per: usize,
}

impl Discontinuous {
    fn new(mesh: &Mesh, space: PressureSpace) -> Self {
        let bases = (0..mesh.element_count())
            .map(|e| {
                let x: Vec<[f64; 3]> = mesh.element_nodes(e).iter().map(|&n| mesh.nodes[n]).collect();
                PressureBasis::new(space, mesh.dimension, &x)
            })
            .collect();
        Discontinuous { bases, per: space.count(mesh.dimension) }
    }
}

impl Pressures for Discontinuous {
    fn count(&self) -> usize {
        self.per * self.bases.len()
    }
    fn at(&self, e: usize, x: [f64; 3], out: &mut Vec<(usize, f64)>) {
        let phi = self.bases[e].values(x);
        out.extend((0..self.per).map(|k| (e * self.per + k, phi[k])));
    }
}

/// Taylor–Hood: a continuous pressure, linear on each tetrahedron, with one
/// unknown at every vertex (the first four nodes of a tet10); its basis is
/// the barycentric coordinate of the (straight-sided) tetrahedron.
struct ContinuousLinear {
    /// Per element: its vertices' unknowns and the inverse of the matrix
    /// [X_1 − X_0, X_2 − X_0, X_3 − X_0] with X_0.
    elements: Vec<([usize; 4], nalgebra::Matrix3<f64>, [f64; 3])>,
    count: usize,
}

impl ContinuousLinear {
    fn new(mesh: &Mesh) -> Self {
        let mut vertex_index = vec![usize::MAX; mesh.node_count()];
        let mut count = 0;
        let mut elements = Vec::new();
        for e in 0..mesh.element_count() {
            let nodes = mesh.element_nodes(e);
            let mut unknowns = [0; 4];
            for (a, &n) in nodes[..4].iter().enumerate() {
                if vertex_index[n] == usize::MAX {
                    vertex_index[n] = count;
                    count += 1;
                }
                unknowns[a] = vertex_index[n];
            }
            let x0 = mesh.nodes[nodes[0]];
            let edges = nalgebra::Matrix3::from_fn(|r, c| mesh.nodes[nodes[c + 1]][r] - x0[r]);
            elements.push((unknowns, edges.try_inverse().unwrap(), x0));
        }
        ContinuousLinear { elements, count }
    }
}

impl Pressures for ContinuousLinear {
    fn count(&self) -> usize {
        self.count
    }
    fn at(&self, e: usize, x: [f64; 3], out: &mut Vec<(usize, f64)>) {
        let (unknowns, inverse, x0) = &self.elements[e];
        let l = inverse * nalgebra::Vector3::from_fn(|r, _| x[r] - x0[r]);
        let bary = [1.0 - l.sum(), l[0], l[1], l[2]];
        out.extend(unknowns.iter().copied().zip(bary));
    }
}

/// β_h of the elements of `mesh` with the pressure unknowns `pressures`,
/// all boundary nodes (`boundary`) held; also the number of zero
/// eigenvalues (the pressure modes no displacement controls).
fn inf_sup(mesh: &Mesh, boundary: &[usize], pressures: &dyn Pressures) -> (f64, usize) {
    let dim = mesh.dimension;
    let mut free = vec![usize::MAX; mesh.node_count()];
    let mut nu = 0;
    for n in 0..mesh.node_count() {
        if boundary.binary_search(&n).is_err() {
            free[n] = nu;
            nu += 1;
        }
    }
    let np = pressures.count();
    let nu = nu * dim;
    let mut phi = Vec::new();
    let (mut s, mut g, mut t) = (DMatrix::<f64>::zeros(nu, nu), DMatrix::<f64>::zeros(nu, np), DMatrix::<f64>::zeros(np, np));
    for e in 0..mesh.element_count() {
        let shape = ShapeKind::of_element(mesh.kinds[e]).unwrap();
        let nodes = mesh.element_nodes(e);
        let x: Vec<[f64; 3]> = nodes.iter().map(|&n| mesh.nodes[n]).collect();
        let table = shape.table();
        for q in 0..table.len() {
            let (n, d) = (table.values(q), table.derivatives(q));
            // Jacobian, its inverse and the physical gradients.
            let mut jac = DMatrix::<f64>::zeros(dim, dim);
            for a in 0..nodes.len() {
                for r in 0..dim {
                    for c in 0..dim {
                        jac[(r, c)] += x[a][r] * d[a][c];
                    }
                }
            }
            let dv = jac.determinant() * table.weights[q];
            let inv = jac.try_inverse().unwrap();
            let grad: Vec<Vec<f64>> =
                (0..nodes.len()).map(|a| (0..dim).map(|i| (0..dim).map(|c| inv[(c, i)] * d[a][c]).sum()).collect()).collect();
            let xq: [f64; 3] = std::array::from_fn(|c| (0..nodes.len()).map(|a| n[a] * x[a][c]).sum());
            phi.clear();
            pressures.at(e, xq, &mut phi);
            for (a, &na) in nodes.iter().enumerate() {
                if free[na] == usize::MAX {
                    continue;
                }
                for i in 0..dim {
                    let r = free[na] * dim + i;
                    for &(k, value) in &phi {
                        g[(r, k)] += value * grad[a][i] * dv;
                    }
                    for (b, &nb) in nodes.iter().enumerate() {
                        if free[nb] != usize::MAX {
                            let dot: f64 = (0..dim).map(|c| grad[a][c] * grad[b][c]).sum();
                            s[(r, free[nb] * dim + i)] += dot * dv;
                        }
                    }
                }
            }
            for &(k, vk) in &phi {
                for &(l, vl) in &phi {
                    t[(k, l)] += vk * vl * dv;
                }
            }
        }
    }
    // T^{-1/2} Gᵀ S⁻¹ G T^{-1/2} via Cholesky factors: with T = L Lᵀ,
    // the eigenvalues of L⁻¹ Gᵀ S⁻¹ G L⁻ᵀ.
    let s_inv_g = s.cholesky().unwrap().solve(&g);
    let l = t.cholesky().unwrap().l();
    let l_inv = l.clone().try_inverse().unwrap();
    let a = &l_inv * (g.transpose() * s_inv_g) * l_inv.transpose();
    let a = (&a + a.transpose()) * 0.5;
    let mut ev: Vec<f64> = a.symmetric_eigenvalues().iter().copied().collect();
    ev.sort_by(f64::total_cmp);
    // Skip the hydrostatic mode (λ ≈ 0, within rounding of the largest).
    let tol = 1e-10 * ev.last().copied().unwrap_or(1.0);
    let zeros = ev.iter().filter(|&&v| v <= tol).count();
    (ev.into_iter().find(|&v| v > tol).unwrap_or(0.0).sqrt(), zeros)
}

fn boundary_nodes(mesh: &Mesh, sets: &[&str]) -> Vec<usize> {
    union_of_sets(mesh, sets)
}

/// The unit square or cube of `kind` elements, n cells a side, and its boundary nodes.
fn unit_mesh(kind: ElementKind, n: usize) -> (Mesh, Vec<usize>) {
    let mesh = if kind.dimension() == 2 { generated_section(kind, n, n, |s, t| [s, t]) } else { generated_block(kind, [n, n, n], |x| x) };
    let sets: &[&str] =
        if kind.dimension() == 2 { &["bottom", "right", "top", "left"] } else { &["left", "right", "front", "back", "bottom", "top"] };
    let boundary = boundary_nodes(&mesh, sets);
    (mesh, boundary)
}

/// β_h on the meshes of `divisions` (unit square or cube, n cells a side).
fn sequence(kind: ElementKind, space: PressureSpace, divisions: &[usize]) -> Vec<f64> {
    divisions
        .iter()
        .map(|&n| {
            let (mesh, boundary) = unit_mesh(kind, n);
            let (beta, _) = inf_sup(&mesh, &boundary, &Discontinuous::new(&mesh, space));
            eprintln!("{kind} {space:?} n = {n}: β_h = {beta:.4}");
            beta
        })
        .collect()
}

fn assert_stable(kind: ElementKind, space: PressureSpace, divisions: &[usize]) {
    let b = sequence(kind, space, divisions);
    let last = b[b.len() - 1] / b[b.len() - 2];
    assert!(last > 0.85 && b.iter().all(|&v| v > 0.05), "{kind} {space:?}: β_h {b:?}");
}

#[test]
fn inf_sup_quad4_constant_pressure_control_decays() {
    let b = sequence(ElementKind::Quad4, PressureSpace::Constant, &[4, 8, 16]);
    assert!(b[2] / b[1] < 0.75, "Q1/P0 should lose stability: {b:?}");
}

/// P2–P0 in 2-D: textbook stable (Boffi, Brezzi & Fortin 2013, §8.4; from memory).
#[test]
fn inf_sup_tri6_constant_pressure_stays_bounded() {
    assert_stable(ElementKind::Tri6, PressureSpace::Constant, &[2, 4, 8]);
}

/// Q2–P1 discontinuous: textbook stable (Boffi, Brezzi & Fortin 2013,
/// §8.6.3; the 9/3 element of Sussman & Bathe 1987; from memory).
#[test]
fn inf_sup_quad9_linear_pressure_stays_bounded() {
    assert_stable(ElementKind::Quad9, PressureSpace::Linear, &[2, 4, 8]);
}

#[test]
fn inf_sup_hex27_linear_pressure_stays_bounded() {
    assert_stable(ElementKind::Hex27, PressureSpace::Linear, &[2, 3, 4]);
}

/// The serendipity elements lack the centre nodes that carry the linear
/// pressure's Fortin operator: with P1 discontinuous pressure their β_h
/// falls with h (measured here, in line with Chapelle & Bathe 1993, who
/// report the 8/3 element failing the test; from memory), which is why
/// quad8 and hex20 use a constant pressure; with it β_h stays bounded.
#[test]
fn inf_sup_quad8_and_hex20_need_the_constant_pressure() {
    let b = sequence(ElementKind::Quad8, PressureSpace::Linear, &[2, 4, 8]);
    assert!(b[2] / b[1] < 0.75, "quad8/P1: {b:?}");
    let b = sequence(ElementKind::Hex20, PressureSpace::Linear, &[2, 3, 4]);
    assert!(b[2] / b[1] < 0.75, "hex20/P1: {b:?}");
    assert_stable(ElementKind::Quad8, PressureSpace::Constant, &[2, 4, 8]);
    assert_stable(ElementKind::Hex20, PressureSpace::Constant, &[2, 3, 4]);
}

/// tet10 with a constant pressure (P2–P0): not a textbook-stable pair in
/// 3-D, and on these meshes β_h falls slowly (measured 0.100, 0.093, 0.076
/// at n = 2, 3, 4 and 0.063, 0.054 at n = 5, 6: about h^0.8). Regression
/// test of that measurement (our own numbers): it guards the values quoted
/// in DEVELOPERS.md; P1 discontinuous is worse (0.113, 0.057, 0.042). A
/// stable tet10 needs a continuous pressure (Taylor–Hood), not yet in olli.
#[test]
fn inf_sup_tet10_constant_pressure_decays_slowly_regression() {
    let b = sequence(ElementKind::Tet10, PressureSpace::Constant, &[2, 3, 4]);
    for (got, want) in b.iter().zip([0.1001, 0.0926, 0.0755]) {
        assert!(rel(*got, want) < 0.01, "tet10/P0: {b:?}");
    }
}

/// tet10 with a continuous linear pressure: the Taylor–Hood pair P2/P1
/// (Taylor & Hood 1973, "A numerical solution of the Navier–Stokes
/// equations using the finite element technique", Computers & Fluids
/// 1:73–100), stable in 3-D when every tetrahedron has a vertex inside the
/// domain (Boffi 1997, "Three-dimensional finite element methods for the
/// Stokes problem", SIAM J. Numer. Anal. 34:664–670; from memory). A
/// tetrahedron with all four vertices on the held boundary would leave
/// pressure modes no displacement controls, extra zero eigenvalues beside
/// the hydrostatic one: the six-tetrahedra split of these meshes has none,
/// so exactly one zero eigenvalue is required. The non-zero β_h must stay
/// bounded, unlike P2/P0 above (measured 0.173, 0.210, 0.219 at n = 2, 3, 4
/// against P2/P0's 0.100, 0.093, 0.076). This checks the pair olli's tet10
/// needs for stability; olli's tet10 does not use it yet (DEVELOPERS.md).
#[test]
fn inf_sup_tet10_taylor_hood_stays_bounded() {
    let mut betas = Vec::new();
    for n in [2, 3, 4] {
        let (mesh, boundary) = unit_mesh(ElementKind::Tet10, n);
        let th = ContinuousLinear::new(&mesh);
        let (beta, zeros) = inf_sup(&mesh, &boundary, &th);
        eprintln!("tet10 Taylor–Hood n = {n}: β_h = {beta:.4}, {zeros} zero modes of {} pressures", th.count());
        assert_eq!(zeros, 1, "n = {n}: spurious pressure modes");
        betas.push(beta);
    }
    let last = betas[2] / betas[1];
    assert!(last > 0.85 && betas.iter().all(|&v| v > 0.05), "tet10 P2/P1: β_h {betas:?}");
}
