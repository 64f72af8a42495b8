//! Newton–Raphson for one load increment, on the free dofs.
//!
//! The first iteration starts from the last converged state (optionally
//! extrapolated from the previous increment: the displacements and the
//! mixed elements' carried pressure and dilatation alike, so the start is
//! consistent to second order in the step) and carries the change of the
//! prescribed displacements through the tangent (`K_ff du = −r − K_fp Δu_p`),
//! so a large prescribed step does not invert the elements next to a moving
//! face. Every correction is followed by a backtracking line search on
//! `G(s) = du·r(u + s du)`: if the step overshoots (`G` changes sign and
//! `|G(s)| > ½|G(0)|`), `s` is cut by linear interpolation of `G`.
//!
//! An increment on which plain Newton fails (diverges, inverts an element,
//! runs out of iterations) is tried once more with damped steps before the
//! driver cuts it back: pseudo-transient continuation, `(K + λ D) du = −r`
//! with D the stabilization spring weights and λ fading with the residual
//! (switched evolution relaxation). The damping enters the tangent only, so
//! a converged state is the undamped equilibrium. It reaches equilibria that
//! no smaller increment brings closer: a seal that breaks loose under fluid
//! pressure and slides to its groove wall.
//!
//! Convergence needs the out-of-balance force relative to the force scale
//! (norm of external plus reaction forces) below `force_tolerance`, and
//! either the correction's energy `|du·r|` relative to the first one below
//! `energy_tolerance` or its norm relative to the increment's displacement
//! below `displacement_tolerance`. Where the last correction misses both
//! but the force criterion holds, the energy of the next correction,
//! solved with the last factorization (no assembly, no factorization), may
//! meet it instead: with quadratic convergence that saves the correction
//! that would only confirm the equilibrium.
//!
//! With contact, the predictor also extrapolates the contact multipliers
//! from the last two increments, and near an equilibrium a frictional
//! increment updates them before it converges (see `augment_early`).
//! With fluids, the wetted front is found again at any iterate close to
//! equilibrium ([`FRONT_CHECK_RESIDUAL`]) and once more at convergence.
//!
//! A plain attempt whose residual stops falling (a cycle between contact
//! or friction states) hands over to the damped retry after
//! [`STALL_WINDOW`] corrections; damping acts in that retry alone.

use std::time::Instant;

use super::observer::{Event, Observer};
use super::stabilization::add_springs;
use super::stages::{arc_position, StageProgram, HOLD_AT_START, NO_ARC};
use crate::assembly::assembler::Outputs;
use crate::assembly::dofs::NONE;
use crate::assembly::global::{consolidate_skew, GlobalSystem};
use crate::assembly::{Assembler, Discretization, DofMap, MixedUnknowns, Pattern, PointHistories};
use crate::contact::active::{ActiveContacts, MAX_AUGMENTATIONS};
use crate::element::MixedState;
use crate::error::SolveError;
use crate::insert::{condense, Inserts};
use crate::linear::{FactorKind, LinearSolver, Reuse, SystemMatrix};
use crate::load::fluid::Fluids;
use crate::load::follower::add_pressure;
use crate::model::IncrementControls;
use crate::results::SolveStats;

/// Forcing factor of a Newton system solved on a kept factor: the Krylov
/// solve's relative residual is this times the relative out-of-balance
/// force (see `NewtonContext::reuse_for`).
pub const FORCING: f64 = 0.01;

/// Loosest relative residual of a Newton system solved on a kept factor
/// for the forcing term proper (the oversolving guard may ask less).
pub const MAX_FORCING: f64 = 1e-3;

/// [`MAX_FORCING`] where the model has contact. There an inexact step far
/// from equilibrium can carry a node across a contact or friction state
/// boundary that the exact step would not cross, which costs a correction
/// or more. Measured on the seal examples (Newton iterations at 1e-3 and
/// 1e-4, with the front found by [`FRONT_CHECK_RESIDUAL`]): face seal
/// 104 -> 96, radial seal 178 -> 169, tri6 face seal 115 -> 105, O-ring
/// 237 -> 212. Without contact the looser cap stays: on the
/// 156k-equation mount, 1e-4 took one factorization more (7 against 6,
/// 61.5 s against 57.3 s).
pub const MAX_FORCING_CONTACT: f64 = 1e-4;

/// Oversolving guard: a Newton system solved on a kept factor never needs a
/// linear error below this share of the force tolerance (Kelley 2003,
/// "Solving Nonlinear Equations with Newton's Method", SIAM, §3.2.3: the
/// forcing term is kept above 0.5 τ/‖F‖). Where Newton's own quadratic
/// term takes more than the other half, one cheap reused iteration more
/// follows; on the 156k-equation mount a tenth of the tolerance left three
/// such systems short of convergence in their Krylov budget, each then
/// factorized (9 factorizations against 7).
pub const OVERSOLVE_GUARD: f64 = 0.5;

/// Loosest relative residual the oversolving guard asks for.
pub const MAX_GUARDED_FORCING: f64 = 0.1;

/// Damping λ of the first damped step, as a multiple of the stabilization
/// spring weights at factor 1 (μ V / h² per node: about the stiffness an
/// element adds to its own nodes).
pub const INITIAL_DAMPING: f64 = 1.0;

/// Damping below which the steps are plain Newton again.
pub const DAMPING_OFF: f64 = 1e-6;

/// Largest damping (the steps then move little but always descend).
pub const MAX_DAMPING: f64 = 1e6;

/// Damped increments may take this many times the stage's Newton iterations.
pub const DAMPED_BUDGET: usize = 5;

/// Corrections over which a plain attempt must reduce its residual by
/// [`STALL_DECREASE`], else it hands over to the damped retry at once
/// instead of using up its iterations (the retry starts afresh, so this
/// saves iterations and changes no answer of an increment that would fail).
pub const STALL_WINDOW: usize = 4;

/// Least relative decrease of the residual over [`STALL_WINDOW`] corrections.
pub const STALL_DECREASE: f64 = 0.1;

/// Largest ratio of the last two residuals of an equilibrium solve at which
/// the contact multipliers may be updated before it converges (see
/// `NewtonContext::augment_early`): a tenfold decrease, Newton's quadratic
/// phase, where the contact states no longer change.
pub const EARLY_UPDATE_DECREASE: f64 = 0.1;

/// Relative out-of-balance force below which an iterate's contact pressures
/// already place the fluids' front: it is found again there, not only at a
/// converged equilibrium, and the iterations that converge the load take up
/// its move. A front found this way is checked again at the converged state
/// (`NewtonContext::settle`), so every converged increment has a front
/// consistent with its own contact pressures. On the face-seal example the
/// three moves of the front cost 5–6 corrections each when found only after
/// convergence (113 Newton iterations in 25 increments; checked from a
/// relative residual of 1e-3: 111, 1e-2: 108, 1e-1: 104 in 24 increments,
/// measured with the forcing of this build's predecessor).
pub const FRONT_CHECK_RESIDUAL: f64 = 0.1;

