//! The Langevin function `L(x) = coth x − 1/x`, its derivative, and its
//! inverse evaluated to near machine precision.
//!
//! The eight-chain model needs `β = L⁻¹(λ_ch/√N)` and `dβ/dλ_ch` at every
//! integration point; a rational approximation alone (Cohen 1991, error up to
//! about 5 %) would make the tangent inconsistent with the stress and the
//! stress wrong near locking. So the inverse is found by one Halley step on
//! `L(x) = y` (cubic convergence; L, L' and L'' from one exponential or
//! the series below), seeded by a piecewise polynomial fitted for this
//! module ([`inverse_langevin_seed`], relative error below 1e-9, so the
//! step leaves an error of order 1e-27: the root to rounding). The slope
//! L'(β) the tangent needs and `e^(−2β)` for the energy's logarithm follow
//! from the same evaluation by Taylor's formula ([`inverse_langevin_at`]).
//! Three guards:
//!
//! * small arguments: `coth x − 1/x` cancels catastrophically for small `x`,
//!   so `L` and `L'` use the Laurent series of `coth` (Bernoulli numbers) for
//!   `|x| < 1`;
//! * near `y = 1`: for `x > 25`, `coth x = 1` in double precision, so
//!   `L(x) = 1 − 1/x` exactly and `L⁻¹(y) = 1/(1 − y)` in closed form;
//! * odd symmetry `L⁻¹(−y) = −L⁻¹(y)`: the work is done for `y ≥ 0`.

/// `coth x − 1/x = Σ c_n x^(2n−1)` with `c_n = 2^(2n) B_2n / (2n)!`
/// (Bernoulli numbers). Eighteen terms reach 1e-17 relative at `|x| = 1`,
/// where the terms fall by about `1/π²` each. Digits as computed (30-digit).
#[allow(clippy::excessive_precision)]
const SERIES: [f64; 18] = [
    0.333_333_333_333_333_33,
    -0.022_222_222_222_222_222,
    0.002_116_402_116_402_116_4,
    -0.000_211_640_211_640_211_64,
    2.137_779_915_557_693_3e-5,
    -2.164_404_280_806_397_2e-6,
    2.192_594_785_187_377_8e-7,
    -2.221_460_878_997_968e-8,
    2.250_784_651_680_899_3e-9,
    -2.280_515_120_459_218_3e-10,
    2.310_643_259_900_262_4e-11,
    -2.341_170_681_982_488_4e-12,
    2.372_101_740_023_365_4e-13,
    -2.403_441_533_330_770_6e-14,
    2.435_195_402_918_336_9e-15,
    -2.467_368_804_517_207_5e-16,
    2.499_967_277_122_080_9e-17,
    -2.532_996_435_740_634_8e-18,
];

/// Below this `|x|` the series is used (direct evaluation loses about
/// `3ε/x²` relative there).
const SERIES_LIMIT: f64 = 1.0;

/// Above this `x`, `coth x = 1` to double precision (`2e^(−2x)·x < 1e-19`).
const ASYMPTOTIC_X: f64 = 25.0;

/// Langevin function `L(x) = coth x − 1/x`, odd, `L(0) = 0`, `L(±∞) = ±1`.
pub fn langevin(x: f64) -> f64 {
    let a = x.abs();
    if a < SERIES_LIMIT {
        let x2 = x * x;
        x * SERIES.iter().rev().fold(0.0, |acc, &c| acc * x2 + c)
    } else if a > ASYMPTOTIC_X {
        x.signum() - 1.0 / x
    } else {
        // coth a = 1 + 2e/(1 − e) with e = exp(−2a): the leading part
        // (a − 1)/a is exact-ish and the correction is smaller, so this keeps
        // about one ulp where coth a − 1/a would lose two or three.
        let e = (-2.0 * a).exp();
        x.signum() * ((a - 1.0) / a + 2.0 * e / -(-2.0 * a).exp_m1())
    }
}

