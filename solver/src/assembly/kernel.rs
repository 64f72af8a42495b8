//! The integration-point kernel: the one place where an element meets a
//! material. The element supplies the kinematics of each Gauss point
//! ([`kinematics`]); the material is evaluated there (the isochoric part
//! alone for a mixed element, whose pressure comes from the volumetric law
//! at the element's dilatation); the element integrates the answers
//! ([`integrate_into`], [`point_states_into`]).

use std::cell::RefCell;

use nalgebra::Matrix3;
use thiserror::Error;

use super::history::ElementHistory;
use crate::element::planar;
use crate::element::pressure_space::PressureSpace;
use crate::element::solid::{self, SolidKinematics, TangentLanes, MAX_SOLID_NODES};
use crate::element::spatial::{Input, Output};
use crate::element::taylor_hood::{integrate_continuous_into, PressureResponse};
use crate::element::{
    integrate_into, kinematics_into, point_states_into, reference_geometry_into, Analysis, ElementError, ElementKinematics, Formulation,
    MixedState, PointResponse, PointState, Shape, VolumetricResponse, MAX_POINTS,
};
use crate::material::{Material, MaterialError, PointHistory};

/// What one element needs besides its node positions and displacements.
#[derive(Debug, Clone, Copy)]
pub struct ElementContext<'a> {
    /// Element shape (node count, integration rule).
    pub shape: Shape,
    /// How a 2-D section is read (axisymmetric, plane strain) or 3-D.
    pub analysis: Analysis,
    /// Mixed (mean dilatation) or plain displacement element.
    pub formulation: Formulation,
    /// Material of the element's region.
    pub material: &'a Material,
}

