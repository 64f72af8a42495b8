//! Running job files from tests: load, check, solve with the result writer
//! into a scratch folder, and read the summary back, as `olli run` does.

use std::path::{Path, PathBuf};

use olli_app::job::check::{check, CheckReport};
use olli_app::job::{load, load_str, Job};
use olli_app::output::summary::RunSummary;
use olli_app::output::ResultWriter;
use olli_solver::{solve, Solution};

/// The repository's `examples/` folder.
pub fn examples_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("..").join("examples")
}

/// A scratch folder removed on drop.
pub struct Scratch(pub PathBuf);

impl Scratch {
    pub fn new(name: &str) -> Self {
        let dir = std::env::temp_dir().join(format!("olli-jobs-{}-{name}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        Scratch(dir)
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

/// Loads an example by file name and checks it: a valid job without warnings.
pub fn load_example(name: &str) -> (Job, CheckReport) {
    let job = load(&examples_dir().join(name)).unwrap_or_else(|e| panic!("{e}"));
    let report = check(&job);
    assert!(report.warnings.is_empty(), "{name}: {:?}", report.warnings);
    (job, report)
}

/// Loads job text as if it were the file `examples/<name>`.
pub fn load_example_text(name: &str, text: &str) -> Job {
    load_str(&examples_dir().join(name), text).unwrap_or_else(|e| panic!("{e}"))
}

/// Solves a job, writing its results into `folder`.
pub fn run_job(job: &Job, folder: &Path) -> (Solution, RunSummary) {
    let mut writer = ResultWriter::new(job, folder).unwrap();
    let solution = solve(&job.model, &mut writer).unwrap();
    let summary = writer.finish(&solution).unwrap();
    (solution, summary)
}

/// Relative difference |a − b| / |b|.
pub fn rel_diff(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}
