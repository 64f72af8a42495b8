//! Gent model (Gent 1996, "A new constitutive relation for rubber", Rubber
//! Chem. Technol. 69:59–61): a limiting-chain-extensibility model in `Ī1`
//! alone,
//!
//! ```text
//! W_iso = −(μ J_m / 2) ln(1 − (Ī1 − 3)/J_m)
//! ∂W/∂Ī1 = (μ/2) / (1 − x/J_m),   ∂²W/∂Ī1² = (μ/2) / (J_m (1 − x/J_m)²),   x = Ī1 − 3
//! ```
//!
//! μ is the small-strain shear modulus and `J_m` the limiting value of
//! `Ī1 − 3` (key `extensibility_limit`), where the stress becomes unbounded.
//! As `J_m → ∞` the model tends to neo-Hookean. At `Ī1 − 3 ≥ J_m` the energy
//! is undefined and the model returns [`MaterialError::ExtensibilityLimit`].

use super::error::MaterialError;
use super::{InvariantDerivatives, IsochoricEnergy};

/// The Gent model.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Gent {
    /// Small-strain shear modulus μ (stress units), > 0.
    pub shear_modulus: f64,
    /// Limiting value J_m of `Ī1 − 3` (dimensionless), > 0.
    pub extensibility_limit: f64,
}

impl Gent {
    /// Checks μ > 0 and J_m > 0 (both finite).
    pub fn new(shear_modulus: f64, extensibility_limit: f64) -> Result<Self, MaterialError> {
        if !(shear_modulus.is_finite() && shear_modulus > 0.0) {
            return Err(MaterialError::InvalidParameter {
                name: "shear_modulus",
                value: shear_modulus,
                reason: "must be positive and finite",
            });
        }
        if !(extensibility_limit.is_finite() && extensibility_limit > 0.0) {
            return Err(MaterialError::InvalidParameter {
                name: "extensibility_limit",
                value: extensibility_limit,
                reason: "must be positive and finite (the limiting value of Ī1 − 3)",
            });
        }
        Ok(Gent { shear_modulus, extensibility_limit })
    }
}

impl IsochoricEnergy for Gent {
    fn name(&self) -> &'static str {
        "gent"
    }

    fn derivatives(&self, i1b: f64, _i2b: f64) -> Result<InvariantDerivatives, MaterialError> {
        let jm = self.extensibility_limit;
        // Ī1 ≥ 3 for every real deformation; below it only by round-off.
        let x = (i1b - 3.0).max(0.0);
        let free = 1.0 - x / jm;
        if !(free > 0.0) {
            return Err(MaterialError::ExtensibilityLimit { i1_minus_3: x, limit: jm });
        }
        let half_mu = 0.5 * self.shear_modulus;
        Ok(InvariantDerivatives {
            w: -half_mu * jm * free.ln(),
            w1: half_mu / free,
            w11: half_mu / (jm * free * free),
            ..Default::default()
        })
    }

    fn shear_modulus(&self) -> f64 {
        self.shear_modulus
    }
}
