//! Reading a sweep file and expanding it into variants, all in memory: the
//! sweep file is parsed, every key path is found in the base job and every
//! parameter's values are checked against the base value's type, the design
//! gives the rows, and each variant's job text is built and put through the
//! job checker. Any problem is an [`InputError`] located in the sweep file
//! and naming the parameter, before anything is written.

use std::ops::Range;
use std::path::{Path, PathBuf};

use toml::Spanned;
use toml_edit::DocumentMut;

use super::design::{self, Design, Levels, Parameter};
use super::keypath::{self, ParamValue};
use super::schema::{DesignKind, DistributionSpec, ParameterSpec, SweepFile};
use crate::job::check::check;
use crate::job::{self, InputError};

pub use crate::job::SWEEP_SUFFIX;

/// Seed of a Latin hypercube without `seed`.
pub const DEFAULT_SEED: u64 = 1;

/// One variant: its name (also its folder), its parameter values and its job text.
#[derive(Debug, Clone)]
pub struct Variant {
    /// Variant name, also its folder name.
    pub name: String,
    /// Values in the order of [`Plan::parameters`].
    pub values: Vec<ParamValue>,
    /// The complete job file of this variant.
    pub text: String,
    /// Unknowns of its model (displacements and element pressures), for the memory estimate.
    pub unknowns: usize,
    /// Spatial dimension of its mesh (2 or 3).
    pub dimension: usize,
}

/// A checked sweep, ready to write.
#[derive(Debug, Clone)]
pub struct Plan {
    /// The sweep file.
    pub path: PathBuf,
    /// The sweep's name: the file name without `.sweep.toml`.
    pub name: String,
    /// File name of the base job; every variant's job file has this name in its own folder.
    pub job_file_name: String,
    /// The sampling design.
    pub design: Design,
    /// The swept parameters, in sweep-file order.
    pub parameters: Vec<Parameter>,
    /// The variants, in run order.
    pub variants: Vec<Variant>,
    /// `output` of the sweep file resolved against its folder, else `results/<name>` beside it.
    pub default_output: PathBuf,
    /// Warnings of the job checker, each with the variants it concerns.
    pub warnings: Vec<String>,
}

/// Reads and checks the sweep file at `path`.
pub fn load(path: &Path) -> Result<Plan, InputError> {
    let source = std::fs::read_to_string(path).map_err(|e| InputError {
        file: path.to_path_buf(),
        position: None,
        message: format!("cannot read the sweep file: {e}"),
    })?;
    load_str(path, &source)
}

/// The sweep's name if `path` is named like a sweep file.
pub fn sweep_name(path: &Path) -> Option<String> {
    let name = path.file_name()?.to_string_lossy();
    name.strip_suffix(SWEEP_SUFFIX).filter(|s| !s.is_empty()).map(str::to_string)
}