/// `L(x)` (bit for bit [`langevin`]) and an `L'(x)` for Newton's steps, from
/// one pair of exponentials in the middle range: `1/sinh² a = 4e/(1 − e)²`
/// with `e = exp(−2a)`, where `1 − e ≥ 0.86` is exact to rounding.
fn langevin_for_newton(x: f64) -> (f64, f64) {
    let a = x.abs();
    if !(SERIES_LIMIT..=ASYMPTOTIC_X).contains(&a) {
        return (langevin(x), langevin_derivative(x));
    }
    let e = (-2.0 * a).exp();
    let m = -(-2.0 * a).exp_m1();
    let value = x.signum() * ((a - 1.0) / a + 2.0 * e / m);
    (value, 1.0 / (x * x) - 4.0 * e / (m * m))
}

/// Derivative `L'(x) = 1/x² − 1/sinh² x`, even, `L'(0) = 1/3`.
pub fn langevin_derivative(x: f64) -> f64 {
    let a = x.abs();
    if a < SERIES_LIMIT {
        let x2 = x * x;
        // d/dx Σ c_n x^(2n−1) = Σ (2n−1) c_n x^(2n−2)
        SERIES.iter().enumerate().rev().fold(0.0, |acc, (n, &c)| acc * x2 + (2 * n + 1) as f64 * c)
    } else if a > ASYMPTOTIC_X {
        1.0 / (x * x)
    } else {
        let s = a.sinh();
        1.0 / (x * x) - 1.0 / (s * s)
    }
}

/// Cohen's (1991) rounded Padé approximation `y (3 − y²) / (1 − y²)` of
/// `L⁻¹(y)` (A. Cohen, Rheol. Acta 30:270–273): maximum relative error about
/// 5 %. Used only as the Newton seed.
pub fn inverse_langevin_cohen(y: f64) -> f64 {
    y * (3.0 - y * y) / (1.0 - y * y)
}

/// Pieces of [`inverse_langevin_seed`]: `y` below `upper`, the centre
/// `mid` and `scale = 2/(width)` mapping the piece onto `t ∈ [−1, 1]`, and
/// the coefficients `a_0 … a_11` of `g(y) ≈ Σ a_k t^k`.
struct SeedPiece {
    upper: f64,
    mid: f64,
    scale: f64,
    coefficients: [f64; 12],
}

/// The seed's three pieces, on `[0, 0.56)`, `[0.56, 0.83)` and
/// `[0.83, 0.96]`. Computed for this module: the degree-11 Chebyshev
/// interpolant of `g(y) = (1 − y) L⁻¹(y) / y` on each piece (values at the
/// twelve Chebyshev points of the first kind from a 40-digit root of
/// `coth x − 1/x = y`, mpmath), rewritten in powers of `t` and rounded to
/// double. Largest relative error of the seed in double arithmetic, on
/// 2001 points a piece: 1.1e-10, 6.8e-10, 1.3e-10 (the test
/// `seed_is_within_1e9_of_the_root` holds it to 1e-9).
const SEED: [SeedPiece; 3] = [
    SeedPiece {
        upper: 0.56,
        mid: 0.28,
        scale: 2.0 / 0.56,
        coefficients: [
            2.2697829620378247,
            -0.6453214427720377,
            0.06515700969635532,
            -0.015537386776674635,
            0.003559606772811779,
            -0.00035989597089787875,
            0.0002797675130897741,
            2.163817605505507e-05,
            2.6732963996324488e-05,
            5.2183283947422244e-06,
            2.136289672695064e-06,
            8.427547063412587e-08,
        ],
    },
    SeedPiece {
        upper: 0.83,
        mid: 0.695,
        scale: 2.0 / 0.27,
        coefficients: [
            1.4246806922585358,
            -0.24023067440280182,
            0.015542059020264802,
            0.003928670770052106,
            0.0011623897028606562,
            -4.718930404238432e-05,
            -0.00020089842024686332,
            -0.00011433772375684733,
            -3.4024181848364144e-05,
            5.276300062350654e-06,
            1.2484056951726591e-05,
            4.526801211519282e-06,
        ],
    },
    SeedPiece {
        upper: f64::INFINITY,
        mid: 0.895,
        scale: 2.0 / 0.13,
        coefficients: [
            1.1173183219100882,
            -0.08114475313694779,
            0.005886917436362727,
            -0.00040963940708720715,
            -1.9507270842069054e-06,
            3.3927566109122845e-05,
            -1.9860956200104322e-05,
            2.138909248564698e-09,
            5.213549205270359e-06,
            -8.629710136054593e-07,
            -8.209552695599326e-07,
            1.7212935522657942e-07,
        ],
    },
];

