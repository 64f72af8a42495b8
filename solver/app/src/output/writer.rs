//! Writes a run's results as its increments converge: a `.vtu` frame per
//! saved increment with the `.pvd` collection over the load, `history.csv`
//! after every increment, the run log, and at the end `summary.json`.
//! Every result file is replaced atomically, so a run stopped at any moment
//! leaves complete files holding every converged increment so far. Frames
//! are written in the background ([`super::frame_queue`]): a run ended by
//! SIGINT, SIGTERM or a failure waits for them; one killed outright may lack
//! the last few frames, never half of one, and its `.pvd` lists only frames
//! on disk. The log is appended to, a whole line at a time, and flushed at
//! every increment.

use std::collections::BTreeMap;
use std::fs::File;
use std::io::{self, BufWriter, Write};
use std::path::{Path, PathBuf};

use super::atomic::{write_atomic, write_durable};
use super::dynamic::{dynamic_csv, DYNAMIC_FILE};
use super::event_text::EventText;
use super::fields::{frame, Peaks};
use super::frame_queue::{FrameJob, FrameQueue};
use super::history::History;
use super::performance::{peak_memory_mib, Performance};
use super::pvd::{pvd_text, PvdEntry};
use super::seal_values::{band_entries, band_values, extrusion_entries, gland_entries, seal_values};
use super::stage_peaks::{self, StagePeaks};
use super::summary::{units, Files, IncrementRef, RunSummary};
use super::vtu::Field;
use crate::job::applied::AppliedSource;
use crate::job::Job;
use olli_solver::assembly::Discretization;
use olli_solver::driver::{Event, Observer};
use olli_solver::error::SolveError;
use olli_solver::results::{DynamicResult, IncrementResult, Solution, Termination};

/// Names of the files in the output folder.
pub const HISTORY_FILE: &str = "history.csv";
/// The run summary, rewritten after every increment.
pub const SUMMARY_FILE: &str = "summary.json";
/// The run log.
pub const LOG_FILE: &str = "olli.log";

/// The result writer of one run; pass it (or a wrapper) to [`olli_solver::solve`].
pub struct ResultWriter<'m> {
    job: &'m Job,
    folder: PathBuf,
    stem: String,
    disc: Discretization<'m>,
    history: History,
    frames: Vec<PvdEntry>,
    /// Writes the frames in the background, in order.
    frame_queue: FrameQueue,
    log: BufWriter<File>,
    text: EventText,
    /// (stage, increment) of the last frame written.
    last_frame: Option<(usize, usize)>,
    last_peaks: Option<Peaks>,
    /// The first write failure; later writes are skipped.
    error: Option<String>,
    /// Largest stabilization share of any converged increment.
    stabilization_share: f64,
    /// The last converged increment, for the `running` and `interrupted` summaries.
    last_increment: Option<IncrementRef>,
    /// Each stage's peaks over its converged increments so far.
    stage_peaks: BTreeMap<String, StagePeaks>,
    /// What the harmonic stages found so far (`dynamic.csv`).
    dynamic: Vec<DynamicResult>,
}

impl<'m> ResultWriter<'m> {
    /// Prepares a writer into `folder` (created if missing).
    /// Nothing is created until the model and the folder have been checked.
    pub fn new(job: &'m Job, folder: &Path) -> io::Result<Self> {
        let disc = Discretization::new(&job.model).map_err(io::Error::other)?;
        let stem = job_stem(job);
        check_output_folder(folder, &stem).map_err(io::Error::other)?;
        std::fs::create_dir_all(folder)?;
        remove_previous_results(folder, &stem)?;
        record(folder, LOG_FILE)?;
        let log = BufWriter::new(File::create(folder.join(LOG_FILE))?);
        let mut w = ResultWriter {
            job,
            folder: folder.to_path_buf(),
            stem,
            disc,
            history: History::new(job.history_columns()),
            frames: Vec::new(),
            frame_queue: FrameQueue::new(job.model.mesh.clone()),
            log,
            text: EventText::new(job.model.stages.len()),
            last_frame: None,
            last_peaks: None,
            error: None,
            stabilization_share: 0.0,
            last_increment: None,
            stage_peaks: BTreeMap::new(),
            dynamic: Vec::new(),
        };
        w.log_line(&format!("olli {} run of {} ({})", env!("CARGO_PKG_VERSION"), job.path.display(), job.title));
        w.flush(|w| w.write(HISTORY_FILE, w.history.to_csv().as_bytes()));
        // From the start, a script can tell a running job from a finished one.
        w.flush(|w| w.write_partial_summary("running"));
        Ok(w)
    }

