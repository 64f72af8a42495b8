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

use super::diagnostics::{nearest, InputError};
use super::mesh_source::{all_set_names, apply_selections, mesh_from_table};
use super::schema::{AnalysisKind, FormulationKind, JobFile, MaterialTable, StageSpec};
use crate::assembly::Discretization;
use crate::contact::surface::filleted_polyline;
use crate::contact::{Piece2, Shape as RigidShape};
use crate::linear::LinearSettings;
use crate::material::{Material, MaterialError, VolumetricForm};
use crate::model::{
    Analysis, Force, Formulation, IncrementControls, Model, Motion, OutputSettings, Pressure, Region, RigidBody, RigidMotion, Stage,
    Support,
};

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
];

/// One material of the job, built.
#[derive(Debug, Clone)]
pub struct JobMaterial {
    pub name: String,
    pub model: String,
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
    pub path: PathBuf,
    pub title: String,
    pub kind: AnalysisKind,
    pub model: Model,
    pub materials: Vec<JobMaterial>,
    /// Sets with supports or prescribed motions, in file order: their
    /// reactions go to `history.csv` and the summary.
    pub reaction_sets: Vec<String>,
    /// Rigid surfaces, in file order: their forces, contact width and peak
    /// pressure go to `history.csv` and the summary.
    pub rigid_names: Vec<String>,
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
        self.reaction_sets
            .iter()
            .flat_map(|s| self.components().iter().map(move |c| format!("reaction_{s}_{c}")))
            .collect()
    }

    /// The rigid-surface columns of `history.csv`: `rigid_<name>_<component>`
    /// (force of the rubber on the surface), `rigid_<name>_contact_width`,
    /// `rigid_<name>_peak_pressure`.
    pub fn rigid_columns(&self) -> Vec<String> {
        self.rigid_names
            .iter()
            .flat_map(|n| {
                let mut c: Vec<String> = self.components().iter().map(|c| format!("rigid_{n}_{c}")).collect();
                c.push(format!("rigid_{n}_contact_width"));
                c.push(format!("rigid_{n}_peak_pressure"));
                c
            })
            .collect()
    }

    /// Every value column of `history.csv`, in order.
    pub fn history_columns(&self) -> Vec<String> {
        let mut c = self.reaction_columns();
        c.extend(self.rigid_columns());
        c
    }
}

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

/// Reads, parses and checks the job file at `path`.
pub fn load(path: &Path) -> Result<Job, InputError> {
    let source = std::fs::read_to_string(path).map_err(|e| InputError {
        file: path.to_path_buf(),
        position: None,
        message: format!("cannot read the job file: {e}"),
    })?;
    load_str(path, &source)
}

/// Parses and checks job text; `path` names the file in messages and anchors relative paths.
pub fn load_str(path: &Path, source: &str) -> Result<Job, InputError> {
    let file: JobFile = toml::from_str(source).map_err(|e| InputError::from_toml(path, source, &e))?;
    Builder { path, source }.build(file)
}

struct Builder<'a> {
    path: &'a Path,
    source: &'a str,
}

