//! The sweep file as written by the user (`*.sweep.toml`): serde structures
//! with every unknown key rejected. [`super::plan`] checks it against the
//! base job and expands it into variants.

use serde::Deserialize;
use toml::Spanned;

/// A whole sweep file.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SweepFile {
    /// The base job file, relative to the sweep file.
    pub base: Spanned<String>,
    /// How variants are chosen (default `"grid"`).
    pub design: Option<Spanned<DesignKind>>,
    /// Number of variants of a `"latin-hypercube"` design (required there, meaningless elsewhere).
    pub samples: Option<Spanned<i64>>,
    /// Seed of a `"latin-hypercube"` design (default 1): the same seed gives the same variants.
    pub seed: Option<Spanned<i64>>,
    /// Result folder, relative to the sweep file (default `"results/<sweep name>"`; `--output` overrides).
    pub output: Option<String>,
    /// The parameters, in the order of the table's columns.
    #[serde(rename = "parameter")]
    pub parameters: Vec<Spanned<ParameterSpec>>,
}

/// How the variants are chosen from the parameters' values.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
pub enum DesignKind {
    /// Every combination of every parameter's values (a full factorial grid).
    #[serde(rename = "grid")]
    Grid,
    /// The base job, then each parameter through its values with the others at their base values.
    #[serde(rename = "one-at-a-time")]
    OneAtATime,
    /// `samples` variants: each parameter's range cut into `samples` strata of equal probability,
    /// each stratum used once, the pairing shuffled (McKay, Beckman & Conover 1979).
    #[serde(rename = "latin-hypercube")]
    LatinHypercube,
}

impl DesignKind {
    /// The name as written in the sweep file.
    pub fn name(self) -> &'static str {
        match self {
            DesignKind::Grid => "grid",
            DesignKind::OneAtATime => "one-at-a-time",
            DesignKind::LatinHypercube => "latin-hypercube",
        }
    }
}

/// One swept parameter: a key path into the base job and its values, given
/// as exactly one of `values`, `range` or `distribution`.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ParameterSpec {
    /// Dotted path of the key in the base job, e.g. `materials.nr50.shear_modulus`;
    /// entries of `[[...]]` lists by their `name` or by index from 0, array items by index.
    pub key: Spanned<String>,
    /// The values themselves (numbers, or strings / booleans for such keys).
    pub values: Option<Spanned<Vec<toml::Value>>>,
    /// Evenly spaced values from `from` to `to`, both included.
    pub range: Option<Spanned<RangeSpec>>,
    /// A probability distribution (Latin hypercube only).
    pub distribution: Option<Spanned<DistributionSpec>>,
}

/// `range = { from = .., to = .., count = .. }`.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RangeSpec {
    /// First value of the range.
    pub from: f64,
    /// Last value of the range (included).
    pub to: f64,
    /// Number of values (grid and one-at-a-time; a Latin hypercube samples the range uniformly).
    pub count: Option<i64>,
}

/// `distribution = { uniform = { min = .., max = .. } }` or `{ normal = { mean = .., std_dev = .. } }`.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum DistributionSpec {
    /// Every value between `min` and `max` equally likely.
    #[serde(rename = "uniform")]
    Uniform {
        /// Smallest value.
        min: f64,
        /// Largest value.
        max: f64,
    },
    /// Gaussian with `mean` and standard deviation `std_dev` (a tolerance of ±3 `std_dev` covers 99.7 %).
    #[serde(rename = "normal")]
    Normal {
        /// Mean value.
        mean: f64,
        /// Standard deviation (> 0).
        std_dev: f64,
    },
}