/// Failure of one element evaluation (the caller adds the element index).
#[derive(Debug, Clone, PartialEq, Error)]
pub enum KernelError {
    /// The element's geometry failed: an inverted point or a bad reference element.
    #[error(transparent)]
    Element(#[from] ElementError),
    /// The material could not be evaluated at an integration point (e.g. at
    /// the eight-chain locking stretch).
    #[error("material at integration point {point}: {source}")]
    Material {
        /// Integration point (0 for the element's volumetric law).
        point: usize,
        /// What the material reported.
        source: MaterialError,
    },
}

/// A material failure at `point`; a non-positive volume is an inversion.
fn material_error(source: MaterialError, point: usize, j: f64) -> KernelError {
    match source {
        MaterialError::NonPositiveVolume { .. } => KernelError::Element(ElementError::Inverted { point, j }),
        source => KernelError::Material { point, source },
    }
}

/// The volumetric law of a mixed element at its dilatations
/// ([`ElementKinematics::dilatations`]) into `out`; returns their count.
/// Constant pressure: the carried θ and p of the three-field form when
/// `state` is given, else θ = v/V and p = U'(θ). Linear pressure: the law at
/// the projected θ_h of every point (always condensed from u).
fn volumetric(
    material: &Material,
    kin: &ElementKinematics,
    state: Option<&MixedState>,
    out: &mut [VolumetricResponse; MAX_POINTS],
) -> Result<usize, KernelError> {
    let law = &material.volumetric;
    let mut theta = [0.0; MAX_POINTS];
    let count = kin.dilatations(&mut theta)?;
    if kin.pressure_space() == PressureSpace::Linear {
        for (q, (&t, o)) in theta.iter().zip(out.iter_mut()).take(count).enumerate() {
            let at = |e| material_error(e, q, t);
            let energy = law.energy(t).map_err(at)?;
            let law_pressure = law.pressure(t).map_err(at)?;
            let stiffness = law.pressure_derivative(t).map_err(at)?;
            *o = VolumetricResponse { energy, pressure: law_pressure, law_pressure, stiffness };
        }
        return Ok(count);
    }
    out[0] = constant_volumetric(material, theta[0], state)?;
    Ok(1)
}

/// The volumetric law of a constant-pressure element at mean dilatation
/// `ratio`: at the carried θ and p of the three-field form when `state` is
/// given, else at θ = v/V with p = U'(θ).
fn constant_volumetric(material: &Material, ratio: f64, state: Option<&MixedState>) -> Result<VolumetricResponse, KernelError> {
    let law = &material.volumetric;
    let theta = state.map(|s| s.dilatation).unwrap_or(ratio);
    let at_theta = |e| material_error(e, 0, theta);
    let energy = law.energy(ratio).map_err(|e| material_error(e, 0, ratio))?;
    let law_pressure = law.pressure(theta).map_err(at_theta)?;
    let stiffness = law.pressure_derivative(theta).map_err(at_theta)?;
    let pressure = state.map(|s| s.pressure).unwrap_or(law_pressure);
    Ok(VolumetricResponse { energy, pressure, law_pressure, stiffness })
}

/// The material's answer at every Gauss point: the isochoric part alone for
/// the mixed form (it adds the element pressure itself), the full one
/// otherwise. A material with history reads and writes its values in
/// `history` (point after point); one without is evaluated without it.
/// Without `tangent` the material gives its stress alone (see [`point_response`]).
fn responses(
    material: &Material,
    mixed: bool,
    tangent: bool,
    kin: &ElementKinematics,
    history: Option<&mut ElementHistory>,
    out: &mut [PointResponse],
) -> Result<(), KernelError> {
    let mut history = history.filter(|_| material.history_len() > 0);
    for (q, (k, r)) in kin.points().iter().zip(out.iter_mut()).enumerate() {
        let c = k.right_cauchy_green();
        point_response(material, mixed, tangent, &c, q, history.as_deref_mut(), r).map_err(|e| material_error(e, q, k.j))?;
    }
    Ok(())
}

/// The material's answer at point `q` of right Cauchy–Green tensor `c` (see
/// [`responses`]) into `out` (in place: no copy of the answer through a
/// `Result`); `history` only for a material that keeps one. Without
/// `tangent` (a residual-only evaluation) a material without history
/// computes its energy and stress alone, the same bits, and the answer's
/// tangent is zero; one with history answers in full.
fn point_response(
    material: &Material,
    mixed: bool,
    tangent: bool,
    c: &Matrix3<f64>,
    q: usize,
    history: Option<&mut ElementHistory>,
    out: &mut PointResponse,
) -> Result<(), MaterialError> {
    if !tangent && history.is_none() {
        let s = if mixed { material.isochoric_stress(c) } else { material.stress(c) }?;
        *out = PointResponse { energy: s.energy, stress: s.stress, ..PointResponse::default() };
        return Ok(());
    }
    let resp = match history {
        Some(h) => {
            let width = material.history_len();
            let at = q * width..(q + 1) * width;
            let mut point =
                PointHistory { previous: &h.previous[at.clone()], current: &mut h.current[at], time_step: h.time_step, tangent: h.tangent };
            material.response_with_history(c, !mixed, &mut point)
        }
        None if mixed => material.isochoric_response(c),
        None => material.response(c),
    };
    // Read in place (`ref`): moving the answer out of the `Result` first
    // would copy it once more.
    match resp {
        Ok(ref r) => {
            out.energy = r.energy;
            out.stress = r.stress;
            out.tangent = r.tangent;
            Ok(())
        }
        Err(e) => Err(e),
    }
}

thread_local! {
    /// Each thread's [`MaterialAt`] buffer, reused element after element.
    static SCRATCH: RefCell<Box<MaterialAt>> = RefCell::new(Box::new(MaterialAt::blank()));
}

/// Runs `f` with this thread's element buffer.
fn with_scratch<R>(f: impl FnOnce(&mut MaterialAt) -> R) -> R {
    SCRATCH.with(|s| f(&mut s.borrow_mut()))
}

/// One element's kinematics with the material evaluated at its points.
struct MaterialAt {
    kinematics: ElementKinematics,
    /// The volumetric law at the element's dilatations (mixed elements only).
    volumetric: [VolumetricResponse; MAX_POINTS],
    /// How many entries of `volumetric` hold (0 for a displacement element).
    volumetric_count: usize,
    responses: [PointResponse; MAX_POINTS],
    /// F and J of a spatial-form element ([`element_cached_into`]).
    solid: SolidKinematics,
    /// The tangent lanes of a spatial-form element.
    lanes: TangentLanes,
    /// Reference geometry of a spatial-form element evaluated without a
    /// cache ([`element_with_history_into`]).
    grads: [[f64; 3]; MAX_SOLID_NODES * MAX_POINTS],
    dv: [f64; MAX_POINTS],
}

impl MaterialAt {
    fn blank() -> Self {
        MaterialAt {
            kinematics: ElementKinematics::blank(),
            volumetric: [VolumetricResponse::default(); MAX_POINTS],
            volumetric_count: 0,
            responses: [PointResponse::default(); MAX_POINTS],
            solid: SolidKinematics::default(),
            lanes: TangentLanes::default(),
            grads: [[0.0; 3]; MAX_SOLID_NODES * MAX_POINTS],
            dv: [0.0; MAX_POINTS],
        }
    }

