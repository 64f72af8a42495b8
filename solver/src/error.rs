//! Errors of a solve: bad input found before the run, and the reasons a run
//! stops part-way (returned with everything that converged before).

use thiserror::Error;

use crate::element::ElementError;

#[derive(Debug, Clone, PartialEq, Error)]
pub enum SolveError {
    #[error("stage `{stage}`: no node, side or element set named `{name}`")]
    UnknownSet { stage: String, name: String },
    #[error("stage `{stage}`: pressure needs a side set, `{name}` is not one")]
    NotASideSet { stage: String, name: String },
    #[error("element {element} ({kind}) is not supported in {analysis} analysis")]
    UnsupportedElement { element: usize, kind: String, analysis: &'static str },
    #[error("element {element} belongs to no material region")]
    MissingRegion { element: usize },
    #[error("element {element} belongs to regions `{first}` and `{second}`")]
    OverlappingRegions { element: usize, first: String, second: String },
    #[error("region `{region}` names element {element}, but the mesh has {count}")]
    ElementOutOfRange { region: String, element: usize, count: usize },
    #[error("mesh dimension {mesh} does not match the {analysis} analysis")]
    DimensionMismatch { mesh: usize, analysis: &'static str },
    #[error("plane strain thickness must be positive and finite, got {0}")]
    BadThickness(f64),
    #[error("the model has no stages")]
    NoStages,
    #[error("element {element}: {source}")]
    Element { element: usize, source: ElementError },
    #[error("element {element} inverted at integration point {point} (J = {j:.3e})")]
    InvertedElement { element: usize, point: usize, j: f64 },
    #[error("stage `{stage}` increment {increment}: no convergence, residual {residual:.3e} (relative {relative:.3e})")]
    NotConverged { stage: String, increment: usize, residual: f64, relative: f64 },
    #[error("stage `{stage}`: increment {step:.3e} fell below the minimum {min:.3e} at load factor {load_factor:.4} ({reason})")]
    IncrementTooSmall { stage: String, load_factor: f64, step: f64, min: f64, reason: String },
    #[error("rigid body `{body}`: {reason}")]
    BadContact { body: String, reason: String },
    #[error("contact: penetration {penetration:.3e} still above the tolerance {tolerance:.3e} after {augmentations} augmentations")]
    ContactNotResolved { penetration: f64, tolerance: f64, augmentations: usize },
    #[error("insert `{insert}`: {reason}")]
    BadInsert { insert: String, reason: String },
    #[error("linear solve failed: {0}")]
    Linear(String),
    #[error("sparse pattern too large: {0} stored entries exceed the 32-bit scatter map")]
    PatternTooLarge(usize),
}

impl SolveError {
    /// Wraps an element failure, lifting inversion to its own variant.
    pub fn from_element(element: usize, e: ElementError) -> Self {
        match e {
            ElementError::Inverted { point, j } => SolveError::InvertedElement { element, point, j },
            source => SolveError::Element { element, source },
        }
    }
}