/// `L⁻¹(y)` for `0 ≤ y ≤ 0.96` to within 1e-9 relative: `y g(y)/(1 − y)`
/// with `g` from the piecewise polynomial [`SEED`] (`g` runs smoothly from
/// 3 at `y = 0` to about 1 at `y = 1`, where `L⁻¹(y) ≈ 1/(1 − y)`). The seed
/// of the Halley step; published rational forms (Cohen 1991, about 5 %;
/// Jedynak 2015, "Approximation of the inverse Langevin function
/// revisited", Rheol. Acta 54:29–39, about 1.5 %, from memory) would need
/// two or three steps, each with an exponential.
pub fn inverse_langevin_seed(y: f64) -> f64 {
    let piece = if y < SEED[0].upper {
        &SEED[0]
    } else if y < SEED[1].upper {
        &SEED[1]
    } else {
        &SEED[2]
    };
    let t = (y - piece.mid) * piece.scale;
    let g = piece.coefficients.iter().rev().fold(0.0, |acc, &a| acc * t + a);
    y * g / (1.0 - y)
}

/// `L(x)`, `L'(x)`, `L''(x)` for `x > 0` from at most one exponential:
/// with `e = exp(−2x)` and `m = 1 − e` (exact to rounding, `e ≤ 0.14` in
/// the middle range), `coth x = 1 + 2e/m` and `1/sinh² x = 4e/m²`. The
/// fourth value is that `e` (NaN outside the middle range, where none is
/// computed).
fn langevin_and_derivatives(x: f64) -> (f64, f64, f64, f64) {
    if x < SERIES_LIMIT {
        let x2 = x * x;
        let (mut v, mut d1, mut d2) = (0.0, 0.0, 0.0);
        for (n, &c) in SERIES.iter().enumerate().rev() {
            // Σ c_n x^(2n−1), Σ (2n−1) c_n x^(2n−2), Σ (2n−1)(2n−2) c_n x^(2n−3) (n from 1).
            let k = (2 * n + 1) as f64;
            v = v * x2 + c;
            d1 = d1 * x2 + k * c;
            if n > 0 {
                d2 = d2 * x2 + k * (k - 1.0) * c;
            }
        }
        (x * v, d1, x * d2, f64::NAN)
    } else if x > ASYMPTOTIC_X {
        (1.0 - 1.0 / x, 1.0 / (x * x), -2.0 / (x * x * x), f64::NAN)
    } else {
        let e = (-2.0 * x).exp();
        let m = 1.0 - e;
        let q = 4.0 * e / (m * m);
        let coth = 1.0 + 2.0 * e / m;
        ((x - 1.0) / x + 2.0 * e / m, 1.0 / (x * x) - q, -2.0 / (x * x * x) + 2.0 * coth * q, e)
    }
}

/// The inverse Langevin function at one argument with what the eight-chain
/// model needs besides: see [`inverse_langevin_at`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct InverseLangevin {
    /// β = L⁻¹(y).
    pub beta: f64,
    /// L'(β), the reciprocal of dβ/dy.
    pub slope: f64,
    /// ln(β / sinh β), the eight-chain energy's logarithm.
    pub log_beta_over_sinh: f64,
}

