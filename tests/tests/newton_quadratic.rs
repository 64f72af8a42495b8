//! Newton–Raphson with the consistent tangent converges quadratically near
//! the solution (Dennis & Schnabel 1983, Numerical Methods for Unconstrained
//! Optimization and Nonlinear Equations, Thm. 5.2.1; general mathematics):
//! r_{k+1} ≤ C r_k². Case: a distorted hex8 block (mixed) stretched 40 % and
//! sheared in one increment — smooth, large strain, no inversion.

use olli_solver::*;
use olli_verification::*;

#[test]
fn newton_quadratic_large_strain_block() {
    let mesh = block([1.0, 1.0, 1.0], [3, 3, 3], 0.3);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(1.0, 100.0), Formulation::Mixed);
    model.output.point_fields = false;
    model.stages.push(Stage {
        name: "stretch and shear".into(),
        controls: IncrementControls {
            first: 1.0,
            force_tolerance: 1e-11,
            energy_tolerance: 1e-24,
            displacement_tolerance: 1e-14,
            ..Default::default()
        },
        supports: vec![Support { set: "z0".into(), components: [true, true, true] }],
        motions: vec![Motion { set: "z1".into(), displacement: [Some(0.3), Some(0.0), Some(0.4)] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let inc = &sol.increments[0];
    // Observed orders 2.78 and 2.13.
    assert_quadratic_order(&inc.residual_history, 1e-13);
}

/// The same order with a follower pressure on a face whose edge is free:
/// the pressure's load stiffness is not symmetric there (Schweizerhof &
/// Ramm 1984, "Displacement dependent pressure loads in nonlinear finite
/// element analyses", Computers & Structures 18:1099–1114, from memory),
/// and Newton stays quadratic only with its skew part in the tangent.
/// Case: the distorted block's base held, its top pressed by 0.3 μ (a
/// compression of about 25 %, the top face spreading) in one increment.
#[test]
fn newton_quadratic_follower_pressure_on_a_face_with_a_free_edge() {
    let mesh = block([1.0, 1.0, 1.0], [3, 3, 3], 0.3);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(1.0, 100.0), Formulation::Mixed);
    model.output.point_fields = false;
    model.stages.push(Stage {
        name: "press".into(),
        controls: IncrementControls {
            first: 1.0,
            force_tolerance: 1e-11,
            energy_tolerance: 1e-24,
            displacement_tolerance: 1e-14,
            ..Default::default()
        },
        supports: vec![Support { set: "z0".into(), components: [true, true, true] }],
        pressures: vec![Pressure { set: "z1".into(), value: 0.3 }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    // LU of the non-symmetric tangent: rounding floor about 1e-13.
    assert_quadratic_order(&sol.increments[0].residual_history, 1e-12);
}
