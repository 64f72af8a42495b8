//! Progress events of a solve, so a command-line front end can show progress
//! and write results as increments converge.

use crate::error::SolveError;
use crate::linear::FactorKind;
use crate::results::{DynamicResult, IncrementResult};

/// One progress event.
#[derive(Debug)]
pub enum Event<'a> {
    /// A stage begins.
    StageStart {
        /// 0-based index of the stage.
        stage: usize,
        /// Stage name.
        name: &'a str,
        /// Number of equations solved in this stage.
        equations: usize,
    },
    /// An increment begins.
    IncrementStart {
        /// 0-based index of the stage.
        stage: usize,
        /// 1-based increment number within the stage.
        increment: usize,
        /// Fraction of the stage the increment aims for (0–1].
        load_factor: f64,
        /// Size of the increment (fraction of the stage).
        step: f64,
    },
    /// After each Newton correction: the out-of-balance force at the updated
    /// state (absolute and relative to the force scale), the line-search step
    /// length taken, and the factorization used.
    Iteration {
        /// 1-based Newton iteration number.
        iteration: usize,
        /// Out-of-balance force norm (force units).
        residual: f64,
        /// `residual` relative to the force scale (the convergence measure).
        relative: f64,
        /// Line-search step length (1: full Newton step).
        line_search: f64,
        /// Factorization used for this correction.
        factor: FactorKind,
    },
    /// The tangent was not positive definite; `factor` says what was used instead.
    LinearFallback {
        /// 0-based index of the stage.
        stage: usize,
        /// 1-based increment number within the stage.
        increment: usize,
        /// 1-based Newton iteration number.
        iteration: usize,
        /// The factorization used instead of Cholesky.
        factor: FactorKind,
    },
    /// Plain Newton failed on this increment (`reason`); it is tried again
    /// with damped steps before any cutback.
    DampedRetry {
        /// Stage index (0-based).
        stage: usize,
        /// Increment of the stage (1-based).
        increment: usize,
        /// Why plain Newton failed.
        reason: &'a SolveError,
    },
    /// An increment failed and is retried smaller.
    Cutback {
        /// 0-based index of the stage.
        stage: usize,
        /// Load factor of the last converged state, where the retry starts.
        load_factor: f64,
        /// The new, smaller step (fraction of the stage).
        step: f64,
        /// Why the increment failed.
        reason: &'a SolveError,
    },
    /// An increment converged, with its results.
    Converged(&'a IncrementResult),
    /// A harmonic stage finished, with the complex stiffness it found.
    Harmonic(&'a DynamicResult),
}

/// Receives progress events.
pub trait Observer {
    /// Called for every event, in order.
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
