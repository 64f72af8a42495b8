//! The job file as written by the user: serde structures for olli's TOML
//! job format, with every unknown key rejected.
//!
//! This module only describes the file. [`super::build`] checks it against
//! the mesh (sets exist, materials exist, components fit the analysis) and
//! turns it into a solver model. Defaults and units of every key are listed
//! in the README's job-file reference.

use std::collections::BTreeMap;
use std::path::PathBuf;

use olli_mesh::select::Selection;
use serde::Deserialize;
use toml::Spanned;

/// A whole job file.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct JobFile {
    /// Free text shown in results and logs. Default: the job file's name.
    #[serde(default)]
    pub title: String,
    /// What kind of analysis the mesh describes.
    pub analysis: Spanned<AnalysisKind>,
    /// Out-of-plane thickness for `plane-strain` (length units; default 1).
    pub thickness: Option<Spanned<f64>>,
    /// Where the mesh comes from: a generator table (`generate = "..."`) or `file = "..."`.
    pub mesh: Spanned<toml::Table>,
    /// Extra sets built from geometry.
    #[serde(default)]
    pub select: Vec<Spanned<SelectSpec>>,
    /// Material tables by name.
    pub materials: Spanned<BTreeMap<String, Spanned<MaterialTable>>>,
    /// Which elements are made of which material.
    pub region: Vec<Spanned<RegionSpec>>,
    /// Components held at zero displacement for the whole run.
    #[serde(default)]
    pub support: Vec<Spanned<SupportSpec>>,
    /// Prescribed displacements ramped within a stage.
    #[serde(default)]
    pub motion: Vec<Spanned<MotionSpec>>,
    /// Follower pressures on side sets.
    #[serde(default)]
    pub pressure: Vec<Spanned<PressureSpec>>,
    /// Fluids that wet the rubber wherever contact lets them in.
    #[serde(default)]
    pub fluid: Vec<Spanned<FluidSpec>>,
    /// Total forces on sets.
    #[serde(default)]
    pub force: Vec<Spanned<ForceSpec>>,
    /// Body force per unit reference volume on every element.
    #[serde(default)]
    pub body_force: Vec<Spanned<BodyForceSpec>>,
    /// Rigid (metal) surfaces the rubber touches.
    #[serde(default)]
    pub rigid: Vec<Spanned<RigidSpec>>,
    /// Rigid metal parts bonded to node sets.
    #[serde(default)]
    pub insert: Vec<Spanned<InsertSpec>>,
    /// Seal glands (2-D) whose fill and squeeze are reported.
    #[serde(default)]
    pub gland: Vec<Spanned<GlandSpec>>,
    /// Clearance gaps whose extrusion is reported (and may stop the run).
    #[serde(default)]
    pub extrusion: Vec<Spanned<ExtrusionSpec>>,
    /// Load stages, run in order.
    pub stage: Vec<Spanned<StageSpec>>,
    /// What to write and where.
    #[serde(default)]
    pub output: OutputSpec,
}

/// The kind of analysis, `analysis = "..."` in the job.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
pub enum AnalysisKind {
    /// Full 3-D solid.
    #[serde(rename = "3d")]
    Solid,
    /// Axisymmetric r–z section (x = r, y = z); forces over the full 2π.
    #[serde(rename = "axisymmetric")]
    Axisymmetric,
    /// Plane-strain x–y section with a thickness.
    #[serde(rename = "plane-strain")]
    PlaneStrain,
}

impl AnalysisKind {
    /// Component names as written in the job file and in `history.csv`.
    pub fn components(self) -> &'static [&'static str] {
        match self {
            AnalysisKind::Solid => &["x", "y", "z"],
            AnalysisKind::Axisymmetric => &["r", "z"],
            AnalysisKind::PlaneStrain => &["x", "y"],
        }
    }

    /// The name as written in the job file.
    pub fn name(self) -> &'static str {
        match self {
            AnalysisKind::Solid => "3d",
            AnalysisKind::Axisymmetric => "axisymmetric",
            AnalysisKind::PlaneStrain => "plane-strain",
        }
    }
}

