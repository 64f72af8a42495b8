//! The `[mesh]` table and the `[[select]]` tables of a job: run a generator
//! or import a file, then add the geometric selections as named sets.

use std::ops::Range;
use std::path::Path;

use olli_mesh::select::{default_tolerance, select_nodes, select_sides};
use olli_mesh::{GeneratorSpec, Mesh};
use serde::Deserialize;
use toml::Spanned;

use super::diagnostics::{nearest, with_suggestion, InputError};
use super::schema::SelectSpec;

/// Builds the mesh a `[mesh]` table describes; `file` paths are relative to `job_dir`.
/// Returns the mesh and the importer's notes.
pub fn mesh_from_table(job: &Path, source: &str, table: &Spanned<toml::Table>) -> Result<(Mesh, Vec<String>), InputError> {
    let span = Some(table.span());
    let t = table.get_ref();
    let err = |message: String| InputError::at(job, source, span.clone(), message);
    if let Some(file) = t.get("file") {
        if let Some(extra) = t.keys().find(|k| *k != "file") {
            return Err(err(format!("[mesh]: `{extra}` cannot be combined with `file` (a mesh is either imported or generated)")));
        }
        let file = file.as_str().ok_or_else(|| err("[mesh]: `file` must be a string (a path)".into()))?;
        let dir = job.parent().unwrap_or(Path::new("."));
        let imported = olli_mesh::import(&dir.join(file)).map_err(|e| err(format!("[mesh]: {e}")))?;
        return Ok((imported.mesh, imported.notes));
    }
    if !t.contains_key("generate") {
        let hint = t.keys().find_map(|k| nearest(k, ["file", "generate"])).map(|k| format!("; did you mean `{k}`?")).unwrap_or_default();
        return Err(err(format!("[mesh]: give `generate = \"<shape>\"` with its parameters, or `file = \"<path>\"`{hint}")));
    }
    let spec = GeneratorSpec::deserialize(toml::Value::Table(t.clone())).map_err(|e| {
        let message = e.message().trim();
        // The table was re-read without positions: find the quoted key in its text.
        let key = if message.starts_with("unknown variant") { Some("generate") } else { message.split('`').nth(1) };
        let at = key.and_then(|key| key_offset(source, table.span(), key));
        InputError::at(job, source, at.map(|o| o..o).or(span.clone()), format!("[mesh]: {}", with_suggestion(message)))
    })?;
    let mesh = olli_mesh::generate(&spec).map_err(|e| {
        let at = match &e {
            olli_mesh::MeshError::InvalidParameter { key, .. } => key_offset(source, table.span(), key),
            _ => None,
        };
        InputError::at(job, source, at.map(|o| o..o).or(span.clone()), format!("[mesh]: {e}"))
    })?;
    Ok((mesh, Vec::new()))
}

/// Byte offset of the line `key = ...` in the table starting at `span`
/// (up to the next table header). `key` may be a path like `divisions[0]`.
fn key_offset(source: &str, span: Range<usize>, key: &str) -> Option<usize> {
    let key = key.split(['[', '.']).next()?;
    let text = source.get(span.start..)?;
    let mut offset = span.start;
    for (i, line) in text.split_inclusive('\n').enumerate() {
        let trimmed = line.trim_start();
        if i > 0 && trimmed.starts_with('[') {
            break;
        }
        if trimmed.strip_prefix(key).is_some_and(|rest| rest.trim_start().starts_with('=')) {
            return Some(offset + line.len() - trimmed.len());
        }
        offset += line.len();
    }
    None
}

