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
/// round-off (a rule of thumb of ours: the residual of a block translated
/// in the air, κ/μ = 5000, measured about 0.4 times the estimate; a larger margin
/// let the floor pass the genuine load of a block pressed by 0.3 μ at a
/// force tolerance of 1e-11).
pub const ROUNDOFF_MARGIN: f64 = 10.0;

/// The smallest force scale the round-off of the internal forces at `u`
/// allows: `ROUNDOFF_MARGIN · ε · F · (κ/μ) · (|u|_max / L) · √n / tolerance`,
/// with F the model's force unit μL² ([`super::newton::force_unit`]), κ/μ
/// its [`stiffness_ratio`], L the
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
    let f =
        ROUNDOFF_MARGIN * f64::EPSILON * super::newton::force_unit(disc) * stiffness_ratio(disc) * (largest / length) * (n as f64).sqrt()
            / tolerance;
    if f.is_finite() {
        f
    } else {
        0.0
    }
}

/// The stiffest modulus of the model over the shear modulus of its force
/// unit: max(μ, κ) over the regions divided by the largest μ. The
/// round-off of a nearly incompressible rubber's forces is that of its
/// pressure, κ times the round-off of the volume ratio, not μ times it: a
/// block translated in the air (κ/μ = 5000) left a residual of 2e-5 of a
/// μ-based floor, so its Newton iteration wandered there for up to 20
/// corrections (measured) where it had converged.
pub fn stiffness_ratio(disc: &Discretization) -> f64 {
    let regions = &disc.model.regions;
    let mu = regions.iter().map(|r| r.material.shear_modulus()).fold(0.0, f64::max);
    let stiffest = regions.iter().map(|r| r.material.shear_modulus().max(r.material.bulk_modulus())).fold(0.0, f64::max);
    if mu > 0.0 && stiffest.is_finite() {
        (stiffest / mu).max(1.0)
    } else {
        1.0
    }
}
