//! Contact during a solve: every rigid body of the model with its rubber
//! side set, evaluated at each Newton iterate, with the augmented-Lagrangian
//! updates between solves and the history kept at converged increments.
//!
//! The contact tangent only couples the degrees of freedom of one node with
//! each other, so it fits in the node-diagonal blocks that the element
//! pattern already holds: no new sparse entries are needed. It is added
//! through the assembly's [`GlobalSystem`]: the symmetric part into the
//! lower-triangle tangent and, with friction, the skew part separately for
//! the non-symmetric factorization.

use nalgebra::{Matrix3, Vector3};

use super::bands::{bands, ContactBand};
use super::corner::CornerContacts;
use super::law::{ContactParameters, NodeState, Status};
use super::pair::{AreaMeasure, ContactPair, PairResponse};
use super::surface::{Placement, RigidSurface};
use crate::assembly::global::GlobalSystem;
use crate::assembly::Discretization;
use crate::element::Analysis;
use std::collections::BTreeMap;

use thiserror::Error;

use crate::model::{Ramp, RigidBody, RigidMotion};

/// Default normal penalty as a multiple of μ / h (common practice for
/// penalty contact: stiff against the rubber, not so stiff it spoils the
/// conditioning; the augmentation removes the remaining penetration).
pub const PENALTY_FACTOR: f64 = 50.0;

/// Stiffness β of the contact multipliers' Newton update, as a multiple of
/// each node's normal penalty (see `ContactPair::evaluate_into`): the
/// multiplier of a node touching at a Newton iterate is an unknown of the
/// step, with the constraint g + n·Δx = −Δλ/β, so each step closes the gap
/// to first order (the constraint's error falls as 1/β) and the
/// penetration falls with the residual instead of by augmentation between
/// solves. A node touching
/// only within the law's rounding (λ − ε g ≤ 0) is released by the step
/// instead (λ → 0). Measured on the seal examples (Newton iterations, face
/// seal / seal relaxation / radial seal / tri6 seal / O-ring up to its
/// stop): 0 (augmentation only) 159 / 157 / 177 / 112 / 1134; 100: 113 /
/// 128 / 183 / 115 / 258. With the activity test on λ − β g instead, 30:
/// 117 / 161 / 163 / 112 / 219; 100: 115 / 129 / 177 / 111 / 260; 300: 125 /
/// 127 / 183 / 112 / 263; with no release at all, the tri6 seal's first
/// increment cycled (121 at 100) while a node kept its multiplier held off.
pub const CONSTRAINT_STIFFNESS: f64 = 100.0;

/// Largest number of augmentation updates per increment.
pub const MAX_AUGMENTATIONS: usize = 12;

/// A rigid body that cannot be set up: a missing or empty side set, a bad
/// friction coefficient, penalty or tolerance, or a motion naming no body.
#[derive(Debug, Clone, PartialEq, Error)]
#[error("rigid body `{body}`: {reason}")]
pub struct ContactError {
    /// Name of the rigid body.
    pub body: String,
    /// What is wrong with it.
    pub reason: String,
}

/// One rigid body in contact during the run.
#[derive(Debug, Clone)]
struct Body {
    def: RigidBody,
    pair: ContactPair,
    /// Node states at the last converged increment.
    committed: Vec<NodeState>,
    /// Node states at the converged increment before it (the multiplier predictor's history).
    before: Vec<NodeState>,
    /// Penetration allowed, as a fraction of the local side size.
    tolerance: f64,
    /// Motion at the start and at the end of the current stage.
    from: RigidMotion,
    to: RigidMotion,
    /// How the motion is spread over the stage.
    ramp: Ramp,
    surface: RigidSurface,
    last: PairResponse,
    /// Convex corners of a 2-D profile against the rubber's edges.
    corners: CornerContacts,
}