/// Result of one increment attempt.
#[derive(Debug)]
pub enum IncrementOutcome {
    /// The increment converged.
    Converged {
        /// Newton iterations it took.
        iterations: usize,
        /// Equilibrium solves after the first: contact multiplier updates
        /// and fluid-front moves.
        rebalances: usize,
        /// Relative out-of-balance force after each correction.
        residuals: Vec<f64>,
        /// Total strain energy at the converged state.
        energy: f64,
    },
    /// The increment failed; the driver cuts it back.
    Failed(SolveError),
}

/// The increment an attempt solves (for the observer's events).
#[derive(Debug, Clone, Copy)]
struct Attempt {
    stage: usize,
    increment: usize,
}

impl Attempt {
    /// This attempt after `iteration` Newton corrections.
    fn at(self, iteration: usize) -> IterationAt {
        IterationAt { stage: self.stage, increment: self.increment, iteration }
    }
}

/// An attempt after `iteration` Newton corrections.
#[derive(Debug, Clone, Copy)]
struct IterationAt {
    stage: usize,
    increment: usize,
    iteration: usize,
}

/// A solved Newton direction (`du` itself stays in the context).
#[derive(Debug, Clone, Copy)]
struct Direction {
    /// `G(0) = du·r` with the inserts' work (negative for a descent direction).
    g0: f64,
    /// The factorization that solved it.
    kind: FactorKind,
    /// Whether a line search may shorten the step.
    line_search: bool,
}

/// Where the Newton iterations of one increment attempt stand.
#[derive(Debug)]
struct IterationLog {
    /// Corrections so far.
    iterations: usize,
    /// Corrections allowed before the attempt fails (extended by each re-balance).
    budget: usize,
    /// Corrections allowed per equilibrium solve.
    per_solve: usize,
    /// Relative out-of-balance force after each correction.
    residuals: Vec<f64>,
    /// `|du·r|` of the first correction since the last (re-)balance.
    first_energy: Option<f64>,
    /// Free residual norm after the last correction.
    previous_residual: Option<f64>,
    /// Augmented-Lagrangian updates of the contact multipliers.
    augmentations: usize,
    /// Where the current equilibrium solve's residuals begin in `residuals`.
    solve_start: usize,
    /// Re-balances so far (equilibrium solves after the first).
    rebalances: usize,
    /// The current equilibrium solve began with an early multiplier update
    /// (see `NewtonContext::augment_early`).
    early_augmented: bool,
}

impl IterationLog {
    fn new(per_solve: usize) -> Self {
        IterationLog {
            iterations: 0,
            budget: per_solve,
            per_solve,
            residuals: Vec::new(),
            first_energy: None,
            previous_residual: None,
            augmentations: 0,
            solve_start: 0,
            rebalances: 0,
            early_augmented: false,
        }
    }

    /// Whether the current solve has stalled: its residual fell by less
    /// than [`STALL_DECREASE`] over the last [`STALL_WINDOW`] corrections
    /// (Newton caught in a cycle between contact or friction states).
    fn stalled(&self) -> bool {
        let r = &self.residuals[self.solve_start..];
        r.len() > STALL_WINDOW && r[r.len() - 1] >= (1.0 - STALL_DECREASE) * r[r.len() - 1 - STALL_WINDOW]
    }

    /// A new equilibrium solve at the same load: a fresh budget, energy
    /// reference and residual history (the residual jumps because the
    /// problem changed, not because the iteration diverges).
    fn rebalance(&mut self) {
        self.rebalances += 1;
        self.early_augmented = false;
        self.budget = self.iterations + self.per_solve;
        self.first_energy = None;
        self.previous_residual = None;
        self.solve_start = self.residuals.len();
    }
}

/// Buffers and references for the increments of one stage.
pub struct NewtonContext<'a> {
    disc: &'a Discretization<'a>,
    dofs: &'a DofMap,
    pattern: &'a Pattern,
    linear: &'a mut dyn LinearSolver,
    prog: &'a StageProgram,
    start: &'a [f64],
    controls: &'a IncrementControls,
    stage_name: &'a str,
    assembler: Assembler,
    f_int: Vec<f64>,
    f_ext: Vec<f64>,
    /// Internal minus external force at every dof after the last evaluation
    /// (at prescribed dofs: the reactions).
    pub residual: Vec<f64>,
    k: Vec<f64>,
    /// Skew-symmetric tangent entries (friction) of the last evaluation.
    skew: Vec<(usize, f64)>,
    rhs: Vec<f64>,
    du: Vec<f64>,
    dup: Vec<f64>,
    base: Vec<f64>,
    /// u where the last tangent was built (the contact multipliers' Newton
    /// update is measured from there).
    linearized_at: Vec<f64>,
    /// Displacement of the last converged increment (all dofs).
    pub last_converged: Vec<f64>,
    /// Rigid-surface contact (may hold no bodies).
    pub contacts: &'a mut ActiveContacts,
    /// Fluids whose wetted front follows the contact (none: no fluid).
    pub fluids: Option<&'a mut Fluids>,
    /// Smallest force scale: 1e-10 × the model's force unit μ·L² (see [`force_unit`]).
    force_floor: f64,
    /// Smallest force scale the round-off at the last evaluated state allows ([`super::roundoff`]).
    roundoff_floor: f64,
    /// Stabilization spring per dof (empty when the stage has none).
    stabilization: Vec<f64>,
    /// Element pressure/dilatation unknowns (three-field form; empty when condensed).
    pub mixed: MixedUnknowns,
    /// Bonded inserts (rigid-body constraints with their own unknowns).
    pub inserts: Inserts,
    /// History variables of the integration points, with the time step of
    /// the increment being solved (set by the stage loop).
    pub history: PointHistories,
    /// Bonded dofs (driven by the inserts).
    bonded: Vec<bool>,
    /// Insert node directions J then equation weights W (each unknowns × dofs),
    /// and the tangent times each of them.
    insert_vectors: Vec<f64>,
    insert_products: Vec<f64>,
    /// Insert equation residuals, their scales, and the last correction.
    insert_residual: Vec<f64>,
    insert_scales: Vec<f64>,
    dq: Vec<f64>,
    /// Linearised change of the bonded dofs per unit step (J·dq).
    bonded_direction: Vec<f64>,
    /// The tangent `k` belongs to the last evaluation (false after a
    /// residual-only one).
    tangent_fresh: bool,
    /// Pseudo-time damping of the Newton step: λ times [`Self::damping_weights`]
    /// added to the tangent's diagonal only (0: plain Newton).
    damping: f64,
    /// Damping weight per dof (the stabilization springs' weights at factor 1),
    /// built the first time an increment needs damped steps.
    damping_weights: Vec<f64>,
    /// The attempt under way is the damped retry of a failed increment (the
    /// only one whose damping may change).
    retrying: bool,
    /// The next correction as the last factorization gives it (convergence check).
    probe: Vec<f64>,
}

