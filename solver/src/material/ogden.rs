//! Ogden model (Ogden 1972, "Large deformation isotropic elasticity — on the
//! correlation of theory and experiment for incompressible rubberlike
//! solids", Proc. R. Soc. Lond. A 326:565–584), with N terms in the
//! principal stretches of the isochoric part:
//!
//! ```text
//! W_iso = Σ_p (μ_p/α_p) (λ̄1^α_p + λ̄2^α_p + λ̄3^α_p − 3),   λ̄_i = J^(-1/3) λ_i
//! ```
//!
//! Small-strain shear modulus `μ = ½ Σ_p μ_p α_p`. One term with `α = 2` is
//! neo-Hookean; two terms with `α = 2, −2` are Mooney–Rivlin with
//! `μ1 = 2 C10`, `μ2 = −2 C01`.
//!
//! The stress and tangent are written without eigenvalues where possible:
//! `Σ_i λ̄_i^α = J^(-α/3) tr(C^(α/2))`, so with `m = α/2`, `k = J^(-α/3)`,
//! `G = C^(m−1)` and `T = tr C^m`:
//!
//! ```text
//! S_p = μ_p k [G − T/3 C⁻¹]
//! D_p = 2 μ_p k [𝔻G − α/6 (G⊗C⁻¹ + C⁻¹⊗G) + α T/18 C⁻¹⊗C⁻¹ + T/3 C⁻¹⊙C⁻¹]
//! ```
//!
//! where `𝔻G = ∂G/∂C` is the derivative of the isotropic tensor function
//! `C ↦ C^(m−1)` (Daleckii–Krein formula): in the eigenbasis of C its
//! coefficients are the divided differences `(g(c_a) − g(c_b))/(c_a − c_b)`,
//! evaluated without cancellation, and `g'(c_a)` for equal eigenvalues. Equal
//! stretches (the reference state, uniaxial and equibiaxial states) are
//! therefore exact, not perturbed.

use nalgebra::{Matrix3, SymmetricEigen};

use super::error::MaterialError;
use super::invariants::Kinematics;
use super::tensor::{odot, outer, outer_sym, Tangent, VOIGT_PAIRS};
use super::{IsochoricModel, Response};

/// The N-term Ogden model.
#[derive(Debug, Clone, PartialEq)]
pub struct Ogden {
    /// Moduli μ_p (stress units), one per term.
    pub mu: Vec<f64>,
    /// Exponents α_p (dimensionless, non-zero), one per term.
    pub alpha: Vec<f64>,
}

impl Ogden {
    /// Checks that there are as many μ as α (at least one), all finite,
    /// every α non-zero and the shear modulus ½ Σ μ_p α_p positive.
    pub fn new(mu: Vec<f64>, alpha: Vec<f64>) -> Result<Self, MaterialError> {
        if mu.is_empty() || mu.len() != alpha.len() {
            return Err(MaterialError::InvalidCombination {
                model: "ogden",
                expression: "len(mu) − len(alpha)",
                value: mu.len() as f64 - alpha.len() as f64,
                reason: "give one mu and one alpha per term (at least one term)",
            });
        }
        if let Some(&value) = mu.iter().find(|v| !v.is_finite()) {
            return Err(MaterialError::InvalidParameter { name: "mu", value, reason: "must be finite" });
        }
        if let Some(&value) = alpha.iter().find(|v| !(v.is_finite() && **v != 0.0)) {
            return Err(MaterialError::InvalidParameter { name: "alpha", value, reason: "must be finite and non-zero" });
        }
        let shear = 0.5 * mu.iter().zip(&alpha).map(|(m, a)| m * a).sum::<f64>();
        if !(shear > 0.0) {
            return Err(MaterialError::InvalidCombination {
                model: "ogden",
                expression: "½ Σ mu·alpha",
                value: shear,
                reason: "the small-strain shear modulus must be positive",
            });
        }
        Ok(Ogden { mu, alpha })
    }

    fn terms(&self) -> impl Iterator<Item = (f64, f64)> + '_ {
        self.mu.iter().copied().zip(self.alpha.iter().copied())
    }
}

/// `(x^m − y^m) / (x − y)` for positive x, y, without cancellation when x ≈ y
/// (and `m y^(m−1)` when they are equal).
fn power_divided_difference(x: f64, y: f64, m: f64) -> f64 {
    let r = (x / y).ln();
    if r == 0.0 {
        return m * y.powf(m - 1.0);
    }
    y.powf(m - 1.0) * (m * r).exp_m1() / r.exp_m1()
}

