//! Result files: `.vtu` per saved increment with a `.pvd` collection over the
//! load factor, `history.csv`, `summary.json`, the run log, and
//! `dynamic.csv` when the job has harmonic stages ([`dynamic`]).
//!
//! Every file is written atomically ([`atomic::write_atomic`]): to a temporary
//! file in the same folder, then renamed into place, so an interrupted run
//! never leaves a half-written result. Frames are written on a thread of
//! their own while the solver goes on ([`frame_queue`]). [`writer::ResultWriter`] is the
//! solver observer that writes them as increments converge.

pub mod atomic;
pub mod dynamic;
pub mod event_text;
pub mod fields;
pub mod frame_queue;
pub mod history;
pub mod performance;
pub mod pvd;
pub mod seal_values;
pub mod stage_peaks;
pub mod summary;
pub mod vtu;
pub mod writer;

pub use atomic::write_atomic;
pub use writer::{ResultWriter, HISTORY_FILE, LOG_FILE, SUMMARY_FILE};
