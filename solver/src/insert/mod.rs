//! Bonded rigid inserts (a pin, a sleeve, a plate): rigid-body constraints
//! with their own unknowns.
//!
//! An insert has generalized coordinates q = (t, θ): the translation t of its
//! reference point c and the rotation vector θ (see [`rotation`]). Each
//! bonded node moves exactly with it, `u_i = t + (R(θ) − I)(X_i − c)`, so its
//! dofs are eliminated from the sparse system (they are prescribed dofs of
//! the [`crate::assembly::DofMap`]). Components that a stage prescribes are
//! set from their ramp; components that a stage loads (or leaves free) are
//! unknowns, solved together with the free dofs by condensing them out of
//! the sparse system ([`condense`]): a few extra solves with the same
//! factorisation and one small dense solve.
//!
//! Equations of a loaded component j: the sum over bonded nodes of the
//! node residual r_i (the force the insert applies to the rubber) equals the
//! applied force, `Σ r_i − F = 0`; the moment about the current reference
//! point equals the applied moment, `Σ a_i × r_i − M = 0` with the arm
//! `a_i = R(X_i − c)`. Their exact linearisation is
//! `Wᵀ K J dq + H dq` with the node directions `J_k = ∂u/∂q_k`, the equation
//! weights `W_j` (e_j, or e_j × a_i for a moment) and the arm term
//! `H_jk = Σ (e_j × ∂a_i/∂θ_k)·r_i`: Newton converges quadratically whether
//! a component is force- or moment-driven.

pub mod rotation;

use crate::assembly::Discretization;
use crate::element::Analysis;
use crate::model::{InsertDrive, Ramp, Stage};
use rotation::{apply, cross, rotation_with_derivatives, Mat3};
use thiserror::Error;

/// Component names in model order (translations, then the rotation vector).
pub const COMPONENTS: [&str; 6] = ["x", "y", "z", "rx", "ry", "rz"];

/// What a component does during the current stage.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Mode {
    /// Position ramped from `from` to `to` (equal when held).
    Move { from: f64, to: f64 },
    /// Applied load ramped from `from` to `to`; the component is an unknown.
    Load { from: f64, to: f64 },
}

/// One insert's state.
#[derive(Debug, Clone)]
pub struct Body {
    /// Name of the insert.
    pub name: String,
    nodes: Vec<usize>,
    /// Reference position of every bonded node relative to the reference point.
    arms: Vec<[f64; 3]>,
    /// Components that exist in the analysis.
    active: [bool; 6],
    mode: [Mode; 6],
    ramp: Ramp,
    /// Current coordinates, those at the start of the Newton step, and the converged ones.
    q: [f64; 6],
    q_base: [f64; 6],
    q_converged: [f64; 6],
    /// Length that turns a moment residual into a force (RMS arm, at least 1e-12).
    length: f64,
    rot: Mat3,
    drot: [Mat3; 3],
    /// Σ r_i and Σ a_i × r_i at the last evaluation (what the insert applies to the rubber).
    applied: [f64; 6],
}

/// What one insert reports for a converged increment.
#[derive(Debug, Clone, PartialEq)]
pub struct InsertResult {
    /// Name of the insert.
    pub name: String,
    /// Translation of the reference point (length units).
    pub displacement: [f64; 3],
    /// Rotation vector (radians).
    pub rotation: [f64; 3],
    /// Force the rubber exerts on the insert (axisymmetric: over the full 2π).
    pub force: [f64; 3],
    /// Moment the rubber exerts on the insert about its (moved) reference point.
    pub moment: [f64; 3],
}

/// Every insert of a model, and the dofs they own.
#[derive(Debug, Clone, Default)]
pub struct Inserts {
    /// The inserts, in model order.
    pub bodies: Vec<Body>,
    dim: usize,
    ndof: usize,
}

/// Components that exist in an analysis.
pub fn active_components(analysis: Analysis) -> [bool; 6] {
    match analysis {
        Analysis::Solid3d => [true; 6],
        Analysis::PlaneStrain { .. } => [true, true, false, false, false, true],
        Analysis::Axisymmetric => [false, true, false, false, false, false],
    }
}

