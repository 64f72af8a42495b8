//! Friction of a contact that closes during an increment must not depend on
//! the increment size. A rubber block hangs 0.09 above a rough rigid floor
//! and its top is moved along an inclined straight line, down 0.15 and
//! sideways: its bottom reaches the floor at t_c = 0.09 / 0.15 = 0.6 of the
//! stage and is pressed 0.06 further while the top goes on sideways.
//! Coulomb's law (Coulomb 1785, "Théorie des machines simples"; any
//! statics text): a point in contact does not slide while its shear
//! traction is below μ p, and slides with shear μ p when it would exceed
//! it. So, whatever the increments:
//! - with much friction the bottom sticks where it touched: its middle node
//!   ends displaced sideways by U_x t_c (before contact the block moves
//!   rigidly with its top), up to the elastic slip of the regularised stick
//!   law, and the floor forces are those of that one path;
//! - with little friction and a long sideways travel the bottom slides:
//!   T = μ N.
//!
//! Before, a node touching during an increment slid freely to its end (in
//! two increments the sticking bottom ended 0.05 × 0.5 further than it
//! touched); and a sliding node's anchor, reset at the returned shear inside
//! the rounded stick–slip transition, started each increment below μ p, so
//! small steps gave T → (1 − δ_f) μ N. A contact closing in the first
//! increment of a stage has no earlier motion to extrapolate and is anchored
//! where it was (a normal approach): the runs take at least two increments.

use olli_solver::contact::Shape;
use olli_solver::model::RigidBody;
use olli_solver::{solve, Analysis, Formulation, IncrementControls, Model, Motion, Quiet, Stage};
use olli_verification::{neo_hookean, rectangle};

const GAP: f64 = 0.09;
const DOWN: f64 = 0.15;
const CROSSING: f64 = GAP / DOWN;

/// What an inclined press gives at its end.
#[derive(Debug, Clone, Copy)]
struct Pressed {
    /// Floor force: tangential (along +x) and normal.
    tangential: f64,
    normal: f64,
    /// Sideways displacement of the bottom's middle node and its elastic slip.
    middle: f64,
    slip: f64,
}

/// The inclined press with the stage taken in `increments` equal steps.
fn inclined_press(friction: f64, sideways: f64, normal_penalty: Option<f64>, increments: usize) -> Pressed {
    let (nx, ny) = (8, 2);
    let mesh = rectangle(0.0, 4.0, 0.0, 1.0, nx, ny, 0.0);
    let mut model = Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, neo_hookean(1.0, 5000.0), Formulation::Mixed);
    let mut floor = RigidBody::new("floor", Shape::Line { point: [0.0, -GAP], direction: [1.0, 0.0] }, "t0");
    floor.friction = friction;
    floor.normal_penalty = normal_penalty;
    model.rigid.push(floor);
    let step = 1.0 / increments as f64;
    model.stages.push(Stage {
        name: "press".into(),
        controls: IncrementControls { first: step, max: step, ..Default::default() },
        motions: vec![Motion { set: "t1".into(), displacement: [Some(sideways), Some(-DOWN), None] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).expect("valid model");
    assert!(sol.completed(), "{:?}", sol.termination);
    assert_eq!(sol.increments.len(), increments, "no cutback");
    let last = sol.last().unwrap();
    let f = last.contact[0].force;
    let fields = last.contact_fields.as_ref().unwrap();
    Pressed { tangential: f[0], normal: -f[1], middle: last.displacement[nx / 2][0], slip: fields.slip[nx / 2] }
}

#[test]
fn sticking_first_contact_holds_where_it_touched_at_any_increment_size() {
    let sideways = 0.05;
    // A stiff penalty (ε_t = 0.1 ε_n = 1000): little elastic slip.
    let runs: Vec<_> = [2, 3, 4, 8].iter().map(|&n| (n, inclined_press(2.0, sideways, Some(1e4), n))).collect();
    println!("sticking: {runs:?}");
    let expected = sideways * CROSSING;
    let fine = runs[runs.len() - 1].1;
    for &(n, r) in &runs {
        assert!(r.tangential.abs() < 0.2 * r.normal, "{n} increments: sticks, T/N = {}", r.tangential / r.normal);
        assert!(
            (r.middle - expected).abs() <= r.slip + 5e-3 * expected,
            "{n} increments: bottom moved {}, touched at {expected}, elastic slip {}",
            r.middle,
            r.slip
        );
        assert!((r.tangential - fine.tangential).abs() < 1e-2 * fine.tangential.abs(), "{n} increments: {r:?} against {fine:?} in 8");
        assert!((r.normal - fine.normal).abs() < 1e-2 * fine.normal, "{n} increments: {r:?} against {fine:?} in 8");
    }
}

#[test]
fn sliding_first_contact_carries_friction_times_normal_force_at_any_increment_size() {
    let friction = 0.3;
    for n in [2, 4, 8, 16] {
        let r = inclined_press(friction, 1.0, None, n);
        println!("sliding in {n} increments: {r:?}, T/N = {}", r.tangential / r.normal);
        // The floor is dragged along +x by the rubber sliding over it.
        let ratio = r.tangential / r.normal;
        assert!(r.normal > 0.0 && (ratio - friction).abs() < 0.01 * friction, "{n} increments: T/N = {ratio}");
    }
}
