//! Yeoh model: `W_iso = C10 (Ī1 − 3) + C20 (Ī1 − 3)² + C30 (Ī1 − 3)³`.
//!
//! Yeoh (1993), "Some forms of the strain energy function for rubber",
//! Rubber Chem. Technol. 66:754–771: a cubic in `Ī1 − 3` that follows the
//! upturn of filled rubbers; fits usually give `C10 > 0, C20 < 0, C30 > 0`.
//! Small-strain shear modulus `μ = 2 C10`, which must be positive. A strongly
//! negative `C20` makes the material lose Drucker stability at moderate
//! stretch; `olli material` reports where.

use super::error::MaterialError;
use super::{InvariantDerivatives, IsochoricEnergy};

/// The Yeoh model, W = C10 (Ī1 − 3) + C20 (Ī1 − 3)² + C30 (Ī1 − 3)³.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Yeoh {
    /// Coefficient of `Ī1 − 3` (stress units), > 0.
    pub c10: f64,
    /// Coefficient of `(Ī1 − 3)²` (stress units).
    pub c20: f64,
    /// Coefficient of `(Ī1 − 3)³` (stress units).
    pub c30: f64,
}

impl Yeoh {
    /// Checks that the constants are finite and `C10 > 0`.
    pub fn new(c10: f64, c20: f64, c30: f64) -> Result<Self, MaterialError> {
        for (name, value) in [("c20", c20), ("c30", c30)] {
            if !value.is_finite() {
                return Err(MaterialError::InvalidParameter { name, value, reason: "must be finite" });
            }
        }
        if !(c10.is_finite() && c10 > 0.0) {
            return Err(MaterialError::InvalidParameter {
                name: "c10",
                value: c10,
                reason: "must be positive and finite (the shear modulus is 2 c10)",
            });
        }
        Ok(Yeoh { c10, c20, c30 })
    }
}

impl IsochoricEnergy for Yeoh {
    fn name(&self) -> &'static str {
        "yeoh"
    }

    fn derivatives(&self, i1b: f64, _i2b: f64) -> Result<InvariantDerivatives, MaterialError> {
        let x = i1b - 3.0;
        let (c1, c2, c3) = (self.c10, self.c20, self.c30);
        Ok(InvariantDerivatives {
            w: x * (c1 + x * (c2 + x * c3)),
            w1: c1 + x * (2.0 * c2 + 3.0 * c3 * x),
            w11: 2.0 * c2 + 6.0 * c3 * x,
            ..Default::default()
        })
    }

    fn shear_modulus(&self) -> f64 {
        2.0 * self.c10
    }
}
