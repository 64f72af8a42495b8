//! The inverse Langevin function used by the eight-chain model.

use olli_solver::material::langevin::{inverse_langevin, inverse_langevin_cohen, langevin, langevin_derivative};

/// `L(x) = (x cosh x − sinh x) / (x sinh x)` with the numerator summed as
/// its Taylor series `Σ_{k≥1} 2k x^(2k+1) / (2k+1)!` — a second, independent
/// evaluation (general mathematics) free of the cancellation in `coth x − 1/x`.
fn langevin_independent(x: f64) -> f64 {
    if x > 2.0 {
        return 1.0 / x.tanh() - 1.0 / x;
    }
    let (mut num, mut term) = (0.0, x);
    for k in 1..40 {
        term *= x * x / ((2 * k) as f64 * (2 * k + 1) as f64);
        num += 2.0 * k as f64 * term;
    }
    num / (x * x.sinh())
}

// Residual check (general mathematics): x = L⁻¹(y) must satisfy L(x) = y to
// the rounding of y. The residual is evaluated with both the solver's L and
// an independent evaluation; a few ulp of y (here 3ε·max(y, 1e-300) plus the
// independent evaluation's own round-off, 1e-15 relative) is machine precision.
#[test]
fn inverse_langevin_residual_is_at_machine_precision() {
    let n = 20_000;
    let mut worst: f64 = 0.0;
    for i in 0..=n {
        // Dense in [0, 0.999999], with extra points towards 1 and 0.
        let s = i as f64 / n as f64;
        for y in [s * 0.999_999, 0.999 + s * 0.000_999, s * 1e-3] {
            let x = inverse_langevin(y).unwrap();
            assert!(x.is_finite() && x >= 0.0);
            let r_own = (langevin(x) - y).abs();
            worst = worst.max(r_own / (f64::EPSILON * y.max(1e-300)));
            assert!(r_own <= 3.0 * f64::EPSILON * y.max(1e-300), "y = {y}: own residual {r_own:e}");
            if x > 1e-3 {
                let r_ind = (langevin_independent(x) - y).abs();
                assert!(r_ind <= 1e-15 * y, "y = {y}: independent residual {r_ind:e}");
            }
            // Odd symmetry L⁻¹(−y) = −L⁻¹(y).
            assert_eq!(inverse_langevin(-y), Some(-x));
        }
    }
    eprintln!("largest residual: {worst:.2} ε·y");
}

// Reference values: 40-digit Newton solutions of coth x − 1/x = y for the
// double nearest each y, computed with mpmath (general mathematics; the
// values to 0.999 also appear in REFERENCES §8). Tolerance 1e-14 relative:
// the condition number of L⁻¹ times ε bounds what any double method can reach.
#[allow(clippy::excessive_precision)] // all digits of the 40-digit computation, as printed
const REFERENCE: [(f64, f64); 12] = [
    (1e-8, 3.000_000_000_000_000_242_8e-8),
    (1e-4, 3.000_000_018_000_000_313_5e-4),
    (0.01, 0.030_001_800_169_731_876_782),
    (0.1, 0.301_817_149_206_338_114_76),
    (0.3, 0.953_149_472_857_405_908_95),
    (0.5, 1.796_755_984_723_713_041_1),
    (0.8, 4.997_720_566_907_422_485),
    (0.9, 9.999_999_587_768_954_007_8),
    (0.95, 19.999_999_999_999_978_838),
    (0.99, 99.999_999_999_999_911_182),
    (0.999, 999.999_999_999_999_111_82),
    (0.999_999, 999_999.999_971_244_335_48),
];

#[test]
fn inverse_langevin_matches_40_digit_values() {
    for (y, x_ref) in REFERENCE {
        let x = inverse_langevin(y).unwrap();
        assert!(((x - x_ref) / x_ref).abs() < 1e-14, "y = {y}: {x} vs {x_ref}");
    }
    assert_eq!(inverse_langevin(0.0), Some(0.0));
    assert_eq!(inverse_langevin(1.0), None);
    assert_eq!(inverse_langevin(-1.5), None);
}

// Cohen (1991), "A Padé approximant to the inverse Langevin function",
// Rheol. Acta 30:270–273: the rounded form y(3 − y²)/(1 − y²) has a maximum
// relative error of about 5 % (4.94 % at y ≈ 0.80, recomputed in REFERENCES
// §8). Our values must (a) reproduce that error when used as the reference
// (±0.01 percentage points, so our function is the true inverse) and (b) be
// many orders of magnitude closer than that to the 40-digit values.
#[test]
fn inverse_langevin_far_more_accurate_than_cohen_pade() {
    let mut worst: f64 = 0.0;
    let mut at = 0.0;
    for i in 1..100_000 {
        let y = i as f64 / 100_000.0;
        let x = inverse_langevin(y).unwrap();
        let e = ((inverse_langevin_cohen(y) - x) / x).abs();
        if e > worst {
            worst = e;
            at = y;
        }
    }
    assert!((worst - 0.0494).abs() < 1e-4, "Cohen max error {worst} at y = {at}");
    assert!((at - 0.80).abs() < 0.02, "Cohen max error at y = {at}");
    for (y, x_ref) in REFERENCE {
        let ours = ((inverse_langevin(y).unwrap() - x_ref) / x_ref).abs();
        assert!(ours < 1e-10 * worst, "y = {y}: our error {ours:e} vs Cohen's maximum {worst}");
    }
}

// L'(x) against a central difference of the independent L (general
// mathematics): step 1e-5, truncation ~1e-11, round-off ~1e-11.
#[test]
fn langevin_derivative_matches_finite_difference() {
    for x in [0.01, 0.3, 0.99, 1.0, 1.01, 2.5, 10.0, 24.9, 25.1, 60.0] {
        let h = 1e-5 * x;
        let fd = (langevin_independent(x + h) - langevin_independent(x - h)) / (2.0 * h);
        let d = langevin_derivative(x);
        assert!(((fd - d) / d).abs() < 1e-8, "x = {x}: {d} vs {fd}");
    }
}
