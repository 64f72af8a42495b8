//! O-ring cord squeezed between two flat, frictionless rigid plates.
//!
//! Source: P. B. Lindley, "Compression characteristics of laterally-
//! unrestrained rubber O-rings", J. Inst. Rubber Industry 1 (1967) 209–213
//! (formula from memory, as collected in ../shared/REFERENCES.md §2): the
//! force per unit length of cord is
//!
//!   F / L = E d (1.25 c^1.5 + 50 c^6),   c = δ / d,
//!
//! with E = 3G the Young's modulus, d the cord diameter and δ the diametral
//! compression; for a ring of mean diameter D, L = π D. It is an empirical
//! fit to natural-rubber rings for c up to about 0.25–0.3, so it is a
//! plausibility check (the literature reports FE results close to it), not
//! a high-precision reference: we ask for agreement within 20 %.
//!
//! Model: the cord section meshed by olli's O-grid generator, squeezed
//! symmetrically (both plates move toward the centre by δ/2), with the
//! symmetry lines held.
//!
//! A ring (and a long free cord) can grow along its length as it is
//! squeezed; a plane-strain section cannot, which makes it stiffer. For the
//! plane-strain check, E in Lindley's relation is replaced by the plane-strain
//! modulus E/(1 − ν²) = 4E/3 of an incompressible solid (common practice when
//! a free-body relation is carried over to plane strain; the axisymmetric
//! ring check uses E itself).

use olli_mesh::generate::CircleParams;
use olli_mesh::{generate, GeneratorSpec};
use olli_solver::contact::Shape;
use olli_solver::model::{RigidBody, RigidMotion};
use olli_solver::{solve, Analysis, Formulation, IncrementControls, Model, Quiet, Stage, Support};
use olli_verification::neo_hookean;

const D_CORD: f64 = 4.0;
const C_MAX: f64 = 0.25;

