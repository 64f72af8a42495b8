//! History variables of one integration point, as a material sees them.
//!
//! A material with memory (viscoelastic, damaged) keeps a fixed number of
//! values per integration point ([`super::Material::history_len`]; 0 for a
//! purely elastic one). Each evaluation reads the values of the last
//! converged increment (`previous`) and writes the values that belong to the
//! trial state (`current`); it never reads `current`. The store that owns
//! them (`assembly::history`) copies `current` into `previous` only when an
//! increment converges, so a failed or cut-back attempt leaves no trace.
//!
//! Every value starts at zero, which each model must read as its virgin,
//! undeformed state.

/// The history values of one point for one evaluation.
#[derive(Debug)]
pub struct PointHistory<'a> {
    /// Values at the end of the last converged increment (read only).
    pub previous: &'a [f64],
    /// Values at the trial state, written by the evaluation.
    pub current: &'a mut [f64],
    /// Time elapsed since the last converged increment (job's time unit;
    /// 0 for a stage without duration: the response is instantaneous).
    pub time_step: f64,
}
