//! Errors of the assembly layer: a model whose elements cannot be set up,
//! and element evaluations that fail during a solve.

use thiserror::Error;

use super::kernel::KernelError;
use crate::element::ElementError;
use crate::material::MaterialError;

/// Why the element table, the sparse pattern or an element loop failed.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum AssemblyError {
    /// An element kind the analysis cannot integrate (e.g. a quad in 3-D).
    #[error("element {element} ({kind}) is not supported in {analysis} analysis: {hint}")]
    UnsupportedElement {
        /// Element index.
        element: usize,
        /// Its kind's name.
        kind: String,
        /// The analysis' name.
        analysis: &'static str,
        /// What to use instead.
        hint: &'static str,
    },
    /// An element outside every material region.
    #[error("element {element} belongs to no material region")]
    MissingRegion {
        /// Element index.
        element: usize,
    },
    /// An element listed by two regions.
    #[error("element {element} belongs to regions `{first}` and `{second}`")]
    OverlappingRegions {
        /// Element index.
        element: usize,
        /// The first region naming it.
        first: String,
        /// The second region naming it.
        second: String,
    },
    /// A region names an element the mesh does not have.
    #[error("region `{region}` names element {element}, but the mesh has {count}")]
    ElementOutOfRange {
        /// Region name.
        region: String,
        /// The element index given.
        element: usize,
        /// Elements in the mesh.
        count: usize,
    },
    /// The mesh's dimension does not fit the analysis.
    #[error("mesh dimension {mesh} does not match the {analysis} analysis")]
    DimensionMismatch {
        /// Mesh dimension.
        mesh: usize,
        /// The analysis' name.
        analysis: &'static str,
    },
    /// Plane strain with a thickness that is not positive and finite.
    #[error("plane strain thickness must be positive and finite, got {0}")]
    BadThickness(f64),
    /// det F ≤ 0 at an integration point (or θ ≤ 0 for a mixed element).
    #[error("element {element} inverted at integration point {point} (J = {j:.3e})")]
    InvertedElement {
        /// Element index.
        element: usize,
        /// Integration point.
        point: usize,
        /// The offending volume ratio.
        j: f64,
    },
    /// Another geometric failure of an element (a bad reference element).
    #[error("element {element}: {source}")]
    Element {
        /// Element index.
        element: usize,
        /// What the element reported.
        source: ElementError,
    },
    /// The material could not be evaluated in an element.
    #[error("element {element}, integration point {point}: {source}")]
    Material {
        /// Element index.
        element: usize,
        /// Integration point (0 for the volumetric law of a mixed element).
        point: usize,
        /// What the material reported.
        source: MaterialError,
    },
    /// The pattern has more stored entries than the 32-bit scatter map holds.
    #[error("sparse pattern too large: {0} stored entries exceed the 32-bit scatter map")]
    PatternTooLarge(usize),
}

impl AssemblyError {
    /// Whether an element or one of its material points failed during an
    /// evaluation (inverted, a bad element, a material out of its range),
    /// rather than the model's set-up.
    pub fn is_point_failure(&self) -> bool {
        matches!(self, AssemblyError::InvertedElement { .. } | AssemblyError::Element { .. } | AssemblyError::Material { .. })
    }

    /// Wraps the failure of element `element`, lifting inversion to its own variant.
    pub fn in_element(element: usize, e: impl Into<KernelError>) -> Self {
        match e.into() {
            KernelError::Element(ElementError::Inverted { point, j }) => AssemblyError::InvertedElement { element, point, j },
            KernelError::Element(source) => AssemblyError::Element { element, source },
            KernelError::Material { point, source } => AssemblyError::Material { element, point, source },
        }
    }
}