/// A force characteristic of the model: the largest shear modulus times
/// the square of the mesh's bounding-box diagonal (per unit thickness in
/// plane strain, over the full ring when axisymmetric).
pub fn force_unit(disc: &Discretization) -> f64 {
    let model = disc.model;
    let mu = model.regions.iter().map(|r| r.material.shear_modulus()).fold(0.0, f64::max);
    let (lo, hi) = model.mesh.bounding_box();
    let l = ((hi[0] - lo[0]).powi(2) + (hi[1] - lo[1]).powi(2) + (hi[2] - lo[2]).powi(2)).sqrt();
    let unit = match model.analysis {
        crate::element::Analysis::Solid3d => mu * l * l,
        crate::element::Analysis::PlaneStrain { thickness } => mu * l * thickness,
        crate::element::Analysis::Axisymmetric => mu * l * std::f64::consts::TAU * hi[0].abs().max(l),
    };
    if unit.is_finite() && unit > 0.0 {
        unit
    } else {
        1.0
    }
}

impl<'a> NewtonContext<'a> {
    /// Binds the solver state of one stage (discretization, dofs, loads, contact) for its increments.
    #[allow(clippy::too_many_arguments)]
    pub fn new(
        disc: &'a Discretization<'a>,
        dofs: &'a DofMap,
        pattern: &'a Pattern,
        linear: &'a mut dyn LinearSolver,
        prog: &'a StageProgram,
        start: &'a [f64],
        controls: &'a IncrementControls,
        stage_name: &'a str,
        contacts: &'a mut ActiveContacts,
    ) -> Self {
        let ndof = start.len();
        NewtonContext {
            disc,
            dofs,
            pattern,
            linear,
            prog,
            start,
            controls,
            stage_name,
            assembler: Assembler::new(),
            f_int: vec![0.0; ndof],
            f_ext: vec![0.0; ndof],
            residual: vec![0.0; ndof],
            k: vec![0.0; pattern.nnz()],
            skew: Vec::new(),
            rhs: vec![0.0; dofs.n_free],
            du: vec![0.0; dofs.n_free],
            dup: vec![0.0; ndof],
            base: vec![0.0; ndof],
            linearized_at: vec![0.0; ndof],
            last_converged: start.to_vec(),
            force_floor: 1e-10 * force_unit(disc),
            roundoff_floor: 0.0,
            stabilization: if controls.stabilization > 0.0 {
                super::stabilization::dof_weights(disc, controls.stabilization)
            } else {
                Vec::new()
            },
            contacts,
            fluids: None,
            mixed: MixedUnknowns::default(),
            inserts: Inserts::default(),
            history: PointHistories::default(),
            bonded: vec![false; ndof],
            insert_vectors: Vec::new(),
            insert_products: Vec::new(),
            insert_residual: Vec::new(),
            insert_scales: Vec::new(),
            dq: Vec::new(),
            bonded_direction: vec![0.0; ndof],
            tangent_fresh: false,
            damping: 0.0,
            damping_weights: Vec::new(),
            retrying: false,
            probe: vec![0.0; dofs.n_free],
        }
    }

    /// The numbering of the equations.
    pub fn dofs(&self) -> &DofMap {
        self.dofs
    }

    /// Drives bonded inserts (their stage already begun).
    pub fn with_inserts(mut self, inserts: Inserts) -> Self {
        self.bonded.fill(false);
        inserts.mark_bonded(&mut self.bonded);
        self.insert_scales = inserts.scales();
        self.inserts = inserts;
        self
    }

    /// Starts from carried element states (from the previous stage).
    pub fn with_states(mut self, states: Vec<MixedState>) -> Self {
        self.mixed = MixedUnknowns::new(states);
        self
    }

    /// Carries the history variables of materials with memory.
    pub fn with_history(mut self, history: PointHistories) -> Self {
        self.history = history;
        self
    }

    /// Loads the wetted facets of these fluids.
    pub fn with_fluids(mut self, fluids: &'a mut Fluids) -> Self {
        if !fluids.is_empty() {
            self.fluids = Some(fluids);
        }
        self
    }

    /// Value of prescribed dof `d` at stage fraction `t`: ramped towards its
    /// target, along its set's arc, or held at its stage-start value.
    fn prescribed_at(&self, t: f64, d: usize) -> f64 {
        let a = self.prog.ramps[self.prog.ramp_of_dof[d] as usize].fraction(t);
        match self.prog.arc_of_dof[d] {
            NO_ARC => self.start[d] + a * (self.prog.target[d] - self.start[d]),
            HOLD_AT_START => self.start[d],
            k => {
                let dim = self.dofs.dim;
                let (n, i) = (d / dim, d % dim);
                let node = self.disc.mesh().nodes[n];
                let mut x0 = [0.0; 3];
                for c in 0..dim {
                    x0[c] = node[c] + self.start[n * dim + c];
                }
                arc_position(&self.prog.arcs[k as usize], a, x0)[i] - node[i]
            }
        }
    }

