//! How each model is fitted: which constants, how they map to the
//! unconstrained parameters the least-squares solver moves, the constraints
//! that mapping enforces, and the starting points tried.
//!
//! Models whose incompressible stresses are linear in their constants
//! (neo-Hookean, Mooney–Rivlin, Yeoh) are fitted in the constants
//! themselves, so the fit is the linear least-squares solution; the
//! constructor's range checks (positive shear modulus) are applied to the
//! result. The others are fitted in parameters that keep them admissible:
//!
//! * eight-chain: `μ = e^p0`, `λ_L = 1 + e^p1` (μ > 0, λ_L > 1);
//! * Gent: `μ = e^p0`, `J_m = e^p1` (both > 0);
//! * Ogden, per term: `α = p_α`, `μ = α e^p_μ`, so `μ α > 0` for every term
//!   (Ogden's sufficient condition for stability, Ogden 1972).
//!
//! A trial point where the data reach a limit of the model (chain locking,
//! the Gent extensibility limit) is rejected by the solver.

use crate::material::registry;
use crate::material::{IsochoricModel, MaterialError};

/// A model as fitted: its registry name and the number of Ogden terms.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FitModel {
    /// Neo-Hookean: μ.
    NeoHookean,
    /// Mooney–Rivlin: C10, C01.
    MooneyRivlin,
    /// Yeoh: C10, C20, C30.
    Yeoh,
    /// Eight-chain (Arruda–Boyce): μ and locking stretch.
    EightChain,
    /// Gent: μ and extensibility limit.
    Gent,
    /// Ogden with this many terms (1 to [`MAX_OGDEN_TERMS`]).
    Ogden(usize),
}

/// Most Ogden terms `olli fit` offers (more are rarely determined by data).
pub const MAX_OGDEN_TERMS: usize = 4;

/// Names accepted by [`FitModel::from_name`], for messages.
pub const FIT_MODEL_NAMES: &str = "neo-hookean, mooney-rivlin, yeoh, eight-chain, gent, ogden (= ogden-2), ogden-1 … ogden-4";

impl FitModel {
    /// Parses `neo-hookean`, …, `ogden` (two terms) or `ogden-N`.
    pub fn from_name(name: &str) -> Option<FitModel> {
        Some(match name {
            "neo-hookean" => FitModel::NeoHookean,
            "mooney-rivlin" => FitModel::MooneyRivlin,
            "yeoh" => FitModel::Yeoh,
            "eight-chain" => FitModel::EightChain,
            "gent" => FitModel::Gent,
            "ogden" => FitModel::Ogden(2),
            _ => {
                let n: usize = name.strip_prefix("ogden-")?.parse().ok()?;
                if !(1..=MAX_OGDEN_TERMS).contains(&n) {
                    return None;
                }
                FitModel::Ogden(n)
            }
        })
    }

    /// Name for reports: the registry name, with the Ogden term count.
    pub fn label(self) -> String {
        match self {
            FitModel::Ogden(n) => format!("ogden-{n}"),
            _ => self.registry_name().to_string(),
        }
    }

