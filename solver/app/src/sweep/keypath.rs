//! Key paths into a job's TOML: `materials.nr50.shear_modulus`,
//! `rigid.cover.move.squeeze.1`, `mesh.size.0`. A segment names a table key;
//! in a list of tables (`[[rigid]]`, `[[stage]]` …) it names the entry whose
//! `name` it is, or gives the entry's index from 0; in an array it gives the
//! item's index. The path must end at a single number, string or boolean that
//! the base job already has: a sweep changes values, it never adds keys.
//!
//! Editing goes through `toml_edit`, so a variant keeps the base job's
//! comments and layout and differs from it only in the swept values.

use std::fmt;

use toml_edit::{DocumentMut, Item, Table, Value};

/// One value of a swept parameter.
#[derive(Debug, Clone, PartialEq)]
pub enum ParamValue {
    /// A float, e.g. a modulus or a displacement.
    Float(f64),
    /// An integer, e.g. a number of divisions.
    Integer(i64),
    /// A string, e.g. a model name.
    Text(String),
    /// A boolean.
    Bool(bool),
}

impl ParamValue {
    /// The kind of value, as named in messages.
    pub fn kind(&self) -> &'static str {
        match self {
            ParamValue::Float(_) => "a number",
            ParamValue::Integer(_) => "an integer",
            ParamValue::Text(_) => "a string",
            ParamValue::Bool(_) => "a boolean",
        }
    }

    /// The value as a number, if it is one.
    pub fn as_f64(&self) -> Option<f64> {
        match self {
            ParamValue::Float(x) => Some(*x),
            ParamValue::Integer(i) => Some(*i as f64),
            _ => None,
        }
    }

    fn to_toml(&self) -> Value {
        match self {
            ParamValue::Float(x) => Value::from(*x),
            ParamValue::Integer(i) => Value::from(*i),
            ParamValue::Text(s) => Value::from(s.as_str()),
            ParamValue::Bool(b) => Value::from(*b),
        }
    }
}

impl fmt::Display for ParamValue {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            // `{:?}` keeps the `.0` of whole numbers, as TOML writes floats.
            ParamValue::Float(x) => write!(f, "{x:?}"),
            ParamValue::Integer(i) => write!(f, "{i}"),
            ParamValue::Text(s) => write!(f, "{s}"),
            ParamValue::Bool(b) => write!(f, "{b}"),
        }
    }
}

/// Why a key path does not lead to a value of the base job.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum KeyPathError {
    /// A segment names nothing in the base job.
    #[error("the base job has no `{segment}` in `{parent}`{hint}")]
    Missing {
        /// The path up to the missing segment.
        parent: String,
        /// The key or index not found.
        segment: String,
        /// A "did you mean" suggestion or the keys it holds, or empty.
        hint: String,
    },
    /// The path ends at a table or array instead of a value.
    #[error("`{path}` is {what}, not a single value: add a key or index to the path{hint}")]
    NotAValue {
        /// The whole key path.
        path: String,
        /// What it leads to, e.g. "a table".
        what: &'static str,
        /// What it holds, e.g. ` (it holds `a`, `b`)`, or empty.
        hint: String,
    },
    /// The path goes on after reaching a value.
    #[error("`{path}` is a value, so `{segment}` cannot follow it")]
    PastAValue {
        /// The path up to the value.
        path: String,
        /// The first segment after it.
        segment: String,
    },
    /// The key path has no segment.
    #[error("the key path is empty")]
    Empty,
}

/// Where a walk along the path stands.
enum Slot<'a> {
    Item(&'a mut Item),
    Table(&'a mut Table),
    Value(&'a mut Value),
}

/// The value at `path` in `doc` (a number, string or boolean).
pub fn get(doc: &mut DocumentMut, path: &str) -> Result<ParamValue, KeyPathError> {
    let value = walk(doc, path)?;
    Ok(match value {
        Value::Float(x) => ParamValue::Float(*x.value()),
        Value::Integer(i) => ParamValue::Integer(*i.value()),
        Value::String(s) => ParamValue::Text(s.value().clone()),
        Value::Boolean(b) => ParamValue::Bool(*b.value()),
        other => unreachable!("walk ends at scalars, got {other:?}"),
    })
}

/// Replaces the value at `path`, keeping the comments around it.
pub fn set(doc: &mut DocumentMut, path: &str, value: &ParamValue) -> Result<(), KeyPathError> {
    let slot = walk(doc, path)?;
    let decor = slot.decor().clone();
    *slot = value.to_toml();
    *slot.decor_mut() = decor;
    Ok(())
}

fn walk<'a>(doc: &'a mut DocumentMut, path: &str) -> Result<&'a mut Value, KeyPathError> {
    if path.trim().is_empty() {
        return Err(KeyPathError::Empty);
    }
    let mut slot = Slot::Table(doc.as_table_mut());
    let mut done: Vec<&str> = Vec::new();
    for segment in path.split('.') {
        let parent = if done.is_empty() { "(top level)".to_string() } else { done.join(".") };
        slot = step(slot, segment, &parent)?;
        done.push(segment);
    }
    let hint = |keys: Vec<String>| if keys.is_empty() { String::new() } else { format!(" (it holds {})", keys.join(", ")) };
    let not_a_value = |what, hint| KeyPathError::NotAValue { path: path.into(), what, hint };
    let value: &mut Value = match slot {
        Slot::Value(v) | Slot::Item(Item::Value(v)) => v,
        Slot::Item(Item::Table(t)) | Slot::Table(t) => {
            return Err(not_a_value("a table", hint(t.iter().map(|(k, _)| format!("`{k}`")).collect())))
        }
        Slot::Item(Item::ArrayOfTables(a)) => return Err(not_a_value("a list of tables", hint(entry_names(a.iter())))),
        Slot::Item(Item::None) => return Err(not_a_value("empty", String::new())),
    };
    let problem = match &*value {
        Value::Array(a) => Some(not_a_value("an array", hint(vec![format!("items 0 to {}", a.len().saturating_sub(1))]))),
        Value::InlineTable(t) => Some(not_a_value("a table", hint(t.iter().map(|(k, _)| format!("`{k}`")).collect()))),
        v if is_scalar(v) => None,
        _ => Some(not_a_value("a date or time", String::new())),
    };
    match problem {
        Some(e) => Err(e),
        None => Ok(value),
    }
}