    /// Residual (and tangent, and the right-hand side `−r_f − K_fp Δu_p`) at `u`.
    fn evaluate(&mut self, u: &[f64], t: f64, want_k: bool, predict: bool, stats: &mut SolveStats) -> Result<f64, SolveError> {
        let clock = Instant::now();
        self.prog.dead_at(t, &mut self.f_ext);
        self.rhs.fill(0.0);
        let coupled = want_k && self.inserts.unknowns() > 0;
        if coupled {
            let (mut j, mut w) = (Vec::new(), Vec::new());
            self.inserts.directions(&mut j, &mut w);
            j.extend_from_slice(&w);
            self.insert_vectors = j;
            self.insert_products.resize(self.insert_vectors.len(), 0.0);
        }
        let energy = self.assembler.assemble(
            self.disc,
            self.dofs,
            self.pattern,
            u,
            Outputs {
                internal: &mut self.f_int,
                tangent: if want_k { Some(&mut self.k) } else { None },
                predictor: if predict { Some((&self.dup, &mut self.rhs)) } else { None },
                mixed: if self.mixed.is_empty() { None } else { Some(&mut self.mixed.current) },
                products: if coupled { Some((&self.insert_vectors, &mut self.insert_products)) } else { None },
                history: Some(&mut self.history),
            },
        );
        let energy = match energy {
            Ok(e) => e,
            Err(e) => {
                stats.assembly_time += clock.elapsed().as_secs_f64();
                return Err(e.into());
            }
        };
        let mesh = self.disc.mesh();
        self.skew.clear();
        let mut system = GlobalSystem {
            dofs: self.dofs,
            pattern: self.pattern,
            external: &mut self.f_ext,
            tangent: if want_k { Some(&mut self.k) } else { None },
            skew: Some(&mut self.skew),
            predictor: if predict { Some((&self.dup, &mut self.rhs)) } else { None },
        };
        for prog in &self.prog.pressures {
            let p = prog.start + prog.ramp.fraction(t) * (prog.end - prog.start);
            add_pressure(mesh, self.disc.model.analysis, &prog.sides, p, u, &mut system);
        }
        if !self.contacts.is_empty() {
            self.contacts.evaluate(&mesh.nodes, u, t, &mut system);
        }
        if let Some(fluids) = self.fluids.as_deref() {
            fluids.add_loads(&mesh.nodes, u, t, &mut system);
        }
        // Stabilization springs to the last converged state (free dofs only).
        add_springs(&self.stabilization, u, &self.last_converged, &mut system);
        consolidate_skew(&mut self.skew);
        let mut finite = true;
        for d in 0..self.residual.len() {
            let r = self.f_int[d] - self.f_ext[d];
            finite &= r.is_finite();
            self.residual[d] = r;
            let q = self.dofs.eq[d];
            if q != NONE {
                self.rhs[q] -= r;
            }
        }
        if want_k {
            self.linearized_at.copy_from_slice(u);
            let (eq, rhs) = (&self.dofs.eq, &mut self.rhs);
            self.contacts.closing_forces(|d, f| {
                if eq[d] != NONE {
                    rhs[eq[d]] += f;
                }
            });
        }
        if !self.inserts.is_empty() {
            self.inserts.residual(&self.residual, t, &mut self.insert_residual);
            finite &= self.insert_residual.iter().all(|g| g.is_finite());
        }
        stats.assembly_time += clock.elapsed().as_secs_f64();
        stats.assemblies += 1;
        self.tangent_fresh = want_k;
        self.roundoff_floor = super::roundoff::floor(self.disc, self.dofs, u, self.controls.force_tolerance);
        if !finite {
            return Err(SolveError::NonFiniteResidual);
        }
        Ok(energy)
    }

    /// The stabilization springs' force at displacement `u` relative to the
    /// force scale of the problem: how much of the answer they carry (0
    /// without stabilization).
    pub fn stabilization_share(&self, u: &[f64]) -> f64 {
        if self.stabilization.is_empty() {
            return 0.0;
        }
        let f2: f64 = self
            .stabilization
            .iter()
            .enumerate()
            .filter(|&(d, _)| self.dofs.eq[d] != NONE)
            .map(|(d, &w)| (w * (u[d] - self.last_converged[d])).powi(2))
            .sum();
        f2.sqrt() / self.force_scale()
    }

    fn force_scale(&self) -> f64 {
        let (mut ext, mut reac, mut int) = (0.0, 0.0, 0.0);
        for d in 0..self.residual.len() {
            ext += self.f_ext[d] * self.f_ext[d];
            int += self.f_int[d] * self.f_int[d];
            if self.dofs.eq[d] == NONE {
                reac += self.residual[d] * self.residual[d];
            }
        }
        let s = ext.sqrt().max(reac.sqrt());
        let s = if s > 0.0 {
            s
        } else if int > 0.0 {
            int.sqrt()
        } else {
            1.0
        };
        // When every load vanishes (a seal released, a plate moved back) the
        // scale would vanish with it; the model's own force unit bounds it below.
        s.max(self.force_floor).max(self.roundoff_floor)
    }

    fn free_residual_norm(&self) -> f64 {
        let free: f64 = self.residual.iter().zip(&self.dofs.eq).filter(|(_, q)| **q != NONE).map(|(r, _)| r * r).sum();
        let inserts: f64 = self.insert_residual.iter().zip(&self.insert_scales).map(|(g, s)| (g * s).powi(2)).sum();
        (free + inserts).sqrt()
    }

    /// Condenses the insert unknowns out of the Newton step: `du` (solved
    /// with the inserts held) is corrected, the insert step kept in `dq` and
    /// its bonded-dof direction in `bonded_direction`. The prescribed change
    /// `dup` belongs to the first iteration only. Returns `dq·g`.
    fn couple_inserts(&mut self, first: bool) -> Result<f64, SolveError> {
        let m = self.insert_residual.len();
        self.dq.clear();
        self.bonded_direction.fill(0.0);
        if m == 0 {
            return Ok(0.0);
        }
        let ndof = self.residual.len();
        let h = self.inserts.arm_stiffness(&self.residual);
        let (j, w) = self.insert_vectors.split_at(m * ndof);
        let (kj, kw) = self.insert_products.split_at(m * ndof);
        let linear = &mut *self.linear;
        let none = vec![0.0; if first { 0 } else { ndof }];
        let dup = if first { &self.dup } else { &none };
        self.dq = condense(&self.dofs.eq, w, kj, kw, &self.insert_residual, &h, dup, &mut self.du, |x| {
            linear.solve(x).map_err(SolveError::from)
        })?;
        for (k, dq) in self.dq.iter().enumerate() {
            for (b, jk) in self.bonded_direction.iter_mut().zip(&j[k * ndof..(k + 1) * ndof]) {
                *b += jk * dq;
            }
        }
        Ok(self.dq.iter().zip(&self.insert_residual).map(|(a, b)| a * b).sum())
    }

    /// Solves one increment ending at stage fraction `t`, updating `u`.
    #[allow(clippy::too_many_arguments)]
    pub fn increment(
        &mut self,
        u: &mut [f64],
        t: f64,
        extrapolation: Option<(&[f64], f64)>,
        stage: usize,
        increment: usize,
        observer: &mut dyn Observer,
        stats: &mut SolveStats,
    ) -> IncrementOutcome {
        self.damping = 0.0;
        let attempt = Attempt { stage, increment };
        let plain = self.try_increment(u, t, extrapolation, attempt, observer, stats);
        let err = match plain {
            Ok(o) => return o,
            Err(e) if e.is_numerical() && self.controls.damped_retry => e,
            Err(e) => return IncrementOutcome::Failed(e),
        };
        // A load that pushes a part along a direction of little stiffness
        // (a seal sliding to its groove wall, contact closing far away) has
        // its equilibrium beyond Newton's reach from the last state, however
        // small the increment. The same increment is tried again with damped
        // steps before it is cut back.
        observer.event(&Event::DampedRetry { stage, increment, reason: &err });
        self.contacts.restore();
        if self.damping_weights.is_empty() {
            self.damping_weights = super::stabilization::dof_weights(self.disc, 1.0);
        }
        self.damping = INITIAL_DAMPING;
        self.retrying = true;
        let damped = self.try_increment(u, t, extrapolation, attempt, observer, stats);
        self.retrying = false;
        self.damping = 0.0;
        match damped {
            Ok(o) => o,
            Err(_) => IncrementOutcome::Failed(err),
        }
    }

