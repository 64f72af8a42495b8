//! Writes a run's results as its increments converge: a `.vtu` frame per
//! saved increment with the `.pvd` collection over the load, `history.csv`
//! after every increment, the run log, and at the end `summary.json`.
//! Every result file is replaced atomically, so a run stopped at any moment
//! leaves complete files holding every converged increment so far. The log
//! is appended to, a whole line at a time, and flushed at every increment.

use std::collections::BTreeMap;
use std::fs::File;
use std::io::{self, BufWriter, Write};
use std::path::{Path, PathBuf};

use super::atomic::write_atomic;
use super::event_text::EventText;
use super::fields::{frame, Peaks};
use super::history::History;
use super::pvd::{pvd_text, PvdEntry};
use super::summary::{units, Files, IncrementRef, RunSummary};
use super::vtu::{write_vtu, Field};
use crate::job::Job;
use olli_solver::assembly::Discretization;
use olli_solver::driver::{Event, Observer};
use olli_solver::error::SolveError;
use olli_solver::results::{IncrementResult, Solution, Termination};

/// Names of the files in the output folder.
pub const HISTORY_FILE: &str = "history.csv";
pub const SUMMARY_FILE: &str = "summary.json";
pub const LOG_FILE: &str = "olli.log";

/// The result writer of one run; pass it (or a wrapper) to [`olli_solver::solve`].
pub struct ResultWriter<'m> {
    job: &'m Job,
    folder: PathBuf,
    stem: String,
    disc: Discretization<'m>,
    history: History,
    frames: Vec<PvdEntry>,
    log: BufWriter<File>,
    text: EventText,
    /// (stage, increment) of the last frame written.
    last_frame: Option<(usize, usize)>,
    last_peaks: Option<Peaks>,
    /// The first write failure; later writes are skipped.
    error: Option<String>,
    /// Largest stabilisation share of any converged increment.
    stabilization_share: f64,
}

impl<'m> ResultWriter<'m> {
    /// Prepares a writer into `folder` (created if missing).
    pub fn new(job: &'m Job, folder: &Path) -> io::Result<Self> {
        std::fs::create_dir_all(folder)?;
        let disc = Discretization::new(&job.model).map_err(io::Error::other)?;
        let stem = job.path.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_else(|| "olli".into());
        remove_previous_results(folder, &stem)?;
        let log = BufWriter::new(File::create(folder.join(LOG_FILE))?);
        let mut w = ResultWriter {
            job,
            folder: folder.to_path_buf(),
            stem,
            disc,
            history: History::new(job.history_columns()),
            frames: Vec::new(),
            log,
            text: EventText::new(job.model.stages.len()),
            last_frame: None,
            last_peaks: None,
            error: None,
            stabilization_share: 0.0,
        };
        w.log_line(&format!("olli {} run of {} ({})", env!("CARGO_PKG_VERSION"), job.path.display(), job.title));
        w.flush(|w| w.write(HISTORY_FILE, w.history.to_csv().as_bytes()));
        Ok(w)
    }

    fn log_line(&mut self, line: &str) {
        if let Err(e) = writeln!(self.log, "{line}") {
            self.error.get_or_insert(e.to_string());
        }
    }

    fn write(&self, name: &str, bytes: &[u8]) -> io::Result<()> {
        write_atomic(&self.folder.join(name), bytes)
    }

    /// Runs a write unless an earlier one failed; keeps the first failure.
    fn flush(&mut self, f: impl FnOnce(&mut Self) -> io::Result<()>) {
        if self.error.is_none() {
            if let Err(e) = f(self) {
                self.error = Some(e.to_string());
            }
        }
    }

    /// The first write failure, if any.
    pub fn error(&self) -> Option<&str> {
        self.error.as_deref()
    }

