//! Eight-chain model (Arruda & Boyce 1993, "A three-dimensional constitutive
//! model for the large stretch behavior of rubber elastic materials",
//! J. Mech. Phys. Solids 41:389–412).
//!
//! With chain stretch `λ_ch = √(Ī1/3)`, locking stretch `λ_L = √N` and
//! `β = L⁻¹(λ_ch/√N)` (inverse Langevin function, see [`super::langevin`]):
//!
//! ```text
//! W_iso = μ_r N [ (λ_ch/√N) β + ln(β / sinh β) ] − W0
//! ∂W/∂Ī1 = μ_r √N β / (6 λ_ch)
//! ∂²W/∂Ī1² = μ_r √N / (36 λ_ch) · (β'/λ_ch − β/λ_ch²),  β' = dβ/dλ_ch = 1 / (√N L'(β))
//! ```
//!
//! `W0` makes `W_iso = 0` at `Ī1 = 3`. The network modulus is
//! `μ_r = 3μ / (√N L⁻¹(1/√N))`, so that `μ` is *exactly* the small-strain
//! shear modulus (`2 ∂W/∂Ī1 = μ` at `Ī1 = 3`), not its truncated-series
//! estimate. At `λ_ch ≥ λ_L` the energy is undefined and the model returns
//! [`MaterialError::ChainLocking`].

use super::error::MaterialError;
use super::langevin::inverse_langevin_at;
use super::{InvariantDerivatives, IsochoricEnergy};

/// The eight-chain (Arruda–Boyce) model, with the inverse Langevin function.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EightChain {
    /// Small-strain shear modulus μ (stress units), > 0.
    pub shear_modulus: f64,
    /// Locking stretch λ_L = √N (dimensionless), > 1.
    pub locking_stretch: f64,
    /// Network modulus μ_r = 3μ / (√N L⁻¹(1/√N)).
    network_modulus: f64,
    /// Energy offset W0 so that W_iso(Ī1 = 3) = 0.
    offset: f64,
}

impl EightChain {
    /// Checks μ > 0 and λ_L > 1 (both finite).
    pub fn new(shear_modulus: f64, locking_stretch: f64) -> Result<Self, MaterialError> {
        if !(shear_modulus.is_finite() && shear_modulus > 0.0) {
            return Err(MaterialError::InvalidParameter {
                name: "shear_modulus",
                value: shear_modulus,
                reason: "must be positive and finite",
            });
        }
        if !(locking_stretch.is_finite() && locking_stretch > 1.0) {
            return Err(MaterialError::InvalidParameter {
                name: "locking_stretch",
                value: locking_stretch,
                reason: "must be greater than 1 and finite",
            });
        }
        let y0 = 1.0 / locking_stretch;
        let root0 = inverse_langevin_at(y0).ok_or(MaterialError::InvalidParameter {
            name: "locking_stretch",
            value: locking_stretch,
            reason: "must be greater than 1 and finite",
        })?;
        let beta0 = root0.beta;
        let network_modulus = 3.0 * shear_modulus / (locking_stretch * beta0);
        let n = locking_stretch * locking_stretch;
        let offset = network_modulus * n * (y0 * beta0 + root0.log_beta_over_sinh);
        Ok(EightChain { shear_modulus, locking_stretch, network_modulus, offset })
    }

    /// Network modulus μ_r (stress units).
    pub fn network_modulus(&self) -> f64 {
        self.network_modulus
    }
}