    /// One attempt at the increment: the predictor, then Newton corrections
    /// with a line search until the convergence criteria hold at a settled
    /// contact and fluid front.
    fn try_increment(
        &mut self,
        u: &mut [f64],
        t: f64,
        extrapolation: Option<(&[f64], f64)>,
        attempt: Attempt,
        observer: &mut dyn Observer,
        stats: &mut SolveStats,
    ) -> Result<IncrementOutcome, SolveError> {
        self.predict(u, t, extrapolation, stats)?;
        let max_iterations = self.controls.max_iterations;
        let mut log = IterationLog::new(if self.damping > 0.0 { DAMPED_BUDGET * max_iterations } else { max_iterations });
        loop {
            if log.iterations >= log.budget {
                return Err(self.not_converged(attempt.increment));
            }
            let last = likely_last(&log.residuals, self.controls.force_tolerance);
            let direction = self.solve_direction(u, t, attempt.at(log.iterations), last, observer, stats)?;
            log.iterations += 1;
            let energy_norm = direction.g0.abs();
            // The tangent is assembled only where the next iteration may
            // need it: not at a rejected line-search trial's successor, and
            // not where the last residuals predict convergence.
            let likely_converged = predicts_convergence(&log.residuals, self.controls.force_tolerance);
            let (energy, s) = self.search_line(u, t, &direction, likely_converged, stats)?;
            let res = self.free_residual_norm();
            let rel = res / self.force_scale();
            log.residuals.push(rel);
            let iteration =
                Event::Iteration { iteration: log.iterations, residual: res, relative: rel, line_search: s, factor: direction.kind };
            observer.event(&iteration);
            if !rel.is_finite() {
                return Err(SolveError::NonFiniteResidual);
            }
            if !self.retrying && self.controls.damped_retry && rel > self.controls.force_tolerance && log.stalled() {
                return Err(self.not_converged(attempt.increment));
            }
            if let Some(before) = log.previous_residual.replace(res) {
                self.update_damping(res / before);
            }
            let e0 = *log.first_energy.get_or_insert(energy_norm);
            let energy_ok = e0 == 0.0 || energy_norm * s <= self.controls.energy_tolerance * e0;
            if rel <= self.controls.force_tolerance
                && (energy_ok || self.correction_small(u, s) || self.next_correction_small(e0)?)
                && self.settle(u, t, &mut log, stats)?
            {
                self.mixed.commit();
                self.history.commit();
                return Ok(IncrementOutcome::Converged {
                    iterations: log.iterations,
                    rebalances: log.rebalances,
                    residuals: log.residuals,
                    energy,
                });
            }
            // The fluids' front is found again as soon as the contact
            // pressures are near their equilibrium values, so that the
            // iterations converging this load also take up the front's move
            // (see [`FRONT_CHECK_RESIDUAL`]); the converged state is checked
            // in `settle` as before.
            if rel > self.controls.force_tolerance && rel <= FRONT_CHECK_RESIDUAL && self.fluid_front_moved(u, t, stats)? {
                log.rebalance();
                continue;
            }
            let fast = matches!(log.residuals[log.solve_start..], [.., previous, last] if last <= EARLY_UPDATE_DECREASE * previous);
            if self.contacts.has_friction()
                && !self.retrying
                && fast
                && rel > self.controls.force_tolerance
                && rel <= self.controls.force_tolerance.sqrt()
            {
                self.augment_early(u, t, &mut log, stats)?;
            }
        }
    }

    /// The predictor: the last converged state (extrapolated from the
    /// previous increment when asked; a start that fails to evaluate falls
    /// back to the last converged state), evaluated with the remaining
    /// prescribed change `dup` carried through the tangent into the
    /// right-hand side, then moved by `dup`.
    fn predict(&mut self, u: &mut [f64], t: f64, extrapolation: Option<(&[f64], f64)>, stats: &mut SolveStats) -> Result<(), SolveError> {
        u.copy_from_slice(&self.last_converged);
        self.mixed.restart();
        if let Some(fluids) = self.fluids.as_deref_mut() {
            if self.retrying {
                fluids.resume_increment();
            } else {
                fluids.begin_increment();
            }
        }
        self.inserts.restore();
        let mut extrapolated = false;
        if let Some((prev, ratio)) = extrapolation {
            for (d, ud) in u.iter_mut().enumerate() {
                *ud += ratio * (self.last_converged[d] - prev[d]);
            }
            self.contacts.predict_multipliers(ratio);
            self.mixed.extrapolate(ratio);
            extrapolated = true;
        }
        self.contacts.anchor_approaches(extrapolation.map_or(0.0, |(_, ratio)| ratio));
        loop {
            self.prescribed_change(u, t);
            match self.evaluate(u, t, true, true, stats) {
                Ok(_) => break,
                Err(_) if extrapolated => {
                    u.copy_from_slice(&self.last_converged);
                    self.mixed.restart();
                    self.contacts.restore();
                    self.contacts.anchor_approaches(0.0);
                    extrapolated = false;
                }
                Err(e) => return Err(e),
            }
        }
        for (ud, dp) in u.iter_mut().zip(&self.dup) {
            *ud += dp;
        }
        Ok(())
    }

    /// `dup`: what the prescribed and bonded dofs still have to move from
    /// `u` to their values at stage fraction `t` (zero at free dofs).
    fn prescribed_change(&mut self, u: &[f64], t: f64) {
        for d in 0..u.len() {
            self.dup[d] = if self.dofs.eq[d] == NONE { self.prescribed_at(t, d) - u[d] } else { 0.0 };
        }
        if !self.inserts.is_empty() {
            let mut moved = u.to_vec();
            self.inserts.prescribe(t, &mut moved);
            for d in 0..u.len() {
                if self.bonded[d] {
                    self.dup[d] = moved[d] - u[d];
                }
            }
        }
    }

