//! The least-squares solve: a `levenberg_marquardt::LeastSquaresProblem`
//! over the model's unconstrained parameters ([`super::models`]), run from
//! each starting point; the best result is kept and its statistics computed.

use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt};
use nalgebra::{storage::Owned, DMatrix, DVector, Dyn};

use super::models::FitModel;
use super::{DataPoint, FitError, Settings};
use crate::material::homogeneous::Mode;
use crate::material::incompressible::nominal_stress;
use crate::material::MaterialError;

/// Residual given to the solver at a trial point where the model cannot be
/// evaluated: large, so the step is rejected and shortened, but finite.
const REJECTED: f64 = 1e100;

/// The fitted constants and how well the data determine them.
#[derive(Debug, Clone, PartialEq)]
pub struct FitResult {
    /// The model fitted.
    pub model: FitModel,
    /// Constants in the order of [`FitModel::constant_names`].
    pub constants: Vec<f64>,
    /// Small-strain shear modulus of the fitted model.
    pub shear_modulus: f64,
    /// Weighted sum of squared residuals at the optimum.
    pub objective: f64,
    /// Model stress at each data point (shear modes only, in data order).
    pub predicted: Vec<f64>,
    /// Starting points tried, and how many of them reached a local optimum.
    pub starts: (usize, usize),
    /// Standard errors and correlations, if the data determine the constants.
    pub statistics: Option<Statistics>,
}

/// How well the data determine the constants: the linearised covariance
/// `s² (JᵀJ)⁻¹` of the weighted residuals at the optimum, with
/// `s² = SSR/(n − p)` (e.g. Bates & Watts 1988, "Nonlinear Regression
/// Analysis and Its Applications", §2.3, from memory).
#[derive(Debug, Clone, PartialEq)]
pub struct Statistics {
    /// Standard error of each constant.
    pub standard_errors: Vec<f64>,
    /// Correlation matrix of the constants (entries in [−1, 1]).
    pub correlation: DMatrix<f64>,
    /// Degrees of freedom n − p.
    pub degrees_of_freedom: usize,
}

impl Statistics {
    /// Half-width of the approximate 95 % confidence interval of constant
    /// `i` (1.96 standard errors: the normal approximation).
    pub fn half_width_95(&self, i: usize) -> f64 {
        1.96 * self.standard_errors[i]
    }
}

/// Model stresses at the data, or the first error.
fn predict(model: FitModel, constants: &[f64], data: &[DataPoint]) -> Result<Vec<f64>, MaterialError> {
    let built = model.build(constants)?;
    data.iter().map(|p| nominal_stress(built.as_ref(), p.mode, p.stretch)).collect()
}

/// Weighted residuals at solver parameters `p`, or `None` where the model
/// cannot be evaluated.
fn residuals_at(model: FitModel, p: &[f64], data: &[DataPoint], weights: &[f64]) -> Option<DVector<f64>> {
    let constants = model.constants(p);
    let predicted = predict(model, &constants, data).ok()?;
    let r = DVector::from_iterator(data.len(), predicted.iter().zip(data).zip(weights).map(|((m, d), w)| w * (m - d.nominal_stress)));
    r.iter().all(|v| v.is_finite()).then_some(r)
}

/// Central-difference Jacobian of `f` at `x` with steps `1e-6 (|x_j| + s_j)`;
/// one-sided where one side cannot be evaluated.
fn jacobian_of(f: &dyn Fn(&[f64]) -> Option<DVector<f64>>, x: &[f64], scales: &[f64], rows: usize) -> Option<DMatrix<f64>> {
    let mut j = DMatrix::zeros(rows, x.len());
    for k in 0..x.len() {
        let h = 1e-6 * (x[k].abs() + scales[k]);
        let shifted = |d: f64| {
            let mut y = x.to_vec();
            y[k] += d;
            f(&y)
        };
        let column = match (shifted(h), shifted(-h)) {
            (Some(a), Some(b)) => (a - b) / (2.0 * h),
            (Some(a), None) => (a - f(x)?) / h,
            (None, Some(b)) => (f(x)? - b) / h,
            (None, None) => return None,
        };
        j.set_column(k, &column);
    }
    Some(j)
}

struct Problem<'a> {
    model: FitModel,
    data: &'a [DataPoint],
    weights: &'a [f64],
    scales: Vec<f64>,
    params: DVector<f64>,
}

impl LeastSquaresProblem<f64, Dyn, Dyn> for Problem<'_> {
    type ResidualStorage = Owned<f64, Dyn>;
    type JacobianStorage = Owned<f64, Dyn, Dyn>;
    type ParameterStorage = Owned<f64, Dyn>;

    fn set_params(&mut self, x: &DVector<f64>) {
        self.params.copy_from(x);
    }

    fn params(&self) -> DVector<f64> {
        self.params.clone()
    }

    fn residuals(&self) -> Option<DVector<f64>> {
        Some(
            residuals_at(self.model, self.params.as_slice(), self.data, self.weights)
                .unwrap_or_else(|| DVector::from_element(self.data.len(), REJECTED)),
        )
    }

    fn jacobian(&self) -> Option<DMatrix<f64>> {
        let f = |p: &[f64]| residuals_at(self.model, p, self.data, self.weights);
        jacobian_of(&f, self.params.as_slice(), &self.scales, self.data.len())
    }
}

