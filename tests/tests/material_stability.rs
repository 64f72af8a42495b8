//! Drucker stability along the homogeneous paths.
//!
//! Criterion (Drucker 1959, "A definition of stable inelastic material",
//! J. Appl. Mech. 26:101–106, from memory): dτ : dε > 0 for every increment.
//! For an incompressible isotropic W(I1), in principal log strains x = dε
//! with Σx = 0, dτ : dε = 4W' Σλi²xi² + 4W''(Σλi²xi)², positive for all x iff
//!
//! ```text
//! W'(I1) > 0   and   W'(I1) + W''(I1) (I1 − 9/I2) > 0,
//! ```
//!
//! because the largest (Σλi²xi)²/Σλi²xi² over Σxi = 0 is I1 − 9/I2 (a
//! Cauchy–Schwarz projection; general mathematics, also derived in
//! REFERENCES §9). The tests compare the solver's numeric check (eigenvalues
//! of ∂τ/∂ε built from the 3-D tangent, κ = 10⁶ μ) with roots of this closed
//! form found here by bisection, and with a weaker necessary condition: the
//! true stress must rise along each path up to the loss point.

use olli_solver::material::homogeneous::{Mode, Settings};
use olli_solver::material::stability::check_mode;
use olli_verification::material::with_bulk_ratio;

/// Stretches 0.30, 0.31, ..., 4.00.
fn stretches() -> Vec<f64> {
    (0..=370).map(|i| 0.30 + 0.01 * i as f64).collect()
}

/// Incompressible (I1, I2) along each path at stretch λ (simple shear at its
/// principal stretch has the planar invariants).
fn invariants(mode: Mode, l: f64) -> (f64, f64) {
    match mode {
        Mode::Uniaxial => (l * l + 2.0 / l, 2.0 * l + 1.0 / (l * l)),
        Mode::Equibiaxial => (2.0 * l * l + l.powi(-4), l.powi(4) + 2.0 / (l * l)),
        Mode::Planar | Mode::SimpleShear => {
            let i = l * l + 1.0 + 1.0 / (l * l);
            (i, i)
        }
        Mode::Volumetric => (3.0, 3.0),
    }
}

/// Yeoh (1993, Rubber Chem. Technol. 66:754–771): W = Σ Ci0 (I1 − 3)^i.
const YEOH: (f64, f64, f64) = (0.5, -0.05, 0.001);

fn yeoh_margin(i1: f64, i2: f64) -> f64 {
    let (c1, c2, c3) = YEOH;
    let x = i1 - 3.0;
    let w1 = c1 + 2.0 * c2 * x + 3.0 * c3 * x * x;
    let w11 = 2.0 * c2 + 6.0 * c3 * x;
    w1.min(w1 + w11 * (i1 - 9.0 / i2))
}

/// First λ (walking from 1 towards `end`) where the closed-form margin is ≤ 0.
fn closed_form_loss(mode: Mode, end: f64) -> Option<f64> {
    let n = 4000;
    let mut prev = 1.0;
    for i in 1..=n {
        let l = 1.0 + (end - 1.0) * i as f64 / n as f64;
        let (i1, i2) = invariants(mode, l);
        if yeoh_margin(i1, i2) <= 0.0 {
            let (mut a, mut b) = (prev, l);
            for _ in 0..100 {
                let m = 0.5 * (a + b);
                let (i1, i2) = invariants(mode, m);
                if yeoh_margin(i1, i2) > 0.0 {
                    a = m
                } else {
                    b = m
                }
            }
            return Some(b);
        }
        prev = l;
    }
    None
}

/// First λ (from 1 towards `end`) where the closed-form incompressible true
/// stress σ = λP (Rivlin 1948; Treloar 1975) stops rising.
fn yeoh_true_stress_peak(mode: Mode, end: f64) -> Option<f64> {
    let sigma = |l: f64| {
        let (i1, i2) = invariants(mode, l);
        let x = i1 - 3.0;
        let (c1, c2, c3) = YEOH;
        let w1 = c1 + 2.0 * c2 * x + 3.0 * c3 * x * x;
        let _ = i2;
        l * match mode {
            Mode::Uniaxial => 2.0 * (l - l.powi(-2)) * w1,
            Mode::Equibiaxial => 2.0 * (l - l.powi(-5)) * w1,
            _ => 2.0 * (l - l.powi(-3)) * w1,
        }
    };
    let n = 4000;
    let mut prev = sigma(1.0);
    for i in 1..=n {
        let l = 1.0 + (end - 1.0) * i as f64 / n as f64;
        let s = sigma(l);
        if (s - prev) * (end - 1.0) <= 0.0 {
            return Some(l);
        }
        prev = s;
    }
    None
}

