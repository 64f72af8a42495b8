//! `olli`: the command-line face of the solver. Each subcommand lives in its
//! own module; this file only dispatches. Exit codes: 0 success, 1 a run that
//! stopped without converging, 2 bad input.

mod check_cmd;
mod material_cmd;
mod mesh_cmd;
mod run_cmd;
mod sweep_cmd;

use std::process::ExitCode;

use clap::{Parser, Subcommand};

#[derive(Parser)]
#[command(name = "olli", version, about = "Large-strain finite-element analysis of rubber seals, mounts and bushings")]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Homogeneous responses of a hyperelastic material (uniaxial, biaxial, planar, shear, volumetric).
    Material(material_cmd::Args),
    /// Generate, inspect and convert meshes (info, convert, generate).
    Mesh(mesh_cmd::Args),
    /// Solve a job file and write VTK, CSV and JSON results.
    Run(run_cmd::Args),
    /// Check a job file and its mesh without solving.
    Check(check_cmd::Args),
    /// Run many variants of one job (a `*.sweep.toml`), here or as a batch array, and collect `sweep.csv`.
    Sweep(sweep_cmd::Args),
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match cli.command {
        Command::Material(args) => material_cmd::run(args),
        Command::Mesh(args) => mesh_cmd::run(args),
        Command::Run(args) => run_cmd::run(args),
        Command::Check(args) => check_cmd::run(args),
        Command::Sweep(args) => sweep_cmd::run(args),
    }
}
