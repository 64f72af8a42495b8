//! Harmonic stages: the dynamic stiffness of a preloaded part.
//!
//! After the static stages, the model vibrates with small amplitudes about
//! the converged state (contact, follower pressures and held inserts as
//! they are there). The motions of the harmonic stage give displacement
//! amplitudes; every other prescribed dof stays held. Linearised about the
//! preload, the equations at angular frequency ω = 2π f are
//! `K*(ω) x = −K*_fp(ω) a` on the free dofs, with the complex tangent
//!
//! ```text
//! K*(ω) = K_rest + g*(ω) K_iso,   g*(ω) = g∞ + Σ gᵢ iωτᵢ / (1 + iωτᵢ)
//! ```
//!
//! where K_iso is the isochoric material stiffness of the viscoelastic
//! materials (instantaneous moduli, at the converged stresses and history)
//! and K_rest everything else: volumetric and geometric stiffness, elastic
//! materials, contact and load stiffness. This is the frequency-domain form
//! of the Prony series in standard linear viscoelasticity (J.D. Ferry,
//! 1980, "Viscoelastic Properties of Polymers", 3rd ed., Wiley, ch. 3;
//! N.W. Tschoegl, 1989, "The Phenomenological Theory of Linear Viscoelastic
//! Behavior", Springer), applied to the perturbation of the internal
//! variables of the finite-strain model (see [`crate::material::viscoelastic`]).
//! Each material scales by its own series: the storage tangent K′ is
//! assembled with `TangentKind::Storage(ω)`, the loss tangent K″ as the
//! assembly with `Loss(ω)` minus the one `Without` the isochoric material
//! stiffness ([`crate::material::TangentKind`]).
//!
//! The complex stiffness of a driven set in a component is the sum of its
//! nodes' reaction amplitudes in that component over its amplitude. The
//! reactions come from the element tangents; contact or follower pressure
//! acting on the driven nodes themselves is not included. Inserts may be
//! driven, loaded or free in the vibration ([`inserts`]); the complex
//! stiffness of an insert component is the amplitude of the force (or
//! moment) it applies to the rubber over its motion's amplitude (length, or
//! radians).

mod block;
mod inserts;

use std::f64::consts::TAU;

use crate::assembly::assembler::Outputs;
use crate::assembly::dofs::NONE;
use crate::assembly::global::GlobalSystem;
use crate::assembly::{Assembler, Discretization, DofMap, Pattern, PointHistories};
use crate::contact::active::ActiveContacts;
use crate::error::SolveError;
use crate::insert::Inserts;
use crate::load::fluid::Fluids;
use crate::load::follower::add_pressure;
use crate::material::TangentKind;
use crate::results::{DynamicResult, DynamicStiffness};
use block::BlockSystem;
use inserts::{Complex, Component, Role};

use super::stages::StageProgram;

/// One driven set and component: its nodes and amplitude.
struct Driven {
    set: String,
    component: usize,
    nodes: Vec<usize>,
    amplitude: f64,
}

/// The amplitudes of a harmonic stage: the prescribed amplitude at every
/// dof (motions and driven insert components), the prescribed flags of the
/// vibration, the driven sets, the vibrating insert components and the unit
/// node motion of each free one.
struct Drive {
    amplitude: Vec<f64>,
    prescribed: Vec<bool>,
    driven: Vec<Driven>,
    components: Vec<Component>,
    free_motions: Vec<Vec<f64>>,
}

impl Drive {
    fn new(disc: &Discretization, si: usize, held: &[bool], bodies: &Inserts) -> Result<Self, SolveError> {
        let stage = &disc.model.stages[si];
        let dim = disc.dim;
        let mut prescribed = held.to_vec();
        let mut amplitude = vec![0.0; prescribed.len()];
        let mut driven = Vec::new();
        for m in &stage.motions {
            let nodes = disc.mesh().nodes_of_set(&m.set).ok_or_else(|| harmonic_error(stage, format!("no set named `{}`", m.set)))?;
            for (component, value) in m.displacement.iter().enumerate().take(dim) {
                let Some(a) = *value else { continue };
                for &n in &nodes {
                    prescribed[n * dim + component] = true;
                    amplitude[n * dim + component] = a;
                }
                if a != 0.0 {
                    driven.push(Driven { set: m.set.clone(), component, nodes: nodes.clone(), amplitude: a });
                }
            }
        }
        let components = inserts::components(stage, bodies);
        let mut weights = vec![0.0; amplitude.len()];
        let mut free_motions = Vec::new();
        for c in &components {
            match c.role {
                Role::Driven(a) => bodies.add_component_vectors(c.body, c.k, a, &mut amplitude, &mut weights),
                Role::Free(_) => {
                    let mut unit = vec![0.0; amplitude.len()];
                    bodies.add_component_vectors(c.body, c.k, 1.0, &mut unit, &mut weights);
                    free_motions.push(unit);
                }
            }
        }
        if driven.is_empty() && !components.iter().any(|c| c.reported()) {
            return Err(harmonic_error(stage, "no motion or insert with a non-zero amplitude drives it".into()));
        }
        Ok(Drive { amplitude, prescribed, driven, components, free_motions })
    }

