//! A nearly incompressible block moved by one edge with nothing else holding
//! it translates as a rigid body: a uniform displacement has a zero
//! deformation gradient change, so zero strain and zero stress satisfy every
//! equation of equilibrium (any continuum mechanics text, e.g. Holzapfel
//! 2000, "Nonlinear Solid Mechanics", §2.2, rigid-body motions; section
//! number from memory). The
//! residual of such a state is pure round-off, and round-off of a rubber
//! with κ/μ = 5000 is that of its pressure, κ times the volume ratio's: the
//! convergence test must read it as converged, in the first corrections,
//! not wander there (it took up to 20 corrections and damped retries while
//! the round-off floor counted μ alone).

use olli_solver::{solve, Analysis, Formulation, IncrementControls, Model, Motion, Quiet, Stage};
use olli_verification::{neo_hookean, rectangle};

#[test]
fn a_block_moved_by_one_edge_translates_stress_free_in_few_corrections() {
    let (shift_x, shift_y) = (1.0, -0.15);
    for kappa in [50.0, 5000.0] {
        let mesh = rectangle(0.0, 4.0, 0.0, 1.0, 8, 2, 0.0);
        let mut model = Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, neo_hookean(1.0, kappa), Formulation::Mixed);
        model.stages.push(Stage {
            name: "move".into(),
            controls: IncrementControls { first: 0.25, max: 0.25, ..Default::default() },
            motions: vec![Motion { set: "t1".into(), displacement: [Some(shift_x), Some(shift_y), None] }],
            ..Default::default()
        });
        let sol = solve(&model, &mut Quiet).expect("valid model");
        assert!(sol.completed(), "κ = {kappa}: {:?}", sol.termination);
        assert_eq!(sol.increments.len(), 4, "κ = {kappa}: no cutback");
        for r in &sol.increments {
            assert!(
                r.newton_iterations <= 2,
                "κ = {kappa}, increment {}: {} corrections, residuals {:?}",
                r.increment,
                r.newton_iterations,
                r.residual_history
            );
        }
        let last = sol.last().unwrap();
        // Every node, the bottom ones too, moved with the edge.
        for d in &last.displacement {
            assert!((d[0] - shift_x).abs() < 1e-9 && (d[1] - shift_y).abs() < 1e-9, "κ = {kappa}: {d:?}");
        }
        // Nothing holds it: the edge's reaction is round-off.
        let reaction = last.reactions["t1"];
        assert!(reaction[0].abs() < 1e-9 && reaction[1].abs() < 1e-9, "κ = {kappa}: {reaction:?}");
    }
}
