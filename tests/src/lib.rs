//! Shared helpers for the verification tests: independent implementations
//! of textbook formulas, kept separate from the solver's own code so that a
//! test compares two different computations.

pub mod material {
    use olli_solver::material::{registry, Material, VolumetricForm};

    /// A material from the registry with bulk modulus `kappa_over_mu` × μ.
    pub fn with_bulk_ratio(model: &str, constants: &[(&str, f64)], kappa_over_mu: f64) -> Material {
        let probe = registry::material(model, &with_bulk(constants, 1.0), VolumetricForm::Quadratic).unwrap();
        let kappa = kappa_over_mu * probe.shear_modulus();
        registry::material(model, &with_bulk(constants, kappa), VolumetricForm::Quadratic).unwrap()
    }

    fn with_bulk<'a>(constants: &[(&'a str, f64)], kappa: f64) -> Vec<(&'a str, f64)> {
        let mut c = constants.to_vec();
        c.push(("bulk_modulus", kappa));
        c
    }

    /// Langevin function `coth x − 1/x` evaluated directly (x not small).
    pub fn langevin_direct(x: f64) -> f64 {
        1.0 / x.tanh() - 1.0 / x
    }

    /// Inverse Langevin function by plain bisection on the direct formula:
    /// slow but independent of the solver's Newton/series scheme. Accurate to
    /// about 1e-12 relative for 0.01 < y < 0.99, ample for 1e-4 checks.
    pub fn inverse_langevin_bisection(y: f64) -> f64 {
        let (mut a, mut b) = (1e-6, 1.0 / (1.0 - y) + 1.0);
        for _ in 0..200 {
            let m = 0.5 * (a + b);
            if langevin_direct(m) < y {
                a = m
            } else {
                b = m
            }
        }
        0.5 * (a + b)
    }

    /// Eight-chain `∂W/∂I1` (Arruda & Boyce 1993, J. Mech. Phys. Solids
    /// 41:389–412, eq. for the eight-chain energy; from memory):
    /// `W1 = μ_r √N β / (6 λ_ch)`, `λ_ch = √(I1/3)`, `β = L⁻¹(λ_ch/√N)`,
    /// with `μ_r = 3μ / (√N L⁻¹(1/√N))` so that μ is the initial shear modulus.
    pub fn eight_chain_w1(mu: f64, locking_stretch: f64, i1: f64) -> f64 {
        let sqrt_n = locking_stretch;
        let mu_r = 3.0 * mu / (sqrt_n * inverse_langevin_bisection(1.0 / sqrt_n));
        let lam = (i1 / 3.0).sqrt();
        mu_r * sqrt_n * inverse_langevin_bisection(lam / sqrt_n) / (6.0 * lam)
    }

    /// Relative difference with a floor on the scale.
    pub fn rel(a: f64, b: f64, floor: f64) -> f64 {
        (a - b).abs() / b.abs().max(floor)
    }
}