/// Per-rigid-body figures of one converged increment.
#[derive(Debug, Clone, PartialEq)]
pub struct ContactSummary {
    /// Name of the rigid body.
    pub name: String,
    /// Total force of the rubber on the body (axisymmetric: over 2π).
    pub force: [f64; 3],
    /// Contact width (2-D: length of the touching band; 3-D: largest
    /// distance between touching nodes).
    pub contact_width: f64,
    /// Largest true contact pressure over the touching nodes (force per
    /// deformed tributary area; stress units).
    pub peak_pressure: f64,
    /// Largest penetration of a node into the surface (length units, ≥ 0).
    pub max_penetration: f64,
    /// Number of nodes in contact (stick or slip).
    pub touching_nodes: usize,
    /// The connected contact bands, numbered along the surface (see [`super::bands`]).
    pub bands: Vec<ContactBand>,
}

/// Nodal contact fields (every mesh node; zero where no contact).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct ContactFields {
    /// True contact pressure (force per tributary area of the deformed surface).
    pub pressure: Vec<f64>,
    /// Signed gap to the nearest rigid body (0 for nodes of no contact set).
    pub gap: Vec<f64>,
    /// Elastic slip distance from the stick anchor.
    pub slip: Vec<f64>,
    /// 0 open (or not a contact node), 1 stick, 2 slip.
    pub status: Vec<u8>,
}

/// All contact bodies of a model.
#[derive(Debug, Clone, Default)]
pub struct ActiveContacts {
    bodies: Vec<Body>,
    dim: usize,
}

fn rest(name: &str) -> RigidMotion {
    RigidMotion { body: name.to_string(), translation: [0.0; 3], rotation: 0.0 }
}

impl ActiveContacts {
    /// Sets up every rigid body: its rubber nodes, tributary areas and the
    /// default penalty from the neighbouring material.
    pub fn new(disc: &Discretization) -> Result<Self, ContactError> {
        let model = disc.model;
        let mesh = disc.mesh();
        let measure = match model.analysis {
            Analysis::Solid3d => AreaMeasure::Solid,
            Analysis::Axisymmetric => AreaMeasure::Axisymmetric,
            Analysis::PlaneStrain { thickness } => AreaMeasure::PlaneStrain { thickness },
        };
        let mut bodies = Vec::new();
        for def in &model.rigid {
            let bad = |reason: String| ContactError { body: def.name.clone(), reason };
            let sides = mesh.side_sets.get(&def.sides).ok_or_else(|| bad(format!("no side set named `{}`", def.sides)))?;
            if sides.is_empty() {
                return Err(bad(format!("side set `{}` is empty", def.sides)));
            }
            if !(def.friction >= 0.0 && def.friction.is_finite()) {
                return Err(bad(format!("friction coefficient {} must be ≥ 0", def.friction)));
            }
            // The stiffest neighbouring material sets the default penalty.
            let mu = sides.iter().map(|s| model.regions[disc.region_of[s.element]].material.shear_modulus()).fold(0.0, f64::max);
            if let Some(p) = def.normal_penalty {
                if !(p > 0.0 && p.is_finite()) {
                    return Err(bad(format!("normal penalty {p} must be positive")));
                }
            }
            if !(def.penetration_tolerance > 0.0) {
                return Err(bad(format!("penetration tolerance {} must be positive", def.penetration_tolerance)));
            }
            let params = ContactParameters {
                normal_penalty: 0.0,
                tangential_penalty: 0.0,
                friction: def.friction,
                smoothing: 0.0,
                slip_rounding: 0.0,
            }
            .checked()
            .map_err(|e| bad(e.to_string()))?;
            let mut pair = ContactPair::new(mesh, sides, measure, params);
            // Default: 50 μ / h with the local side size h, so the penalty
            // follows mesh grading and penetration scales with the element.
            for (eps, &h) in pair.penalties.iter_mut().zip(&pair.sizes) {
                *eps = def.normal_penalty.unwrap_or(PENALTY_FACTOR * mu / h);
            }
            let surface = RigidSurface { shape: def.shape.clone(), placement: Placement::default() };
            pair.anchor_initial_contacts(mesh, &surface);
            let committed = pair.states.clone();
            // The corners' penalty per unit ring length: the nodes' ε h, averaged.
            let line_penalty = pair.penalties.iter().zip(&pair.sizes).map(|(e, h)| e * h).sum::<f64>() / pair.nodes.len().max(1) as f64;
            let thickness = match model.analysis {
                Analysis::PlaneStrain { thickness } => Some(thickness),
                _ => None,
            };
            let corners = CornerContacts::new(mesh, sides, &def.shape, line_penalty, thickness);
            bodies.push(Body {
                surface,
                from: rest(&def.name),
                to: rest(&def.name),
                ramp: Ramp::Linear,
                tolerance: def.penetration_tolerance,
                def: def.clone(),
                pair,
                before: committed.clone(),
                committed,
                last: PairResponse::default(),
                corners,
            });
        }
        // Motions must name existing bodies.
        for stage in &model.stages {
            for m in &stage.rigid_motions {
                if !model.rigid.iter().any(|b| b.name == m.body) {
                    return Err(ContactError {
                        body: m.body.clone(),
                        reason: format!("stage `{}` moves a rigid body that does not exist", stage.name),
                    });
                }
            }
        }
        for b in &mut bodies {
            b.pair.constraint_factor = CONSTRAINT_STIFFNESS;
        }
        Ok(ActiveContacts { bodies, dim: disc.dim })
    }

