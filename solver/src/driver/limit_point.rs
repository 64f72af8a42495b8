//! Telling a limit load from an ordinary non-convergence. In a stage driven
//! only by loads (forces, pressures, fluids, body force; nothing moved),
//! the stiffness along the load path is measured per converged increment as
//! the load step per unit displacement, Δt / ‖Δu‖: the current stiffness
//! parameter of Bergan, Horrigmoe, Bråkhus and Søreide (1978, "Solution
//! techniques for non-linear finite element problems", IJNME 12:1677–1696)
//! in its load-factor form, which falls to zero at a limit point. When the
//! increment of such a stage shrinks below its minimum and that stiffness
//! has fallen below [`LIMIT_STIFFNESS_RATIO`] of its value at the first
//! increment, the stop is reported as a limit point.

use super::stages::StageProgram;
use crate::model::Stage;

/// Stiffness along the load, relative to the stage's first increment,
/// below which a load-driven stage that cannot go on has reached a limit
/// point. A rule of thumb of ours: far from a limit the ratio of a
/// softening rubber part stays well above it.
pub const LIMIT_STIFFNESS_RATIO: f64 = 0.2;

/// The stiffness along the load path of a stage so far.
#[derive(Debug, Clone, Copy, Default)]
pub struct LoadPath {
    first: Option<f64>,
    last: f64,
}

impl LoadPath {
    /// Records a converged increment of stage fraction `step` that moved
    /// the dofs from `before` to `after`.
    pub fn record(&mut self, step: f64, before: &[f64], after: &[f64]) {
        let moved = before.iter().zip(after).map(|(a, b)| (b - a) * (b - a)).sum::<f64>().sqrt();
        if moved > 0.0 && step > 0.0 {
            let s = step / moved;
            self.first.get_or_insert(s);
            self.last = s;
        }
    }

    /// The last increment's stiffness relative to the first (None before two).
    pub fn ratio(&self) -> Option<f64> {
        self.first.map(|f| self.last / f)
    }
}

/// True when the stage is driven by loads alone: no prescribed value or
/// rigid body moves during it, and some load changes.
pub fn load_driven(stage: &Stage, prog: &StageProgram, start: &[f64]) -> bool {
    let moved = prog.prescribed.iter().enumerate().any(|(d, &p)| p && prog.target[d] != start[d]);
    let loads = prog.pressures.iter().any(|p| p.start != p.end)
        || prog.dead_changes.iter().any(|(_, c)| c.iter().any(|&v| v != 0.0))
        || !stage.fluid_pressures.is_empty();
    !moved && stage.rigid_motions.is_empty() && stage.inserts.is_empty() && loads
}

/// What the stage's loads have reached at stage fraction `t`, in words
/// (the pressures by name, else the stage's loads as a whole).
pub fn loads_at(prog: &StageProgram, t: f64) -> String {
    let pressures: Vec<String> = prog
        .pressures
        .iter()
        .filter(|p| p.start != p.end)
        .map(|p| format!("pressure {:.4e} on `{}`", p.start + p.ramp.fraction(t) * (p.end - p.start), p.name))
        .collect();
    if pressures.is_empty() {
        format!("{:.4} of the stage's loads", t)
    } else {
        pressures.join(", ")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A load path that softens to a tenth of its first stiffness reads as near a limit.
    #[test]
    fn stiffness_ratio_follows_the_load_per_displacement() {
        let mut path = LoadPath::default();
        assert_eq!(path.ratio(), None);
        path.record(0.1, &[0.0, 0.0], &[0.3, 0.4]); // 0.1 / 0.5
        path.record(0.01, &[0.3, 0.4], &[0.6, 0.8]); // 0.01 / 0.5
        assert!((path.ratio().unwrap() - 0.1).abs() < 1e-12);
    }
}
