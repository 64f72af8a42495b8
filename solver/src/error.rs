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

/// Why a solve could not start, or why it stopped part-way.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum SolveError {
    /// A stage names a set the mesh does not have.
    #[error("stage `{stage}`: no node, side or element set named `{name}`")]
    UnknownSet {
        /// Name of the stage.
        stage: String,
        /// The set name as given.
        name: String,
    },
    /// A pressure names a set that is not a side set.
    #[error("stage `{stage}`: pressure needs a side set, `{name}` is not one")]
    NotASideSet {
        /// Name of the stage.
        stage: String,
        /// The set name as given.
        name: String,
    },
    /// The solver has no element for this kind in this analysis.
    #[error("element {element} ({kind}) is not supported in {analysis} analysis: {hint}")]
    UnsupportedElement {
        /// Index of the element in the mesh (0-based).
        element: usize,
        /// Element kind, e.g. `tet10`.
        kind: String,
        /// Analysis kind in words.
        analysis: &'static str,
        /// What to use instead.
        hint: &'static str,
    },
    /// An element is in no material region.
    #[error("element {element} belongs to no material region")]
    MissingRegion {
        /// Index of the element in the mesh (0-based).
        element: usize,
    },
    /// An element is in two material regions.
    #[error("element {element} belongs to regions `{first}` and `{second}`")]
    OverlappingRegions {
        /// Index of the element in the mesh (0-based).
        element: usize,
        /// The first region holding it.
        first: String,
        /// The second region holding it.
        second: String,
    },
    /// A region names an element the mesh does not have.
    #[error("region `{region}` names element {element}, but the mesh has {count}")]
    ElementOutOfRange {
        /// Name of the region.
        region: String,
        /// The element index the region names (0-based).
        element: usize,
        /// Number of elements in the mesh.
        count: usize,
    },
    /// A 2-D mesh for a 3-D analysis, or the other way round.
    #[error("mesh dimension {mesh} does not match the {analysis} analysis")]
    DimensionMismatch {
        /// Spatial dimension of the mesh.
        mesh: usize,
        /// Analysis kind in words.
        analysis: &'static str,
    },
    /// The plane-strain thickness (length units) is not positive and finite.
    #[error("plane strain thickness must be positive and finite, got {0}")]
    BadThickness(f64),
    /// There is nothing to solve.
    #[error("the model has no stages")]
    NoStages,
    /// The increment controls of a stage cannot drive it.
    #[error("stage `{stage}`: {source}")]
    BadControls {
        /// Name of the stage.
        stage: String,
        /// What is wrong with the controls.
        source: ControlsError,
    },
    /// An element could not be evaluated.
    #[error("element {element}: {source}")]
    Element {
        /// Index of the element in the mesh (0-based).
        element: usize,
        /// What went wrong in the element.
        source: ElementError,
    },
    /// The material could not be evaluated at an integration point (e.g. past the locking stretch).
    #[error("element {element}, integration point {point}: {source}")]
    Material {
        /// Index of the element in the mesh (0-based).
        element: usize,
        /// Index of the integration point in the element (0-based).
        point: usize,
        /// What the material reported.
        source: MaterialError,
    },
    /// An element turned inside out; the increment is cut back.
    #[error("element {element} inverted at integration point {point} (J = {j:.3e})")]
    InvertedElement {
        /// Index of the element in the mesh (0-based).
        element: usize,
        /// Index of the integration point in the element (0-based).
        point: usize,
        /// Volume ratio J = det F there (≤ 0).
        j: f64,
    },
    /// Newton–Raphson did not converge within the iteration limit; the increment is cut back.
    #[error("stage `{stage}` increment {increment}: no convergence, residual {residual:.3e} (relative {relative:.3e})")]
    NotConverged {
        /// Name of the stage.
        stage: String,
        /// Increment number within the stage (1-based).
        increment: usize,
        /// Out-of-balance force norm at the last iteration (force units).
        residual: f64,
        /// `residual` relative to the force scale.
        relative: f64,
    },
    /// Cut-backs reached the smallest increment: the run stops here.
    #[error("stage `{stage}`: increment {step:.3e} fell below the minimum {min:.3e} at load factor {load_factor:.4} ({reason})")]
    IncrementTooSmall {
        /// Name of the stage.
        stage: String,
        /// Load factor of the last converged state of the stage.
        load_factor: f64,
        /// The increment that failed last (fraction of the stage).
        step: f64,
        /// The smallest increment allowed (fraction of the stage).
        min: f64,
        /// Why the last attempt failed.
        reason: String,
    },
    /// A stage driven by loads stopped at a limit load (the part cannot carry more).
    #[error(
        "stage `{stage}`: the load cannot be increased past {load} at load factor {load_factor:.4}: a limit point \
         (the stiffness along the load fell to {percent:.1} % of its value at the start of the stage); \
         drive the stage by a motion or use arc-length control (`control = \"arc-length\"`)"
    )]
    LimitPoint {
        /// Name of the stage.
        stage: String,
        /// Load factor of the last converged state of the stage.
        load_factor: f64,
        /// The loads reached there, in words (e.g. "pressure 0.49").
        load: String,
        /// Stiffness along the load at the stop, percent of its value at the stage start.
        percent: f64,
    },
    /// An arc-length stage took its increments without reaching the end of its loads.
    #[error(
        "stage `{stage}` (arc-length): {increments} increments reached load factor {load_factor:.4} \
         (at most {peak:.4}, {peak_load}) without reaching the end of the stage's loads; \
         the part cannot carry them along this path, or the stage needs more increments (`max_increments`)"
    )]
    ArcLengthUnfinished {
        /// Name of the stage.
        stage: String,
        /// Increments the stage took.
        increments: usize,
        /// Load factor of the last converged increment.
        load_factor: f64,
        /// Largest load factor the stage reached.
        peak: f64,
        /// The loads at that largest load factor, in words.
        peak_load: String,
    },
    /// An arc-length stage whose path came back to no load at all.
    #[error("stage `{stage}` (arc-length): the path came back to load factor {load_factor:.4} after {increments} increments: the part unloads along it")]
    ArcLengthUnloaded {
        /// Name of the stage.
        stage: String,
        /// Increments the stage took.
        increments: usize,
        /// Load factor of the last converged increment.
        load_factor: f64,
    },
    /// Cut-backs shortened the arc below its minimum: the run stops here.
    #[error(
        "stage `{stage}` (arc-length): the arc fell to {ratio:.3e} of the first arc, below the minimum {min:.3e}, \
         at load factor {load_factor:.4} ({reason})"
    )]
    ArcTooShort {
        /// Name of the stage.
        stage: String,
        /// Load factor of the last converged state of the stage.
        load_factor: f64,
        /// The arc that failed last, relative to the stage's first arc.
        ratio: f64,
        /// The smallest arc allowed, relative to the first one.
        min: f64,
        /// Why the last attempt failed.
        reason: String,
    },
    /// Arc-length control asked of a stage it cannot drive.
    #[error("stage `{stage}`: arc-length control needs {needs}")]
    ArcLengthNotApplicable {
        /// Name of the stage.
        stage: String,
        /// What the stage lacks, in words.
        needs: String,
    },
    /// A connected part that nothing holds against a rigid motion.
    #[error(
        "stage `{stage}`: the part with node {node} ({nodes} nodes) is free to move: {free}; \
         hold it by a support (a symmetry plane is a support of the normal component), a motion or an insert, \
         or give the stage `stabilization` if contact holds it"
    )]
    Unheld {
        /// Name of the stage.
        stage: String,
        /// A node of the free part (0-based).
        node: usize,
        /// Number of nodes of the part.
        nodes: usize,
        /// The rigid motions nothing holds, in words.
        free: String,
    },
    /// A rigid body is set up wrongly.
    #[error("rigid body `{body}`: {reason}")]
    BadContact {
        /// Name of the rigid body.
        body: String,
        /// What is wrong.
        reason: String,
    },
    /// A fluid is set up wrongly.
    #[error("fluid `{fluid}`: {reason}")]
    BadFluid {
        /// Name of the fluid.
        fluid: String,
        /// What is wrong.
        reason: String,
    },
    /// The wetted region kept changing.
    #[error("fluid front did not settle within {updates} updates")]
    FluidFrontNotSettled {
        /// Front updates made.
        updates: usize,
    },
    /// Augmentations did not bring the penetration within tolerance.
    #[error("contact: penetration {penetration:.3e} still above the tolerance {tolerance:.3e} after {augmentations} augmentations")]
    ContactNotResolved {
        /// Largest remaining penetration (length units).
        penetration: f64,
        /// Allowed penetration (length units).
        tolerance: f64,
        /// Augmentations made.
        augmentations: usize,
    },
    /// An insert is set up wrongly.
    #[error("insert `{insert}`: {reason}")]
    BadInsert {
        /// Name of the insert.
        insert: String,
        /// What is wrong.
        reason: String,
    },
    /// The insert equations cannot be solved.
    #[error("insert equations are singular (is a free insert component held by nothing?)")]
    SingularInserts,
    /// The sparse solver failed.
    #[error("linear solve failed: {0}")]
    Linear(#[from] LinearError),
    /// The out-of-balance force became NaN or infinite; the increment is cut back.
    #[error("the residual is not finite")]
    NonFiniteResidual,
    /// The tangent has more stored entries (the field) than the 32-bit scatter map can address.
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
