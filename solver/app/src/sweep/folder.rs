//! The sweep folder: one folder per variant holding its job file (and, once
//! run, its results), `variants.txt` (the variant names, one a line: what a
//! batch array task reads), and `sweep.json` (the parameters and each
//! variant's values: what the collection reads). Writing a variant whose job
//! text changed since an earlier write drops its old summary, so stale
//! results are never taken for finished ones.

use std::io;
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use super::keypath::ParamValue;
use super::plan::Plan;
use crate::output::{write_atomic, SUMMARY_FILE};

/// The manifest's file name.
pub const MANIFEST_FILE: &str = "sweep.json";
/// The variant list's file name.
pub const VARIANTS_FILE: &str = "variants.txt";
/// Where a variant's run puts its error output.
pub const ERROR_FILE: &str = "olli.err";

/// `sweep.json`: what the collection needs to know about the variants.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Manifest {
    /// The sweep file it was written from.
    pub sweep: String,
    /// File name of each variant's job inside its folder.
    pub job_file: String,
    /// Key paths of the parameters (the table's parameter columns).
    pub parameters: Vec<String>,
    /// The variants, in plan order.
    pub variants: Vec<ManifestVariant>,
}

/// One variant in the manifest.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ManifestVariant {
    /// Variant name, also its folder.
    pub name: String,
    /// Its parameter values as written in its job.
    pub values: Vec<serde_json::Value>,
    /// Unknowns of its model (for the memory estimate of the local runner).
    pub unknowns: usize,
    /// Spatial dimension of its mesh.
    pub dimension: usize,
}

impl Manifest {
    /// The manifest of a plan.
    pub fn of(plan: &Plan) -> Self {
        let json = |v: &ParamValue| match v {
            ParamValue::Float(x) => serde_json::json!(x),
            ParamValue::Integer(i) => serde_json::json!(i),
            ParamValue::Text(s) => serde_json::json!(s),
            ParamValue::Bool(b) => serde_json::json!(b),
        };
        Manifest {
            sweep: plan.path.display().to_string(),
            job_file: plan.job_file_name.clone(),
            parameters: plan.parameters.iter().map(|p| p.key.clone()).collect(),
            variants: plan
                .variants
                .iter()
                .map(|v| ManifestVariant {
                    name: v.name.clone(),
                    values: v.values.iter().map(json).collect(),
                    unknowns: v.unknowns,
                    dimension: v.dimension,
                })
                .collect(),
        }
    }

    /// Reads `DIR/sweep.json`.
    pub fn read(dir: &Path) -> io::Result<Self> {
        let path = dir.join(MANIFEST_FILE);
        let text = std::fs::read_to_string(&path).map_err(|e| io::Error::new(e.kind(), format!("{}: {e}", path.display())))?;
        serde_json::from_str(&text).map_err(|e| io::Error::new(io::ErrorKind::InvalidData, format!("{}: {e}", path.display())))
    }

    /// The job file of a variant.
    pub fn job_path(&self, dir: &Path, variant: &str) -> PathBuf {
        dir.join(variant).join(&self.job_file)
    }
}

/// Writes every variant's job, `variants.txt` and `sweep.json` into `dir`.
/// Variants whose job text is unchanged keep their results.
pub fn write_variants(plan: &Plan, dir: &Path) -> io::Result<Manifest> {
    std::fs::create_dir_all(dir)?;
    for v in &plan.variants {
        let folder = dir.join(&v.name);
        std::fs::create_dir_all(&folder)?;
        let job = folder.join(&plan.job_file_name);
        if std::fs::read_to_string(&job).ok().as_deref() != Some(v.text.as_str()) {
            remove_if_present(&folder.join(SUMMARY_FILE))?;
            write_atomic(&job, v.text.as_bytes())?;
        }
    }
    let names: String = plan.variants.iter().map(|v| format!("{}\n", v.name)).collect();
    write_atomic(&dir.join(VARIANTS_FILE), names.as_bytes())?;
    let manifest = Manifest::of(plan);
    let json = serde_json::to_string_pretty(&manifest).expect("plain data serialises") + "\n";
    write_atomic(&dir.join(MANIFEST_FILE), json.as_bytes())?;
    Ok(manifest)
}

fn remove_if_present(path: &Path) -> io::Result<()> {
    match std::fs::remove_file(path) {
        Err(e) if e.kind() != io::ErrorKind::NotFound => Err(e),
        _ => Ok(()),
    }
}