/// `L⁻¹(y)` for `0 ≤ y < 1` with the slope `L'(β)` at the root: one
/// Halley step from [`inverse_langevin_seed`] (relative error below 1e-9,
/// so the step's error is of order 1e-27 and the root is found to
/// rounding). The slope `L'(β) = L'(x) − L''(x) δ` and `e^(−2β) = e^(−2x)
/// e^(2δ)` come from the same evaluation at the seed `x`, `δ = x − β` the
/// step (the terms left out are of order δ², below 1e-18 relative).
/// Returns `None` for `y` outside `[0, 1)` or NaN.
pub fn inverse_langevin_at(y: f64) -> Option<InverseLangevin> {
    if !(0.0..1.0).contains(&y) {
        return None;
    }
    if y == 0.0 {
        return Some(InverseLangevin { beta: 0.0, slope: SERIES[0], log_beta_over_sinh: 0.0 });
    }
    // L(x) = 1 − 1/x exactly for x > 25, i.e. y > 0.96; 1 − y is exact
    // there, and so is 1 − e^(−2β) = 1.
    if y > 1.0 - 1.0 / ASYMPTOTIC_X {
        let beta = 1.0 / (1.0 - y);
        return Some(InverseLangevin { beta, slope: 1.0 / (beta * beta), log_beta_over_sinh: log_beta_over_sinh(beta, 0.0) });
    }
    let x = inverse_langevin_seed(y);
    let (l, d1, d2, e) = langevin_and_derivatives(x);
    let r = l - y;
    let dx = 2.0 * r * d1 / (2.0 * d1 * d1 - r * d2);
    let beta = x - dx;
    if !(beta > 0.0 && beta.is_finite()) {
        // Not seen (the seed is within 1e-9); the bracketing Newton below is the safe fallback.
        let beta = inverse_langevin_newton(y);
        return Some(InverseLangevin {
            beta,
            slope: langevin_derivative(beta),
            log_beta_over_sinh: log_beta_over_sinh(beta, (-2.0 * beta).exp()),
        });
    }
    let slope = d1 - d2 * dx;
    let log_beta_over_sinh = if beta < SERIES_LIMIT {
        log_beta_over_sinh(beta, f64::NAN)
    } else if e.is_nan() {
        // The seed just below 1 (series) or above 25 (asymptotic), β across.
        log_beta_over_sinh(beta, (-2.0 * beta).exp())
    } else {
        // e^(2δ) to third order: (2δ)⁴/24 is below 1e-34.
        let t = 2.0 * dx;
        log_beta_over_sinh(beta, e * (1.0 + t * (1.0 + t * (0.5 + t / 6.0))))
    };
    Some(InverseLangevin { beta, slope, log_beta_over_sinh })
}

/// `1/(2k+1)!` for `k = 1 … 10`: `sinh β / β − 1 = Σ_{k≥1} β^(2k) / (2k+1)!`.
const INVERSE_ODD_FACTORIALS: [f64; 10] = {
    let mut out = [0.0; 10];
    let (mut factorial, mut k) = (1.0, 1);
    while k <= 10 {
        factorial *= ((2 * k) * (2 * k + 1)) as f64;
        out[k - 1] = 1.0 / factorial;
        k += 1;
    }
    out
};

/// `ln(β / sinh β)` without cancellation at small β or overflow at large
/// β, given `e = exp(−2β)` (used for β ≥ 1).
fn log_beta_over_sinh(beta: f64, e: f64) -> f64 {
    if beta < SERIES_LIMIT {
        // Ten terms of sinh β / β − 1 leave 1/23! ≈ 4e-23 at β = 1.
        let b2 = beta * beta;
        let sum = b2 * INVERSE_ODD_FACTORIALS.iter().rev().fold(0.0, |acc, &c| acc * b2 + c);
        -sum.ln_1p()
    } else {
        // β / sinh β = 2β e^(−β) / (1 − e^(−2β)); 1 − e ≥ 0.86 is exact to rounding.
        (2.0 * beta / (1.0 - e)).ln() - beta
    }
}

/// Inverse Langevin function `L⁻¹(y)` for `−1 < y < 1`, to within a few ulp
/// of the exact value (the residual `|L(x) − y|` is at the rounding level of
/// `y`). Returns `None` for `|y| ≥ 1` or NaN, where it is undefined.
pub fn inverse_langevin(y: f64) -> Option<f64> {
    if y.is_nan() || y.abs() >= 1.0 {
        return None;
    }
    if y < 0.0 {
        return inverse_langevin(-y).map(|x| -x);
    }
    inverse_langevin_at(y).map(|r| r.beta)
}

