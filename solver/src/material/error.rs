//! Errors raised by constitutive models: bad parameters at construction, and
//! states a model cannot evaluate (inverted volume, chains at their locking
//! stretch) during a solve, where they trigger an increment cutback.

use thiserror::Error;

#[derive(Debug, Clone, PartialEq, Error)]
pub enum MaterialError {
    /// A constant is out of its physical range.
    #[error("material parameter `{name}` = {value}: {reason}")]
    InvalidParameter { name: &'static str, value: f64, reason: &'static str },
    /// Constants that are each admissible but not together (e.g. a
    /// Mooney–Rivlin pair whose shear modulus 2 (c10 + c01) is not positive).
    #[error("material model `{model}`: {expression} = {value}: {reason}")]
    InvalidCombination { model: &'static str, expression: &'static str, value: f64, reason: &'static str },
    /// The same constant, or two constants that exclude each other, given twice.
    #[error("material model `{model}`: give `{name}` or `{other}`, not both")]
    ConflictingParameters { model: &'static str, name: &'static str, other: &'static str },
    /// The same constant given twice.
    #[error("material model `{model}`: parameter `{name}` is given more than once")]
    DuplicateParameter { model: &'static str, name: &'static str },
    /// A required constant was not given.
    #[error("material model `{model}` needs parameter `{name}`")]
    MissingParameter { model: &'static str, name: &'static str },
    /// A constant was given that the model does not use.
    #[error("material model `{model}` does not take parameter `{name}` (it takes: {allowed})")]
    UnexpectedParameter { model: &'static str, name: String, allowed: String },
    /// The model name is not one olli knows.
    #[error("unknown material model `{0}` (known: neo-hookean, mooney-rivlin, yeoh, eight-chain, gent, ogden)")]
    UnknownModel(String),
    /// The volume ratio J = det F is not positive: the material is inverted.
    #[error("volume ratio J = {j:.3e} is not positive (inverted material)")]
    NonPositiveVolume { j: f64 },
    /// Gent: Ī1 − 3 reached the extensibility limit J_m.
    #[error("Ī1 − 3 = {i1_minus_3:.6} reached the extensibility limit {limit:.6}")]
    ExtensibilityLimit { i1_minus_3: f64, limit: f64 },
    /// Eight-chain: the chain stretch reached the locking stretch.
    #[error("chain stretch {chain_stretch:.6} reached the locking stretch {locking_stretch:.6}")]
    ChainLocking { chain_stretch: f64, locking_stretch: f64 },
}
