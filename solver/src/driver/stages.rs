//! Resolves the stages of a model into dof-level load programs: which dofs
//! are prescribed and to what value at the end of each stage, the
//! pressurised sides with their start and end pressures, and the dead-load
//! vector at the end of each stage. Unknown set names are reported here,
//! before any work is done.

use std::collections::BTreeMap;

use olli_mesh::Side;

use crate::assembly::Discretization;
use crate::error::SolveError;
use crate::load::dead::{add_body_force, add_node_force, add_side_force};

/// One pressurised side set during a stage.
#[derive(Debug, Clone)]
pub struct PressureProgram {
    pub sides: Vec<Side>,
    pub start: f64,
    pub end: f64,
}

/// A stage as seen by the Newton driver.
#[derive(Debug, Clone)]
pub struct StageProgram {
    /// Prescribed flag of every global dof.
    pub prescribed: Vec<bool>,
    /// End-of-stage value of the prescribed dofs (others unused).
    pub target: Vec<f64>,
    /// Dofs whose target is set by this stage (others hold their value).
    pub driven: Vec<bool>,
    pub pressures: Vec<PressureProgram>,
    pub dead_start: Vec<f64>,
    pub dead_end: Vec<f64>,
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
    let mut programs = Vec::new();
    for stage in &model.stages {
        let unknown = |name: &str| SolveError::UnknownSet { stage: stage.name.clone(), name: name.to_string() };
        let mut driven = vec![false; ndof];
        for s in &stage.supports {
            let nodes = mesh.nodes_of_set(&s.set).ok_or_else(|| unknown(&s.set))?;
            for &n in &nodes {
                for i in 0..dim {
                    if s.components[i] {
                        prescribed[n * dim + i] = true;
                        target[n * dim + i] = 0.0;
                        driven[n * dim + i] = true;
                    }
                }
            }
            report.insert(s.set.clone(), nodes);
        }
        for m in &stage.motions {
            let nodes = mesh.nodes_of_set(&m.set).ok_or_else(|| unknown(&m.set))?;
            for &n in &nodes {
                for i in 0..dim {
                    if let Some(v) = m.displacement[i] {
                        prescribed[n * dim + i] = true;
                        target[n * dim + i] = v;
                        driven[n * dim + i] = true;
                    }
                }
            }
            report.insert(m.set.clone(), nodes);
        }
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
                sides: mesh.side_sets[name].clone(),
                start: before.get(name).copied().unwrap_or(0.0),
                end,
            })
            .collect();
        for f in &stage.forces {
            if mesh.nodes_of_set(&f.set).is_none() {
                return Err(unknown(&f.set));
            }
            forces.insert(f.set.clone(), f.total);
        }
        if stage.body_force.is_some() {
            body = stage.body_force;
        }
        let mut dead = vec![0.0; ndof];
        for (name, total) in &forces {
            if let Some(sides) = mesh.side_sets.get(name) {
                add_side_force(mesh, model.analysis, dim, sides, *total, &mut dead);
            } else if let Some(nodes) = mesh.nodes_of_set(name) {
                add_node_force(dim, &nodes, *total, &mut dead);
            }
        }
        if let Some(b) = body {
            add_body_force(disc, b, &mut dead);
        }
        programs.push(StageProgram {
            prescribed: prescribed.clone(),
            target: target.clone(),
            driven,
            pressures: pressure_programs,
            dead_start: std::mem::replace(&mut dead_prev, dead.clone()),
            dead_end: dead,
        });
    }
    Ok((programs, report))
}