    /// The Newton direction `du` at `u`: the tangent (assembled again when
    /// the last evaluation was residual-only), damped on a retry, factorized
    /// and solved, with the insert unknowns condensed out and the mixed
    /// unknowns' directions formed.
    fn solve_direction(
        &mut self,
        u: &[f64],
        t: f64,
        at: IterationAt,
        last: bool,
        observer: &mut dyn Observer,
        stats: &mut SolveStats,
    ) -> Result<Direction, SolveError> {
        if !self.tangent_fresh {
            // The last point was evaluated for its residual alone.
            self.evaluate(u, t, true, false, stats)?;
        }
        self.add_damping();
        self.du.copy_from_slice(&self.rhs);
        let reuse = self.reuse_for(at, last);
        let factorization = self.linear.solve_system(SystemMatrix { lower: &self.k, skew: &self.skew }, &mut self.du, reuse)?;
        factorization.check_inertia(self.pattern.negative)?;
        if factorization.fallback {
            let iteration = at.iteration + 1;
            observer.event(&Event::LinearFallback { stage: at.stage, increment: at.increment, iteration, factor: factorization.kind });
        }
        let first = at.iteration == 0;
        let insert_work = self.couple_inserts(first)?;
        self.inserts.save_base();
        self.mixed.directions(self.disc, self.dofs, &self.du, &self.bonded_direction, if first { Some(&self.dup) } else { None });
        stats.newton_iterations += 1;
        // G(0) = du·r = −du·rhs (negative for a descent direction).
        let g0: f64 = -self.du.iter().zip(&self.rhs).map(|(a, b)| a * b).sum::<f64>() + insert_work;
        // The line search assumes the Newton direction descends an energy:
        // not so with friction (it dissipates) or an indefinite tangent, so
        // then only full steps are taken (still halved when an element
        // would invert). A fluid's follower load is not conservative
        // either (nor a follower pressure on a surface with a free edge),
        // but its skew part is small next to the rubber's stiffness, so
        // its direction still descends.
        // Insert unknowns make the system unsymmetric: full steps too.
        let follower_load = self.fluids.is_some() || !self.prog.pressures.is_empty();
        let nonconservative_fluid = factorization.kind == FactorKind::LuNonsymmetric && follower_load && !self.contacts.has_friction();
        let line_search = self.controls.line_search
            && !self.contacts.has_friction()
            && (factorization.positive_definite || nonconservative_fluid)
            && self.dq.is_empty();
        Ok(Direction { g0, kind: factorization.kind, line_search })
    }

    /// Whether the system of iteration `at` may be solved on the last
    /// factorization with a Krylov correction instead of a new one, and to
    /// what accuracy (the linear solver still factorizes when that does not
    /// converge). Never for the first system of an increment (its factor is
    /// the one the others reuse), with pressure unknowns (the inertia check
    /// needs a factor of this very tangent) or with insert unknowns (their
    /// condensation solves with the factor, which must be this tangent's):
    /// those are factorized, and their solve, where it is refined
    /// iteratively, stops at the same accuracy.
    ///
    /// The accuracy is the forcing term of an inexact Newton method
    /// (Eisenstat & Walker 1996, "Choosing the forcing terms in an inexact
    /// Newton method", SIAM J. Sci. Comput. 17(1)): the linear residual
    /// falls by [`FORCING`] times the relative out-of-balance force, at
    /// most [`MAX_FORCING`] ([`MAX_FORCING_CONTACT`] with contact), so the
    /// error it leaves is of the order of Newton's own quadratic term and
    /// convergence stays quadratic; but no tighter than the oversolving
    /// guard of [`forcing`].
    ///
    /// `last`: the Newton iterate of this system likely converges (see
    /// [`likely_last`]), so the factor serves no later system.
    fn reuse_for(&self, at: IterationAt, last: bool) -> Reuse {
        let rhs: f64 = self.rhs.iter().map(|v| v * v).sum::<f64>().sqrt();
        let relative = rhs / self.force_scale().max(f64::MIN_POSITIVE);
        let cap = if self.contacts.is_empty() { MAX_FORCING } else { MAX_FORCING_CONTACT };
        let tolerance = forcing(relative, self.controls.force_tolerance, cap);
        if at.iteration == 0 || self.pattern.negative > 0 || self.inserts.unknowns() > 0 {
            return Reuse::Fresh { tolerance };
        }
        Reuse::Kept { tolerance, last }
    }

    /// Steps from `u` along the direction and evaluates there: a full step,
    /// shortened by backtracking when `G(s) = du·r(u + s du)` overshoots
    /// (where the direction allows a line search, at most 4 times), halved
    /// when an element would invert or the residual is not finite (at most 6
    /// times). Returns the strain energy at the new `u` and the step length `s`.
    fn search_line(
        &mut self,
        u: &mut [f64],
        t: f64,
        direction: &Direction,
        likely_converged: bool,
        stats: &mut SolveStats,
    ) -> Result<(f64, f64), SolveError> {
        let g0 = direction.g0;
        self.base.copy_from_slice(u);
        let mut s = 1.0;
        let mut tries = 0;
        loop {
            let want_k = tries == 0 && !likely_converged;
            self.apply(u, s);
            if !self.inserts.is_empty() {
                self.inserts.step(&self.dq, s, u);
            }
            let from = &self.linearized_at;
            self.contacts.step_multipliers(|d| u[d] - from[d]);
            let evaluated =
                self.mixed.apply(self.disc, s).map_err(SolveError::from).and_then(|_| self.evaluate(u, t, want_k, false, stats));
            match evaluated {
                Ok(w) => {
                    if !direction.line_search || tries >= 4 {
                        return Ok((w, s));
                    }
                    let gs: f64 = self.dofs_dot_du();
                    if gs > 0.5 * g0.abs() && g0 < 0.0 {
                        s = (s * g0 / (g0 - gs)).clamp(0.1 * s, 0.9 * s);
                        tries += 1;
                        continue;
                    }
                    return Ok((w, s));
                }
                Err(e) if e.is_point_failure() || e == SolveError::NonFiniteResidual => {
                    if tries >= 6 {
                        return Err(e);
                    }
                    s *= 0.5;
                    tries += 1;
                }
                Err(e) => return Err(e),
            }
        }
    }

    /// Whether the last correction (length `s`) is small next to the larger
    /// of the increment's and the total displacement (a held stage has no
    /// increment to compare with): the displacement criterion.
    fn correction_small(&self, u: &[f64], s: f64) -> bool {
        let (mut step2, mut inc2, mut tot2) = (0.0, 0.0, 0.0);
        for d in 0..u.len() {
            let q = self.dofs.eq[d];
            if q != NONE {
                step2 += (s * self.du[q]).powi(2);
            } else {
                step2 += (u[d] - self.base[d]).powi(2);
            }
            inc2 += (u[d] - self.last_converged[d]).powi(2);
            tot2 += u[d] * u[d];
        }
        step2.sqrt() <= self.controls.displacement_tolerance * inc2.max(tot2).sqrt().max(f64::MIN_POSITIVE)
    }

    /// Whether the correction the next iteration would make meets the
    /// energy criterion, estimated with the last factorization: its energy
    /// `|du'·r|` with `K du' = −r` against `energy_tolerance · e0`.
    fn next_correction_small(&mut self, e0: f64) -> Result<bool, SolveError> {
        if self.damping > 0.0 || self.inserts.unknowns() > 0 || e0 == 0.0 {
            return Ok(false);
        }
        self.probe.clone_from(&self.rhs);
        self.linear.solve(&mut self.probe)?;
        let energy: f64 = self.probe.iter().zip(&self.rhs).map(|(a, b)| a * b).sum::<f64>().abs();
        Ok(energy <= self.controls.energy_tolerance * e0)
    }

