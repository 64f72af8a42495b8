//! `olli sweep SWEEP.toml [--output DIR] [--jobs N]`, `olli sweep SWEEP.toml
//! --emit-batch DIR`, `olli sweep --collect DIR`: many variants of one job,
//! run here or on a batch scheduler, collected into `DIR/sweep.csv`.
//!
//! Exit codes: 0 every variant converged, 1 some did not (their rows say
//! why), 2 bad input (nothing written).

use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::time::Duration;

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use olli_app::sweep::batch::{write_script, SCRIPT_FILE};
use olli_app::sweep::local::{self, LocalEvent, LocalSettings};
use olli_app::sweep::{self, write_variants, Manifest, Plan, Status, Table, TABLE_FILE};

#[derive(clap::Args)]
#[command(after_help = "Examples:\n  olli sweep examples/seal.sweep.toml --output results/seal-sweep --jobs 2\n  \
                        olli sweep examples/seal.sweep.toml --emit-batch cluster/seal-sweep\n  \
                        olli sweep --collect cluster/seal-sweep")]
pub struct Args {
    /// The sweep file (`<name>.sweep.toml`).
    #[arg(required_unless_present = "collect")]
    pub sweep: Option<PathBuf>,
    /// Sweep folder: a folder per variant and `sweep.csv` (default: `output` of the sweep file, else `results/<name>` beside it).
    #[arg(long, value_name = "DIR", conflicts_with_all = ["emit_batch", "collect"])]
    pub output: Option<PathBuf>,
    /// Most variants run at once (default: the number of cores; memory may allow fewer).
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u16).range(1..), conflicts_with_all = ["emit_batch", "collect"])]
    pub jobs: Option<u16>,
    /// Write the variants and a Slurm array script `DIR/submit.sh` instead of running.
    #[arg(long, value_name = "DIR", conflicts_with = "collect")]
    pub emit_batch: Option<PathBuf>,
    /// Write `DIR/sweep.csv` from the results found in a sweep folder.
    #[arg(long, value_name = "DIR", conflicts_with = "sweep")]
    pub collect: Option<PathBuf>,
}

pub fn run(args: Args) -> ExitCode {
    if let Some(dir) = &args.collect {
        return match Manifest::read(dir) {
            Ok(manifest) => finish(dir, &manifest),
            Err(e) => {
                eprintln!("error: {e} (a sweep folder is written by `olli sweep` or `olli sweep --emit-batch`)");
                ExitCode::from(2)
            }
        };
    }
    let path = args.sweep.expect("clap requires the sweep file without --collect");
    let plan = match sweep::load(&path) {
        Ok(p) => p,
        Err(e) => {
            eprintln!("error: {e}");
            return ExitCode::from(2);
        }
    };
    for w in &plan.warnings {
        eprintln!("warning: {w}");
    }
    if let Some(dir) = &args.emit_batch {
        return emit(&plan, dir);
    }
    let dir = args.output.unwrap_or_else(|| plan.default_output.clone());
    let manifest = match write_variants(&plan, &dir) {
        Ok(m) => m,
        Err(e) => {
            eprintln!("error: {}: cannot write the variants: {e}", dir.display());
            return ExitCode::from(2);
        }
    };
    let olli = match std::env::current_exe() {
        Ok(p) => p,
        Err(e) => {
            eprintln!("error: cannot find the olli executable to run the variants: {e}");
            return ExitCode::from(2);
        }
    };
    let settings = LocalSettings::for_this_machine(olli, args.jobs.map(usize::from));
    if let Err(e) = run_here(&dir, &manifest, &settings) {
        eprintln!("error: {}: {e}", dir.display());
        return ExitCode::from(1);
    }
    finish(&dir, &manifest)
}

fn emit(plan: &Plan, dir: &Path) -> ExitCode {
    let written = write_variants(plan, dir).and_then(|m| write_script(dir, &plan.name, &m));
    if let Err(e) = written {
        eprintln!("error: {}: cannot write the batch folder: {e}", dir.display());
        return ExitCode::from(2);
    }
    println!("{} variants and {} written to {}", plan.variants.len(), SCRIPT_FILE, dir.display());
    println!("submit:  cd {} && sbatch {SCRIPT_FILE}", dir.display());
    println!("collect: olli sweep --collect {}", dir.display());
    ExitCode::SUCCESS
}

/// Runs the variants with one progress line: a bar on a terminal, a line per finished variant otherwise.
fn run_here(dir: &Path, manifest: &Manifest, settings: &LocalSettings) -> std::io::Result<()> {
    let terminal = std::io::stderr().is_terminal();
    let bar = ProgressBar::with_draw_target(None, if terminal { ProgressDrawTarget::stderr() } else { ProgressDrawTarget::hidden() });
    bar.set_style(
        ProgressStyle::with_template("{spinner} [{elapsed_precise}] {bar:30.cyan/blue} {pos}/{len} variants {msg}")
            .expect("fixed template")
            .progress_chars("=> "),
    );
    let mut running = 0usize;
    let mut failed = 0usize;
    local::run(dir, manifest, settings, |event| match event {
        LocalEvent::Plan { to_run, finished, at_once, threads } => {
            bar.set_length(to_run as u64);
            bar.enable_steady_tick(Duration::from_millis(200));
            let line = format!(
                "{to_run} variants to run ({finished} finished earlier), up to {at_once} at once with {threads} solver thread{} each",
                if threads == 1 { "" } else { "s" }
            );
            bar.println(&line);
            if !terminal {
                eprintln!("{line}");
            }
        }
        LocalEvent::Started { .. } => {
            running += 1;
            bar.set_message(format!("({running} running, {failed} not converged)"));
        }
        LocalEvent::Finished { variant, outcome } => {
            running -= 1;
            if outcome.status != Status::Converged {
                failed += 1;
            }
            bar.inc(1);
            bar.set_message(format!("({running} running, {failed} not converged)"));
            let reason = if outcome.reason.is_empty() { String::new() } else { format!(": {}", outcome.reason) };
            let line = format!("variant {variant}: {}{reason}", outcome.status.name());
            if terminal {
                if outcome.status != Status::Converged {
                    bar.println(line);
                }
            } else {
                eprintln!("[{}/{}] {line}", bar.position(), bar.length().unwrap_or(0));
            }
        }
    })?;
    bar.finish_and_clear();
    Ok(())
}

/// Collects the table, writes it, prints the tally; exit 0 when every variant converged.
fn finish(dir: &Path, manifest: &Manifest) -> ExitCode {
    let table = Table::collect(dir, manifest);
    if let Err(e) = table.write(dir) {
        eprintln!("error: {}: cannot write {TABLE_FILE}: {e}", dir.display());
        return ExitCode::from(1);
    }
    let tally: Vec<String> = [Status::Converged, Status::Stopped, Status::Failed, Status::NotRun]
        .into_iter()
        .map(|s| (table.count(s.clone()), s))
        .filter(|(n, _)| *n > 0)
        .map(|(n, s)| format!("{n} {}", s.name()))
        .collect();
    println!("{} variants: {}", table.rows.len(), tally.join(", "));
    for r in table.rows.iter().filter(|r| r.outcome.status != Status::Converged) {
        let reason = if r.outcome.reason.is_empty() { String::new() } else { format!(": {}", r.outcome.reason) };
        println!("  {} {}{reason}", r.variant, r.outcome.status.name());
    }
    println!("table: {}", dir.join(TABLE_FILE).display());
    if table.all_converged() {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    }
}