impl IsochoricEnergy for EightChain {
    fn name(&self) -> &'static str {
        "eight-chain"
    }

    fn derivatives(&self, i1b: f64, _i2b: f64) -> Result<InvariantDerivatives, MaterialError> {
        // Ī1 ≥ 3 for every real deformation; below it only by round-off. A NaN
        // invariant is treated as unbounded stretch so it fails as locking.
        let i1b = if i1b.is_nan() { f64::INFINITY } else { i1b.max(3.0) };
        let lam = (i1b / 3.0).sqrt();
        let sqrt_n = self.locking_stretch;
        let locked = MaterialError::ChainLocking { chain_stretch: lam, locking_stretch: sqrt_n };
        if lam.is_nan() || lam >= sqrt_n {
            return Err(locked);
        }
        let y = lam / sqrt_n;
        let root = inverse_langevin_at(y).ok_or(locked)?;
        let beta = root.beta;
        let mu_r = self.network_modulus;
        let w = mu_r * sqrt_n * sqrt_n * (y * beta + root.log_beta_over_sinh) - self.offset;
        let dbeta = 1.0 / (sqrt_n * root.slope);
        let w1 = mu_r * sqrt_n * beta / (6.0 * lam);
        let w11 = mu_r * sqrt_n / (36.0 * lam) * (dbeta / lam - beta / (lam * lam));
        Ok(InvariantDerivatives { w, w1, w11, ..Default::default() })
    }

    fn shear_modulus(&self) -> f64 {
        self.shear_modulus
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::material::langevin::{langevin, langevin_derivative};

    // The energy must be the integral of ∂W/∂Ī1 from the reference state
    // (fundamental theorem of calculus): composite Simpson's rule on W1 with
    // 2000 panels has error ~1e-13 here, so 1e-10 relative is safe. Covers
    // both branches of ln(β/sinh β) and the offset W0 (W(3) = 0).
    #[test]
    fn energy_is_the_integral_of_w1_from_the_reference_state() {
        for (mu, lock) in [(0.8, 1.3), (0.8, 2.5), (1.2, 40.0)] {
            let m = EightChain::new(mu, lock).unwrap();
            assert!(m.derivatives(3.0, 3.0).unwrap().w.abs() < 1e-14 * mu);
            let i1_end = 3.0 * (0.97 * lock).powi(2);
            let n = 2000;
            let h = (i1_end - 3.0) / n as f64;
            let w1 = |i: usize| m.derivatives(3.0 + h * i as f64, 3.0).unwrap().w1;
            let simpson: f64 = (0..=n)
                .map(|i| {
                    w1(i)
                        * if i == 0 || i == n {
                            1.0
                        } else if i % 2 == 1 {
                            4.0
                        } else {
                            2.0
                        }
                })
                .sum::<f64>()
                * h
                / 3.0;
            let w = m.derivatives(i1_end, 3.0).unwrap().w;
            assert!(((w - simpson) / w).abs() < 1e-10, "μ={mu} λL={lock}: W = {w}, ∫W1 = {simpson}");
        }
    }

    /// The root of `L(x) = y` by bisection to the last bit: on
    /// `1 − L(x) = 1/x − 2e^(−2x)/(1 − e^(−2x))` for `y > 0.5`, free of
    /// cancellation (near locking the root is conditioned by `1 − y`, exact
    /// there), and on [`langevin`] below. Slow, and independent of the
    /// seed and the Halley step under test.
    fn tight_inverse(y: f64) -> f64 {
        let below = |x: f64| {
            if y > 0.5 {
                let e = (-2.0 * x).exp();
                1.0 / x - 2.0 * e / (1.0 - e) > 1.0 - y
            } else {
                langevin(x) < y
            }
        };
        let (mut lo, mut hi) = (0.0, 2.0 / (1.0 - y) + 1.0);
        loop {
            let mid = 0.5 * (lo + hi);
            if mid <= lo || mid >= hi {
                return mid;
            }
            if below(mid) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
    }

    // Stress and tangent coefficients against the same formulas (Arruda &
    // Boyce 1993, see the module notes) with β from the tight bisection:
    // ∂W/∂Ī1 to 1e-12 relative, ∂²W/∂Ī1² to 1e-12 of its larger term
    // (its two terms cancel at small stretch), W to 1e-12 of its terms'
    // size, from the reference state (Ī1 = 3) to within 1e-9 of the
    // locking stretch, for locking stretches whose chain stretches meet
    // every branch of the inverse: the series (λ_L = 1e4: y ≤ 1e-4 up to
    // y ≈ 0.3), each piece of the seed, and the closed form past y = 0.96.
    #[test]
    fn stress_matches_a_tightly_converged_inverse_langevin() {
        for lock in [1.05, 1.3, 2.2, 5.0, 40.0, 1e4] {
            let m = EightChain::new(0.8, lock).unwrap();
            let (mu_r, n) = (m.network_modulus(), lock * lock);
            let gap0 = 1.0 - 1.0 / lock;
            let count = 3000;
            for k in 0..=count {
                // 1 − y from 1 − 1/λ_L down to 1e-9, geometrically.
                let gap = gap0 * (1e-9 / gap0).powf(k as f64 / count as f64);
                let i1 = 3.0 * ((1.0 - gap) * lock).powi(2);
                let d = m.derivatives(i1, 3.0).unwrap();
                let lam = (i1.max(3.0) / 3.0).sqrt();
                let y = lam / lock;
                let beta = tight_inverse(y);
                let w1 = mu_r * lock * beta / (6.0 * lam);
                assert!(((d.w1 - w1) / w1).abs() <= 1e-12, "λL = {lock}, y = {y}: W1 {} vs {w1}", d.w1);
                let dbeta = 1.0 / (lock * langevin_derivative(beta));
                let (t1, t2) = (mu_r * lock / (36.0 * lam) * dbeta / lam, mu_r * lock / (36.0 * lam) * beta / (lam * lam));
                assert!((d.w11 - (t1 - t2)).abs() <= 1e-12 * t1, "λL = {lock}, y = {y}: W11 {} vs {}", d.w11, t1 - t2);
                let log = if beta < 0.5 {
                    // −ln(sinh β / β) from the Taylor series of sinh, term by term.
                    let (mut term, mut sum) = (1.0, 0.0);
                    for k in 1..30 {
                        term *= beta * beta / ((2 * k) as f64 * (2 * k + 1) as f64);
                        sum += term;
                    }
                    -f64::ln_1p(sum)
                } else if beta < 20.0 {
                    (beta / beta.sinh()).ln()
                } else {
                    beta.ln() + std::f64::consts::LN_2 - beta
                };
                let w = mu_r * n * (y * beta + log) - m.offset;
                let size = mu_r * n * (y * beta + log.abs()) + m.offset.abs();
                assert!((d.w - w).abs() <= 1e-12 * size, "λL = {lock}, y = {y}: W {} vs {w}", d.w);
            }
        }
    }

    #[test]
    fn locking_is_an_error_not_nan() {
        let m = EightChain::new(1.0, 2.0).unwrap();
        assert!(matches!(m.derivatives(12.0, 3.0), Err(MaterialError::ChainLocking { .. })));
        assert!(matches!(m.derivatives(f64::NAN, 3.0), Err(MaterialError::ChainLocking { .. })));
        assert!(EightChain::new(1.0, 1.0).is_err() && EightChain::new(0.0, 2.0).is_err());
    }
}
