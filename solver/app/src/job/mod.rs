//! Job files: olli's TOML description of one analysis, read and checked here
//! at the edge of the program ([`schema`] describes the file, [`build`] and
//! its stage part check it and turn it into a solver model, [`mesh_source`]
//! makes the mesh and the selected sets, `rigid` the contact surfaces, `fluid`
//! the fluids that wet the rubber, `seal` glands, extrusion gaps and contact bands), and
//! [`check`] reports on a job
//! without solving it.

pub mod applied;
pub mod build;
pub mod check;
mod conflicts;
pub mod diagnostics;
mod fluid;
pub mod inserts;
pub mod mesh_source;
mod rigid;
pub mod schema;
mod seal;
mod stages;

pub use build::{load, load_str, Job, JobMaterial, OutputPlan, FIELD_NAMES, PEAK_COLUMNS};
pub use diagnostics::InputError;

/// How sweep files are named, so they are never mistaken for jobs (the job
/// reader refuses them; the sweep module reads them).
pub const SWEEP_SUFFIX: &str = ".sweep.toml";
