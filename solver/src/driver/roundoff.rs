//! The smallest force the convergence test can resolve. The internal
//! forces are sums of element forces computed from displacement gradients,
//! so their round-off grows with the displacement even where nothing is
//! strained: a part translated as a rigid body (a stress-free pull with no
//! other support) carries no force at all, yet its residual cannot fall
//! below about ε μL (|u|/L) per node. Measured against a force scale of (nearly)
//! zero, that round-off reads as non-convergence; the force scale is
//! therefore kept above the round-off divided by the force tolerance, with
//! a margin, so a residual at the level of round-off counts as converged
//! and a genuine load, however small, keeps its own scale.

use crate::assembly::dofs::NONE;
use crate::assembly::{Discretization, DofMap};

/// Margin over the round-off estimate within which a residual is taken as
/// round-off (a rule of thumb of ours: the observed round-off of a
/// translated block is about the estimate).
pub const ROUNDOFF_MARGIN: f64 = 100.0;

/// The smallest force scale the round-off of the internal forces at `u`
/// allows: `ROUNDOFF_MARGIN · ε · F · (|u|_max / L) · √n / tolerance`, with
/// F the model's force unit μL² ([`super::newton::force_unit`]), L the
/// bounding-box diagonal, n the free equations and `tolerance` the force
/// tolerance. Built from the material and the geometry only, so stiff
/// contact penalties do not raise it.
pub fn floor(disc: &Discretization, dofs: &DofMap, u: &[f64], tolerance: f64) -> f64 {
    let (lo, hi) = disc.model.mesh.bounding_box();
    let length = (0..3).map(|i| (hi[i] - lo[i]).powi(2)).sum::<f64>().sqrt();
    let (mut largest, mut n) = (0.0f64, 0usize);
    for (d, &q) in dofs.eq.iter().enumerate() {
        if q != NONE {
            largest = largest.max(u[d].abs());
            n += 1;
        }
    }
    let f = ROUNDOFF_MARGIN * f64::EPSILON * super::newton::force_unit(disc) * (largest / length) * (n as f64).sqrt() / tolerance;
    if f.is_finite() {
        f
    } else {
        0.0
    }
}
