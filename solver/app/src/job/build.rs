//! Turns a parsed job file into a solver [`Model`]: resolves set, material
//! and stage names (suggesting the nearest name for a misspelling), checks
//! values, and assigns every load to its stage. Every error points at the
//! table or key at fault in the job file.

use std::collections::BTreeMap;
use std::ops::Range;
use std::path::{Path, PathBuf};
use std::sync::Arc;

use olli_mesh::Mesh;
use toml::Spanned;

use super::applied::{applied_columns, AppliedColumn};
use super::diagnostics::{nearest, InputError};
use super::mesh_source::{all_set_names, apply_selections, mesh_from_table};
use super::schema::{AnalysisKind, FormulationKind, JobFile, MaterialTable};
use olli_solver::assembly::Discretization;
use olli_solver::error::SolveError;
use olli_solver::linear::LinearSettings;
use olli_solver::material::{Material, MaterialError, Mullins, Prony, VolumetricForm};
use olli_solver::model::{Analysis, Formulation, Model, OutputSettings, Region};
use olli_solver::results::IncrementResult;

/// Names of the arrays a `.vtu` frame can hold (`[output] fields`).
pub const FIELD_NAMES: &[&str] = &[
    "displacement",
    "cauchy_stress",
    "pressure",
    "von_mises",
    "max_principal_log_strain",
    "energy_density",
    "reaction",
    "material",
    "volume_ratio",
    "element_pressure",
    "contact",
    "fluid_pressure",
];

/// One material of the job, built.
#[derive(Debug, Clone)]
pub struct JobMaterial {
    /// The `[material.<name>]` table name.
    pub name: String,
    /// The model name as written in the job (e.g. `neo-hookean`).
    pub model: String,
    /// The built constitutive law, shared by the regions using it.
    pub material: Arc<Material>,
    /// Regions (element sets) made of it.
    pub used_by: Vec<String>,
    /// Formulations of those regions.
    pub formulations: Vec<Formulation>,
}

/// What and where to write.
#[derive(Debug, Clone, PartialEq)]
pub struct OutputPlan {
    /// `[output] folder` resolved against the job file's folder, if given.
    pub folder: Option<PathBuf>,
    /// Write a frame every n-th increment (the last of each stage always).
    pub every: usize,
    /// Arrays to write, a subset of [`FIELD_NAMES`].
    pub fields: Vec<String>,
}

/// A checked job, ready to solve.
#[derive(Debug, Clone)]
pub struct Job {
    /// The job file as given.
    pub path: PathBuf,
    /// The job's title (shown in reports and the summary).
    pub title: String,
    /// Solid 3-D, axisymmetric or plane strain.
    pub kind: AnalysisKind,
    /// The solver model: mesh, regions, supports and load stages.
    pub model: Model,
    /// The materials, in file order.
    pub materials: Vec<JobMaterial>,
    /// Sets with supports or prescribed motions, in file order: their
    /// reactions go to `history.csv` and the summary.
    pub reaction_sets: Vec<String>,
    /// Rigid surfaces, in file order: their forces, contact width and peak
    /// pressure go to `history.csv` and the summary.
    pub rigid_names: Vec<String>,
    /// For each rigid surface (same order), the fluids whose side set shares
    /// nodes with the side set it touches: the fluids its seal holds back.
    pub rigid_fluids: Vec<Vec<String>>,
    /// For each rigid surface (same order), how many contact bands its
    /// `history.csv` columns report (`bands`, default 0).
    pub rigid_bands: Vec<usize>,
    /// Fluids, in file order: their pressure and wetted length or area go
    /// to `history.csv` and the summary.
    pub fluid_names: Vec<String>,
    /// The `applied_...` columns of `history.csv`.
    pub applied: Vec<AppliedColumn>,
    /// Inserts, in file order: their position, force and moment go to
    /// `history.csv` and the summary.
    pub insert_names: Vec<String>,
    /// Where and how often to write results.
    pub output: OutputPlan,
    /// Remarks of the mesh importer (reoriented elements, ...).
    pub mesh_notes: Vec<String>,
}

