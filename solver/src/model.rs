//! The problem description handed to [`crate::driver::solve`]: a mesh, the
//! analysis kind, material regions and a sequence of load stages. Built in
//! memory (tests, benchmarks) or by the job-file layer; no files here.
//!
//! Load semantics: every support, motion, pressure and force is keyed by its
//! set name. A value given in a stage is reached at the end of that stage,
//! ramped linearly from its value at the stage start; values of earlier
//! stages are held unless a later stage names the same set again. Supports
//! and motions stay active for the rest of the run.

use std::sync::Arc;

use olli_mesh::Mesh;
use thiserror::Error;

pub use crate::element::{Analysis, Formulation};
use crate::material::Material;
pub use crate::rigid_surface::Shape as RigidShape;
pub use settings::SettingsError;

pub mod settings;

/// One material region.
#[derive(Debug, Clone)]
pub struct Region {
    /// Name of the region (the mesh's element set).
    pub name: String,
    /// Element indices of the region (each element in exactly one region).
    pub elements: Vec<usize>,
    /// The compound the region is made of.
    pub material: Arc<Material>,
    /// Mixed displacement–pressure or displacement-only elements.
    pub formulation: Formulation,
}

/// Fixed (zero) displacement components on the nodes of a set.
#[derive(Debug, Clone, PartialEq)]
pub struct Support {
    /// Node set (or side/element set, whose nodes are used).
    pub set: String,
    /// Which components (x, y, z; r, z in axisymmetric) are held at zero.
    pub components: [bool; 3],
}

/// Prescribed displacement components on the nodes of a set, e.g. a bonded
/// face moving with a rigid plate.
#[derive(Debug, Clone, PartialEq)]
pub struct Motion {
    /// Node set (or side/element set, whose nodes are used).
    pub set: String,
    /// Displacement (length units) reached at the end of the stage; `None`
    /// leaves the component free.
    pub displacement: [Option<f64>; 3],
}

/// A node set moved as a rigid body during one stage: turned about the axis
/// through `center` and translated by `translation`, both ramped from the
/// nodes' positions at the stage start, so every node follows an exact arc
/// (a chord would shorten the radius). All components of the set's nodes
/// are prescribed; in later stages they are held where the stage left them.
/// 2-D analyses turn about the out-of-plane axis.
#[derive(Debug, Clone, PartialEq)]
pub struct RotationMotion {
    /// Node set (or side/element set, whose nodes are used).
    pub set: String,
    /// Rotation vector made during the stage: unit axis times angle (radians).
    pub rotation: [f64; 3],
    /// A point on the axis (position at the stage start).
    pub center: [f64; 3],
    /// Translation (length units) made during the stage, after the turn.
    pub translation: [f64; 3],
}

/// Follower pressure on a side set, positive pushing on the surface.
#[derive(Debug, Clone, PartialEq)]
pub struct Pressure {
    /// Side set the pressure acts on.
    pub set: String,
    /// Pressure (stress units) reached at the end of the stage.
    pub value: f64,
}

/// A fluid that enters at a source point on the rubber surface and loads,
/// as a follower pressure, every facet of `sides` it can reach (see
/// [`crate::load::fluid`]): the facets connected to the source through facets
/// that are open or pressed against a rigid surface less hard than the fluid.
#[derive(Debug, Clone, PartialEq)]
pub struct Fluid {
    /// Name used in results (`fluid_<name>_...`) and by [`FluidPressure`].
    pub name: String,
    /// Side set the fluid may wet.
    pub sides: String,
    /// Reference position (length units) of a point on `sides` where the fluid enters.
    pub source: [f64; 3],
}

/// A seal's gland in a 2-D section: the groove a rigid profile forms,
/// closed by another rigid surface (a bore, a cover). Its figures, gland
/// fill and squeeze, are reported at every converged increment.
#[derive(Debug, Clone, PartialEq)]
pub struct Gland {
    /// Name used in results (`gland_<name>_...`).
    pub name: String,
    /// The rigid body whose profile (polyline or arc) forms the groove.
    pub groove: String,
    /// The rigid body that closes the groove.
    pub closed_by: String,
}

