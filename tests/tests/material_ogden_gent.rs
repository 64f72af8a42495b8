//! Ogden and Gent: published identities and closed-form homogeneous
//! responses.
//!
//! Sources:
//! * R. W. Ogden (1972), "Large deformation isotropic elasticity — on the
//!   correlation of theory and experiment for incompressible rubberlike
//!   solids", Proc. R. Soc. Lond. A 326:565–584: `W = Σ (μ_p/α_p)(λ1^α_p +
//!   λ2^α_p + λ3^α_p − 3)`. With one term and α = 2 it is the neo-Hookean
//!   energy with μ1 = μ; with two terms α = 2, −2 it is Mooney–Rivlin with
//!   μ1 = 2 C10, μ2 = −2 C01 (since λ1⁻² + λ2⁻² + λ3⁻² = I2 when J = 1).
//!   Uniaxial nominal stress (incompressible) `P = Σ μ_p (λ^(α_p−1) −
//!   λ^(−α_p/2−1))`.
//! * A. N. Gent (1996), "A new constitutive relation for rubber", Rubber
//!   Chem. Technol. 69:59–61: `W = −(μ J_m/2) ln(1 − (I1 − 3)/J_m)`, which
//!   tends to the neo-Hookean energy as J_m → ∞; uniaxial nominal stress
//!   `P = μ (λ − λ⁻²) / (1 − (λ² + 2/λ − 3)/J_m)`.

use nalgebra::Matrix3;
use olli_solver::material::fd_check::random_deformation;
use olli_solver::material::homogeneous::{point, Mode, Settings};
use olli_solver::material::{registry, Material, VolumetricForm};
use olli_verification::material::with_bulk_ratio;
use olli_verification::rel;

fn material(model: &str, constants: &[(&str, f64)]) -> Material {
    let mut c = constants.to_vec();
    c.push(("bulk_modulus", 30.0));
    registry::material(model, &c, VolumetricForm::Logarithmic).unwrap()
}

/// Largest relative difference of stress and tangent between two materials
/// over random deformation gradients (fixed seeds).
fn max_difference(a: &Material, b: &Material) -> f64 {
    let mut worst: f64 = 0.0;
    for seed in 1..30 {
        let f = random_deformation(seed, 0.5);
        let c: Matrix3<f64> = f.transpose() * f;
        let (ra, rb) = (a.response(&c).unwrap(), b.response(&c).unwrap());
        worst = worst.max((ra.stress - rb.stress).norm() / rb.stress.norm());
        worst = worst.max((ra.tangent - rb.tangent).norm() / rb.tangent.norm());
        worst = worst.max((ra.energy - rb.energy).abs() / rb.energy.abs());
    }
    worst
}

// Exact identities; the two sides are computed by different formulas
// (spectral vs invariant), so only round-off separates them: 1e-11.
#[test]
fn ogden_with_alpha_two_is_neo_hookean() {
    let ogden = material("ogden", &[("mu", 0.8), ("alpha", 2.0)]);
    let nh = material("neo-hookean", &[("shear_modulus", 0.8)]);
    let d = max_difference(&ogden, &nh);
    assert!(d < 1e-11, "difference {d:e}");
}

#[test]
fn ogden_with_alpha_two_and_minus_two_is_mooney_rivlin() {
    let (c10, c01) = (0.35, 0.08);
    let ogden = material("ogden", &[("mu", 2.0 * c10), ("alpha", 2.0), ("mu", -2.0 * c01), ("alpha", -2.0)]);
    let mr = material("mooney-rivlin", &[("c10", c10), ("c01", c01)]);
    let d = max_difference(&ogden, &mr);
    assert!(d < 1e-11, "difference {d:e}");
    assert!(rel(ogden.shear_modulus(), 2.0 * (c10 + c01)) < 1e-15);
}

// The difference from neo-Hookean is O((I1 − 3)/J_m): at J_m = 1e7 and
// I1 − 3 below about 3 here, 1e-6 relative bounds it.
#[test]
fn gent_tends_to_neo_hookean_for_a_large_extensibility_limit() {
    let nh = material("neo-hookean", &[("shear_modulus", 0.6)]);
    let far = material("gent", &[("shear_modulus", 0.6), ("extensibility_limit", 1e7)]);
    let near = material("gent", &[("shear_modulus", 0.6), ("extensibility_limit", 10.0)]);
    let d_far = max_difference(&far, &nh);
    assert!(d_far < 1e-6, "J_m = 1e7: difference {d_far:e}");
    // …and it really is a different model at a small J_m.
    assert!(max_difference(&near, &nh) > 1e-3);
}

// Tolerance as in material_closed_forms.rs: κ = 10⁸ μ leaves O(σ/κ) ≈ 1e-7
// relative from incompressibility; we assert 1e-5.
#[test]
fn uniaxial_stress_matches_the_published_closed_forms() {
    let mu = [0.63, 0.0012, -0.01];
    let alpha = [1.3, 5.0, -2.0];
    let ogden = with_bulk_ratio(
        "ogden",
        &[("mu", mu[0]), ("alpha", alpha[0]), ("mu", mu[1]), ("alpha", alpha[1]), ("mu", mu[2]), ("alpha", alpha[2])],
        1e8,
    );
    let (g_mu, jm) = (0.6, 12.0);
    let gent = with_bulk_ratio("gent", &[("shear_modulus", g_mu), ("extensibility_limit", jm)], 1e8);
    for l in [0.5f64, 0.8, 1.2, 2.0, 3.0, 3.4] {
        let p_ogden: f64 = (0..3).map(|p| mu[p] * (l.powf(alpha[p] - 1.0) - l.powf(-alpha[p] / 2.0 - 1.0))).sum();
        let got = point(&ogden, Mode::Uniaxial, l, None, &Settings::default()).unwrap().nominal_stress;
        assert!(rel(got, p_ogden) < 1e-5, "Ogden λ = {l}: {got} vs {p_ogden}");
        let p_gent = g_mu * (l - l.powi(-2)) / (1.0 - (l * l + 2.0 / l - 3.0) / jm);
        let got = point(&gent, Mode::Uniaxial, l, None, &Settings::default()).unwrap().nominal_stress;
        assert!(rel(got, p_gent) < 1e-5, "Gent λ = {l}: {got} vs {p_gent}");
    }
}

#[test]
fn gent_reports_its_extensibility_limit_instead_of_nan() {
    let gent = material("gent", &[("shear_modulus", 0.6), ("extensibility_limit", 2.0)]);
    let f = Matrix3::from_diagonal(&nalgebra::Vector3::new(2.5, 1.0 / 2.5f64.sqrt(), 1.0 / 2.5f64.sqrt()));
    let e = gent.response(&(f.transpose() * f)).unwrap_err();
    assert!(matches!(e, olli_solver::material::MaterialError::ExtensibilityLimit { .. }), "{e}");
}
