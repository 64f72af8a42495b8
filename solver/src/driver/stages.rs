//! Resolves the stages of a model into dof-level load programs: which dofs
//! are prescribed and to what value at the end of each stage, the
//! pressurised sides with their start and end pressures, and the dead-load
//! vector at the end of each stage. Unknown set names are reported here,
//! before any work is done.

use std::collections::BTreeMap;

use olli_mesh::Side;

use crate::assembly::Discretization;
use crate::error::SolveError;
use crate::insert::rotation;
use crate::load::dead::{add_body_force, add_node_force, add_side_force};
use crate::model::{Ramp, RotationMotion, BODY_FORCE_RAMP};

/// [`StageProgram::arc_of_dof`] of a dof that follows no arc.
pub const NO_ARC: u32 = u32::MAX;
/// [`StageProgram::arc_of_dof`] of a dof held where it was at the stage start
/// (an earlier stage turned it).
pub const HOLD_AT_START: u32 = u32::MAX - 1;

/// Where a node of a turned set is at ramp fraction `a` of the stage, from
/// its position `start` at the stage start: the exact arc about the axis,
/// then the translation.
pub fn arc_position(m: &RotationMotion, a: f64, start: [f64; 3]) -> [f64; 3] {
    let r = rotation::rotation(m.rotation.map(|v| a * v));
    let arm = [0, 1, 2].map(|i| start[i] - m.center[i]);
    let turned = rotation::apply(&r, arm);
    [0, 1, 2].map(|i| m.center[i] + turned[i] + a * m.translation[i])
}

/// One pressurised side set during a stage.
#[derive(Debug, Clone)]
pub struct PressureProgram {
    /// The side set's name.
    pub name: String,
    /// The loaded sides.
    pub sides: Vec<Side>,
    /// Pressure at the stage start (stress units).
    pub start: f64,
    /// Pressure at the stage end (stress units).
    pub end: f64,
    /// How the pressure goes from `start` to `end` over the stage.
    pub ramp: Ramp,
}

/// A stage as seen by the Newton driver.
#[derive(Debug, Clone)]
pub struct StageProgram {
    /// Prescribed flag of every global dof.
    pub prescribed: Vec<bool>,
    /// End-of-stage value of the prescribed dofs (others unused).
    pub target: Vec<f64>,
    /// Index into `ramps` of each dof's ramp (0: linear).
    pub ramp_of_dof: Vec<u32>,
    /// Index into `arcs` of each dof of a turned set, else [`NO_ARC`] (moves
    /// towards `target`) or [`HOLD_AT_START`].
    pub arc_of_dof: Vec<u32>,
    /// The rigid turns of this stage.
    pub arcs: Vec<RotationMotion>,
    /// The ramps of the stage; index 0 is linear.
    pub ramps: Vec<Ramp>,
    /// The pressurised side sets.
    pub pressures: Vec<PressureProgram>,
    /// Dead load at the start of the stage.
    pub dead_start: Vec<f64>,
    /// Changes of the dead load over the stage, each with its ramp.
    pub dead_changes: Vec<(Ramp, Vec<f64>)>,
    /// Dofs held before this stage and let go at its start.
    pub released: Vec<usize>,
}

impl StageProgram {
    /// This program with the release loads of its stage: `reactions` (the
    /// nodal reactions of the last converged increment, `dim` per node) at
    /// the released dofs, applied at the start and ramped linearly to zero,
    /// so the let-go part starts in equilibrium and relaxes.
    pub fn with_release_loads(&self, reactions: &[[f64; 3]], dim: usize) -> StageProgram {
        let mut prog = self.clone();
        let mut change = vec![0.0; self.dead_start.len()];
        for &d in &self.released {
            let r = reactions.get(d / dim).map_or(0.0, |r| r[d % dim]);
            prog.dead_start[d] += r;
            change[d] = -r;
        }
        prog.dead_changes.push((Ramp::Linear, change));
        prog
    }

    /// The dead load vector at stage fraction `t` into `f`.
    pub fn dead_at(&self, t: f64, f: &mut [f64]) {
        f.copy_from_slice(&self.dead_start);
        for (ramp, change) in &self.dead_changes {
            let a = ramp.fraction(t);
            for (fi, ci) in f.iter_mut().zip(change) {
                *fi += a * ci;
            }
        }
    }
}

/// Nodes of each set whose reaction is reported.
pub type ReportSets = BTreeMap<String, Vec<usize>>;