#[test]
fn yeoh_negative_c20_drucker_loss_matches_closed_form_condition() {
    let (c10, c20, c30) = YEOH;
    let m = with_bulk_ratio("yeoh", &[("c10", c10), ("c20", c20), ("c30", c30)], 1e6);
    let s = Settings::default();
    let mut tension = Vec::new();
    for mode in [Mode::Uniaxial, Mode::Equibiaxial, Mode::Planar, Mode::SimpleShear] {
        let r = check_mode(&m, mode, &stretches(), &s);
        assert!(r.stopped.is_none(), "{mode:?}: {:?}", r.stopped);
        let got = r.lost_in_tension.unwrap_or_else(|| panic!("{mode:?}: no loss in tension"));
        let want = closed_form_loss(mode, 4.0).unwrap();
        // κ = 10⁶ μ shifts the loss by O(μ/κ); 1e-4 relative covers it.
        assert!((got - want).abs() < 1e-4 * want, "{mode:?} tension: {got} vs closed form {want}");
        // Necessary condition: stability is lost no later than the true-stress peak.
        if let Some(peak) = yeoh_true_stress_peak(mode, 4.0) {
            assert!(got <= peak, "{mode:?}: loss {got} after the stress peak {peak}");
        }
        match (r.lost_in_compression, closed_form_loss(mode, 0.3)) {
            (Some(got), Some(want)) => assert!((got - want).abs() < 1e-4 * want, "{mode:?} compression: {got} vs {want}"),
            (got, want) => assert_eq!(got.is_some(), want.is_some(), "{mode:?} compression: {got:?} vs {want:?}"),
        }
        tension.push(got);
    }
    // Equibiaxial tension fails first, then planar (= simple shear), then uniaxial.
    assert!(tension[1] < tension[2] && tension[2] < tension[0]);
    // Simple shear passes through the planar states (principal stretches λ, 1/λ, 1),
    // at J = 1 exactly rather than J = 1 + O(μ/κ).
    assert!((tension[2] - tension[3]).abs() < 1e-5 * tension[2]);
    // Secondary regression: REFERENCES §9 (COMPUTED there, not published):
    // about 1.55 equibiaxial, 1.98 planar, 2.09 uniaxial.
    for (got, want) in [(tension[1], 1.55), (tension[2], 1.98), (tension[0], 2.09)] {
        assert!((got - want).abs() < 0.006, "{got} vs {want}");
    }
}

// Models with W' > 0 and W'' ≥ 0 (neo-Hookean, eight-chain, Yeoh with
// non-negative constants) and Mooney–Rivlin with C10, C01 ≥ 0 satisfy the
// condition above for every state (the second term is non-negative; for
// Mooney–Rivlin W is a positive combination of convex functions of the log
// strains, general mathematics), so nothing may be reported.
#[test]
fn stable_models_are_reported_stable_in_every_mode() {
    let s = Settings::default();
    for (model, constants) in [
        ("neo-hookean", vec![("shear_modulus", 1.0)]),
        ("mooney-rivlin", vec![("c10", 0.4), ("c01", 0.1)]),
        ("yeoh", vec![("c10", 0.5), ("c20", 0.01), ("c30", 0.001)]),
        ("eight-chain", vec![("shear_modulus", 1.0), ("locking_stretch", 12.0)]),
    ] {
        let m = with_bulk_ratio(model, &constants, 1e4);
        for mode in [Mode::Uniaxial, Mode::Equibiaxial, Mode::Planar, Mode::SimpleShear] {
            let r = check_mode(&m, mode, &stretches(), &s);
            assert!(r.is_stable() && r.stopped.is_none(), "{model} {mode:?}: {r:?}");
        }
    }
}

// Mooney–Rivlin with C01 < 0: the equibiaxial true stress σ = 2(λ² − λ⁻⁴)(C10
// + λ²C01) (Rivlin 1948) peaks and falls, so the material must be reported
// unstable in equibiaxial tension no later than that peak.
#[test]
fn mooney_rivlin_negative_c01_unstable_in_equibiaxial_tension() {
    let (c10, c01) = (0.5, -0.05);
    let m = with_bulk_ratio("mooney-rivlin", &[("c10", c10), ("c01", c01)], 1e6);
    let r = check_mode(&m, Mode::Equibiaxial, &stretches(), &Settings::default());
    let got = r.lost_in_tension.expect("equibiaxial loss");
    // dσ/dλ = 2(2λ + 4λ⁻⁵)(C10 + λ²C01) + 4λC01(λ² − λ⁻⁴); its first root by bisection.
    let dsigma = |l: f64| 2.0 * (2.0 * l + 4.0 * l.powi(-5)) * (c10 + l * l * c01) + 4.0 * l * c01 * (l * l - l.powi(-4));
    let (mut a, mut b) = (1.0, 4.0);
    assert!(dsigma(a) > 0.0 && dsigma(b) < 0.0);
    for _ in 0..100 {
        let mid = 0.5 * (a + b);
        if dsigma(mid) > 0.0 {
            a = mid
        } else {
            b = mid
        }
    }
    // κ = 10⁶ μ may shift the numeric loss by O(μ/κ) relative.
    assert!(got > 1.0 && got <= a * (1.0 + 1e-5), "loss at {got}, stress peak at {a}");
}

// Volumetric laws (general mathematics): the Kirchhoff pressure Jp = J U'(J)
// against ln J has slope κJ(2J − 1) for U = κ/2 (J − 1)², κ for
// U = κ/2 (ln J)² and κJ² for the Simo–Taylor form. So only the quadratic
// law loses Drucker stability, at J = 1/2 (linear stretch 2^(−1/3)).
#[test]
fn quadratic_volumetric_law_loses_stability_at_half_volume() {
    use olli_solver::material::{registry, VolumetricForm};
    let s = Settings::default();
    for form in [VolumetricForm::Quadratic, VolumetricForm::Logarithmic, VolumetricForm::SimoTaylor] {
        let m = registry::material("neo-hookean", &[("shear_modulus", 1.0), ("bulk_modulus", 50.0)], form).unwrap();
        let r = check_mode(&m, Mode::Volumetric, &stretches(), &s);
        assert!(r.lost_in_tension.is_none(), "{form:?}: {r:?}");
        if form == VolumetricForm::Quadratic {
            let got = r.lost_in_compression.expect("quadratic law loses stability");
            // Deviatoric stiffness decouples at a hydrostatic state, so the loss is exactly at J = 1/2.
            assert!((got - 0.5f64.cbrt()).abs() < 1e-9, "{got}");
        } else {
            assert!(r.lost_in_compression.is_none(), "{form:?}: {r:?}");
        }
    }
}
