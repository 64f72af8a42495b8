//! Finite-strain viscoelasticity: a Prony series wrapped around the
//! isochoric part of any hyperelastic model.
//!
//! The convolution form of J.C. Simo (1987), "On a fully three-dimensional
//! finite-strain viscoelastic damage model: formulation and computational
//! aspects", Computer Methods in Applied Mechanics and Engineering
//! 60:153–173, with the internal variables kept as second Piola–Kirchhoff
//! tensors as in G.A. Holzapfel (1996), "On large strain viscoelasticity:
//! continuum formulation and finite element applications to elastomeric
//! structures", International Journal for Numerical Methods in Engineering
//! 39:3903–3926. With `S⁰ = S_iso(C)` the isochoric stress of the
//! hyperelastic model (its constants are the *instantaneous* ones) and the
//! relaxation function of the Prony series
//!
//! ```text
//! g(t) = g∞ + Σ gᵢ exp(−t/τᵢ),   g∞ = 1 − Σ gᵢ,
//! S_iso(t) = ∫ g(t − s) dS⁰/ds ds = g∞ S⁰(t) + Σ gᵢ hᵢ(t),
//! hᵢ(t) = ∫ exp(−(t − s)/τᵢ) dS⁰/ds ds.
//! ```
//!
//! The volumetric part stays elastic. Over an increment Δt in which S⁰
//! changes linearly in time, the integral is exact:
//!
//! ```text
//! hᵢⁿ⁺¹ = eᵢ hᵢⁿ + γᵢ (S⁰ⁿ⁺¹ − S⁰ⁿ),   eᵢ = exp(−Δt/τᵢ),   γᵢ = τᵢ/Δt (1 − eᵢ)
//! D_iso = (g∞ + Σ gᵢ γᵢ) D⁰
//! ```
//!
//! At Δt = 0 (a stage without duration) γᵢ = 1 and eᵢ = 1: the response is
//! the instantaneous elastic one; as Δt → ∞ in a hold, hᵢ → 0 and the
//! stress tends to the relaxed response g∞ S⁰.
//!
//! History values per point, in this order: S⁰ of the last converged
//! increment, then hᵢ of every term (each a symmetric tensor, 6 Voigt values).

use super::error::MaterialError;
use super::history::{PointHistory, TangentKind};
use super::tensor::{from_voigt, to_voigt, Voigt};
use super::Response;

/// One term of a Prony series.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PronyTerm {
    /// Modulus ratio gᵢ (dimensionless, > 0).
    pub ratio: f64,
    /// Relaxation time τᵢ (job's time unit, > 0).
    pub time: f64,
}

/// A Prony series of modulus ratios with Σ gᵢ < 1.
#[derive(Debug, Clone, PartialEq)]
pub struct Prony {
    terms: Vec<PronyTerm>,
}

/// Values stored per term (one symmetric tensor).
const TENSOR: usize = 6;

impl Prony {
    /// Checks every term (`[gᵢ, τᵢ]`): gᵢ > 0, τᵢ > 0, both finite, Σ gᵢ < 1
    /// (so the relaxed modulus stays positive), and at least one term.
    pub fn new(terms: &[[f64; 2]]) -> Result<Self, MaterialError> {
        let bad = |value, reason| Err(MaterialError::InvalidParameter { name: "prony", value, reason });
        if terms.is_empty() {
            return bad(0.0, "give at least one [g_i, tau_i] term");
        }
        for &[g, tau] in terms {
            if !(g.is_finite() && g > 0.0) {
                return bad(g, "each modulus ratio g_i must be positive and finite");
            }
            if !(tau.is_finite() && tau > 0.0) {
                return bad(tau, "each relaxation time tau_i must be positive and finite");
            }
        }
        let sum: f64 = terms.iter().map(|t| t[0]).sum();
        if sum >= 1.0 {
            return bad(sum, "the modulus ratios must add up to less than 1 (the relaxed modulus is 1 - sum g_i of the instantaneous one)");
        }
        Ok(Prony { terms: terms.iter().map(|&[ratio, time]| PronyTerm { ratio, time }).collect() })
    }

    /// The terms (modulus ratio g_i, relaxation time τ_i) in the order given.
    pub fn terms(&self) -> &[PronyTerm] {
        &self.terms
    }

