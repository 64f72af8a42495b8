//! Mooney–Rivlin model: `W_iso = C10 (Ī1 − 3) + C01 (Ī2 − 3)`.
//!
//! The two-term model of Mooney (1940) and Rivlin (1948). Its `Ī2` term
//! stiffens equibiaxial states relative to uniaxial ones, where models in
//! `Ī1` alone under-predict equibiaxial stress. Small-strain shear modulus
//! `μ = 2 (C10 + C01)`, which must be positive. A negative `C01` is allowed
//! (fits sometimes give one) but makes the material lose Drucker stability
//! in equibiaxial tension; `olli material` reports where.

use super::error::MaterialError;
use super::{InvariantDerivatives, IsochoricEnergy};

/// The Mooney–Rivlin model, W = C10 (Ī1 − 3) + C01 (Ī2 − 3).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MooneyRivlin {
    /// Coefficient of `Ī1 − 3` (stress units).
    pub c10: f64,
    /// Coefficient of `Ī2 − 3` (stress units).
    pub c01: f64,
}

impl MooneyRivlin {
    /// Checks that both constants are finite and `C10 + C01 > 0`.
    pub fn new(c10: f64, c01: f64) -> Result<Self, MaterialError> {
        for (name, value) in [("c10", c10), ("c01", c01)] {
            if !value.is_finite() {
                return Err(MaterialError::InvalidParameter { name, value, reason: "must be finite" });
            }
        }
        if c10 + c01 <= 0.0 {
            return Err(MaterialError::InvalidCombination {
                model: "mooney-rivlin",
                expression: "c10 + c01",
                value: c10 + c01,
                reason: "the small-strain shear modulus 2 (c10 + c01) must be positive",
            });
        }
        Ok(MooneyRivlin { c10, c01 })
    }
}

impl IsochoricEnergy for MooneyRivlin {
    fn name(&self) -> &'static str {
        "mooney-rivlin"
    }

    fn derivatives(&self, i1b: f64, i2b: f64) -> Result<InvariantDerivatives, MaterialError> {
        Ok(InvariantDerivatives { w: self.c10 * (i1b - 3.0) + self.c01 * (i2b - 3.0), w1: self.c10, w2: self.c01, ..Default::default() })
    }

    fn shear_modulus(&self) -> f64 {
        2.0 * (self.c10 + self.c01)
    }
}
