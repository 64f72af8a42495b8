//! The contact law at one rubber node touching one rigid surface: normal
//! pressure by an augmented Lagrangian (penalty plus a multiplier updated
//! between solves, so penetration can be driven below a tolerance without a
//! stiff penalty), and Coulomb friction regularised by a tangential penalty
//! (elastic "stick" up to μ·p, then slip with a return map).
//!
//! Forces are per node: pressure × tributary area. The residual convention is
//! `R = f_int − f_ext`, so the node's residual contribution is `−f` and its
//! tangent contribution `−∂f/∂x`:
//!
//! ```text
//! normal:  f = p A n,  p = max(0, λ − ε_n g)
//!          −∂f/∂x = A (ε_n n⊗n − p ∂n/∂x)                          (active)
//! stick:   t = −ε_t P (x − x_anchor),  −∂t/∂x = A ε_t P           (P = I − n⊗n)
//! slip:    t = μ p s,  s = t_trial/|t_trial|
//!          −∂t/∂x = A [μ p ε_t/|t_trial| (P − s⊗s) + μ ε_n s⊗n]   (non-symmetric)
//! ```
//!
//! Between the two, over |t_trial| ∈ [(1 − δ_f), (1 + δ_f)] μ p, the
//! magnitude is rounded (C¹, see [`rounded_friction`]):
//!
//! ```text
//! t = μ p φ(|t_trial|/μ p) s
//! ```

use nalgebra::{Matrix3, Vector3};

use super::surface::Projection;
use crate::model::{settings, SettingsError};

/// Parameters of one contact pair.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ContactParameters {
    /// Normal penalty ε_n: pressure per unit penetration (stress / length).
    pub normal_penalty: f64,
    /// Tangential penalty ε_t: shear traction per unit elastic slip (stress / length).
    pub tangential_penalty: f64,
    /// Coulomb friction coefficient μ (0: frictionless).
    pub friction: f64,
    /// Width δ (stress units) over which the pressure law p = max(0, λ − ε g)
    /// is rounded (C¹) near p = 0, so a node at the edge of the contact does
    /// not flip between open and closed from one Newton iteration to the next.
    /// 0 gives the sharp law.
    pub smoothing: f64,
    /// Relative width δ_f over which the friction law turns from stick to
    /// slip: the shear traction follows the elastic trial value up to
    /// (1 − δ_f) μ p and reaches μ p at (1 + δ_f) μ p with a continuous
    /// tangent (C¹), so nodes at the friction limit of a sliding seal do not
    /// switch between the stick and the slip tangent from one Newton iteration
    /// to the next. The traction never exceeds μ p. 0 gives the sharp law.
    pub slip_rounding: f64,
}

impl ContactParameters {
    /// Checks the parameters: penalties, friction and smoothing non-negative
    /// and finite (a zero penalty is filled in per node by the pair), the
    /// slip rounding in [0, 1).
    pub fn validate(&self) -> Result<(), SettingsError> {
        let check = |field, value, ok, requirement| settings::check(|| "contact parameters".into(), field, value, ok, requirement);
        check("normal_penalty", self.normal_penalty, self.normal_penalty >= 0.0, "non-negative")?;
        check("tangential_penalty", self.tangential_penalty, self.tangential_penalty >= 0.0, "non-negative")?;
        check("friction", self.friction, self.friction >= 0.0, "non-negative")?;
        check("smoothing", self.smoothing, self.smoothing >= 0.0, "non-negative")?;
        check("slip_rounding", self.slip_rounding, (0.0..1.0).contains(&self.slip_rounding), "in [0, 1)")
    }

    /// The parameters, if [`Self::validate`] accepts them.
    pub fn checked(self) -> Result<Self, SettingsError> {
        self.validate().map(|_| self)
    }
}

/// The rounded friction magnitude: for `x = |t_trial| / (μ p)`, the ratio
/// `φ(x) = |t| / (μ p)` (x below 1 − δ, 1 above 1 + δ, a parabola between)
/// and `φ'(x)`.
pub fn rounded_friction(x: f64, delta: f64) -> (f64, f64) {
    if x <= 1.0 - delta {
        (x, 1.0)
    } else if x >= 1.0 + delta {
        (1.0, 0.0)
    } else {
        let d = x - (1.0 - delta);
        (x - d * d / (4.0 * delta), 1.0 - d / (2.0 * delta))
    }
}