/// Resolves all stages, and the sets whose reactions are reported.
pub fn resolve(disc: &Discretization) -> Result<(Vec<StageProgram>, ReportSets), SolveError> {
    let model = disc.model;
    let mesh = disc.mesh();
    let dim = disc.dim;
    let ndof = mesh.node_count() * dim;
    let mut report: BTreeMap<String, Vec<usize>> = mesh.node_sets.clone();
    let mut prescribed = vec![false; ndof];
    let mut target = vec![0.0; ndof];
    let mut pressures: BTreeMap<String, f64> = BTreeMap::new();
    let mut forces: BTreeMap<String, [f64; 3]> = BTreeMap::new();
    let mut body: Option<[f64; 3]> = None;
    let mut dead_prev = vec![0.0; ndof];
    // Dofs an earlier stage turned: held at their stage-start value until re-prescribed.
    let mut turned = vec![false; ndof];
    let mut programs = Vec::new();
    let inserts = crate::insert::Inserts::new(disc)?;
    for stage in &model.stages {
        for drive in &stage.inserts {
            if !model.inserts.iter().any(|i| i.name == drive.insert) {
                return Err(SolveError::BadInsert {
                    insert: drive.insert.clone(),
                    reason: format!("stage `{}` drives an insert that does not exist", stage.name),
                });
            }
        }
        let unknown = |name: &str| SolveError::UnknownSet { stage: stage.name.clone(), name: name.to_string() };
        let ramp_for = |set: &str| stage.ramps.get(set).cloned().unwrap_or_default();
        let mut ramps = vec![Ramp::Linear];
        let mut ramp_of_dof = vec![0u32; ndof];
        let mut released = Vec::new();
        for r in &stage.releases {
            let nodes = mesh.nodes_of_set(&r.set).ok_or_else(|| unknown(&r.set))?;
            for &n in &nodes {
                for i in (0..dim).filter(|&i| r.components[i]) {
                    let d = n * dim + i;
                    turned[d] = false;
                    if std::mem::replace(&mut prescribed[d], false) {
                        released.push(d);
                    }
                }
            }
        }
        for s in &stage.supports {
            let nodes = mesh.nodes_of_set(&s.set).ok_or_else(|| unknown(&s.set))?;
            for &n in &nodes {
                for i in 0..dim {
                    if s.components[i] {
                        prescribed[n * dim + i] = true;
                        target[n * dim + i] = 0.0;
                        turned[n * dim + i] = false;
                    }
                }
            }
            report.insert(s.set.clone(), nodes);
        }
        for m in &stage.motions {
            let nodes = mesh.nodes_of_set(&m.set).ok_or_else(|| unknown(&m.set))?;
            if stage.harmonic.is_some() {
                // Amplitudes of the vibration, not positions: the static program holds.
                report.insert(m.set.clone(), nodes);
                continue;
            }
            let ramp = ramp_for(&m.set);
            let r = if ramp == Ramp::Linear {
                0
            } else {
                ramps.push(ramp);
                (ramps.len() - 1) as u32
            };
            for &n in &nodes {
                for i in 0..dim {
                    if let Some(v) = m.displacement[i] {
                        prescribed[n * dim + i] = true;
                        target[n * dim + i] = v;
                        turned[n * dim + i] = false;
                        ramp_of_dof[n * dim + i] = r;
                    }
                }
            }
            report.insert(m.set.clone(), nodes);
        }
        let mut arc_of_dof: Vec<u32> = turned.iter().map(|&h| if h { HOLD_AT_START } else { NO_ARC }).collect();
        for (k, m) in stage.rotations.iter().enumerate() {
            let nodes = mesh.nodes_of_set(&m.set).ok_or_else(|| unknown(&m.set))?;
            let ramp = ramp_for(&m.set);
            let r = if ramp == Ramp::Linear {
                0
            } else {
                ramps.push(ramp);
                (ramps.len() - 1) as u32
            };
            for &n in &nodes {
                for d in n * dim..(n + 1) * dim {
                    prescribed[d] = true;
                    arc_of_dof[d] = k as u32;
                    ramp_of_dof[d] = r;
                    turned[d] = true;
                }
            }
            report.insert(m.set.clone(), nodes);
        }
        inserts.mark_bonded(&mut prescribed);
        let before = pressures.clone();
        for p in &stage.pressures {
            if !mesh.side_sets.contains_key(&p.set) {
                return Err(if mesh.nodes_of_set(&p.set).is_some() {
                    SolveError::NotASideSet { stage: stage.name.clone(), name: p.set.clone() }
                } else {
                    unknown(&p.set)
                });
            }
            pressures.insert(p.set.clone(), p.value);
        }
        let pressure_programs = pressures
            .iter()
            .map(|(name, &end)| PressureProgram {
                name: name.clone(),
                sides: mesh.side_sets[name].clone(),
                start: before.get(name).copied().unwrap_or(0.0),
                end,
                ramp: ramp_for(name),
            })
            .collect();
        let forces_before = forces.clone();
        for f in &stage.forces {
            if mesh.nodes_of_set(&f.set).is_none() {
                return Err(unknown(&f.set));
            }
            forces.insert(f.set.clone(), f.total);
        }
        let body_before = body;
        if stage.body_force.is_some() {
            body = stage.body_force;
        }
        // Each changed load contributes its change with its own ramp.
        let mut dead_changes = Vec::new();
        for (name, total) in &forces {
            let old = forces_before.get(name).copied().unwrap_or([0.0; 3]);
            if old == *total {
                continue;
            }
            let delta = [total[0] - old[0], total[1] - old[1], total[2] - old[2]];
            let mut change = vec![0.0; ndof];
            if let Some(sides) = mesh.side_sets.get(name) {
                add_side_force(mesh, model.analysis, dim, sides, delta, &mut change);
            } else if let Some(nodes) = mesh.nodes_of_set(name) {
                add_node_force(dim, &nodes, delta, &mut change);
            }
            dead_changes.push((ramp_for(name), change));
        }
        if body != body_before {
            let (new, old) = (body.unwrap_or([0.0; 3]), body_before.unwrap_or([0.0; 3]));
            let mut change = vec![0.0; ndof];
            add_body_force(disc, [new[0] - old[0], new[1] - old[1], new[2] - old[2]], &mut change);
            dead_changes.push((ramp_for(BODY_FORCE_RAMP), change));
        }
        let mut dead = dead_prev.clone();
        for (_, change) in &dead_changes {
            for (d, c) in dead.iter_mut().zip(change) {
                *d += c;
            }
        }
        programs.push(StageProgram {
            prescribed: prescribed.clone(),
            target: target.clone(),
            ramp_of_dof,
            arc_of_dof,
            arcs: stage.rotations.clone(),
            ramps,
            pressures: pressure_programs,
            dead_start: std::mem::replace(&mut dead_prev, dead),
            dead_changes,
            released,
        });
    }
    Ok((programs, report))
}