/// A geometric selection that defines a new set: give exactly one of
/// `nodes`, `sides` or `elements`. Selections are the mesh crate's
/// ([`Selection`]): `{ plane = { point = [..], normal = [..] } }`,
/// `{ box = { min = [..], max = [..] } }`, `{ set = "name" }`,
/// `{ union = [..] }`, ...
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SelectSpec {
    /// Name of the new set.
    pub name: String,
    /// Nodes in the region.
    pub nodes: Option<Selection>,
    /// Boundary sides whose nodes are all in the region.
    pub sides: Option<Selection>,
    /// Elements whose nodes are all in the region.
    pub elements: Option<Selection>,
    /// Distance tolerance (length units; default 1e-6 × the mesh's bounding-box diagonal).
    pub tolerance: Option<f64>,
}

/// One material table: a model name, its constants and a volumetric law.
/// The constant names are those of [`olli_solver::material::registry::ALL_CONSTANTS`]
/// (a unit test keeps the two lists equal).
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MaterialTable {
    /// Model name, e.g. `"neo-hookean"`, `"mooney-rivlin"`, `"ogden"`.
    pub model: Spanned<String>,
    /// `"quadratic"` (default), `"logarithmic"` or `"simo-taylor"`.
    pub volumetric: Option<Spanned<String>>,
    /// Initial shear modulus μ (stress units); neo-Hookean, eight-chain, Gent.
    pub shear_modulus: Option<Spanned<f64>>,
    /// Constant C10 of the neo-Hookean, Mooney–Rivlin and Yeoh laws (stress units).
    pub c10: Option<Spanned<f64>>,
    /// Mooney–Rivlin constant C01 (stress units).
    pub c01: Option<Spanned<f64>>,
    /// Yeoh constant C20 (stress units).
    pub c20: Option<Spanned<f64>>,
    /// Yeoh constant C30 (stress units).
    pub c30: Option<Spanned<f64>>,
    /// Locking stretch λ_m of the eight-chain law (dimensionless, > 1).
    pub locking_stretch: Option<Spanned<f64>>,
    /// Gent extensibility limit J_m (dimensionless, > 0).
    pub extensibility_limit: Option<Spanned<f64>>,
    /// Ogden moduli, one per term.
    pub mu: Option<Spanned<Vec<f64>>>,
    /// Ogden exponents, one per term.
    pub alpha: Option<Spanned<Vec<f64>>>,
    /// Bulk modulus κ (stress units); give this or `poisson_ratio`.
    pub bulk_modulus: Option<Spanned<f64>>,
    /// Poisson's ratio ν (just below 0.5 for rubber); give this or `bulk_modulus`.
    pub poisson_ratio: Option<Spanned<f64>>,
    /// Prony series `[[g_i, tau_i], ...]` (modulus ratio, relaxation time in
    /// the job's time unit) making the isochoric part viscoelastic; the
    /// model's constants are then the instantaneous ones. Default: none.
    pub prony: Option<Spanned<Vec<Vec<f64>>>>,
    /// Mullins softening after the first loading (Ogden–Roxburgh 1999):
    /// `{ r = ..., m = ..., beta = ... }`. Default: none.
    pub mullins: Option<Spanned<MullinsSpec>>,
}

/// The constants of Ogden–Roxburgh softening (their names in the paper).
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MullinsSpec {
    /// r (> 1): the largest softening leaves 1 − 1/r of the stress.
    pub r: f64,
    /// m (stress units, > 0): the energy scale of the softening.
    pub m: f64,
    /// β (≥ 0, default 0): softening that grows with the largest energy.
    #[serde(default)]
    pub beta: f64,
}

impl MaterialTable {
    /// The constants given, by name, with their spans, in the registry's
    /// order; a list constant (Ogden's `mu`, `alpha`) gives one entry per
    /// term, each with the span of the whole array.
    pub fn constants(&self) -> Vec<(&'static str, f64, std::ops::Range<usize>)> {
        let scalar = |k, v: &Option<Spanned<f64>>| v.iter().map(move |v| (k, *v.get_ref(), v.span())).collect::<Vec<_>>();
        let list = |k, v: &Option<Spanned<Vec<f64>>>| {
            v.iter().flat_map(|v| v.get_ref().iter().map(move |&x| (k, x, v.span()))).collect::<Vec<_>>()
        };
        [
            scalar("shear_modulus", &self.shear_modulus),
            scalar("c10", &self.c10),
            scalar("c01", &self.c01),
            scalar("c20", &self.c20),
            scalar("c30", &self.c30),
            scalar("locking_stretch", &self.locking_stretch),
            scalar("extensibility_limit", &self.extensibility_limit),
            list("mu", &self.mu),
            list("alpha", &self.alpha),
            scalar("bulk_modulus", &self.bulk_modulus),
            scalar("poisson_ratio", &self.poisson_ratio),
        ]
        .concat()
    }
}