/// The pressure for trial value `x = λ − ε g`, rounded over `|x| < δ`:
/// 0 below −δ, `(x + δ)² / 4δ` inside, `x` above; returns `(p, dp/dx)`.
pub fn smoothed_pressure(x: f64, delta: f64) -> (f64, f64) {
    if x >= delta {
        (x, 1.0)
    } else if x <= -delta {
        (0.0, 0.0)
    } else {
        ((x + delta).powi(2) / (4.0 * delta), (x + delta) / (2.0 * delta))
    }
}

/// Whether the node touches, and how.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Status {
    /// Not touching: no pressure, no friction (default).
    #[default]
    Open,
    /// Touching without sliding: the tangential force is below the friction limit.
    Stick,
    /// Touching and sliding: the tangential force equals the friction limit.
    Slip,
}

/// History of one contact node between increments.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct NodeState {
    /// Normal multiplier λ (pressure) from the augmentation updates.
    pub multiplier: f64,
    /// Stick anchor in the surface's own frame at the last converged state
    /// (None: no tangential history, e.g. the node was open).
    pub anchor: Option<Vector3<f64>>,
    /// Where an open node was at the last converged state, for the anchor
    /// of its first contact (None: touching, or out of the surface's reach).
    pub approach: Option<Approach>,
}

/// An open node at the last converged state, in the surface's own frame:
/// its position, its gap there and its motion over that increment.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Approach {
    /// Position.
    pub from: Vector3<f64>,
    /// Gap at that position (≥ 0).
    pub gap: f64,
    /// Motion over the last converged increment (zero when the node was
    /// not open at its start).
    pub moved: Vector3<f64>,
}

impl Approach {
    /// Where the node reaches the surface (outward normal `normal` at
    /// `from`) if it goes on by `drift`: from + θ drift with θ the fraction
    /// of the drift that closes the gap, θ = g₀ / (−n·drift), at most 1
    /// (a drift that does not close the gap: where it ends; no drift: where
    /// the node is, as if it approached along the normal).
    pub fn entry(&self, drift: &Vector3<f64>, normal: &Vector3<f64>) -> Vector3<f64> {
        let closing = -normal.dot(drift);
        let theta = if closing > self.gap { self.gap.max(0.0) / closing } else { 1.0 };
        self.from + drift * theta
    }
}

/// What the law gives at the current iterate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NodeResponse {
    /// Open, stick or slip.
    pub status: Status,
    /// Contact pressure p (stress units, ≥ 0).
    pub pressure: f64,
    /// Tangential (friction) traction vector (stress units).
    pub shear: Vector3<f64>,
    /// Force on the rubber node (pressure and shear × area).
    pub force: Vector3<f64>,
    /// Tangent −∂force/∂x (non-symmetric with friction).
    pub stiffness: Matrix3<f64>,
    /// Elastic slip vector (tangential distance from the anchor), for output and the anchor update.
    pub slip: Vector3<f64>,
    /// ∂force/∂λ: how the force follows the multiplier through the
    /// pressure (normal and, sliding, friction part), for the multiplier's
    /// Newton update (see `ContactPair::evaluate_into`).
    pub rate: Vector3<f64>,
}

impl NodeResponse {
    /// A node not touching: no force, no stiffness.
    pub fn open() -> Self {
        NodeResponse {
            status: Status::Open,
            pressure: 0.0,
            shear: Vector3::zeros(),
            force: Vector3::zeros(),
            stiffness: Matrix3::zeros(),
            slip: Vector3::zeros(),
            rate: Vector3::zeros(),
        }
    }
}

/// Which tangent the law returns for a sliding node.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum FrictionTangent {
    /// The law's own derivative (default).
    #[default]
    Consistent,
    /// The elastic stick tangent `A ε_t ∂slip/∂x` while the force stays the
    /// law's (sliding at μ p): for a node whose slip reversed since the last
    /// Newton step (see `ContactPair::evaluate_into`).
    Stick,
}