/// Adds each selection as a new set of the mesh, in file order.
pub fn apply_selections(job: &Path, source: &str, mesh: &mut Mesh, selects: &[Spanned<SelectSpec>]) -> Result<(), InputError> {
    for s in selects {
        let span: Range<usize> = s.span();
        let spec = s.get_ref();
        let err = |m: String| InputError::at(job, source, Some(span.clone()), format!("[[select]] `{}`: {m}", spec.name));
        if set_exists(mesh, &spec.name) {
            return Err(err("a set of this name already exists; choose another name".into()));
        }
        let tol = spec.tolerance.unwrap_or_else(|| default_tolerance(mesh));
        if !(tol.is_finite() && tol >= 0.0) {
            return Err(err(format!("`tolerance` must be a non-negative length, got {tol}")));
        }
        let given = [spec.nodes.is_some(), spec.sides.is_some(), spec.elements.is_some()];
        if given.iter().filter(|&&g| g).count() != 1 {
            return Err(err("give exactly one of `nodes`, `sides` or `elements`".into()));
        }
        let mesh_err = |e: olli_mesh::MeshError| {
            let text = e.to_string();
            let hint = text
                .split("no set named `")
                .nth(1)
                .and_then(|rest| rest.split('`').next())
                .and_then(|name| nearest(name, all_set_names(mesh).iter().map(String::as_str)).map(|n| format!("; did you mean `{n}`?")))
                .unwrap_or_default();
            err(format!("{text}{hint}"))
        };
        let count = if let Some(sel) = &spec.nodes {
            let nodes = select_nodes(mesh, sel, tol).map_err(mesh_err)?;
            let n = nodes.len();
            mesh.node_sets.insert(spec.name.clone(), nodes);
            n
        } else if let Some(sel) = &spec.sides {
            let sides = select_sides(mesh, sel, tol).map_err(mesh_err)?;
            let n = sides.len();
            mesh.side_sets.insert(spec.name.clone(), sides);
            n
        } else {
            let sel = spec.elements.as_ref().expect("one of the three is given");
            let mut chosen = vec![false; mesh.node_count()];
            for n in select_nodes(mesh, sel, tol).map_err(mesh_err)? {
                chosen[n] = true;
            }
            let elements: Vec<usize> = (0..mesh.element_count()).filter(|&e| mesh.element_nodes(e).iter().all(|&n| chosen[n])).collect();
            let n = elements.len();
            mesh.element_sets.insert(spec.name.clone(), elements);
            n
        };
        if count == 0 {
            return Err(err(format!("selects nothing (tolerance {tol:.3e}); check the geometry or raise `tolerance`")));
        }
    }
    Ok(())
}

fn set_exists(mesh: &Mesh, name: &str) -> bool {
    mesh.node_sets.contains_key(name) || mesh.side_sets.contains_key(name) || mesh.element_sets.contains_key(name)
}

/// Every set name of the mesh (node, side and element sets), sorted without repeats.
pub fn all_set_names(mesh: &Mesh) -> Vec<String> {
    let mut names: Vec<String> = mesh.node_sets.keys().chain(mesh.side_sets.keys()).chain(mesh.element_sets.keys()).cloned().collect();
    names.sort();
    names.dedup();
    names
}

#[cfg(test)]
mod tests {
    use super::*;
    use olli_mesh::generate::{rectangle, RectangleParams};

    /// An imported mesh keeps its sets (written with set markers, read back)
    /// and its path is taken relative to the job file.
    #[test]
    fn imports_a_mesh_file_beside_the_job() {
        let dir = std::env::temp_dir().join(format!("olli-mesh-source-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let mesh = rectangle(&RectangleParams { size: [2.0, 1.0], divisions: [4, 2], ..Default::default() }).unwrap();
        olli_mesh::write_vtu(&mesh, &dir.join("part.vtu")).unwrap();
        let job = dir.join("job.toml");
        let text = "[mesh]\nfile = \"part.vtu\"\n";
        let table: toml::Table = toml::from_str(text).unwrap();
        let spanned = Spanned::new(0..text.len(), table["mesh"].as_table().unwrap().clone());
        let (read, _) = mesh_from_table(&job, text, &spanned).unwrap();
        assert_eq!((read.node_count(), read.element_count()), (15, 8));
        assert_eq!(read.side_sets["top"].len(), 4);
        let missing = Spanned::new(0..text.len(), toml::from_str::<toml::Table>("file = \"nope.vtu\"").unwrap());
        let e = mesh_from_table(&job, text, &missing).unwrap_err();
        assert!(e.message.contains("nope.vtu") && e.message.contains("cannot read"), "{e}");
        let both = Spanned::new(0..text.len(), toml::from_str::<toml::Table>("file = \"part.vtu\"\ngenerate = \"disc\"").unwrap());
        assert!(mesh_from_table(&job, text, &both).unwrap_err().message.contains("cannot be combined"));
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