/// The edge of a clearance gap a seal may extrude into: the rubber's
/// largest intrusion past `edge` along `into` is reported at every
/// converged increment, and a run stops when it passes `max_depth`.
#[derive(Debug, Clone, PartialEq)]
pub struct ExtrusionGap {
    /// Name used in results (`extrusion_<name>_...`).
    pub name: String,
    /// The gap's edge (reference position, length units).
    pub edge: [f64; 3],
    /// Direction from the edge into the gap (any non-zero length).
    pub into: [f64; 3],
    /// Rigid body whose motion the edge and direction follow (`None`: fixed).
    pub follows: Option<String>,
    /// Node set whose nodes are measured (`None`: every node).
    pub nodes: Option<String>,
    /// Intrusion (length units) beyond which the run stops (`None`: never).
    pub max_depth: Option<f64>,
}

/// Pressure of a [`Fluid`] (stress units) reached at the end of a stage,
/// ramped like other loads (ramp keyed by the fluid's name).
#[derive(Debug, Clone, PartialEq)]
pub struct FluidPressure {
    /// Name of the [`Fluid`].
    pub fluid: String,
    /// Pressure reached at the end of the stage (stress units).
    pub value: f64,
}

/// A total force on a set (dead load). On a side set it is spread as a
/// uniform traction over the undeformed sides; on a node set it is split
/// equally among the nodes. Axisymmetric: the force over the full 2π.
#[derive(Debug, Clone, PartialEq)]
pub struct Force {
    /// Node or side set the force acts on.
    pub set: String,
    /// Total force reached at the end of the stage (force units), x, y, z.
    pub total: [f64; 3],
}

/// A rigid (metal) surface the rubber may touch: a groove, a cover plate, a
/// shaft or a bore. Its motion is given per stage by [`RigidMotion`].
#[derive(Debug, Clone, PartialEq)]
pub struct RigidBody {
    /// Name in the results (`rigid_<name>_...`).
    pub name: String,
    /// Geometry of the surface in its unmoved position.
    pub shape: RigidShape,
    /// Side set of the rubber that may touch it.
    pub sides: String,
    /// Coulomb friction coefficient (0: frictionless). Default 0.
    pub friction: f64,
    /// Normal penalty ε_n (stress / length). `None` (default): 50 μ / h at each
    /// node, from the largest shear modulus μ next to the side set and the
    /// node's local side size h.
    pub normal_penalty: Option<f64>,
    /// Allowed penetration as a fraction of the local side size h; the
    /// augmented Lagrangian iterates until every touching node is within it.
    /// Default 0.001.
    pub penetration_tolerance: f64,
    /// Centre of rotations (length units). Default origin.
    pub rotation_center: [f64; 3],
    /// Axis of rotations (3-D; in 2-D rotations are about z). Default z.
    pub rotation_axis: [f64; 3],
}

impl RigidBody {
    /// A frictionless body with default contact settings.
    pub fn new(name: impl Into<String>, shape: RigidShape, sides: impl Into<String>) -> Self {
        RigidBody {
            name: name.into(),
            shape,
            sides: sides.into(),
            friction: 0.0,
            normal_penalty: None,
            penetration_tolerance: 0.001,
            rotation_center: [0.0; 3],
            rotation_axis: [0.0, 0.0, 1.0],
        }
    }
}

/// Position of a rigid body reached at the end of a stage (ramped from its
/// position at the stage start; held by later stages that do not name it).
#[derive(Debug, Clone, PartialEq)]
pub struct RigidMotion {
    /// Name of the [`RigidBody`].
    pub body: String,
    /// Total translation from the body's original position (length units).
    pub translation: [f64; 3],
    /// Total rotation about the body's axis through its centre (radians).
    pub rotation: f64,
}

/// A rigid metal part (pin, sleeve, plate) bonded to the nodes of a set: the
/// nodes follow its rigid motion exactly (rotation by the rotation vector
/// about the reference point, then translation). Components, in this order:
/// translations x, y, z and rotations rx, ry, rz (the rotation vector,
/// radians). Plane strain uses x, y, rz; axisymmetric the axial translation
/// (index 1, the second coordinate) only.
#[derive(Debug, Clone, PartialEq)]
pub struct Insert {
    /// Name in the results (`insert_<name>_...`).
    pub name: String,
    /// Node (or side/element) set bonded to the insert.
    pub set: String,
    /// Reference point (length units): rotations and moments are about it.
    pub reference: [f64; 3],
    /// Components left free (loaded by zero) from the start instead of held
    /// at zero until a stage prescribes or loads them.
    pub free: [bool; 6],
}