    /// The model's name in material tables.
    pub fn registry_name(self) -> &'static str {
        match self {
            FitModel::NeoHookean => "neo-hookean",
            FitModel::MooneyRivlin => "mooney-rivlin",
            FitModel::Yeoh => "yeoh",
            FitModel::EightChain => "eight-chain",
            FitModel::Gent => "gent",
            FitModel::Ogden(_) => "ogden",
        }
    }

    /// Names of the fitted constants, in order (Ogden: `mu`, `alpha` per term).
    pub fn constant_names(self) -> Vec<&'static str> {
        match self {
            FitModel::NeoHookean => vec!["shear_modulus"],
            FitModel::MooneyRivlin => vec!["c10", "c01"],
            FitModel::Yeoh => vec!["c10", "c20", "c30"],
            FitModel::EightChain => vec!["shear_modulus", "locking_stretch"],
            FitModel::Gent => vec!["shear_modulus", "extensibility_limit"],
            FitModel::Ogden(n) => (0..n).flat_map(|_| ["mu", "alpha"]).collect(),
        }
    }

    /// True if the incompressible stresses are linear in the constants.
    pub fn is_linear(self) -> bool {
        matches!(self, FitModel::NeoHookean | FitModel::MooneyRivlin | FitModel::Yeoh)
    }

    /// True if the energy depends on Ī1 alone (such models cannot follow
    /// the equibiaxial and uniaxial data together when they differ).
    pub fn depends_on_i1_only(self) -> bool {
        matches!(self, FitModel::NeoHookean | FitModel::Yeoh | FitModel::EightChain | FitModel::Gent)
    }

    /// Constants from solver parameters.
    pub fn constants(self, p: &[f64]) -> Vec<f64> {
        match self {
            FitModel::EightChain => vec![p[0].exp(), 1.0 + p[1].exp()],
            FitModel::Gent => vec![p[0].exp(), p[1].exp()],
            FitModel::Ogden(_) => p.chunks(2).flat_map(|t| [t[1] * t[0].exp(), t[1]]).collect(),
            _ => p.to_vec(),
        }
    }

    /// Solver parameters from constants (inverse of [`Self::constants`];
    /// constants outside the admissible range give non-finite parameters).
    pub fn parameters(self, c: &[f64]) -> Vec<f64> {
        match self {
            FitModel::EightChain => vec![c[0].ln(), (c[1] - 1.0).ln()],
            FitModel::Gent => vec![c[0].ln(), c[1].ln()],
            FitModel::Ogden(_) => c.chunks(2).flat_map(|t| [(t[0] / t[1]).ln(), t[1]]).collect(),
            _ => c.to_vec(),
        }
    }

    /// Typical size of each parameter for a material of shear modulus `mu`
    /// (sets finite-difference steps).
    pub fn parameter_scales(self, mu: f64) -> Vec<f64> {
        match self {
            FitModel::NeoHookean | FitModel::MooneyRivlin => vec![mu; self.constant_names().len()],
            FitModel::Yeoh => vec![mu, 0.1 * mu, 0.01 * mu],
            _ => vec![1.0; self.constant_names().len()],
        }
    }

    /// The constants as named pairs for the registry.
    pub fn named(self, constants: &[f64]) -> Vec<(&'static str, f64)> {
        self.constant_names().into_iter().zip(constants.iter().copied()).collect()
    }

    /// Builds the isochoric model from constants.
    pub fn build(self, constants: &[f64]) -> Result<Box<dyn IsochoricModel>, MaterialError> {
        registry::isochoric_model(self.registry_name(), &self.named(constants))
    }

    /// Starting constants for a material whose small-strain shear modulus is
    /// about `mu` (estimated from the data): several, so that a fit that
    /// would stall from one start is tried from others.
    pub fn starts(self, mu: f64) -> Vec<Vec<f64>> {
        match self {
            FitModel::NeoHookean => vec![vec![mu]],
            FitModel::MooneyRivlin => vec![vec![0.5 * mu, 0.0], vec![0.25 * mu, 0.25 * mu]],
            FitModel::Yeoh => vec![vec![0.5 * mu, 0.0, 0.0], vec![0.5 * mu, -0.05 * mu, 0.005 * mu]],
            FitModel::EightChain => [1.5, 2.5, 5.0, 10.0].iter().map(|&l| vec![mu, l]).collect(),
            FitModel::Gent => [3.0, 10.0, 30.0, 100.0].iter().map(|&j| vec![mu, j]).collect(),
            FitModel::Ogden(n) => {
                // Exponent sets seen in rubber fits (common practice); each
                // term starts with an equal share of the shear modulus.
                let sets: &[&[f64]] = match n {
                    1 => &[&[2.0], &[1.0], &[4.0], &[-2.0]],
                    2 => &[&[2.0, -2.0], &[1.5, 5.0], &[1.0, 8.0], &[3.0, -3.0]],
                    3 => &[&[1.3, 5.0, -2.0], &[2.0, 6.0, -2.0], &[1.0, 4.0, -3.0], &[0.5, 3.0, 8.0]],
                    _ => &[&[1.3, 5.0, -2.0, 8.0], &[2.0, -2.0, 4.0, -4.0], &[1.0, 3.0, 6.0, -2.0]],
                };
                sets.iter()
                    .filter(|s| s.len() == n)
                    .map(|alphas| alphas.iter().flat_map(|&a| [2.0 * mu / (n as f64 * a), a]).collect())
                    .collect()
            }
        }
    }
}
