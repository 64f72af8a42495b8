//! `submit.sh`: a Slurm array job with one task per variant. Task `i` reads
//! line `i` of `variants.txt` and runs `olli run` on that variant's folder,
//! with the solver's threads set to the task's CPUs. A task whose variant
//! already has a summary exits at once, so resubmitting the array after an
//! interruption runs only what is missing.

use std::io;
use std::path::Path;

use super::folder::{Manifest, ERROR_FILE, VARIANTS_FILE};
use crate::output::{write_atomic, SUMMARY_FILE};

/// The script's file name.
pub const SCRIPT_FILE: &str = "submit.sh";

/// The submission script for the variants of `manifest`, named after the sweep `name`.
pub fn script(name: &str, manifest: &Manifest) -> String {
    let count = manifest.variants.len();
    let job_file = shell_quote(&manifest.job_file);
    format!(
        r#"#!/bin/bash
# Sweep `{name}`: {count} variants, one Slurm array task each, written by `olli sweep --emit-batch`.
# Submit from this folder:      cd <this folder> && sbatch submit.sh
# Resubmit after an interruption: the same command; finished variants are skipped.
# Collect the table afterwards: olli sweep --collect <this folder>
# The `olli` command on the cluster's PATH is used, or the one named by $OLLI.
#SBATCH --job-name=olli-{name}
#SBATCH --array=1-{count}
#SBATCH --ntasks=1
#SBATCH --cpus-per-task=1
#SBATCH --output=slurm-%A_%a.out
set -eu
cd "${{SLURM_SUBMIT_DIR:-.}}"
variant=$(sed -n "${{SLURM_ARRAY_TASK_ID}}p" {VARIANTS_FILE})
if [ -z "$variant" ]; then
    echo "array task ${{SLURM_ARRAY_TASK_ID}}: no such line in {VARIANTS_FILE}" >&2
    exit 2
fi
if [ -f "$variant/{SUMMARY_FILE}" ]; then
    echo "variant $variant: finished earlier, skipped"
    exit 0
fi
export RAYON_NUM_THREADS="${{SLURM_CPUS_PER_TASK:-1}}"
exec "${{OLLI:-olli}}" run "$variant/"{job_file} --output "$variant" --quiet 2> "$variant/{ERROR_FILE}"
"#
    )
}

/// Writes `DIR/submit.sh` (executable).
pub fn write_script(dir: &Path, name: &str, manifest: &Manifest) -> io::Result<()> {
    let path = dir.join(SCRIPT_FILE);
    write_atomic(&path, script(name, manifest).as_bytes())?;
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        std::fs::set_permissions(&path, std::fs::Permissions::from_mode(0o755))?;
    }
    Ok(())
}

/// A word for the shell, in single quotes when it needs them.
fn shell_quote(s: &str) -> String {
    if !s.is_empty() && s.bytes().all(|b| b.is_ascii_alphanumeric() || b"._-/+".contains(&b)) {
        s.to_string()
    } else {
        format!("'{}'", s.replace('\'', r"'\''"))
    }
}
