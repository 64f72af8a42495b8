//! # olli-app
//!
//! The edge of olli: job files (TOML) read and checked into a solver
//! [`olli_solver::Model`] ([`job`]), and the result files written as a run
//! converges ([`output`]), and the wording of Drucker stability shared by
//! the commands ([`stability_text`]). The `olli` command line is built on
//! this crate.
//! Nothing in `olli-solver` depends on it: a library user who only solves a
//! `Model` compiles no command-line parser, progress bar or VTK writer.
#![warn(missing_docs)]

pub mod fit_data;
pub mod job;
pub mod output;
pub mod plot;
pub mod report;
pub mod stability_text;
pub mod sweep;
