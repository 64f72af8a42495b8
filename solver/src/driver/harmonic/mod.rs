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
//! acting on the driven nodes themselves is not included.

mod block;

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

use super::stages::StageProgram;

/// One driven set and component: its nodes and amplitude.
struct Driven {
    set: String,
    component: usize,
    nodes: Vec<usize>,
    amplitude: f64,
}

/// The amplitudes of a harmonic stage: the global amplitude vector, the
/// prescribed flags of the vibration, and the driven sets.
struct Drive {
    amplitude: Vec<f64>,
    prescribed: Vec<bool>,
    driven: Vec<Driven>,
}

impl Drive {
    fn new(disc: &Discretization, si: usize, held: &[bool]) -> Result<Self, SolveError> {
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
        if driven.is_empty() {
            return Err(harmonic_error(stage, "no motion with a non-zero amplitude drives it".into()));
        }
        Ok(Drive { amplitude, prescribed, driven })
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
    /// Inserts (each must be held in the stage).
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
    amplitude: &'s [f64],
    preload: Preload<'r>,
    assembler: Assembler,
    scratch: Vec<f64>,
}

impl Tangents<'_, '_> {
    /// The tangent with the isochoric stiffness of relaxing materials as `kind` says.
    fn assemble(&mut self, kind: TangentKind) -> Result<Assembled, SolveError> {
        let mut k = vec![0.0; self.pattern.nnz()];
        let mut rhs = vec![0.0; self.dofs.n_free];
        let mut skew = Vec::new();
        self.set_kind(kind);
        let out = Outputs {
            internal: &mut self.scratch,
            tangent: Some(&mut k),
            predictor: Some((self.amplitude, &mut rhs)),
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
            tangent: Some(&mut k),
            skew: Some(&mut skew),
            predictor: Some((self.amplitude, &mut rhs)),
        };
        for p in &self.prog.pressures {
            add_pressure(mesh, self.disc.model.analysis, &p.sides, p.end, self.preload.u, &mut system);
        }
        if !self.preload.contacts.is_empty() {
            self.preload.contacts.evaluate(&mesh.nodes, self.preload.u, 1.0, &mut system);
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
}

/// Runs harmonic stage `si` about the converged state: the complex stiffness
/// of every driven set and component at every frequency.
pub fn run(disc: &Discretization, si: usize, prog: &StageProgram, preload: Preload) -> Result<DynamicResult, SolveError> {
    let model = disc.model;
    let stage = &model.stages[si];
    let frequencies = stage.harmonic.as_ref().map(|h| h.frequencies.clone()).unwrap_or_default();
    if si == 0 {
        return Err(harmonic_error(stage, "a harmonic stage vibrates about a preloaded state: it cannot come first".into()));
    }
    if preload.inserts.unknowns() > 0 {
        return Err(harmonic_error(
            stage,
            "every insert must be held during a harmonic stage (an insert with a load is not supported)".into(),
        ));
    }
    if let Some(f) = frequencies.iter().find(|f| !(f.is_finite() && **f > 0.0)) {
        return Err(harmonic_error(stage, format!("frequencies must be positive, got {f}")));
    }
    let drive = Drive::new(disc, si, &prog.prescribed)?;
    let dofs = DofMap::with_pressures(disc.dim, &drive.prescribed, &disc.pressures.of_node);
    let pattern = Pattern::build(disc, &dofs)?;
    let mut block = BlockSystem::new(&pattern, &model.linear)?;
    let ndof = preload.u.len();
    let mut tangents = Tangents {
        disc,
        prog,
        dofs: &dofs,
        pattern: &pattern,
        amplitude: &drive.amplitude,
        preload,
        assembler: Assembler::new(),
        scratch: vec![0.0; ndof],
    };
    let without = tangents.assemble(TangentKind::Without)?;
    let mut stiffness: Vec<DynamicStiffness> =
        drive.driven.iter().map(|d| DynamicStiffness { set: d.set.clone(), component: d.component, ..Default::default() }).collect();
    for &f in &frequencies {
        let omega = TAU * f;
        let storage = tangents.assemble(TangentKind::Storage(omega))?;
        let loss = tangents.assemble(TangentKind::Loss(omega))?;
        let k_loss: Vec<f64> = loss.k.iter().zip(&without.k).map(|(a, b)| a - b).collect();
        let f_imag: Vec<f64> = loss.rhs.iter().zip(&without.rhs).map(|(a, b)| a - b).collect();
        block.factorize(&storage.k, &storage.skew, &k_loss)?;
        let (x_real, x_imag) = block.solve(&storage.rhs, &f_imag)?;
        // The motion v = v_r + i v_i at every dof: amplitudes at driven dofs, the solution at free ones.
        let mut vectors = drive.amplitude.clone();
        vectors.resize(2 * ndof, 0.0);
        for d in 0..ndof {
            let q = dofs.eq[d];
            if q != NONE {
                vectors[d] = x_real[q];
                vectors[ndof + d] = x_imag[q];
            }
        }
        let ps = tangents.products(TangentKind::Storage(omega), &vectors)?;
        let pl = tangents.products(TangentKind::Loss(omega), &vectors)?;
        let pw = tangents.products(TangentKind::Without, &vectors)?;
        // F = (K′ + i K″)(v_r + i v_i), K″ = K_loss − K_without.
        let force = |d: usize| {
            let k2 = |v: usize| pl[v * ndof + d] - pw[v * ndof + d];
            (ps[d] - k2(1), k2(0) + ps[ndof + d])
        };
        for (s, d) in stiffness.iter_mut().zip(&drive.driven) {
            let (mut re, mut im) = (0.0, 0.0);
            for &n in &d.nodes {
                let (a, b) = force(n * disc.dim + d.component);
                re += a;
                im += b;
            }
            s.storage.push(re / d.amplitude);
            s.loss.push(im / d.amplitude);
        }
    }
    tangents.preload.contacts.restore();
    Ok(DynamicResult { stage: si, stage_name: stage.name.clone(), frequencies, stiffness })
}
