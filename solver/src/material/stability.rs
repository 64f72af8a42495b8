//! Drucker stability of a material along the homogeneous test paths.
//!
//! In principal axes of an isotropic material, the Kirchhoff stress is
//! `τ_i = ∂W/∂ε_i` with principal log strains `ε_i = ln λ_i`. Drucker's
//! condition `dτ : dε > 0` for every increment `dε` holds when the Hessian
//!
//! ```text
//! H_ij = ∂τ_i/∂ε_j = 2 τ_i δ_ij + λ_i² D_ij λ_j²      (no sum; D = ∂S/∂E)
//! ```
//!
//! is positive definite. H is built from the same tangent the elements use.
//! On volume-preserving increments (`Σ dε_i = 0`) only the isochoric energy
//! contributes, so with a large bulk modulus this is the usual incompressible
//! check of rubber fitting; on the volumetric direction it is
//! `d(J U'(J))/d ln J > 0` (which the quadratic law loses below J = 1/2).
//!
//! The states are material states, so simple shear, whose principal
//! stretches are `(λ, 1/λ, 1)`, is checked at those stretches: the same states
//! as the planar test, reached along a path with rotating principal axes.

use nalgebra::{Matrix3, Vector3};

use super::error::MaterialError;
use super::homogeneous::{self, HomogeneousError, Mode, Settings};
use super::Material;

/// `H = ∂τ/∂ε` at principal stretches `l` (stress units).
pub fn principal_modulus(material: &Material, l: [f64; 3]) -> Result<Matrix3<f64>, MaterialError> {
    let c = Matrix3::from_diagonal(&Vector3::new(l[0] * l[0], l[1] * l[1], l[2] * l[2]));
    let r = material.response(&c)?;
    let sq = [l[0] * l[0], l[1] * l[1], l[2] * l[2]];
    Ok(Matrix3::from_fn(|i, j| {
        let tau = if i == j { 2.0 * sq[i] * r.stress[(i, i)] } else { 0.0 };
        tau + sq[i] * r.tangent[(i, j)] * sq[j]
    }))
}

/// Smallest eigenvalue of `H` divided by the shear modulus: positive where
/// the state is Drucker-stable.
pub fn drucker_margin(material: &Material, l: [f64; 3]) -> Result<f64, MaterialError> {
    let h = principal_modulus(material, l)?;
    Ok(h.symmetric_eigenvalues().min() / material.shear_modulus())
}

/// Stability of one mode over a stretch range, searched outward from λ = 1.
#[derive(Debug, Clone, PartialEq)]
pub struct ModeStability {
    /// The homogeneous test checked.
    pub mode: Mode,
    /// Smallest λ > 1 where stability is lost (bisected to 1e-10), if any
    /// below the largest stretch checked.
    pub lost_in_tension: Option<f64>,
    /// Largest λ < 1 where stability is lost, if any above the smallest
    /// stretch checked.
    pub lost_in_compression: Option<f64>,
    /// Stretch range actually checked: shorter than asked when the response
    /// could not be computed beyond a point (e.g. chain locking).
    pub checked: (f64, f64),
    /// Why the check stopped early, if it did.
    pub stopped: Option<HomogeneousError>,
}

impl ModeStability {
    /// True if no loss was found in the checked range.
    pub fn is_stable(&self) -> bool {
        self.lost_in_tension.is_none() && self.lost_in_compression.is_none()
    }
}

/// Margin at `stretch` and the lateral stretch found there, starting the
/// lateral solve from `from = (stretch, lateral)` of a nearby solved point.
fn margin_at(material: &Material, mode: Mode, stretch: f64, from: (f64, f64), settings: &Settings) -> Result<(f64, f64), HomogeneousError> {
    let guess = from.1 * homogeneous::incompressible_lateral(mode, stretch) / homogeneous::incompressible_lateral(mode, from.0);
    let p = homogeneous::point(material, mode, stretch, Some(guess), settings)?;
    let m = drucker_margin(material, p.principal_stretches).map_err(|source| HomogeneousError::Material {
        mode: mode.name(),
        stretch,
        source,
    })?;
    Ok((m, p.principal_stretches[2]))
}