    /// `summary.json` of a run that has not ended by itself: its status and
    /// the last converged increment so far.
    fn write_partial_summary(&self, status: &str) -> io::Result<()> {
        let summary = serde_json::json!({
            "olli_version": env!("CARGO_PKG_VERSION"),
            "job": self.job.path.display().to_string(),
            "title": self.job.title,
            "analysis": self.job.kind.name(),
            "status": status,
            "last_increment": self.last_increment,
            "increments": self.history.len(),
            "stage_peaks": self.stage_peaks,
        });
        self.write(SUMMARY_FILE, format!("{summary:#}\n").as_bytes())
    }

    /// Ends a run stopped from outside (SIGINT, SIGTERM): `summary.json` says
    /// `interrupted` with the last converged increment, whose results are
    /// all on disk already. Returns the first write failure of the run.
    pub fn interrupted(&mut self, signal: &str) -> Result<(), String> {
        let line = match &self.last_increment {
            Some(r) => {
                format!("interrupted by {signal} after stage `{}` increment {} (load factor {})", r.stage, r.increment, r.load_factor)
            }
            None => format!("interrupted by {signal} before the first converged increment"),
        };
        self.log_line(&line);
        self.drain_frames();
        self.flush(|w| {
            w.write_partial_summary("interrupted")?;
            w.log.flush()
        });
        self.error.clone().map_or(Ok(()), Err)
    }

    /// Waits for the frames still being written, even after an earlier
    /// failure (the process may end right after); keeps the first failure.
    fn drain_frames(&mut self) {
        if let Err(e) = self.frame_queue.drain() {
            self.error.get_or_insert(e);
        }
    }

    fn log_line(&mut self, line: &str) {
        if let Err(e) = writeln!(self.log, "{line}") {
            self.error.get_or_insert(e.to_string());
        }
    }

