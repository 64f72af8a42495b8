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
use crate::model::{Ramp, RotationMotion, Stage, BODY_FORCE_RAMP};

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
    let mut state = Resolver::new(disc)?;
    let programs = disc.model.stages.iter().map(|stage| state.stage(stage)).collect::<Result<Vec<_>, _>>()?;
    Ok((programs, state.report))
}

/// What the stages resolved so far leave to the next one.
struct Resolver<'d> {
    disc: &'d Discretization<'d>,
    inserts: crate::insert::Inserts,
    /// Sets whose reactions are reported.
    report: ReportSets,
    prescribed: Vec<bool>,
    target: Vec<f64>,
    /// Pressure of every side set loaded so far.
    pressures: BTreeMap<String, f64>,
    /// Total force of every set loaded so far.
    forces: BTreeMap<String, [f64; 3]>,
    body: Option<[f64; 3]>,
    /// Dead load at the end of the last stage.
    dead: Vec<f64>,
    /// Dofs an earlier stage turned, or a support added after the first
    /// stage holds: held at their stage-start value until re-prescribed.
    turned: Vec<bool>,
    /// Stages resolved so far.
    resolved: usize,
}

/// The dofs' ramps of one stage: the ramps (index 0 linear) and each dof's.
struct DofRamps {
    ramps: Vec<Ramp>,
    of_dof: Vec<u32>,
}

impl DofRamps {
    /// The index of `ramp`, added unless linear.
    fn index(&mut self, ramp: Ramp) -> u32 {
        if ramp == Ramp::Linear {
            0
        } else {
            self.ramps.push(ramp);
            (self.ramps.len() - 1) as u32
        }
    }
}

impl<'d> Resolver<'d> {
    fn new(disc: &'d Discretization<'d>) -> Result<Self, SolveError> {
        let ndof = disc.dof_count();
        Ok(Resolver {
            disc,
            inserts: crate::insert::Inserts::new(disc)?,
            report: disc.mesh().node_sets.clone(),
            prescribed: vec![false; ndof],
            target: vec![0.0; ndof],
            pressures: BTreeMap::new(),
            forces: BTreeMap::new(),
            body: None,
            dead: vec![0.0; ndof],
            turned: vec![false; ndof],
            resolved: 0,
        })
    }

    /// The program of the next stage.
    fn stage(&mut self, stage: &Stage) -> Result<StageProgram, SolveError> {
        let model = self.disc.model;
        for drive in &stage.inserts {
            if !model.inserts.iter().any(|i| i.name == drive.insert) {
                return Err(SolveError::BadInsert {
                    insert: drive.insert.clone(),
                    reason: format!("stage `{}` drives an insert that does not exist", stage.name),
                });
            }
        }
        let ndof = self.prescribed.len();
        let mut ramps = DofRamps { ramps: vec![Ramp::Linear], of_dof: vec![0u32; ndof] };
        let released = self.release(stage)?;
        self.hold(stage)?;
        self.move_sets(stage, &mut ramps)?;
        let arc_of_dof = self.turn_sets(stage, &mut ramps)?;
        self.inserts.mark_bonded(&mut self.prescribed);
        let pressures = self.pressure_programs(stage)?;
        let dead_changes = self.dead_changes(stage)?;
        self.resolved += 1;
        let mut dead = self.dead.clone();
        for (_, change) in &dead_changes {
            for (d, c) in dead.iter_mut().zip(change) {
                *d += c;
            }
        }
        Ok(StageProgram {
            prescribed: self.prescribed.clone(),
            target: self.target.clone(),
            ramp_of_dof: ramps.of_dof,
            arc_of_dof,
            arcs: stage.rotations.clone(),
            ramps: ramps.ramps,
            pressures,
            dead_start: std::mem::replace(&mut self.dead, dead),
            dead_changes,
            released,
        })
    }

    /// The nodes of set `name`, or the stage's unknown-set error.
    fn nodes(&self, stage: &Stage, name: &str) -> Result<Vec<usize>, SolveError> {
        self.disc.mesh().nodes_of_set(name).ok_or_else(|| unknown_set(stage, name))
    }

    /// Lets go of the released dofs; returns those that were held.
    fn release(&mut self, stage: &Stage) -> Result<Vec<usize>, SolveError> {
        let dim = self.disc.dim;
        let mut released = Vec::new();
        for r in &stage.releases {
            for n in self.nodes(stage, &r.set)? {
                for i in (0..dim).filter(|&i| r.components[i]) {
                    let d = n * dim + i;
                    self.turned[d] = false;
                    if std::mem::replace(&mut self.prescribed[d], false) {
                        released.push(d);
                    }
                }
            }
        }
        Ok(released)
    }

    /// Holds the supported dofs: at zero in the first stage; a support that
    /// a later stage adds holds its dofs where they are at that stage's
    /// start (one listed again on dofs already held changes nothing).
    fn hold(&mut self, stage: &Stage) -> Result<(), SolveError> {
        let dim = self.disc.dim;
        let later = self.resolved > 0;
        for s in &stage.supports {
            let nodes = self.nodes(stage, &s.set)?;
            for &n in &nodes {
                for d in (0..dim).filter(|&i| s.components[i]).map(|i| n * dim + i) {
                    if later && self.prescribed[d] {
                        continue;
                    }
                    self.prescribed[d] = true;
                    self.target[d] = 0.0;
                    self.turned[d] = later;
                }
            }
            self.report.insert(s.set.clone(), nodes);
        }
        Ok(())
    }

