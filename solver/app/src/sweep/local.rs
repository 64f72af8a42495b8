//! The local runner: runs the variants of a sweep folder on this machine,
//! several at once, each as a child process `olli run <job> --output
//! <folder> --quiet` of the same executable.
//!
//! Child processes rather than threads of this process: a variant then runs
//! exactly as it would alone or as a batch array task (same command, same
//! files, so the local and the batch table agree), a variant that crashes
//! or runs out of memory takes no other down, its memory can be measured,
//! and stopping the sweep leaves each variant either finished (its
//! `summary.json` says `converged` or `stopped`) or to be rerun.
//!
//! Bounds: at most `jobs` variants at once (default: the number of cores),
//! each with `RAYON_NUM_THREADS` = cores / running variants (at least 1), so
//! the solver threads of all variants together match the cores. Memory: a
//! variant starts only while the estimated peak memory of the running ones
//! plus its own stays within [`MEMORY_SHARE`] of the memory available when
//! the sweep started (one variant always runs). The estimate is the larger
//! of a rough figure from the model's size ([`estimated_bytes`]) and the
//! largest peak measured so far (Linux `VmHWM` of the children).
//!
//! Resuming: a variant whose `summary.json` says `converged` or `stopped` is
//! finished and skipped; any other is run (a run cut off part-way left a
//! summary saying `running` or `interrupted`, or none). `sweep.log` in the
//! sweep folder records each start and end.

use std::fs::{File, OpenOptions};
use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Stdio};
use std::time::{Duration, Instant};

use super::collect::{outcome, Outcome};
use super::folder::{Manifest, ManifestVariant, ERROR_FILE};
use crate::output::summary::run_finished;

/// Share of the memory available at the start that the variants may use together.
pub const MEMORY_SHARE: f64 = 0.8;
/// The runner's log in the sweep folder.
pub const LOG_FILE: &str = "sweep.log";
/// How often running variants are looked at.
const POLL: Duration = Duration::from_millis(50);

/// Settings of a local run.
#[derive(Debug, Clone)]
pub struct LocalSettings {
    /// The `olli` executable that runs each variant.
    pub olli: PathBuf,
    /// Most variants at once (default: `cores`).
    pub jobs: Option<usize>,
    /// Cores to use (default: all this machine has).
    pub cores: usize,
    /// Bytes the variants may use together (default: [`MEMORY_SHARE`] of the available memory; `None` when unknown).
    pub memory: Option<u64>,
}

impl LocalSettings {
    /// Settings for this machine: every core, [`MEMORY_SHARE`] of the available memory.
    pub fn for_this_machine(olli: PathBuf, jobs: Option<usize>) -> Self {
        let cores = std::thread::available_parallelism().map(|n| n.get()).unwrap_or(1);
        let memory = available_memory().map(|b| (b as f64 * MEMORY_SHARE) as u64);
        LocalSettings { olli, jobs, cores, memory }
    }
}

/// What the runner reports as it goes.
#[derive(Debug, Clone)]
pub enum LocalEvent<'a> {
    /// The variants to run now and those finished earlier.
    Plan {
        /// Variants to run now.
        to_run: usize,
        /// Variants finished by an earlier invocation (skipped).
        finished: usize,
        /// Variants run at the same time.
        at_once: usize,
        /// Solver threads per variant.
        threads: usize,
    },
    /// A variant has started.
    Started {
        /// Its name.
        variant: &'a str,
    },
    /// A variant has ended (converged, stopped or failed).
    Finished {
        /// Its name.
        variant: &'a str,
        /// How it ended.
        outcome: &'a Outcome,
    },
}

/// A rough peak memory of one variant in bytes, on the safe side: 50 MB for
/// the program, and per unknown 2 kB in 2-D or 15 kB in 3-D for the sparse
/// factor, which fills in more with the larger separators of 3-D meshes.
/// Our own rough figures: the block-compression benchmark at 30 × 30 × 8
/// (20 k unknowns) peaked at 151 MB, 7 kB per unknown, and the fill per
/// unknown grows with the mesh; the examples stay below 25 MB. Measured
/// peaks take over once they are larger.
pub fn estimated_bytes(v: &ManifestVariant) -> u64 {
    let per_unknown: u64 = if v.dimension >= 3 { 15_000 } else { 2_000 };
    50_000_000 + per_unknown * v.unknowns as u64
}

/// Whether one more variant needing `estimate` bytes may start beside
/// variants needing `in_use` bytes: fewer than `at_once` run and the memory
/// fits, or nothing runs at all (one variant always runs).
pub fn may_start(in_use: &[u64], estimate: u64, at_once: usize, memory: Option<u64>) -> bool {
    if in_use.is_empty() {
        return true;
    }
    in_use.len() < at_once && memory.is_none_or(|m| in_use.iter().sum::<u64>() + estimate <= m)
}

struct Running {
    variant: usize,
    child: Child,
    estimate: u64,
    peak: u64,
}

