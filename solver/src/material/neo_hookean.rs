//! Neo-Hookean model: `W_iso = μ/2 (Ī1 − 3)`.
//!
//! The simplest Gaussian-network model (Treloar 1943); μ is the small-strain
//! shear modulus (μ = 2 C10).

use super::error::MaterialError;
use super::{InvariantDerivatives, IsochoricEnergy};

/// The neo-Hookean model, W = μ/2 (Ī1 − 3).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NeoHookean {
    /// Small-strain shear modulus μ (stress units), > 0.
    pub shear_modulus: f64,
}

impl NeoHookean {
    /// A neo-Hookean law; refuses a shear modulus that is not finite and positive.
    pub fn new(shear_modulus: f64) -> Result<Self, MaterialError> {
        if !(shear_modulus.is_finite() && shear_modulus > 0.0) {
            return Err(MaterialError::InvalidParameter {
                name: "shear_modulus",
                value: shear_modulus,
                reason: "must be positive and finite",
            });
        }
        Ok(NeoHookean { shear_modulus })
    }
}

impl IsochoricEnergy for NeoHookean {
    fn name(&self) -> &'static str {
        "neo-hookean"
    }

    fn derivatives(&self, i1b: f64, _i2b: f64) -> Result<InvariantDerivatives, MaterialError> {
        let c10 = 0.5 * self.shear_modulus;
        Ok(InvariantDerivatives { w: c10 * (i1b - 3.0), w1: c10, ..Default::default() })
    }

    fn shear_modulus(&self) -> f64 {
        self.shear_modulus
    }
}