/// Parses and checks sweep text; `path` names the file in messages and anchors the base job's path.
pub fn load_str(path: &Path, source: &str) -> Result<Plan, InputError> {
    let at = |span: Range<usize>, message: String| InputError::at(path, source, Some(span), message);
    let Some(name) = sweep_name(path) else {
        return Err(InputError::at(
            path,
            source,
            None,
            format!("sweep files are named `<name>{SWEEP_SUFFIX}` (so they are never taken for jobs)"),
        ));
    };
    let file: SweepFile = toml::from_str(source).map_err(|e| InputError::from_toml(path, source, &e))?;
    let dir = path.parent().unwrap_or(Path::new("."));
    let base_path = dir.join(file.base.get_ref());
    job::load(&base_path).map_err(|e| if e.position.is_none() { at(file.base.span(), format!("base job: {}", e.message)) } else { e })?;
    let base_text = std::fs::read_to_string(&base_path).expect("just read by the job loader");
    let mut doc: DocumentMut = base_text.parse().expect("the job loader parsed it");
    let base_dir = base_path.parent().unwrap_or(Path::new("."));
    absolute_mesh_file(&mut doc, base_dir);
    doc["output"]["folder"] = toml_edit::value(".");

    let design = design_of(&file, &at)?;
    if file.parameters.is_empty() {
        return Err(InputError::at(path, source, None, "a sweep needs at least one `[[parameter]]`"));
    }
    let mut parameters = Vec::new();
    for spec in &file.parameters {
        let key = spec.get_ref().key.get_ref().trim().to_string();
        if parameters.iter().any(|p: &Parameter| p.key == key) {
            return Err(at(spec.get_ref().key.span(), format!("parameter `{key}` is given twice")));
        }
        let base_value = keypath::get(&mut doc, &key).map_err(|e| at(spec.get_ref().key.span(), format!("parameter `{key}`: {e}")))?;
        let levels = levels_of(spec, &key, &base_value, design, &at)?;
        parameters.push(Parameter { key, base: base_value, levels });
    }

    let rows = design::rows(design, &parameters);
    let width = rows.len().to_string().len().max(2);
    let file_name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
    let job_file_name = base_path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_else(|| "job.toml".into());
    let mut variants = Vec::new();
    let mut warnings: Vec<(String, Vec<String>)> = Vec::new();
    for (i, values) in rows.into_iter().enumerate() {
        let name = format!("v{:0width$}", i + 1);
        let mut variant_doc = doc.clone();
        for (p, v) in parameters.iter().zip(&values) {
            keypath::set(&mut variant_doc, &p.key, v).expect("the key was found in the base job");
        }
        let changes: Vec<String> = parameters.iter().zip(&values).map(|(p, v)| format!("#   {} = {v}", p.key)).collect();
        let text = format!(
            "# Variant {name} of the sweep `{file_name}` ({}), written by `olli sweep` from `{}` with:\n{}\n{}",
            design_name(design),
            file.base.get_ref(),
            changes.join("\n"),
            variant_doc
        );
        // The variant is checked where it will live; its paths are absolute or its own folder.
        let job_path = base_dir.join(&name).join(&job_file_name);
        let job = match job::load_str(&job_path, &text) {
            Ok(j) => j,
            Err(e) => return Err(rejected(&file, &doc, &parameters, &values, &name, &e, &at)),
        };
        for w in check(&job).warnings {
            match warnings.iter_mut().find(|(text, _)| *text == w) {
                Some((_, names)) => names.push(name.clone()),
                None => warnings.push((w, vec![name.clone()])),
            }
        }
        let mesh = &job.model.mesh;
        variants.push(Variant {
            name,
            values,
            text,
            unknowns: mesh.nodes.len() * mesh.dimension + mesh.element_count(),
            dimension: mesh.dimension,
        });
    }
    let default_output = match &file.output {
        Some(o) => dir.join(o),
        None => dir.join("results").join(&name),
    };
    let warnings = warnings.into_iter().map(|(w, names)| format!("{}: {w}", names.join(", "))).collect();
    Ok(Plan { path: path.to_path_buf(), name, job_file_name, design, parameters, variants, default_output, warnings })
}

fn design_name(design: Design) -> String {
    match design {
        Design::Grid => "grid".into(),
        Design::OneAtATime => "one-at-a-time".into(),
        Design::LatinHypercube { samples, seed } => format!("latin-hypercube, {samples} samples, seed {seed}"),
    }
}

/// An imported mesh's path made absolute, so the variant finds it from its own folder.
fn absolute_mesh_file(doc: &mut DocumentMut, base_dir: &Path) {
    let Some(file) = doc.get("mesh").and_then(|m| m.get("file")).and_then(|f| f.as_str()) else {
        return;
    };
    let joined = base_dir.join(file);
    let absolute = std::fs::canonicalize(&joined).unwrap_or(joined);
    doc["mesh"]["file"] = toml_edit::value(absolute.to_string_lossy().into_owned());
}

