//! `olli run JOB.toml [--output DIR] [--quiet]`: solves a job, shows progress
//! (a progress bar on a terminal, plain lines otherwise), writes results as
//! increments converge and ends with a summary.
//!
//! Exit codes: 0 converged, 1 stopped without converging (converged
//! increments kept, `summary.json` says why), 2 bad input (nothing written),
//! 130 / 143 interrupted by SIGINT / SIGTERM (converged increments kept,
//! `summary.json` says `interrupted`).

use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Arc;
use std::time::Duration;

use signal_hook::consts::{SIGINT, SIGTERM};

use indicatif::{ProgressBar, ProgressStyle};
use olli_app::job::{self, Job};
use olli_app::output::event_text::EventText;
use olli_app::output::summary::RunSummary;
use olli_app::output::ResultWriter;
use olli_solver::{solve, Event, Observer};

#[derive(clap::Args)]
#[command(after_help = "Example:\n  olli run examples/bush.toml --output results/bush")]
pub struct Args {
    /// The job file (TOML).
    pub job: PathBuf,
    /// Result folder (default: `[output] folder` of the job, else `results/<job name>` beside the job file).
    #[arg(long, value_name = "DIR")]
    pub output: Option<PathBuf>,
    /// Print only the final summary.
    #[arg(long, short)]
    pub quiet: bool,
    /// Draw the pictures and the report page `index.html` into the result folder at the end (as `olli plot`).
    #[arg(long)]
    pub plots: bool,
    /// Picture format with `--plots`.
    #[arg(long, value_enum, default_value = "png", requires = "plots")]
    pub format: olli_app::plot::Format,
}

/// Progress on stderr: a bar on a terminal, one line per increment otherwise.
enum Progress {
    Quiet,
    Lines(EventText),
    Bar { bar: ProgressBar, stages: usize, stage: String, increment: String },
}

impl Progress {
    fn new(quiet: bool, stages: usize) -> Self {
        if quiet {
            Progress::Quiet
        } else if std::io::stderr().is_terminal() {
            let bar = ProgressBar::new((stages * 1000) as u64);
            let style = ProgressStyle::with_template("{spinner} [{elapsed_precise}] {bar:30.cyan/blue} {msg}")
                .expect("fixed template")
                .progress_chars("=> ");
            bar.set_style(style);
            bar.enable_steady_tick(Duration::from_millis(200));
            Progress::Bar { bar, stages, stage: String::new(), increment: String::new() }
        } else {
            Progress::Lines(EventText::new(stages))
        }
    }

    fn finish(&self) {
        if let Progress::Bar { bar, .. } = self {
            bar.finish_and_clear();
        }
    }
}

impl Observer for Progress {
    fn event(&mut self, event: &Event) {
        match self {
            Progress::Quiet => {}
            Progress::Lines(text) => {
                if let Some(line) = text.line(event, false) {
                    eprintln!("{line}");
                }
            }
            Progress::Bar { bar, stages, stage, increment: current } => match event {
                Event::StageStart { stage: i, name, .. } => {
                    *stage = format!("stage {}/{} `{name}`", i + 1, stages);
                    bar.set_position((*i * 1000) as u64);
                    bar.set_message(stage.clone());
                }
                Event::IncrementStart { increment, load_factor, step, .. } => {
                    *current = format!("{stage} increment {increment}: load factor {load_factor:.4} (step {step:.4})");
                    bar.set_message(current.clone());
                }
                Event::Iteration { iteration, relative, .. } => {
                    bar.set_message(format!("{current}, iteration {iteration}, residual {relative:.2e}"));
                }
                Event::Cutback { load_factor, step, reason, .. } => {
                    bar.println(format!("cutback at load factor {load_factor:.4}: {reason}; retrying with {step:.3e}"));
                }
                Event::Converged(r) => {
                    bar.set_position((r.stage as f64 * 1000.0 + r.load_factor * 1000.0) as u64);
                    let res = r.residual_history.last().copied().unwrap_or(0.0);
                    bar.set_message(format!(
                        "{stage} increment {}: load factor {:.4}, {} iterations, residual {res:.1e}",
                        r.increment, r.load_factor, r.newton_iterations
                    ));
                }
                Event::Harmonic(d) => {
                    bar.set_position(((d.stage + 1) * 1000) as u64);
                }
                Event::LinearFallback { .. } | Event::DampedRetry { .. } => {}
            },
        }
    }
}

/// The result folder: `--output`, else `[output] folder`, else `results/<stem>` beside the job.
pub fn output_folder(job: &Job, given: Option<PathBuf>) -> PathBuf {
    given.or_else(|| job.output.folder.clone()).unwrap_or_else(|| {
        let dir = job.path.parent().unwrap_or(Path::new("."));
        let stem = job.path.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_else(|| "olli".into());
        dir.join("results").join(stem)
    })
}

