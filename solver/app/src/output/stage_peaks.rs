//! The peaks of each stage for `summary.json`: over every converged
//! increment of the stage (not only the saved frames), the largest maximum
//! principal log strain, the largest von Mises stress and the smallest
//! volume ratio, each with the element, integration point, reference
//! position and increment where it occurred.

use std::collections::BTreeMap;

use serde::Serialize;

use olli_solver::results::{IncrementResult, PointPeak};

/// One extreme of a stage and where and when it occurred.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct StagePeak {
    /// The extreme value (log strain, stress units, or volume ratio J).
    pub value: f64,
    /// Element index (0-based, as in messages and the `.vtu` frames).
    pub element: usize,
    /// Integration point of the element (0-based).
    pub point: usize,
    /// Reference position of the point.
    pub at: [f64; 3],
    /// Converged increment of the stage (1-based) and its load factor.
    pub increment: usize,
    /// Load factor of that increment (fraction of the stage).
    pub load_factor: f64,
}

/// The extremes of one stage.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StagePeaks {
    /// Largest maximum principal log strain ln λ_max.
    pub max_principal_log_strain: StagePeak,
    /// Largest von Mises stress (stress units).
    pub von_mises: StagePeak,
    /// Smallest volume ratio J.
    pub min_volume_ratio: StagePeak,
}

impl StagePeak {
    fn of(p: &PointPeak, r: &IncrementResult) -> Self {
        StagePeak { value: p.value, element: p.element, point: p.point, at: p.at, increment: r.increment, load_factor: r.load_factor }
    }
}

/// Folds the converged increment `r` into the peaks of its stage.
pub fn record(stages: &mut BTreeMap<String, StagePeaks>, r: &IncrementResult) {
    let p = &r.peaks;
    let fresh = StagePeaks {
        max_principal_log_strain: StagePeak::of(&p.max_principal_log_strain, r),
        von_mises: StagePeak::of(&p.von_mises, r),
        min_volume_ratio: StagePeak::of(&p.min_volume_ratio, r),
    };
    match stages.get_mut(&r.stage_name) {
        None => {
            stages.insert(r.stage_name.clone(), fresh);
        }
        Some(s) => {
            if fresh.max_principal_log_strain.value > s.max_principal_log_strain.value {
                s.max_principal_log_strain = fresh.max_principal_log_strain;
            }
            if fresh.von_mises.value > s.von_mises.value {
                s.von_mises = fresh.von_mises;
            }
            if fresh.min_volume_ratio.value < s.min_volume_ratio.value {
                s.min_volume_ratio = fresh.min_volume_ratio;
            }
        }
    }
}
