//! Finite-difference checks shared by every model's tests: the stress against
//! the energy derivative (S = 2 ∂W/∂C) and the tangent against the stress
//! derivative (D = 2 ∂S/∂C), by central differences on C.

use nalgebra::Matrix3;

use super::tensor::VOIGT_PAIRS;
use super::{Material, Tangent};

/// A deterministic pseudo-random deformation gradient near the identity with
/// perturbations of size `amplitude` (xorshift, fixed seed per `seed`).
pub fn random_deformation(seed: u64, amplitude: f64) -> Matrix3<f64> {
    let mut s = seed.wrapping_mul(0x9E37_79B9_7F4A_7C15) | 1;
    let mut next = || {
        s ^= s << 13;
        s ^= s >> 7;
        s ^= s << 17;
        (s >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0
    };
    Matrix3::from_fn(|i, j| if i == j { 1.0 } else { 0.0 } + amplitude * next())
}

/// Largest relative errors `(stress, tangent)` of `material` at `c` by central
/// differences with relative step `h`.
pub fn fd_errors(material: &Material, c: &Matrix3<f64>, h: f64) -> (f64, f64) {
    let r = material.response(c).expect("state must be admissible");
    let mut stress_err: f64 = 0.0;
    let s_scale = r.stress.norm().max(1e-12);
    for &(k, l) in VOIGT_PAIRS.iter() {
        // Perturb C symmetrically: dC_kl = dC_lk = h.
        let mut dc = Matrix3::zeros();
        dc[(k, l)] += h;
        if k != l {
            dc[(l, k)] += h;
        }
        let wp = material.energy(&(c + dc)).unwrap();
        let wm = material.energy(&(c - dc)).unwrap();
        // dW = S : dC / 2, and S:dC counts an off-diagonal pair twice.
        let factor = if k == l { 0.5 } else { 1.0 };
        let s_fd = (wp - wm) / (2.0 * h) / factor;
        stress_err = stress_err.max((s_fd - r.stress[(k, l)]).abs() / s_scale);
    }
    let tangent_err = tangent_fd_error(&r.tangent, c, h, |x| material.response(x).unwrap().stress);
    (stress_err, tangent_err)
}

/// Largest error of `tangent` (Voigt, at `c`) against D = 2 ∂S/∂C by
/// central differences of `stress_at` with step `h`, relative to the
/// tangent's norm. For materials whose stress needs more than C (held
/// history variables), the caller's closure supplies it.
pub fn tangent_fd_error(tangent: &Tangent, c: &Matrix3<f64>, h: f64, stress_at: impl Fn(&Matrix3<f64>) -> Matrix3<f64>) -> f64 {
    let scale = tangent.norm().max(1e-12);
    let mut worst: f64 = 0.0;
    for (q, &(k, l)) in VOIGT_PAIRS.iter().enumerate() {
        let mut dc = Matrix3::zeros();
        dc[(k, l)] += h;
        if k != l {
            dc[(l, k)] += h;
        }
        let (sp, sm) = (stress_at(&(c + dc)), stress_at(&(c - dc)));
        // dS = D : dE with dE = dC/2: dE_kk = h/2; for k ≠ l the engineering shear γ_kl = h.
        let de = if k == l { 0.5 * h } else { h };
        for (p, &(i, j)) in VOIGT_PAIRS.iter().enumerate() {
            let d_fd = (sp[(i, j)] - sm[(i, j)]) / (2.0 * de);
            worst = worst.max((d_fd - tangent[(p, q)]).abs() / scale);
        }
    }
    worst
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::material::neo_hookean::NeoHookean;
    use crate::material::volumetric::{VolumetricForm, VolumetricLaw};

    // Consistency of S = 2∂W/∂C and D = 2∂S/∂C is mathematics, not a
    // published value: central differences with h = 1e-6 have truncation
    // error O(h²) and round-off O(ε/h) ≈ 1e-10 relative, so 1e-6 has margin.
    #[test]
    fn neo_hookean_stress_and_tangent_match_finite_differences() {
        for form in [VolumetricForm::Quadratic, VolumetricForm::Logarithmic, VolumetricForm::SimoTaylor] {
            let m = Material::new(Box::new(NeoHookean::new(0.8).unwrap()), VolumetricLaw::new(form, 50.0).unwrap());
            for seed in 1..20 {
                let f = random_deformation(seed, 0.35);
                let c = f.transpose() * f;
                let (es, et) = fd_errors(&m, &c, 1e-6);
                assert!(es < 1e-6 && et < 1e-6, "{form:?} seed {seed}: {es:e} {et:e}");
            }
        }
    }
}