fn print_summary(s: &RunSummary, folder: &Path, components: &[&str]) {
    match &s.reason {
        None => println!("converged: {} increments, {} Newton iterations, {} cutbacks", s.increments, s.newton_iterations, s.cutbacks),
        Some(r) => {
            println!("STOPPED in stage `{}`: {r}", s.stopped_in_stage.as_deref().unwrap_or("?"));
            match &s.last_increment {
                Some(l) => println!("last converged: stage `{}` increment {} at load factor {:.4}", l.stage, l.increment, l.load_factor),
                None => println!("no increment converged"),
            }
        }
    }
    if let Some(p) = &s.peaks {
        let at = |x: [f64; 3]| format!("({:.4}, {:.4}, {:.4})", x[0], x[1], x[2]);
        println!("peak displacement: {:.5} at {}", p.displacement.value, at(p.displacement.at));
        println!("peak max principal log strain: {:.5} at {}", p.max_principal_log_strain.value, at(p.max_principal_log_strain.at));
        println!("peak von Mises stress: {:.5} at {}", p.von_mises.value, at(p.von_mises.at));
        println!("principal stress range: {:.5} to {:.5}", p.min_principal_stress.value, p.max_principal_stress.value);
        println!("hydrostatic pressure range: {:.5} to {:.5}", p.min_pressure.value, p.max_pressure.value);
    }
    for (set, r) in &s.reactions {
        let parts: Vec<String> = components.iter().map(|c| format!("{c} = {:.6}", r.get(*c).copied().unwrap_or(0.0))).collect();
        println!("reaction {set}: {}", parts.join(", "));
    }
    for (name, r) in &s.rigid {
        let parts: Vec<String> = components.iter().map(|c| format!("{c} = {:.6}", r.get(*c).copied().unwrap_or(0.0))).collect();
        let get = |k: &str| r.get(k).copied().unwrap_or(0.0);
        println!(
            "rigid {name}: force {}; contact width {:.5}, peak contact pressure {:.5}",
            parts.join(", "),
            get("contact_width"),
            get("peak_pressure")
        );
    }
    for (name, r) in &s.inserts {
        let group =
            |f: &dyn Fn(&str) -> bool| r.iter().filter(|(k, _)| f(k)).map(|(k, v)| format!("{k} = {v:.6}")).collect::<Vec<_>>().join(", ");
        let force = group(&|k| k.starts_with("force_"));
        let moment = group(&|k| k.starts_with("moment_"));
        let position = group(&|k| !k.starts_with("force_") && !k.starts_with("moment_"));
        let moment = if moment.is_empty() { String::new() } else { format!("; {moment}") };
        println!("insert {name}: {position} (rotations in degrees); {force}{moment}");
    }
    if s.stabilization_share > 0.0 {
        println!("stabilization: the springs carried at most {:.3} % of the force scale", 100.0 * s.stabilization_share);
    }
    println!("{}", s.performance.line());
    println!("wall time: {:.2} s", s.wall_time_s);
    println!("results: {}", folder.display());
}

pub fn run(args: Args) -> ExitCode {
    let job = match job::load(&args.job) {
        Ok(j) => j,
        Err(e) => {
            eprintln!("error: {e}");
            return ExitCode::from(2);
        }
    };
    let folder = output_folder(&job, args.output);
    let mut writer = match ResultWriter::new(&job, &folder) {
        Ok(w) => w,
        Err(e) => {
            eprintln!("error: {}: cannot write results: {e}", folder.display());
            return ExitCode::from(2);
        }
    };
    let mut progress = Progress::new(args.quiet, job.model.stages.len());
    // SIGINT or SIGTERM: the run ends at the solver's next event, with every
    // converged increment on disk and `summary.json` saying `interrupted`.
    let signal = Arc::new(AtomicUsize::new(0));
    for sig in [SIGINT, SIGTERM] {
        if let Err(e) = signal_hook::flag::register_usize(sig, Arc::clone(&signal), sig as usize) {
            eprintln!("warning: cannot catch signal {sig}: {e}");
        }
    }
    let mut both = |e: &Event| {
        writer.event(e);
        progress.event(e);
        let sig = signal.load(Ordering::Relaxed) as i32;
        if sig != 0 {
            progress.finish();
            let name = if sig == SIGINT { "SIGINT" } else { "SIGTERM" };
            if let Err(e) = writer.interrupted(name) {
                eprintln!("error: {}: cannot write results: {e}", folder.display());
            }
            eprintln!("interrupted by {name}: the converged increments are kept in {}", folder.display());
            // The conventional exit status of a process ended by a signal.
            std::process::exit(128 + sig);
        }
    };
    let solution = match solve(&job.model, &mut both) {
        Ok(s) => s,
        Err(e) => {
            progress.finish();
            eprintln!("error: {}: {e}", job.path.display());
            return ExitCode::from(2);
        }
    };
    progress.finish();
    match writer.finish(&solution) {
        Ok(summary) => {
            print_summary(&summary, &folder, job.components());
            if args.plots {
                let options = olli_app::report::Options { format: args.format, ..Default::default() };
                match olli_app::report::write_report(&folder, &folder, Some(&job), &options) {
                    Ok(pictures) => {
                        println!("pictures: {}, report: {}", pictures.len(), folder.join(olli_app::report::page::PAGE_FILE).display())
                    }
                    // The results stand without their pictures: report, keep the run's exit code.
                    Err(e) => eprintln!("error: pictures: {e}"),
                }
            }
            if solution.completed() {
                ExitCode::SUCCESS
            } else {
                ExitCode::from(1)
            }
        }
        Err(e) => {
            eprintln!("error: {}: cannot write results: {e}", folder.display());
            ExitCode::from(1)
        }
    }
}