/// The inverse by Newton's method from Cohen's seed (the former method,
/// two exponentials a step): the fallback of [`inverse_langevin_at`] and
/// the independent reference of its test.
fn inverse_langevin_newton(y: f64) -> f64 {
    if y > 1.0 - 1.0 / ASYMPTOTIC_X {
        return 1.0 / (1.0 - y);
    }
    // L is increasing and concave on x > 0, so from any start Newton lands
    // below the root after one step and then climbs monotonically to it.
    let mut x = inverse_langevin_cohen(y);
    for _ in 0..50 {
        let (value, slope) = langevin_for_newton(x);
        let dx = (value - y) / slope;
        x -= dx;
        if dx.abs() <= 2.0 * f64::EPSILON * x {
            break;
        }
    }
    x
}

#[cfg(test)]
mod tests {
    use super::*;

    // Laurent series of coth: the series branch and the exponential branch
    // must agree across the switch point (continuity, general mathematics).
    #[test]
    fn series_and_direct_branches_agree_at_switch() {
        // Adjacent doubles: the series serves `below`, the exponential form `above`.
        let (below, above) = (SERIES_LIMIT * (1.0 - 0.5 * f64::EPSILON), SERIES_LIMIT);
        let d = langevin(below) - langevin(above);
        assert!(d.abs() < 2e-16, "{} {} {d:e}", langevin(below), langevin(above));
        assert!((langevin_derivative(below) - langevin_derivative(above)).abs() < 1e-15);
    }

    // L'(x) = 1/x² − 1/sinh² x (definition of the derivative): the one-exponential
    // form used in Newton's steps equals the sinh form to rounding, and its
    // value is the Langevin function itself, bit for bit.
    #[test]
    fn newton_slope_equals_the_derivative() {
        for k in 0..=240 {
            let x = 0.5 + 0.11 * k as f64;
            for x in [x, -x] {
                let (value, slope) = langevin_for_newton(x);
                assert_eq!(value, langevin(x), "x = {x}");
                let exact = langevin_derivative(x);
                assert!((slope - exact).abs() <= 1e-13 * exact, "x = {x}: {slope:e} vs {exact:e}");
            }
        }
    }

    // Halley's steps against Newton's from another seed (both solve L(x) = y,
    // L the definition coth x − 1/x): the same root to a few ulp over the
    // whole range, every branch (series, exponential, asymptotic), and the
    // slope L'(β) equal to the derivative at the root.
    #[test]
    fn halley_inverse_matches_newton_and_its_slope_the_derivative() {
        for k in 1..2000 {
            let y = k as f64 / 2000.0;
            let r = inverse_langevin_at(y).unwrap();
            let reference = inverse_langevin_newton(y);
            // The root's condition number is about β (dβ/dy ≈ β² near y = 1).
            let rel = (r.beta - reference).abs() / reference;
            assert!(rel <= 4.0 * f64::EPSILON * reference.max(1.0), "y = {y}: {} vs {reference}", r.beta);
            let exact = langevin_derivative(r.beta);
            assert!((r.slope - exact).abs() <= 1e-13 * exact, "y = {y}: slope {} vs {exact}", r.slope);
            assert!((langevin(r.beta) - y).abs() <= 2.0 * f64::EPSILON, "y = {y}: residual");
        }
    }

    // The seed against the reference inverse (Newton's method from Cohen's
    // seed, converged to 2ε): within 1e-9 relative over its range, the
    // pieces' ends and the small-y limit included (fitted: 1.1e-10,
    // 6.8e-10, 1.3e-10 a piece), so that one Halley step reaches rounding.
    #[test]
    fn seed_is_within_1e9_of_the_root() {
        let ends = [1e-300, 1e-12, 1e-6, 0.56 - 1e-16, 0.56, 0.83 - 1e-16, 0.83, 0.96];
        for y in (1..=96_000).map(|k| k as f64 * 1e-5).chain(ends) {
            let reference = inverse_langevin_newton(y);
            let rel = ((inverse_langevin_seed(y) - reference) / reference).abs();
            assert!(rel < 1e-9, "y = {y}: seed {} vs {reference} ({rel:e})", inverse_langevin_seed(y));
        }
    }