/// Material assignment.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RegionSpec {
    /// Element set (`"all"` for every element).
    pub elements: Spanned<String>,
    /// Name of a table under `[materials]`.
    pub material: Spanned<String>,
    /// `"mixed"` (u–p, default: no volumetric locking), `"element-pressure"`
    /// (u–p with the pressure condensed per element, tet10 as P2/P0) or
    /// `"displacement"`.
    #[serde(default)]
    pub formulation: FormulationKind,
}

/// Element formulation of a region.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum FormulationKind {
    /// Displacement with the element's own pressure (default; for nearly incompressible rubber): per element, continuous for tet10.
    #[default]
    Mixed,
    /// Displacement only (locks when the material is nearly incompressible).
    Displacement,
    /// Mixed with the pressure condensed in every element (tet10 as P2/P0
    /// instead of its continuous Taylor–Hood pressure).
    ElementPressure,
}

/// Components held at zero for the whole run.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SupportSpec {
    /// Node set (or side or element set: its nodes).
    pub nodes: Spanned<String>,
    /// Components: `"x"`, `"y"`, `"z"` (axisymmetric: `"r"`, `"z"`).
    pub fix: Spanned<Vec<String>>,
    /// Report the moment of the reaction about this point (3-D, plane strain).
    pub moment_about: Option<Spanned<Vec<f64>>>,
    /// Stage from whose start the components are held (default: the first
    /// stage, held at zero); a later stage holds them where they are then.
    pub stage: Option<Spanned<String>>,
    /// Stage (after the first) at whose start the components are let go,
    /// their reaction ramped to zero over that stage (default: held throughout).
    pub release: Option<Spanned<String>>,
}

/// Displacement components reached at the end of `stage`, ramped linearly
/// from their value at the stage start; held afterwards.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MotionSpec {
    /// Node set (or side or element set: its nodes).
    pub nodes: Spanned<String>,
    /// Stage name (default: the first stage).
    pub stage: Option<Spanned<String>>,
    /// Component → displacement (length units), e.g. `{ x = 0.0, z = -2.0 }`;
    /// beside `rotation`, the translation made during the stage (unnamed
    /// components: none).
    pub displacement: Option<Spanned<BTreeMap<String, f64>>>,
    /// A rigid turn of the set during its stage, along exact arcs.
    pub rotation: Option<Spanned<RotationSpec>>,
    /// Report the moment of the reaction about this point (3-D, plane
    /// strain; default for a motion with `rotation`: its `center`).
    pub moment_about: Option<Spanned<Vec<f64>>>,
    /// How the load changes over its stage: `"linear"` (default), `"step"`
    /// (all at once), or a table `[[t, fraction], ...]` of stage fraction t.
    pub ramp: Option<Spanned<RampSpec>>,
    /// Stage (after `stage`) at whose start the components are let go, their
    /// reaction ramped to zero over that stage (default: held afterwards).
    pub release: Option<Spanned<String>>,
}

/// A rigid turn of a motion's node set, made during the motion's stage from
/// the nodes' positions at the stage start: `angle` (degrees, right-handed
/// about `axis`) about the axis through `center`.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RotationSpec {
    /// Degrees turned during the stage.
    pub angle: f64,
    /// Direction of the axis (3-D; 2-D turns about the out-of-plane axis and takes none).
    pub axis: Option<Vec<f64>>,
    /// A point on the axis (2 coordinates in 2-D, 3 in 3-D).
    pub center: Vec<f64>,
}

/// Follower pressure (stress units) on a side set, positive pushing into the material.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PressureSpec {
    /// Name of the `applied_<name>_pressure` column (default: the side set's name).
    pub name: Option<Spanned<String>>,
    /// Side set the pressure acts on.
    pub sides: Spanned<String>,
    /// Stage name (default: the first stage).
    pub stage: Option<Spanned<String>>,
    /// Pressure reached at the end of the stage, in stress units.
    pub value: f64,
    /// How the load changes over its stage: `"linear"` (default), `"step"`
    /// (all at once), or a table `[[t, fraction], ...]` of stage fraction t.
    pub ramp: Option<Spanned<RampSpec>>,
}