    /// The surface of rigid body `name` where the last evaluation placed it.
    pub fn surface(&self, name: &str) -> Option<&RigidSurface> {
        self.bodies.iter().find(|b| b.def.name == name).map(|b| &b.surface)
    }

    /// Whether the model has no rigid surface.
    pub fn is_empty(&self) -> bool {
        self.bodies.is_empty()
    }

    /// Whether any rigid surface has a non-zero friction coefficient.
    pub fn has_friction(&self) -> bool {
        self.bodies.iter().any(|b| b.def.friction > 0.0)
    }

    /// Starts a stage: bodies named by the stage move from where they are to
    /// the stage's target positions, along the stage's ramp of that name
    /// (linear when it has none).
    pub fn begin_stage(&mut self, motions: &[RigidMotion], ramps: &BTreeMap<String, Ramp>) {
        for b in &mut self.bodies {
            // A new stage loads differently: no prediction across its start.
            b.before.clone_from(&b.committed);
            b.from = b.to.clone();
            if let Some(m) = motions.iter().find(|m| m.body == b.def.name) {
                b.to = m.clone();
            }
            b.ramp = ramps.get(&b.def.name).cloned().unwrap_or_default();
        }
    }

    fn place(b: &mut Body, t: f64) {
        let f = b.ramp.fraction(t);
        let lerp = |a: f64, c: f64| a + f * (c - a);
        let tr = Vector3::new(
            lerp(b.from.translation[0], b.to.translation[0]),
            lerp(b.from.translation[1], b.to.translation[1]),
            lerp(b.from.translation[2], b.to.translation[2]),
        );
        b.surface.placement = Placement::new(
            tr,
            Vector3::from(b.def.rotation_axis),
            lerp(b.from.rotation, b.to.rotation),
            Vector3::from(b.def.rotation_center),
        );
    }

