//! Hertz line contact: a long elastic cylinder pressed on a rigid flat.
//!
//! Source: K. L. Johnson, *Contact Mechanics*, Cambridge University Press
//! 1985, ch. 4 (from memory; formulas also in ../shared/REFERENCES.md §6):
//! with load P per unit length, radius R and 1/E* = (1 − ν²)/E for a rigid
//! flat, the contact half-width is a = √(4PR/(πE*)) and the peak pressure
//! p0 = 2P/(πa). Hertz assumes small strain and a ≪ R.
//!
//! Model: plane strain, by symmetry a quarter of a thick ring (hub radius
//! 0.3R, outer radius R) whose hub is pushed down onto a frictionless rigid
//! line. The hub is far from the contact, so the local contact field is that
//! of a cylinder under the same load. The mesh is graded geometrically toward
//! the contact point, with the finest contact-side edge h_c; successive meshes
//! halve h_c. P is the measured hub reaction, and a and p0 from olli are
//! compared with Hertz's formulas at that P. Four meshes from about 1 to 10
//! contact-side edges per half-width show the convergence.

use olli_solver::contact::Shape;
use olli_solver::model::{RigidBody, RigidMotion};
use olli_solver::{solve, Analysis, Formulation, IncrementControls, Model, Motion, Quiet, Stage, Support};
use olli_verification::{neo_hookean, quad_grid};

/// Cumulative positions of `n` cells growing geometrically from `first` to fill `total`.
fn geometric(n: usize, total: f64, first: f64) -> Vec<f64> {
    let sum = |q: f64| if (q - 1.0).abs() < 1e-12 { first * n as f64 } else { first * (q.powi(n as i32) - 1.0) / (q - 1.0) };
    let (mut lo, mut hi) = (1.0, 2.0);
    for _ in 0..200 {
        let m = 0.5 * (lo + hi);
        if sum(m) < total { lo = m } else { hi = m }
    }
    let q = 0.5 * (lo + hi);
    let mut x = vec![0.0];
    let mut h = first;
    for _ in 0..n {
        let next = x.last().unwrap() + h;
        x.push(next);
        h *= q;
    }
    let scale = total / x[n];
    x.iter().map(|v| v * scale).collect()
}

const PUSH: f64 = 0.05;

struct HertzRun {
    load: f64,
    half_width: f64,
    peak_pressure: f64,
    iterations: Vec<usize>,
}

fn run(edge: f64, push: f64) -> HertzRun {
    let (radius, hub) = (10.0, 3.0);
    let mu = 1.0;
    // Cell counts so that geometric growth stays near 1.12 per cell.
    let count = |total: f64| ((1.0 + total * 0.12 / edge).ln() / 1.12f64.ln()).ceil() as usize;
    let angle_total = std::f64::consts::FRAC_PI_2;
    let (nr, nt) = (count(radius - hub), count(angle_total * radius));
    let radial = geometric(nr, radius - hub, edge);
    let angular = geometric(nt, angle_total * radius, edge);
    let mesh = quad_grid(nr, nt, 0.0, |s, t| {
        // Radial cells are finest at the outer surface, angular cells at the contact point (θ = −π/2).
        let i = (s * nr as f64).round() as usize;
        let j = (t * nt as f64).round() as usize;
        let r = radius - radial[nr - i];
        let theta = -std::f64::consts::FRAC_PI_2 + angular[j] / radius;
        [r * theta.cos(), r * theta.sin()]
    });
    // Nearly incompressible (κ = 1000 μ): E* = E/(1 − ν²) from E and ν of κ and μ.
    let kappa = 1000.0 * mu;
    let material = neo_hookean(mu, kappa);
    let mut model = Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, material, Formulation::Mixed);
    model.rigid.push(RigidBody::new("flat", Shape::Line { point: [0.0, -radius], direction: [1.0, 0.0] }, "s1"));
    model.stages.push(Stage {
        name: "press".into(),
        controls: IncrementControls { first: 0.25, max: 0.5, ..Default::default() },
        // Symmetry on x = 0 (edge t0), hub (edge s0) pushed down.
        supports: vec![Support { set: "t0".into(), components: [true, false, false] }],
        motions: vec![Motion { set: "s0".into(), displacement: [Some(0.0), Some(-push), None] }],
        rigid_motions: vec![RigidMotion { body: "flat".into(), translation: [0.0; 3], rotation: 0.0 }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).expect("valid model");
    assert!(sol.completed(), "{:?}", sol.termination);
    let last = sol.last().unwrap();
    let contact = &last.contact[0];
    let fields = last.contact_fields.as_ref().unwrap();
    HertzRun {
        // Full cylinder load per unit length: twice the half model's.
        load: 2.0 * contact.force[1].abs(),
        half_width: contact.contact_width,
        peak_pressure: fields.pressure.iter().copied().fold(0.0, f64::max),
        iterations: sol.increments.iter().map(|i| i.newton_iterations).collect(),
    }
}

#[test]
fn hertz_line_contact_half_width_and_peak_pressure_converge() {
    let mu = 1.0;
    let kappa = 1000.0 * mu;
    let e = 9.0 * kappa * mu / (3.0 * kappa + mu);
    let nu = (3.0 * kappa - 2.0 * mu) / (2.0 * (3.0 * kappa + mu));
    let e_star = e / (1.0 - nu * nu);
    let radius = 10.0;
    let mut errors = Vec::new();
    for edge in [0.4, 0.2, 0.1, 0.05] {
        let r = run(edge, PUSH);
        let a = (4.0 * r.load * radius / (std::f64::consts::PI * e_star)).sqrt();
        let p0 = 2.0 * r.load / (std::f64::consts::PI * a);
        let (ea, ep) = ((r.half_width - a).abs() / a, (r.peak_pressure - p0).abs() / p0);
        println!("edge {edge}: P {:.5} a {:.5} (Hertz {a:.5}, err {ea:.4}) p0 {:.5} (Hertz {p0:.5}, err {ep:.4}) its {:?}", r.load, r.half_width, r.peak_pressure, r.iterations);
        errors.push((ea, ep));
    }
    // Hertz is a small-strain, a ≪ R solution; here a/R ≈ 0.05 and the
    // contact strain ≈ p0/E* ≈ 3 %, so up to about 1 % of finite-strain and
    // discretisation effect remains in p0 (REFERENCES.md §6 suggests 2 % with
    // at least 20 contact-side edges across 2a; the finest mesh has about 21).
    let (ea, ep) = *errors.last().unwrap();
    assert!(ea < 0.02, "half-width error {ea}");
    assert!(ep < 0.02, "peak pressure error {ep}");
    // Refinement helps: the coarsest mesh (about one edge per half-width) is
    // far off, the finer ones are not.
    assert!(errors[0].0 + errors[0].1 > ea + ep);
}
