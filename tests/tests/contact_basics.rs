//! Contact with rigid surfaces in cases whose answer is known exactly:
//! a frictionless plate compressing a block (homogeneous compression),
//! Coulomb's law at the onset of sliding, the release of contact when the
//! surface moves back, and Newton's convergence rate with contact active.

use olli_solver::contact::Shape;
use olli_solver::model::{RigidBody, RigidMotion};
use olli_solver::{solve, Analysis, Formulation, IncrementControls, Model, Motion, Quiet, Solution, Stage, Support};
use olli_verification::{neo_hookean, rectangle};

const MU: f64 = 1.0;
const KAPPA: f64 = 5000.0;

fn block_on_line(width: f64, height: f64, nx: usize, ny: usize) -> Model {
    let mesh = rectangle(0.0, width, 0.0, height, nx, ny, 0.0);
    let mut model = Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, neo_hookean(MU, KAPPA), Formulation::Mixed);
    model.rigid.push(RigidBody::new("floor", Shape::Line { point: [0.0, 0.0], direction: [1.0, 0.0] }, "t0"));
    model
}

fn run(model: &Model) -> Solution {
    let sol = solve(model, &mut Quiet).expect("valid model");
    assert!(sol.completed(), "{:?}", sol.termination);
    sol
}

// Plane-strain compression of an incompressible neo-Hookean block between
// frictionless plates is homogeneous, with σ_yy = μ (λ² − λ⁻²) for the
// stretch λ along the load (Rivlin 1948 / Treloar, "The Physics of Rubber
// Elasticity"; REFERENCES.md §7, planar mode). The block sits on a rigid
// floor and a bonded top plate moves down; the floor force must match the
// closed form. κ = 5000 μ leaves ≈ μ/κ relative compressibility, and the
// penetration tolerance 1e-3 of the side size on a 0.3 mm compression of a
// 2 mm block gives ≈ 0.2 % more: 0.5 % is the tolerance.
#[test]
fn contact_flat_floor_reproduces_homogeneous_compression() {
    let (w, h, squeeze) = (4.0, 2.0, 0.3);
    let mut model = block_on_line(w, h, 4, 4);
    model.stages.push(Stage {
        name: "press".into(),
        controls: IncrementControls { first: 0.25, ..Default::default() },
        motions: vec![Motion { set: "t1".into(), displacement: [None, Some(-squeeze), None] }],
        // The floor is frictionless: one corner holds x.
        supports: vec![Support { set: "corner".into(), components: [true, false, false] }],
        ..Default::default()
    });
    model.mesh.node_sets.insert("corner".into(), vec![0]);
    let sol = run(&model);
    let last = sol.last().unwrap();
    let lambda = (h - squeeze) / h;
    let sigma = MU * (lambda * lambda - 1.0 / (lambda * lambda));
    let expected = -sigma * w / lambda; // current width w/λ, thickness 1
    let floor = last.contact[0].force[1];
    // The rubber pushes the floor down (negative y).
    assert!(((-floor) - expected).abs() / expected < 5e-3, "floor force {floor} vs {expected}");
    assert!(last.contact[0].max_penetration < 1e-3 * (w / 4.0) * 1.0001);
}

