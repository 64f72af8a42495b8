//! Mullins softening: the pseudo-elastic model of R.W. Ogden and
//! D.G. Roxburgh (1999), "A pseudo-elastic model for the Mullins effect in
//! filled rubber", Proc. R. Soc. Lond. A 455:2861–2877.
//!
//! The isochoric energy W̃ of any hyperelastic model is scaled by a damage
//! variable η ∈ (0, 1], W = η W̃ + φ(η), with (their eq. 6.1)
//!
//! ```text
//! η = 1 − (1/r) erf((W_m − W̃) / (m + β W_m)),
//! ```
//!
//! W_m the largest W̃ the point has reached so far. On the primary loading
//! path W̃ = W_m and η = 1: first loading is not softened. Below it the
//! stress is S = η S̃ (the φ term cancels by the equilibrium choice of η),
//! with the tangent
//!
//! ```text
//! D = η D̃ + (∂η/∂W̃) S̃ ⊗ S̃,   ∂η/∂W̃ = 2 exp(−z²) / (√π r (m + β W_m)),
//! z = (W_m − W̃) / (m + β W_m).
//! ```
//!
//! One history value per integration point: W_m of the last converged
//! increment (0, the virgin state). The reported energy is η W̃: the
//! dissipated part φ(η) is left out.

use statrs::function::erf::erf;

use super::error::MaterialError;
use super::tensor::outer;
use super::Response;

/// The constants r, m, β of the Ogden–Roxburgh model.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Mullins {
    /// r (dimensionless, > 1): the largest softening is 1/r of the stress.
    pub r: f64,
    /// m (energy per volume, i.e. stress units, > 0): how fast softening
    /// sets in below the largest energy reached.
    pub m: f64,
    /// β (dimensionless, ≥ 0): makes the softening depend on W_m.
    pub beta: f64,
}

/// History values per point: W_m.
pub const HISTORY_LEN: usize = 1;

impl Mullins {
    /// Checks r > 1, m > 0, β ≥ 0 (all finite), naming the bad constant.
    pub fn new(r: f64, m: f64, beta: f64) -> Result<Self, MaterialError> {
        let bad = |name, value, reason| Err(MaterialError::InvalidParameter { name, value, reason });
        if !(r.is_finite() && r > 1.0) {
            return bad("r", r, "the Ogden-Roxburgh r must be finite and greater than 1 (the softened stress stays positive)");
        }
        if !(m.is_finite() && m > 0.0) {
            return bad("m", m, "the Ogden-Roxburgh m must be a positive energy density (stress units)");
        }
        if !(beta.is_finite() && beta >= 0.0) {
            return bad("beta", beta, "the Ogden-Roxburgh beta must be zero or positive");
        }
        Ok(Mullins { r, m, beta })
    }

    /// η and ∂η/∂W̃ at energy `w` after the largest energy `w_max` (≥ w).
    pub fn damage(&self, w: f64, w_max: f64) -> (f64, f64) {
        let scale = self.m + self.beta * w_max;
        let z = (w_max - w) / scale;
        let eta = 1.0 - erf(z) / self.r;
        let slope = 2.0 * (-z * z).exp() / (std::f64::consts::PI.sqrt() * self.r * scale);
        (eta, slope)
    }

    /// Softens the isochoric response `elastic` (W̃, S̃, D̃) given the
    /// converged largest energy `previous`; returns the response and the
    /// trial largest energy.
    pub fn respond(&self, elastic: Response, previous: f64) -> (Response, f64) {
        let w = elastic.energy;
        if w >= previous {
            // Primary loading: η = 1 and stays 1 along the path.
            return (elastic, w);
        }
        let (eta, slope) = self.damage(w, previous);
        let s = elastic.stress;
        let response = Response { energy: eta * w, stress: s * eta, tangent: elastic.tangent * eta + outer(&s, &s) * slope };
        (response, previous)
    }
}

#[cfg(test)]
mod tests {
    use nalgebra::Matrix3;

    use super::*;
    use crate::material::fd_check::{self, random_deformation};
    use crate::material::history::{PointHistory, TangentKind};
    use crate::material::{registry, Material, VolumetricForm};

    fn softening(model: &str, constants: &[(&str, f64)]) -> Material {
        let mut c = constants.to_vec();
        c.push(("bulk_modulus", 50.0));
        registry::material(model, &c, VolumetricForm::Quadratic).unwrap().with_mullins(Mullins::new(2.0, 0.05, 0.1).unwrap())
    }

    fn respond(m: &Material, w_max: f64, c: &Matrix3<f64>, full: bool) -> Response {
        let previous = [w_max];
        let mut current = [0.0];
        let mut h = PointHistory { previous: &previous, current: &mut current, time_step: 0.0, tangent: TangentKind::Step };
        m.response_with_history(c, full, &mut h).unwrap()
    }

    // D = 2 ∂S/∂C by central differences with the converged W_m held,
    // on the unloading branch (W̃ below W_m: the damage term S̃⊗S̃ counts) and on
    // the primary path; h = 1e-6, 1e-6 relative (mathematics, not a published value).
    #[test]
    fn softened_tangent_matches_finite_differences() {
        let models = [
            softening("yeoh", &[("c10", 0.5), ("c20", -0.05), ("c30", 0.004)]),
            softening("mooney-rivlin", &[("c10", 0.3), ("c01", 0.15)]),
        ];
        for m in &models {
            for seed in [3, 7, 13] {
                let f = random_deformation(seed, 0.3);
                let c = f.transpose() * f;
                let w = m.isochoric_response(&c).unwrap().energy;
                for (w_max, full) in [(1.5 * w + 0.02, false), (1.2 * w + 0.01, true), (0.0, true)] {
                    let r = respond(m, w_max, &c, full);
                    let err = fd_check::tangent_fd_error(&r.tangent, &c, 1e-6, |x| respond(m, w_max, x, full).stress);
                    assert!(err < 1e-6, "{} W_m {w_max}: tangent error {err:.2e}", m.isochoric.name());
                }
            }
        }
    }

    #[test]
    fn bad_constants_are_refused_by_name() {
        for (r, m, b, name) in [(1.0, 0.1, 0.0, "r"), (2.0, 0.0, 0.0, "m"), (2.0, 0.1, -0.1, "beta"), (f64::NAN, 0.1, 0.0, "r")] {
            let e = Mullins::new(r, m, b).unwrap_err();
            assert!(matches!(e, MaterialError::InvalidParameter { name: n, .. } if n == name), "{e}");
        }
    }
}