/// A fluid entering at `source` and wetting the facets of `sides` that it can
/// reach (facets open or pressed less hard than the fluid), with the pressure
/// (stress units) reached at the end of `stage`.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FluidSpec {
    /// Name of the fluid: columns `fluid_<name>_...`; tables of one name in
    /// several stages are one fluid.
    pub name: Spanned<String>,
    /// Side set the fluid may wet.
    pub sides: Spanned<String>,
    /// A point on `sides` (reference position) where the fluid enters.
    pub source: Spanned<Vec<f64>>,
    /// Stage name (default: the first stage).
    pub stage: Option<Spanned<String>>,
    /// Pressure reached at the end of the stage.
    pub pressure: Spanned<f64>,
    /// How the pressure changes over its stage (as for loads).
    pub ramp: Option<Spanned<RampSpec>>,
}

/// Total force (force units; axisymmetric: over the full 2π) on a set: spread
/// over the sides of a side set, split equally among the nodes of a node set.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ForceSpec {
    /// Node or side set the force acts on.
    pub set: Spanned<String>,
    /// Stage name (default: the first stage).
    pub stage: Option<Spanned<String>>,
    /// Component → total force reached at the end of the stage, e.g. `{ z = -100.0 }`.
    pub total: Spanned<BTreeMap<String, f64>>,
    /// How the load changes over its stage: `"linear"` (default), `"step"`
    /// (all at once), or a table `[[t, fraction], ...]` of stage fraction t.
    pub ramp: Option<Spanned<RampSpec>>,
}

/// Body force per unit reference volume (force / length³), e.g. ρ·g, on every element.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BodyForceSpec {
    /// Stage name (default: the first stage).
    pub stage: Option<Spanned<String>>,
    /// Component → force per unit reference volume, e.g. `{ z = -9.81e-6 }`.
    pub per_volume: Spanned<BTreeMap<String, f64>>,
    /// How the load changes over its stage: `"linear"` (default), `"step"`
    /// (all at once), or a table `[[t, fraction], ...]` of stage fraction t.
    pub ramp: Option<Spanned<RampSpec>>,
}

/// One load stage and its increment controls (fractions of the stage).
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StageSpec {
    /// Stage name, used by loads, motions and rigid moves to refer to it.
    pub name: Spanned<String>,
    /// Time the stage takes (job's time unit; default: none, the stage is
    /// instantaneous). A stage with a duration needs no load: it holds the
    /// motions while viscoelastic materials relax.
    pub duration: Option<Spanned<f64>>,
    /// A small-amplitude harmonic stage about the state reached so far:
    /// `{ frequencies = [...] }` (cycles per time unit).
    pub harmonic: Option<Spanned<HarmonicSpec>>,
    /// First increment as a fraction of the stage (default 0.1).
    pub first_increment: Option<f64>,
    /// Smallest increment before the run stops (default 1e-5).
    pub min_increment: Option<f64>,
    /// Largest increment (default 0.25).
    pub max_increment: Option<f64>,
    /// Newton iterations allowed per increment before a cutback (default 15).
    pub max_iterations: Option<usize>,
    /// Out-of-balance force relative to the force scale (default 1e-6).
    pub force_tolerance: Option<f64>,
    /// Stabilisation factor for parts held only by contact (dimensionless,
    /// default 0: none; try 1e-3). Ties each node weakly to where it was at the
    /// last converged increment.
    pub stabilization: Option<f64>,
    /// What drives the increments: `"load"` (default, the load factor) or
    /// `"arc-length"` (a length along the equilibrium path, past limit
    /// points), the latter for stages driven by forces, pressures or fluids.
    pub control: Option<Spanned<String>>,
    /// Arc-length stages: increments allowed before the run stops short of
    /// the stage's loads (default 100).
    pub max_increments: Option<Spanned<usize>>,
}

/// The frequencies of a harmonic stage.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct HarmonicSpec {
    /// Frequencies (cycles per time unit), each positive.
    pub frequencies: Vec<f64>,
}

