//! `olli check`: what a job holds and what may go wrong with it, found
//! without solving: counts, sets and their sizes, each material's
//! small-strain moduli and its Drucker stability over the stretches the job
//! may reach, mesh quality, and nearly incompressible materials on
//! displacement-only elements.

use std::fmt;

use olli_mesh::{summary, MeshSummary};

use super::build::Job;
use crate::stability_text::{self, Concern, Reach};
use olli_solver::contact::Shape as RigidShape;
use olli_solver::material::homogeneous::{Mode, Settings};
use olli_solver::material::stability::{check_mode, mode_range_within, ModeStability};
use olli_solver::model::Formulation;

/// Poisson's ratio above which a material counts as nearly incompressible
/// for the locking warning (κ/μ above about 50; common practice).
pub const NEARLY_INCOMPRESSIBLE_POISSON: f64 = 0.49;

/// Largest principal stretch up to which stability is searched, whatever
/// the job: far enough to say how much room a material has beyond a job's
/// strains (rubber breaks well before a stretch of 10; common practice).
pub const STABILITY_SEARCH: f64 = 10.0;

/// Aspect ratio above which an element is reported (common practice).
pub const ASPECT_WARNING: f64 = 10.0;

/// One material's line in the report.
#[derive(Debug, Clone, PartialEq)]
pub struct MaterialCheck {
    /// The `[material.<name>]` table name.
    pub name: String,
    /// The model name as written in the job.
    pub model: String,
    /// Small-strain shear modulus μ, in stress units.
    pub shear_modulus: f64,
    /// Small-strain bulk modulus κ, in stress units.
    pub bulk_modulus: f64,
    /// Small-strain Poisson's ratio ν (dimensionless).
    pub poisson_ratio: f64,
    /// Small-strain Young's modulus E = 2μ(1 + ν), in stress units.
    pub young_modulus: f64,
    /// Drucker stability of the uniaxial, equibiaxial and planar tests up to
    /// principal stretches of [`STABILITY_SEARCH`], with the stretches of
    /// each test this job may reach.
    pub stability: Vec<(ModeStability, (f64, f64))>,
}

/// One rigid surface as it starts.
#[derive(Debug, Clone)]
pub struct RigidCheck {
    /// The `[[rigid]]` name.
    pub name: String,
    /// Shape kind: `line`, `arc`, `plane`, ... as in the job.
    pub shape: &'static str,
    /// The side set of the rubber it may touch.
    pub touches: String,
    /// Nodes of the touching side set.
    pub nodes: usize,
    /// Coulomb friction coefficient (0: frictionless).
    pub friction: f64,
    /// Smallest signed gap of those nodes at the start (negative: penetrating).
    pub min_gap: f64,
}

/// The whole report.
#[derive(Debug, Clone)]
pub struct CheckReport {
    /// The job's title.
    pub title: String,
    /// Analysis kind as written in the job (`3d`, `axisymmetric`, `plane-strain`).
    pub analysis: &'static str,
    /// Counts, extent and quality of the mesh.
    pub mesh: MeshSummary,
    /// Stage names, in run order.
    pub stages: Vec<String>,
    /// One line per material.
    pub materials: Vec<MaterialCheck>,
    /// One line per rigid surface.
    pub rigid: Vec<RigidCheck>,
    /// Stretch range of the stability check.
    pub stretch_range: (f64, f64),
    /// Things that will not stop the run but deserve a look.
    pub warnings: Vec<String>,
}

/// The stretch range the job may reach: at least 1/3 to 3 (the working range
/// of most rubber parts; common practice), widened to 1 + 2·d/h for the
/// largest prescribed displacement d over the smallest extent h of the part
/// (a shear or compression concentrated in that thickness; common practice).
pub fn stretch_range(job: &Job) -> (f64, f64) {
    let (lo, hi) = job.model.mesh.bounding_box();
    let dim = job.model.mesh.dimension;
    let h = (0..dim).map(|k| hi[k] - lo[k]).fold(f64::INFINITY, f64::min);
    let d = job
        .model
        .stages
        .iter()
        .flat_map(|s| &s.motions)
        .flat_map(|m| m.displacement.iter().flatten())
        .chain(job.model.stages.iter().flat_map(|s| &s.rigid_motions).flat_map(|m| m.translation.iter()))
        .chain(job.model.stages.iter().flat_map(|s| &s.rotations).flat_map(|m| m.translation.iter()))
        .fold(0.0f64, |a, &v| a.max(v.abs()));
    let top = if h > 0.0 { (1.0 + 2.0 * d / h).clamp(3.0, 20.0) } else { 3.0 };
    (1.0 / top, top)
}