impl Builder<'_> {
    fn err(&self, span: Range<usize>, message: impl Into<String>) -> InputError {
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
        let stages = self.stages(&file, &mesh, kind)?;
        let reaction_sets = self.reaction_sets(&file);
        let output = self.output_plan(&file)?;

        let model = Model {
            mesh,
            analysis,
            regions,
            stages,
            rigid,
            linear: LinearSettings::default(),
            // Frames are computed by the result writer for the increments it
            // saves, so the solver keeps no per-increment fields.
            output: OutputSettings { point_fields: false, nodal_fields: false },
        };
        // Element kinds, region cover and set kinds, checked by the solver's own tables.
        let disc = Discretization::new(&model).map_err(|e| self.err(file.mesh.span(), e.to_string()))?;
        crate::driver::stages::resolve(&disc).map_err(|e| self.err(0..0, e.to_string()))?;
        drop(disc);
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
        let known = crate::material::registry::MODEL_NAMES;
        if !known.contains(&model.as_str()) {
            let hint = nearest(model, known.iter().copied()).map(|k| format!("; did you mean `{k}`?")).unwrap_or_default();
            return Err(self.err(t.model.span(), format!("material `{name}`: unknown model `{model}` (known: {}){hint}", known.join(", "))));
        }
        let form = match &t.volumetric {
            None => VolumetricForm::Quadratic,
            Some(v) => VolumetricForm::from_name(v.get_ref()).ok_or_else(|| {
                self.err(v.span(), format!("material `{name}`: unknown volumetric law `{}` (known: quadratic, logarithmic, simo-taylor)", v.get_ref()))
            })?,
        };
        let given = t.constants();
        let constants: Vec<(&str, f64)> = given.iter().map(|(k, v)| (*k, *v.get_ref())).collect();
        crate::material::registry::material(model, &constants, form).map_err(|e| {
            let span = material_error_key(&e)
                .and_then(|k| given.iter().find(|(n, _)| *n == k).map(|(_, v)| v.span()))
                .unwrap_or_else(|| t.model.span());
            self.err(span, format!("material `{name}`: {e}"))
        })
    }

    fn regions(&self, file: &JobFile, mesh: &Mesh, materials: &mut [JobMaterial]) -> Result<Vec<Region>, InputError> {
        if file.region.is_empty() {
            return Err(self.err(0..0, "no [[region]]: assign a material to the elements with `[[region]] elements = \"all\", material = \"...\"`"));
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
            };
            mat.used_by.push(set.clone());
            mat.formulations.push(formulation);
            out.push(Region { name: set.clone(), elements, material: mat.material.clone(), formulation });
        }
        Ok(out)
    }

    /// "`key`: no <what> named `name` (known: ...); did you mean ...?"
    fn unknown_name(&self, span: Range<usize>, key: &str, what: &str, name: &str, known: &[&str]) -> InputError {
        let hint = nearest(name, known.iter().copied()).map(|k| format!("; did you mean `{k}`?")).unwrap_or_default();
        let list = if known.is_empty() { "none".to_string() } else { known.join(", ") };
        self.err(span, format!("`{key}`: no {what} named `{name}` (known: {list}){hint}"))
    }

    /// Checks a set name against every set of the mesh.
    fn node_set(&self, mesh: &Mesh, key: &str, name: &Spanned<String>) -> Result<String, InputError> {
        if mesh.nodes_of_set(name.get_ref()).is_some() {
            return Ok(name.get_ref().clone());
        }
        let names = all_set_names(mesh);
        let known: Vec<&str> = names.iter().map(String::as_str).collect();
        Err(self.unknown_name(name.span(), key, "set", name.get_ref(), &known))
    }

    /// Component values `{ x = .., z = .. }` as an array for this analysis.
    fn components(&self, kind: AnalysisKind, map: &Spanned<BTreeMap<String, f64>>) -> Result<[Option<f64>; 3], InputError> {
        let names = kind.components();
        let mut out = [None; 3];
        if map.get_ref().is_empty() {
            return Err(self.err(map.span(), format!("give at least one component ({})", names.join(", "))));
        }
        for (k, v) in map.get_ref() {
            let Some(i) = names.iter().position(|n| n == k) else {
                let hint = nearest(k, names.iter().copied()).map(|n| format!("; did you mean `{n}`?")).unwrap_or_default();
                return Err(self.err(map.span(), format!("unknown component `{k}` for {} analysis (use {}){hint}", kind.name(), names.join(", "))));
            };
            if !v.is_finite() {
                return Err(self.err(map.span(), format!("component `{k}` must be a finite number")));
            }
            out[i] = Some(*v);
        }
        Ok(out)
    }

    fn stage_index(&self, stages: &[Spanned<StageSpec>], name: &Option<Spanned<String>>) -> Result<usize, InputError> {
        let Some(name) = name else { return Ok(0) };
        stages.iter().position(|s| s.get_ref().name.get_ref() == name.get_ref()).ok_or_else(|| {
            let names: Vec<&str> = stages.iter().map(|s| s.get_ref().name.get_ref().as_str()).collect();
            self.unknown_name(name.span(), "stage", "stage", name.get_ref(), &names)
        })
    }

    fn stages(&self, file: &JobFile, mesh: &Mesh, kind: AnalysisKind) -> Result<Vec<Stage>, InputError> {
        if file.stage.is_empty() {
            return Err(self.err(0..0, "no [[stage]]: add at least one, e.g. `[[stage]] name = \"load\"`"));
        }
        let mut stages = Vec::new();
        for (i, s) in file.stage.iter().enumerate() {
            let spec = s.get_ref();
            if file.stage[..i].iter().any(|o| o.get_ref().name.get_ref() == spec.name.get_ref()) {
                return Err(self.err(spec.name.span(), format!("two stages are named `{}`", spec.name.get_ref())));
            }
            stages.push(Stage { name: spec.name.get_ref().clone(), controls: self.controls(s)?, ..Default::default() });
        }
        let mut loaded = vec![false; stages.len()];
        for sup in &file.support {
            let spec = sup.get_ref();
            let set = self.node_set(mesh, "nodes", &spec.nodes)?;
            let names = kind.components();
            let mut components = [false; 3];
            for c in spec.fix.get_ref() {
                let Some(i) = names.iter().position(|n| n == c) else {
                    let hint = nearest(c, names.iter().copied()).map(|n| format!("; did you mean `{n}`?")).unwrap_or_default();
                    return Err(self.err(spec.fix.span(), format!("unknown component `{c}` for {} analysis (use {}){hint}", kind.name(), names.join(", "))));
                };
                components[i] = true;
            }
            if !components.iter().any(|&c| c) {
                return Err(self.err(spec.fix.span(), "`fix` names no component"));
            }
            stages[0].supports.push(Support { set, components });
        }
        for m in &file.motion {
            let spec = m.get_ref();
            let i = self.stage_index(&file.stage, &spec.stage)?;
            let set = self.node_set(mesh, "nodes", &spec.nodes)?;
            let displacement = self.components(kind, &spec.displacement)?;
            stages[i].motions.push(Motion { set, displacement });
            loaded[i] = true;
        }
        for p in &file.pressure {
            let spec = p.get_ref();
            let i = self.stage_index(&file.stage, &spec.stage)?;
            let name = spec.sides.get_ref();
            if !mesh.side_sets.contains_key(name) {
                let known: Vec<&str> = mesh.side_sets.keys().map(String::as_str).collect();
                let mut e = self.unknown_name(spec.sides.span(), "sides", "side set", name, &known);
                if mesh.nodes_of_set(name).is_some() {
                    e.message = format!("`sides`: `{name}` is not a side set: a pressure acts on sides (edges or faces)");
                }
                return Err(e);
            }
            if !spec.value.is_finite() {
                return Err(self.err(p.span(), "pressure `value` must be a finite number"));
            }
            stages[i].pressures.push(Pressure { set: name.clone(), value: spec.value });
            loaded[i] = true;
        }
        for f in &file.force {
            let spec = f.get_ref();
            let i = self.stage_index(&file.stage, &spec.stage)?;
            let set = self.node_set(mesh, "set", &spec.set)?;
            let total = self.components(kind, &spec.total)?.map(|v| v.unwrap_or(0.0));
            stages[i].forces.push(Force { set, total });
            loaded[i] = true;
        }
        for b in &file.body_force {
            let spec = b.get_ref();
            let i = self.stage_index(&file.stage, &spec.stage)?;
            if stages[i].body_force.is_some() {
                return Err(self.err(b.span(), format!("stage `{}` has two body forces; give one with all components", stages[i].name)));
            }
            stages[i].body_force = Some(self.components(kind, &spec.per_volume)?.map(|v| v.unwrap_or(0.0)));
            loaded[i] = true;
        }
        self.rigid_motions(file, kind, &mut stages, &mut loaded)?;
        if let Some(i) = loaded.iter().position(|&l| !l) {
            let name = &stages[i].name;
            return Err(self.err(
                file.stage[i].span(),
                format!("stage `{name}` has no loads: give it a [[motion]], [[pressure]], [[force]] or [[body_force]] with `stage = \"{name}\"`, or move a [[rigid]] surface in it"),
            ));
        }
        Ok(stages)
    }

    /// Rigid surfaces: shape (facing the rubber), the side set they touch, friction.
    fn rigid_bodies(&self, file: &JobFile, mesh: &Mesh, kind: AnalysisKind) -> Result<Vec<RigidBody>, InputError> {
        let mut bodies: Vec<RigidBody> = Vec::new();
        for r in &file.rigid {
            let spec = r.get_ref();
            let name = spec.name.get_ref();
            if bodies.iter().any(|b| &b.name == name) {
                return Err(self.err(spec.name.span(), format!("two rigid surfaces are named `{name}`")));
            }
            let sides = spec.touches.get_ref();
            if !mesh.side_sets.contains_key(sides) {
                let known: Vec<&str> = mesh.side_sets.keys().map(String::as_str).collect();
                return Err(self.unknown_name(spec.touches.span(), "touches", "side set", sides, &known));
            }
            let bad = |span: Range<usize>, m: String| self.err(span, format!("rigid `{name}`: {m}"));
            let solid = kind == AnalysisKind::Solid;
            let mut shapes: Vec<(Range<usize>, &str, RigidShape)> = Vec::new();
            if let Some(l) = &spec.line {
                let v = l.get_ref();
                shapes.push((l.span(), "line", RigidShape::Line { point: v.point, direction: v.direction }));
            }
            if let Some(p) = &spec.polyline {
                let pieces = filleted_polyline(p.get_ref(), spec.fillet.unwrap_or(0.0)).map_err(|m| bad(p.span(), m))?;
                shapes.push((p.span(), "polyline", RigidShape::Profile(pieces)));
            }
            if let Some(a) = &spec.arc {
                let v = a.get_ref();
                if !(v.radius > 0.0) {
                    return Err(bad(a.span(), format!("arc radius {} must be positive", v.radius)));
                }
                let piece = Piece2::Arc { center: v.center, radius: v.radius, start: v.from.to_radians(), end: v.to.to_radians() };
                shapes.push((a.span(), "arc", RigidShape::Profile(vec![piece])));
            }
            if let Some(p) = &spec.plane {
                let v = p.get_ref();
                shapes.push((p.span(), "plane", RigidShape::Plane { point: v.point, normal: v.normal }));
            }
            if let Some(c) = &spec.cylinder {
                let v = c.get_ref();
                if !(v.radius > 0.0) {
                    return Err(bad(c.span(), format!("cylinder radius {} must be positive", v.radius)));
                }
                shapes.push((c.span(), "cylinder", RigidShape::Cylinder { point: v.point, axis: v.axis, radius: v.radius, rubber_outside: true }));
            }
            if let Some(c) = &spec.sphere {
                let v = c.get_ref();
                if !(v.radius > 0.0) {
                    return Err(bad(c.span(), format!("sphere radius {} must be positive", v.radius)));
                }
                shapes.push((c.span(), "sphere", RigidShape::Sphere { center: v.center, radius: v.radius, rubber_outside: true }));
            }
            let (span, key, shape) = match shapes.len() {
                1 => shapes.pop().expect("one shape"),
                0 => return Err(bad(r.span(), "give its shape: line, polyline or arc (2-D); plane, cylinder or sphere (3-D)".into())),
                _ => return Err(bad(r.span(), format!("give one shape, not {}", shapes.iter().map(|s| s.1).collect::<Vec<_>>().join(" and ")))),
            };
            let three_d = matches!(key, "plane" | "cylinder" | "sphere");
            if three_d != solid {
                return Err(bad(span, format!("`{key}` is a {} shape; this is a {} analysis", if three_d { "3-D" } else { "2-D" }, kind.name())));
            }
            // The rubber side: the given point, or the centroid of the touching nodes.
            let point = match &spec.rubber_point {
                Some(p) if p.len() == if solid { 3 } else { 2 } => [p[0], p[1], if solid { p[2] } else { 0.0 }],
                Some(p) => return Err(bad(r.span(), format!("`rubber_point` needs {} coordinates, got {}", if solid { 3 } else { 2 }, p.len()))),
                None => {
                    let nodes = mesh.side_set_nodes(sides).unwrap_or_default();
                    let mut c = [0.0; 3];
                    for &n in &nodes {
                        for k in 0..3 {
                            c[k] += mesh.nodes[n][k] / nodes.len().max(1) as f64;
                        }
                    }
                    c
                }
            };
            let mut body = RigidBody::new(name.clone(), shape.facing(point), sides.clone());
            if !(spec.friction >= 0.0 && spec.friction.is_finite()) {
                return Err(bad(r.span(), format!("`friction` must be ≥ 0, got {}", spec.friction)));
            }
            body.friction = spec.friction;
            if let Some(p) = spec.penalty {
                if !(p > 0.0 && p.is_finite()) {
                    return Err(bad(r.span(), format!("`penalty` must be positive, got {p}")));
                }
                body.normal_penalty = Some(p);
            }
            if let Some(t) = spec.penetration_tolerance {
                if !(t > 0.0 && t < 1.0) {
                    return Err(bad(r.span(), format!("`penetration_tolerance` must be in (0, 1), got {t}")));
                }
                body.penetration_tolerance = t;
            }
            let dim = if solid { 3 } else { 2 };
            if let Some(c) = &spec.rotation_center {
                if c.len() != dim {
                    return Err(bad(r.span(), format!("`rotation_center` needs {dim} coordinates")));
                }
                body.rotation_center[..dim].copy_from_slice(c);
            }
            if let Some(a) = &spec.rotation_axis {
                if !solid || a.len() != 3 {
                    return Err(bad(r.span(), "`rotation_axis` is for 3-D analyses, with 3 components".into()));
                }
                body.rotation_axis.copy_from_slice(a);
            }
            bodies.push(body);
        }
        Ok(bodies)
    }

    /// Rigid-surface positions per stage: each stage that moves or turns a
    /// surface gets its full position (translation and rotation so far).
    fn rigid_motions(&self, file: &JobFile, kind: AnalysisKind, stages: &mut [Stage], loaded: &mut [bool]) -> Result<(), InputError> {
        let dim = kind.components().len();
        for r in &file.rigid {
            let spec = r.get_ref();
            let name = spec.name.get_ref();
            let mut targets: Vec<(Option<[f64; 3]>, Option<f64>)> = vec![(None, None); stages.len()];
            let stage_names: Vec<&str> = stages.iter().map(|s| s.name.as_str()).collect();
            if let Some(m) = &spec.moves {
                for (stage, v) in m.get_ref() {
                    let i = stage_names.iter().position(|n| n == stage).ok_or_else(|| self.unknown_name(m.span(), "move", "stage", stage, &stage_names))?;
                    if v.len() != dim || v.iter().any(|x| !x.is_finite()) {
                        return Err(self.err(m.span(), format!("rigid `{name}`: move in stage `{stage}` needs {dim} finite components")));
                    }
                    let mut t = [0.0; 3];
                    t[..dim].copy_from_slice(v);
                    targets[i].0 = Some(t);
                }
            }
            if let Some(m) = &spec.rotate {
                for (stage, deg) in m.get_ref() {
                    let i = stage_names.iter().position(|n| n == stage).ok_or_else(|| self.unknown_name(m.span(), "rotate", "stage", stage, &stage_names))?;
                    if !deg.is_finite() {
                        return Err(self.err(m.span(), format!("rigid `{name}`: rotation in stage `{stage}` must be finite")));
                    }
                    targets[i].1 = Some(deg.to_radians());
                }
            }
            let (mut translation, mut rotation) = ([0.0; 3], 0.0);
            for (i, (t, a)) in targets.into_iter().enumerate() {
                if t.is_none() && a.is_none() {
                    continue;
                }
                translation = t.unwrap_or(translation);
                rotation = a.unwrap_or(rotation);
                stages[i].rigid_motions.push(RigidMotion { body: name.clone(), translation, rotation });
                loaded[i] = true;
            }
        }
        Ok(())
    }

    fn controls(&self, s: &Spanned<StageSpec>) -> Result<IncrementControls, InputError> {
        let spec = s.get_ref();
        let d = IncrementControls::default();
        let c = IncrementControls {
            first: spec.first_increment.unwrap_or(d.first),
            min: spec.min_increment.unwrap_or(d.min),
            max: spec.max_increment.unwrap_or(0.25),
            max_iterations: spec.max_iterations.unwrap_or(d.max_iterations),
            force_tolerance: spec.force_tolerance.unwrap_or(d.force_tolerance),
            ..d
        };
        let bad = |m: String| self.err(s.span(), format!("stage `{}`: {m}", spec.name.get_ref()));
        if !(c.min > 0.0 && c.min <= c.first && c.first <= c.max && c.max <= 1.0) {
            return Err(bad(format!(
                "increments must satisfy 0 < min_increment ≤ first_increment ≤ max_increment ≤ 1 (got {}, {}, {})",
                c.min, c.first, c.max
            )));
        }
        if c.max_iterations == 0 {
            return Err(bad("`max_iterations` must be at least 1".into()));
        }
        if !(c.force_tolerance > 0.0 && c.force_tolerance < 1.0) {
            return Err(bad(format!("`force_tolerance` must be in (0, 1), got {}", c.force_tolerance)));
        }
        Ok(c)
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