/// What to write.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct OutputSpec {
    /// Result folder, relative to the job file (default `"results/<job name>"`; `--output` overrides).
    pub folder: Option<PathBuf>,
    /// Write a `.vtu` every n-th converged increment (default 1); the last increment of every stage is always written.
    #[serde(default = "one")]
    pub every: Spanned<usize>,
    /// Arrays written to the `.vtu` files (default: all of them).
    pub fields: Option<Spanned<Vec<String>>>,
}

impl Default for OutputSpec {
    fn default() -> Self {
        OutputSpec { folder: None, every: one(), fields: None }
    }
}

fn one() -> Spanned<usize> {
    Spanned::new(0..0, 1)
}

#[cfg(test)]
mod tests {
    use super::*;
    use olli_solver::material::registry::{ALL_CONSTANTS, LIST_CONSTANTS};

    #[test]
    fn material_table_knows_every_registry_constant() {
        let mut t = String::from("model = \"neo-hookean\"\n");
        for k in ALL_CONSTANTS {
            let value = if LIST_CONSTANTS.contains(k) { "[1.0]" } else { "1.0" };
            t.push_str(&format!("{k} = {value}\n"));
        }
        let m: MaterialTable = toml::from_str(&t).unwrap();
        let names: Vec<&str> = m.constants().iter().map(|(k, _, _)| *k).collect();
        assert_eq!(names, ALL_CONSTANTS);
    }
}

/// A rigid surface: one shape, the rubber side set it touches, friction,
/// and its motion per stage.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RigidSpec {
    /// Name used in `history.csv` (`rigid_<name>_...`) and the summary.
    pub name: Spanned<String>,
    /// Side set of the rubber that may touch this surface.
    pub touches: Spanned<String>,
    /// Coulomb friction coefficient (default 0: frictionless).
    #[serde(default)]
    pub friction: f64,
    /// 2-D: an infinite line `{ point = [x, y], direction = [dx, dy] }`.
    pub line: Option<Spanned<RigidLine>>,
    /// 2-D: a chain of straight segments through these points, with corner
    /// radius `fillet` at every interior corner (a groove, a housing).
    pub polyline: Option<Spanned<Vec<[f64; 2]>>>,
    /// Corner radius of `polyline` (length units; default 0: sharp corners).
    pub fillet: Option<f64>,
    /// 2-D: a circular arc `{ center = [x, y], radius, from = deg, to = deg }`,
    /// counter-clockwise from `from` to `to`.
    pub arc: Option<Spanned<RigidArc>>,
    /// 3-D: a plane `{ point = [x, y, z], normal = [nx, ny, nz] }`.
    pub plane: Option<Spanned<RigidPlane>>,
    /// 3-D: a circular cylinder `{ point = [..], axis = [..], radius }` (a shaft or a bore).
    pub cylinder: Option<Spanned<RigidCylinder>>,
    /// 3-D: a sphere `{ center = [..], radius }`.
    pub sphere: Option<Spanned<RigidSphere>>,
    /// A point inside the rubber, which fixes the side of the surface the
    /// rubber is on (default: the centroid of the `touches` nodes).
    pub rubber_point: Option<Vec<f64>>,
    /// Normal penalty (stress / length; default 50 μ / h with the local side size h).
    pub penalty: Option<f64>,
    /// Penetration allowed, as a fraction of the local side size (default 0.001).
    pub penetration_tolerance: Option<f64>,
    /// Centre of rotations (default: the origin).
    pub rotation_center: Option<Vec<f64>>,
    /// 3-D: axis of rotations (default z).
    pub rotation_axis: Option<Vec<f64>>,
    /// Translation reached at the end of each named stage, from the surface's
    /// original position: `move = { squeeze = [0.0, -0.8] }`. Held afterwards.
    #[serde(rename = "move")]
    pub moves: Option<Spanned<BTreeMap<String, Vec<f64>>>>,
    /// Rotation (degrees) reached at the end of each named stage: `rotate = { tilt = 5.0 }`.
    pub rotate: Option<Spanned<BTreeMap<String, f64>>>,
    /// How each stage's move or turn is spread over the stage (as for loads).
    pub ramp: Option<Spanned<RampSpec>>,
    /// Number of connected contact bands reported in `history.csv`
    /// (`rigid_<name>_band<k>_...`, numbered along the surface; default 0).
    pub bands: Option<Spanned<i64>>,
}

