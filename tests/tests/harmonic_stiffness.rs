//! Harmonic stages: the dynamic stiffness of a part about a preload, from
//! the Prony series of its rubber in the frequency domain (see
//! `olli_solver::driver::harmonic`).

use std::sync::Arc;

use olli_solver::material::{registry, Material, Prony, VolumetricForm};
use olli_solver::model::Harmonic;
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