fn design_of(file: &SweepFile, at: &impl Fn(Range<usize>, String) -> InputError) -> Result<Design, InputError> {
    let kind = file.design.as_ref().map_or(DesignKind::Grid, |d| *d.get_ref());
    let only_lhs = |field: &Option<Spanned<i64>>, key: &str| match field {
        Some(s) if kind != DesignKind::LatinHypercube => {
            Err(at(s.span(), format!("`{key}` belongs to `design = \"latin-hypercube\"`, not to `{}`", kind.name())))
        }
        _ => Ok(()),
    };
    only_lhs(&file.samples, "samples")?;
    only_lhs(&file.seed, "seed")?;
    Ok(match kind {
        DesignKind::Grid => Design::Grid,
        DesignKind::OneAtATime => Design::OneAtATime,
        DesignKind::LatinHypercube => {
            let samples = match &file.samples {
                Some(s) if *s.get_ref() >= 1 => *s.get_ref() as usize,
                Some(s) => return Err(at(s.span(), format!("`samples` must be at least 1, got {}", s.get_ref()))),
                None => {
                    let span = file.design.as_ref().map(|d| d.span()).unwrap_or(0..0);
                    return Err(at(span, "a latin-hypercube design needs `samples = <number of variants>`".into()));
                }
            };
            let seed = match &file.seed {
                Some(s) if *s.get_ref() >= 0 => *s.get_ref() as u64,
                Some(s) => return Err(at(s.span(), format!("`seed` must not be negative, got {}", s.get_ref()))),
                None => DEFAULT_SEED,
            };
            Design::LatinHypercube { samples, seed }
        }
    })
}

/// A parameter's values, checked: exactly one way given, not empty, finite, of the base value's type.
fn levels_of(
    spec: &Spanned<ParameterSpec>,
    key: &str,
    base: &ParamValue,
    design: Design,
    at: &impl Fn(Range<usize>, String) -> InputError,
) -> Result<Levels, InputError> {
    let p = spec.get_ref();
    let given = [p.values.is_some(), p.range.is_some(), p.distribution.is_some()].iter().filter(|&&g| g).count();
    if given != 1 {
        return Err(at(spec.span(), format!("parameter `{key}`: give exactly one of `values`, `range` or `distribution`")));
    }
    let lhs = matches!(design, Design::LatinHypercube { .. });
    let numeric = base.as_f64().is_some();
    let need_number =
        |span: Range<usize>| at(span, format!("parameter `{key}`: the base job's value is {} ({base}), so it takes no range", base.kind()));
    if let Some(values) = &p.values {
        if values.get_ref().is_empty() {
            return Err(at(values.span(), format!("parameter `{key}`: `values` is empty")));
        }
        let list = values.get_ref().iter().map(|v| convert(v, base)).collect::<Result<Vec<_>, _>>();
        return list.map(Levels::List).map_err(|m| at(values.span(), format!("parameter `{key}`: {m}")));
    }
    if let Some(range) = &p.range {
        let r = range.get_ref();
        if !numeric {
            return Err(need_number(range.span()));
        }
        if !(r.from.is_finite() && r.to.is_finite()) {
            return Err(at(range.span(), format!("parameter `{key}`: `from` and `to` must be finite numbers")));
        }
        return match (r.count, lhs) {
            (Some(n), _) if n < 1 => Err(at(range.span(), format!("parameter `{key}`: the range is empty (`count = {n}`)"))),
            (Some(n), _) => {
                let n = n as usize;
                let x = |i: usize| if n == 1 { r.from } else { round12(r.from + (r.to - r.from) * i as f64 / (n - 1) as f64) };
                let list = (0..n).map(|i| convert(&toml::Value::Float(x(i)), base)).collect::<Result<Vec<_>, _>>();
                list.map(Levels::List).map_err(|m| at(range.span(), format!("parameter `{key}`: {m}")))
            }
            (None, true) if r.from == r.to => Err(at(range.span(), format!("parameter `{key}`: the range is empty (`from` = `to`)"))),
            (None, true) => Ok(Levels::Uniform(r.from.min(r.to), r.from.max(r.to))),
            (None, false) => Err(at(
                range.span(),
                format!("parameter `{key}`: a range needs `count` (the number of values) in a grid or one-at-a-time study"),
            )),
        };
    }
    let dist = p.distribution.as_ref().expect("exactly one was given");
    if !lhs {
        return Err(at(dist.span(), format!("parameter `{key}`: a distribution is sampled only by `design = \"latin-hypercube\"`; give `values` or a `range` with `count`")));
    }
    if !numeric {
        return Err(need_number(dist.span()));
    }
    match *dist.get_ref() {
        DistributionSpec::Uniform { min, max } if min.is_finite() && max.is_finite() && min < max => Ok(Levels::Uniform(min, max)),
        DistributionSpec::Uniform { min, max } => {
            Err(at(dist.span(), format!("parameter `{key}`: the uniform range is empty or not finite (min {min}, max {max})")))
        }
        DistributionSpec::Normal { mean, std_dev } if mean.is_finite() && std_dev.is_finite() && std_dev > 0.0 => {
            Ok(Levels::Normal(mean, std_dev))
        }
        DistributionSpec::Normal { std_dev, .. } => {
            Err(at(dist.span(), format!("parameter `{key}`: `std_dev` must be a positive number, got {std_dev}")))
        }
    }
}

