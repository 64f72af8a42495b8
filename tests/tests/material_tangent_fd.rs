//! Consistent tangent and stress against central finite differences, for
//! every model and volumetric law, at random deformation gradients (fixed
//! seeds), at states with equal principal stretches (where the Ogden
//! spectral formulas take their limits) and at near-locking eight-chain
//! states. The models come from one list, `registry::SAMPLES`, which a
//! registry test keeps complete: a new model cannot skip these checks.
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
fn every_registered_model_matches_finite_differences() {
    for (model, constants) in registry::SAMPLES {
        check_random(model, constants);
    }
}

#[test]
fn every_registered_model_matches_finite_differences_at_equal_stretches() {
    // The reference state, uniaxial-like (λ, t, t) and equibiaxial-like
    // (λ, λ, t) states, and a pure dilatation: repeated eigenvalues of C.
    let states = [[1.0, 1.0, 1.0], [1.6, 0.8, 0.8], [1.3, 1.3, 0.62], [0.7, 1.2, 1.2], [1.05, 1.05, 1.05]];
    for (model, constants) in registry::SAMPLES {
        for form in FORMS {
            let m = material(model, constants, form);
            for l in states {
                let c = Matrix3::from_diagonal(&nalgebra::Vector3::new(l[0] * l[0], l[1] * l[1], l[2] * l[2]));
                let (es, et) = fd_errors(&m, &c, 1e-6);
                // At the reference state the stress is zero, so its relative error means nothing.
                let es = if l == [1.0; 3] { 0.0 } else { es };
                assert!(es < 1e-6 && et < 1e-6, "{model} {form:?} stretches {l:?}: stress {es:e}, tangent {et:e}");
            }
        }
    }
}

#[test]
fn further_constants_match_finite_differences() {
    // A negative c01 (stable only in part of the plane) and a nearly Gaussian network.
    check_random("mooney-rivlin", &[("c10", 0.5), ("c01", -0.1)]);
    check_random("eight-chain", &[("shear_modulus", 1.0), ("locking_stretch", 30.0)]);
    check_random("gent", &[("shear_modulus", 0.5), ("extensibility_limit", 2.5)]);
    check_random("ogden", &[("mu", 2.0), ("alpha", 0.5)]);
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
    assert!(matches!(err, olli_solver::material::MaterialError::ChainLocking { .. }), "{err}");
}

/// Largest relative errors (stress, tangent) of `isochoric_response` by
/// central differences on C (same conventions as `fd_check::fd_errors`).
fn isochoric_fd_errors(m: &Material, c: &Matrix3<f64>, h: f64) -> (f64, f64) {
    use olli_solver::material::tensor::VOIGT_PAIRS;
    let r = m.isochoric_response(c).unwrap();
    let (s_scale, d_scale) = (r.stress.norm(), r.tangent.norm());
    let (mut es, mut et): (f64, f64) = (0.0, 0.0);
    for (q, &(k, l)) in VOIGT_PAIRS.iter().enumerate() {
        let mut dc = Matrix3::zeros();
        dc[(k, l)] += h;
        if k != l {
            dc[(l, k)] += h;
        }
        let (rp, rm) = (m.isochoric_response(&(c + dc)).unwrap(), m.isochoric_response(&(c - dc)).unwrap());
        // dW = S : dC / 2 (an off-diagonal pair counts twice).
        let s_fd = (rp.energy - rm.energy) / (2.0 * h) * if k == l { 2.0 } else { 1.0 };
        es = es.max((s_fd - r.stress[(k, l)]).abs() / s_scale);
        // dS = D dE with dE_kk = h/2, engineering γ_kl = h.
        let de = if k == l { 0.5 * h } else { h };
        for (p, &(i, j)) in VOIGT_PAIRS.iter().enumerate() {
            let d_fd = (rp.stress[(i, j)] - rm.stress[(i, j)]) / (2.0 * de);
            et = et.max((d_fd - r.tangent[(p, q)]).abs() / d_scale);
        }
    }
    (es, et)
}

// The pieces a mixed u–p element uses: the isochoric response alone must be
// consistent (FD, general mathematics), its Cauchy stress deviatoric
// (S_iso : C = 0, Holzapfel 2000 §6.4, from memory), and the full response
// must equal S_iso + J U'(J) C⁻¹ (the split W = W_iso + U(J)).
#[test]
fn isochoric_pieces_for_mixed_elements_are_consistent() {
    for (model, constants) in registry::SAMPLES {
        let m = material(model, constants, VolumetricForm::SimoTaylor);
        for seed in 1..15 {
            let f = random_deformation(seed + 500, 0.4);
            let c = f.transpose() * f;
            let (es, et) = isochoric_fd_errors(&m, &c, 1e-6);
            assert!(es < 1e-6 && et < 1e-6, "{model} seed {seed}: stress {es:e}, tangent {et:e}");
            let iso = m.isochoric_response(&c).unwrap();
            let full = m.response(&c).unwrap();
            let trace = (iso.stress * c).trace();
            assert!(trace.abs() < 1e-12 * iso.stress.norm() * c.norm(), "{model}: S_iso : C = {trace:e}");
            let j = c.determinant().sqrt();
            let p = m.volumetric.pressure(j).unwrap();
            let expected = iso.stress + c.try_inverse().unwrap() * (j * p);
            assert!((full.stress - expected).norm() < 1e-12 * full.stress.norm().max(1.0), "{model}: split");
        }
    }
}
