//! What a solve returns: one [`IncrementResult`] per converged increment,
//! the reason the run ended, and solver statistics.

use std::collections::BTreeMap;
use std::f64::consts::PI;

pub use crate::contact::active::{ContactFields, ContactSummary};
use crate::element::PointState;
use crate::error::SolveError;
use crate::linear::LinearStats;

impl PointState {
    /// Largest principal logarithmic (Hencky) strain ln λ_max.
    pub fn max_log_strain(&self) -> f64 {
        self.stretches[0].ln()
    }
}

/// Integration-point fields of every element.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PointFields {
    /// Start of each element's points in `states` (length elements + 1).
    pub offsets: Vec<usize>,
    pub states: Vec<PointState>,
}

impl PointFields {
    pub fn element(&self, e: usize) -> &[PointState] {
        &self.states[self.offsets[e]..self.offsets[e + 1]]
    }
}

/// Point fields averaged to nodes (weighted by the integration-point volume
/// of the elements around each node).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct NodalFields {
    /// Cauchy stress in Voigt order xx, yy, zz, xy, yz, xz (axisymmetric:
    /// rr, zz, θθ, rz, 0, 0).
    pub cauchy: Vec<[f64; 6]>,
    /// Hydrostatic pressure −tr σ / 3, positive in compression.
    pub pressure: Vec<f64>,
    /// Volume ratio J.
    pub j: Vec<f64>,
    /// Largest principal logarithmic strain.
    pub max_log_strain: Vec<f64>,
    /// Strain energy density per unit reference volume.
    pub energy_density: Vec<f64>,
}

/// One converged increment.
#[derive(Debug, Clone, PartialEq)]
pub struct IncrementResult {
    /// Index of the stage in the model.
    pub stage: usize,
    pub stage_name: String,
    /// Converged increments of this stage so far (1-based).
    pub increment: usize,
    /// Fraction of the stage reached (0–1].
    pub load_factor: f64,
    /// Size of this increment (fraction of the stage).
    pub step: f64,
    /// Node displacements (2-D: third entry zero).
    pub displacement: Vec<[f64; 3]>,
    /// Reaction force (internal minus external force) summed over each
    /// named set; axisymmetric: over the full 2π.
    pub reactions: BTreeMap<String, [f64; 3]>,
    /// Linear solves of this increment.
    pub newton_iterations: usize,
    /// Out-of-balance force relative to the force scale after each Newton
    /// correction (the last entry is the converged one).
    pub residual_history: Vec<f64>,
    /// Total strain energy (axisymmetric: full 2π; plane strain: thickness).
    pub strain_energy: f64,
    pub axisymmetric: bool,
    pub points: Option<PointFields>,
    pub nodal: Option<NodalFields>,
    /// Stabilisation springs' force relative to the problem's force scale
    /// (0 without stabilisation); keep it well below 1 %.
    pub stabilization_share: f64,
    /// Per bonded insert: its position and the force and moment on it.
    pub inserts: Vec<crate::insert::InsertResult>,
    /// Per rigid body: total force, contact width, peak pressure.
    pub contact: Vec<ContactSummary>,
    /// Contact pressure, gap, slip and status at nodes (when the model has rigid bodies).
    pub contact_fields: Option<ContactFields>,
}

impl IncrementResult {
    /// Reaction on a set per radian of revolution (axisymmetric), else the reaction itself.
    pub fn reaction_per_radian(&self, set: &str) -> Option<[f64; 3]> {
        let r = *self.reactions.get(set)?;
        Some(if self.axisymmetric { r.map(|v| v / (2.0 * PI)) } else { r })
    }
}

/// Why a run ended.
#[derive(Debug, Clone, PartialEq)]
pub enum Termination {
    /// Every stage reached its end.
    Completed,
    /// The run stopped part-way; the increments before it are kept.
    Stopped(SolveError),
}

/// Timings (seconds) and counts of a run.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct SolveStats {
    /// Element loops (force and tangent, including line-search evaluations).
    pub assembly_time: f64,
    pub assemblies: usize,
    /// Sparse-pattern and scatter-map construction.
    pub pattern_time: f64,
    pub newton_iterations: usize,
    pub increments: usize,
    pub cutbacks: usize,
    /// Linear solver statistics, summed over the patterns used.
    pub linear: LinearStats,
}

/// Everything a solve produced.
#[derive(Debug, Clone, PartialEq)]
pub struct Solution {
    pub increments: Vec<IncrementResult>,
    pub termination: Termination,
    pub stats: SolveStats,
}

impl Solution {
    pub fn completed(&self) -> bool {
        self.termination == Termination::Completed
    }

    pub fn last(&self) -> Option<&IncrementResult> {
        self.increments.last()
    }
}