// Coulomb friction (Coulomb 1785; any statics text): a block pressed on a
// rough floor and pushed sideways sticks while the tangential force is
// below f·N and slides at T = f·N. The top plate first presses the block,
// then moves it sideways; the floor's tangential force must stay below
// f·N early in the push and reach f·N (within 1 %, the regularisation of
// the stick law) once the whole contact slides.
#[test]
fn coulomb_slip_starts_at_friction_times_normal_force() {
    let friction = 0.3;
    let mut model = block_on_line(4.0, 1.0, 8, 2);
    model.rigid[0].friction = friction;
    model.stages.push(Stage {
        name: "press".into(),
        controls: IncrementControls { first: 0.5, ..Default::default() },
        motions: vec![Motion { set: "t1".into(), displacement: [Some(0.0), Some(-0.1), None] }],
        ..Default::default()
    });
    model.stages.push(Stage {
        name: "push".into(),
        controls: IncrementControls { first: 0.02, max: 0.1, ..Default::default() },
        motions: vec![Motion { set: "t1".into(), displacement: [Some(1.0), Some(-0.1), None] }],
        ..Default::default()
    });
    let sol = run(&model);
    let ratios: Vec<f64> = sol
        .increments
        .iter()
        .filter(|i| i.stage == 1)
        .map(|i| {
            let f = i.contact[0].force;
            f[0].abs() / f[1].abs()
        })
        .collect();
    println!("T/N during the push: {ratios:?}");
    assert!(ratios[0] < 0.9 * friction, "early push sticks: {}", ratios[0]);
    let last = *ratios.last().unwrap();
    assert!((last - friction).abs() < 0.01 * friction, "sliding: T/N = {last}");
    assert!(ratios.iter().all(|&r| r <= friction * (1.0 + 1e-6)), "never above f·N");
    let fields = sol.last().unwrap().contact_fields.as_ref().unwrap();
    // Once sliding, no touching node sticks (status 1).
    assert!(fields.status.iter().all(|&s| s != 1), "statuses {:?}", fields.status);
    assert!(fields.status.iter().filter(|&&s| s == 2).count() >= 5, "the floor contact slides");
}

// Moving the rigid surface back to its start must release all contact and
// return the rubber to its undeformed shape (hyperelasticity is path
// independent; the elastic stick law leaves no residual slip when the
// contact opens, since the anchors are dropped).
#[test]
fn contact_release_restores_the_undeformed_shape() {
    // A block bonded to a base (edge t0) with a rigid cover pressed on its top.
    let mesh = rectangle(0.0, 4.0, 0.0, 2.0, 4, 4, 0.0);
    let mut model = Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, neo_hookean(MU, KAPPA), Formulation::Mixed);
    model.rigid.push(RigidBody::new("cover", Shape::Line { point: [4.0, 2.0], direction: [-1.0, 0.0] }, "t1"));
    let press = RigidMotion { body: "cover".into(), translation: [0.0, -0.4, 0.0], rotation: 0.0 };
    let back = RigidMotion { body: "cover".into(), translation: [0.0, 0.1, 0.0], rotation: 0.0 };
    let support = vec![Support { set: "t0".into(), components: [true, true, false] }];
    model.stages.push(Stage { name: "press".into(), rigid_motions: vec![press], supports: support.clone(), ..Default::default() });
    model.stages.push(Stage { name: "release".into(), rigid_motions: vec![back], supports: support, ..Default::default() });
    let sol = run(&model);
    let pressed = sol.increments.iter().rfind(|i| i.stage == 0).unwrap();
    let h_min = 1.0;
    for c in &pressed.contact {
        assert!(c.touching_nodes > 0, "{} touches while pressed", c.name);
        assert!(c.max_penetration <= 1e-3 * h_min * 1.0001, "penetration {} within tolerance", c.max_penetration);
    }
    let last = sol.last().unwrap();
    for c in &last.contact {
        assert_eq!(c.touching_nodes, 0, "{} released", c.name);
        assert!(c.force.iter().all(|f| f.abs() < 1e-12));
    }
    let max_u = last.displacement.iter().flatten().fold(0.0f64, |m, v| m.max(v.abs()));
    assert!(max_u < 1e-9, "undeformed again: |u| = {max_u}");
}