    /// The load cases: the prescribed amplitude, then each free component's unit motion.
    fn cases(&self) -> Vec<&[f64]> {
        std::iter::once(self.amplitude.as_slice()).chain(self.free_motions.iter().map(Vec::as_slice)).collect()
    }

    /// Insert coordinates of load case `case` (complex, one per component).
    fn coordinates(&self, case: usize) -> Vec<Complex> {
        let mut free = 0;
        self.components
            .iter()
            .map(|c| match c.role {
                Role::Driven(a) => (if case == 0 { a } else { 0.0 }, 0.0),
                Role::Free(_) => {
                    free += 1;
                    (if case == free { 1.0 } else { 0.0 }, 0.0)
                }
            })
            .collect()
    }
}

impl Component {
    /// Whether its complex stiffness is reported: a non-zero motion or force amplitude.
    fn reported(&self) -> bool {
        match self.role {
            Role::Driven(a) | Role::Free(a) => a != 0.0,
        }
    }
}

fn harmonic_error(stage: &crate::model::Stage, reason: String) -> SolveError {
    SolveError::Harmonic { stage: stage.name.clone(), reason }
}

/// The parts of the converged state a harmonic stage linearises about.
pub struct Preload<'r> {
    /// Converged displacement (all dofs).
    pub u: &'r [f64],
    /// Contact with the rigid bodies held where the last stage left them.
    pub contacts: &'r mut ActiveContacts,
    /// Fluids with their last wetted front.
    pub fluids: &'r Fluids,
    /// Inserts at their converged position (their modes those of the last static stage).
    pub inserts: &'r Inserts,
    /// Converged history of the integration points.
    pub history: &'r mut PointHistories,
}

/// One assembled tangent of the vibration with its load `−K_fp a`.
struct Assembled {
    k: Vec<f64>,
    skew: Vec<(usize, f64)>,
    rhs: Vec<f64>,
}

/// Assembles the tangents of the vibration about the preload.
struct Tangents<'s, 'r> {
    disc: &'s Discretization<'s>,
    prog: &'s StageProgram,
    dofs: &'s DofMap,
    pattern: &'s Pattern,
    preload: Preload<'r>,
    assembler: Assembler,
    /// Internal forces at the preload (written by every assembly).
    scratch: Vec<f64>,
}

impl Tangents<'_, '_> {
    /// The load `−K_fp a` of the prescribed amplitude `a`, and (when
    /// `with_tangent`) the tangent, with the isochoric stiffness of relaxing
    /// materials as `kind` says.
    fn assemble(&mut self, kind: TangentKind, a: &[f64], with_tangent: bool) -> Result<Assembled, SolveError> {
        let mut k = vec![0.0; if with_tangent { self.pattern.nnz() } else { 0 }];
        let mut rhs = vec![0.0; self.dofs.n_free];
        let mut skew = Vec::new();
        self.set_kind(kind);
        let out = Outputs {
            internal: &mut self.scratch,
            tangent: with_tangent.then_some(k.as_mut_slice()),
            predictor: Some((a, &mut rhs)),
            mixed: None,
            products: None,
            history: Some(self.preload.history),
        };
        let result = self.assembler.assemble(self.disc, self.dofs, self.pattern, self.preload.u, out);
        self.set_kind(TangentKind::Step);
        result?;
        let mesh = self.disc.mesh();
        let mut external = vec![0.0; self.scratch.len()];
        let mut system = GlobalSystem {
            dofs: self.dofs,
            pattern: self.pattern,
            external: &mut external,
            tangent: with_tangent.then_some(k.as_mut_slice()),
            skew: Some(&mut skew),
            predictor: Some((a, &mut rhs)),
        };
        for p in &self.prog.pressures {
            add_pressure(mesh, self.disc.model.analysis, &p.sides, p.end, self.preload.u, &mut system);
        }
        if !self.preload.contacts.is_empty() {
            // About the converged preload the contact's own tangent: no
            // multiplier is a Newton unknown here.
            self.preload.contacts.set_newton_multipliers(false);
            self.preload.contacts.evaluate(&mesh.nodes, self.preload.u, 1.0, &mut system);
            self.preload.contacts.set_newton_multipliers(true);
        }
        if !self.preload.fluids.is_empty() {
            self.preload.fluids.add_loads(&mesh.nodes, self.preload.u, 1.0, &mut system);
        }
        Ok(Assembled { k, skew, rhs })
    }

