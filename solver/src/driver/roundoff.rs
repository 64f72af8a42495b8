//! The smallest force the convergence test can resolve. The internal
//! forces are sums of element forces computed from displacement gradients,
//! so their round-off grows with the displacement even where nothing is
//! strained: a part translated as a rigid body (a stress-free pull with no
//! other support) carries no force at all, yet its residual cannot fall
//! below about ε ‖diag(K) u‖. Measured against a force scale of (nearly)
//! zero, that round-off reads as non-convergence; the force scale is
//! therefore kept above the round-off divided by the force tolerance, with
//! a margin, so a residual at the level of round-off counts as converged
//! and a genuine load, however small, keeps its own scale.

use crate::assembly::dofs::NONE;
use crate::assembly::{DofMap, Pattern};

/// Margin over the round-off estimate ε ‖diag(K) u‖ within which a residual
/// is taken as round-off (a rule of thumb of ours: the observed round-off
/// of a translated block is about 1 × the estimate).
pub const ROUNDOFF_MARGIN: f64 = 100.0;

/// The smallest force scale the round-off of the internal forces at `u`
/// allows: `ROUNDOFF_MARGIN · ε · ‖diag(K) u‖ / tolerance` over the free
/// dofs, with `k` the tangent of the last evaluation in `pattern`'s order
/// (its diagonal is the first entry of each column) and `tolerance` the
/// force tolerance.
pub fn floor(pattern: &Pattern, k: &[f64], dofs: &DofMap, u: &[f64], tolerance: f64) -> f64 {
    let mut sum = 0.0;
    for (d, &q) in dofs.eq.iter().enumerate() {
        if q == NONE {
            continue;
        }
        let first = pattern.col_ptr[q];
        if pattern.row_idx.get(first) == Some(&q) {
            if let Some(kqq) = k.get(first) {
                sum += (kqq * u[d]).powi(2);
            }
        }
    }
    let f = ROUNDOFF_MARGIN * f64::EPSILON * sum.sqrt() / tolerance;
    if f.is_finite() {
        f
    } else {
        0.0
    }
}