/// What a stage does to one component of an insert.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum InsertDrive {
    /// Prescribed position (length units, or radians for rotations) reached
    /// at the end of the stage, ramped from its value at the stage start;
    /// held afterwards.
    Move(f64),
    /// Applied force (or moment about the reference point) reached at the
    /// end of the stage, ramped from its value at the stage start; the
    /// component is free to move.
    Load(f64),
}

/// An insert's components driven in one stage (`None`: unchanged).
#[derive(Debug, Clone, PartialEq)]
pub struct InsertStage {
    /// Name of the [`Insert`].
    pub insert: String,
    /// Drive of each component x, y, z, rx, ry, rz.
    pub components: [Option<InsertDrive>; 6],
}

/// Settings of the adaptive load stepping and of the Newton iterations of one stage.
#[derive(Debug, Clone, PartialEq)]
pub struct IncrementControls {
    /// First increment as a fraction of the stage. Default 0.1.
    pub first: f64,
    /// Smallest increment before the run stops (fraction of the stage). Default 1e-5.
    pub min: f64,
    /// Largest increment (fraction of the stage). Default 1.0 here; job
    /// files default to 0.25 (their `max_increment` key).
    pub max: f64,
    /// Growth factor of the increment after a fast convergence. Default 1.5.
    pub growth: f64,
    /// An increment that converged in at most this many iterations lets the
    /// next one grow; one re-balance after a contact multiplier update or a
    /// fluid-front move may add [`crate::driver::REBALANCE_ALLOWANCE`] (2)
    /// more, a second one stops growth. Default 4.
    pub fast_iterations: usize,
    /// Increment multiplier after a failed increment (divergence, NaN,
    /// inverted element, too many iterations). Default 0.25.
    pub cutback: f64,
    /// Newton iterations allowed per increment. Default 15.
    pub max_iterations: usize,
    /// Out-of-balance force relative to the force scale of the problem
    /// (external plus reaction forces). Default 1e-6.
    pub force_tolerance: f64,
    /// Energy norm |du·r| of the last correction (or of the next one, solved
    /// with the last factorization) relative to that of the first.
    /// Default 1e-8. Either this or the displacement criterion must hold
    /// (besides the force criterion).
    pub energy_tolerance: f64,
    /// Norm of the last correction relative to the larger of the increment's
    /// and the total displacement. Default 1e-6.
    pub displacement_tolerance: f64,
    /// Backtracking line search on the residual along the Newton direction. Default true.
    pub line_search: bool,
    /// Start each increment from a linear extrapolation of the previous
    /// increment's displacement change (in addition to the tangent
    /// predictor for prescribed motions). Default true.
    pub extrapolate: bool,
    /// Carry the mixed elements' pressure and dilatation as Newton unknowns
    /// (three-field Simo–Taylor–Pister iteration) instead of condensing them
    /// from the displacement at every iterate. Same converged solution, fewer
    /// iterations and a positive-definite tangent more often for nearly
    /// incompressible rubber. Default true.
    pub carry_pressure: bool,
    /// Stabilization factor (dimensionless, ≥ 0): ties every free node to its
    /// last converged position by a weak spring `factor · μ V / h²`, for parts
    /// not held in every direction until contact closes (see
    /// [`crate::driver::stabilization`]). Default 0 (none).
    pub stabilization: f64,
    /// Before an increment is cut back, solve it once more with damped
    /// Newton steps (see [`crate::driver::newton`]). Default true.
    pub damped_retry: bool,
}

impl Default for IncrementControls {
    fn default() -> Self {
        IncrementControls {
            first: 0.1,
            min: 1e-5,
            max: 1.0,
            growth: 1.5,
            fast_iterations: 4,
            cutback: 0.25,
            max_iterations: 15,
            force_tolerance: 1e-6,
            energy_tolerance: 1e-8,
            displacement_tolerance: 1e-6,
            line_search: true,
            extrapolate: true,
            carry_pressure: true,
            stabilization: 0.0,
            damped_retry: true,
        }
    }
}