    /// Prescribes the moved sets' displacements with their ramps.
    fn move_sets(&mut self, stage: &Stage, ramps: &mut DofRamps) -> Result<(), SolveError> {
        let dim = self.disc.dim;
        for m in &stage.motions {
            let nodes = self.nodes(stage, &m.set)?;
            if stage.harmonic.is_some() {
                // Amplitudes of the vibration, not positions: the static program holds.
                self.report.insert(m.set.clone(), nodes);
                continue;
            }
            let r = ramps.index(ramp_for(stage, &m.set));
            for &n in &nodes {
                for i in 0..dim {
                    if let Some(v) = m.displacement[i] {
                        let d = n * dim + i;
                        self.prescribed[d] = true;
                        self.target[d] = v;
                        self.turned[d] = false;
                        ramps.of_dof[d] = r;
                    }
                }
            }
            self.report.insert(m.set.clone(), nodes);
        }
        Ok(())
    }

    /// Prescribes the turned sets along their arcs; returns every dof's arc.
    fn turn_sets(&mut self, stage: &Stage, ramps: &mut DofRamps) -> Result<Vec<u32>, SolveError> {
        let dim = self.disc.dim;
        let mut arc_of_dof: Vec<u32> = self.turned.iter().map(|&h| if h { HOLD_AT_START } else { NO_ARC }).collect();
        for (k, m) in stage.rotations.iter().enumerate() {
            let nodes = self.nodes(stage, &m.set)?;
            let r = ramps.index(ramp_for(stage, &m.set));
            for &n in &nodes {
                for d in n * dim..(n + 1) * dim {
                    self.prescribed[d] = true;
                    arc_of_dof[d] = k as u32;
                    ramps.of_dof[d] = r;
                    self.turned[d] = true;
                }
            }
            self.report.insert(m.set.clone(), nodes);
        }
        Ok(arc_of_dof)
    }

    /// Every side set pressurised so far, from its pressure at the stage start to its new one.
    fn pressure_programs(&mut self, stage: &Stage) -> Result<Vec<PressureProgram>, SolveError> {
        let mesh = self.disc.mesh();
        let before = self.pressures.clone();
        for p in &stage.pressures {
            if !mesh.side_sets.contains_key(&p.set) {
                return Err(if mesh.nodes_of_set(&p.set).is_some() {
                    SolveError::NotASideSet { stage: stage.name.clone(), name: p.set.clone() }
                } else {
                    unknown_set(stage, &p.set)
                });
            }
            self.pressures.insert(p.set.clone(), p.value);
        }
        Ok(self
            .pressures
            .iter()
            .map(|(name, &end)| PressureProgram {
                name: name.clone(),
                sides: mesh.side_sets[name].clone(),
                start: before.get(name).copied().unwrap_or(0.0),
                end,
                ramp: ramp_for(stage, name),
            })
            .collect())
    }

    /// The changes of the dead load over the stage, each changed force and
    /// the body force with its own ramp.
    fn dead_changes(&mut self, stage: &Stage) -> Result<Vec<(Ramp, Vec<f64>)>, SolveError> {
        let (disc, mesh) = (self.disc, self.disc.mesh());
        let (dim, ndof) = (disc.dim, self.dead.len());
        let forces_before = self.forces.clone();
        for f in &stage.forces {
            self.nodes(stage, &f.set)?;
            self.forces.insert(f.set.clone(), f.total);
        }
        let body_before = self.body;
        if stage.body_force.is_some() {
            self.body = stage.body_force;
        }
        let mut dead_changes = Vec::new();
        for (name, total) in &self.forces {
            let old = forces_before.get(name).copied().unwrap_or([0.0; 3]);
            if old == *total {
                continue;
            }
            let delta = [total[0] - old[0], total[1] - old[1], total[2] - old[2]];
            let mut change = vec![0.0; ndof];
            if let Some(sides) = mesh.side_sets.get(name) {
                add_side_force(mesh, disc.model.analysis, dim, sides, delta, &mut change);
            } else if let Some(nodes) = mesh.nodes_of_set(name) {
                add_node_force(dim, &nodes, delta, &mut change);
            }
            dead_changes.push((ramp_for(stage, name), change));
        }
        if self.body != body_before {
            let (new, old) = (self.body.unwrap_or([0.0; 3]), body_before.unwrap_or([0.0; 3]));
            let mut change = vec![0.0; ndof];
            add_body_force(disc, [new[0] - old[0], new[1] - old[1], new[2] - old[2]], &mut change);
            dead_changes.push((ramp_for(stage, BODY_FORCE_RAMP), change));
        }
        Ok(dead_changes)
    }
}

/// The stage's ramp for set `set` (linear unless named).
fn ramp_for(stage: &Stage, set: &str) -> Ramp {
    stage.ramps.get(set).cloned().unwrap_or_default()
}

fn unknown_set(stage: &Stage, name: &str) -> SolveError {
    SolveError::UnknownSet { stage: stage.name.clone(), name: name.to_string() }
}