/// Why the inserts cannot be set up or driven.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum InsertError {
    /// An insert names a set the mesh does not have.
    #[error("insert `{insert}`: no node, side or element set named `{set}`")]
    UnknownSet {
        /// Name of the insert.
        insert: String,
        /// The set it names.
        set: String,
    },
    /// An insert that cannot be bonded (an empty set, a node shared with another insert).
    #[error("insert `{insert}`: {reason}")]
    Bad {
        /// Name of the insert.
        insert: String,
        /// What is wrong with it.
        reason: String,
    },
    /// The condensed insert equations are singular.
    #[error("insert equations are singular (is a free insert component held by nothing?)")]
    Singular,
}

impl Inserts {
    /// Resolves the inserts' node sets. A node bonded to two inserts is an error.
    pub fn new(disc: &Discretization) -> Result<Self, InsertError> {
        let model = disc.model;
        let mesh = disc.mesh();
        let dim = disc.dim;
        let active = active_components(model.analysis);
        let mut owner: Vec<Option<usize>> = vec![None; mesh.node_count()];
        let mut bodies = Vec::new();
        for (b, ins) in model.inserts.iter().enumerate() {
            let nodes =
                mesh.nodes_of_set(&ins.set).ok_or_else(|| InsertError::UnknownSet { insert: ins.name.clone(), set: ins.set.clone() })?;
            if nodes.is_empty() {
                return Err(InsertError::Bad { insert: ins.name.clone(), reason: format!("set `{}` has no nodes", ins.set) });
            }
            for &n in &nodes {
                if let Some(other) = owner[n] {
                    return Err(InsertError::Bad {
                        insert: ins.name.clone(),
                        reason: format!("node {n} is also bonded to insert `{}`", model.inserts[other].name),
                    });
                }
                owner[n] = Some(b);
            }
            let arms: Vec<[f64; 3]> = nodes
                .iter()
                .map(|&n| {
                    let x = mesh.nodes[n];
                    [x[0] - ins.reference[0], x[1] - ins.reference[1], x[2] - ins.reference[2]]
                })
                .collect();
            let rms = (arms.iter().map(|a| a[0] * a[0] + a[1] * a[1] + a[2] * a[2]).sum::<f64>() / arms.len() as f64).sqrt();
            let mut mode = [Mode::Move { from: 0.0, to: 0.0 }; 6];
            for k in 0..6 {
                if ins.free[k] && active[k] {
                    mode[k] = Mode::Load { from: 0.0, to: 0.0 };
                }
            }
            let (rot, drot) = rotation_with_derivatives([0.0; 3]);
            bodies.push(Body {
                name: ins.name.clone(),
                nodes,
                arms,
                active,
                mode,
                ramp: Ramp::Linear,
                q: [0.0; 6],
                q_base: [0.0; 6],
                q_converged: [0.0; 6],
                length: rms.max(1e-12),
                rot,
                drot,
                applied: [0.0; 6],
            });
        }
        Ok(Inserts { bodies, dim, ndof: disc.dof_count() })
    }

    /// Whether the model has no insert.
    pub fn is_empty(&self) -> bool {
        self.bodies.is_empty()
    }

    /// Marks every bonded node dof as prescribed (eliminated from the sparse system).
    pub fn mark_bonded(&self, prescribed: &mut [bool]) {
        for b in &self.bodies {
            for &n in &b.nodes {
                prescribed[n * self.dim..(n + 1) * self.dim].iter_mut().for_each(|p| *p = true);
            }
        }
    }