// Newton–Raphson with the consistent contact tangent converges
// quadratically once the contact status settles (Wriggers, "Computational
// Contact Mechanics", 2006, ch. 6, from memory: the exact linearisation of
// the penalty/augmented term keeps the quadratic rate). Check: in the last
// increment's residual history, the final reductions satisfy
// r_{k+1} ≤ C r_k² with a modest C, i.e. the exponent log r_{k+1} / log r_k
// approaches 2.
#[test]
fn newton_quadratic_with_contact_active() {
    let mut model = block_on_line(4.0, 2.0, 6, 4);
    model.mesh.node_sets.insert("corner".into(), vec![0]);
    // A roller (circle of radius 3) pressed into the top; the arc runs
    // clockwise so the rubber is on its outside.
    model.rigid.push(RigidBody::new(
        "roller",
        Shape::Profile(vec![olli_solver::contact::Piece2::Arc {
            center: [2.0, 5.0],
            radius: 3.0,
            start: 1.0 - std::f64::consts::FRAC_PI_2,
            end: -1.0 - std::f64::consts::FRAC_PI_2,
        }]),
        "t1",
    ));
    model.stages.push(Stage {
        name: "press".into(),
        controls: IncrementControls { first: 0.25, max: 0.25, force_tolerance: 1e-10, ..Default::default() },
        rigid_motions: vec![RigidMotion { body: "roller".into(), translation: [0.0, -0.3, 0.0], rotation: 0.0 }],
        supports: vec![Support { set: "corner".into(), components: [true, false, false] }],
        ..Default::default()
    });
    let sol = run(&model);
    let last = sol.last().unwrap();
    println!("residual history {:?}", last.residual_history);
    let r = &last.residual_history;
    // Quadratic: somewhere in the tail a reduction with exponent ≥ 1.8.
    // Or a step with r_{k+1} ≤ r_k² from r_k < 0.1 (C = 1 on relative residuals).
    let quadratic = r.windows(2).any(|w| w[0] < 1e-2 && w[1] > 0.0 && w[1].ln() / w[0].ln() >= 1.8)
        || r.windows(2).any(|w| w[0] < 0.1 && w[1] <= w[0] * w[0])
        || r.windows(2).any(|w| w[0] < 1e-4 && w[1] < 1e-12);
    assert!(quadratic, "no quadratic step in {r:?}");
    // Two quadratic solves (before and after one augmentation update) fit in 12.
    assert!(last.newton_iterations <= 12, "{} iterations", last.newton_iterations);
}

// The 3-D counterpart: a block on a frictionless rigid plane, compressed by
// a top plate that moves only along z, is in homogeneous uniaxial
// compression: σ_zz = μ (λ² − 1/λ) (Rivlin 1948 / Treloar; REFERENCES.md
// §7). Symmetry planes x = 0 and y = 0 hold the rigid-body modes. Same
// tolerance argument as the plane-strain case.
#[test]
fn contact_rigid_plane_3d_reproduces_uniaxial_compression() {
    let (l, squeeze) = (2.0, 0.3);
    let mesh = olli_verification::block([l, l, l], [2, 2, 2], 0.0);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(MU, KAPPA), Formulation::Mixed);
    model.rigid.push(RigidBody::new("floor", Shape::Plane { point: [0.0, 0.0, 0.0], normal: [0.0, 0.0, 1.0] }, "z0"));
    model.stages.push(Stage {
        name: "press".into(),
        controls: IncrementControls { first: 0.25, ..Default::default() },
        motions: vec![Motion { set: "z1".into(), displacement: [None, None, Some(-squeeze)] }],
        supports: vec![
            Support { set: "x0".into(), components: [true, false, false] },
            Support { set: "y0".into(), components: [false, true, false] },
        ],
        ..Default::default()
    });
    let sol = run(&model);
    let lambda = (l - squeeze) / l;
    let sigma = MU * (lambda * lambda - 1.0 / lambda);
    let expected = -sigma * l * l / lambda;
    let floor = -sol.last().unwrap().contact[0].force[2];
    assert!((floor - expected).abs() / expected < 5e-3, "floor force {floor} vs {expected}");
}