impl Job {
    /// Component names of this analysis (`x, y, z`; `r, z`; `x, y`).
    pub fn components(&self) -> &'static [&'static str] {
        self.kind.components()
    }

    /// The `history.csv` value columns: `reaction_<set>_<component>`.
    pub fn reaction_columns(&self) -> Vec<String> {
        self.reaction_sets.iter().flat_map(|s| self.components().iter().map(move |c| format!("reaction_{s}_{c}"))).collect()
    }

    /// Components of a reaction moment: x, y, z in 3-D, z in plane strain.
    pub fn moment_components(&self) -> &'static [&'static str] {
        match self.kind {
            AnalysisKind::Solid => &["x", "y", "z"],
            AnalysisKind::PlaneStrain => &["z"],
            AnalysisKind::Axisymmetric => &[],
        }
    }

    /// The reaction-moment columns: `reaction_<set>_moment_<component>` for
    /// each set with `moment_about`, in reaction-set order.
    pub fn moment_columns(&self) -> Vec<String> {
        self.reaction_sets
            .iter()
            .filter(|s| self.model.moment_points.contains_key(*s))
            .flat_map(|s| self.moment_components().iter().map(move |c| format!("reaction_{s}_moment_{c}")))
            .collect()
    }

    /// The rigid-surface columns of `history.csv`: `rigid_<name>_<component>`
    /// (force of the rubber on the surface), `rigid_<name>_contact_width`,
    /// `rigid_<name>_peak_pressure`, with fluids `rigid_<name>_sealing_margin`,
    /// and with `bands` the band count `rigid_<name>_bands` and per band
    /// `rigid_<name>_band<k>_contact_width`, `rigid_<name>_band<k>_peak_pressure`.
    pub fn rigid_columns(&self) -> Vec<String> {
        self.rigid_names
            .iter()
            .zip(&self.rigid_bands)
            .flat_map(|(n, &bands)| {
                let mut c: Vec<String> = self.components().iter().map(|c| format!("rigid_{n}_{c}")).collect();
                c.push(format!("rigid_{n}_contact_width"));
                c.push(format!("rigid_{n}_peak_pressure"));
                if !self.fluid_names.is_empty() {
                    c.push(format!("rigid_{n}_sealing_margin"));
                }
                if bands > 0 {
                    c.push(format!("rigid_{n}_bands"));
                }
                for k in 1..=bands {
                    c.push(format!("rigid_{n}_band{k}_contact_width"));
                    c.push(format!("rigid_{n}_band{k}_peak_pressure"));
                }
                c
            })
            .collect()
    }

    /// The gland and extrusion columns: `gland_<name>_fill`,
    /// `gland_<name>_squeeze` (percent) and `extrusion_<name>_depth`.
    pub fn seal_columns(&self) -> Vec<String> {
        let glands = self.model.glands.iter().flat_map(|g| [format!("gland_{}_fill", g.name), format!("gland_{}_squeeze", g.name)]);
        glands.chain(self.model.extrusion_gaps.iter().map(|x| format!("extrusion_{}_depth", x.name))).collect()
    }

    /// The fluid columns: `fluid_<name>_pressure` and
    /// `fluid_<name>_wetted_length` (2-D) or `fluid_<name>_wetted_area` (3-D).
    pub fn fluid_columns(&self) -> Vec<String> {
        let measure = if self.kind == AnalysisKind::Solid { "wetted_area" } else { "wetted_length" };
        self.fluid_names.iter().flat_map(|n| [format!("fluid_{n}_pressure"), format!("fluid_{n}_{measure}")]).collect()
    }

    /// The insert columns of `history.csv` with their units (see [`super::inserts::insert_columns`]).
    pub fn insert_columns(&self) -> Vec<(String, &'static str)> {
        self.insert_names.iter().flat_map(|n| super::inserts::insert_columns(self.kind, n)).collect()
    }

    /// Every value column of `history.csv`, in order: applied loads,
    /// reactions, rigid surfaces, fluids, glands and extrusion gaps, inserts,
    /// then the increment's peaks
    /// ([`PEAK_COLUMNS`]).
    pub fn history_columns(&self) -> Vec<String> {
        let mut c: Vec<String> = self.applied.iter().map(|a| a.name.clone()).collect();
        c.extend(self.reaction_columns());
        c.extend(self.moment_columns());
        c.extend(self.rigid_columns());
        c.extend(self.fluid_columns());
        c.extend(self.seal_columns());
        c.extend(self.insert_columns().into_iter().map(|(n, _)| n));
        c.extend(PEAK_COLUMNS.iter().map(|(n, _)| n.to_string()));
        c
    }

    /// The fluid pressure a rigid surface's seal holds back at increment `r`:
    /// the largest pressure of the fluids reaching its side set (0 if none).
    pub fn sealed_pressure(&self, rigid: usize, r: &IncrementResult) -> f64 {
        self.rigid_fluids[rigid].iter().filter_map(|n| r.fluids.iter().find(|f| &f.name == n)).map(|f| f.pressure).fold(0.0, f64::max)
    }
}

