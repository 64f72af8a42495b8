//! How well a fit follows the data: R² and RMS errors, absolute and
//! relative, per mode and overall; and the bulk modulus from volumetric data.

use super::{DataPoint, FitError, Weighting};
use crate::material::volumetric::{VolumetricForm, VolumetricLaw};

/// Errors of predictions against measurements.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ErrorMetrics {
    /// Number of points.
    pub points: usize,
    /// Coefficient of determination 1 − SS_res/SS_tot (1: exact; can be
    /// negative for a fit worse than the mean).
    pub r_squared: f64,
    /// Root-mean-square error (stress units).
    pub rms: f64,
    /// Root-mean-square relative error, with the floor of
    /// [`Weighting::Relative`] (dimensionless).
    pub rms_relative: f64,
}

impl ErrorMetrics {
    /// Metrics of `predicted` against the measured stresses of `data`.
    pub fn of(data: &[DataPoint], predicted: &[f64]) -> ErrorMetrics {
        let n = data.len().max(1) as f64;
        let weights = Weighting::Relative.weights(data);
        let mean = data.iter().map(|p| p.nominal_stress).sum::<f64>() / n;
        let (mut ss_res, mut ss_tot, mut ss_rel) = (0.0, 0.0, 0.0);
        for ((p, &m), w) in data.iter().zip(predicted).zip(weights) {
            let r = m - p.nominal_stress;
            ss_res += r * r;
            ss_tot += (p.nominal_stress - mean).powi(2);
            ss_rel += (w * r).powi(2);
        }
        ErrorMetrics {
            points: data.len(),
            r_squared: if ss_tot > 0.0 { 1.0 - ss_res / ss_tot } else { f64::NAN },
            rms: (ss_res / n).sqrt(),
            rms_relative: (ss_rel / n).sqrt(),
        }
    }
}

/// The bulk modulus κ of the volumetric law `form` that best fits
/// volumetric data (F = λI, nominal stress P11 = λ² p with the pressure
/// p = U'(J), J = λ³), by weighted linear least squares: U'(J) = κ f(J).
/// Returns κ and the predicted nominal stresses.
pub fn bulk_modulus_from_volumetric(data: &[DataPoint], form: VolumetricForm, weighting: Weighting) -> Result<(f64, Vec<f64>), FitError> {
    if data.is_empty() {
        return Err(FitError::NoVolumetricData);
    }
    let unit = VolumetricLaw { form, bulk_modulus: 1.0 };
    let weights = weighting.weights(data);
    // Nominal stress per unit κ at each point.
    let shape: Vec<f64> = data.iter().map(|p| p.stretch * p.stretch * unit.pressure(p.stretch.powi(3)).unwrap_or(f64::NAN)).collect();
    let (mut num, mut den) = (0.0, 0.0);
    for ((p, f), w) in data.iter().zip(&shape).zip(weights) {
        num += w * w * f * p.nominal_stress;
        den += w * w * f * f;
    }
    let kappa = num / den;
    Ok((kappa, shape.iter().map(|f| kappa * f).collect()))
}