/// `x` to 12 significant digits: a range from 0.4 to 0.8 gives 0.6, not 0.6000000000000001.
fn round12(x: f64) -> f64 {
    format!("{x:.11e}").parse().expect("a formatted float parses")
}

/// A sweep-file value as a value of the base value's type.
fn convert(v: &toml::Value, base: &ParamValue) -> Result<ParamValue, String> {
    let wrong = || format!("{v} is not {}, as the base job's value ({base}) is", base.kind());
    match (base, v) {
        (ParamValue::Float(_), toml::Value::Float(x)) if x.is_finite() => Ok(ParamValue::Float(*x)),
        (ParamValue::Float(_), toml::Value::Integer(i)) => Ok(ParamValue::Float(*i as f64)),
        (ParamValue::Integer(_), toml::Value::Integer(i)) => Ok(ParamValue::Integer(*i)),
        (ParamValue::Integer(_), toml::Value::Float(x)) if x.fract() == 0.0 && x.abs() < 9e15 => Ok(ParamValue::Integer(*x as i64)),
        (ParamValue::Text(_), toml::Value::String(s)) => Ok(ParamValue::Text(s.clone())),
        (ParamValue::Bool(_), toml::Value::Boolean(b)) => Ok(ParamValue::Bool(*b)),
        _ => Err(wrong()),
    }
}

/// The message for a variant the job checker rejects: the parameter whose
/// value alone makes the base job invalid, located at its values; else the
/// whole combination.
fn rejected(
    file: &SweepFile,
    doc: &DocumentMut,
    parameters: &[Parameter],
    values: &[ParamValue],
    name: &str,
    error: &InputError,
    at: &impl Fn(Range<usize>, String) -> InputError,
) -> InputError {
    for (i, (p, v)) in parameters.iter().zip(values).enumerate() {
        let mut alone = doc.clone();
        keypath::set(&mut alone, &p.key, v).expect("the key was found in the base job");
        if let Err(e) = job::load_str(&error.file, &alone.to_string()) {
            let spec = file.parameters[i].get_ref();
            let span = spec.values.as_ref().map(|s| s.span()).or(spec.range.as_ref().map(|s| s.span())).unwrap_or(spec.key.span());
            return at(span, format!("parameter `{}` = {v} (variant {name}) makes an invalid job: {}", p.key, e.message));
        }
    }
    let combination: Vec<String> = parameters.iter().zip(values).map(|(p, v)| format!("`{}` = {v}", p.key)).collect();
    let span = file.parameters.first().map(|s| s.span()).unwrap_or(0..0);
    at(span, format!("variant {name} ({}) makes an invalid job: {}", combination.join(", "), error.message))
}
