//! Progress events of a solve, so a command-line front end can show progress
//! and write results as increments converge.

use crate::error::SolveError;
use crate::linear::FactorKind;
use crate::results::IncrementResult;

/// One progress event.
#[derive(Debug)]
pub enum Event<'a> {
    StageStart {
        stage: usize,
        name: &'a str,
        equations: usize,
    },
    IncrementStart {
        stage: usize,
        increment: usize,
        load_factor: f64,
        step: f64,
    },
    /// After each Newton correction: the out-of-balance force at the updated
    /// state (absolute and relative to the force scale), the line-search step
    /// length taken, and the factorization used.
    Iteration {
        iteration: usize,
        residual: f64,
        relative: f64,
        line_search: f64,
        factor: FactorKind,
    },
    /// The tangent was not positive definite; `factor` says what was used instead.
    LinearFallback {
        stage: usize,
        increment: usize,
        iteration: usize,
        factor: FactorKind,
    },
    /// Plain Newton failed on this increment (`reason`); it is tried again
    /// with damped steps before any cutback.
    DampedRetry {
        stage: usize,
        increment: usize,
        reason: &'a SolveError,
    },
    Cutback {
        stage: usize,
        load_factor: f64,
        step: f64,
        reason: &'a SolveError,
    },
    Converged(&'a IncrementResult),
}

/// Receives progress events.
pub trait Observer {
    fn event(&mut self, event: &Event);
}

/// Ignores every event.
#[derive(Debug, Default, Clone, Copy)]
pub struct Quiet;

impl Observer for Quiet {
    fn event(&mut self, _: &Event) {}
}

impl<F: FnMut(&Event)> Observer for F {
    fn event(&mut self, event: &Event) {
        self(event)
    }
}