    /// `K v` at every dof for each global vector in `vectors` (laid end to end).
    fn products(&mut self, kind: TangentKind, vectors: &[f64]) -> Result<Vec<f64>, SolveError> {
        let mut out = vec![0.0; vectors.len()];
        self.set_kind(kind);
        let o = Outputs {
            internal: &mut self.scratch,
            tangent: None,
            predictor: None,
            mixed: None,
            products: Some((vectors, &mut out)),
            history: Some(self.preload.history),
        };
        let result = self.assembler.assemble(self.disc, self.dofs, self.pattern, self.preload.u, o);
        self.set_kind(TangentKind::Step);
        result?;
        Ok(out)
    }

    fn set_kind(&mut self, kind: TangentKind) {
        // The converged stress and history at a zero time step; trial values are never committed.
        self.preload.history.time_step = 0.0;
        self.preload.history.tangent = kind;
    }

    /// Solves the vibration of every load case at angular frequency `omega`;
    /// returns each case's complex node forces `K* v` (real parts at every
    /// dof, then imaginary parts).
    fn vibrate(
        &mut self,
        omega: f64,
        cases: &[&[f64]],
        without: &[Assembled],
        block: &mut BlockSystem,
    ) -> Result<Vec<Vec<f64>>, SolveError> {
        let ndof = self.scratch.len();
        let mut vectors = vec![0.0; 2 * ndof * cases.len()];
        for (i, a) in cases.iter().enumerate() {
            let storage = self.assemble(TangentKind::Storage(omega), a, i == 0)?;
            let loss = self.assemble(TangentKind::Loss(omega), a, i == 0)?;
            if i == 0 {
                let k_loss: Vec<f64> = loss.k.iter().zip(&without[0].k).map(|(a, b)| a - b).collect();
                block.factorize(&storage.k, &storage.skew, &k_loss)?;
            }
            let f_imag: Vec<f64> = loss.rhs.iter().zip(&without[i].rhs).map(|(a, b)| a - b).collect();
            let (x_real, x_imag) = block.solve(&storage.rhs, &f_imag)?;
            // The motion v = v_r + i v_i at every dof: amplitudes at prescribed dofs, the solution at free ones.
            let v = &mut vectors[2 * ndof * i..2 * ndof * (i + 1)];
            v[..ndof].copy_from_slice(a);
            for d in 0..ndof {
                let q = self.dofs.eq[d];
                if q != NONE {
                    v[d] = x_real[q];
                    v[ndof + d] = x_imag[q];
                }
            }
        }
        let ps = self.products(TangentKind::Storage(omega), &vectors)?;
        let pl = self.products(TangentKind::Loss(omega), &vectors)?;
        let pw = self.products(TangentKind::Without, &vectors)?;
        // F = (K′ + i K″)(v_r + i v_i), K″ = K_loss − K_without.
        let forces = (0..cases.len())
            .map(|i| {
                let (re, im) = (2 * ndof * i, 2 * ndof * i + ndof);
                let k2 = |at: usize| pl[at] - pw[at];
                let mut f = vec![0.0; 2 * ndof];
                for d in 0..ndof {
                    f[d] = ps[re + d] - k2(im + d);
                    f[ndof + d] = k2(re + d) + ps[im + d];
                }
                f
            })
            .collect();
        Ok(forces)
    }
}

/// The vibration at one frequency once the free insert components are
/// solved for: node forces (complex, real parts then imaginary parts), and
/// per insert component its coordinate and generalized force amplitudes.
struct Vibration {
    force: Vec<f64>,
    coordinates: Vec<Complex>,
    generalized: Vec<Complex>,
}

