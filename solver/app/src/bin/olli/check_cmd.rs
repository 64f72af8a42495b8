//! `olli check JOB.toml`: reads and checks a job without solving it, and
//! prints what it holds (counts, sets, materials with their moduli and
//! stability) and its warnings. Exit codes: 0 a valid job, 2 bad input.

use std::path::PathBuf;
use std::process::ExitCode;

use olli_app::job::{self, check::check};
use olli_app::output::writer::{check_output_folder, job_stem};

use crate::run_cmd::output_folder;

#[derive(clap::Args)]
#[command(after_help = "Example:\n  olli check examples/bush.toml")]
pub struct Args {
    /// The job file (TOML).
    pub job: PathBuf,
}

pub fn run(args: Args) -> ExitCode {
    match job::load(&args.job) {
        Ok(job) => {
            let folder = output_folder(&job, None);
            if let Err(e) = check_output_folder(&folder, &job_stem(&job)) {
                eprintln!("error: {}: {e}", job.path.display());
                return ExitCode::from(2);
            }
            print!("{}", check(&job));
            println!("job is valid");
            ExitCode::SUCCESS
        }
        Err(e) => {
            eprintln!("error: {e}");
            ExitCode::from(2)
        }
    }
}