/// Why [`IncrementControls`] cannot drive a stage.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum ControlsError {
    /// A value outside its allowed range (NaN included).
    #[error("`{field}` must be {requirement}, got {value}")]
    OutOfRange {
        /// The field of [`IncrementControls`].
        field: &'static str,
        /// The value given.
        value: f64,
        /// What it must be.
        requirement: &'static str,
    },
    /// The smallest increment is larger than the largest.
    #[error("`min` ({min}) is larger than `max` ({max})")]
    MinAboveMax {
        /// Smallest increment given.
        min: f64,
        /// Largest increment given.
        max: f64,
    },
}

impl IncrementControls {
    /// Checks that the controls can drive a stage: positive finite
    /// increments with `min ≤ max`, `growth ≥ 1`, `0 < cutback < 1` (so a
    /// failing increment shrinks and the run ends at `min`), at least one
    /// iteration, non-negative finite tolerances (the force tolerance
    /// positive) and stabilization. [`crate::solve`] calls it for every stage.
    pub fn validate(&self) -> Result<(), ControlsError> {
        let check = |field: &'static str, value: f64, ok: bool, requirement: &'static str| {
            if ok && value.is_finite() {
                Ok(())
            } else {
                Err(ControlsError::OutOfRange { field, value, requirement })
            }
        };
        check("first", self.first, self.first > 0.0, "positive")?;
        check("min", self.min, self.min > 0.0, "positive")?;
        check("max", self.max, self.max > 0.0, "positive")?;
        if self.min > self.max {
            return Err(ControlsError::MinAboveMax { min: self.min, max: self.max });
        }
        check("growth", self.growth, self.growth >= 1.0, "at least 1")?;
        check("cutback", self.cutback, self.cutback > 0.0 && self.cutback < 1.0, "between 0 and 1 (exclusive)")?;
        check("max_iterations", self.max_iterations as f64, self.max_iterations >= 1, "at least 1")?;
        check("force_tolerance", self.force_tolerance, self.force_tolerance > 0.0, "positive")?;
        check("energy_tolerance", self.energy_tolerance, self.energy_tolerance >= 0.0, "non-negative")?;
        check("displacement_tolerance", self.displacement_tolerance, self.displacement_tolerance >= 0.0, "non-negative")?;
        check("stabilization", self.stabilization, self.stabilization >= 0.0, "non-negative")?;
        Ok(())
    }

    /// The controls, if [`Self::validate`] accepts them.
    pub fn checked(self) -> Result<Self, ControlsError> {
        self.validate().map(|_| self)
    }
}

/// How a load's change over its stage is applied, as a function of the
/// stage fraction t ∈ [0, 1].
#[derive(Debug, Clone, PartialEq, Default)]
pub enum Ramp {
    /// Proportional to t. Default.
    #[default]
    Linear,
    /// The whole change from the first increment on.
    Step,
    /// Piecewise linear through `(t, fraction)` points sorted by t, held
    /// constant outside them.
    Table(Vec<(f64, f64)>),
}

impl Ramp {
    /// Fraction of the stage's change applied at stage fraction `t`.
    pub fn fraction(&self, t: f64) -> f64 {
        match self {
            Ramp::Linear => t,
            Ramp::Step => {
                if t > 0.0 {
                    1.0
                } else {
                    0.0
                }
            }
            Ramp::Table(points) => {
                let (Some(first), Some(last)) = (points.first(), points.last()) else {
                    return t;
                };
                if t <= first.0 {
                    return first.1;
                }
                for w in points.windows(2) {
                    let ((t0, f0), (t1, f1)) = (w[0], w[1]);
                    if t <= t1 {
                        return if t1 > t0 { f0 + (f1 - f0) * (t - t0) / (t1 - t0) } else { f1 };
                    }
                }
                last.1
            }
        }
    }
}

