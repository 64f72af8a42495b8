//! Result files: `.vtu` per saved increment with a `.pvd` collection over the
//! load factor, `history.csv`, `summary.json` and the run log.
//!
//! Every file is written atomically ([`atomic::write_atomic`]): to a temporary
//! file in the same folder, then renamed into place, so an interrupted run
//! never leaves a half-written result.

pub mod atomic;
pub mod history;
pub mod pvd;
pub mod vtu;

pub use atomic::write_atomic;