    /// Evaluates contact at displacement `u` and stage fraction `t`, adding
    /// the contact forces, the node-diagonal tangent blocks (their skew
    /// part with friction) and the predictor term to `system`.
    pub fn evaluate(&mut self, mesh_nodes: &[[f64; 3]], u: &[f64], t: f64, system: &mut GlobalSystem) {
        let dim = self.dim;
        let position = |n: usize| {
            let mut x = Vector3::from(mesh_nodes[n]);
            for i in 0..dim {
                x[i] += u[n * dim + i];
            }
            x
        };
        let want_k = system.wants_stiffness();
        let mut block = [0.0; 9];
        for b in &mut self.bodies {
            Self::place(b, t);
            b.pair.evaluate_into(&b.surface, position, &mut b.last, want_k);
            for (&node, r) in b.pair.nodes.iter().zip(&b.last.nodes) {
                if r.status == Status::Open {
                    continue;
                }
                let gdofs = [node * dim, node * dim + 1, node * dim + 2];
                system.add_force(&gdofs[..dim], &r.force.as_slice()[..dim]);
                if want_k {
                    let km: &Matrix3<f64> = &r.stiffness;
                    for c in 0..dim {
                        for rr in 0..dim {
                            block[c * dim + rr] = km[(rr, c)];
                        }
                    }
                    system.add_stiffness(&gdofs[..dim], &block[..dim * dim], true);
                }
            }
            b.corners.evaluate(&b.surface, position);
            for hit in &b.corners.hits {
                let [na, nb] = hit.nodes;
                let gdofs = [na * 2, na * 2 + 1, nb * 2, nb * 2 + 1];
                system.add_force(&gdofs, hit.nodal_force.as_slice());
                b.last.surface_force -= Vector3::new(hit.nodal_force[0] + hit.nodal_force[2], hit.nodal_force[1] + hit.nodal_force[3], 0.0);
                if want_k {
                    system.add_stiffness(&gdofs, hit.stiffness.as_slice(), true);
                }
            }
        }
    }

    /// Turns the multipliers' Newton update on (the default) or off (the
    /// tangent is then the plain law's, for drivers that step the
    /// displacements themselves or linearize about a converged state).
    pub fn set_newton_multipliers(&mut self, on: bool) {
        for b in &mut self.bodies {
            b.pair.constraint_factor = if on { CONSTRAINT_STIFFNESS } else { 0.0 };
            b.pair.forget_linearizations();
        }
    }

    /// The forces that close the gaps of touching nodes in the next Newton
    /// step, from where the last tangent was built: `add(global dof, force)`
    /// for the right-hand side only (see [`ContactPair::evaluate_into`]).
    pub fn closing_forces(&self, mut add: impl FnMut(usize, f64)) {
        let dim = self.dim;
        for b in &self.bodies {
            for (&node, l) in b.pair.nodes.iter().zip(b.pair.linearizations()) {
                if let Some(l) = l {
                    for i in 0..dim {
                        add(node * dim + i, l.change_at_rest() * l.rate[i]);
                    }
                }
            }
        }
    }

    /// Moves the multipliers by their Newton update for a step that changes
    /// the displacement of global dof `d` by `change(d)` from where the last
    /// tangent was built.
    pub fn step_multipliers(&mut self, change: impl Fn(usize) -> f64) {
        let dim = self.dim;
        for b in &mut self.bodies {
            b.pair.step_multipliers(|node| {
                let mut dx = Vector3::zeros();
                for i in 0..dim {
                    dx[i] = change(node * dim + i);
                }
                dx
            });
        }
    }

    /// Whether some touching node penetrates more than its tolerance.
    pub fn needs_augmentation(&self) -> bool {
        self.bodies.iter().any(|b| {
            let (pen, tol) = b.pair.worst_penetration_ratio(&b.last, b.tolerance);
            let (corner, corner_tol) = b.corners.worst_penetration(b.tolerance);
            pen > tol || corner > corner_tol
        })
    }

    /// The largest penetration beyond tolerance: (penetration, its tolerance).
    pub fn worst_penetration(&self) -> (f64, f64) {
        self.bodies
            .iter()
            .flat_map(|b| [b.pair.worst_penetration_ratio(&b.last, b.tolerance), b.corners.worst_penetration(b.tolerance)])
            .max_by(|a, b| (a.0 / a.1.max(f64::MIN_POSITIVE)).total_cmp(&(b.0 / b.1.max(f64::MIN_POSITIVE))))
            .unwrap_or((0.0, 0.0))
    }

    /// Augmented-Lagrangian multiplier update from the last evaluation.
    pub fn augment(&mut self) {
        for b in &mut self.bodies {
            b.pair.augment(&b.last);
            b.corners.augment();
        }
    }