    /// Fills `self` for one element, in place (no copy of the buffers,
    /// which are sized for the largest element).
    /// Without `tangent` the material answers with its stress alone.
    fn evaluate(
        &mut self,
        ctx: &ElementContext,
        x: &[[f64; 3]],
        u: &[[f64; 3]],
        state: Option<&MixedState>,
        history: Option<&mut ElementHistory>,
        tangent: bool,
    ) -> Result<(), KernelError> {
        kinematics_into(ctx.shape, ctx.analysis, x, u, &mut self.kinematics)?;
        let condensed = ctx.formulation == Formulation::Mixed;
        self.volumetric_count = 0;
        if condensed {
            self.volumetric_count = volumetric(ctx.material, &self.kinematics, state, &mut self.volumetric)?;
        }
        let points = self.kinematics.points().len();
        responses(ctx.material, ctx.formulation.is_mixed(), tangent, &self.kinematics, history, &mut self.responses[..points])
    }

    fn volumetric(&self) -> &[VolumetricResponse] {
        &self.volumetric[..self.volumetric_count]
    }

    fn responses(&self) -> &[PointResponse] {
        &self.responses[..self.kinematics.points().len()]
    }
}

/// Internal force (and, if asked, the tangent, column-major ND×ND) of one
/// element into caller buffers of length `shape.dofs()` and its square.
/// `x` are the reference node positions and `u` the node displacements, both
/// with three entries per node (the third ignored in 2-D). Returns the
/// element's strain energy.
pub fn element_into(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
) -> Result<f64, KernelError> {
    element_with_state_into(ctx, x, u, force, stiffness, None)
}

/// As [`element_into`], with the mixed element's pressure and dilatation
/// taken from `state` (three-field form) instead of condensed from u.
/// Ignored by displacement elements.
pub fn element_with_state_into(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    state: Option<&mut MixedState>,
) -> Result<f64, KernelError> {
    element_with_history_into(ctx, x, u, force, stiffness, state, None)
}

/// As [`element_with_state_into`], with the history of the element's
/// integration points (materials with memory: see [`super::history`]).
pub fn element_with_history_into(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    state: Option<&mut MixedState>,
    history: Option<&mut ElementHistory>,
) -> Result<f64, KernelError> {
    if spatial_form(ctx.shape, ctx.analysis, ctx.formulation) {
        return with_scratch(|at| {
            let (nodes, points) = (ctx.shape.nodes(), ctx.shape.points());
            let MaterialAt { grads, dv, solid, responses, lanes, .. } = at;
            let (grads, dv) = (&mut grads[..nodes * points], &mut dv[..points]);
            reference_geometry_into(ctx.shape, ctx.analysis, x, grads, dv)?;
            let geometry = ReferenceGeometry { grads, dv };
            spatial(solid, responses, lanes, ctx, geometry, u, force, stiffness, state, history)
        });
    }
    element_through(integrate_into, ctx, x, u, force, stiffness, state, history)
}

/// Whether an element takes the spatial form from cached reference
/// geometry: a 3-D solid ([`solid::supports`]) or a 2-D element
/// ([`planar::supports`]).
pub fn spatial_form(shape: Shape, analysis: Analysis, formulation: Formulation) -> bool {
    solid::supports(shape, analysis, formulation) || planar::supports(shape, analysis, formulation)
}

/// The reference gradients ∂N_a/∂X (`grads[q · nodes + a]`; a 2-D
/// element's third entry N_a/R, axisymmetric) and volume weights (`dv[q]`)
/// of one spatial-form element, computed once ([`reference_geometry_into`])
/// and kept by the discretization.
#[derive(Debug, Clone, Copy)]
pub struct ReferenceGeometry<'a> {
    /// ∂N_a/∂X at every point, point after point.
    pub grads: &'a [[f64; 3]],
    /// Reference volume weight of every point.
    pub dv: &'a [f64],
}

