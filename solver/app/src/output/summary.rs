//! `summary.json`: the machine-readable final state of a run — whether it
//! converged or where and why it stopped, the last converged increment,
//! reactions per named set, peak values, counts and times, the files
//! written, and the physical dimension of every `history.csv` column (olli
//! is unit-agnostic: a consistent set such as mm, N, MPa gives N for
//! "force").

use std::collections::BTreeMap;

use serde::Serialize;

use super::fields::Peaks;
use super::performance::Performance;
use super::stage_peaks::StagePeaks;

/// Where the last converged increment is.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IncrementRef {
    /// Stage name.
    pub stage: String,
    /// Increment number within the stage.
    pub increment: usize,
    /// Load factor of the stage reached, 0 to 1.
    pub load_factor: f64,
}

/// Names of the files a run wrote, relative to the output folder.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Files {
    /// The history table (`history.csv`).
    pub history: String,
    /// The `.pvd` collection of the frames.
    pub collection: String,
    /// The run log.
    pub log: String,
    /// Number of `.vtu` frames written.
    pub frames: usize,
}

/// The whole summary.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RunSummary {
    /// Version of olli that wrote the summary.
    pub olli_version: String,
    /// The job file as given.
    pub job: String,
    /// The job's title.
    pub title: String,
    /// Analysis kind as written in the job.
    pub analysis: String,
    /// `"converged"` or `"stopped"`.
    pub status: String,
    /// Why the run stopped (absent when it converged).
    pub reason: Option<String>,
    /// The stage the run stopped in (absent when it converged).
    pub stopped_in_stage: Option<String>,
    /// Stages that reached their end.
    pub stages_completed: Vec<String>,
    /// The last converged increment (absent when none converged).
    pub last_increment: Option<IncrementRef>,
    /// Reaction force of each named set at the last converged increment, by
    /// component (axisymmetric: over the full 2π).
    pub reactions: BTreeMap<String, BTreeMap<String, f64>>,
    /// Each rigid surface at the last converged increment: the force of the
    /// rubber on it by component, `contact_width` and `peak_pressure`, with
    /// fluids `sealing_margin`, and its contact bands (`bands`, the count,
    /// and `band<k>_contact_width`, `band<k>_peak_pressure` for each).
    pub rigid: BTreeMap<String, BTreeMap<String, f64>>,
    /// Each fluid at the last converged increment: `pressure` and
    /// `wetted_length` (2-D) or `wetted_area` (3-D).
    pub fluids: BTreeMap<String, BTreeMap<String, f64>>,
    /// The `applied_...` columns at the last converged increment.
    pub applied: BTreeMap<String, f64>,
    /// Each insert at the last converged increment, keyed as its
    /// `history.csv` columns without the `insert_<name>_` prefix: position
    /// (`x` ... `rz`, rotations in degrees), `force_<c>` and `moment_<c>` of
    /// the rubber on it.
    pub inserts: BTreeMap<String, BTreeMap<String, f64>>,
    /// Each `[[gland]]` at the last converged increment: `fill` and
    /// `squeeze` (percent), `rubber_area`, `free_area`, `depth`.
    pub glands: BTreeMap<String, super::seal_values::GlandEntry>,
    /// Each `[[extrusion]]` gap at the last converged increment: `depth`
    /// past its edge, the `node` reaching furthest and where it is (`at`).
    pub extrusions: BTreeMap<String, super::seal_values::ExtrusionEntry>,
    /// Largest force of the stabilization springs relative to the force
    /// scale over the run (0 without stabilization); keep it well below 1 %.
    pub stabilization_share: f64,
    /// Peaks at the last converged increment.
    pub peaks: Option<Peaks>,
    /// By stage name: its largest log strain and von Mises stress and
    /// smallest volume ratio over all its converged increments, with where
    /// (element, point, reference position) and when (increment, load factor).
    pub stage_peaks: BTreeMap<String, StagePeaks>,
    /// Converged increments over all stages.
    pub increments: usize,
    /// Newton iterations over the whole run.
    pub newton_iterations: usize,
    /// Times an increment was cut back.
    pub cutbacks: usize,
    /// Wall-clock time of the run, in seconds.
    pub wall_time_s: f64,
    /// Size, ordering, counts, seconds and peak memory of the run.
    pub performance: Performance,
    /// The files the run wrote.
    pub files: Files,
    /// Physical dimension of each `history.csv` column and each peak.
    pub units: BTreeMap<String, String>,
}

/// Statuses of a run that has ended by itself: its results are final.
pub const FINISHED_STATUSES: [&str; 2] = ["converged", "stopped"];

/// Whether `folder` holds the `summary.json` of a run that ended by itself
/// (not `running`, nor `interrupted`, nor unreadable).
pub fn run_finished(folder: &std::path::Path) -> bool {
    let text = std::fs::read_to_string(folder.join(super::SUMMARY_FILE)).unwrap_or_default();
    let status = serde_json::from_str::<serde_json::Value>(&text).ok().and_then(|v| v["status"].as_str().map(str::to_owned));
    status.is_some_and(|s| FINISHED_STATUSES.contains(&s.as_str()))
}

impl RunSummary {
    /// The summary as pretty-printed JSON (`summary.json`).
    pub fn to_json(&self) -> String {
        serde_json::to_string_pretty(self).expect("plain data serialises") + "\n"
    }
}

/// Dimensions of the `history.csv` columns (`columns`: the applied, reaction,
/// rigid-surface and fluid columns).
pub fn units(columns: &[String]) -> BTreeMap<String, String> {
    let mut u: BTreeMap<String, String> = [
        ("stage", "name"),
        ("increment", "count"),
        ("load_factor", "fraction of the stage (0 to 1)"),
        ("time", "time unit of the job (prony relaxation times, stage durations)"),
        ("newton_iterations", "count"),
        ("peaks.displacement", "length"),
        ("peaks.max_principal_log_strain", "strain (ln of stretch)"),
        ("peaks.*_stress, peaks.von_mises, peaks.*_pressure", "stress (force/length²)"),
        ("wall_time_s", "second"),
        ("performance.*_s", "second"),
        ("performance.peak_memory_mib", "mebibyte (2^20 bytes)"),
        ("stage_peaks.max_principal_log_strain", "strain (ln of stretch)"),
        ("stage_peaks.von_mises", "stress (force/length²)"),
        ("stage_peaks.min_volume_ratio", "ratio (deformed/reference volume)"),
    ]
    .into_iter()
    .map(|(k, v)| (k.to_string(), v.to_string()))
    .collect();
    for c in columns {
        if let Some((_, d)) = crate::job::PEAK_COLUMNS.iter().find(|(n, _)| n == c) {
            u.insert(c.clone(), d.to_string());
            continue;
        }
        let dimension = if c.contains("_moment_") {
            "force·length"
        } else if c.ends_with("_bands") {
            "count"
        } else if c.ends_with("_fill") || c.ends_with("_squeeze") {
            "percent"
        } else if c.ends_with("_contact_width") || c.ends_with("_wetted_length") || (c.starts_with("extrusion_") && c.ends_with("_depth")) {
            "length"
        } else if c.ends_with("_wetted_area") {
            "area (length²)"
        } else if c.ends_with("_pressure") || c.ends_with("_sealing_margin") {
            "stress (force/length²)"
        } else {
            "force"
        };
        u.insert(c.clone(), dimension.into());
    }
    u
}