/// The last columns of `history.csv`, with their dimension: the extremes
/// over every integration point of the mesh at each converged increment.
pub const PEAK_COLUMNS: [(&str, &str); 3] = [
    ("peak_max_principal_log_strain", "strain (ln of stretch)"),
    ("peak_von_mises", "stress (force/length²)"),
    ("min_volume_ratio", "ratio (deformed/reference volume)"),
];

/// The key of a material table a material error is about: the constant at
/// fault, or `model` when the set of constants does not fit the model. Job
/// files and `olli material` point their messages at that key.
pub fn material_error_key(e: &MaterialError) -> Option<&str> {
    match e {
        MaterialError::InvalidParameter { name, .. }
        | MaterialError::DuplicateParameter { name, .. }
        | MaterialError::ConflictingParameters { other: name, .. } => Some(name),
        MaterialError::UnexpectedParameter { name, .. } => Some(name),
        MaterialError::InvalidCombination { .. } | MaterialError::MissingParameter { .. } => Some("model"),
        _ => None,
    }
}

/// The largest job file read: job files are a few kilobytes of TOML, so
/// anything beyond this is not one (a link to a device, a data file).
pub const JOB_FILE_LIMIT: u64 = 16 << 20;

/// Reads, parses and checks the job file at `path`.
pub fn load(path: &Path) -> Result<Job, InputError> {
    if path.to_string_lossy().ends_with(super::SWEEP_SUFFIX) {
        let message = "this is a sweep file, not a job: run it with `olli sweep`".to_string();
        return Err(InputError { file: path.to_path_buf(), position: None, message });
    }
    let source = InputError::read_text(path, "job file", JOB_FILE_LIMIT)?;
    load_str(path, &source)
}

/// Parses and checks job text; `path` names the file in messages and anchors relative paths.
pub fn load_str(path: &Path, source: &str) -> Result<Job, InputError> {
    let file: JobFile = toml::from_str(source).map_err(|e| InputError::from_toml(path, source, &e))?;
    Builder { path, source }.build(file)
}

pub(super) struct Builder<'a> {
    pub(super) path: &'a Path,
    pub(super) source: &'a str,
}

