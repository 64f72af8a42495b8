//! Consistent tangent and stress against central finite differences, for
//! every model and volumetric law, at random deformation gradients (fixed
//! seeds) and at near-locking eight-chain states.
//!
//! Reference: general mathematics — S = 2 ∂W/∂C and D = 2 ∂S/∂C (e.g.
//! Holzapfel 2000, "Nonlinear Solid Mechanics", §6.1, from memory), checked
//! by central differences. Step h = 1e-6 on C: truncation O(h²·|W'''|) and
//! round-off O(ε/h) ≈ 1e-10 relative, so 1e-6 (the brief's bound) has margin.

use nalgebra::Matrix3;
use olli_solver::material::fd_check::{fd_errors, random_deformation};
use olli_solver::material::{registry, Material, VolumetricForm};

const FORMS: [VolumetricForm; 3] = [VolumetricForm::Quadratic, VolumetricForm::Logarithmic, VolumetricForm::SimoTaylor];

fn material(model: &str, constants: &[(&str, f64)], form: VolumetricForm) -> Material {
    let mut c = constants.to_vec();
    c.push(("bulk_modulus", 40.0));
    registry::material(model, &c, form).unwrap()
}

fn check_random(model: &str, constants: &[(&str, f64)]) {
    for form in FORMS {
        let m = material(model, constants, form);
        for seed in 1..25 {
            let f = random_deformation(seed, 0.4);
            let c = f.transpose() * f;
            let (es, et) = fd_errors(&m, &c, 1e-6);
            assert!(es < 1e-6 && et < 1e-6, "{model} {form:?} seed {seed}: stress {es:e}, tangent {et:e}");
        }
    }
}

#[test]
fn mooney_rivlin_tangent_matches_finite_differences() {
    // Exercises the Ī2 branch of the generic invariant routine.
    check_random("mooney-rivlin", &[("c10", 0.3), ("c01", 0.15)]);
    check_random("mooney-rivlin", &[("c10", 0.5), ("c01", -0.1)]);
}

#[test]
fn yeoh_tangent_matches_finite_differences() {
    check_random("yeoh", &[("c10", 0.5), ("c20", -0.05), ("c30", 0.004)]);
}

#[test]
fn eight_chain_tangent_matches_finite_differences() {
    check_random("eight-chain", &[("shear_modulus", 0.7), ("locking_stretch", 2.2)]);
    check_random("eight-chain", &[("shear_modulus", 1.0), ("locking_stretch", 30.0)]);
}

/// Uniaxial isochoric stretch `a` with chain stretch `√((a² + 2/a)/3) = target`.
fn uniaxial_stretch_for_chain_stretch(target: f64) -> f64 {
    let (mut lo, mut hi) = (1.0, 3.0 * target);
    for _ in 0..200 {
        let a = 0.5 * (lo + hi);
        if ((a * a + 2.0 / a) / 3.0).sqrt() < target {
            lo = a
        } else {
            hi = a
        }
    }
    0.5 * (lo + hi)
}

#[test]
fn eight_chain_tangent_matches_finite_differences_near_locking() {
    let lock = 2.0;
    for form in FORMS {
        let m = material("eight-chain", &[("shear_modulus", 0.7), ("locking_stretch", lock)], form);
        for (k, ratio) in [0.9, 0.95, 0.98, 0.99].into_iter().enumerate() {
            let a = uniaxial_stretch_for_chain_stretch(ratio * lock);
            let base = Matrix3::from_diagonal(&nalgebra::Vector3::new(a, 1.0 / a.sqrt(), 1.0 / a.sqrt()));
            for seed in 1..6 {
                // A small random perturbation so that every tangent entry is exercised.
                let f = base * random_deformation(100 * k as u64 + seed, 0.01);
                let c = f.transpose() * f;
                let i1b = c.trace() / c.determinant().cbrt();
                let chain = (i1b / 3.0).sqrt() / lock;
                assert!(chain > ratio - 0.02 && chain < 0.999, "chain stretch ratio {chain}");
                // Near locking the stress rises like 1/(1 − λ_ch/λ_L)²: a smaller step keeps
                // truncation error below 1e-6.
                let (es, et) = fd_errors(&m, &c, 1e-7);
                assert!(es < 1e-6 && et < 1e-6, "{form:?} ratio {ratio} seed {seed}: stress {es:e}, tangent {et:e}");
            }
        }
    }
}

#[test]
fn eight_chain_reports_locking_instead_of_nan() {
    let m = material("eight-chain", &[("shear_modulus", 0.7), ("locking_stretch", 2.0)], VolumetricForm::Quadratic);
    let a = uniaxial_stretch_for_chain_stretch(2.0 * 1.001);
    let f = Matrix3::from_diagonal(&nalgebra::Vector3::new(a, 1.0 / a.sqrt(), 1.0 / a.sqrt()));
    let err = m.response(&(f.transpose() * f)).unwrap_err();
    assert!(
        matches!(err, olli_solver::material::MaterialError::ChainLocking { .. }),
        "{err}"
    );
}