    /// At an equilibrium of the current load: true when the increment is
    /// done. Otherwise the contact multipliers move toward the contact
    /// pressure (augmented Lagrangian) or the fluids' wetted front moved, and
    /// the iterations re-balance at the same load (false).
    fn settle(&mut self, u: &[f64], t: f64, log: &mut IterationLog, stats: &mut SolveStats) -> Result<bool, SolveError> {
        if !self.contacts.needs_augmentation() {
            if !self.fluid_front_moved(u, t, stats)? {
                return Ok(true);
            }
            log.rebalance();
            return Ok(false);
        }
        if log.augmentations >= MAX_AUGMENTATIONS {
            let (penetration, tolerance) = self.contacts.worst_penetration();
            return Err(SolveError::ContactNotResolved { penetration, tolerance, augmentations: log.augmentations });
        }
        self.update_multipliers(u, t, log, stats)?;
        Ok(false)
    }

    /// One augmented-Lagrangian multiplier update, after which the
    /// equilibrium is solved again from `u`, evaluated anew.
    fn update_multipliers(&mut self, u: &[f64], t: f64, log: &mut IterationLog, stats: &mut SolveStats) -> Result<(), SolveError> {
        self.contacts.augment();
        log.augmentations += 1;
        log.rebalance();
        self.dup.fill(0.0);
        self.evaluate(u, t, true, false, stats)?;
        Ok(())
    }

    /// Near an equilibrium (out-of-balance force below the square root of
    /// the force tolerance and falling fast: the contact states have settled
    /// and the pressures are those of the equilibrium to about that
    /// accuracy), the multiplier update the equilibrium would ask for is
    /// made at once, so the iterations that converge the equilibrium also
    /// take up the multipliers' change instead of converging it twice. Once
    /// per equilibrium solve; the converged increment is checked as before,
    /// so the answer keeps its tolerances. Called on plain attempts with
    /// friction only: on the frictionless seal-relaxation example the
    /// early updates changed the step sequence onto a hard increment of
    /// its squeeze (149 -> 473 iterations, measured), where with friction
    /// every seal example gained.
    fn augment_early(&mut self, u: &[f64], t: f64, log: &mut IterationLog, stats: &mut SolveStats) -> Result<(), SolveError> {
        if log.early_augmented || log.augmentations >= MAX_AUGMENTATIONS || !self.contacts.needs_augmentation() {
            return Ok(());
        }
        self.update_multipliers(u, t, log, stats)?;
        log.early_augmented = true;
        Ok(())
    }

    /// The failure of an increment that used up its iterations.
    fn not_converged(&self, increment: usize) -> SolveError {
        let residual = self.free_residual_norm();
        SolveError::NotConverged { stage: self.stage_name.to_string(), increment, residual, relative: residual / self.force_scale() }
    }

    /// After an equilibrium: finds the fluids' front from the current contact
    /// pressures; if it moved, re-evaluates the residual and tangent with the
    /// new wetted set and returns true.
    fn fluid_front_moved(&mut self, u: &[f64], t: f64, stats: &mut SolveStats) -> Result<bool, SolveError> {
        let Some(fluids) = self.fluids.as_deref_mut() else { return Ok(false) };
        let contact = self.contacts.fields(self.disc.mesh().node_count()).pressure;
        if !fluids.update_front(&contact, t) {
            return Ok(false);
        }

        if fluids.updates() > fluids.update_limit() {
            return Err(SolveError::FluidFrontNotSettled { updates: fluids.updates() });
        }
        self.dup.fill(0.0);
        self.evaluate(u, t, true, false, stats)?;
        Ok(true)
    }

    /// Adds the pseudo-time damping λ·w to the diagonal of the tangent (not
    /// to the residual: a converged state is the undamped equilibrium).
    fn add_damping(&mut self) {
        if self.damping <= 0.0 {
            return;
        }
        for (d, &w) in self.damping_weights.iter().enumerate() {
            let q = self.dofs.eq[d];
            if w != 0.0 && q != NONE {
                if let Some(slot) = self.pattern.slot(q, q) {
                    self.k[slot] += self.damping * w;
                }
            }
        }
    }

    /// Switched evolution relaxation of the damping (Mulder & van Leer 1985;
    /// convergence shown by Kelley & Keyes 1998, "Convergence analysis of
    /// pseudo-transient continuation", SIAM J. Numer. Anal. 35): λ follows the
    /// ratio of successive residuals, so it fades as the iteration settles
    /// (plain Newton, quadratic, once below [`DAMPING_OFF`]) and grows while
    /// the residual grows.
    fn update_damping(&mut self, ratio: f64) {
        // Plain attempts stay plain: once a retry has built the weights, a
        // growing residual in a later increment must not damp it.
        if !self.retrying || self.damping_weights.is_empty() {
            return;
        }
        self.damping = if self.damping == 0.0 {
            if ratio > 10.0 {
                INITIAL_DAMPING
            } else {
                0.0
            }
        } else {
            let next = (self.damping * ratio).min(MAX_DAMPING);
            if next < DAMPING_OFF {
                0.0
            } else {
                next
            }
        };
    }

    /// `u = base + s·du` on the free dofs.
    fn apply(&self, u: &mut [f64], s: f64) {
        for d in 0..u.len() {
            let q = self.dofs.eq[d];
            u[d] = if q != NONE { self.base[d] + s * self.du[q] } else { self.base[d] };
        }
    }

    /// du·r over the free dofs with the current residual.
    fn dofs_dot_du(&self) -> f64 {
        self.residual.iter().zip(&self.dofs.eq).filter(|(_, q)| **q != NONE).map(|(r, q)| r * self.du[*q]).sum()
    }
}

/// What the arc-length driver ([`super::arc_length`]) uses of a Newton
/// context: its evaluation, factorization and measures, without the
/// load-controlled iteration around them.
impl<'a> NewtonContext<'a> {
    /// Residual (and tangent, if `want_k`) at `u` and stage fraction `t`,
    /// with no prescribed change (arc-length stages move nothing).
    pub(super) fn evaluate_fixed(&mut self, u: &[f64], t: f64, want_k: bool, stats: &mut SolveStats) -> Result<f64, SolveError> {
        self.dup.fill(0.0);
        self.evaluate(u, t, want_k, false, stats)
    }

    /// Factorizes the tangent of the last evaluation.
    pub(super) fn factorize_tangent(&mut self) -> Result<crate::linear::Factorization, SolveError> {
        let factorization = self.linear.factorize(SystemMatrix { lower: &self.k, skew: &self.skew })?;
        factorization.check_inertia(self.pattern.negative)?;
        Ok(factorization)
    }

    /// Solves `K x = b` in place with the last factorization.
    pub(super) fn solve_tangent(&mut self, x: &mut [f64]) -> Result<(), SolveError> {
        Ok(self.linear.solve(x)?)
    }

    /// `−r` at the free equations after the last evaluation.
    pub(super) fn free_rhs(&self) -> &[f64] {
        &self.rhs
    }

    /// The out-of-balance force at the free dofs and the force scale it is measured against.
    pub(super) fn residual_and_scale(&self) -> (f64, f64) {
        (self.free_residual_norm(), self.force_scale())
    }