    /// g∞ = 1 − Σ gᵢ: the relaxed modulus over the instantaneous one.
    pub fn relaxed_fraction(&self) -> f64 {
        1.0 - self.terms.iter().map(|t| t.ratio).sum::<f64>()
    }

    /// The relaxation function g(t) = g∞ + Σ gᵢ exp(−t/τᵢ), t ≥ 0.
    pub fn relaxation(&self, t: f64) -> f64 {
        self.relaxed_fraction() + self.terms.iter().map(|p| p.ratio * (-t / p.time).exp()).sum::<f64>()
    }

    /// Storage and loss parts of the complex modulus over the instantaneous
    /// modulus at angular frequency ω (rad per time unit):
    /// `g' = g∞ + Σ gᵢ ω²τᵢ² / (1 + ω²τᵢ²)`, `g'' = Σ gᵢ ωτᵢ / (1 + ω²τᵢ²)`.
    pub fn complex_modulus(&self, omega: f64) -> (f64, f64) {
        self.terms.iter().fold((self.relaxed_fraction(), 0.0), |(s, l), p| {
            let wt = omega * p.time;
            let d = 1.0 + wt * wt;
            (s + p.ratio * wt * wt / d, l + p.ratio * wt / d)
        })
    }

    /// History values per integration point.
    pub fn history_len(&self) -> usize {
        TENSOR * (1 + self.terms.len())
    }

    /// Turns the instantaneous isochoric response `elastic` (S⁰, D⁰) at the
    /// trial state into the viscoelastic one, writing S⁰ and the hᵢ of the
    /// trial state into `history.current`. The energy is left as W⁰.
    pub fn respond(&self, elastic: Response, history: &mut PointHistory) -> Response {
        let dt = history.time_step.max(0.0);
        let s0 = to_voigt(&elastic.stress);
        let change = s0 - Voigt::from_column_slice(&history.previous[..TENSOR]);
        history.current[..TENSOR].copy_from_slice(s0.as_slice());
        let mut stress = s0 * self.relaxed_fraction();
        let mut tangent_factor = self.relaxed_fraction();
        for (i, p) in self.terms.iter().enumerate() {
            let at = TENSOR * (1 + i)..TENSOR * (2 + i);
            let x = dt / p.time;
            let decay = (-x).exp();
            // γ = (1 − e^{−x})/x, written so that it stays accurate as x → 0.
            let gamma = if x < 1e-8 { 1.0 - 0.5 * x } else { -(-x).exp_m1() / x };
            let h = Voigt::from_column_slice(&history.previous[at.clone()]) * decay + change * gamma;
            history.current[at].copy_from_slice(h.as_slice());
            stress += h * p.ratio;
            tangent_factor += p.ratio * gamma;
        }
        let tangent_factor = match history.tangent {
            TangentKind::Step => tangent_factor,
            TangentKind::Storage(omega) => self.complex_modulus(omega).0,
            TangentKind::Loss(omega) => self.complex_modulus(omega).1,
            TangentKind::Without => 0.0,
        };
        Response { energy: elastic.energy, stress: from_voigt(&stress), tangent: elastic.tangent * tangent_factor }
    }
}

#[cfg(test)]
mod tests {
    use nalgebra::Matrix3;

    use super::*;
    use crate::material::fd_check::{self, random_deformation};
    use crate::material::{registry, Material, VolumetricForm};

    fn material(model: &str, constants: &[(&str, f64)], terms: &[[f64; 2]]) -> Material {
        let mut c = constants.to_vec();
        c.push(("bulk_modulus", 50.0));
        registry::material(model, &c, VolumetricForm::Quadratic).unwrap().with_prony(Prony::new(terms).unwrap())
    }

    /// The viscoelastic response at `c` after one earlier increment to `c_prev`.
    fn respond(m: &Material, c_prev: &Matrix3<f64>, c: &Matrix3<f64>, dt: f64, full: bool) -> Response {
        let n = m.history_len();
        let (zero, mut h1, mut h2) = (vec![0.0; n], vec![0.0; n], vec![0.0; n]);
        let mut first = PointHistory { previous: &zero, current: &mut h1, time_step: 0.3, tangent: TangentKind::Step };
        m.response_with_history(c_prev, full, &mut first).unwrap();
        let mut second = PointHistory { previous: &h1, current: &mut h2, time_step: dt, tangent: TangentKind::Step };
        m.response_with_history(c, full, &mut second).unwrap()
    }

