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
