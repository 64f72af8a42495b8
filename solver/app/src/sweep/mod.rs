//! Design sweeps: many variants of one job. A sweep file (`*.sweep.toml`,
//! [`schema`]) names a base job and parameters, each a key path into the job
//! ([`keypath`]) with a list, a range or a distribution, and a design
//! ([`design`]: full grid, one at a time around the base, Latin hypercube).
//! [`plan`] checks it all and builds each variant's complete job in memory;
//! [`folder`] writes them, one folder per variant; [`local`] runs them on
//! this machine, [`batch`] writes a Slurm array script instead; [`collect`]
//! reads the results back into `sweep.csv`.

pub mod batch;
pub mod collect;
pub mod design;
pub mod folder;
pub mod keypath;
pub mod local;
pub mod plan;
pub mod schema;

pub use collect::{Status, Table, TABLE_FILE};
pub use folder::{write_variants, Manifest};
pub use plan::{load, Plan, SWEEP_SUFFIX};
