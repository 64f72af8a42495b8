//! Small-strain limits of every model, computed from the homogeneous
//! responses (i.e. through the general 3-D stress routine).
//!
//! Sources:
//! * linear isotropic elasticity: shear stress τ = μγ, Young's modulus
//!   E = 2μ(1 + ν), lateral contraction ν, and E = 3μ for ν = 1/2 (e.g.
//!   Timoshenko & Goodier 1970, "Theory of Elasticity", §3–4, from memory);
//! * μ = 2(C10 + C01) for Mooney–Rivlin and μ = 2 C10 for Yeoh (Rivlin 1948,
//!   Phil. Trans. R. Soc. A 241:379; Yeoh 1993, Rubber Chem. Technol.
//!   66:754): the expansion of W to second order in strain;
//! * eight-chain: Arruda & Boyce (1993), J. Mech. Phys. Solids 41:389–412
//!   (from memory) give the initial shear modulus μ_r (√N/3) L⁻¹(1/√N); olli's
//!   `shear_modulus` input is defined as that initial modulus, so it must
//!   come back exactly for every locking stretch.
//!
//! Moduli are measured by central differences at strain h = 1e-4: the
//! truncation error is O(h²) = 1e-8 relative, so 1e-6 is asserted.

use olli_solver::material::homogeneous::{point, Mode, Settings};
use olli_solver::material::{registry, Material, VolumetricForm};
use olli_verification::material::{rel, with_bulk_ratio};

const H: f64 = 1e-4;

/// Initial shear modulus dτ/dγ at γ = 0 from the simple-shear response.
fn measured_shear_modulus(m: &Material) -> f64 {
    // Simple shear is driven by its principal stretch λ with γ = λ − 1/λ.
    let lam = |g: f64| 0.5 * g + (1.0 + 0.25 * g * g).sqrt();
    let s = Settings::default();
    let tp = point(m, Mode::SimpleShear, lam(H), None, &s).unwrap().true_stress;
    let tm = point(m, Mode::SimpleShear, lam(-H), None, &s).unwrap().true_stress;
    (tp - tm) / (2.0 * H)
}

/// (Young's modulus dP/dλ, Poisson's ratio −dλ2/dλ) at λ = 1 from the uniaxial response.
fn measured_young_and_poisson(m: &Material) -> (f64, f64) {
    let s = Settings::default();
    let p = point(m, Mode::Uniaxial, 1.0 + H, None, &s).unwrap();
    let q = point(m, Mode::Uniaxial, 1.0 - H, None, &s).unwrap();
    let e = (p.nominal_stress - q.nominal_stress) / (2.0 * H);
    let nu = -(p.lateral_stretches[0] - q.lateral_stretches[0]) / (2.0 * H);
    (e, nu)
}

/// (model, constants, expected small-strain shear modulus μ)
type Case = (&'static str, Vec<(&'static str, f64)>, f64);

fn cases() -> Vec<Case> {
    vec![
        ("neo-hookean", vec![("shear_modulus", 0.9)], 0.9),
        ("neo-hookean", vec![("c10", 0.45)], 0.9),
        // μ = 2(C10 + C01)
        ("mooney-rivlin", vec![("c10", 0.3), ("c01", 0.08)], 2.0 * (0.3 + 0.08)),
        // μ = 2 C10, whatever C20 and C30
        ("yeoh", vec![("c10", 0.5), ("c20", -0.05), ("c30", 0.002)], 1.0),
        ("eight-chain", vec![("shear_modulus", 0.6), ("locking_stretch", 5.0)], 0.6),
    ]
}

#[test]
fn shear_modulus_equals_published_small_strain_value() {
    for (model, constants, mu) in cases() {
        let m = with_bulk_ratio(model, &constants, 1e4);
        assert!(rel(m.shear_modulus(), mu, 1.0) < 1e-14, "{model}: declared {}", m.shear_modulus());
        let g = measured_shear_modulus(&m);
        assert!(rel(g, mu, 1.0) < 1e-6, "{model}: dτ/dγ = {g}, expected {mu}");
    }
}

#[test]
fn young_modulus_is_three_mu_when_incompressible() {
    for (model, constants, mu) in cases() {
        // κ = 10⁵ μ (a larger κ would lose digits of P to the round-off of
        // κ(J − 1) at this small strain). Hooke: E = 9κμ/(3κ + μ) and
        // ν = (3κ − 2μ)/(6κ + 2μ), which tend to 3μ and 1/2 as κ/μ → ∞;
        // here they differ from those limits by μ/(3κ) ≈ 3.3e-6.
        let kappa = 1e5 * mu;
        let m = with_bulk_ratio(model, &constants, 1e5);
        let (e, nu) = measured_young_and_poisson(&m);
        let (e_hooke, nu_hooke) = (9.0 * kappa * mu / (3.0 * kappa + mu), (3.0 * kappa - 2.0 * mu) / (6.0 * kappa + 2.0 * mu));
        assert!(rel(e, e_hooke, 1.0) < 1e-6, "{model}: E = {e}, expected {e_hooke}");
        assert!((nu - nu_hooke).abs() < 1e-6, "{model}: ν = {nu}, expected {nu_hooke}");
        assert!(rel(e, 3.0 * mu, 1.0) < 1e-5, "{model}: E = {e}, expected {}", 3.0 * mu);
        assert!((nu - 0.5).abs() < 1e-5, "{model}: ν = {nu}");
    }
}

#[test]
fn compressible_young_modulus_and_poisson_ratio_follow_hooke() {
    for nu in [0.0, 0.3, 0.45] {
        let m =
            registry::material("mooney-rivlin", &[("c10", 0.3), ("c01", 0.1), ("poisson_ratio", nu)], VolumetricForm::SimoTaylor).unwrap();
        let (e, nu_measured) = measured_young_and_poisson(&m);
        let mu = 0.8;
        assert!(rel(e, 2.0 * mu * (1.0 + nu), 1.0) < 1e-6, "ν = {nu}: E = {e}");
        assert!((nu_measured - nu).abs() < 1e-6, "ν = {nu}: measured {nu_measured}");
    }
}

#[test]
fn eight_chain_initial_shear_modulus_is_mu_for_any_locking_stretch() {
    for lock in [1.05, 1.5, 2.0, 3.0, 5.0, 10.0, 100.0] {
        let m = with_bulk_ratio("eight-chain", &[("shear_modulus", 0.75), ("locking_stretch", lock)], 1e4);
        let g = measured_shear_modulus(&m);
        // h² truncation grows as the locking stretch approaches 1 (the curve
        // stiffens fast), still below 1e-6 for λ_L ≥ 1.05 at h = 1e-4.
        assert!(rel(g, 0.75, 1.0) < 1e-6, "λL = {lock}: dτ/dγ = {g}");
    }
}