/// Walks from λ = 1 through `stretches` (one side of 1, ordered outward) and
/// bisects the first sign change of the margin. Returns the loss stretch,
/// the last stretch checked and the error that stopped the walk.
fn walk(material: &Material, mode: Mode, stretches: &[f64], settings: &Settings) -> (Option<f64>, f64, Option<HomogeneousError>) {
    // Last stable (stretch, lateral stretch), starting at the reference state.
    let mut stable = (1.0, 1.0);
    for &s in stretches {
        match margin_at(material, mode, s, stable, settings) {
            Ok((m, t)) if m > 0.0 => stable = (s, t),
            Ok(_) => {
                let (mut a, mut b) = (stable, s);
                while (b - a.0).abs() > 1e-10 * b.abs() {
                    let mid = 0.5 * (a.0 + b);
                    match margin_at(material, mode, mid, a, settings) {
                        Ok((m, t)) if m > 0.0 => a = (mid, t),
                        _ => b = mid,
                    }
                }
                return (Some(b), s, None);
            }
            Err(e) => return (None, stable.0, Some(e)),
        }
    }
    (None, stable.0, None)
}

/// Drucker stability of `material` in `mode` over the given stretches.
pub fn check_mode(material: &Material, mode: Mode, stretches: &[f64], settings: &Settings) -> ModeStability {
    let mut up: Vec<f64> = stretches.iter().copied().filter(|&s| s >= 1.0).collect();
    let mut down: Vec<f64> = stretches.iter().copied().filter(|&s| s < 1.0).collect();
    up.sort_by(f64::total_cmp);
    down.sort_by(|a, b| b.total_cmp(a));
    let (lost_t, hi, stop_t) = walk(material, mode, &up, settings);
    let (lost_c, lo, stop_c) = walk(material, mode, &down, settings);
    ModeStability { mode, lost_in_tension: lost_t, lost_in_compression: lost_c, checked: (lo, hi), stopped: stop_t.or(stop_c) }
}

/// Stretches of `mode` whose principal stretches all lie within
/// `[1/top, top]` (`top` > 1): the states a part reaches when its largest
/// principal stretch is `top` and its smallest `1/top`. Equibiaxial
/// `(b, b, 1/b²)` stays within for `b ∈ [1/√top, √top]`; uniaxial
/// `(a, a^-½, a^-½)`, planar `(p, 1, 1/p)`, simple shear and volumetric
/// for `[1/top, top]`.
pub fn mode_range_within(mode: Mode, top: f64) -> (f64, f64) {
    match mode {
        Mode::Equibiaxial => (1.0 / top.sqrt(), top.sqrt()),
        _ => (1.0 / top, top),
    }
}

/// A compressive state of a test as the tensile state of another test it
/// equals (same principal stretches of an incompressible material, up to
/// order): equibiaxial compression `b < 1` is uniaxial tension `1/b²`,
/// uniaxial compression `a < 1` is equibiaxial tension `1/√a`, planar
/// compression `p < 1` is planar tension `1/p`. `None` for tension and for
/// simple shear and volumetric states.
pub fn tensile_equivalent(mode: Mode, stretch: f64) -> Option<(Mode, f64)> {
    if !(stretch < 1.0) {
        return None;
    }
    match mode {
        Mode::Equibiaxial => Some((Mode::Uniaxial, 1.0 / (stretch * stretch))),
        Mode::Uniaxial => Some((Mode::Equibiaxial, 1.0 / stretch.sqrt())),
        Mode::Planar => Some((Mode::Planar, 1.0 / stretch)),
        Mode::SimpleShear | Mode::Volumetric => None,
    }
}
