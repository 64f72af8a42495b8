//! Finite inflation of a thick-walled incompressible neo-Hookean tube in
//! plane strain (Rivlin 1949, "Large elastic deformations of isotropic
//! materials VI", Phil. Trans. R. Soc. A 242:173–195; Ogden, Non-linear
//! Elastic Deformations, 1984, §5.3; from memory). With λ_a = a/A,
//! λ_b² = 1 + (λ_a² − 1)(A/B)²:
//!
//! P = μ [ ln(λ_a/λ_b) + 1/(2λ_b²) − 1/(2λ_a²) ]
//!
//! (REFERENCES.md §5, where it was checked against direct integration; check
//! values for μ = 1, B/A = 2: P = 0.233370 at λ_a = 1.2, 0.574054 at 2,
//! 0.681235 at 4). κ/μ = 10⁴ stands in for incompressibility.

use std::f64::consts::PI;

use olli_solver::*;
use olli_verification::*;

const A: f64 = 1.0;
const B: f64 = 2.0;
const MU: f64 = 1.0;
const KAPPA: f64 = 1e4;
const H: f64 = 0.05;

fn closed_form(la: f64) -> f64 {
    let lb2 = 1.0 + (la * la - 1.0) * (A / B).powi(2);
    MU * ((la / lb2.sqrt()).ln() + 0.5 / lb2 - 0.5 / (la * la))
}

#[test]
fn tube_inflation_closed_form_values() {
    // The closed form itself reproduces the published-derivation check values.
    for (la, p) in [(1.2, 0.233370), (2.0, 0.574054), (4.0, 0.681235)] {
        assert!((closed_form(la) - p).abs() < 1e-6);
    }
}

#[test]
fn tube_inflation_axisymmetric_pressure_vs_inner_stretch() {
    // Displacement control of the inner radius (as REFERENCES.md suggests),
    // u_z = 0 on both end planes (plane strain), radial mesh graded towards
    // the bore where the hoop stretch is largest.
    let n = 32;
    let mesh = quad_grid(n, 1, 0.0, |s, t| [A + (B - A) * s.powf(1.5), H * t]);
    let mut model = Model::single_region(mesh, Analysis::Axisymmetric, neo_hookean(MU, KAPPA), Formulation::Mixed);
    model.output.point_fields = false;
    let ends = [support("t0", [false, true, false]), support("t1", [false, true, false])];
    let stretches = [1.2, 2.0, 4.0];
    for (k, la) in stretches.iter().enumerate() {
        model.stages.push(Stage {
            name: format!("inflate to {la}"),
            controls: IncrementControls { first: 0.2, max: 0.25, ..Default::default() },
            supports: if k == 0 { ends.to_vec() } else { vec![] },
            motions: vec![Motion { set: "s0".into(), displacement: [Some(A * (la - 1.0)), None, None] }],
            ..Default::default()
        });
    }
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    for (k, la) in stretches.iter().enumerate() {
        let last = sol.increments.iter().rfind(|r| r.stage == k).unwrap();
        // The bore's radial reaction (full 2π) is the pressure on the
        // current bore area 2π a H (H is unchanged in plane strain).
        let fr = last.reactions["s0"][0];
        let p = fr / (2.0 * PI * la * A * H);
        let want = closed_form(*la);
        eprintln!("λa = {la}: P = {p:.6}, closed form {want:.6}, rel {:.2e}", rel(p, want));
        // 32 graded Q1/P0 elements through the wall: the discretisation error
        // of the bore pressure is a few 1e-4 at moderate stretch and grows at
        // λa = 4 (hoop stretch 4, radial 1/4 at the bore); κ/μ = 10⁴ adds
        // O(P/κ). REFERENCES.md asks 0.2 % with quadratic elements; the graded
        // bilinear mesh stays within 0.1 % (observed at most 2.4e-4).
        assert!(rel(p, want) < 1e-3, "λa = {la}");
    }
}

