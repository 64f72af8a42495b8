//! Errors raised by constitutive models: bad parameters at construction, and
//! states a model cannot evaluate (inverted volume, chains at their locking
//! stretch) during a solve, where they trigger an increment cutback.

use thiserror::Error;

/// Why a material could not be built or evaluated.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum MaterialError {
    /// A constant is out of its physical range.
    #[error("material parameter `{name}` = {value}: {reason}")]
    InvalidParameter {
        /// The constant, as named in job files.
        name: &'static str,
        /// The value given.
        value: f64,
        /// The admissible range, in words.
        reason: &'static str,
    },
    /// Constants that are each admissible but not together (e.g. a
    /// Mooney–Rivlin pair whose shear modulus 2 (c10 + c01) is not positive).
    #[error("material model `{model}`: {expression} = {value}: {reason}")]
    InvalidCombination {
        /// The model name, e.g. `mooney-rivlin`.
        model: &'static str,
        /// The combination checked, e.g. `2 (c10 + c01)`.
        expression: &'static str,
        /// Its value.
        value: f64,
        /// The admissible range, in words.
        reason: &'static str,
    },
    /// The same constant, or two constants that exclude each other, given twice.
    #[error("material model `{model}`: give `{name}` or `{other}`, not both")]
    ConflictingParameters {
        /// The model name, e.g. `mooney-rivlin`.
        model: &'static str,
        /// One constant given.
        name: &'static str,
        /// The constant it excludes, also given.
        other: &'static str,
    },
    /// The same constant given twice.
    #[error("material model `{model}`: parameter `{name}` is given more than once")]
    DuplicateParameter {
        /// The model name, e.g. `mooney-rivlin`.
        model: &'static str,
        /// The constant given twice.
        name: &'static str,
    },
    /// A required constant was not given.
    #[error("material model `{model}` needs parameter `{name}`")]
    MissingParameter {
        /// The model name, e.g. `mooney-rivlin`.
        model: &'static str,
        /// The constant needed.
        name: &'static str,
    },
    /// A constant was given that the model does not use.
    #[error("material model `{model}` does not take parameter `{name}` (it takes: {allowed})")]
    UnexpectedParameter {
        /// The model name, e.g. `mooney-rivlin`.
        model: &'static str,
        /// The constant given.
        name: String,
        /// The constants the model takes, comma-separated.
        allowed: String,
    },
    /// The model name is not one olli knows.
    #[error("unknown material model `{0}` (known: neo-hookean, mooney-rivlin, yeoh, eight-chain, gent, ogden)")]
    UnknownModel(String),
    /// The volume ratio J = det F is not positive: the material is inverted.
    #[error("volume ratio J = {j:.3e} is not positive (inverted material)")]
    NonPositiveVolume {
        /// The volume ratio reached.
        j: f64,
    },
    /// Gent: Ī1 − 3 reached the extensibility limit J_m.
    #[error("Ī1 − 3 = {i1_minus_3:.6} reached the extensibility limit {limit:.6}")]
    ExtensibilityLimit {
        /// Ī1 − 3 reached.
        i1_minus_3: f64,
        /// The extensibility limit J_m.
        limit: f64,
    },
    /// Eight-chain: the chain stretch reached the locking stretch.
    #[error("chain stretch {chain_stretch:.6} reached the locking stretch {locking_stretch:.6}")]
    ChainLocking {
        /// Chain stretch √(Ī1/3) reached.
        chain_stretch: f64,
        /// The locking stretch λ_m.
        locking_stretch: f64,
    },
}
