//! What a job applies at each increment, for the `applied_...` columns of
//! `history.csv`: the travel of every `[[motion]]` component, the total of
//! every `[[force]]` component and the value of every named `[[pressure]]`,
//! each as reached at that increment (ramp tables included), so a
//! force–travel or pressure curve needs no arithmetic on the load factor.

use olli_solver::model::{Model, Ramp};
use olli_solver::results::IncrementResult;

use super::schema::{AnalysisKind, JobFile};

/// What one `applied_...` column follows.
#[derive(Debug, Clone, PartialEq)]
pub enum AppliedSource {
    /// Prescribed displacement component of a set: the mean over the set's
    /// nodes (each holds the prescribed value) once a motion names it, 0 before.
    Travel {
        /// The moved set.
        set: String,
        /// 0-based component index (x, y, z; axisymmetric r, z).
        component: usize,
    },
    /// Total force component on a set.
    Force {
        /// The loaded set.
        set: String,
        /// 0-based component index (x, y, z; axisymmetric r, z).
        component: usize,
    },
    /// Pressure on a side set.
    Pressure {
        /// The pressure's name (default: its side set).
        set: String,
    },
    /// Angle (degrees) a set has turned through its motions' `rotation`s,
    /// about the first turn's axis (each turn projected on it).
    Angle {
        /// The turned set.
        set: String,
    },
}

/// One `applied_...` column.
#[derive(Debug, Clone, PartialEq)]
pub struct AppliedColumn {
    /// Column name in `history.csv`, `applied_...`.
    pub name: String,
    /// The quantity the column follows.
    pub source: AppliedSource,
}

/// The columns of a job file, in file order: `applied_<set>_<component>` for
/// motions and forces, `applied_<name>_pressure` for pressures.
pub fn applied_columns(file: &JobFile, kind: AnalysisKind) -> Vec<AppliedColumn> {
    let comps = kind.components();
    let mut out: Vec<AppliedColumn> = Vec::new();
    let mut push = |name: String, source: AppliedSource| {
        if !out.iter().any(|c| c.name == name) {
            out.push(AppliedColumn { name, source });
        }
    };
    for m in &file.motion {
        let spec = m.get_ref();
        let set = spec.nodes.get_ref().clone();
        if spec.rotation.is_some() {
            push(format!("applied_{set}_angle"), AppliedSource::Angle { set: set.clone() });
        }
        for (i, c) in comps.iter().enumerate() {
            if spec.displacement.as_ref().is_some_and(|d| d.get_ref().contains_key(*c)) {
                push(format!("applied_{set}_{c}"), AppliedSource::Travel { set: set.clone(), component: i });
            }
        }
    }
    for f in &file.force {
        let spec = f.get_ref();
        for (i, c) in comps.iter().enumerate() {
            if spec.total.get_ref().contains_key(*c) {
                let set = spec.set.get_ref().clone();
                push(format!("applied_{set}_{c}"), AppliedSource::Force { set, component: i });
            }
        }
    }
    for p in &file.pressure {
        let spec = p.get_ref();
        let set = spec.sides.get_ref().clone();
        let name = spec.name.as_ref().map(|n| n.get_ref().clone()).unwrap_or_else(|| set.clone());
        push(format!("applied_{name}_pressure"), AppliedSource::Pressure { set });
    }
    out
}

/// Degrees turned by `set` up to load factor `t` of stage `stage`: each
/// stage's turn projected on the first turn's axis, the current one ramped.
fn turned_angle(model: &Model, stage: usize, t: f64, set: &str) -> f64 {
    let mut axis: Option<[f64; 3]> = None;
    let mut total = 0.0;
    for (i, s) in model.stages.iter().enumerate().take(stage + 1) {
        for m in s.rotations.iter().filter(|m| m.set == set) {
            let norm = m.rotation.iter().map(|v| v * v).sum::<f64>().sqrt();
            if norm == 0.0 {
                continue;
            }
            let e = *axis.get_or_insert(m.rotation.map(|v| v / norm));
            let angle = (0..3).map(|k| m.rotation[k] * e[k]).sum::<f64>().to_degrees();
            let fraction = if i == stage { s.ramps.get(set).cloned().unwrap_or(Ramp::Linear).fraction(t) } else { 1.0 };
            total += fraction * angle;
        }
    }
    total
}