    fn write(&self, name: &str, bytes: &[u8]) -> io::Result<()> {
        record(&self.folder, name)?;
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
        let job = self.job;
        let mut values: Vec<f64> = job.applied.iter().map(|a| a.value(&job.model, r)).collect();
        values.extend(job.reaction_sets.iter().flat_map(|s| {
            let f = r.reactions.get(s).copied().unwrap_or([0.0; 3]);
            f.into_iter().take(dim)
        }));
        for s in job.reaction_sets.iter().filter(|s| job.model.moment_points.contains_key(*s)) {
            let m = r.reaction_moments.get(s).copied().unwrap_or([0.0; 3]);
            let all = ["x", "y", "z"];
            values.extend(job.moment_components().iter().map(|c| m[all.iter().position(|a| a == c).unwrap_or(2)]));
        }
        let with_fluids = !job.fluid_names.is_empty();
        for (i, name) in job.rigid_names.iter().enumerate() {
            let bands = job.rigid_bands[i];
            match r.contact.iter().find(|c| &c.name == name) {
                Some(c) => {
                    values.extend(c.force.into_iter().take(dim));
                    values.push(c.contact_width);
                    values.push(c.peak_pressure);
                    if with_fluids {
                        values.push(c.peak_pressure - job.sealed_pressure(i, r));
                    }
                    values.extend(band_values(&c.bands, bands));
                }
                None => {
                    values.extend(std::iter::repeat_n(0.0, dim + 2 + usize::from(with_fluids)));
                    values.extend(band_values(&[], bands));
                }
            }
        }
        for name in &job.fluid_names {
            let f = r.fluids.iter().find(|f| &f.name == name);
            values.push(f.map_or(0.0, |f| f.pressure));
            values.push(f.map_or(0.0, |f| f.wetted_measure));
        }
        values.extend(seal_values(job, r));
        for name in &self.job.insert_names {
            if let Some(ins) = r.inserts.iter().find(|i| &i.name == name) {
                values.extend(crate::job::inserts::insert_values(self.job.kind, ins));
            }
        }
        let p = &r.peaks;
        values.extend([p.max_principal_log_strain.value, p.von_mises.value, p.min_volume_ratio.value]);
        stage_peaks::record(&mut self.stage_peaks, r);
        self.history.push(&r.stage_name, (r.increment, r.load_factor, r.time), values, r.newton_iterations);
        if r.stabilization_share > 0.01 && self.stabilization_share <= 0.01 {
            let line = format!(
                "warning: stage `{}` increment {}: the stabilization springs carry {:.1} % of the force scale; lower `stabilization`",
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
        self.last_increment = Some(IncrementRef { stage: r.stage_name.clone(), increment: r.increment, load_factor: r.load_factor });
        self.flush(|w| {
            w.write(HISTORY_FILE, w.history.to_csv().as_bytes())?;
            w.write_partial_summary("running")?;
            w.log.flush()
        });
    }

    fn write_frame(&mut self, r: &IncrementResult) -> io::Result<()> {
        let (stage, increment, load_factor) = (r.stage, r.increment, r.load_factor);
        let dim = self.disc.dim;
        let u = r.solution_vector(dim);
        let mut f = frame(&self.disc, &u, &r.nodal_reactions, r.history.as_ref(), &self.job.output.fields).map_err(io::Error::other)?;
        if let Some(c) = r.contact_fields.as_ref().filter(|_| self.job.output.fields.iter().any(|w| w == "contact")) {
            f.point.push(Field::new("contact_pressure", 1, c.pressure.clone()));
            f.point.push(Field::new("contact_gap", 1, c.gap.clone()));
            f.point.push(Field::new("contact_slip", 1, c.slip.clone()));
            // Two 0/1 arrays instead of a coded status: a viewer colours them without a legend.
            f.point.push(Field::new("contact_closed", 1, c.status.iter().map(|&s| f64::from(u8::from(s != 0))).collect()));
            f.point.push(Field::new("contact_stuck", 1, c.status.iter().map(|&s| f64::from(u8::from(s == 1))).collect()));
        }
        if let Some(p) = r.fluid_pressure.as_ref().filter(|_| self.job.output.fields.iter().any(|w| w == "fluid_pressure")) {
            f.point.push(Field::new("fluid_pressure", 1, p.clone()));
        }
        let name = format!("{}_{:04}.vtu", self.stem, self.frames.len() + 1);
        let title = format!("{}: stage {} increment {increment} load factor {load_factor}", self.job.title, stage + 1);
        let collection = format!("{}.pvd", self.stem);
        record(&self.folder, &name)?;
        record(&self.folder, &collection)?;
        let vtu = self.folder.join(&name);
        self.frames.push(PvdEntry { time: stage as f64 + load_factor, file: name });
        let job =
            FrameJob { vtu, title, point: f.point, cell: f.cell, pvd: self.folder.join(collection), pvd_text: pvd_text(&self.frames) };
        self.frame_queue.push(job).map_err(io::Error::other)?;
        self.last_frame = Some((stage, increment));
        self.last_peaks = Some(f.peaks);
        Ok(())
    }

    /// Dimensions of every column; an applied motion is a travel (length) or a turn (degree).
    fn units(&self) -> BTreeMap<String, String> {
        let mut u = units(&self.job.history_columns());
        u.extend(self.job.insert_columns().into_iter().map(|(c, d)| (c, d.to_string())));
        for a in &self.job.applied {
            match a.source {
                AppliedSource::Travel { .. } => u.insert(a.name.clone(), "length".into()),
                AppliedSource::Angle { .. } => u.insert(a.name.clone(), "degree".into()),
                _ => None,
            };
        }
        u
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
        self.drain_frames();
        let stages = &self.job.model.stages;
        let (status, reason, stopped_in) = match &solution.termination {
            Termination::Completed => ("converged", None, None),
            Termination::Stopped(e) => {
                let stage = match e {
                    SolveError::IncrementTooSmall { stage, .. }
                    | SolveError::NotConverged { stage, .. }
                    | SolveError::LimitPoint { stage, .. }
                    | SolveError::ArcLengthUnfinished { stage, .. }
                    | SolveError::ArcLengthUnloaded { stage, .. }
                    | SolveError::ArcTooShort { stage, .. } => stage.clone(),
                    SolveError::Extruded(stop) => stop.stage.clone(),
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
                    if let Some(i) = self.job.rigid_names.iter().position(|n| n == &c.name).filter(|_| !self.job.fluid_names.is_empty()) {
                        m.insert("sealing_margin".into(), c.peak_pressure - self.job.sealed_pressure(i, r));
                    }
                    band_entries(&c.bands, &mut m);
                    (c.name.clone(), m)
                })
                .collect(),
            None => BTreeMap::new(),
        };
        let measure = if self.job.kind == crate::job::schema::AnalysisKind::Solid { "wetted_area" } else { "wetted_length" };
        let fluids = match last {
            Some(r) => r
                .fluids
                .iter()
                .map(|f| (f.name.clone(), BTreeMap::from([("pressure".to_string(), f.pressure), (measure.to_string(), f.wetted_measure)])))
                .collect(),
            None => BTreeMap::new(),
        };
        let applied = match last {
            Some(r) => self.job.applied.iter().map(|a| (a.name.clone(), a.value(&self.job.model, r))).collect(),
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
            fluids,
            applied,
            inserts,
            glands: last.map(gland_entries).unwrap_or_default(),
            extrusions: last.map(|r| extrusion_entries(self.job, r, self.disc.dim)).unwrap_or_default(),
            stabilization_share: self.stabilization_share,
            peaks: self.last_peaks,
            stage_peaks: self.stage_peaks.clone(),
            increments: solution.increments.len(),
            newton_iterations: solution.stats.newton_iterations,
            cutbacks: solution.stats.cutbacks,
            wall_time_s: self.text.elapsed(),
            performance: Performance::new(&solution.stats, peak_memory_mib()),
            files: Files {
                history: HISTORY_FILE.into(),
                collection: format!("{}.pvd", self.stem),
                log: LOG_FILE.into(),
                frames: self.frames.len(),
            },
            units: self.units(),
        };
        let end = match &summary.reason {
            None => format!("converged: {} increments, {} Newton iterations", summary.increments, summary.newton_iterations),
            Some(r) => format!("stopped: {r}"),
        };
        let line = format!("[{:8.2} s] {end}", self.text.elapsed());
        self.log_line(&line);
        self.log_line(&summary.performance.line());
        self.flush(|w| {
            record(&w.folder, SUMMARY_FILE)?;
            write_durable(&w.folder.join(SUMMARY_FILE), summary.to_json().as_bytes())?;
            w.log.flush()
        });
        match self.error {
            Some(e) => Err(e),
            None => Ok(summary),
        }
    }
}

/// The marker file listing every file olli wrote into a result folder, one
/// name per line: only listed files are ever removed or overwritten.
pub const MARKER_FILE: &str = ".olli-results";

/// The job file's stem, which names its `.pvd` and frame files.
pub fn job_stem(job: &Job) -> String {
    job.path.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_else(|| "olli".into())
}

/// True for the names of files a run of job `stem` writes.
fn is_result_name(name: &str, stem: &str) -> bool {
    let frame = name
        .strip_prefix(stem)
        .and_then(|r| r.strip_prefix('_'))
        .and_then(|r| r.strip_suffix(".vtu"))
        .is_some_and(|n| !n.is_empty() && n.bytes().all(|b| b.is_ascii_digit()));
    frame || [SUMMARY_FILE, HISTORY_FILE, LOG_FILE, DYNAMIC_FILE].contains(&name) || name == format!("{stem}.pvd")
}

/// True for a temporary file of [`write_atomic`] for a listed file (`.<name>.<pid>.tmp`).
fn is_temporary_of(name: &str, listed: &[String]) -> bool {
    let Some(inner) = name.strip_prefix('.').and_then(|n| n.strip_suffix(".tmp")) else { return false };
    let Some((file, pid)) = inner.rsplit_once('.') else { return false };
    !pid.is_empty() && pid.bytes().all(|b| b.is_ascii_digit()) && listed.iter().any(|l| l == file)
}

/// Names listed in the folder's marker file (none when it has none).
fn listed(folder: &Path) -> Vec<String> {
    std::fs::read_to_string(folder.join(MARKER_FILE)).map(|t| t.lines().map(str::to_string).collect()).unwrap_or_default()
}

/// Adds `name` to the folder's marker file (once).
fn record(folder: &Path, name: &str) -> io::Result<()> {
    if listed(folder).iter().any(|l| l == name) {
        return Ok(());
    }
    let mut marker = std::fs::OpenOptions::new().create(true).append(true).open(folder.join(MARKER_FILE))?;
    writeln!(marker, "{name}")
}

/// Checks, before anything is created, that results can go to `folder`: it
/// is a folder (or can be made one), it is writable, and it holds no file
/// with a result file's name that olli did not write (such a file would be
/// overwritten). `olli check` runs this too.
pub fn check_output_folder(folder: &Path, stem: &str) -> Result<(), String> {
    let shown = folder.display();
    // The folder, or its nearest existing ancestor that a run would create it in.
    let mut existing = folder.to_path_buf();
    while !existing.exists() {
        match existing.parent() {
            Some(p) if !p.as_os_str().is_empty() => existing = p.to_path_buf(),
            _ => {
                existing = PathBuf::from(".");
                break;
            }
        }
    }
    if !existing.is_dir() {
        return Err(if existing == folder {
            format!("output folder {shown} is a file, not a folder")
        } else {
            format!("output folder {shown} cannot be created: {} is a file", existing.display())
        });
    }
    let probe = existing.join(format!(".olli-write-test.{}", std::process::id()));
    match File::create(&probe) {
        Ok(_) => {
            let _ = std::fs::remove_file(&probe);
        }
        Err(e) => return Err(format!("output folder {shown} cannot be written ({}: {e})", existing.display())),
    }
    if existing.as_path() == folder {
        let ours = listed(folder);
        let entries = std::fs::read_dir(folder).map_err(|e| format!("output folder {shown} cannot be read: {e}"))?;
        for entry in entries.flatten() {
            let name = entry.file_name().to_string_lossy().into_owned();
            if is_result_name(&name, stem) && !ours.contains(&name) {
                return Err(format!(
                    "output folder {shown} holds {name}, which olli did not write (it is not listed in {MARKER_FILE}); \
                     move it or choose another output folder"
                ));
            }
        }
    }
    Ok(())
}

/// Removes the result files an earlier run wrote into `folder` (only those
/// listed in its marker file), and their stale temporary files, so a stale
/// summary or surplus frames never pass for this run's results.
fn remove_previous_results(folder: &Path, stem: &str) -> io::Result<()> {
    let ours = listed(folder);
    for entry in std::fs::read_dir(folder)? {
        let name = entry?.file_name().to_string_lossy().into_owned();
        if (is_result_name(&name, stem) && ours.contains(&name)) || is_temporary_of(&name, &ours) {
            std::fs::remove_file(folder.join(&name))?;
        }
    }
    let kept: Vec<&String> = ours.iter().filter(|n| folder.join(n).exists()).collect();
    let text: String = kept.iter().map(|n| format!("{n}\n")).collect();
    std::fs::write(folder.join(MARKER_FILE), text)
}

impl Observer for ResultWriter<'_> {
    fn event(&mut self, event: &Event) {
        if let Some(line) = self.text.line(event, true) {
            self.log_line(&line);
        }
        match event {
            Event::Converged(r) => self.converged(r),
            Event::Harmonic(d) => {
                self.dynamic.push((*d).clone());
                let text = dynamic_csv(&self.dynamic, self.job.components());
                self.flush(|w| w.write(DYNAMIC_FILE, text.as_bytes()));
            }
            Event::Cutback { .. } => self.flush(|w| w.log.flush()),
            _ => {}
        }
    }
}