/// As [`element_with_history_into`] for an element that takes the spatial
/// form ([`spatial_form`]), from its cached reference geometry: the
/// assembler's entry point for the 3-D solids and the 2-D elements.
pub fn element_cached_into(
    ctx: &ElementContext,
    geometry: ReferenceGeometry,
    u: &[[f64; 3]],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    state: Option<&mut MixedState>,
    history: Option<&mut ElementHistory>,
) -> Result<f64, KernelError> {
    with_scratch(|at| spatial(&mut at.solid, &mut at.responses, &mut at.lanes, ctx, geometry, u, force, stiffness, state, history))
}

/// The spatial-form element, with buffers for its kinematics, the
/// material's answers and the tangent lanes.
fn spatial(
    kin: &mut SolidKinematics,
    responses: &mut [PointResponse; MAX_POINTS],
    lanes: &mut TangentLanes,
    ctx: &ElementContext,
    geometry: ReferenceGeometry,
    u: &[[f64; 3]],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    state: Option<&mut MixedState>,
    history: Option<&mut ElementHistory>,
) -> Result<f64, KernelError> {
    let nodes = ctx.shape.nodes();
    let planar = ctx.analysis != Analysis::Solid3d;
    // Each branch its own instance of `fill`, so F is formed inline.
    if planar {
        kin.fill(nodes, geometry.grads, geometry.dv, u, planar::deformation_gradient)?;
    } else {
        kin.fill(nodes, geometry.grads, geometry.dv, u, solid::deformation_gradient)?;
    }
    let mixed = ctx.formulation == Formulation::Mixed;
    let volumetric = if mixed { Some(constant_volumetric(ctx.material, kin.volume_ratio(), state.as_deref())?) } else { None };
    let mut history = history.filter(|_| ctx.material.history_len() > 0);
    let want_k = stiffness.is_some();
    for (q, (p, r)) in kin.points().iter().zip(responses.iter_mut()).enumerate() {
        let c = p.f.transpose() * p.f;
        point_response(ctx.material, mixed, want_k, &c, q, history.as_deref_mut(), r).map_err(|e| material_error(e, q, p.j))?;
    }
    let state = if mixed { state } else { None };
    let responses = &responses[..kin.count];
    let input = Input { grads: geometry.grads, dv: geometry.dv, kin, responses, volumetric: volumetric.as_ref() };
    let out = Output { force, stiffness, state };
    Ok(if planar {
        planar::planar_integrate_into(nodes, ctx.analysis == Analysis::Axisymmetric, input, out)?
    } else {
        solid::solid_integrate_into(nodes, input, out, lanes)?
    })
}

/// The element integration [`element_with_state_into`] hands the material's answers to.
pub(crate) type Integration = fn(
    &ElementKinematics,
    &[PointResponse],
    &[VolumetricResponse],
    &mut [f64],
    Option<&mut [f64]>,
    Option<&mut MixedState>,
) -> Result<f64, ElementError>;

/// [`element_with_history_into`] through a given element integration (the
/// kernel parity test passes the reference one).
pub(crate) fn element_through(
    integration: Integration,
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    state: Option<&mut MixedState>,
    history: Option<&mut ElementHistory>,
) -> Result<f64, KernelError> {
    with_scratch(|at| {
        at.evaluate(ctx, x, u, state.as_deref(), history, stiffness.is_some())?;
        let state = if at.volumetric_count > 0 { state } else { None };
        Ok(integration(&at.kinematics, at.responses(), at.volumetric(), force, stiffness, state)?)
    })
}