    /// Sets the component modes of a stage: named components start from the
    /// converged state; the others keep their previous position or load.
    pub fn begin_stage(&mut self, stage: &Stage) {
        for b in &mut self.bodies {
            b.ramp = stage.ramps.get(&b.name).cloned().unwrap_or_default();
            let drives = stage.inserts.iter().filter(|s| s.insert == b.name);
            let mut next = b.mode.map(|m| match m {
                Mode::Move { to, .. } => Mode::Move { from: to, to },
                Mode::Load { to, .. } => Mode::Load { from: to, to },
            });
            for (k, m) in next.iter_mut().enumerate() {
                if let Mode::Move { from, to } = m {
                    // Held components sit where the last stage left them.
                    *from = b.q_converged[k];
                    *to = b.q_converged[k];
                }
            }
            for d in drives {
                for k in 0..6 {
                    match d.components[k] {
                        Some(InsertDrive::Move(v)) => next[k] = Mode::Move { from: b.q_converged[k], to: v },
                        Some(InsertDrive::Load(v)) => {
                            let from = match b.mode[k] {
                                Mode::Load { to, .. } => to,
                                Mode::Move { .. } => 0.0,
                            };
                            next[k] = Mode::Load { from, to: v };
                        }
                        None => {}
                    }
                }
            }
            b.mode = next;
        }
    }

    /// Number of unknown components in the current stage.
    pub fn unknowns(&self) -> usize {
        self.bodies.iter().map(|b| b.unknown_components().count()).sum()
    }

    /// Prescribed components at stage fraction `t` (free ones untouched), and
    /// the bonded nodes' displacements into `u`.
    pub fn prescribe(&mut self, t: f64, u: &mut [f64]) {
        for b in &mut self.bodies {
            let a = b.ramp.fraction(t);
            for k in 0..6 {
                if let Mode::Move { from, to } = b.mode[k] {
                    b.q[k] = from + a * (to - from);
                }
            }
            b.update(self.dim, u);
        }
    }

    /// Equation residuals of the unknown components at stage fraction `t`
    /// from the node residuals `r` (moments divided by the insert's length,
    /// so they compare with forces), appended to `g`.
    pub fn residual(&mut self, r: &[f64], t: f64, g: &mut Vec<f64>) {
        g.clear();
        let dim = self.dim;
        for b in &mut self.bodies {
            let mut sum = [0.0; 6];
            for (&n, arm) in b.nodes.iter().zip(&b.arms) {
                let mut ri = [0.0; 3];
                ri[..dim].copy_from_slice(&r[n * dim..n * dim + dim]);
                let a = apply(&b.rot, *arm);
                let m = cross(a, ri);
                for i in 0..3 {
                    sum[i] += ri[i];
                    sum[3 + i] += m[i];
                }
            }
            b.applied = sum;
            let frac = b.ramp.fraction(t);
            for k in b.unknown_components().collect::<Vec<_>>() {
                let Mode::Load { from, to } = b.mode[k] else { unreachable!() };
                g.push(sum[k] - (from + frac * (to - from)));
            }
        }
    }

    /// Scale of each unknown's equation (1 for forces, 1/length for moments):
    /// residual norms use `g_j · scale_j`.
    pub fn scales(&self) -> Vec<f64> {
        self.bodies.iter().flat_map(|b| b.unknown_components().map(move |k| if k < 3 { 1.0 } else { 1.0 / b.length })).collect()
    }

    /// The node directions `J_k = ∂u/∂q_k` and equation weights `W_j` of the
    /// unknowns, each a global vector (nonzero at bonded dofs only), into
    /// `j` and `w` (length unknowns × dofs).
    pub fn directions(&self, j: &mut Vec<f64>, w: &mut Vec<f64>) {
        let m = self.unknowns();
        let (dim, ndof) = (self.dim, self.ndof);
        j.clear();
        j.resize(m * ndof, 0.0);
        w.clear();
        w.resize(m * ndof, 0.0);
        let mut col = 0;
        for b in &self.bodies {
            for k in b.unknown_components().collect::<Vec<_>>() {
                for (&n, arm) in b.nodes.iter().zip(&b.arms) {
                    let (jk, wk) = b.node_direction(k, *arm);
                    for i in 0..dim {
                        j[col * ndof + n * dim + i] = jk[i];
                        w[col * ndof + n * dim + i] = wk[i];
                    }
                }
                col += 1;
            }
        }
    }

