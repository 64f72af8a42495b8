//! Job files: olli's TOML description of one analysis, read and checked here
//! at the edge of the program, then turned into a solver model.

pub mod diagnostics;
pub mod schema;

pub use diagnostics::InputError;