// A cord lying loose between two frictionless plates is held only by the
// two contact points it starts on (the rounded pressure law gives them
// stiffness at zero gap). With stabilization springs (factor 1e-4) holding
// every node as well, the answer must still match the same squeeze with the
// section held by its symmetry lines (the exact way to remove the rigid-body
// modes) within 1 %, the two plate forces must balance to the springs' share
// (< 1 %), and that share must be reported.
#[test]
fn contact_stabilization_carries_a_loose_cord() {
    use olli_mesh::generate::CircleParams;
    use olli_mesh::{generate, GeneratorSpec};
    let squeeze = |loose: bool| {
        let spec = GeneratorSpec::Cord(CircleParams { center: [20.0, 0.0], diameter: Some(4.0), divisions: 32, ..Default::default() });
        let mut mesh = generate(&spec).unwrap();
        let mid: Vec<usize> = (0..mesh.node_count()).filter(|&n| mesh.nodes[n][1].abs() < 1e-9).collect();
        mesh.node_sets.insert("mid".into(), mid);
        let mut model = Model::single_region(mesh, Analysis::Axisymmetric, neo_hookean(MU, KAPPA), Formulation::Mixed);
        model.rigid.push(RigidBody::new("lower", Shape::Line { point: [0.0, -2.0], direction: [1.0, 0.0] }, "surface"));
        model.rigid.push(RigidBody::new("upper", Shape::Line { point: [0.0, 2.0], direction: [-1.0, 0.0] }, "surface"));
        let mut stage = Stage {
            name: "squeeze".into(),
            controls: IncrementControls { first: 0.1, max: 0.1, ..Default::default() },
            ..Default::default()
        };
        if loose {
            // Only the upper plate moves; nothing holds the cord.
            stage.controls.stabilization = 1e-4;
            stage.rigid_motions.push(RigidMotion { body: "upper".into(), translation: [0.0, -0.8, 0.0], rotation: 0.0 });
        } else {
            stage.supports.push(Support { set: "mid".into(), components: [false, true, false] });
            stage.rigid_motions.push(RigidMotion { body: "upper".into(), translation: [0.0, -0.4, 0.0], rotation: 0.0 });
            stage.rigid_motions.push(RigidMotion { body: "lower".into(), translation: [0.0, 0.4, 0.0], rotation: 0.0 });
        }
        model.stages.push(stage);
        let sol = run(&model);
        // The springs' share of the force is reported: some, and small.
        let share = sol.increments.iter().map(|i| i.stabilization_share).fold(0.0, f64::max);
        assert!(if loose { share > 0.0 && share < 0.01 } else { share == 0.0 }, "share {share}");
        let last = sol.last().unwrap();
        (last.contact[0].force[1], last.contact[1].force[1])
    };
    let (lower, upper) = squeeze(true);
    let (_, held) = squeeze(false);
    assert!(rel(-lower, upper) < 1e-2, "plates balance: {lower} vs {upper}");
    assert!(rel(upper, held) < 1e-2, "loose {upper} vs held {held}");
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

// Rigid-body motions follow the stage's ramp of the body's name, like any
// load (a step ramp applies the whole motion from the first increment): the
// first increment must already carry the final cover force.
#[test]
fn rigid_motion_follows_its_ramp() {
    let mesh = rectangle(0.0, 4.0, 0.0, 2.0, 4, 4, 0.0);
    let mut model = Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, neo_hookean(MU, KAPPA), Formulation::Mixed);
    model.rigid.push(RigidBody::new("cover", Shape::Line { point: [4.0, 2.0], direction: [-1.0, 0.0] }, "t1"));
    let mut stage = Stage {
        name: "press".into(),
        controls: IncrementControls { first: 0.5, ..Default::default() },
        rigid_motions: vec![RigidMotion { body: "cover".into(), translation: [0.0, -0.1, 0.0], rotation: 0.0 }],
        supports: vec![Support { set: "t0".into(), components: [true, true, false] }],
        ..Default::default()
    };
    stage.ramps.insert("cover".into(), olli_solver::Ramp::Step);
    model.stages.push(stage);
    let sol = run(&model);
    let first = sol.increments[0].contact[0].force[1];
    let last = sol.last().unwrap().contact[0].force[1];
    assert!(sol.increments.len() >= 2);
    assert!(first > 0.0 && ((first - last) / last).abs() < 1e-6, "{first} vs {last}");
}