impl Builder<'_> {
    pub(super) fn err(&self, span: Range<usize>, message: impl Into<String>) -> InputError {
        let span = if span.is_empty() && span.start == 0 { None } else { Some(span) };
        InputError::at(self.path, self.source, span, message)
    }

    fn build(&self, file: JobFile) -> Result<Job, InputError> {
        let kind = *file.analysis.get_ref();
        let analysis = match (kind, &file.thickness) {
            (AnalysisKind::PlaneStrain, t) => {
                let (th, span) = t.as_ref().map_or((1.0, 0..0), |t| (*t.get_ref(), t.span()));
                if !(th.is_finite() && th > 0.0) {
                    return Err(self.err(span, format!("`thickness` must be a positive length, got {th}")));
                }
                Analysis::PlaneStrain { thickness: th }
            }
            (_, Some(t)) => {
                return Err(self.err(t.span(), "`thickness` applies to `analysis = \"plane-strain\"` only"));
            }
            (AnalysisKind::Solid, None) => Analysis::Solid3d,
            (AnalysisKind::Axisymmetric, None) => Analysis::Axisymmetric,
        };
        let (mut mesh, mesh_notes) = mesh_from_table(self.path, self.source, &file.mesh)?;
        let want_dim = if kind == AnalysisKind::Solid { 3 } else { 2 };
        if mesh.dimension != want_dim {
            return Err(self.err(
                file.mesh.span(),
                format!("the mesh is {}-D but `analysis = \"{}\"` needs a {want_dim}-D mesh", mesh.dimension, kind.name()),
            ));
        }
        apply_selections(self.path, self.source, &mut mesh, &file.select)?;

        let mut materials = self.materials(&file)?;
        let regions = self.regions(&file, &mesh, &mut materials)?;
        let rigid = self.rigid_bodies(&file, &mesh, kind)?;
        let (stages, inserts) = self.stages(&file, &mesh, kind)?;
        let fluids = self.fluids(&file, &mesh, kind)?;
        let glands = self.glands(&file, kind, &rigid)?;
        let extrusion_gaps = self.extrusion_gaps(&file, &mesh, kind, &rigid)?;
        let rigid_bands = self.rigid_bands(&file)?;
        let reaction_sets = self.reaction_sets(&file);
        let output = self.output_plan(&file)?;

        let model = Model {
            mesh,
            analysis,
            regions,
            stages,
            rigid,
            fluids,
            glands,
            extrusion_gaps,
            inserts,
            moment_points: self.moment_points(&file, kind)?,
            linear: LinearSettings::default(),
            // Frames are computed by the result writer for the increments it
            // saves, so the solver keeps no per-increment fields.
            output: OutputSettings { point_fields: false, nodal_fields: false },
        };
        // Element kinds, region cover and set kinds, checked by the solver's own tables.
        let disc = Discretization::new(&model).map_err(|e| self.err(file.mesh.span(), e.to_string()))?;
        let (programs, _) = olli_solver::driver::stages::resolve(&disc).map_err(|e| self.err(0..0, e.to_string()))?;
        if let Some(u) = olli_solver::driver::held::unheld(&disc, &programs) {
            let span = file.stage[u.stage].get_ref().name.span();
            return Err(self.err(span, SolveError::from(u).to_string()));
        }
        self.check_fluids(&file, &disc)?;
        drop(disc);
        let fluid_names: Vec<String> = model.fluids.iter().map(|f| f.name.clone()).collect();
        let rigid_fluids = model
            .rigid
            .iter()
            .map(|b| {
                let touched = model.mesh.side_set_nodes(&b.sides).unwrap_or_default();
                model
                    .fluids
                    .iter()
                    .filter(|f| model.mesh.side_set_nodes(&f.sides).unwrap_or_default().iter().any(|n| touched.binary_search(n).is_ok()))
                    .map(|f| f.name.clone())
                    .collect()
            })
            .collect();
        let title = if file.title.is_empty() {
            self.path.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_default()
        } else {
            file.title.clone()
        };
        Ok(Job {
            path: self.path.to_path_buf(),
            title,
            kind,
            model,
            materials,
            reaction_sets,
            rigid_names: file.rigid.iter().map(|r| r.get_ref().name.get_ref().clone()).collect(),
            rigid_fluids,
            rigid_bands,
            fluid_names,
            applied: applied_columns(&file, kind),
            insert_names: file.insert.iter().map(|r| r.get_ref().name.get_ref().clone()).collect(),
            output,
            mesh_notes,
        })
    }

    fn materials(&self, file: &JobFile) -> Result<Vec<JobMaterial>, InputError> {
        if file.materials.get_ref().is_empty() {
            return Err(self.err(file.materials.span(), "`materials` is empty: define at least one material table"));
        }
        file.materials
            .get_ref()
            .iter()
            .map(|(name, table)| {
                let material = self.material(name, table)?;
                Ok(JobMaterial {
                    name: name.clone(),
                    model: table.get_ref().model.get_ref().clone(),
                    material: Arc::new(material),
                    used_by: Vec::new(),
                    formulations: Vec::new(),
                })
            })
            .collect()
    }

    fn material(&self, name: &str, table: &Spanned<MaterialTable>) -> Result<Material, InputError> {
        let t = table.get_ref();
        let model = t.model.get_ref();
        let known = olli_solver::material::registry::MODEL_NAMES;
        if !known.contains(&model.as_str()) {
            let hint = nearest(model, known.iter().copied()).map(|k| format!("; did you mean `{k}`?")).unwrap_or_default();
            return Err(self.err(t.model.span(), format!("material `{name}`: unknown model `{model}` (known: {}){hint}", known.join(", "))));
        }
        let form = match &t.volumetric {
            None => VolumetricForm::Quadratic,
            Some(v) => VolumetricForm::from_name(v.get_ref()).ok_or_else(|| {
                self.err(
                    v.span(),
                    format!("material `{name}`: unknown volumetric law `{}` (known: quadratic, logarithmic, simo-taylor)", v.get_ref()),
                )
            })?,
        };
        let given = t.constants();
        let constants: Vec<(&str, f64)> = given.iter().map(|(k, v, _)| (*k, *v)).collect();
        let material = olli_solver::material::registry::material(model, &constants, form).map_err(|e| {
            let span = material_error_key(&e)
                .and_then(|k| given.iter().find(|(n, _, _)| *n == k).map(|(_, _, span)| span.clone()))
                .unwrap_or_else(|| t.model.span());
            self.err(span, format!("material `{name}`: {e}"))
        })?;
        let material = match &t.mullins {
            None => material,
            Some(spec) => {
                let m = spec.get_ref();
                let mullins =
                    Mullins::new(m.r, m.m, m.beta).map_err(|e| self.err(spec.span(), format!("material `{name}`: `mullins`: {e}")))?;
                material.with_mullins(mullins)
            }
        };
        match &t.prony {
            None => Ok(material),
            Some(p) => {
                let bad = |m: String| self.err(p.span(), format!("material `{name}`: {m}"));
                let mut terms = Vec::with_capacity(p.get_ref().len());
                for term in p.get_ref() {
                    let &[g, tau] = term.as_slice() else {
                        return Err(bad(format!("`prony`: each term is [g_i, tau_i], got {} numbers", term.len())));
                    };
                    terms.push([g, tau]);
                }
                let prony = Prony::new(&terms).map_err(|e| bad(e.to_string()))?;
                Ok(material.with_prony(prony))
            }
        }
    }

    fn regions(&self, file: &JobFile, mesh: &Mesh, materials: &mut [JobMaterial]) -> Result<Vec<Region>, InputError> {
        if file.region.is_empty() {
            return Err(
                self.err(0..0, "no [[region]]: assign a material to the elements with `[[region]] elements = \"all\", material = \"...\"`")
            );
        }
        let mut out = Vec::new();
        for r in &file.region {
            let spec = r.get_ref();
            let set = spec.elements.get_ref();
            let elements = match mesh.element_sets.get(set) {
                Some(e) => e.clone(),
                None if set == "all" => (0..mesh.element_count()).collect(),
                None => {
                    let names: Vec<&str> = mesh.element_sets.keys().map(String::as_str).chain(["all"]).collect();
                    return Err(self.unknown_name(spec.elements.span(), "elements", "element set", set, &names));
                }
            };
            let mat_name = spec.material.get_ref();
            let Some(mat) = materials.iter_mut().find(|m| &m.name == mat_name) else {
                let names: Vec<&str> = file.materials.get_ref().keys().map(String::as_str).collect();
                return Err(self.unknown_name(spec.material.span(), "material", "material", mat_name, &names));
            };
            let formulation = match spec.formulation {
                FormulationKind::Mixed => Formulation::Mixed,
                FormulationKind::Displacement => Formulation::Displacement,
                FormulationKind::ElementPressure => Formulation::ElementPressure,
            };
            mat.used_by.push(set.clone());
            mat.formulations.push(formulation);
            out.push(Region { name: set.clone(), elements, material: mat.material.clone(), formulation });
        }
        Ok(out)
    }

    /// "`key`: no <what> named `name` (known: ...); did you mean ...?"
    pub(super) fn unknown_name(&self, span: Range<usize>, key: &str, what: &str, name: &str, known: &[&str]) -> InputError {
        let hint = nearest(name, known.iter().copied()).map(|k| format!("; did you mean `{k}`?")).unwrap_or_default();
        let list = if known.is_empty() { "none".to_string() } else { known.join(", ") };
        self.err(span, format!("`{key}`: no {what} named `{name}` (known: {list}){hint}"))
    }

    /// Checks a set name against every set of the mesh.
    pub(super) fn node_set(&self, mesh: &Mesh, key: &str, name: &Spanned<String>) -> Result<String, InputError> {
        if mesh.nodes_of_set(name.get_ref()).is_some() {
            return Ok(name.get_ref().clone());
        }
        let names = all_set_names(mesh);
        let known: Vec<&str> = names.iter().map(String::as_str).collect();
        Err(self.unknown_name(name.span(), key, "set", name.get_ref(), &known))
    }

    /// `moment_about` of supports and motions, by set (one point per set).
    fn moment_points(&self, file: &JobFile, kind: AnalysisKind) -> Result<BTreeMap<String, [f64; 3]>, InputError> {
        let mut out: BTreeMap<String, [f64; 3]> = BTreeMap::new();
        let given = file
            .support
            .iter()
            .map(|s| (&s.get_ref().nodes, &s.get_ref().moment_about))
            .chain(file.motion.iter().map(|m| (&m.get_ref().nodes, &m.get_ref().moment_about)));
        let dim = kind.components().len();
        for (set, point) in given {
            let Some(point) = point else { continue };
            if kind == AnalysisKind::Axisymmetric {
                return Err(
                    self.err(point.span(), "`moment_about`: an axisymmetric reaction has no moment; use a 3-D or plane-strain analysis")
                );
            }
            let v = point.get_ref();
            if v.len() != dim || v.iter().any(|x| !x.is_finite()) {
                return Err(self.err(point.span(), format!("`moment_about`: give {dim} finite coordinates")));
            }
            let mut p = [0.0; 3];
            p[..dim].copy_from_slice(v);
            if out.get(set.get_ref()).is_some_and(|old| *old != p) {
                return Err(self.err(point.span(), format!("`moment_about`: set `{}` already has another point", set.get_ref())));
            }
            out.insert(set.get_ref().clone(), p);
        }
        // A turned set reports its moment about its turn's centre unless told otherwise.
        for m in &file.motion {
            let spec = m.get_ref();
            let Some(turn) = spec.rotation.as_ref().map(|r| r.get_ref()) else { continue };
            if kind != AnalysisKind::Axisymmetric && turn.center.len() == dim && turn.center.iter().all(|v| v.is_finite()) {
                let mut p = [0.0; 3];
                p[..dim].copy_from_slice(&turn.center);
                out.entry(spec.nodes.get_ref().clone()).or_insert(p);
            }
        }
        Ok(out)
    }

    /// Checks that `name` (under key `sides`) is a side set; `acts` says what
    /// needs one ("a pressure acts on").
    pub(super) fn side_set(&self, mesh: &Mesh, name: &Spanned<String>, acts: &str) -> Result<(), InputError> {
        let set = name.get_ref();
        if mesh.side_sets.contains_key(set) {
            return Ok(());
        }
        let known: Vec<&str> = mesh.side_sets.keys().map(String::as_str).collect();
        let mut e = self.unknown_name(name.span(), "sides", "side set", set, &known);
        if mesh.nodes_of_set(set).is_some() {
            e.message = format!("`sides`: `{set}` is not a side set: {acts} sides (edges or faces)");
        }
        Err(e)
    }

    fn reaction_sets(&self, file: &JobFile) -> Vec<String> {
        let mut out: Vec<String> = Vec::new();
        let names = file.support.iter().map(|s| &s.get_ref().nodes).chain(file.motion.iter().map(|m| &m.get_ref().nodes));
        for n in names {
            if !out.contains(n.get_ref()) {
                out.push(n.get_ref().clone());
            }
        }
        out
    }

    fn output_plan(&self, file: &JobFile) -> Result<OutputPlan, InputError> {
        let o = &file.output;
        let every = *o.every.get_ref();
        if every == 0 {
            return Err(self.err(o.every.span(), "`every` must be at least 1"));
        }
        let fields = match &o.fields {
            None => FIELD_NAMES.iter().map(|s| s.to_string()).collect(),
            Some(list) => {
                for f in list.get_ref() {
                    if !FIELD_NAMES.contains(&f.as_str()) {
                        return Err(self.unknown_name(list.span(), "fields", "output field", f, FIELD_NAMES));
                    }
                }
                list.get_ref().clone()
            }
        };
        let dir = self.path.parent().unwrap_or(Path::new("."));
        Ok(OutputPlan { folder: o.folder.as_ref().map(|f| dir.join(f)), every, fields })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use olli_solver::model::Motion;

    const JOB: &str = r#"
analysis = "axisymmetric"
[mesh]
generate = "rectangle"
origin = [1.0, 0.0]
size = [2.0, 1.0]
divisions = [2, 2]
[materials.m]
model = "neo-hookean"
shear_modulus = 1.0
bulk_modulus = 100.0
[[region]]
elements = "all"
material = "m"
[[support]]
nodes = "bottom"
fix = ["z"]
[[motion]]
nodes = "top"
displacement = { z = -0.1 }
[[stage]]
name = "a"
[[motion]]
nodes = "top"
stage = "b"
displacement = { r = 0.05 }
[[stage]]
name = "b"
max_increment = 0.5
"#;

    fn job(text: &str) -> Result<Job, InputError> {
        load_str(Path::new("unit.toml"), text)
    }

    #[test]
    fn loads_go_to_their_stage_with_defaults() {
        let j = job(JOB).unwrap();
        let s = &j.model.stages;
        assert_eq!(s.len(), 2);
        assert_eq!(s[0].motions, vec![Motion { set: "top".into(), displacement: [None, Some(-0.1), None] }]);
        assert_eq!(s[1].motions[0].displacement, [Some(0.05), None, None]);
        assert_eq!(s[0].supports[0].components, [false, true, false]);
        assert_eq!((s[0].controls.first, s[0].controls.max, s[0].controls.min), (0.1, 0.25, 1e-5));
        assert_eq!(s[1].controls.max, 0.5);
        assert_eq!(j.reaction_columns(), ["reaction_bottom_r", "reaction_bottom_z", "reaction_top_r", "reaction_top_z"]);
        assert_eq!(j.title, "unit");
        assert_eq!(j.output.every, 1);
        assert_eq!(j.output.fields.len(), FIELD_NAMES.len());
    }

    #[test]
    fn bad_values_are_rejected_where_they_stand() {
        let e = job(&JOB.replace("max_increment = 0.5", "max_increment = 0.01")).unwrap_err();
        assert!(e.message.contains("min_increment ≤ first_increment ≤ max_increment"), "{e}");
        let e = job(&JOB.replace("analysis = \"axisymmetric\"", "analysis = \"axisymmetric\"\nthickness = 2.0")).unwrap_err();
        assert_eq!(e.position, Some((3, 13)), "{e}");
        let e = job(&JOB.replace("displacement = { r = 0.05 }", "displacement = { x = 0.05 }")).unwrap_err();
        assert!(e.message.contains("unknown component `x` for axisymmetric"), "{e}");
        let e = job(&JOB.replace("stage = \"b\"", "stage = \"c\"")).unwrap_err();
        assert!(e.message.contains("no stage named `c`"), "{e}");
        let e = job(&JOB.replace("fix = [\"z\"]", "fix = []")).unwrap_err();
        assert!(e.message.contains("names no component"), "{e}");
    }

    #[test]
    fn selections_add_sets_and_catch_empty_ones() {
        let with = |sel: &str| job(&JOB.replace("[materials.m]", &format!("{sel}\n[materials.m]")));
        let j = with("[[select]]\nname = \"corner\"\nnodes = { nearest = [3.0, 1.0] }").unwrap();
        assert_eq!(j.model.mesh.node_sets["corner"].len(), 1);
        let j = with("[[select]]\nname = \"outer\"\nsides = { line = { point = [3.0, 0.0], direction = [0.0, 1.0] } }").unwrap();
        assert_eq!(j.model.mesh.side_sets["outer"].len(), 2);
        let e = with("[[select]]\nname = \"none\"\nnodes = { line = { point = [9.0, 0.0], direction = [0.0, 1.0] } }").unwrap_err();
        assert!(e.message.contains("selects nothing"), "{e}");
        let e = with("[[select]]\nname = \"top\"\nnodes = { nearest = [3.0, 1.0] }").unwrap_err();
        assert!(e.message.contains("already exists"), "{e}");
        let e = with("[[select]]\nname = \"x\"\nnodes = { set = \"topp\" }").unwrap_err();
        assert!(e.message.contains("did you mean `top`?"), "{e}");
    }
}