/// Shear modulus of the neo-Hookean model that best fits `data` (linear
/// least squares): the scale of the starting points.
fn shear_modulus_estimate(data: &[DataPoint], weights: &[f64]) -> f64 {
    let unit = FitModel::NeoHookean.build(&[1.0]).expect("unit neo-Hookean is admissible");
    let (mut num, mut den) = (0.0, 0.0);
    for (p, w) in data.iter().zip(weights) {
        let f = nominal_stress(unit.as_ref(), p.mode, p.stretch).unwrap_or(0.0);
        num += w * w * f * p.nominal_stress;
        den += w * w * f * f;
    }
    let mu = num / den;
    if mu.is_finite() && mu > 0.0 {
        mu
    } else {
        1.0
    }
}

/// Fits `model` to the shear-mode points of `data` (volumetric points are
/// ignored here).
pub fn fit(model: FitModel, data: &[DataPoint], settings: &Settings) -> Result<FitResult, FitError> {
    settings.validate()?;
    let data: Vec<DataPoint> = data.iter().copied().filter(|p| p.mode != Mode::Volumetric).collect();
    if data.is_empty() {
        return Err(FitError::NoShearData);
    }
    let n_constants = model.constant_names().len();
    if data.len() < n_constants {
        return Err(FitError::TooFewPoints { model: model.label(), points: data.len(), constants: n_constants });
    }
    let weights = settings.weighting.weights(&data);
    let mu = shear_modulus_estimate(&data, &weights);
    let scales = model.parameter_scales(mu);
    let solver = LevenbergMarquardt::new()
        .with_ftol(settings.tolerance)
        .with_xtol(settings.tolerance)
        .with_gtol(0.0)
        .with_patience(settings.patience);

    let starts = model.starts(mu);
    let mut best: Option<(f64, Vec<f64>)> = None;
    let mut converged = 0;
    let mut first_error = None;
    for start in &starts {
        let p0 = model.parameters(start);
        if let Err(e) = predict(model, start, &data) {
            first_error.get_or_insert(e);
            continue;
        }
        let problem = Problem { model, data: &data, weights: &weights, scales: scales.clone(), params: DVector::from_vec(p0) };
        let (solved, report) = solver.minimize(problem);
        let Some(r) = residuals_at(model, solved.params.as_slice(), &data, &weights) else { continue };
        let objective = r.norm_squared();
        if report.termination.was_successful()
            || matches!(report.termination, levenberg_marquardt::TerminationReason::NoImprovementPossible(_))
        {
            converged += 1;
        }
        if best.as_ref().is_none_or(|(b, _)| objective < *b) {
            best = Some((objective, solved.params.as_slice().to_vec()));
        }
    }
    let Some((objective, params)) = best else {
        return Err(FitError::NoStart { model: model.label(), source: first_error.unwrap_or(MaterialError::UnknownModel(model.label())) });
    };
    let constants = model.constants(&params);
    let built = model.build(&constants).map_err(|source| FitError::Inadmissible { model: model.label(), source })?;
    let predicted = predict(model, &constants, &data).map_err(|source| FitError::Inadmissible { model: model.label(), source })?;
    let statistics = statistics(model, &constants, &data, &weights, objective, mu);
    Ok(FitResult {
        model,
        shear_modulus: built.shear_modulus(),
        constants,
        objective,
        predicted,
        starts: (starts.len(), converged),
        statistics,
    })
}

/// Standard errors and correlations of the constants (see [`Statistics`]);
/// `None` when there are no spare points or the constants are not
/// determined (singular JᵀJ).
fn statistics(model: FitModel, constants: &[f64], data: &[DataPoint], weights: &[f64], objective: f64, mu: f64) -> Option<Statistics> {
    let (n, p) = (data.len(), constants.len());
    if n <= p {
        return None;
    }
    let f = |c: &[f64]| {
        let predicted = predict(model, c, data).ok()?;
        Some(DVector::from_iterator(n, predicted.iter().zip(data).zip(weights).map(|((m, d), w)| w * (m - d.nominal_stress))))
    };
    let scales: Vec<f64> = constants.iter().map(|_| 1e-3 * mu).collect();
    let j = jacobian_of(&f, constants, &scales, n)?;
    let covariance = (j.transpose() * &j).try_inverse()? * (objective / (n - p) as f64);
    let standard_errors: Vec<f64> = (0..p).map(|i| covariance[(i, i)].max(0.0).sqrt()).collect();
    let correlation = DMatrix::from_fn(p, p, |a, b| {
        let d = standard_errors[a] * standard_errors[b];
        if d > 0.0 {
            covariance[(a, b)] / d
        } else if a == b {
            1.0
        } else {
            0.0
        }
    });
    standard_errors.iter().all(|s| s.is_finite()).then_some(Statistics { standard_errors, correlation, degrees_of_freedom: n - p })
}