/// (c, F/L from olli, F/L from Lindley) for each converged increment.
fn squeeze(analysis: Analysis, center: [f64; 2], divisions: usize) -> Vec<(f64, f64, f64, usize)> {
    let plane_strain = matches!(analysis, Analysis::PlaneStrain { .. });
    let mu = 1.0;
    let spec = GeneratorSpec::Cord(CircleParams { center, diameter: Some(D_CORD), divisions, ..Default::default() });
    let mut mesh = generate(&spec).unwrap();
    let tol = 1e-9 * D_CORD;
    let on_h: Vec<usize> = (0..mesh.node_count()).filter(|&n| (mesh.nodes[n][1] - center[1]).abs() < tol).collect();
    let on_v: Vec<usize> = (0..mesh.node_count())
        .filter(|&n| (mesh.nodes[n][0] - center[0]).abs() < tol && (mesh.nodes[n][1] - center[1]).abs() < tol)
        .collect();
    assert!(on_h.len() > 2 && on_v.len() == 1, "O-grid has nodes on its symmetry lines");
    mesh.node_sets.insert("mid_plane".into(), on_h);
    mesh.node_sets.insert("mid_line".into(), on_v);
    let material = neo_hookean(mu, 2000.0 * mu);
    let mut model = Model::single_region(mesh, analysis, material, Formulation::Mixed);
    let r = 0.5 * D_CORD;
    let (cx, cy) = (center[0], center[1]);
    model.rigid.push(RigidBody::new("lower", Shape::Line { point: [cx, cy - r], direction: [1.0, 0.0] }, "surface"));
    model.rigid.push(RigidBody::new("upper", Shape::Line { point: [cx, cy + r], direction: [-1.0, 0.0] }, "surface"));
    let half = 0.5 * C_MAX * D_CORD;
    let mut supports = vec![Support { set: "mid_plane".into(), components: [false, true, false] }];
    if let Analysis::PlaneStrain { .. } = analysis {
        supports.push(Support { set: "mid_line".into(), components: [true, false, false] });
    }
    model.stages.push(Stage {
        name: "squeeze".into(),
        controls: IncrementControls { first: 0.1, max: 0.1, ..Default::default() },
        supports,
        rigid_motions: vec![
            RigidMotion { body: "lower".into(), translation: [0.0, half, 0.0], rotation: 0.0 },
            RigidMotion { body: "upper".into(), translation: [0.0, -half, 0.0], rotation: 0.0 },
        ],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let length = match analysis {
        Analysis::Axisymmetric => std::f64::consts::PI * 2.0 * cx,
        _ => 1.0,
    };
    let e = if plane_strain { 4.0 * mu } else { 3.0 * mu };
    sol.increments
        .iter()
        .map(|inc| {
            let c = C_MAX * inc.load_factor;
            let upper = inc.contact.iter().find(|s| s.name == "upper").unwrap();
            let lower = inc.contact.iter().find(|s| s.name == "lower").unwrap();
            // Equal and opposite plate forces: the cord is in equilibrium.
            assert!((upper.force[1] + lower.force[1]).abs() < 1e-6 * upper.force[1].abs().max(1e-12));
            let lindley = e * D_CORD * (1.25 * c.powf(1.5) + 50.0 * c.powi(6));
            (c, upper.force[1] / length, lindley, inc.newton_iterations)
        })
        .collect()
}

/// Total ring force of the axisymmetric model at compression `c` (one of its increments).
fn squeeze_to(analysis: Analysis, center: [f64; 2], divisions: usize, c: f64) -> f64 {
    let rows = squeeze(analysis, center, divisions);
    let row = rows.iter().min_by(|a, b| (a.0 - c).abs().total_cmp(&(b.0 - c).abs())).unwrap();
    assert!((row.0 - c).abs() < 1e-9, "no increment at c = {c}");
    row.1 * 2.0 * std::f64::consts::PI * center[0]
}

fn check(rows: &[(f64, f64, f64, usize)]) {
    for &(c, fe, lindley, its) in rows {
        println!("c {c:.3}: olli {fe:.5} Lindley {lindley:.5} ratio {:.3} ({its} iterations)", fe / lindley);
        if c >= 0.1 - 1e-9 {
            assert!((fe / lindley - 1.0).abs() < 0.20, "c = {c}: olli {fe}, Lindley {lindley}");
        }
    }
}

#[test]
fn lindley_oring_plane_strain_force_per_length() {
    check(&squeeze(Analysis::PlaneStrain { thickness: 1.0 }, [0.0, 0.0], 32));
}

#[test]
fn lindley_oring_axisymmetric_ring_force() {
    // Mean diameter 10 cord diameters: a typical face-seal ring.
    check(&squeeze(Analysis::Axisymmetric, [5.0 * D_CORD, 0.0], 32));
}

// The same ring in 3-D: a 90° sector of the cord section swept about the
// axis (hex8), its cut faces held by symmetry, squeezed between two rigid
// planes. It must carry the axisymmetric model's force (×4 for the sector)
// within 3 % — the faceting of eight 11.25° layers (cos 5.6° ≈ 0.995) and
// the coarser hoop mesh account for up to about 1 % (common practice) — and
// so agree with Lindley's relation as the ring check above does.
#[test]
fn lindley_oring_3d_sector_matches_the_axisymmetric_ring() {
    use olli_solver::Support as S;
    let mu = 1.0;
    let c = 0.15;
    let section = GeneratorSpec::Cord(CircleParams { center: [20.0, 0.0], diameter: Some(D_CORD), divisions: 16, ..Default::default() });
    let spec = GeneratorSpec::Sweep { section: Box::new(section), angle: 90.0, divisions: 8 };
    let mesh = generate(&spec).unwrap();
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(mu, 2000.0 * mu), Formulation::Mixed);
    let r = 0.5 * D_CORD;
    model.rigid.push(RigidBody::new("lower", Shape::Plane { point: [0.0, 0.0, -r], normal: [0.0, 0.0, 1.0] }, "surface"));
    model.rigid.push(RigidBody::new("upper", Shape::Plane { point: [0.0, 0.0, r], normal: [0.0, 0.0, -1.0] }, "surface"));
    let half = 0.5 * c * D_CORD;
    let mut mid: Vec<usize> = (0..model.mesh.node_count()).filter(|&n| model.mesh.nodes[n][2].abs() < 1e-9).collect();
    mid.sort_unstable();
    model.mesh.node_sets.insert("mid_plane".into(), mid);
    model.stages.push(Stage {
        name: "squeeze".into(),
        controls: IncrementControls { first: 0.2, max: 0.2, ..Default::default() },
        supports: vec![
            S { set: "start".into(), components: [false, true, false] },
            S { set: "end".into(), components: [true, false, false] },
            S { set: "mid_plane".into(), components: [false, false, true] },
        ],
        rigid_motions: vec![
            RigidMotion { body: "lower".into(), translation: [0.0, 0.0, half], rotation: 0.0 },
            RigidMotion { body: "upper".into(), translation: [0.0, 0.0, -half], rotation: 0.0 },
        ],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let upper = sol.last().unwrap().contact.iter().find(|s| s.name == "upper").unwrap().force[2];
    let ring_3d = 4.0 * upper; // force of the rubber on the upper plane, whole ring
    let axi = squeeze_to(Analysis::Axisymmetric, [20.0, 0.0], 16, c);
    println!("3-D sector ×4: {ring_3d:.4} N, axisymmetric: {axi:.4} N");
    assert!((ring_3d / axi - 1.0).abs() < 0.03, "{ring_3d} vs {axi}");
}
