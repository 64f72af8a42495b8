//! `olli material FILE.toml`: homogeneous responses of one material table.

use std::path::PathBuf;
use std::process::ExitCode;

#[derive(clap::Args)]
pub struct Args {
    /// TOML file holding one `[material]` table.
    pub file: PathBuf,
}

pub fn run(args: Args) -> ExitCode {
    eprintln!("olli material: {}: not available yet", args.file.display());
    ExitCode::from(2)
}
