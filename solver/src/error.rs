//! Errors of a solve: bad input found before the run, and the reasons a run
//! stops part-way (returned with everything that converged before).

use thiserror::Error;

use crate::assembly::{AssemblyError, KernelError};
use crate::contact::active::ContactError;
use crate::element::ElementError;
use crate::insert::InsertError;
use crate::linear::LinearError;
use crate::load::fluid::FluidError;
use crate::material::MaterialError;
use crate::model::ControlsError;

#[derive(Debug, Clone, PartialEq, Error)]
pub enum SolveError {
    #[error("stage `{stage}`: no node, side or element set named `{name}`")]
    UnknownSet { stage: String, name: String },
    #[error("stage `{stage}`: pressure needs a side set, `{name}` is not one")]
    NotASideSet { stage: String, name: String },
    #[error("element {element} ({kind}) is not supported in {analysis} analysis: {hint}")]
    UnsupportedElement { element: usize, kind: String, analysis: &'static str, hint: &'static str },
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
    #[error("stage `{stage}`: {source}")]
    BadControls { stage: String, source: ControlsError },
    #[error("element {element}: {source}")]
    Element { element: usize, source: ElementError },
    #[error("element {element}, integration point {point}: {source}")]
    Material { element: usize, point: usize, source: MaterialError },
    #[error("element {element} inverted at integration point {point} (J = {j:.3e})")]
    InvertedElement { element: usize, point: usize, j: f64 },
    #[error("stage `{stage}` increment {increment}: no convergence, residual {residual:.3e} (relative {relative:.3e})")]
    NotConverged { stage: String, increment: usize, residual: f64, relative: f64 },
    #[error("stage `{stage}`: increment {step:.3e} fell below the minimum {min:.3e} at load factor {load_factor:.4} ({reason})")]
    IncrementTooSmall { stage: String, load_factor: f64, step: f64, min: f64, reason: String },
    #[error("rigid body `{body}`: {reason}")]
    BadContact { body: String, reason: String },
    #[error("fluid `{fluid}`: {reason}")]
    BadFluid { fluid: String, reason: String },
    #[error("fluid front did not settle within {updates} updates")]
    FluidFrontNotSettled { updates: usize },
    #[error("contact: penetration {penetration:.3e} still above the tolerance {tolerance:.3e} after {augmentations} augmentations")]
    ContactNotResolved { penetration: f64, tolerance: f64, augmentations: usize },
    #[error("insert `{insert}`: {reason}")]
    BadInsert { insert: String, reason: String },
    #[error("insert equations are singular (is a free insert component held by nothing?)")]
    SingularInserts,
    #[error("linear solve failed: {0}")]
    Linear(#[from] LinearError),
    #[error("the residual is not finite")]
    NonFiniteResidual,
    #[error("sparse pattern too large: {0} stored entries exceed the 32-bit scatter map")]
    PatternTooLarge(usize),
}

impl SolveError {
    /// Whether a Newton iteration ran into it (divergence, an inverted or
    /// failed point, a singular system, contact or a fluid front that did not
    /// settle), so the increment may be tried again differently.
    pub fn is_numerical(&self) -> bool {
        matches!(
            self,
            SolveError::InvertedElement { .. }
                | SolveError::Element { .. }
                | SolveError::Material { .. }
                | SolveError::NotConverged { .. }
                | SolveError::NonFiniteResidual
                | SolveError::ContactNotResolved { .. }
                | SolveError::FluidFrontNotSettled { .. }
                | SolveError::Linear(_)
        )
    }

    /// Wraps the failure of element `element`, lifting inversion to its own variant.
    pub fn from_element(element: usize, e: impl Into<KernelError>) -> Self {
        AssemblyError::in_element(element, e).into()
    }
}

impl From<AssemblyError> for SolveError {
    fn from(e: AssemblyError) -> Self {
        match e {
            AssemblyError::UnsupportedElement { element, kind, analysis, hint } => {
                SolveError::UnsupportedElement { element, kind, analysis, hint }
            }
            AssemblyError::MissingRegion { element } => SolveError::MissingRegion { element },
            AssemblyError::OverlappingRegions { element, first, second } => SolveError::OverlappingRegions { element, first, second },
            AssemblyError::ElementOutOfRange { region, element, count } => SolveError::ElementOutOfRange { region, element, count },
            AssemblyError::DimensionMismatch { mesh, analysis } => SolveError::DimensionMismatch { mesh, analysis },
            AssemblyError::BadThickness(t) => SolveError::BadThickness(t),
            AssemblyError::InvertedElement { element, point, j } => SolveError::InvertedElement { element, point, j },
            AssemblyError::Element { element, source } => SolveError::Element { element, source },
            AssemblyError::Material { element, point, source } => SolveError::Material { element, point, source },
            AssemblyError::PatternTooLarge(n) => SolveError::PatternTooLarge(n),
        }
    }
}

impl From<InsertError> for SolveError {
    fn from(e: InsertError) -> Self {
        match e {
            InsertError::UnknownSet { set, .. } => SolveError::UnknownSet { stage: String::from("(inserts)"), name: set },
            InsertError::Bad { insert, reason } => SolveError::BadInsert { insert, reason },
            InsertError::Singular => SolveError::SingularInserts,
        }
    }
}

impl From<FluidError> for SolveError {
    fn from(e: FluidError) -> Self {
        SolveError::BadFluid { fluid: e.fluid, reason: e.reason }
    }
}

impl From<ContactError> for SolveError {
    fn from(e: ContactError) -> Self {
        SolveError::BadContact { body: e.body, reason: e.reason }
    }
}