    /// The arm term `H_jk = Σ (e_j × ∂a_i/∂θ_k)·r_i` of the unknowns (row-major m × m).
    pub fn arm_stiffness(&self, r: &[f64]) -> Vec<f64> {
        let m = self.unknowns();
        let mut h = vec![0.0; m * m];
        let mut offset = 0;
        for b in &self.bodies {
            let comps: Vec<usize> = b.unknown_components().collect();
            for (rj, &j) in comps.iter().enumerate() {
                for (ck, &k) in comps.iter().enumerate() {
                    h[(offset + rj) * m + offset + ck] = b.arm_term(self.dim, j, k, r);
                }
            }
            offset += comps.len();
        }
        h
    }

    /// The arm term `H_jk` of components `j` and `k` of insert `body` with
    /// the node forces `r` (zero unless both are rotations).
    pub fn arm_term(&self, body: usize, j: usize, k: usize, r: &[f64]) -> f64 {
        self.bodies[body].arm_term(self.dim, j, k, r)
    }

    /// Whether component `k` of insert `body` exists in the analysis and is
    /// loaded (an unknown) in the current stage.
    pub fn is_loaded(&self, body: usize, k: usize) -> bool {
        self.bodies[body].unknown_components().any(|c| c == k)
    }

    /// Whether component `k` exists in the analysis.
    pub fn is_active(&self, k: usize) -> bool {
        self.bodies.first().is_some_and(|b| b.active[k])
    }

    /// Adds `scale` times the node direction `J_k = ∂u/∂q_k` of component
    /// `k` of insert `body` (at its current rotation) to the global vector
    /// `j`, and `scale` times the equation weight `W_k` to `w`.
    pub fn add_component_vectors(&self, body: usize, k: usize, scale: f64, j: &mut [f64], w: &mut [f64]) {
        let b = &self.bodies[body];
        let dim = self.dim;
        for (&n, arm) in b.nodes.iter().zip(&b.arms) {
            let (jk, wk) = b.node_direction(k, *arm);
            for i in 0..dim {
                j[n * dim + i] += scale * jk[i];
                w[n * dim + i] += scale * wk[i];
            }
        }
    }

    /// Remembers the coordinates at the start of a Newton step.
    pub fn save_base(&mut self) {
        for b in &mut self.bodies {
            b.q_base = b.q;
        }
    }

    /// `q = q_base + s·dq` on the unknowns, and the bonded displacements into `u`.
    pub fn step(&mut self, dq: &[f64], s: f64, u: &mut [f64]) {
        let mut col = 0;
        for b in &mut self.bodies {
            for k in b.unknown_components().collect::<Vec<_>>() {
                b.q[k] = b.q_base[k] + s * dq[col];
                col += 1;
            }
            b.update(self.dim, u);
        }
    }

    /// Starts an increment from the converged coordinates.
    pub fn restore(&mut self) {
        for b in &mut self.bodies {
            b.q = b.q_converged;
        }
    }

    /// Accepts the current coordinates as converged.
    pub fn commit(&mut self) {
        for b in &mut self.bodies {
            b.q_converged = b.q;
        }
    }

    /// The converged state of every insert (call after [`Inserts::residual`]).
    pub fn results(&self) -> Vec<InsertResult> {
        self.bodies
            .iter()
            .map(|b| InsertResult {
                name: b.name.clone(),
                displacement: [b.q[0], b.q[1], b.q[2]],
                rotation: [b.q[3], b.q[4], b.q[5]],
                force: [-b.applied[0], -b.applied[1], -b.applied[2]],
                moment: [-b.applied[3], -b.applied[4], -b.applied[5]],
            })
            .collect()
    }
}

impl Body {
    /// `H_jk = Σ (e_j × ∂a_i/∂θ_k)·r_i`: zero unless j and k are rotations.
    fn arm_term(&self, dim: usize, j: usize, k: usize, r: &[f64]) -> f64 {
        if j < 3 || k < 3 {
            return 0.0;
        }
        let mut e = [0.0; 3];
        e[j - 3] = 1.0;
        let mut sum = 0.0;
        for (&n, arm) in self.nodes.iter().zip(&self.arms) {
            let c = cross(e, apply(&self.drot[k - 3], *arm));
            sum += (0..dim).map(|i| c[i] * r[n * dim + i]).sum::<f64>();
        }
        sum
    }