/// Per-point results of one element into `out` (length ≥ `shape.points()`).
pub fn point_states(ctx: &ElementContext, x: &[[f64; 3]], u: &[[f64; 3]], out: &mut [PointState]) -> Result<(), KernelError> {
    point_states_with_history(ctx, x, u, &[], None, out)
}

/// As [`point_states`] for a converged state whose history values are
/// `converged` (as stored for the element): the material is evaluated at a
/// zero time step from them, which reproduces the converged stress.
/// `pressures`: the corner values of a continuous pressure (stress units,
/// [`crate::assembly::Discretization::gather_pressures`]), empty otherwise.
pub fn point_states_with_history(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    pressures: &[f64],
    converged: Option<&[f64]>,
    out: &mut [PointState],
) -> Result<(), KernelError> {
    let mut scratch = converged.map(<[f64]>::to_vec);
    let mut history = converged.zip(scratch.as_deref_mut()).map(|(previous, current)| ElementHistory {
        previous,
        current,
        time_step: 0.0,
        tangent: Default::default(),
    });
    with_scratch(|at| {
        at.evaluate(ctx, x, u, None, history.as_mut(), false)?;
        point_states_into(&at.kinematics, at.responses(), at.volumetric(), out)?;
        if ctx.formulation == Formulation::ContinuousPressure {
            let mut laws = [PressureResponse::default(); MAX_POINTS];
            let count = pressure_laws(ctx.material, &at.kinematics, pressures, &mut laws)?;
            for (o, law) in out.iter_mut().zip(&laws[..count]) {
                o.cauchy += nalgebra::Matrix3::identity() * law.pressure;
                o.pressure = -o.cauchy.trace() / 3.0;
                o.energy_density += law.energy;
            }
        }
        Ok(())
    })
}

/// The volumetric law at the continuous pressure p_h of every point
/// (from the corner values `pressures`, stress units) into `out`: θ(p_h)
/// solving U'(θ) = p_h, 1/U''(θ), U*(p_h) and U(θ). Returns the point count.
fn pressure_laws(
    material: &Material,
    kin: &ElementKinematics,
    pressures: &[f64],
    out: &mut [PressureResponse; MAX_POINTS],
) -> Result<usize, KernelError> {
    let law = &material.volumetric;
    let mut p = [0.0; MAX_POINTS];
    let count = kin.continuous_pressures(pressures, &mut p);
    for (q, (&pq, o)) in p.iter().zip(out.iter_mut()).take(count).enumerate() {
        let at = |e| material_error(e, q, pq);
        let theta = law.volume_ratio_at_pressure(pq).map_err(at)?;
        let reached = law.pressure(theta).map_err(at)?;
        let stiffness = law.pressure_derivative(theta).map_err(at)?;
        if !((reached - pq).abs() <= 1e-8 * (pq.abs() + law.bulk_modulus)) || !(stiffness > 0.0) {
            // Past the law's largest pressure (logarithmic law, J > e): no volume gives it.
            return Err(KernelError::Element(ElementError::Inverted { point: q, j: theta }));
        }
        let energy = law.energy(theta).map_err(at)?;
        *o = PressureResponse { pressure: pq, dilatation: theta, compliance: 1.0 / stiffness, complementary: pq * theta - energy, energy };
    }
    Ok(count)
}

/// Force and tangent of an element with a continuous pressure
/// ([`crate::element::taylor_hood`]) into buffers of length
/// `shape.dofs() + corners` and its square: displacement dofs first, then
/// the scaled pressure unknowns. `pressures` are the corner values in
/// stress units, `scale` is s of `p = s π`. Returns the element's share of
/// the stationary functional.
#[allow(clippy::too_many_arguments)]
pub fn element_continuous_into(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    pressures: &[f64],
    scale: f64,
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    history: Option<&mut ElementHistory>,
) -> Result<f64, KernelError> {
    with_scratch(|at| {
        at.evaluate(ctx, x, u, None, history, stiffness.is_some())?;
        let mut laws = [PressureResponse::default(); MAX_POINTS];
        let count = pressure_laws(ctx.material, &at.kinematics, pressures, &mut laws)?;
        Ok(integrate_continuous_into(&at.kinematics, at.responses(), &laws[..count], scale, force, stiffness)?)
    })
}