/// Runs every unfinished variant of the sweep in `dir`.
pub fn run(dir: &Path, manifest: &Manifest, settings: &LocalSettings, mut report: impl FnMut(LocalEvent)) -> io::Result<()> {
    let mut log = OpenOptions::new().create(true).append(true).open(dir.join(LOG_FILE))?;
    let started = Instant::now();
    let mut pending: Vec<usize> = Vec::new();
    for (i, v) in manifest.variants.iter().enumerate() {
        if run_finished(&dir.join(&v.name)) {
            writeln!(log, "{:9.2} s  skip  {} (finished earlier)", 0.0, v.name)?;
        } else {
            pending.push(i);
        }
    }
    let at_once = settings.jobs.unwrap_or(settings.cores).clamp(1, pending.len().max(1));
    let threads = (settings.cores / at_once).max(1);
    report(LocalEvent::Plan { to_run: pending.len(), finished: manifest.variants.len() - pending.len(), at_once, threads });
    pending.reverse();
    let mut running: Vec<Running> = Vec::new();
    let mut measured_peak = 0u64;
    while !pending.is_empty() || !running.is_empty() {
        while let Some(&next) = pending.last() {
            let estimate = estimated_bytes(&manifest.variants[next]).max(measured_peak);
            let in_use: Vec<u64> = running.iter().map(|r| r.estimate.max(r.peak)).collect();
            if !may_start(&in_use, estimate, at_once, settings.memory) {
                break;
            }
            pending.pop();
            let v = &manifest.variants[next];
            let child = start(&settings.olli, dir, manifest, v, threads)?;
            writeln!(log, "{:9.2} s  start {} (solver threads: {threads})", started.elapsed().as_secs_f64(), v.name)?;
            log.flush()?;
            report(LocalEvent::Started { variant: &v.name });
            running.push(Running { variant: next, child, estimate, peak: 0 });
        }
        std::thread::sleep(POLL);
        let mut i = 0;
        while i < running.len() {
            let r = &mut running[i];
            r.peak = r.peak.max(peak_memory(r.child.id()).unwrap_or(0));
            match r.child.try_wait()? {
                None => i += 1,
                Some(_) => {
                    let r = running.swap_remove(i);
                    measured_peak = measured_peak.max(r.peak);
                    let v = &manifest.variants[r.variant];
                    let outcome = outcome(&dir.join(&v.name));
                    writeln!(
                        log,
                        "{:9.2} s  end   {} {} (peak memory {:.0} MB)",
                        started.elapsed().as_secs_f64(),
                        v.name,
                        outcome.status.name(),
                        r.peak as f64 / 1e6
                    )?;
                    log.flush()?;
                    report(LocalEvent::Finished { variant: &v.name, outcome: &outcome });
                }
            }
        }
    }
    Ok(())
}

fn start(olli: &Path, dir: &Path, manifest: &Manifest, v: &ManifestVariant, threads: usize) -> io::Result<Child> {
    let folder = dir.join(&v.name);
    let errors = File::create(folder.join(ERROR_FILE))?;
    Command::new(olli)
        .arg("run")
        .arg(manifest.job_path(dir, &v.name))
        .arg("--output")
        .arg(&folder)
        .arg("--quiet")
        .env("RAYON_NUM_THREADS", threads.to_string())
        .stdin(Stdio::null())
        .stdout(Stdio::null())
        .stderr(errors)
        .spawn()
}

/// Peak resident memory of a process in bytes (Linux `VmHWM`; `None` elsewhere or once it has ended).
fn peak_memory(pid: u32) -> Option<u64> {
    let status = std::fs::read_to_string(format!("/proc/{pid}/status")).ok()?;
    kilobytes(&status, "VmHWM:")
}

/// Memory available for new work in bytes (Linux `MemAvailable`; `None` elsewhere).
pub fn available_memory() -> Option<u64> {
    let info = std::fs::read_to_string("/proc/meminfo").ok()?;
    kilobytes(&info, "MemAvailable:")
}

/// The `<label> <n> kB` line of a /proc file, in bytes.
fn kilobytes(text: &str, label: &str) -> Option<u64> {
    let line = text.lines().find(|l| l.starts_with(label))?;
    let kb: u64 = line[label.len()..].trim().trim_end_matches("kB").trim().parse().ok()?;
    Some(kb * 1024)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn variants_start_while_cores_and_memory_allow() {
        let gb = 1_000_000_000;
        assert!(may_start(&[], 50 * gb, 2, Some(gb)), "one variant always runs");
        assert!(may_start(&[gb], gb, 2, Some(3 * gb)));
        assert!(!may_start(&[gb], gb, 1, Some(3 * gb)), "--jobs 1");
        assert!(!may_start(&[gb, gb], 2 * gb, 4, Some(3 * gb)), "memory full");
        assert!(may_start(&[gb, gb, gb], 50 * gb, 4, None), "memory unknown");
    }

    #[test]
    fn reads_proc_memory_lines() {
        assert_eq!(kilobytes("Name: x\nVmHWM:\t  2048 kB\n", "VmHWM:"), Some(2048 * 1024));
        assert_eq!(kilobytes("Name: x\n", "VmHWM:"), None);
        // This test process has a peak resident size.
        assert!(peak_memory(std::process::id()).is_some_and(|b| b > 0) || !Path::new("/proc").exists());
    }
}
