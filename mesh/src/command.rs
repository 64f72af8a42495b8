//! The library side of `olli mesh`: what `info`, `convert` and `generate` do,
//! so the binary only parses arguments and prints. Errors keep their type;
//! [`MeshError::exit_code`] maps them to the documented exit codes.

use std::path::Path;

use crate::error::MeshError;
use crate::export::write_vtu;
use crate::import::import;
use crate::spec::{generate, GeneratorSpec};
use crate::summary::summary;

impl MeshError {
    /// Exit code for the command line: 2 for bad input (a malformed,
    /// unsupported or unknown file, a bad spec or parameter), 1 otherwise
    /// (the file could not be read or written at all).
    pub fn exit_code(&self) -> i32 {
        match self {
            MeshError::Io { .. } | MeshError::Write { .. } => 1,
            _ => 2,
        }
    }
}

/// `olli mesh info FILE`: the summary text (one fact per line), followed by
/// any import notes as `note: ...` lines.
pub fn info(path: &Path) -> Result<String, MeshError> {
    let imported = import(path)?;
    let mut text = summary(&imported.mesh).to_string();
    for note in &imported.notes {
        text.push_str(&format!("note: {note}\n"));
    }
    Ok(text)
}

/// `olli mesh convert FILE OUT.vtu`: reads any supported mesh file and writes
/// it with its sets as `.vtu`; returns the import notes.
pub fn convert(input: &Path, output: &Path) -> Result<Vec<String>, MeshError> {
    let imported = import(input)?;
    write_vtu(&imported.mesh, output)?;
    Ok(imported.notes)
}

/// `olli mesh generate GENERATOR key=value ... -o OUT.vtu`: builds the spec
/// from options (see [`GeneratorSpec::from_options`]), writes the mesh and
/// returns its summary text.
pub fn generate_options(generator: &str, options: &[&str], output: &Path) -> Result<String, MeshError> {
    let mesh = generate(&GeneratorSpec::from_options(generator, options)?)?;
    write_vtu(&mesh, output)?;
    Ok(summary(&mesh).to_string())
}

/// `olli mesh generate SPEC.toml OUT.vtu`: runs the generator a TOML spec
/// file describes and writes the mesh; returns its summary text.
pub fn generate_file(spec: &Path, output: &Path) -> Result<String, MeshError> {
    let text = std::fs::read_to_string(spec).map_err(|source| MeshError::Io { path: spec.to_path_buf(), source })?;
    let spec_value = GeneratorSpec::from_toml(&text).map_err(|e| match e {
        MeshError::Spec { message } => MeshError::Spec { message: format!("{}: {message}", spec.display()) },
        other => other,
    })?;
    let mesh = generate(&spec_value)?;
    write_vtu(&mesh, output)?;
    Ok(summary(&mesh).to_string())
}