#[test]
fn tube_inflation_plane_strain_follower_pressure() {
    // Load control with the follower pressure of the closed form at λa = 1.5
    // on a quarter annulus: the bore must reach λa = 1.5.
    let la = 1.5;
    let p = closed_form(la);
    let mesh = quad_grid(24, 12, 0.0, |s, t| {
        let r = A + (B - A) * s.powf(1.5);
        let phi = t * std::f64::consts::FRAC_PI_2;
        [r * phi.cos(), r * phi.sin()]
    });
    let bore = mesh.node_sets["s0"][0];
    let mut model = Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, neo_hookean(MU, KAPPA), Formulation::Mixed);
    model.output.point_fields = false;
    model.stages.push(Stage {
        name: "inflate".into(),
        controls: IncrementControls { first: 0.2, ..Default::default() },
        supports: vec![support("t0", [false, true, false]), support("t1", [true, false, false])],
        pressures: vec![Pressure { set: "s0".into(), value: p }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let d = sol.last().unwrap().displacement[bore];
    let got = ((A + d[0]).powi(2) + d[1].powi(2)).sqrt() / A;
    eprintln!("bore stretch {got:.6} under P = {p:.6} (closed form λa = {la})");
    // dP/dλa ≈ 0.29 here, so a 0.5 % error in the pressure response is
    // about 0.25 % in stretch.
    assert!(rel(got, la) < 3e-3);
}

// ---- Quadratic elements -------------------------------------------------------

use olli_mesh::ElementKind;

/// Axisymmetric inflation by displacement control of the bore, as above, on
/// `n` graded quadratic elements (two triangles per cell for tri6) through
/// the wall. REFERENCES.md asks 0.2 % of the closed form with quadratic
/// elements (κ/μ = 10⁴ adds O(P/κ) ≈ 1e-4).
fn axisymmetric_inflation(kind: ElementKind, n: usize) {
    let mesh = generated_section(kind, n, 1, |s, t| [A + (B - A) * s.powf(1.5), H * t]);
    let mut model = Model::single_region(mesh, Analysis::Axisymmetric, neo_hookean(MU, KAPPA), Formulation::Mixed);
    model.output.point_fields = false;
    let ends = [support("bottom", [false, true, false]), support("top", [false, true, false])];
    let stretches = [1.2, 2.0, 4.0];
    for (k, la) in stretches.iter().enumerate() {
        model.stages.push(Stage {
            name: format!("inflate to {la}"),
            controls: IncrementControls { first: 0.2, max: 0.25, ..Default::default() },
            supports: if k == 0 { ends.to_vec() } else { vec![] },
            motions: vec![Motion { set: "left".into(), displacement: [Some(A * (la - 1.0)), None, None] }],
            ..Default::default()
        });
    }
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{kind}: {:?}", sol.termination);
    for (k, la) in stretches.iter().enumerate() {
        let last = sol.increments.iter().rfind(|r| r.stage == k).unwrap();
        let p = last.reactions["left"][0] / (2.0 * PI * la * A * H);
        let want = closed_form(*la);
        eprintln!("{kind} λa = {la}: P = {p:.6}, closed form {want:.6}, rel {:.2e}", rel(p, want));
        assert!(rel(p, want) < 2e-3, "{kind} λa = {la}");
    }
}

#[test]
fn tube_inflation_tri6_axisymmetric_pressure_vs_inner_stretch() {
    axisymmetric_inflation(ElementKind::Tri6, 12);
}

#[test]
fn tube_inflation_quad8_axisymmetric_pressure_vs_inner_stretch() {
    axisymmetric_inflation(ElementKind::Quad8, 12);
}

#[test]
fn tube_inflation_quad9_axisymmetric_pressure_vs_inner_stretch() {
    axisymmetric_inflation(ElementKind::Quad9, 12);
}

/// 3-D: a quarter of a tube slice of tet10 elements, symmetry planes held
/// normal, ends held axially (plane strain), and the closed form's follower
/// pressure for λa = 1.5 on the bore (tri6 faces): the bore must reach
/// λa = 1.5 (dP/dλa ≈ 0.29, so 0.5 % in pressure is about 0.25 % in stretch).
/// tet10 runs its default Taylor–Hood form (continuous pressure as global
/// unknowns); measured λa = 1.50005.
#[test]
fn tube_inflation_tet10_follower_pressure() {
    let la = 1.5;
    let p = closed_form(la);
    let mesh = generated_block(ElementKind::Tet10, [6, 6, 1], |x| {
        let r = A + (B - A) * x[0].powf(1.5);
        let phi = x[1] * std::f64::consts::FRAC_PI_2;
        [r * phi.cos(), r * phi.sin(), H * x[2]]
    });
    let bore = mesh.node_sets["left"][0];
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(MU, KAPPA), Formulation::Mixed);
    model.output.point_fields = false;
    model.stages.push(Stage {
        name: "inflate".into(),
        controls: IncrementControls { first: 0.2, ..Default::default() },
        supports: vec![
            support("front", [false, true, false]),
            support("back", [true, false, false]),
            support("bottom", [false, false, true]),
            support("top", [false, false, true]),
        ],
        pressures: vec![Pressure { set: "left".into(), value: p }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let x = model.mesh.nodes[bore];
    let d = sol.last().unwrap().displacement[bore];
    let got = (x[0] + d[0]).hypot(x[1] + d[1]) / A;
    eprintln!("tet10 bore stretch {got:.6} under P = {p:.6} (closed form λa = {la})");
    assert!(rel(got, la) < 3e-3);
}