/// A seal's gland in a 2-D section: the groove a rigid profile forms and the
/// rigid surface that closes it.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GlandSpec {
    /// Name of the gland: columns `gland_<name>_...`.
    pub name: Spanned<String>,
    /// The `[[rigid]]` surface (a `polyline` or `arc`) forming the groove.
    pub groove: Spanned<String>,
    /// The `[[rigid]]` surface closing the groove (a bore, a cover).
    pub closed_by: Spanned<String>,
}

/// The edge of a clearance gap a seal may extrude into.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ExtrusionSpec {
    /// Name of the gap: column `extrusion_<name>_depth`.
    pub name: Spanned<String>,
    /// The gap's edge (reference position).
    pub edge: Spanned<Vec<f64>>,
    /// Direction from the edge into the gap.
    pub into: Spanned<Vec<f64>>,
    /// `[[rigid]]` surface whose motion the edge follows (default: fixed).
    pub follows: Option<Spanned<String>>,
    /// Set whose nodes are measured (default: every node).
    pub nodes: Option<Spanned<String>>,
    /// Intrusion beyond which the run stops (default: none).
    pub max_depth: Option<Spanned<f64>>,
}

/// A straight rigid line in 2-D.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RigidLine {
    /// Any point on the line (length units).
    pub point: [f64; 2],
    /// Direction along the line (any non-zero length).
    pub direction: [f64; 2],
}

/// A rigid circular arc in 2-D.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RigidArc {
    /// Centre of the arc (length units).
    pub center: [f64; 2],
    /// Radius of the arc (length units).
    pub radius: f64,
    /// Start angle, degrees from the +x (r) axis.
    pub from: f64,
    /// End angle, degrees (counter-clockwise from `from`).
    pub to: f64,
}

/// A rigid plane in 3-D.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RigidPlane {
    /// Any point on the plane (length units).
    pub point: [f64; 3],
    /// Normal of the plane, pointing to the rubber (any non-zero length).
    pub normal: [f64; 3],
}

/// A rigid circular cylinder in 3-D.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RigidCylinder {
    /// Any point on the cylinder's axis (length units).
    pub point: [f64; 3],
    /// Direction of the axis (any non-zero length).
    pub axis: [f64; 3],
    /// Radius of the cylinder (length units).
    pub radius: f64,
}

/// A rigid sphere in 3-D.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RigidSphere {
    /// Centre of the sphere (length units).
    pub center: [f64; 3],
    /// Radius of the sphere (length units).
    pub radius: f64,
}

/// A load ramp as written: a name or a table of (stage fraction, fraction).
#[derive(Debug, Clone, Deserialize)]
#[serde(untagged)]
pub enum RampSpec {
    /// `"linear"` or `"step"`.
    Named(String),
    /// Rows `[t, fraction]`: stage fraction t and the load fraction reached there.
    Table(Vec<[f64; 2]>),
}

/// Per stage name, components and their values: `{ push = { z = 2.0 } }`.
pub type StageComponents = Spanned<BTreeMap<String, Spanned<BTreeMap<String, f64>>>>;

/// A rigid metal part (pin, sleeve, plate) bonded to a node set. Per stage
/// and component it is moved (`move`, `turn`), loaded (`force`, `moment`)
/// or keeps its earlier state; components never named are held at zero
/// unless listed in `free`.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct InsertSpec {
    /// Name used in `history.csv` (`insert_<name>_...`) and the summary.
    pub name: Spanned<String>,
    /// Node (or side or element) set bonded to the insert.
    pub nodes: Spanned<String>,
    /// Reference point: rotations and moments are about it.
    pub reference: Spanned<Vec<f64>>,
    /// Translations (length units) reached at the end of each named stage.
    #[serde(rename = "move")]
    pub moves: Option<StageComponents>,
    /// Rotations (degrees) about the reference point's axes reached at the end of each named stage.
    pub turn: Option<StageComponents>,
    /// Applied forces (force units) reached at the end of each named stage; the component moves freely.
    pub force: Option<StageComponents>,
    /// Applied moments about the reference point reached at the end of each named stage.
    pub moment: Option<StageComponents>,
    /// Components free (unloaded) from the start: `["rx", "ry"]`.
    pub free: Option<Spanned<Vec<String>>>,
    /// How each stage's change is spread over the stage (as for loads).
    pub ramp: Option<Spanned<RampSpec>>,
}
