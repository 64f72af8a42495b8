//! Volumetric energy U(J) of the near-incompressible split
//! `W = W_iso(Ī1, Ī2) + U(J)`, with its first and second derivatives.
//!
//! All three laws have U(1) = U'(1) = 0 and U''(1) = κ, so κ is the
//! small-strain bulk modulus whichever law is chosen.

use super::error::MaterialError;

/// Which function of J penalises volume change.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum VolumetricForm {
    /// U = κ/2 (J − 1)²: simplest; finite energy at J → 0.
    Quadratic,
    /// U = κ/2 (ln J)²: symmetric in compression and dilatation on a log scale.
    Logarithmic,
    /// U = κ/4 (J² − 1 − 2 ln J) (Simo–Taylor 1982 form): U → ∞ as J → 0.
    SimoTaylor,
}

impl VolumetricForm {
    /// Name used in material tables (`volumetric = "..."`).
    pub fn name(self) -> &'static str {
        match self {
            VolumetricForm::Quadratic => "quadratic",
            VolumetricForm::Logarithmic => "logarithmic",
            VolumetricForm::SimoTaylor => "simo-taylor",
        }
    }

    /// Parses a name from a material table.
    pub fn from_name(name: &str) -> Option<Self> {
        [Self::Quadratic, Self::Logarithmic, Self::SimoTaylor].into_iter().find(|f| f.name() == name)
    }
}

/// U(J) with its bulk modulus κ.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct VolumetricLaw {
    /// The form of U(J).
    pub form: VolumetricForm,
    /// Small-strain bulk modulus κ (stress units), > 0.
    pub bulk_modulus: f64,
}

impl VolumetricLaw {
    /// Checks κ > 0 and finite.
    pub fn new(form: VolumetricForm, bulk_modulus: f64) -> Result<Self, MaterialError> {
        if !(bulk_modulus.is_finite() && bulk_modulus > 0.0) {
            return Err(MaterialError::InvalidParameter {
                name: "bulk_modulus",
                value: bulk_modulus,
                reason: "must be positive and finite",
            });
        }
        Ok(VolumetricLaw { form, bulk_modulus })
    }

    /// κ from the small-strain shear modulus μ and Poisson's ratio ν:
    /// κ = 2μ(1 + ν) / (3(1 − 2ν)), for −1 < ν < 0.5.
    pub fn bulk_modulus_from_poisson(shear_modulus: f64, poisson: f64) -> Result<f64, MaterialError> {
        if !(poisson.is_finite() && poisson > -1.0 && poisson < 0.5) {
            return Err(MaterialError::InvalidParameter {
                name: "poisson_ratio",
                value: poisson,
                reason: "must lie in (-1, 0.5); use bulk_modulus for a near-incompressible rubber",
            });
        }
        Ok(2.0 * shear_modulus * (1.0 + poisson) / (3.0 * (1.0 - 2.0 * poisson)))
    }

    fn check(j: f64) -> Result<(), MaterialError> {
        if j > 0.0 && j.is_finite() {
            Ok(())
        } else {
            Err(MaterialError::NonPositiveVolume { j })
        }
    }

    /// U(J).
    pub fn energy(&self, j: f64) -> Result<f64, MaterialError> {
        Self::check(j)?;
        let k = self.bulk_modulus;
        Ok(match self.form {
            VolumetricForm::Quadratic => 0.5 * k * (j - 1.0).powi(2),
            VolumetricForm::Logarithmic => 0.5 * k * j.ln().powi(2),
            VolumetricForm::SimoTaylor => 0.25 * k * (j * j - 1.0 - 2.0 * j.ln()),
        })
    }

    /// U'(J): the hydrostatic pressure (positive in tension) at volume ratio J.
    pub fn pressure(&self, j: f64) -> Result<f64, MaterialError> {
        Self::check(j)?;
        let k = self.bulk_modulus;
        Ok(match self.form {
            VolumetricForm::Quadratic => k * (j - 1.0),
            VolumetricForm::Logarithmic => k * j.ln() / j,
            VolumetricForm::SimoTaylor => 0.5 * k * (j - 1.0 / j),
        })
    }

    /// U''(J).
    pub fn pressure_derivative(&self, j: f64) -> Result<f64, MaterialError> {
        Self::check(j)?;
        let k = self.bulk_modulus;
        Ok(match self.form {
            VolumetricForm::Quadratic => k,
            VolumetricForm::Logarithmic => k * (1.0 - j.ln()) / (j * j),
            VolumetricForm::SimoTaylor => 0.5 * k * (1.0 + 1.0 / (j * j)),
        })
    }

    /// Inverse of U'(J) = p near J = 1 (Newton on the monotone branch): the
    /// volume ratio reached under hydrostatic pressure `p`. Used by the
    /// homogeneous volumetric response.
    pub fn volume_ratio_at_pressure(&self, p: f64) -> Result<f64, MaterialError> {
        let mut j = (1.0 + p / self.bulk_modulus).max(0.05);
        for _ in 0..100 {
            let r = self.pressure(j)? - p;
            let dj = r / self.pressure_derivative(j)?;
            let next = (j - dj).max(0.5 * j);
            if (next - j).abs() <= 1e-15 * j {
                return Ok(next);
            }
            j = next;
        }
        Ok(j)
    }
}
