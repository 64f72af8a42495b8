//! The job file as written by the user: serde structures for olli's TOML
//! job format, with every unknown key rejected.
//!
//! This module only describes the file. [`super::build`] checks it against
//! the mesh (sets exist, materials exist, components fit the analysis) and
//! turns it into a solver model.

use std::collections::BTreeMap;
use std::path::PathBuf;

use serde::Deserialize;
use toml::Spanned;

/// A whole job file.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct JobFile {
    /// Free text shown in results and logs.
    #[serde(default)]
    pub title: String,
    /// What kind of analysis the mesh describes.
    pub analysis: Spanned<AnalysisKind>,
    /// Out-of-plane thickness for `plane-strain` (length units; default 1).
    pub thickness: Option<Spanned<f64>>,
    /// Where the mesh comes from.
    pub mesh: Spanned<toml::Table>,
    /// Extra sets built from geometry.
    #[serde(default)]
    pub select: Vec<Spanned<SelectSpec>>,
    /// Material tables by name.
    pub materials: Spanned<BTreeMap<String, Spanned<toml::Table>>>,
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
    /// Total forces on node sets.
    #[serde(default)]
    pub force: Vec<Spanned<ForceSpec>>,
    /// Body forces per unit reference volume.
    #[serde(default)]
    pub body_force: Vec<Spanned<BodyForceSpec>>,
    /// Load stages, run in order.
    pub stage: Vec<Spanned<StageSpec>>,
    /// What to write and where.
    #[serde(default)]
    pub output: OutputSpec,
}

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

/// A geometric selection that defines a new node or side set.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SelectSpec {
    /// Name of the new set.
    pub name: String,
    /// Build a node set (`"nodes"`, default) or a side set (`"sides"`).
    #[serde(default)]
    pub kind: SetKind,
    /// Only consider nodes or sides of this existing set (default: the whole boundary for sides, all nodes for nodes).
    pub within: Option<String>,
    /// Distance tolerance for `plane`, `line`, `cylinder` and `circle` (length units; default 1e-6 × model size).
    pub tolerance: Option<f64>,
    /// Axis-aligned box: `{ min = [..], max = [..] }`.
    #[serde(rename = "box")]
    pub inside_box: Option<BoxSpec>,
    /// Plane (3-D) through `point` with `normal`.
    pub plane: Option<PlaneSpec>,
    /// Line (2-D) through `point` along `direction`.
    pub line: Option<LineSpec>,
    /// Cylinder surface (3-D): axis through `point` along `axis`, `radius`.
    pub cylinder: Option<CylinderSpec>,
    /// Circle (2-D): `center`, `radius`.
    pub circle: Option<CircleSpec>,
    /// The single node nearest to this point.
    pub nearest: Option<Vec<f64>>,
    /// Set algebra on existing sets of the same kind.
    pub union: Option<Vec<String>>,
    pub intersection: Option<Vec<String>>,
    /// `["a", "b", ...]`: members of `a` not in any of the others.
    pub difference: Option<Vec<String>>,
}

#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum SetKind {
    #[default]
    Nodes,
    Sides,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BoxSpec {
    pub min: Vec<f64>,
    pub max: Vec<f64>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PlaneSpec {
    pub point: Vec<f64>,
    pub normal: Vec<f64>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LineSpec {
    pub point: Vec<f64>,
    pub direction: Vec<f64>,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CylinderSpec {
    pub point: Vec<f64>,
    pub axis: Vec<f64>,
    pub radius: f64,
}

#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CircleSpec {
    pub center: Vec<f64>,
    pub radius: f64,
}

/// Material assignment.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RegionSpec {
    /// Element set (`"all"` for every element).
    pub elements: String,
    /// Name of a table under `[materials]`.
    pub material: String,
    /// `"mixed"` (u–p, default: no volumetric locking) or `"displacement"`.
    #[serde(default)]
    pub formulation: FormulationKind,
}

#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum FormulationKind {
    #[default]
    Mixed,
    Displacement,
}

/// Components held at zero for the whole run.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SupportSpec {
    /// Node set (or side or element set: its nodes).
    pub nodes: String,
    /// Components: `"x"`, `"y"`, `"z"` (axisymmetric: `"r"`, `"z"`).
    pub fix: Vec<String>,
}

/// Displacement components reached at the end of `stage`, ramped linearly
/// from their value at the stage start; held afterwards.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MotionSpec {
    pub nodes: String,
    /// Stage name (default: the first stage).
    pub stage: Option<String>,
    /// Component → displacement (length units), e.g. `{ x = 0.0, z = -2.0 }`.
    pub displacement: BTreeMap<String, f64>,
}

/// Follower pressure (stress units) on a side set, positive pushing into the material.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PressureSpec {
    pub sides: String,
    pub stage: Option<String>,
    pub value: f64,
}

/// Total force (force units; axisymmetric: over the full 2π) on a node set.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ForceSpec {
    pub nodes: String,
    pub stage: Option<String>,
    pub total: BTreeMap<String, f64>,
}

/// Body force per unit reference volume (force / length³), e.g. ρ·g.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BodyForceSpec {
    /// Element set (default `"all"`).
    pub elements: Option<String>,
    pub stage: Option<String>,
    pub per_volume: BTreeMap<String, f64>,
}

/// One load stage and its increment controls (fractions of the stage).
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StageSpec {
    pub name: String,
    /// First increment as a fraction of the stage (default 0.1).
    pub first_increment: Option<f64>,
    /// Smallest increment before the run stops (default 1e-5).
    pub min_increment: Option<f64>,
    /// Largest increment (default 0.25).
    pub max_increment: Option<f64>,
    /// Newton iterations allowed per increment before a cutback (default 20).
    pub max_iterations: Option<usize>,
    /// Out-of-balance force relative to the force scale (default 1e-6).
    pub force_tolerance: Option<f64>,
}

/// What to write.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct OutputSpec {
    /// Result folder, relative to the job file (default `"results/<job name>"`; `--output` overrides).
    pub folder: Option<PathBuf>,
    /// Write a `.vtu` every n-th converged increment (default 1); the last increment of every stage is always written.
    #[serde(default = "one")]
    pub every: usize,
}

impl Default for OutputSpec {
    fn default() -> Self {
        OutputSpec {
            folder: None,
            every: 1,
        }
    }
}

fn one() -> usize {
    1
}