    fn converged(&mut self, r: &IncrementResult) {
        let dim = self.disc.dim;
        let mut values: Vec<f64> = self
            .job
            .reaction_sets
            .iter()
            .flat_map(|s| {
                let f = r.reactions.get(s).copied().unwrap_or([0.0; 3]);
                f.into_iter().take(dim)
            })
            .collect();
        for name in &self.job.rigid_names {
            match r.contact.iter().find(|c| &c.name == name) {
                Some(c) => {
                    values.extend(c.force.into_iter().take(dim));
                    values.push(c.contact_width);
                    values.push(c.peak_pressure);
                }
                None => values.extend(std::iter::repeat_n(0.0, dim + 2)),
            }
        }
        for name in &self.job.insert_names {
            if let Some(ins) = r.inserts.iter().find(|i| &i.name == name) {
                values.extend(crate::job::inserts::insert_values(self.job.kind, ins));
            }
        }
        self.history.push(&r.stage_name, r.increment, r.load_factor, values, r.newton_iterations);
        if r.stabilization_share > 0.01 && self.stabilization_share <= 0.01 {
            let line = format!(
                "warning: stage `{}` increment {}: the stabilisation springs carry {:.1} % of the force scale; lower `stabilization`",
                r.stage_name,
                r.increment,
                100.0 * r.stabilization_share
            );
            self.log_line(&line);
        }
        self.stabilization_share = self.stabilization_share.max(r.stabilization_share);
        let end_of_stage = r.load_factor >= 1.0 - 1e-9;
        #[allow(clippy::manual_is_multiple_of)] // is_multiple_of needs Rust 1.87; the workspace allows 1.85
        if end_of_stage || r.increment % self.job.output.every == 0 {
            self.flush(|w| w.write_frame(r));
        }
        self.flush(|w| {
            w.write(HISTORY_FILE, w.history.to_csv().as_bytes())?;
            w.log.flush()
        });
    }

    fn write_frame(&mut self, r: &IncrementResult) -> io::Result<()> {
        let (stage, increment, load_factor) = (r.stage, r.increment, r.load_factor);
        let dim = self.disc.dim;
        let u: Vec<f64> = r.displacement.iter().flat_map(|x| x[..dim].to_vec()).collect();
        let mut f = frame(&self.disc, &u, &r.nodal_reactions, &self.job.output.fields).map_err(io::Error::other)?;
        if let Some(c) = r.contact_fields.as_ref().filter(|_| self.job.output.fields.iter().any(|w| w == "contact")) {
            f.point.push(Field::new("contact_pressure", 1, c.pressure.clone()));
            f.point.push(Field::new("contact_gap", 1, c.gap.clone()));
            f.point.push(Field::new("contact_slip", 1, c.slip.clone()));
            f.point.push(Field::new("contact_status", 1, c.status.iter().map(|&s| s as f64).collect()));
        }
        let name = format!("{}_{:04}.vtu", self.stem, self.frames.len() + 1);
        let title = format!("{}: stage {} increment {increment} load factor {load_factor}", self.job.title, stage + 1);
        write_vtu(&self.folder.join(&name), &title, &self.job.model.mesh, f.point, f.cell)?;
        self.frames.push(PvdEntry { time: stage as f64 + load_factor, file: name });
        self.write(&format!("{}.pvd", self.stem), pvd_text(&self.frames).as_bytes())?;
        self.last_frame = Some((stage, increment));
        self.last_peaks = Some(f.peaks);
        Ok(())
    }