    fn unknown_components(&self) -> impl Iterator<Item = usize> + '_ {
        (0..6).filter(|&k| self.active[k] && matches!(self.mode[k], Mode::Load { .. }))
    }

    /// Rotation cache and bonded displacements from `q`.
    fn update(&mut self, dim: usize, u: &mut [f64]) {
        (self.rot, self.drot) = rotation_with_derivatives([self.q[3], self.q[4], self.q[5]]);
        for (&n, arm) in self.nodes.iter().zip(&self.arms) {
            let a = apply(&self.rot, *arm);
            for i in 0..dim {
                u[n * dim + i] = self.q[i] + a[i] - arm[i];
            }
        }
    }

    /// `∂u_i/∂q_k` and the equation weight of component k at a node with reference arm `arm`.
    fn node_direction(&self, k: usize, arm: [f64; 3]) -> ([f64; 3], [f64; 3]) {
        if k < 3 {
            let mut e = [0.0; 3];
            e[k] = 1.0;
            (e, e)
        } else {
            let mut e = [0.0; 3];
            e[k - 3] = 1.0;
            (apply(&self.drot[k - 3], arm), cross(e, apply(&self.rot, arm)))
        }
    }
}

/// Solves the Newton step with the insert unknowns condensed out.
///
/// On entry `du` holds `y = K_ff⁻¹ rhs` (the step with the inserts held);
/// `kj` and `kw` hold K·J_k and K·W_j at every dof, `g` the insert
/// residuals, `h` the arm term, `dup` the prescribed change of this
/// iteration. Returns dq and corrects `du` to `y − Σ X_k dq_k`, with
/// `X_k = K_ff⁻¹ (K J_k)_f` found by `solve` (whose error type `E` the
/// function returns; a singular insert system is [`InsertError::Singular`]).
#[allow(clippy::too_many_arguments)]
pub fn condense<E: From<InsertError>>(
    eq: &[usize],
    w: &[f64],
    kj: &[f64],
    kw: &[f64],
    g: &[f64],
    h: &[f64],
    dup: &[f64],
    du: &mut [f64],
    mut solve: impl FnMut(&mut [f64]) -> Result<(), E>,
) -> Result<Vec<f64>, E> {
    use crate::assembly::dofs::NONE;
    let m = g.len();
    let ndof = eq.len();
    let nf = du.len();
    let mut x = vec![0.0; m * nf];
    for k in 0..m {
        let xk = &mut x[k * nf..(k + 1) * nf];
        for d in 0..ndof {
            if eq[d] != NONE {
                xk[eq[d]] = kj[k * ndof + d];
            }
        }
        solve(xk)?;
    }
    let mut s = faer::Mat::<f64>::zeros(m, m);
    let mut rhs = faer::Mat::<f64>::zeros(m, 1);
    for r in 0..m {
        let (wr, kwr) = (&w[r * ndof..(r + 1) * ndof], &kw[r * ndof..(r + 1) * ndof]);
        let mut b = -g[r];
        for d in 0..ndof {
            if eq[d] == NONE {
                b -= kwr[d] * dup[d];
            } else {
                b -= kwr[d] * du[eq[d]];
            }
        }
        rhs[(r, 0)] = b;
        for c in 0..m {
            let kjc = &kj[c * ndof..(c + 1) * ndof];
            let xc = &x[c * nf..(c + 1) * nf];
            let mut v = h[r * m + c];
            for d in 0..ndof {
                if eq[d] == NONE {
                    v += wr[d] * kjc[d];
                } else {
                    v -= kwr[d] * xc[eq[d]];
                }
            }
            s[(r, c)] = v;
        }
    }
    use faer::linalg::solvers::Solve;
    let dq = s.partial_piv_lu().solve(&rhs);
    let dq: Vec<f64> = (0..m).map(|k| dq[(k, 0)]).collect();
    if dq.iter().any(|v| !v.is_finite()) {
        return Err(InsertError::Singular.into());
    }
    for k in 0..m {
        for (f, v) in du.iter_mut().enumerate() {
            *v -= x[k * nf + f] * dq[k];
        }
    }
    Ok(dq)
}
