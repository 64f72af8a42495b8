//! History variables at the integration points of every element (see
//! [`crate::material::history`]): the values of the last converged
//! increment, those of the current trial state, and the time step the trial
//! state is taken over.
//!
//! Elements are strided by the largest `points × material.history_len()` of
//! the mesh, so the element loop hands each element one contiguous slice of
//! each array (as it does with its force and tangent buffers). A model whose
//! materials keep no history has an empty store, and the element loop then
//! evaluates them exactly as before.
//!
//! Evaluations read `converged` and write `current`; [`Self::commit`] is the
//! only way a trial state becomes converged, so a failed attempt or a
//! cut-back increment never changes the history the next attempt starts from.

use super::discretization::Discretization;
use crate::material::TangentKind;

/// History values of every element, at the last converged increment and at
/// the current trial state.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct PointHistories {
    /// Values per element (`points × history_len` used, the rest padding).
    stride: usize,
    converged: Vec<f64>,
    current: Vec<f64>,
    /// Time from the last converged increment to the trial state (job's
    /// time unit); 0 for an instantaneous (load-only) stage.
    pub time_step: f64,
    /// What the isochoric tangent of relaxing materials stands for
    /// (default: the step's consistent tangent).
    pub tangent: TangentKind,
}

/// One element's history for one evaluation.
#[derive(Debug)]
pub struct ElementHistory<'a> {
    /// Converged values, point after point (`history_len` each).
    pub previous: &'a [f64],
    /// Trial values, same layout, written by the evaluation.
    pub current: &'a mut [f64],
    /// Time of the increment (job's time unit; 0 in a stage without duration).
    pub time_step: f64,
    /// What the isochoric tangent of a relaxing material stands for.
    pub tangent: TangentKind,
}

impl PointHistories {
    /// Zeroed (virgin) history for every integration point whose material
    /// keeps one; empty when none does.
    pub fn new(disc: &Discretization) -> Self {
        let n = disc.mesh().element_count();
        let stride = (0..n).map(|e| disc.context(e).material.history_len() * disc.shapes[e].points()).max().unwrap_or(0);
        PointHistories {
            stride,
            converged: vec![0.0; stride * n],
            current: vec![0.0; stride * n],
            time_step: 0.0,
            tangent: TangentKind::Step,
        }
    }

    /// Whether no material of the model keeps a history.
    pub fn is_empty(&self) -> bool {
        self.stride == 0
    }

    /// Values per element in the arrays.
    pub fn stride(&self) -> usize {
        self.stride
    }

    /// Converged values, and trial values to write, of elements `start..end`.
    pub fn split(&mut self, start: usize, end: usize) -> (&[f64], &mut [f64]) {
        let range = start * self.stride..end * self.stride;
        (&self.converged[range.clone()], &mut self.current[range])
    }

    /// The converged history of element `e` (as written by the evaluations).
    pub fn converged(&self, e: usize) -> &[f64] {
        &self.converged[e * self.stride..(e + 1) * self.stride]
    }

    /// The converged values of every element, element after element.
    pub fn all_converged(&self) -> &[f64] {
        &self.converged
    }

    /// Keeps the trial values as converged (the increment converged).
    pub fn commit(&mut self) {
        self.converged.copy_from_slice(&self.current);
    }
}