    /// After an equilibrium: whether the fluids' front moved (then re-evaluated).
    pub(super) fn front_moved(&mut self, u: &[f64], t: f64, stats: &mut SolveStats) -> Result<bool, SolveError> {
        self.fluid_front_moved(u, t, stats)
    }

    /// The discretization, the stage's load program, the tangent's pattern and the equation numbering.
    pub(super) fn parts(&self) -> (&'a Discretization<'a>, &'a StageProgram, &'a Pattern, &'a DofMap) {
        (self.disc, self.prog, self.pattern, self.dofs)
    }

    /// The stage's increment controls and name.
    pub(super) fn stage_controls(&self) -> (&'a IncrementControls, &'a str) {
        (self.controls, self.stage_name)
    }
}

/// The relative residual a Newton system solved on a kept factor must reach
/// at the relative out-of-balance force `relative`: [`FORCING`] times it, at
/// most `cap` ([`MAX_FORCING`], or [`MAX_FORCING_CONTACT`]), but never
/// tighter than the oversolving guard, which leaves a linear error of
/// [`OVERSOLVE_GUARD`] times the force tolerance (at most
/// [`MAX_GUARDED_FORCING`]): near convergence the last system need not be
/// solved to many more digits than the answer keeps.
fn forcing(relative: f64, force_tolerance: f64, cap: f64) -> f64 {
    let guard = (OVERSOLVE_GUARD * force_tolerance / relative.max(f64::MIN_POSITIVE)).min(MAX_GUARDED_FORCING);
    (FORCING * relative).min(cap).max(guard)
}

/// Margin of [`likely_last`] over the force tolerance.
pub const LAST_SYSTEM_MARGIN: f64 = 10.0;

/// Whether the Newton system about to be solved is likely an increment's
/// last: the cautious quadratic estimate of the next residual (as in
/// [`predicts_convergence`]) within [`LAST_SYSTEM_MARGIN`] times the
/// tolerance. On the 156k-equation mount the closing systems of increments
/// of 0.25 (residuals 1.3, then 2.2e-3: estimate 3.7e-6 against 1e-6)
/// converged to 8e-7; a wrong guess costs Krylov iterations up to one
/// factorization's worth, never the answer.
fn likely_last(residuals: &[f64], tolerance: f64) -> bool {
    match residuals {
        [.., previous, last] if last < previous => last * last / previous <= LAST_SYSTEM_MARGIN * tolerance,
        _ => false,
    }
}

/// Whether the next Newton iterate will likely meet the force tolerance,
/// read from the last two relative residuals: quadratic convergence gives
/// r_{k+1} ≈ C r_k² with C ≈ r_k / r_{k−1}²; the estimate r_k² / r_{k−1} is
/// larger by r_{k−1} / r_k (so cautious), and must sit 100 times below the
/// tolerance. A wrong guess costs one more assembly, never the answer.
fn predicts_convergence(residuals: &[f64], tolerance: f64) -> bool {
    match residuals {
        [.., previous, last] if last < previous => last * last / previous <= 0.01 * tolerance,
        _ => false,
    }
}

#[cfg(test)]
mod tests {
    use super::{forcing, likely_last, predicts_convergence, IterationLog, MAX_FORCING, MAX_FORCING_CONTACT};

    /// Far from the solution the forcing term is a hundredth of the relative
    /// residual (Eisenstat & Walker 1996), at most 1e-3; near it, Kelley's
    /// guard (2003, §3.2.3) asks only for a linear error of half the force
    /// tolerance, at most a tenth.
    #[test]
    fn forcing_follows_the_residual_without_oversolving() {
        let close = |a: f64, b: f64| (a - b).abs() <= 1e-12 * b;
        let cap = MAX_FORCING;
        assert!(close(forcing(1e-2, 1e-9, cap), 1e-4));
        assert!(close(forcing(10.0, 1e-6, cap), 1e-3));
        assert!(close(forcing(1e-3, 1e-6, cap), 5e-4));
        assert!(close(forcing(1e-5, 1e-6, cap), 5e-2));
        assert!(close(forcing(1e-8, 1e-6, cap), 0.1));
        // With contact the cap is ten times tighter; the guard still rules near convergence.
        assert!(close(forcing(10.0, 1e-6, MAX_FORCING_CONTACT), 1e-4));
        assert!(close(forcing(1e-5, 1e-6, MAX_FORCING_CONTACT), 5e-2));
    }

    // A plain attempt caught in a cycle between two friction states
    // (the face seal's first pressurised increment: 0.49, 0.50, 0.49, …)
    // used up all 15 iterations before its damped retry.
    #[test]
    fn a_cycling_solve_is_stalled_and_a_converging_one_is_not() {
        let mut log = IterationLog::new(15);
        log.residuals = vec![6.3, 5.1, 0.51, 0.49, 0.50, 0.49];
        assert!(!log.stalled(), "still falling over the window");
        log.residuals.push(0.505);
        assert!(log.stalled());
        // Slow but steady (linear, ratio 0.9 per correction) is not a stall.
        log.residuals = (0..8).map(|k| 0.9f64.powi(k)).collect();
        assert!(!log.stalled());
        // A re-balance starts a new solve: the jump is not held against it.
        log.residuals = vec![1.0, 1e-3, 1e-9];
        log.rebalance();
        log.residuals.extend([1e-2, 2e-2, 1e-2, 2e-2]);
        assert!(!log.stalled());
        log.residuals.push(1e-2);
        assert!(log.stalled());
    }

    #[test]
    fn convergence_is_predicted_only_from_a_fast_decrease() {
        // A block increment: 1.6e-2 → 2.7e-6 predicts ≤ 4.6e-10, below 1e-8.
        assert!(predicts_convergence(&[1.6e-2, 2.7e-6], 1e-6));
        assert!(!predicts_convergence(&[1.6e-2, 2.7e-6], 1e-8));
        // Linear convergence, growth, or too little history: no prediction.
        assert!(!predicts_convergence(&[1e-3, 5e-4], 1e-6));
        assert!(!predicts_convergence(&[1e-6, 1e-3], 1e-6));
        assert!(!predicts_convergence(&[1e-9], 1e-6));
    }

    // The mount's closing systems: 1.3 → 2.2e-3 estimates 3.7e-6, within
    // ten times 1e-6 (Newton then reached 8e-7); one step earlier, or a
    // slow decrease, is not the last (definition of the rule).
    #[test]
    fn the_last_system_is_told_from_a_fast_decrease() {
        assert!(likely_last(&[1.295, 2.19e-3], 1e-6));
        assert!(!likely_last(&[1.295], 1e-6));
        assert!(!likely_last(&[2.78, 2.3e-2], 1e-6));
        assert!(!likely_last(&[1e-3, 5e-4], 1e-6));
        assert!(!likely_last(&[1e-6, 1e-3], 1e-6));
    }
}