fn is_scalar(v: &Value) -> bool {
    matches!(v, Value::Float(_) | Value::Integer(_) | Value::String(_) | Value::Boolean(_))
}

/// How to name the entries of a list of tables in a message: by name, else by index.
fn entry_names<'a>(tables: impl Iterator<Item = &'a Table>) -> Vec<String> {
    tables
        .enumerate()
        .map(|(i, t)| match t.get("name").and_then(|n| n.as_str()) {
            Some(n) => format!("`{n}`"),
            None => format!("{i}"),
        })
        .collect()
}

fn step<'a>(slot: Slot<'a>, segment: &str, parent: &str) -> Result<Slot<'a>, KeyPathError> {
    let missing = |choices: Vec<String>| {
        let bare: Vec<String> = choices.iter().map(|c| c.trim_matches('`').to_string()).collect();
        let hint = match crate::job::diagnostics::nearest(segment, bare.iter().map(String::as_str)) {
            Some(best) => format!("; did you mean `{best}`?"),
            None if choices.is_empty() => String::new(),
            None => format!(" (it holds {})", choices.join(", ")),
        };
        KeyPathError::Missing { parent: parent.to_string(), segment: segment.to_string(), hint }
    };
    let index = segment.parse::<usize>().ok();
    match slot {
        Slot::Table(t) => {
            let keys: Vec<String> = t.iter().map(|(k, _)| format!("`{k}`")).collect();
            t.get_mut(segment).map(Slot::Item).ok_or_else(|| missing(keys))
        }
        Slot::Item(Item::Table(t)) => step(Slot::Table(t), segment, parent),
        Slot::Item(Item::ArrayOfTables(a)) => {
            let names = entry_names(a.iter());
            let found = match index {
                Some(i) => a.get_mut(i),
                None => a.iter_mut().find(|t| t.get("name").and_then(|n| n.as_str()) == Some(segment)),
            };
            found.map(Slot::Table).ok_or_else(|| missing(names))
        }
        Slot::Item(Item::Value(v)) => step(Slot::Value(v), segment, parent),
        Slot::Value(Value::InlineTable(t)) => {
            let keys: Vec<String> = t.iter().map(|(k, _)| format!("`{k}`")).collect();
            t.get_mut(segment).map(Slot::Value).ok_or_else(|| missing(keys))
        }
        Slot::Value(Value::Array(a)) => {
            let count = a.len();
            let found = match index {
                Some(i) => a.get_mut(i),
                None => a.iter_mut().find(|v| v.as_inline_table().and_then(|t| t.get("name")).and_then(|n| n.as_str()) == Some(segment)),
            };
            let items = (0..count).map(|i| i.to_string()).collect();
            found.map(Slot::Value).ok_or_else(|| missing(items))
        }
        _ => Err(KeyPathError::PastAValue { path: parent.to_string(), segment: segment.to_string() }),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const JOB: &str = r#"
title = "t"
[mesh]
generate = "rectangle"
size = [15.0, 40.0]   # r, z
divisions = [8, 20]
[materials.nr-50]
shear_modulus = 0.55  # MPa
[[rigid]]
name = "cover"
move = { squeeze = [0.0, -0.8] }
[[stage]]
name = "push"
"#;

    fn doc() -> DocumentMut {
        JOB.parse().unwrap()
    }

    #[test]
    fn reads_and_writes_through_tables_lists_and_arrays() {
        let mut d = doc();
        assert_eq!(get(&mut d, "materials.nr-50.shear_modulus").unwrap(), ParamValue::Float(0.55));
        assert_eq!(get(&mut d, "rigid.cover.move.squeeze.1").unwrap(), ParamValue::Float(-0.8));
        assert_eq!(get(&mut d, "rigid.0.move.squeeze.1").unwrap(), ParamValue::Float(-0.8));
        assert_eq!(get(&mut d, "mesh.divisions.1").unwrap(), ParamValue::Integer(20));
        set(&mut d, "mesh.size.1", &ParamValue::Float(60.0)).unwrap();
        set(&mut d, "materials.nr-50.shear_modulus", &ParamValue::Float(0.7)).unwrap();
        let text = d.to_string();
        assert!(text.contains("size = [15.0, 60.0]   # r, z"), "{text}");
        assert!(text.contains("shear_modulus = 0.7  # MPa"), "{text}");
    }

    #[test]
    fn explains_paths_that_lead_nowhere() {
        let mut d = doc();
        let e = get(&mut d, "materials.nr-50.shear_modulu").unwrap_err().to_string();
        assert!(e.contains("no `shear_modulu` in `materials.nr-50`") && e.contains("did you mean `shear_modulus`"), "{e}");
        let e = get(&mut d, "rigid.lid.move").unwrap_err().to_string();
        assert!(e.contains("no `lid` in `rigid`") && e.contains("`cover`"), "{e}");
        let e = get(&mut d, "mesh.size").unwrap_err().to_string();
        assert!(e.contains("is an array") && e.contains("items 0 to 1"), "{e}");
        let e = get(&mut d, "title.x").unwrap_err().to_string();
        assert!(e.contains("is a value"), "{e}");
    }
}