/// Checks a loaded job.
pub fn check(job: &Job) -> CheckReport {
    let mesh = summary(&job.model.mesh);
    let range = stretch_range(job);
    let mut warnings: Vec<String> = job.mesh_notes.clone();
    let settings = Settings::default();
    let mut materials = Vec::new();
    for m in &job.materials {
        let mat = &m.material;
        let (mu, kappa, nu) = (mat.shear_modulus(), mat.bulk_modulus(), mat.poisson_ratio());
        let mut stability = Vec::new();
        for mode in [Mode::Uniaxial, Mode::Equibiaxial, Mode::Planar] {
            let (lo, hi) = mode_range_within(mode, STABILITY_SEARCH);
            let n = 60;
            let stretches: Vec<f64> = (0..=n).map(|i| lo * (hi / lo).powf(i as f64 / n as f64)).collect();
            let s = check_mode(mat, mode, &stretches, &settings);
            let reach = mode_range_within(mode, range.1);
            let job_reach = Reach { what: "this job's estimated stretches", range: reach };
            if stability_text::concern(&s, Some(job_reach)) == Concern::Within {
                warnings.push(format!("material `{}`, {}: {}", m.name, mode.name(), stability_text::verdict(&s, Some(job_reach))));
            }
            stability.push((s, reach));
        }
        if m.used_by.is_empty() {
            warnings.push(format!("material `{}` is assigned to no region", m.name));
        }
        if nu > NEARLY_INCOMPRESSIBLE_POISSON && m.formulations.contains(&Formulation::Displacement) {
            warnings.push(format!(
                "material `{}` is nearly incompressible (ν = {nu:.4}) but a region uses `formulation = \"displacement\"`: \
                 such elements lock and come out too stiff; use `formulation = \"mixed\"`",
                m.name
            ));
        }
        materials.push(MaterialCheck {
            name: m.name.clone(),
            model: m.model.clone(),
            shear_modulus: mu,
            bulk_modulus: kappa,
            poisson_ratio: nu,
            young_modulus: 2.0 * mu * (1.0 + nu),
            stability,
        });
    }
    let q = &mesh.quality;
    if !q.inverted.is_empty() {
        warnings.push(format!("{} inverted elements (first: {})", q.inverted.len(), q.inverted[0]));
    }
    if !q.degenerate.is_empty() {
        warnings.push(format!("{} badly distorted elements (Jacobian ratio below 0.05)", q.degenerate.len()));
    }
    if q.max_aspect_ratio > ASPECT_WARNING {
        warnings.push(format!("largest element aspect ratio {:.1} (above {ASPECT_WARNING})", q.max_aspect_ratio));
    }
    if q.unreferenced_nodes > 0 {
        warnings.push(format!("{} nodes belong to no element", q.unreferenced_nodes));
    }
    if q.duplicate_nodes > 0 {
        warnings.push(format!("{} duplicate nodes (unconnected elements?)", q.duplicate_nodes));
    }
    let rigid = rigid_checks(job);
    for r in &rigid {
        if r.min_gap < -1e-9 * size(job) {
            warnings.push(format!(
                "rigid `{}` starts {:.4} inside the rubber (side set `{}`): the first increment pushes it out",
                r.name, -r.min_gap, r.touches
            ));
        }
    }
    CheckReport {
        rigid,
        title: job.title.clone(),
        analysis: job.kind.name(),
        mesh,
        stages: job.model.stages.iter().map(|s| s.name.clone()).collect(),
        materials,
        stretch_range: range,
        warnings,
    }
}

impl fmt::Display for CheckReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        writeln!(f, "job: {}", self.title)?;
        writeln!(f, "analysis: {}", self.analysis)?;
        // The same lines as `olli mesh info`: counts, sets, extent, quality.
        write!(f, "{}", self.mesh)?;
        writeln!(f, "stages: {}", self.stages.join(", "))?;
        writeln!(
            f,
            "estimated principal stretches of this job: {:.3} to {:.3} (Drucker stability searched to {STABILITY_SEARCH})",
            self.stretch_range.0, self.stretch_range.1
        )?;
        for mat in &self.materials {
            let reach = |s: &ModeStability, range: (f64, f64)| stability_text::concern(s, Some(Reach { what: "", range }));
            let stable = if mat.stability.iter().all(|(s, range)| reach(s, *range) != Concern::Within) {
                "Drucker-stable within this job's estimated stretches"
            } else {
                "loses Drucker stability within this job's estimated stretches"
            };
            writeln!(
                f,
                "material {} ({}): shear modulus {:.4}, bulk modulus {:.4}, Poisson's ratio {:.5}, Young's modulus {:.4}; {stable}",
                mat.name, mat.model, mat.shear_modulus, mat.bulk_modulus, mat.poisson_ratio, mat.young_modulus
            )?;
            for (s, range) in &mat.stability {
                if reach(s, *range) != Concern::Stable {
                    let what = Reach { what: "this job's estimated stretches", range: *range };
                    writeln!(f, "  {}: {}", s.mode.name(), stability_text::verdict(s, Some(what)))?;
                }
            }
        }
        for r in &self.rigid {
            writeln!(
                f,
                "rigid {} ({}): touches side set {} ({} nodes), friction {}, nearest start gap {:.4}",
                r.name, r.shape, r.touches, r.nodes, r.friction, r.min_gap
            )?;
        }
        for w in &self.warnings {
            writeln!(f, "warning: {w}")?;
        }
        Ok(())
    }
}

/// Diagonal of the mesh's bounding box.
fn size(job: &Job) -> f64 {
    let (lo, hi) = job.model.mesh.bounding_box();
    (0..3).map(|k| (hi[k] - lo[k]).powi(2)).sum::<f64>().sqrt()
}

/// Each rigid body against its side set's nodes, in the starting position.
fn rigid_checks(job: &Job) -> Vec<RigidCheck> {
    let mesh = &job.model.mesh;
    job.model
        .rigid
        .iter()
        .map(|b| {
            let nodes = mesh.side_set_nodes(&b.sides).unwrap_or_default();
            let min_gap = nodes
                .iter()
                .filter_map(|&n| b.shape.project_local(&nalgebra::Vector3::from(mesh.nodes[n])).map(|p| p.gap))
                .fold(f64::INFINITY, f64::min);
            RigidCheck {
                name: b.name.clone(),
                shape: match b.shape {
                    RigidShape::Line { .. } => "line",
                    RigidShape::Profile(_) => "profile",
                    RigidShape::Plane { .. } => "plane",
                    RigidShape::Cylinder { .. } => "cylinder",
                    RigidShape::Sphere { .. } => "sphere",
                },
                touches: b.sides.clone(),
                nodes: nodes.len(),
                friction: b.friction,
                min_gap: if min_gap.is_finite() { min_gap } else { 0.0 },
            }
        })
        .collect()
}