/// Superposes the load cases: the prescribed case plus each free insert
/// component's unit motion times the amplitude that balances the free
/// components' equations (their force amplitudes).
fn superpose(
    stage: &crate::model::Stage,
    drive: &Drive,
    forces: &[Vec<f64>],
    bodies: &Inserts,
    preload: &[f64],
) -> Result<Vibration, SolveError> {
    let list = &drive.components;
    let generalized: Vec<Vec<Complex>> = forces
        .iter()
        .enumerate()
        .map(|(case, f)| {
            let q = drive.coordinates(case);
            list.iter().map(|row| inserts::generalized_force(bodies, list, row, f, &q, preload)).collect()
        })
        .collect();
    let free: Vec<(usize, f64)> =
        list.iter().enumerate().filter_map(|(i, c)| if let Role::Free(f) = c.role { Some((i, f)) } else { None }).collect();
    let n = free.len();
    let mut a = Vec::with_capacity(n * n);
    let mut b = Vec::with_capacity(n);
    for &(row, amplitude) in &free {
        a.extend((0..n).map(|f| generalized[1 + f][row]));
        b.push((amplitude - generalized[0][row].0, -generalized[0][row].1));
    }
    let c = inserts::solve_complex(&a, &b).ok_or_else(|| {
        harmonic_error(stage, "the free insert components' equations are singular (is a free component held by nothing?)".into())
    })?;
    let weights: Vec<Complex> = std::iter::once((1.0, 0.0)).chain(c).collect();
    let mul = |p: Complex, q: Complex| (p.0 * q.0 - p.1 * q.1, p.0 * q.1 + p.1 * q.0);
    let ndof = preload.len();
    let mut force = vec![0.0; 2 * ndof];
    let mut coordinates = vec![(0.0, 0.0); list.len()];
    let mut total = vec![(0.0, 0.0); list.len()];
    for (case, w) in weights.iter().enumerate() {
        for d in 0..ndof {
            let (re, im) = mul(*w, (forces[case][d], forces[case][ndof + d]));
            force[d] += re;
            force[ndof + d] += im;
        }
        for (i, q) in drive.coordinates(case).into_iter().enumerate() {
            let (x, y) = mul(*w, q);
            coordinates[i] = (coordinates[i].0 + x, coordinates[i].1 + y);
            let (x, y) = mul(*w, generalized[case][i]);
            total[i] = (total[i].0 + x, total[i].1 + y);
        }
    }
    Ok(Vibration { force, coordinates, generalized: total })
}

/// Runs harmonic stage `si` about the converged state: the complex stiffness
/// of every driven set and component, and of every driven or loaded insert
/// component, at every frequency.
pub fn run(disc: &Discretization, si: usize, prog: &StageProgram, preload: Preload) -> Result<DynamicResult, SolveError> {
    let model = disc.model;
    let stage = &model.stages[si];
    let frequencies = stage.harmonic.as_ref().map(|h| h.frequencies.clone()).unwrap_or_default();
    if si == 0 {
        return Err(harmonic_error(stage, "a harmonic stage vibrates about a preloaded state: it cannot come first".into()));
    }
    if let Some(f) = frequencies.iter().find(|f| !(f.is_finite() && **f > 0.0)) {
        return Err(harmonic_error(stage, format!("frequencies must be positive, got {f}")));
    }
    let bodies = preload.inserts;
    let drive = Drive::new(disc, si, &prog.prescribed, bodies)?;
    let dofs = DofMap::with_pressures(disc.dim, &drive.prescribed, &disc.pressures.of_node);
    let pattern = Pattern::build(disc, &dofs)?;
    let mut block = BlockSystem::new(&pattern, &model.linear)?;
    let ndof = preload.u.len();
    let mut tangents =
        Tangents { disc, prog, dofs: &dofs, pattern: &pattern, preload, assembler: Assembler::new(), scratch: vec![0.0; ndof] };
    let cases = drive.cases();
    let without =
        cases.iter().enumerate().map(|(i, a)| tangents.assemble(TangentKind::Without, a, i == 0)).collect::<Result<Vec<_>, _>>()?;
    let preload_forces = tangents.scratch.clone();
    let mut stiffness: Vec<DynamicStiffness> =
        drive.driven.iter().map(|d| DynamicStiffness { set: d.set.clone(), component: d.component, ..Default::default() }).collect();
    let reported: Vec<&Component> = drive.components.iter().filter(|c| c.reported()).collect();
    stiffness.extend(reported.iter().map(|c| DynamicStiffness {
        set: bodies.bodies[c.body].name.clone(),
        component: c.k,
        insert: true,
        ..Default::default()
    }));
    for &f in &frequencies {
        let forces = tangents.vibrate(TAU * f, &cases, &without, &mut block)?;
        let v = superpose(stage, &drive, &forces, bodies, &preload_forces)?;
        for (s, d) in stiffness.iter_mut().zip(&drive.driven) {
            let (mut re, mut im) = (0.0, 0.0);
            for &n in &d.nodes {
                re += v.force[n * disc.dim + d.component];
                im += v.force[ndof + n * disc.dim + d.component];
            }
            s.storage.push(re / d.amplitude);
            s.loss.push(im / d.amplitude);
        }
        for (s, c) in stiffness[drive.driven.len()..].iter_mut().zip(&reported) {
            let i = drive.components.iter().position(|x| std::ptr::eq(x, *c)).expect("listed");
            // K* = force amplitude / motion amplitude (complex division).
            let (force, q) = match c.role {
                Role::Driven(_) => (v.generalized[i], v.coordinates[i]),
                Role::Free(f) => ((f, 0.0), v.coordinates[i]),
            };
            let m2 = q.0 * q.0 + q.1 * q.1;
            s.storage.push((force.0 * q.0 + force.1 * q.1) / m2);
            s.loss.push((force.1 * q.0 - force.0 * q.1) / m2);
        }
    }
    tangents.preload.contacts.restore();
    Ok(DynamicResult { stage: si, stage_name: stage.name.clone(), frequencies, stiffness })
}