/// How the increments of a stage are driven.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Control {
    /// Each increment prescribes its load factor (stage fraction). Default.
    #[default]
    Load,
    /// Each increment prescribes a length along the equilibrium path and
    /// finds its load factor, which may fall past a limit point (Crisfield's
    /// cylindrical arc-length method, see [`crate::driver::arc_length`]).
    /// Only for stages driven by loads (forces, pressures, fluids, body
    /// force) that move nothing.
    ArcLength {
        /// The stage stops (the run with it) after this many increments
        /// without reaching load factor 1.
        max_increments: usize,
    },
}

/// Default of [`Control::ArcLength::max_increments`] in job files.
pub const ARC_LENGTH_MAX_INCREMENTS: usize = 100;

/// Name under which [`Stage::ramps`] gives the body force's ramp.
pub const BODY_FORCE_RAMP: &str = "body_force";

/// One load stage; stages run one after another, each from the last
/// converged state of the previous one.
#[derive(Debug, Clone, Default)]
pub struct Stage {
    /// Stage name (used in results and to key ramps).
    pub name: String,
    /// Time the stage takes (job's time unit, > 0): materials with memory
    /// relax over it, increment by increment. `None` (default): the stage
    /// takes no time and every material answers instantaneously. A stage
    /// with a duration and no load change holds the motions while the
    /// material relaxes.
    pub duration: Option<f64>,
    /// A small-amplitude harmonic stage about the state the stages before it
    /// reached (see [`Harmonic`]); `None` (default): a static stage.
    pub harmonic: Option<Harmonic>,
    /// Increment sizes and growth: first, smallest and largest step of the stage.
    pub controls: IncrementControls,
    /// What drives the increments: the load factor (default) or an arc length.
    pub control: Control,
    /// Components held at zero from this stage on.
    pub supports: Vec<Support>,
    /// Prescribed displacements reached at the end of the stage.
    pub motions: Vec<Motion>,
    /// Node sets turned as rigid bodies in this stage (ramped by the set's name in `ramps`).
    pub rotations: Vec<RotationMotion>,
    /// Held components (of supports or motions of earlier stages) let go at
    /// the start of this stage: their reaction at the last converged
    /// increment is applied as a load that ramps linearly to zero over the stage.
    pub releases: Vec<Support>,
    /// Follower pressures reached at the end of the stage.
    pub pressures: Vec<Pressure>,
    /// Total forces reached at the end of the stage.
    pub forces: Vec<Force>,
    /// Fluid pressures reached at the end of the stage (others are held).
    pub fluid_pressures: Vec<FluidPressure>,
    /// Body force per unit reference volume reached at the end of the stage
    /// (`None` holds the previous value).
    pub body_force: Option<[f64; 3]>,
    /// Rigid-body positions reached at the end of the stage.
    pub rigid_motions: Vec<RigidMotion>,
    /// Bonded inserts driven in this stage (ramped by the insert's name in `ramps`).
    pub inserts: Vec<InsertStage>,
    /// Ramps of the loads of this stage by set name (motions, pressures,
    /// forces on that set; [`BODY_FORCE_RAMP`] for the body force), by
    /// rigid-body name (its motion) or by fluid name (its pressure). Loads not named here ramp linearly.
    pub ramps: std::collections::BTreeMap<String, Ramp>,
}

/// A harmonic stage: the model vibrates with small amplitudes about the
/// converged state of the stage before it, at each frequency in turn. The
/// stage's `motions` give the displacement amplitudes (not positions); every
/// other prescribed dof and every insert is held; loads keep their values.
/// The static state is left as it was, so later stages continue from it.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Harmonic {
    /// Frequencies (cycles per job time unit), each positive.
    pub frequencies: Vec<f64>,
}

/// Fill-reducing ordering of the Cholesky factorization.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub enum Ordering {
    /// Approximate minimum degree (faer's built-in).
    Amd,
    /// Nested dissection of the node graph (METIS node separators).
    NestedDissection,
    /// Both AMD and nested dissection; keeps whichever gives the factor with
    /// fewer entries (AMD if the nested dissection fails). Default.
    #[default]
    LeastFill,
    /// A caller-supplied permutation: `perm[k]` is the equation eliminated k-th
    /// (e.g. from a nested-dissection partitioner).
    Custom(Vec<usize>),
}

