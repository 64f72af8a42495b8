//! # Fitting material constants to test data
//!
//! Weighted nonlinear least squares of the incompressible homogeneous
//! responses ([`crate::material::incompressible`]) against measured nominal
//! stresses in the shear modes (uniaxial, equibiaxial, planar, simple
//! shear), by the Levenberg–Marquardt method (Moré 1978, "The
//! Levenberg–Marquardt algorithm: implementation and theory", in the
//! `levenberg-marquardt` crate's MINPACK-derived implementation) from
//! several starting points; the bulk modulus separately, by linear least
//! squares on volumetric data ([`bulk_modulus_from_volumetric`]).
//!
//! After the fit: the constants' standard errors and correlations from the
//! Jacobian at the optimum ([`Statistics`]), and the error per mode
//! ([`metrics`]). This module reads no file: the data arrive as
//! [`DataPoint`]s.

pub mod lsq;
pub mod metrics;
pub mod models;

pub use lsq::{fit, FitResult, Statistics};
pub use metrics::{bulk_modulus_from_volumetric, ErrorMetrics};
pub use models::FitModel;

use thiserror::Error;

use crate::material::homogeneous::Mode;
use crate::material::MaterialError;

/// One measured point of a homogeneous test.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DataPoint {
    /// The test.
    pub mode: Mode,
    /// Stretch in the loading direction (simple shear: the larger principal
    /// stretch; volumetric: the linear stretch J^(1/3)).
    pub stretch: f64,
    /// Measured nominal stress (force over undeformed area; simple shear:
    /// the shear stress; volumetric: P11 of F = λI).
    pub nominal_stress: f64,
}

/// How residuals are weighted.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Weighting {
    /// Residual over the measured stress (each point counts by its relative
    /// error); stresses smaller than 1 % of the mode's largest are divided
    /// by that 1 % instead, so points at the origin do not dominate.
    Relative,
    /// Residual in stress units (large-strain points dominate).
    Absolute,
}

impl Weighting {
    /// Weight of each point: 1 for absolute, 1/max(|σ|, 1 % of the mode's
    /// largest |σ|) for relative.
    pub fn weights(self, data: &[DataPoint]) -> Vec<f64> {
        match self {
            Weighting::Absolute => vec![1.0; data.len()],
            Weighting::Relative => data
                .iter()
                .map(|p| {
                    let largest = data.iter().filter(|q| q.mode == p.mode).fold(0.0f64, |a, q| a.max(q.nominal_stress.abs()));
                    1.0 / p.nominal_stress.abs().max(0.01 * largest).max(f64::MIN_POSITIVE)
                })
                .collect(),
        }
    }
}

/// Controls of the least-squares solve.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Settings {
    /// Residual weighting. Default relative.
    pub weighting: Weighting,
    /// Relative tolerance on the parameters and the objective. Default
    /// 1e-12: noise-free data are fitted back to about 1e-10.
    pub tolerance: f64,
    /// Evaluations per start, times (number of parameters + 1). Default 200.
    pub patience: usize,
}

impl Default for Settings {
    fn default() -> Self {
        Settings { weighting: Weighting::Relative, tolerance: 1e-12, patience: 200 }
    }
}

impl Settings {
    /// Checks the settings: a positive finite tolerance below 1, a patience of at least 1.
    pub fn validate(&self) -> Result<(), FitError> {
        let bad = |field: &'static str, value: f64, requirement: &'static str| FitError::BadSettings { field, value, requirement };
        if !(self.tolerance > 0.0 && self.tolerance < 1.0) {
            return Err(bad("tolerance", self.tolerance, "between 0 and 1 (exclusive)"));
        }
        if self.patience == 0 {
            return Err(bad("patience", 0.0, "at least 1"));
        }
        Ok(())
    }

    /// The settings, if [`Self::validate`] accepts them.
    pub fn checked(self) -> Result<Self, FitError> {
        self.validate().map(|_| self)
    }
}

/// Why a fit could not be made.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum FitError {
    /// No point of a shear mode to fit.
    #[error("no uniaxial, equibiaxial, planar or simple-shear data to fit")]
    NoShearData,
    /// Fewer points than constants.
    #[error("{model}: {points} data points cannot determine {constants} constants")]
    TooFewPoints {
        /// The model being fitted.
        model: String,
        /// Data points given to the fit.
        points: usize,
        /// Constants of the model.
        constants: usize,
    },
    /// The model cannot be evaluated at the data from any starting point
    /// (e.g. the data stretch beyond every start's locking stretch).
    #[error("{model}: no starting point reaches all the data ({source})")]
    NoStart {
        /// The model being fitted.
        model: String,
        /// The failure at the last start tried.
        #[source]
        source: MaterialError,
    },
    /// The best constants violate the model's range (e.g. a Yeoh fit with
    /// c10 ≤ 0): the data do not support this model.
    #[error("{model}: the best fit is not an admissible material: {source}")]
    Inadmissible {
        /// The model being fitted.
        model: String,
        /// The range the best constants violate.
        #[source]
        source: MaterialError,
    },
    /// No volumetric data for the bulk modulus.
    #[error("no volumetric data to fit the bulk modulus")]
    NoVolumetricData,
    /// A [`Settings`] value out of range (NaN included).
    #[error("fit settings: `{field}` must be {requirement}, got {value}")]
    BadSettings {
        /// The field of [`Settings`].
        field: &'static str,
        /// The value given.
        value: f64,
        /// What it must be.
        requirement: &'static str,
    },
}