    // The consistent tangent D = 2 ∂S/∂C of the recursive update, by central
    // differences on C with the converged history held (mathematics, not a
    // published value): h = 1e-6 gives O(h²) truncation and ≈1e-10 round-off,
    // so 1e-6 relative has margin. Time steps from far below to far above the
    // relaxation times, isochoric and full responses, two models.
    #[test]
    fn viscoelastic_tangent_matches_finite_differences() {
        let models = [
            material("yeoh", &[("c10", 0.5), ("c20", -0.05), ("c30", 0.004)], &[[0.3, 0.5], [0.2, 20.0]]),
            material("mooney-rivlin", &[("c10", 0.3), ("c01", 0.15)], &[[0.45, 2.0]]),
        ];
        for m in &models {
            for (seed, dt) in [(3, 0.0), (5, 1e-3), (7, 1.0), (11, 1e4)] {
                for full in [false, true] {
                    let f0 = random_deformation(seed, 0.25);
                    let f1 = random_deformation(seed + 100, 0.3);
                    let (c0, c1) = (f0.transpose() * f0, f1.transpose() * f1);
                    let r = respond(m, &c0, &c1, dt, full);
                    let err = fd_check::tangent_fd_error(&r.tangent, &c1, 1e-6, |x| respond(m, &c0, x, dt, full).stress);
                    assert!(err < 1e-6, "{} dt {dt} full {full}: tangent error {err:.2e}", m.isochoric.name());
                }
            }
        }
    }

    // Standard linear viscoelasticity (J.D. Ferry, 1980, "Viscoelastic
    // Properties of Polymers", 3rd ed., Wiley, ch. 3; N.W. Tschoegl, 1989,
    // "The Phenomenological Theory of Linear Viscoelastic Behavior",
    // Springer): under a shear strain γ applied at t = 0 and held, the shear
    // stress is G(t) γ with G(t) = G₀ (g∞ + Σ gᵢ e^{−t/τᵢ}). For a held
    // deformation S⁰ is constant, so the recursive update is exact whatever
    // the step sizes: the only error is round-off (1e-12 relative). For a
    // neo-Hookean rubber σ₁₂ = μγ at any γ in simple shear, so this holds at
    // large strain too (γ = 1).
    #[test]
    fn held_simple_shear_relaxes_along_the_prony_series() {
        let terms = [[0.25, 0.1], [0.15, 3.0], [0.1, 100.0]];
        let mu = 0.8;
        let m = material("neo-hookean", &[("shear_modulus", mu)], &terms);
        let n = m.history_len();
        for gamma in [1e-3, 1.0] {
            let f = Matrix3::new(1.0, gamma, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0);
            let c = f.transpose() * f;
            let (mut previous, mut current) = (vec![0.0; n], vec![0.0; n]);
            let mut t = 0.0;
            // Steps grow geometrically, as in a hold stage; the first is the instantaneous load.
            for (k, dt) in std::iter::once(0.0).chain((0..40).map(|k| 1e-3 * 1.4f64.powi(k))).enumerate() {
                t += dt;
                let mut h = PointHistory { previous: &previous, current: &mut current, time_step: dt, tangent: TangentKind::Step };
                let s = m.response_with_history(&c, true, &mut h).unwrap().stress;
                let sigma = f * s * f.transpose();
                let expected = mu * gamma * (1.0 - 0.5 + terms.iter().map(|p| p[0] * (-t / p[1]).exp()).sum::<f64>());
                assert!((sigma[(0, 1)] - expected).abs() < 1e-12 * mu * gamma, "γ {gamma} step {k} t {t}: {} vs {expected}", sigma[(0, 1)]);
                std::mem::swap(&mut previous, &mut current);
            }
        }
    }

    #[test]
    fn bad_prony_terms_are_refused_naming_the_key() {
        for terms in [vec![[-0.1, 1.0]], vec![[0.6, 1.0], [0.4, 2.0]], vec![[0.2, 0.0]], vec![[0.2, f64::NAN]], vec![]] {
            let e = Prony::new(&terms).unwrap_err();
            assert!(matches!(e, MaterialError::InvalidParameter { name: "prony", .. }), "{terms:?}: {e}");
        }
        let p = Prony::new(&[[0.3, 1.0], [0.2, 10.0]]).unwrap();
        assert!((p.relaxed_fraction() - 0.5).abs() < 1e-15);
        assert_eq!(p.relaxation(0.0), 1.0);
    }
}
