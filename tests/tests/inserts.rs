//! Bonded rigid inserts: torsion of a long bonded bush against the closed
//! form, force- and moment-driven plates against the motion-driven ones,
//! and an insert against the same rigid motion given node by node.

use std::f64::consts::PI;

use olli_mesh::generate::{hollow_cylinder, AnnulusParams};
use olli_solver::*;
use olli_verification::*;

/// A slice of a long bush: a = 1, b = 2, height l, `nr` × 48 × 1 hex8.
fn bush_slice(l: f64, nr: usize) -> olli_mesh::Mesh {
    let p = AnnulusParams {
        inner_radius: 1.0,
        outer_radius: 2.0,
        radial_divisions: nr,
        circumferential_divisions: 48,
        height: l,
        axial_divisions: 1,
        ..Default::default()
    };
    hollow_cylinder(&p).unwrap()
}

fn pin(free: [bool; 6]) -> Insert {
    Insert { name: "pin".into(), set: "inner".into(), reference: [0.0; 3], free }
}

fn turn(insert: &str, comps: [Option<InsertDrive>; 6]) -> InsertStage {
    InsertStage { insert: insert.into(), components: comps }
}

/// Torsion of a long bonded bush (inner radius a, outer b, length L, shear
/// modulus G): T = 4π G L θ / (1/a² − 1/b²) — Adkins & Gent 1954, "Load–
/// deflexion relations of rubber bush mountings", Brit. J. Appl. Phys.
/// 5:354–358 (from memory; it follows from τ_rθ = T/(2π r² L) and τ = Gγ,
/// exact for a Mooney–Rivlin solid in circular shear). A slice of length L
/// with free end planes carries the long bush's state at small angles.
#[test]
fn adkins_gent_bush_torsion_with_a_pin_insert() {
    let (a, b, l, g) = (1.0, 2.0, 0.2, 1.0);
    let theta = 1.0f64.to_radians();
    let mut model = Model::single_region(bush_slice(l, 16), Analysis::Solid3d, neo_hookean(g, 5000.0 * g), Formulation::Mixed);
    model.output.point_fields = false;
    model.output.nodal_fields = false;
    model.inserts.push(pin([false; 6]));
    model.stages.push(Stage {
        name: "twist".into(),
        controls: one_increment(),
        supports: vec![support("outer", [true; 3])],
        inserts: vec![turn("pin", [None, None, None, None, None, Some(InsertDrive::Move(theta))])],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let last = sol.last().unwrap();
    let ins = &last.inserts[0];
    let want = 4.0 * PI * g * l * theta / (1.0 / (a * a) - 1.0 / (b * b));
    // The rubber resists the twist: its moment on the pin is −T.
    let torque = -ins.moment[2];
    eprintln!("bush torque {torque:.6e} vs 4πGLθ/(1/a²−1/b²) = {want:.6e} (rel {:.2e})", rel(torque, want));
    assert!((ins.rotation[2] - theta).abs() < 1e-14);
    // 16 linear elements across the wall, 48 around: O(h²) ≈ 0.3 %.
    assert!(rel(torque, want) < 5e-3);
}

/// A rubber block 1 × 1 × 0.5 (hex8, mixed, G = 1, κ = 100) bonded below to
/// a held base and above to a plate insert at the top face's centre.
fn plate_model(drive: [Option<InsertDrive>; 6], free: [bool; 6]) -> Model {
    let mesh = block([1.0, 1.0, 0.5], [4, 4, 2], 0.0);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(1.0, 100.0), Formulation::Mixed);
    model.output.point_fields = false;
    model.output.nodal_fields = false;
    model.inserts.push(Insert { name: "plate".into(), set: "z1".into(), reference: [0.5, 0.5, 0.5], free });
    model.stages.push(Stage {
        name: "load".into(),
        controls: IncrementControls { first: 0.5, force_tolerance: 1e-10, ..Default::default() },
        supports: vec![support("z0", [true; 3])],
        inserts: vec![turn("plate", drive)],
        ..Default::default()
    });
    model
}

/// Quadratic convergence (Dennis & Schnabel 1983, Numerical Methods for
/// Unconstrained Optimization and Nonlinear Equations, Thm. 5.2.1; general
/// mathematics): in the asymptotic range log r_{k+1} / log r_k ≈ 2. Returns
/// how many iterations were in that range.
fn assert_quadratic(h: &[f64]) -> usize {
    let mut checked = 0;
    for k in 0..h.len().saturating_sub(1) {
        if h[k] < 1e-2 && h[k + 1] > 1e-13 {
            let order = h[k + 1].ln() / h[k].ln();
            assert!(order > 1.7, "order {order} at iteration {k}: {h:?}");
            checked += 1;
        }
    }
    checked
}

/// A plate pressed down 0.05 and tilted 0.04 rad about x by prescribed
/// motion needs a force and moment; applying them to a free plate must put
/// it in the same place (the same boundary value problem posed the other
/// way round; agreement to solver tolerance), with quadratic Newton
/// convergence of the force- and moment-driven components.
#[test]
fn force_and_moment_driven_plate_reaches_the_motion_driven_position() {
    let (w, tilt) = (-0.05, 0.04);
    let m = InsertDrive::Move;
    let moved = plate_model([None, None, Some(m(w)), Some(m(tilt)), None, None], [false; 6]);
    let sol = solve(&moved, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let ins = &sol.last().unwrap().inserts[0];
    // What the plate applies to the rubber is minus what the rubber exerts on it.
    let (fz, mx) = (-ins.force[2], -ins.moment[0]);
    eprintln!("motion-driven: force z {fz:.6e}, moment x {mx:.6e}, also force {:?} moment {:?}", ins.force, ins.moment);
    assert!(fz < 0.0 && mx > 0.0);

    let l = InsertDrive::Load;
    let loaded = plate_model([None, None, Some(l(fz)), Some(l(mx)), None, None], [false; 6]);
    let sol = solve(&loaded, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let last = sol.last().unwrap();
    let got = &last.inserts[0];
    eprintln!("force-driven: z {:.8e} (want {w}), rx {:.8e} (want {tilt})", got.displacement[2], got.rotation[0]);
    assert!(rel(got.displacement[2], w) < 1e-6, "{}", got.displacement[2]);
    assert!(rel(got.rotation[0], tilt) < 1e-6, "{}", got.rotation[0]);
    let mut checked = 0;
    for inc in &sol.increments {
        eprintln!("residuals: {:?}", inc.residual_history);
        checked += assert_quadratic(&inc.residual_history);
    }
    assert!(checked >= 1);

    // The other way round, with two free rotations and a prescribed turn
    // about z: the loads first, then the motion to where they led.
    let loads = [None, None, Some(l(-0.5)), Some(l(0.03)), Some(l(0.0)), Some(m(0.02))];
    let sol = solve(&plate_model(loads, [false; 6]), &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let found = sol.last().unwrap().inserts[0].clone();
    for inc in &sol.increments {
        eprintln!("residuals: {:?}", inc.residual_history);
        assert!(assert_quadratic(&inc.residual_history) >= 1);
    }
    let back = [None, None, Some(m(found.displacement[2])), Some(m(found.rotation[0])), Some(m(found.rotation[1])), None];
    let mut moved = plate_model(back, [false; 6]);
    moved.stages[0].inserts[0].components[5] = Some(m(0.02));
    let sol = solve(&moved, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let got = &sol.last().unwrap().inserts[0];
    eprintln!(
        "found z {:.6e} rx {:.6e} ry {:.6e}; forces back {:?} {:?}",
        found.displacement[2], found.rotation[0], found.rotation[1], got.force, got.moment
    );
    assert!(rel(-got.force[2], -0.5) < 1e-6);
    assert!(rel(-got.moment[0], 0.03) < 1e-6);
    assert!(got.moment[1].abs() < 1e-6 * 0.03);
}

/// The same rigid twist of the bush's inner face given by an insert and by
/// one motion per node (u = (R − I)X, reached in one increment) gives the
/// same field and the same torque: Σ (x × r) over the pin nodes equals the
/// insert's moment (regression against the per-node route, which is exact).
#[test]
fn insert_equals_the_same_motion_node_by_node() {
    let theta = 3.0f64.to_radians();
    let build = |with_insert: bool| {
        let mut mesh = bush_slice(0.2, 6);
        let inner = mesh.nodes_of_set("inner").unwrap();
        let (s, c) = theta.sin_cos();
        let motions = if with_insert {
            Vec::new()
        } else {
            pin_nodes(&mut mesh, &inner, |x| [c * x[0] - s * x[1] - x[0], s * x[0] + c * x[1] - x[1], 0.0])
        };
        let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(1.0, 1000.0), Formulation::Mixed);
        model.output.point_fields = false;
        model.output.nodal_fields = false;
        let mut stage = Stage {
            name: "twist".into(),
            controls: one_increment(),
            supports: vec![support("outer", [true; 3])],
            motions,
            ..Default::default()
        };
        if with_insert {
            model.inserts.push(pin([false; 6]));
            stage.inserts.push(turn("pin", [None, None, None, None, None, Some(InsertDrive::Move(theta))]));
        }
        model.stages.push(stage);
        let sol = solve(&model, &mut Quiet).unwrap();
        assert!(sol.completed(), "{:?}", sol.termination);
        (model, sol)
    };
    let (_, with) = build(true);
    let (model, without) = build(false);
    let (a, b) = (with.last().unwrap(), without.last().unwrap());
    let mut worst: f64 = 0.0;
    for (p, q) in a.displacement.iter().zip(&b.displacement) {
        for i in 0..3 {
            worst = worst.max((p[i] - q[i]).abs());
        }
    }
    // Torque from the per-node reactions about the axis, at the moved nodes.
    let mut torque = 0.0;
    for &n in &model.mesh.nodes_of_set("inner").unwrap() {
        let r = b.reactions[&format!("pin{n}")];
        let x = model.mesh.nodes[n];
        let u = b.displacement[n];
        torque += (x[0] + u[0]) * r[1] - (x[1] + u[1]) * r[0];
    }
    let ins = &a.inserts[0];
    eprintln!("largest displacement difference {worst:.2e}; torque per node {torque:.8e}, insert {:.8e}", -ins.moment[2]);
    assert!(worst < 1e-9);
    assert!(rel(-ins.moment[2], torque) < 1e-8);
    assert!(rel(-ins.force[0], b.reactions.iter().filter(|(k, _)| k.starts_with("pin")).map(|(_, r)| r[0]).sum::<f64>()).is_finite());
}
