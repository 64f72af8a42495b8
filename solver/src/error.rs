//! Errors of a solve: bad input found before the run, and the reasons a run
//! stops part-way (returned with everything that converged before).

use thiserror::Error;

use crate::assembly::{AssemblyError, KernelError};
use crate::contact::active::ContactError;
use crate::insert::InsertError;
use crate::linear::LinearError;
use crate::load::fluid::FluidError;
use crate::model::{ControlsError, SettingsError};

/// Why a solve could not start, or why it stopped part-way.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum SolveError {
    /// A harmonic stage cannot be run as given.
    #[error("harmonic stage `{stage}`: {reason}")]
    Harmonic {
        /// Name of the stage.
        stage: String,
        /// What is wrong.
        reason: String,
    },
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
    /// The elements could not be set up (unsupported kinds, regions, the
    /// mesh against the analysis) or evaluated (an inverted element, a bad
    /// reference element, a material out of its range).
    #[error(transparent)]
    Assembly(#[from] AssemblyError),
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
    /// Another setting of the model cannot drive a run (contact, fluid,
    /// insert, stage loads and ramps, linear-solver ordering; see
    /// [`crate::model::Model::validate`]).
    #[error("{0}")]
    BadSettings(SettingsError),
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
    #[error("stage `{stage}`: increment {step:.3e} fell below the minimum {min:.3e} at load factor {load_factor:.4} ({reason}){context}")]
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
        /// What the last converged increment shows about the stop, as a
        /// sentence starting with `; ` (the rubber flowing into an
        /// extrusion gap), or empty.
        context: String,
    },
    /// The rubber passed an extrusion gap's `max_depth`: the run stops after
    /// that increment, keeping it and every one before.
    #[error("{0}")]
    Extruded(Box<ExtrusionStop>),
    /// A stage driven by loads stopped at a limit load (the part cannot carry more).
    #[error(
        "stage `{stage}`: the load cannot be increased past {load} at load factor {load_factor:.4}: a limit point \
         (the stiffness along the load fell to {percent:.1} % of its value at the start of the stage); \
         drive the stage by a motion or use arc-length control (`control = \"arc-length\"`){context}"
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
        /// What the last converged increment shows about the stop, as a
        /// sentence starting with `; ` (the rubber flowing into an
        /// extrusion gap, a limit load of its own), or empty.
        context: String,
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
}

impl SolveError {
    /// Whether a Newton iteration ran into it (divergence, an inverted or
    /// failed point, a singular system, contact or a fluid front that did not
    /// settle), so the increment may be tried again differently.
    pub fn is_numerical(&self) -> bool {
        self.is_point_failure()
            || matches!(
                self,
                SolveError::NotConverged { .. }
                    | SolveError::NonFiniteResidual
                    | SolveError::ContactNotResolved { .. }
                    | SolveError::FluidFrontNotSettled { .. }
                    | SolveError::Linear(_)
            )
    }

    /// Whether an element or one of its material points failed (inverted,
    /// a bad element, a material out of its range): a shorter step may avoid it.
    pub fn is_point_failure(&self) -> bool {
        matches!(self, SolveError::Assembly(e) if e.is_point_failure())
    }

    /// Wraps the failure of element `element`, lifting inversion to its own variant.
    pub fn from_element(element: usize, e: impl Into<KernelError>) -> Self {
        AssemblyError::in_element(element, e).into()
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

/// Where and how far the rubber passed an extrusion gap's `max_depth`
/// ([`SolveError::Extruded`]).
#[derive(Debug, Clone, PartialEq, Error)]
#[error(
    "stage `{stage}` increment {increment} (load factor {load_factor:.4}{loads}): the rubber reaches {depth:.4} past the \
     edge of extrusion gap `{gap}` (node {node} at {at}), beyond its max_depth {limit}: the seal extrudes into the \
     clearance gap there. Narrow the gap, add a back-up ring or choose a harder compound; every converged increment is kept"
)]
pub struct ExtrusionStop {
    /// Name of the stage.
    pub stage: String,
    /// Increment of the stage (1-based).
    pub increment: usize,
    /// Load factor reached.
    pub load_factor: f64,
    /// The fluid pressures at that increment, as `, fluid `name` at p` (empty without fluids).
    pub loads: String,
    /// Name of the extrusion gap.
    pub gap: String,
    /// The rubber's intrusion past the edge (length).
    pub depth: f64,
    /// The node that reached furthest (0-based).
    pub node: usize,
    /// Its position, written `(x, y)` or `(x, y, z)`.
    pub at: String,
    /// The gap's `max_depth`.
    pub limit: f64,
}