    /// Writes the last frame if it was skipped, `summary.json` and the log.
    /// Returns the summary, or the first write failure of the run.
    pub fn finish(mut self, solution: &Solution) -> Result<RunSummary, String> {
        let last = solution.last();
        if let Some(r) = last {
            if self.last_frame != Some((r.stage, r.increment)) {
                self.flush(|w| w.write_frame(r));
            }
        }
        let stages = &self.job.model.stages;
        let (status, reason, stopped_in) = match &solution.termination {
            Termination::Completed => ("converged", None, None),
            Termination::Stopped(e) => {
                let stage = match e {
                    SolveError::IncrementTooSmall { stage, .. } | SolveError::NotConverged { stage, .. } => stage.clone(),
                    _ => last.map(|r| r.stage_name.clone()).unwrap_or_else(|| stages[0].name.clone()),
                };
                ("stopped", Some(e.to_string()), Some(stage))
            }
        };
        let completed_through = match &stopped_in {
            None => stages.len(),
            Some(name) => stages.iter().position(|s| &s.name == name).unwrap_or(0),
        };
        let components = self.job.components();
        let reactions = match last {
            Some(r) => self
                .job
                .reaction_sets
                .iter()
                .map(|s| {
                    let f = r.reactions.get(s).copied().unwrap_or([0.0; 3]);
                    (s.clone(), components.iter().enumerate().map(|(i, c)| (c.to_string(), f[i])).collect())
                })
                .collect(),
            None => BTreeMap::new(),
        };
        let rigid = match last {
            Some(r) => r
                .contact
                .iter()
                .map(|c| {
                    let mut m: BTreeMap<String, f64> = components.iter().enumerate().map(|(i, k)| (k.to_string(), c.force[i])).collect();
                    m.insert("contact_width".into(), c.contact_width);
                    m.insert("peak_pressure".into(), c.peak_pressure);
                    (c.name.clone(), m)
                })
                .collect(),
            None => BTreeMap::new(),
        };
        let inserts = match last {
            Some(r) => r
                .inserts
                .iter()
                .map(|i| {
                    let cols = crate::job::inserts::insert_columns(self.job.kind, &i.name);
                    let prefix = format!("insert_{}_", i.name);
                    let vals = crate::job::inserts::insert_values(self.job.kind, i);
                    (i.name.clone(), cols.iter().zip(vals).map(|((c, _), v)| (c[prefix.len()..].to_string(), v)).collect())
                })
                .collect(),
            None => BTreeMap::new(),
        };
        let summary = RunSummary {
            olli_version: env!("CARGO_PKG_VERSION").into(),
            job: self.job.path.display().to_string(),
            title: self.job.title.clone(),
            analysis: self.job.kind.name().into(),
            status: status.into(),
            reason,
            stopped_in_stage: stopped_in,
            stages_completed: stages[..completed_through].iter().map(|s| s.name.clone()).collect(),
            last_increment: last.map(|r| IncrementRef { stage: r.stage_name.clone(), increment: r.increment, load_factor: r.load_factor }),
            reactions,
            rigid,
            inserts,
            stabilization_share: self.stabilization_share,
            peaks: self.last_peaks,
            increments: solution.increments.len(),
            newton_iterations: solution.stats.newton_iterations,
            cutbacks: solution.stats.cutbacks,
            wall_time_s: self.text.elapsed(),
            files: Files {
                history: HISTORY_FILE.into(),
                collection: format!("{}.pvd", self.stem),
                log: LOG_FILE.into(),
                frames: self.frames.len(),
            },
            units: {
                let mut u = units(&self.job.history_columns());
                u.extend(self.job.insert_columns().into_iter().map(|(c, d)| (c, d.to_string())));
                u
            },
        };
        let end = match &summary.reason {
            None => format!("converged: {} increments, {} Newton iterations", summary.increments, summary.newton_iterations),
            Some(r) => format!("stopped: {r}"),
        };
        let line = format!("[{:8.2} s] {end}", self.text.elapsed());
        self.log_line(&line);
        self.flush(|w| {
            w.write(SUMMARY_FILE, summary.to_json().as_bytes())?;
            w.log.flush()
        });
        match self.error {
            Some(e) => Err(e),
            None => Ok(summary),
        }
    }
}

/// Removes the files an earlier run of the same job left in `folder`, so a
/// stale summary or surplus frames never pass for this run's results.
fn remove_previous_results(folder: &Path, stem: &str) -> io::Result<()> {
    for entry in std::fs::read_dir(folder)? {
        let name = entry?.file_name().to_string_lossy().into_owned();
        let frame = name
            .strip_prefix(stem)
            .and_then(|r| r.strip_prefix('_'))
            .and_then(|r| r.strip_suffix(".vtu"))
            .is_some_and(|n| !n.is_empty() && n.bytes().all(|b| b.is_ascii_digit()));
        let ours = [SUMMARY_FILE, HISTORY_FILE, LOG_FILE].contains(&name.as_str()) || name == format!("{stem}.pvd");
        if frame || ours {
            std::fs::remove_file(folder.join(&name))?;
        }
    }
    Ok(())
}

impl Observer for ResultWriter<'_> {
    fn event(&mut self, event: &Event) {
        if let Some(line) = self.text.line(event, true) {
            self.log_line(&line);
        }
        match event {
            Event::Converged(r) => self.converged(r),
            Event::Cutback { .. } => self.flush(|w| w.log.flush()),
            _ => {}
        }
    }
}