/// Evaluates the law. `anchor_global` is the stick anchor moved with the
/// surface into the current frame (None when the node has no stick history).
/// `tangent` chooses the friction tangent of a sliding node; the force is the
/// law's either way.
pub fn evaluate(
    proj: &Projection,
    x: &Vector3<f64>,
    area: f64,
    params: &ContactParameters,
    state: &NodeState,
    anchor_global: Option<Vector3<f64>>,
    tangent: FrictionTangent,
) -> NodeResponse {
    let n = proj.normal;
    let trial = state.multiplier - params.normal_penalty * proj.gap;
    let (p, dp) = smoothed_pressure(trial, params.smoothing);
    if p <= 0.0 {
        return NodeResponse::open();
    }
    // Effective normal stiffness ∂p/∂(−g).
    let eps = params.normal_penalty * dp;
    let nn = n * n.transpose();
    let mut stiffness = (nn * eps - proj.normal_derivative * p) * area;
    let mut shear = Vector3::zeros();
    let mut slip = Vector3::zeros();
    let mut status = Status::Stick;
    let mut rate = n * (dp * area);
    // A node that was not touching at the last converged state sticks where
    // it is expected to reach the surface (`Approach::entry`); one out of
    // the surface's reach then has no stick point and slides freely for the
    // increment (its anchor is set when the increment converges).
    if let (true, Some(anchor)) = (params.friction > 0.0, anchor_global) {
        let proj_t = Matrix3::identity() - nn;
        let d = x - anchor;
        slip = proj_t * d;
        // ∂slip/∂x = P − (n·d) ∂n/∂x − n ⊗ (∂n/∂x d): the normal turns with the
        // point on curved surfaces.
        let dn = &proj.normal_derivative;
        let dslip = proj_t - dn * n.dot(&d) - n * (dn * d).transpose();
        let t_trial = -slip * params.tangential_penalty;
        let t_norm = t_trial.norm();
        let limit = params.friction * p;
        let x_ratio = t_norm / limit;
        let (phi, dphi) = rounded_friction(x_ratio, params.slip_rounding);
        if x_ratio > 1.0 {
            status = Status::Slip;
        }
        if dphi == 1.0 || t_norm == 0.0 {
            // Elastic stick: t = t_trial.
            shear = t_trial;
            stiffness += dslip * (params.tangential_penalty * area);
        } else {
            // t = m s with m = μ p φ(x), s = t_trial / |t_trial|:
            // −∂t/∂x = [m ε_t/|t_trial| (I − s⊗s) + φ' ε_t s⊗s] ∂slip/∂x + (φ − x φ') μ ε s⊗n.
            let s = t_trial / t_norm;
            let m = limit * phi;
            shear = s * m;
            let eps_t = params.tangential_penalty;
            if tangent == FrictionTangent::Stick {
                stiffness += dslip * (eps_t * area);
            } else {
                rate += s * ((phi - x_ratio * dphi) * params.friction * dp * area);
                let ss = s * s.transpose();
                stiffness += (((Matrix3::identity() - ss) * (m * eps_t / t_norm) + ss * (dphi * eps_t)) * dslip
                    + s * n.transpose() * ((phi - x_ratio * dphi) * params.friction * eps))
                    * area;
            }
        }
    } else {
        status = Status::Slip;
    }
    NodeResponse { status, pressure: p, shear, force: (n * p + shear) * area, stiffness, slip, rate }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contact::surface::{Placement, RigidSurface, Shape};

    /// Central differences of the force with the projection recomputed.
    fn fd_check(surface: &RigidSurface, x: Vector3<f64>, params: ContactParameters, anchor: Option<Vector3<f64>>) {
        let state = NodeState { multiplier: 0.05, anchor, approach: None };
        let eval = |y: Vector3<f64>| {
            let proj = surface.project(&y).unwrap();
            evaluate(&proj, &y, 1.3, &params, &state, anchor, FrictionTangent::Consistent)
        };
        let r = eval(x);
        let h = 1e-7;
        let mut fd = Matrix3::zeros();
        for k in 0..3 {
            let mut e = Vector3::zeros();
            e[k] = h;
            fd.set_column(k, &(-(eval(x + e).force - eval(x - e).force) / (2.0 * h)));
        }
        let err = (fd - r.stiffness).norm() / r.stiffness.norm().max(1e-12);
        // Central differences with h = 1e-7 on smooth branches: O(h²) + O(ε/h) ≈ 1e-8.
        assert!(err < 1e-6, "{:?} err {err:e}\nfd {fd}\nan {}", r.status, r.stiffness);
        // ∂force/∂λ, the same way.
        let proj = surface.project(&x).unwrap();
        let at = |l: f64| {
            let shifted = NodeState { multiplier: l, ..state };
            evaluate(&proj, &x, 1.3, &params, &shifted, anchor, FrictionTangent::Consistent).force
        };
        let fd_rate = (at(state.multiplier + h) - at(state.multiplier - h)) / (2.0 * h);
        let err = (fd_rate - r.rate).norm() / r.rate.norm().max(1e-12);
        assert!(err < 1e-6, "{:?} rate err {err:e}: fd {fd_rate} an {}", r.status, r.rate);
    }

    // Consistency of the analytical tangent with the force law (mathematics,
    // no published value): normal on flat and curved surfaces, stick and slip.
    #[test]
    fn contact_tangent_matches_finite_differences() {
        let plane =
            RigidSurface { shape: Shape::Plane { point: [0.0, 0.0, 0.0], normal: [0.0, 0.0, 1.0] }, placement: Placement::default() };
        let shaft = RigidSurface {
            shape: Shape::Cylinder { point: [0.0, 0.0, 0.0], axis: [0.0, 0.0, 1.0], radius: 1.0, rubber_outside: true },
            placement: Placement::default(),
        };
        let frictionless =
            ContactParameters { normal_penalty: 100.0, tangential_penalty: 80.0, friction: 0.0, smoothing: 0.0, slip_rounding: 0.0 };
        let rough = ContactParameters { friction: 0.3, ..frictionless };
        fd_check(&plane, Vector3::new(0.1, 0.2, -0.01), frictionless, None);
        fd_check(&shaft, Vector3::new(0.9, 0.2, 0.3), frictionless, None);
        // Stick: small tangential offset from the anchor.
        fd_check(&plane, Vector3::new(0.1, 0.2, -0.01), rough, Some(Vector3::new(0.099, 0.2, 0.0)));
        // Slip: large offset.
        fd_check(&plane, Vector3::new(0.1, 0.2, -0.01), rough, Some(Vector3::new(0.0, 0.15, 0.0)));
        // On a curved surface, stick and slip (the normal turns with the point).
        fd_check(&shaft, Vector3::new(0.9, 0.2, 0.3), rough, Some(Vector3::new(0.95, 0.19, 0.299)));
        fd_check(&shaft, Vector3::new(0.9, 0.2, 0.3), rough, Some(Vector3::new(0.7, 0.6, 0.1)));
        // Inside the rounded zone of the pressure law (trial pressure within ±δ).
        let rounded = ContactParameters { smoothing: 0.5, ..rough };
        fd_check(&plane, Vector3::new(0.1, 0.2, -0.0005), rounded, Some(Vector3::new(0.099, 0.2, 0.0)));
        fd_check(&plane, Vector3::new(0.1, 0.2, 0.0012), rounded, Some(Vector3::new(0.0, 0.15, 0.0)));
        // Inside the rounded stick–slip transition: p = 1.05, μ p = 0.315,
        // |t_trial| = 80 × 0.0039 = 0.312 (x ≈ 0.99) and 80 × 0.0042 = 0.336 (x ≈ 1.07),
        // on the plane and on the shaft.
        let rounded_slip = ContactParameters { slip_rounding: 0.2, ..rough };
        fd_check(&plane, Vector3::new(0.1, 0.2, -0.01), rounded_slip, Some(Vector3::new(0.1 - 0.0039, 0.2, 0.0)));
        fd_check(&plane, Vector3::new(0.1, 0.2, -0.01), rounded_slip, Some(Vector3::new(0.1, 0.2 + 0.0042, 0.0)));
        fd_check(&shaft, Vector3::new(0.9, 0.2, 0.3), rounded_slip, Some(Vector3::new(0.9, 0.2, 0.3 + 0.029)));
    }

    // The rounded friction law is continuous with a continuous slope, equals
    // the elastic trial value below (1 − δ) and μ p above (1 + δ), and never
    // exceeds μ p (mathematics of the rounding, no published value).
    #[test]
    fn rounded_friction_joins_stick_and_slip_smoothly() {
        let d = 0.05;
        assert_eq!(rounded_friction(0.9, d), (0.9, 1.0));
        assert_eq!(rounded_friction(1.2, d), (1.0, 0.0));
        for (x, side) in [(1.0 - d, 1.0), (1.0 + d, 0.0)] {
            let (below, above) = (rounded_friction(x - 1e-12, d), rounded_friction(x + 1e-12, d));
            assert!((below.0 - above.0).abs() < 1e-11 && (below.1 - above.1).abs() < 1e-9 && (below.1 - side).abs() < 1e-9);
        }
        for i in 0..=100 {
            let x = 0.9 + 0.002 * i as f64;
            let (phi, dphi) = rounded_friction(x, d);
            assert!(phi <= 1.0 && phi <= x && (0.0..=1.0).contains(&dphi), "x {x}: {phi} {dphi}");
        }
    }

    /// A node 0.02 into a plane (ε_n 100: p = 2) and 1 from its anchor
    /// along it (ε_t 80, μ 0.4: sliding), tributary area `area`.
    fn sliding_on_a_plane(slip_rounding: f64, area: f64, tangent: FrictionTangent) -> NodeResponse {
        let plane =
            RigidSurface { shape: Shape::Plane { point: [0.0, 0.0, 0.0], normal: [0.0, 0.0, 1.0] }, placement: Placement::default() };
        let params = ContactParameters { normal_penalty: 100.0, tangential_penalty: 80.0, friction: 0.4, smoothing: 0.0, slip_rounding };
        let x = Vector3::new(1.0, 0.0, -0.02);
        evaluate(&plane.project(&x).unwrap(), &x, area, &params, &NodeState::default(), Some(Vector3::zeros()), tangent)
    }

    // The stick tangent asked for a sliding node (see
    // `ContactPair::evaluate_into`) is the elastic one, A ε_t P plus the
    // normal block, while the force stays the sliding one (definition, no
    // published value).
    #[test]
    fn a_sliding_node_asked_for_the_stick_tangent_keeps_its_force() {
        let at = |tangent| sliding_on_a_plane(0.05, 1.5, tangent);
        let (consistent, stick) = (at(FrictionTangent::Consistent), at(FrictionTangent::Stick));
        assert_eq!((stick.status, stick.force), (consistent.status, consistent.force));
        let expected = Matrix3::from_diagonal(&Vector3::new(80.0, 80.0, 100.0)) * 1.5;
        assert!((stick.stiffness - expected).norm() < 1e-9, "{}", stick.stiffness);
        assert!((consistent.stiffness - expected).norm() > 1.0, "the consistent tangent differs");
    }

    // Coulomb's law (Coulomb 1785, as in any statics text): in slip the
    // shear traction equals μ times the pressure.
    #[test]
    fn slip_traction_is_friction_times_pressure() {
        let r = sliding_on_a_plane(0.0, 1.0, FrictionTangent::Consistent);
        assert_eq!(r.status, Status::Slip);
        assert!((r.pressure - 2.0).abs() < 1e-12);
        assert!((r.shear.norm() - 0.4 * 2.0).abs() < 1e-12);
        assert!(r.shear.x < 0.0, "friction opposes the slip");
    }

    // From 0.02 above a plane, drifting (0.003, 0, −0.03) over the
    // increment, a node reaches the plane two thirds of the way, at
    // x = 0.002; a drift that does not close the gap ends where it goes
    // (geometry, no published value).
    #[test]
    fn approach_enters_where_its_drift_closes_the_gap() {
        let a = Approach { from: Vector3::new(0.0, 0.0, 0.02), gap: 0.02, moved: Vector3::zeros() };
        let n = Vector3::new(0.0, 0.0, 1.0);
        let c = a.entry(&Vector3::new(0.003, 0.0, -0.03), &n);
        assert!((c - Vector3::new(0.002, 0.0, 0.0)).norm() < 1e-15, "{c}");
        assert_eq!(a.entry(&Vector3::new(0.003, 0.0, -0.01), &n), Vector3::new(0.003, 0.0, 0.01));
        assert_eq!(a.entry(&Vector3::zeros(), &n), a.from);
    }

    #[test]
    fn contact_parameters_refuse_nan_negative_and_out_of_range_values() {
        let ok = ContactParameters { normal_penalty: 10.0, tangential_penalty: 1.0, friction: 0.3, smoothing: 0.0, slip_rounding: 0.05 };
        assert_eq!(ok.checked(), Ok(ok));
        let field = |p: ContactParameters| match p.validate() {
            Err(SettingsError::OutOfRange { field, .. }) => field,
            other => panic!("{other:?}"),
        };
        assert_eq!(field(ContactParameters { normal_penalty: -1.0, ..ok }), "normal_penalty");
        assert_eq!(field(ContactParameters { tangential_penalty: f64::NAN, ..ok }), "tangential_penalty");
        assert_eq!(field(ContactParameters { friction: -0.1, ..ok }), "friction");
        assert_eq!(field(ContactParameters { smoothing: f64::INFINITY, ..ok }), "smoothing");
        assert_eq!(field(ContactParameters { slip_rounding: 1.0, ..ok }), "slip_rounding");
    }
}
