//! Job files: olli's TOML description of one analysis, read and checked here
//! at the edge of the program ([`schema`], [`build`]), then turned into a
//! solver model; [`check`] reports on a job without solving it.

pub mod build;
pub mod check;
pub mod diagnostics;
pub mod mesh_source;
pub mod schema;

pub use build::{load, load_str, Job, JobMaterial, OutputPlan, FIELD_NAMES};
pub use diagnostics::InputError;