    // Small-argument limit: L⁻¹(y) = 3y + 9/5 y³ + 297/175 y⁵ + 1539/875 y⁷
    // + … (the series of the inverse, reversion of L(x) = x/3 − x³/45 +
    // 2x⁵/945 − …; general mathematics). At y ≤ 1e-3 the next term is below
    // 1e-18 relative, so the root must match the series to rounding.
    #[test]
    fn inverse_matches_its_series_at_small_arguments() {
        for y in [1e-300, 1e-100, 1e-12, 1e-8, 1e-5, 1e-4, 1e-3] {
            let y2 = y * y;
            let series = y * (3.0 + y2 * (9.0 / 5.0 + y2 * (297.0 / 175.0 + y2 * 1539.0 / 875.0)));
            let r = inverse_langevin_at(y).unwrap();
            assert!(((r.beta - series) / series).abs() <= 2.0 * f64::EPSILON, "y = {y}: {} vs {series}", r.beta);
            // L'(β) = 1/3 − β²/15 + 2β⁴/189 − …: the slope to rounding as well.
            let b2 = series * series;
            let slope = 1.0 / 3.0 - b2 / 15.0 + 2.0 * b2 * b2 / 189.0;
            assert!((r.slope - slope).abs() <= 2.0 * f64::EPSILON, "y = {y}: slope {}", r.slope);
            // ln(β / sinh β) = −β²/6 + β⁴/180 − β⁶/2835 + … (coefficients
            // 2^(2n) B_2n / (2n (2n)!), Bernoulli numbers).
            let log = -b2 / 6.0 + b2 * b2 / 180.0 - b2 * b2 * b2 / 2835.0;
            assert!((r.log_beta_over_sinh - log).abs() <= 4.0 * f64::EPSILON * b2, "y = {y}: log {}", r.log_beta_over_sinh);
        }
    }

    // ln(β / sinh β) of the root against the direct formula (definition of
    // sinh; for β ≥ 20, ln β + ln 2 − β, the rest below 1e-17), over β from
    // 3e-4 to 25: the series and the one-logarithm form, and e^(−2β)
    // carried from the seed by Taylor's formula. The direct formula is good
    // to a few ulp absolute, hence the tolerance 4ε (1 + |value|).
    #[test]
    fn log_term_matches_the_direct_formula() {
        for k in 1..=9990 {
            let y = k as f64 * 1e-4;
            let r = inverse_langevin_at(y).unwrap();
            let b = r.beta;
            let direct = if b < 20.0 { (b / b.sinh()).ln() } else { b.ln() + std::f64::consts::LN_2 - b };
            let tolerance = 4.0 * f64::EPSILON * (1.0 + direct.abs());
            assert!((r.log_beta_over_sinh - direct).abs() <= tolerance, "y = {y}: {} vs {direct}", r.log_beta_over_sinh);
        }
    }

    // The second derivative L'' of the one-exponential form against central
    // differences of L' (definition of the derivative; h = 1e-5 gives
    // truncation ~1e-10, rounding ~1e-11).
    #[test]
    fn second_derivative_matches_differences_of_the_first() {
        for k in 1..300 {
            let x = 0.1 * k as f64;
            let (_, _, d2, _) = langevin_and_derivatives(x);
            let h = 1e-5;
            let fd = (langevin_and_derivatives(x + h).1 - langevin_and_derivatives(x - h).1) / (2.0 * h);
            assert!((d2 - fd).abs() <= 1e-8 * (fd.abs() + 1e-3), "x = {x}: {d2} vs {fd}");
        }
    }

    #[test]
    fn inverse_is_odd_and_undefined_at_one() {
        assert_eq!(inverse_langevin(-0.3), inverse_langevin(0.3).map(|x| -x));
        assert_eq!(inverse_langevin(1.0), None);
        assert_eq!(inverse_langevin(f64::NAN), None);
    }
}