/// Threads of the sparse factorization and its solves.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Threads {
    /// One thread unless the factor is large (estimated flops at least
    /// `linear::PARALLEL_FLOPS`) and at least 2 hardware threads are
    /// available; then all of them. Default.
    #[default]
    Auto,
    /// This many threads (at least 1; 1 runs sequentially).
    Count(usize),
}

/// Precision of the Cholesky factor.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum FactorPrecision {
    /// Single precision once the factor is large (estimated flops at least
    /// `linear::SINGLE_PRECISION_FLOPS`), double below. Default.
    #[default]
    Auto,
    /// Always double precision.
    Double,
    /// Single precision wherever Cholesky succeeds.
    Single,
}

/// Reuse of a factorization across Newton iterations: a system is solved
/// by a Krylov method (conjugate gradients when symmetric positive
/// definite, GMRES otherwise) preconditioned with the kept factor, and
/// factorized afresh only when that does not converge in time.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FactorReuse {
    /// Reuse where the driver allows it. Default true.
    pub enabled: bool,
    /// Krylov iterations before giving up and factorizing. Default 20.
    pub max_iterations: usize,
    /// Relative residual `|b − A x| / |b|` the Krylov solve must reach. Default 1e-10.
    pub tolerance: f64,
}

impl Default for FactorReuse {
    fn default() -> Self {
        FactorReuse { enabled: true, max_iterations: 20, tolerance: 1e-10 }
    }
}

/// Settings of the linear solver.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct LinearSettings {
    /// Fill-reducing ordering. Default: the one with the smaller factor.
    pub ordering: Ordering,
    /// Threads of the factorization and solves. Default: [`Threads::Auto`].
    pub threads: Threads,
    /// Factorization reuse with a Krylov correction. Default: on, 20 iterations, 1e-10.
    pub reuse: FactorReuse,
    /// Precision of a Cholesky factor; a single-precision one is refined to
    /// double-precision answers. Default: [`FactorPrecision::Auto`].
    pub precision: FactorPrecision,
}

/// Which fields each converged increment keeps.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OutputSettings {
    /// Keep stresses and strains at every integration point. Default true.
    pub point_fields: bool,
    /// Keep nodal averages of the point fields. Default true.
    pub nodal_fields: bool,
}

impl Default for OutputSettings {
    fn default() -> Self {
        OutputSettings { point_fields: true, nodal_fields: true }
    }
}

/// A complete problem.
#[derive(Debug, Clone)]
pub struct Model {
    /// The mesh, with the sets the stages name.
    pub mesh: Mesh,
    /// 3-D solid, axisymmetric or plane strain.
    pub analysis: Analysis,
    /// Material regions; every element in exactly one.
    pub regions: Vec<Region>,
    /// Load stages, run in order.
    pub stages: Vec<Stage>,
    /// Rigid surfaces in contact with the rubber.
    pub rigid: Vec<RigidBody>,
    /// Fluids that wet the rubber where contact lets them in.
    pub fluids: Vec<Fluid>,
    /// Glands whose fill and squeeze are reported.
    pub glands: Vec<Gland>,
    /// Clearance gaps whose extrusion is reported (and may stop the run).
    pub extrusion_gaps: Vec<ExtrusionGap>,
    /// Rigid inserts bonded to the rubber.
    pub inserts: Vec<Insert>,
    /// Sets whose reaction moment is reported, with the point it is taken
    /// about (length units; 2-D: the moment about the out-of-plane axis).
    pub moment_points: std::collections::BTreeMap<String, [f64; 3]>,
    /// Linear solver settings.
    pub linear: LinearSettings,
    /// Which fields each converged increment keeps.
    pub output: OutputSettings,
}

impl Model {
    /// A model with one region holding every element, and no stages yet.
    pub fn single_region(mesh: Mesh, analysis: Analysis, material: Arc<Material>, formulation: Formulation) -> Self {
        let elements = (0..mesh.element_count()).collect();
        Model {
            mesh,
            analysis,
            regions: vec![Region { name: "all".into(), elements, material, formulation }],
            stages: Vec::new(),
            rigid: Vec::new(),
            fluids: Vec::new(),
            glands: Vec::new(),
            extrusion_gaps: Vec::new(),
            inserts: Vec::new(),
            moment_points: Default::default(),
            linear: LinearSettings::default(),
            output: OutputSettings::default(),
        }
    }
}