/// `∂G/∂C` for `G = C^e` (Voigt, tensor components), from the eigen
/// decomposition of C.
fn power_derivative(eig: &SymmetricEigen<f64, nalgebra::U3>, e: f64) -> Tangent {
    let c = eig.eigenvalues;
    let n = &eig.eigenvectors;
    let theta = Matrix3::from_fn(|a, b| power_divided_difference(c[a], c[b], e));
    Tangent::from_fn(|p, q| {
        let (i, j) = VOIGT_PAIRS[p];
        let (k, l) = VOIGT_PAIRS[q];
        let mut sum = 0.0;
        for a in 0..3 {
            for b in 0..3 {
                sum += theta[(a, b)] * n[(i, a)] * n[(j, b)] * 0.5 * (n[(k, a)] * n[(l, b)] + n[(l, a)] * n[(k, b)]);
            }
        }
        sum
    })
}

/// `C^e` from the eigen decomposition.
fn power(eig: &SymmetricEigen<f64, nalgebra::U3>, e: f64) -> Matrix3<f64> {
    let n = &eig.eigenvectors;
    let d = Matrix3::from_diagonal(&eig.eigenvalues.map(|c| c.powf(e)));
    n * d * n.transpose()
}

impl IsochoricModel for Ogden {
    fn name(&self) -> &'static str {
        "ogden"
    }

    fn shear_modulus(&self) -> f64 {
        0.5 * self.terms().map(|(m, a)| m * a).sum::<f64>()
    }

    fn energy(&self, kin: &Kinematics) -> Result<f64, MaterialError> {
        let c = kin.c.symmetric_eigenvalues();
        Ok(self
            .terms()
            .map(|(mu, alpha)| {
                let k = kin.j.powf(-alpha / 3.0);
                mu / alpha * (k * c.iter().map(|ci| ci.powf(0.5 * alpha)).sum::<f64>() - 3.0)
            })
            .sum())
    }

    fn response(&self, kin: &Kinematics) -> Result<Response, MaterialError> {
        let eig = SymmetricEigen::new(kin.c);
        if eig.eigenvalues.iter().any(|&c| !(c > 0.0)) {
            return Err(MaterialError::NonPositiveVolume { j: kin.j });
        }
        let ci = &kin.c_inv;
        let mut energy = 0.0;
        let mut stress = Matrix3::zeros();
        let mut tangent = Tangent::zeros();
        for (mu, alpha) in self.terms() {
            let m = 0.5 * alpha;
            let k = kin.j.powf(-alpha / 3.0);
            let trace: f64 = eig.eigenvalues.iter().map(|c| c.powf(m)).sum();
            let g = power(&eig, m - 1.0);
            energy += mu / alpha * (k * trace - 3.0);
            stress += (g - ci * (trace / 3.0)) * (mu * k);
            tangent += (power_derivative(&eig, m - 1.0) - outer_sym(&g, ci) * (alpha / 6.0)
                + outer(ci, ci) * (alpha * trace / 18.0)
                + odot(ci) * (trace / 3.0))
                * (2.0 * mu * k);
        }
        Ok(Response { energy, stress, tangent })
    }

    fn principal_kirchhoff(&self, stretches: [f64; 3]) -> Result<[f64; 3], MaterialError> {
        // τ_i = λ_i ∂W/∂λ_i = Σ_p μ_p λ_i^α_p for unimodular stretches.
        Ok(stretches.map(|l| self.terms().map(|(mu, alpha)| mu * l.powf(alpha)).sum()))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // The divided difference must agree with its direct formula away from
    // equal arguments and tend to the derivative at them (calculus).
    #[test]
    fn divided_difference_is_accurate_near_equal_arguments() {
        let (x, y, m) = (1.7f64, 0.9f64, -1.4);
        let direct = (x.powf(m) - y.powf(m)) / (x - y);
        assert!((power_divided_difference(x, y, m) - direct).abs() < 1e-14);
        let near = power_divided_difference(1.0 + 1e-12, 1.0, 2.5);
        assert!((near - 2.5).abs() < 1e-10, "{near}");
        assert_eq!(power_divided_difference(1.3, 1.3, 2.0), 2.0 * 1.3);
    }
}
