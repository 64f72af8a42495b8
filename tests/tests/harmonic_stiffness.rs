//! Harmonic stages: the dynamic stiffness of a part about a preload, from
//! the Prony series of its rubber in the frequency domain (see
//! `olli_solver::driver::harmonic`).

use std::sync::Arc;

use olli_solver::material::{registry, Material, Prony, VolumetricForm};
use olli_solver::model::{Harmonic, Insert, InsertDrive, InsertStage};
use olli_solver::*;
use olli_verification::*;

/// A 1 × 1 × 1 neo-Hookean block, 2×2×2 hex8, every node held in y and z,
/// the base y0 held in x and the top y1 held in x by a first (static)
/// stage, then vibrated in x with amplitude `amplitude` at `frequencies`.
fn sheared_block(mu: f64, terms: &[[f64; 2]], frequencies: &[f64], amplitude: f64) -> Solution {
    let mut mesh = block([1.0, 1.0, 1.0], [2, 2, 2], 0.0);
    mesh.node_sets.insert("all".into(), (0..mesh.node_count()).collect());
    let material = registry::material("neo-hookean", &[("shear_modulus", mu), ("bulk_modulus", 1000.0 * mu)], VolumetricForm::Quadratic)
        .unwrap()
        .with_prony(Prony::new(terms).unwrap());
    let mut model = Model::single_region(mesh, Analysis::Solid3d, Arc::new(material), Formulation::Mixed);
    model.stages.push(Stage {
        name: "hold".into(),
        supports: vec![support("all", [false, true, true]), support("y0", [true, false, false])],
        motions: vec![Motion { set: "y1".into(), displacement: [Some(0.0), None, None] }],
        controls: one_increment(),
        ..Default::default()
    });
    model.stages.push(Stage {
        name: "vibrate".into(),
        harmonic: Some(Harmonic { frequencies: frequencies.to_vec() }),
        motions: vec![Motion { set: "y1".into(), displacement: [Some(amplitude), None, None] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    sol
}

// Standard linear viscoelasticity (J.D. Ferry, 1980, "Viscoelastic
// Properties of Polymers", 3rd ed., Wiley, ch. 3, eqs. for the Maxwell
// elements of a generalized Maxwell model; N.W. Tschoegl, 1989, "The
// Phenomenological Theory of Linear Viscoelastic Behavior", Springer): the
// complex shear modulus of a Prony series G(t) = G₀ (g∞ + Σ gᵢ e^{−t/τᵢ}) is
// G′(ω) = G₀ (g∞ + Σ gᵢ ω²τᵢ² / (1 + ω²τᵢ²)), G″(ω) = G₀ Σ gᵢ ωτᵢ / (1 + ω²τᵢ²).
// The unloaded block in simple shear u_x = a y (exact for these
// constraints: the free side faces carry no x traction in simple shear)
// has the complex stiffness K* = G* A / H with A = H = 1. Written here
// from the formulas, not through the solver's own Prony code; the solve is
// linear, so the agreement is to round-off (1e-9 relative).
#[test]
fn unloaded_shear_stiffness_is_the_complex_modulus_of_the_prony_series() {
    let (mu, terms) = (0.8, [[0.25, 0.1], [0.15, 3.0], [0.1, 100.0]]);
    let frequencies = [1e-4, 1e-3, 0.01, 0.1, 1.0, 10.0, 100.0];
    let sol = sheared_block(mu, &terms, &frequencies, 1e-3);
    assert_eq!(sol.dynamic.len(), 1);
    let d = &sol.dynamic[0];
    assert_eq!(d.stiffness.len(), 1, "one driven set and component");
    let k = &d.stiffness[0];
    assert_eq!((k.set.as_str(), k.component), ("y1", 0));
    let g_inf = 1.0 - terms.iter().map(|t| t[0]).sum::<f64>();
    for (i, &f) in frequencies.iter().enumerate() {
        let w = std::f64::consts::TAU * f;
        let storage = mu * (g_inf + terms.iter().map(|t| t[0] * (w * t[1]).powi(2) / (1.0 + (w * t[1]).powi(2))).sum::<f64>());
        let loss = mu * terms.iter().map(|t| t[0] * w * t[1] / (1.0 + (w * t[1]).powi(2))).sum::<f64>();
        assert!((k.storage[i] - storage).abs() < 1e-9 * mu, "f {f}: K′ {} vs G′ {storage}", k.storage[i]);
        assert!((k.loss[i] - loss).abs() < 1e-9 * mu, "f {f}: K″ {} vs G″ {loss}", k.loss[i]);
        let angle = loss.atan2(storage).to_degrees();
        assert!((k.loss_angle(i) - angle).abs() < 1e-7, "f {f}: δ {} vs {angle}", k.loss_angle(i));
    }
}

// One Prony term is the standard linear solid (Zener): tan δ = g ωτ /
// (g∞ + ω²τ²) (from the complex modulus above, Tschoegl 1989 ch. 3), whose
// maximum lies at ωτ = √g∞ with tan δ_max = g / (2 √g∞). Frequencies on a
// grid 2 % apart around the prediction: the largest loss angle must sit at
// the grid point nearest to it, and equal the predicted peak to 1e-3 (the
// peak is flat: a 1 % miss changes tan δ by 1e-4 relative).
#[test]
fn loss_angle_peaks_where_the_standard_linear_solid_predicts() {
    let (g, tau) = (0.6, 0.02);
    let g_inf: f64 = 1.0 - g;
    let f_peak = g_inf.sqrt() / (std::f64::consts::TAU * tau);
    let frequencies: Vec<f64> = (-20..=20).map(|k| f_peak * 1.02f64.powi(k) * 1.003).collect();
    let sol = sheared_block(1.0, &[[g, tau]], &frequencies, 1e-3);
    let k = &sol.dynamic[0].stiffness[0];
    let angles: Vec<f64> = (0..frequencies.len()).map(|i| k.loss_angle(i)).collect();
    let top = (0..angles.len()).max_by(|&a, &b| angles[a].total_cmp(&angles[b])).unwrap();
    let nearest = (0..frequencies.len())
        .min_by(|&a, &b| (frequencies[a] / f_peak).ln().abs().total_cmp(&(frequencies[b] / f_peak).ln().abs()))
        .unwrap();
    assert_eq!(top, nearest, "peak at {} Hz, predicted {f_peak} Hz", frequencies[top]);
    let tan_max = g / (2.0 * g_inf.sqrt());
    let tan_top = angles[top].to_radians().tan();
    assert!((tan_top - tan_max).abs() < 1e-3 * tan_max, "tan δ at the peak {tan_top} vs {tan_max}");
}

/// A plane-strain Yeoh block 2 × 1 bonded at its base, its top pressed
/// down by `press` (and held in x); constants scaled by `scale`.
fn pressed_block(scale: f64, prony: Option<&[[f64; 2]]>, press: f64) -> Model {
    let c = [("c10", 0.5 * scale), ("c20", -0.05 * scale), ("c30", 0.004 * scale), ("bulk_modulus", 500.0)];
    let mut material: Material = registry::material("yeoh", &c, VolumetricForm::Quadratic).unwrap();
    if let Some(terms) = prony {
        material = material.with_prony(Prony::new(terms).unwrap());
    }
    let mesh = rectangle(0.0, 2.0, 0.0, 1.0, 6, 3, 0.0);
    let mut model = Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, Arc::new(material), Formulation::Mixed);
    model.stages.push(Stage {
        name: "press".into(),
        supports: vec![support("t0", [true, true, false])],
        motions: vec![Motion { set: "t1".into(), displacement: [Some(0.0), Some(-press), None] }],
        controls: IncrementControls { force_tolerance: 1e-12, ..Default::default() },
        ..Default::default()
    });
    model
}

// About a preload the linearisation must use the converged state: its
// geometry, its (relaxed) stresses and the material stiffness. After a long
// hold (10⁴ × the longest relaxation time) the viscoelastic rubber is
// relaxed, and at a frequency far below every 1/τᵢ the storage stiffness
// must equal the tangent stiffness of the same block made of the relaxed
// elastic rubber (constants × g∞): the long-time limit of the Simo (1987)
// model is the hyperelastic model scaled by g∞. That tangent stiffness is
// taken by central differences of two static runs (±1e-4 about 20 %
// compression: truncation and Newton tolerance both below 1e-6 relative).
// Both parts grow with frequency at these low frequencies (the series'
// G′ and G″ both increase for ωτᵢ < 1, Tschoegl 1989 ch. 3).
#[test]
fn preloaded_storage_stiffness_at_low_frequency_equals_the_relaxed_static_tangent() {
    let terms = [[0.3, 0.5], [0.2, 20.0]];
    let g_inf = 0.5;
    let (press, h) = (0.2, 1e-4);
    let static_force = |d: f64| {
        let sol = solve(&pressed_block(g_inf, None, d), &mut Quiet).unwrap();
        assert!(sol.completed(), "{:?}", sol.termination);
        sol.last().unwrap().reactions["t1"][1]
    };
    let fd = (static_force(press - h) - static_force(press + h)) / (2.0 * h);
    let mut model = pressed_block(1.0, Some(&terms), press);
    let controls = IncrementControls { first: 1e-5, max: 0.25, force_tolerance: 1e-12, ..Default::default() };
    model.stages.push(Stage { name: "hold".into(), duration: Some(2e5), controls, ..Default::default() });
    let f = 1e-9;
    model.stages.push(Stage {
        name: "vibrate".into(),
        harmonic: Some(Harmonic { frequencies: vec![f, 8e-6] }),
        motions: vec![Motion { set: "t1".into(), displacement: [None, Some(1e-3), None] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let k = &sol.dynamic[0].stiffness[0];
    assert_eq!((k.set.as_str(), k.component), ("t1", 1));
    assert!((k.storage[0] - fd).abs() < 1e-6 * fd, "K′ {} vs static tangent {fd}", k.storage[0]);
    assert!(k.storage[1] > k.storage[0] && k.loss[1] > k.loss[0] && k.loss[0] > 0.0, "K′ {:?} K″ {:?}", k.storage, k.loss);
    // The static state is untouched: the hold's last force is the relaxed static force.
    let relaxed = sol.last().unwrap().reactions["t1"][1];
    let elastic = static_force(press);
    assert!((relaxed - elastic).abs() < 1e-6 * elastic.abs(), "relaxed {relaxed} vs {elastic}");
}

/// The block of [`sheared_block`] with its top y1 bonded to a plate (an
/// insert) instead of driven as a node set: held in the first stage, then
/// vibrated in x by `drive` (a motion amplitude, or a force amplitude with
/// x free).
fn plate_sheared_block(mu: f64, terms: &[[f64; 2]], frequencies: &[f64], drive: InsertDrive) -> Solution {
    let mut mesh = block([1.0, 1.0, 1.0], [2, 2, 2], 0.0);
    let top = mesh.node_sets["y1"].clone();
    mesh.node_sets.insert("sides".into(), (0..mesh.node_count()).filter(|n| !top.contains(n)).collect());
    let material = registry::material("neo-hookean", &[("shear_modulus", mu), ("bulk_modulus", 1000.0 * mu)], VolumetricForm::Quadratic)
        .unwrap()
        .with_prony(Prony::new(terms).unwrap());
    let mut model = Model::single_region(mesh, Analysis::Solid3d, Arc::new(material), Formulation::Mixed);
    model.inserts.push(Insert { name: "plate".into(), set: "y1".into(), reference: [0.5, 1.0, 0.5], free: [false; 6] });
    let plate = |d: InsertDrive| vec![InsertStage { insert: "plate".into(), components: [Some(d), None, None, None, None, None] }];
    model.stages.push(Stage {
        name: "hold".into(),
        supports: vec![support("sides", [false, true, true]), support("y0", [true, false, false])],
        inserts: plate(InsertDrive::Move(0.0)),
        controls: one_increment(),
        ..Default::default()
    });
    model.stages.push(Stage {
        name: "vibrate".into(),
        harmonic: Some(Harmonic { frequencies: frequencies.to_vec() }),
        inserts: plate(drive),
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    sol
}

// The complex modulus of the Prony series (Ferry 1980, ch. 3; Tschoegl
// 1989, ch. 3, as in the first test) through a bonded plate: the plate
// moved with amplitude a in x shears the block as the node set did, so its
// complex stiffness is again K* = G* A / H (A = H = 1), to round-off. The
// same plate loaded by a force amplitude F in x (x free, every other
// component held) moves by F / K*: the ratio of force to motion amplitude
// must be the same K*. The motion-driven node set of the first test gives
// the same numbers, so driving through an insert and through a set agree.
#[test]
fn plate_driven_or_loaded_in_shear_has_the_complex_modulus_of_the_prony_series() {
    let (mu, terms) = (0.8, [[0.25, 0.1], [0.15, 3.0], [0.1, 100.0]]);
    let frequencies = [1e-3, 0.1, 1.0, 10.0];
    let through_set = sheared_block(mu, &terms, &frequencies, 1e-3);
    let set = &through_set.dynamic[0].stiffness[0];
    for drive in [InsertDrive::Move(2e-3), InsertDrive::Load(-5e-4)] {
        let sol = plate_sheared_block(mu, &terms, &frequencies, drive);
        let k = &sol.dynamic[0].stiffness;
        assert_eq!(k.len(), 1, "{drive:?}: one insert component reported");
        let k = &k[0];
        assert!(k.insert && k.set == "plate" && k.component == 0, "{k:?}");
        let g_inf = 1.0 - terms.iter().map(|t| t[0]).sum::<f64>();
        for (i, &f) in frequencies.iter().enumerate() {
            let w = std::f64::consts::TAU * f;
            let storage = mu * (g_inf + terms.iter().map(|t| t[0] * (w * t[1]).powi(2) / (1.0 + (w * t[1]).powi(2))).sum::<f64>());
            let loss = mu * terms.iter().map(|t| t[0] * w * t[1] / (1.0 + (w * t[1]).powi(2))).sum::<f64>();
            assert!((k.storage[i] - storage).abs() < 1e-9 * mu, "{drive:?} f {f}: K′ {} vs G′ {storage}", k.storage[i]);
            assert!((k.loss[i] - loss).abs() < 1e-9 * mu, "{drive:?} f {f}: K″ {} vs G″ {loss}", k.loss[i]);
            assert!((k.storage[i] - set.storage[i]).abs() < 1e-9 * mu && (k.loss[i] - set.loss[i]).abs() < 1e-9 * mu);
        }
    }
}

/// A short Mooney–Rivlin cylinder (radius 1, height 0.5) bonded to a base
/// and to a top plate (an insert free to move along the axis, force-free)
/// twisted by `twist` radians; `scale` multiplies the isochoric constants.
fn twisted_cylinder(scale: f64, prony: Option<&[[f64; 2]]>, twist: f64) -> Model {
    use olli_mesh::generate::{solid_cylinder, CircleParams};
    let h = 0.5;
    let p = CircleParams { radius: 1.0, divisions: 16, radial_divisions: Some(2), height: h, axial_divisions: 2, ..Default::default() };
    let mesh = solid_cylinder(&p).unwrap();
    let c = [("c10", 0.3 * scale), ("c01", 0.2 * scale), ("bulk_modulus", 500.0)];
    let mut material: Material = registry::material("mooney-rivlin", &c, VolumetricForm::Quadratic).unwrap();
    if let Some(terms) = prony {
        material = material.with_prony(Prony::new(terms).unwrap());
    }
    let mut model = Model::single_region(mesh, Analysis::Solid3d, Arc::new(material), Formulation::Mixed);
    model.output.point_fields = false;
    model.output.nodal_fields = false;
    let free_axially = [false, false, true, false, false, false];
    model.inserts.push(Insert { name: "top".into(), set: "top".into(), reference: [0.0, 0.0, h], free: free_axially });
    model.stages.push(Stage {
        name: "twist".into(),
        controls: IncrementControls { first: 0.5, force_tolerance: 1e-12, ..Default::default() },
        supports: vec![support("bottom", [true; 3])],
        inserts: vec![InsertStage { insert: "top".into(), components: [None, None, None, None, None, Some(InsertDrive::Move(twist))] }],
        ..Default::default()
    });
    model
}

// A turned plate about a preload, with a free component: the linearisation
// of the insert equations (node directions of a rotation, the moment's arm
// term of the preloaded node forces, the free axial motion solved with the
// vibration) must give the tangent of the static torque–twist curve. As in
// the test above, after a hold of 10⁴ × the longest τ at a frequency far
// below every 1/τᵢ the storage stiffness equals the static tangent of the
// relaxed rubber (isochoric constants × g∞: the long-time limit of Simo
// 1987), here dT/dθ at θ = 0.3 rad with the plate free to rise (the
// Poynting effect couples twist and axial motion). The tangent comes from
// central differences of two static runs at θ ± 1e-4 (truncation and Newton
// tolerance below 1e-6 relative); the insert's moment is about its moved
// reference point on the axis.
#[test]
fn preloaded_twist_of_a_plate_free_to_rise_has_the_static_tangent_at_low_frequency() {
    let terms = [[0.3, 0.5], [0.2, 20.0]];
    let (twist, h) = (0.3, 1e-4);
    let torque = |theta: f64| {
        let sol = solve(&twisted_cylinder(0.5, None, theta), &mut Quiet).unwrap();
        assert!(sol.completed(), "{:?}", sol.termination);
        -sol.last().unwrap().inserts[0].moment[2]
    };
    let tangent = (torque(twist + h) - torque(twist - h)) / (2.0 * h);
    let mut model = twisted_cylinder(1.0, Some(&terms), twist);
    let controls = IncrementControls { first: 1e-5, max: 0.25, force_tolerance: 1e-12, ..Default::default() };
    model.stages.push(Stage { name: "hold".into(), duration: Some(2e5), controls, ..Default::default() });
    model.stages.push(Stage {
        name: "vibrate".into(),
        harmonic: Some(Harmonic { frequencies: vec![1e-9] }),
        inserts: vec![InsertStage { insert: "top".into(), components: [None, None, None, None, None, Some(InsertDrive::Move(1e-3))] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let rise = sol.last().unwrap().inserts[0].displacement[2];
    assert!(rise.abs() > 1e-4, "the plate moves axially under the twist (Poynting): {rise}");
    let k = &sol.dynamic[0].stiffness;
    assert_eq!(k.len(), 1, "the free axial component has no force amplitude: not reported");
    let k = &k[0];
    assert!(k.insert && k.component == 5, "{k:?}");
    println!("K′ {:.9e} vs static tangent {tangent:.9e}", k.storage[0]);
    assert!((k.storage[0] - tangent).abs() < 1e-6 * tangent, "K′ {} vs static tangent {tangent}", k.storage[0]);
}