/// Value of a load keyed by set in stage `stage` at load factor `t`: held from
/// the last earlier stage that set it (0 before), ramped within a stage that sets it.
fn staged_value(model: &Model, stage: usize, t: f64, set: &str, value_in: impl Fn(usize) -> Option<f64>) -> f64 {
    let mut held = 0.0;
    for (i, s) in model.stages.iter().enumerate().take(stage + 1) {
        if let Some(v) = value_in(i) {
            if i == stage {
                let ramp = s.ramps.get(set).cloned().unwrap_or(Ramp::Linear);
                return held + ramp.fraction(t) * (v - held);
            }
            held = v;
        }
    }
    held
}

impl AppliedColumn {
    /// The value applied at increment `r` of `model`.
    pub fn value(&self, model: &Model, r: &IncrementResult) -> f64 {
        match &self.source {
            AppliedSource::Travel { set, component } => {
                let named = model.stages[..=r.stage].iter().any(|s| {
                    s.motions.iter().any(|m| &m.set == set && m.displacement[*component].is_some())
                        || s.rotations.iter().any(|m| &m.set == set)
                });
                let nodes = model.mesh.nodes_of_set(set).unwrap_or_default();
                if !named || nodes.is_empty() {
                    return 0.0;
                }
                nodes.iter().map(|&n| r.displacement[n][*component]).sum::<f64>() / nodes.len() as f64
            }
            AppliedSource::Force { set, component } => staged_value(model, r.stage, r.load_factor, set, |i| {
                model.stages[i].forces.iter().rfind(|f| &f.set == set).map(|f| f.total[*component])
            }),
            AppliedSource::Pressure { set } => staged_value(model, r.stage, r.load_factor, set, |i| {
                model.stages[i].pressures.iter().rfind(|p| &p.set == set).map(|p| p.value)
            }),
            AppliedSource::Angle { set } => turned_angle(model, r.stage, r.load_factor, set),
        }
    }
}

#[cfg(test)]
mod tests {
    use crate::job::load_str;

    // A force ramped by a table, a named pressure held from the first stage
    // and ramped again in the second: the columns follow the job's own
    // numbers at every converged increment.
    #[test]
    fn applied_columns_follow_ramp_tables_and_stages() {
        let text = r#"
analysis = "plane-strain"
[mesh]
generate = "rectangle"
size = [2.0, 1.0]
divisions = [2, 1]
[materials.m]
model = "neo-hookean"
shear_modulus = 1.0
bulk_modulus = 100.0
[[region]]
elements = "all"
material = "m"
[[support]]
nodes = "bottom"
fix = ["x", "y"]
[[force]]
set = "top"
stage = "one"
total = { x = 0.4 }
ramp = [[0.0, 0.0], [0.5, 0.8], [1.0, 1.0]]
[[pressure]]
name = "lid"
sides = "right"
stage = "one"
value = 0.2
[[pressure]]
name = "lid"
sides = "right"
stage = "two"
value = 0.5
[[stage]]
name = "one"
first_increment = 0.25
max_increment = 0.25
[[stage]]
name = "two"
first_increment = 0.5
max_increment = 0.5
"#;
        let job = load_str(std::path::Path::new("t.toml"), text).unwrap();
        let names: Vec<&str> = job.applied.iter().map(|a| a.name.as_str()).collect();
        assert_eq!(names, ["applied_top_x", "applied_lid_pressure"]);
        let sol = olli_solver::solve(&job.model, &mut olli_solver::Quiet).unwrap();
        assert!(sol.completed());
        for r in &sol.increments {
            let t = r.load_factor;
            let (force, pressure) = if r.stage == 0 {
                let f = if t <= 0.5 { 1.6 * t } else { 0.8 + 0.4 * (t - 0.5) };
                (0.4 * f, 0.2 * t)
            } else {
                (0.4, 0.2 + 0.3 * t)
            };
            assert!((job.applied[0].value(&job.model, r) - force).abs() < 1e-12, "{} at {t}", r.stage);
            assert!((job.applied[1].value(&job.model, r) - pressure).abs() < 1e-12, "{} at {t}", r.stage);
        }
    }
}
