//! What `olli material` analyses: a model name, its named constants and a
//! volumetric law, read either from the `[material]` table of a TOML file or
//! from command-line options. Every key is checked against the known ones
//! (a misspelling gets the nearest valid key suggested), and every message
//! names the file, line and key.

use std::ops::Range;

use olli_app::job::build::material_error_key;
use olli_app::job::diagnostics::{line_column, nearest};
use olli_solver::material::registry::{self, ALL_CONSTANTS, LIST_CONSTANTS, MODEL_NAMES};
use olli_solver::material::{Material, MaterialError, Mullins, Prony, VolumetricForm};
use thiserror::Error;
use toml::de::{DeTable, DeValue};

/// Keys of a `[material]` table besides the constants.
const TABLE_KEYS: &[&str] = &["model", "volumetric", "prony", "mullins"];
const VOLUMETRIC_NAMES: &str = "quadratic, logarithmic, simo-taylor";

/// A material as given by the user, before it is built.
#[derive(Debug, Clone)]
pub struct MaterialSpec {
    pub model: String,
    pub constants: Vec<(&'static str, f64)>,
    pub volumetric: VolumetricForm,
    /// Where each key was given ("FILE:LINE:COLUMN" or "option --param"), for messages.
    origins: Vec<(&'static str, String)>,
    /// Where the whole material came from (a file path or "options").
    pub source: String,
    /// Prony terms `[g_i, tau_i]` (file key `prony`), if given.
    pub prony: Option<Vec<[f64; 2]>>,
    /// Ogden–Roxburgh constants r, m, beta (file key `mullins`), if given.
    pub mullins: Option<[f64; 3]>,
}

/// Bad input: the message names the file (or option), the position and the key.
#[derive(Debug, Error)]
pub enum SpecError {
    #[error("{path}: cannot read: {message}")]
    Read { path: String, message: String },
    #[error("{path}: {message}")]
    Syntax { path: String, message: String },
    #[error("{at}: unknown key `{key}` in {table}{hint}")]
    UnknownKey { at: String, key: String, table: &'static str, hint: String },
    #[error("{at}: key `{key}` must be {expected}")]
    WrongType { at: String, key: String, expected: &'static str },
    #[error("{path}: no [material] table (write the model and its constants under `[material]`)")]
    NoMaterialTable { path: String },
    #[error("{at}: no `model` key (one of: {known})", known = MODEL_NAMES.join(", "))]
    MissingModel { at: String },
    #[error("{at}: unknown model `{name}`{hint} (known: {known})", known = MODEL_NAMES.join(", "))]
    UnknownModel { at: String, name: String, hint: String },
    #[error("{at}: unknown volumetric law `{name}`{hint} (known: {VOLUMETRIC_NAMES})")]
    UnknownVolumetric { at: String, name: String, hint: String },
    #[error("option --param `{text}`: expected NAME=VALUE with a number, e.g. shear_modulus=0.6")]
    BadParam { text: String },
    #[error("{at}: {source}")]
    Material {
        at: String,
        #[source]
        source: MaterialError,
    },
}

/// ` (did you mean `x`?)` for the known name closest to `given`, if close
/// (the job files' spelling rule).
pub fn did_you_mean(given: &str, known: &[&str]) -> String {
    nearest(given, known.iter().copied()).map(|k| format!(" (did you mean `{k}`?)")).unwrap_or_default()
}

fn known_constant(name: &str) -> Option<&'static str> {
    ALL_CONSTANTS.iter().copied().find(|k| *k == name)
}

/// A TOML integer or float as f64.
fn toml_number(value: &DeValue) -> Option<f64> {
    match value {
        DeValue::Integer(i) => i64::from_str_radix(&i.as_str().replace('_', ""), i.radix()).ok().map(|v| v as f64),
        DeValue::Float(f) => f.as_str().replace('_', "").parse::<f64>().ok(),
        _ => None,
    }
}

impl MaterialSpec {
    /// Reads the `[material]` table of the TOML file at `path`.
    pub fn from_file(path: &std::path::Path) -> Result<Self, SpecError> {
        let shown = path.display().to_string();
        let text = std::fs::read_to_string(path).map_err(|e| SpecError::Read { path: shown.clone(), message: e.to_string() })?;
        Self::from_toml(&text, &shown)
    }

    /// Parses TOML `text`; `path` is only used in messages.
    pub fn from_toml(text: &str, path: &str) -> Result<Self, SpecError> {
        let at = |span: Range<usize>| {
            let (l, c) = line_column(text, span.start);
            format!("{path}:{l}:{c}")
        };
        let root = DeTable::parse(text)
            .map_err(|e| SpecError::Syntax { path: path.to_string(), message: e.to_string().trim_end().to_string() })?;
        // Keys come sorted by name; report problems in file order.
        let mut top: Vec<_> = root.get_ref().iter().collect();
        top.sort_by_key(|(k, _)| k.span().start);
        let mut table = None;
        for (key, value) in top {
            if key.get_ref() != "material" {
                return Err(SpecError::UnknownKey {
                    at: at(key.span()),
                    key: key.get_ref().to_string(),
                    table: "the file (it holds one [material] table)",
                    hint: did_you_mean(key.get_ref(), &["material"]),
                });
            }
            match value.get_ref() {
                DeValue::Table(t) => table = Some((t, key.span())),
                _ => return Err(SpecError::WrongType { at: at(key.span()), key: "material".into(), expected: "a table ([material])" }),
            }
        }
        let (table, table_span) = table.ok_or_else(|| SpecError::NoMaterialTable { path: path.to_string() })?;
        let mut entries: Vec<_> = table.iter().collect();
        entries.sort_by_key(|(k, _)| k.span().start);

        let mut model = None;
        let mut volumetric = VolumetricForm::Quadratic;
        let mut constants = Vec::new();
        let mut origins = Vec::new();
        let (mut prony, mut mullins) = (None, None);
        for (key, value) in entries {
            let name = key.get_ref().as_ref();
            let here = at(key.span());
            let text_value = |expected| match value.get_ref() {
                DeValue::String(s) => Ok(s.to_string()),
                _ => Err(SpecError::WrongType { at: here.clone(), key: name.to_string(), expected }),
            };
            match name {
                "model" => {
                    let m = text_value("a string: the model name")?;
                    if !MODEL_NAMES.contains(&m.as_str()) {
                        return Err(SpecError::UnknownModel { at: here, hint: did_you_mean(&m, MODEL_NAMES), name: m });
                    }
                    origins.push(("model", here));
                    model = Some(m);
                }
                "prony" => {
                    let terms: Option<Vec<[f64; 2]>> = match value.get_ref() {
                        DeValue::Array(items) if !items.is_empty() => items
                            .iter()
                            .map(|t| match t.get_ref() {
                                DeValue::Array(pair) if pair.len() == 2 => {
                                    Some([toml_number(pair[0].get_ref())?, toml_number(pair[1].get_ref())?])
                                }
                                _ => None,
                            })
                            .collect(),
                        _ => None,
                    };
                    let expected = "an array of [g_i, tau_i] pairs";
                    prony = Some(terms.ok_or_else(|| SpecError::WrongType { at: here.clone(), key: name.to_string(), expected })?);
                    origins.push(("prony", here));
                }
                "mullins" => {
                    let expected = "a table { r = ..., m = ..., beta = ... } of numbers";
                    let wrong = || SpecError::WrongType { at: here.clone(), key: name.to_string(), expected };
                    let DeValue::Table(t) = value.get_ref() else { return Err(wrong()) };
                    let mut c = [f64::NAN, f64::NAN, 0.0];
                    for (k, v) in t.iter() {
                        let i = ["r", "m", "beta"].iter().position(|n| *n == k.get_ref().as_ref()).ok_or_else(wrong)?;
                        c[i] = toml_number(v.get_ref()).ok_or_else(wrong)?;
                    }
                    mullins = Some(c);
                    origins.push(("mullins", here));
                }
                "volumetric" => {
                    let v = text_value("a string: quadratic, logarithmic or simo-taylor")?;
                    volumetric = VolumetricForm::from_name(&v).ok_or_else(|| SpecError::UnknownVolumetric {
                        at: here.clone(),
                        hint: did_you_mean(&v, &["quadratic", "logarithmic", "simo-taylor"]),
                        name: v,
                    })?;
                }
                _ => {
                    let Some(constant) = known_constant(name) else {
                        let known: Vec<&str> = TABLE_KEYS.iter().chain(ALL_CONSTANTS).copied().collect();
                        return Err(SpecError::UnknownKey {
                            at: here,
                            key: name.to_string(),
                            table: "[material]",
                            hint: did_you_mean(name, &known),
                        });
                    };
                    let numbers = if LIST_CONSTANTS.contains(&constant) {
                        match value.get_ref() {
                            DeValue::Array(items) if !items.is_empty() => items.iter().map(|v| toml_number(v.get_ref())).collect(),
                            _ => None,
                        }
                    } else {
                        toml_number(value.get_ref()).map(|v| vec![v])
                    };
                    let expected = if LIST_CONSTANTS.contains(&constant) { "an array of numbers, one per term" } else { "a number" };
                    let numbers = numbers.ok_or_else(|| SpecError::WrongType { at: here.clone(), key: name.to_string(), expected })?;
                    for number in numbers {
                        constants.push((constant, number));
                    }
                    origins.push((constant, here));
                }
            }
        }
        let model = model.ok_or_else(|| SpecError::MissingModel { at: at(table_span) })?;
        Ok(MaterialSpec { model, constants, volumetric, origins, source: path.to_string(), prony, mullins })
    }

    /// A material from `--model NAME --param KEY=VALUE ...`.
    pub fn from_options(model: &str, params: &[String], volumetric: &str) -> Result<Self, SpecError> {
        if !MODEL_NAMES.contains(&model) {
            return Err(SpecError::UnknownModel {
                at: "option --model".into(),
                name: model.to_string(),
                hint: did_you_mean(model, MODEL_NAMES),
            });
        }
        let volumetric = VolumetricForm::from_name(volumetric).ok_or_else(|| SpecError::UnknownVolumetric {
            at: "option --volumetric".into(),
            name: volumetric.to_string(),
            hint: did_you_mean(volumetric, &["quadratic", "logarithmic", "simo-taylor"]),
        })?;
        let mut constants = Vec::new();
        let mut origins = vec![("model", format!("option --model {model}"))];
        for text in params {
            let (name, value) = text.split_once('=').ok_or_else(|| SpecError::BadParam { text: text.clone() })?;
            let name = name.trim();
            let constant = known_constant(name).ok_or_else(|| SpecError::UnknownKey {
                at: "option --param".into(),
                key: name.to_string(),
                table: "the material parameters",
                hint: did_you_mean(name, ALL_CONSTANTS),
            })?;
            let value: f64 = value.trim().parse().map_err(|_| SpecError::BadParam { text: text.clone() })?;
            constants.push((constant, value));
            origins.push((constant, format!("option --param {text}")));
        }
        Ok(MaterialSpec { model: model.to_string(), constants, volumetric, origins, source: "options".into(), prony: None, mullins: None })
    }

    /// Builds the material; a bad constant is reported where it was given.
    pub fn build(&self) -> Result<Material, SpecError> {
        let located = |key: Option<&str>, source: MaterialError| {
            let at = key
                .and_then(|k| self.origins.iter().rev().find(|(n, _)| *n == k).map(|(_, o)| o.clone()))
                .unwrap_or_else(|| self.source.clone());
            SpecError::Material { at, source }
        };
        let mut material = registry::material(&self.model, &self.constants, self.volumetric).map_err(|e| {
            let key = material_error_key(&e).map(str::to_string);
            located(key.as_deref(), e)
        })?;
        if let Some([r, m, beta]) = self.mullins {
            material = material.with_mullins(Mullins::new(r, m, beta).map_err(|e| located(Some("mullins"), e))?);
        }
        if let Some(terms) = &self.prony {
            material = material.with_prony(Prony::new(terms).map_err(|e| located(Some("prony"), e))?);
        }
        Ok(material)
    }

    /// The constants as `name = value` for the report header (a list
    /// constant as `name = [a, b]`).
    pub fn describe(&self) -> String {
        let mut parts = vec![format!("model = {}", self.model)];
        for (i, (k, _)) in self.constants.iter().enumerate() {
            if self.constants[..i].iter().any(|(seen, _)| seen == k) {
                continue;
            }
            let values: Vec<String> = self.constants.iter().filter(|(n, _)| n == k).map(|(_, v)| v.to_string()).collect();
            parts.push(if LIST_CONSTANTS.contains(k) { format!("{k} = [{}]", values.join(", ")) } else { format!("{k} = {}", values[0]) });
        }
        parts.push(format!("volumetric = {}", self.volumetric.name()));
        parts.join(", ")
    }
}