    /// Starts an increment whose displacement predictor moves the nodes by
    /// `ratio` times their last increment's motion (0: none): nodes that
    /// come into contact are anchored where that motion takes them to the
    /// surface (see [`ContactPair::anchor_approaches`]).
    pub fn anchor_approaches(&mut self, ratio: f64) {
        for b in &mut self.bodies {
            b.pair.anchor_approaches(&b.surface, ratio);
        }
    }

    /// Starts an increment `ratio` times as long as the last one: the
    /// nodes' multipliers extrapolated from the last two converged
    /// increments (see [`ContactPair::predict_multipliers`]).
    pub fn predict_multipliers(&mut self, ratio: f64) {
        for b in &mut self.bodies {
            b.pair.predict_multipliers(&b.before, ratio);
        }
    }

    /// Keeps the converged state (multipliers and stick anchors).
    pub fn commit(&mut self) {
        for b in &mut self.bodies {
            b.pair.commit(&b.surface, &b.last);
            b.before = std::mem::replace(&mut b.committed, b.pair.states.clone());
            b.corners.commit();
        }
    }

    /// Returns to the last converged state after a failed increment.
    pub fn restore(&mut self) {
        for b in &mut self.bodies {
            b.pair.states = b.committed.clone();
            b.pair.reset_updates();
            b.pair.forget_tangent_points();
            b.corners.restore();
        }
    }

    /// Per-body figures of the last evaluation.
    pub fn summaries(&self) -> Vec<ContactSummary> {
        self.bodies
            .iter()
            .map(|b| {
                let pressures = b.pair.true_pressures(&b.last);
                let touching = pressures.iter().zip(&b.last.nodes).filter(|(_, r)| r.status != Status::Open);
                ContactSummary {
                    name: b.def.name.clone(),
                    force: [b.last.surface_force.x, b.last.surface_force.y, b.last.surface_force.z],
                    contact_width: b.pair.contact_width(&b.last),
                    peak_pressure: touching.map(|(p, _)| *p).fold(0.0, f64::max),
                    max_penetration: b.last.max_penetration,
                    touching_nodes: b.last.nodes.iter().filter(|r| r.status != Status::Open).count(),
                    bands: bands(&b.pair, &b.last, &pressures, &b.surface),
                }
            })
            .collect()
    }

    /// Nodal fields of the last evaluation, over `node_count` mesh nodes.
    pub fn fields(&self, node_count: usize) -> ContactFields {
        let mut f = ContactFields {
            pressure: vec![0.0; node_count],
            gap: vec![0.0; node_count],
            slip: vec![0.0; node_count],
            status: vec![0; node_count],
        };
        let mut seen = vec![false; node_count];
        for b in &self.bodies {
            let pressures = b.pair.true_pressures(&b.last);
            for (k, &n) in b.pair.nodes.iter().enumerate() {
                let (Some(r), Some(&g), Some(&p)) = (b.last.nodes.get(k), b.last.gaps.get(k), pressures.get(k)) else { continue };
                let g = if g.is_finite() { g } else { 0.0 };
                // A node in several pairs reports the one pressing hardest (or the nearest if none does).
                if !seen[n] || p > f.pressure[n] || (f.pressure[n] == 0.0 && g < f.gap[n]) {
                    f.pressure[n] = p;
                    f.gap[n] = g;
                    f.slip[n] = r.slip.norm();
                    f.status[n] = match r.status {
                        Status::Open => 0,
                        Status::Stick => 1,
                        Status::Slip => 2,
                    };
                    seen[n] = true;
                }
            }
        }
        // A corner pressing into an edge: its force shared by the edge's
        // nodes as a pressure on their tributary areas.
        for b in &self.bodies {
            for hit in &b.corners.hits {
                for (n, share) in hit.nodes.into_iter().zip([1.0 - hit.xi, hit.xi]) {
                    let Ok(k) = b.pair.nodes.binary_search(&n) else { continue };
                    if b.pair.areas[k] > 0.0 && share > 0.0 {
                        f.pressure[n] += hit.force * share / b.pair.areas[k];
                        if f.status[n] == 0 {
                            f.status[n] = 2;
                        }
                    }
                }
            }
        }
        f
    }
}
