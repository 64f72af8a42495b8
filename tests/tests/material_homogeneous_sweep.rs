//! Regression tests for the homogeneous sweeps that the `olli material`
//! command runs.

use nalgebra::Matrix3;
use olli_solver::material::homogeneous::{sweep, HomogeneousError, Mode, Settings};
use olli_solver::material::{registry, MaterialError, VolumetricForm};

// Failure: a sweep that began at a strongly compressed stretch (0.1) with a
// compressible material (ν = 0.3) started Newton from the incompressible
// lateral stretch, met a non-positive slope and returned no point at all for
// the mode. Sweeps now run outward from λ = 1 by continuation, with a
// bracketed, safeguarded lateral solve. The check is equilibrium itself
// (the lateral stress of each returned state is zero; general mechanics).
#[test]
fn compressible_sweep_from_strong_compression_returns_every_point() {
    let m = registry::material("mooney-rivlin", &[("c10", 0.3), ("c01", 0.1), ("poisson_ratio", 0.3)], VolumetricForm::SimoTaylor).unwrap();
    let stretches: Vec<f64> = (0..80).map(|i| 0.1 + 0.1 * i as f64).collect();
    for mode in [Mode::Uniaxial, Mode::Equibiaxial, Mode::Planar] {
        let (points, errors) = sweep(&m, mode, &stretches, &Settings::default());
        assert!(errors.is_empty(), "{mode:?}: {errors:?}");
        assert_eq!(points.len(), stretches.len());
        for (p, &s) in points.iter().zip(&stretches) {
            assert_eq!(p.stretch, s, "points come back in the given order");
            let f: Matrix3<f64> = p.deformation_gradient;
            let r = m.response(&(f.transpose() * f)).unwrap();
            let lateral = if mode == Mode::Uniaxial { r.stress[(1, 1)] } else { r.stress[(2, 2)] };
            assert!(lateral.abs() <= 1e-10 * (0.8 + r.stress[(0, 0)].abs()), "{mode:?} λ={s}: S_lat = {lateral:e}");
        }
    }
}

// An eight-chain sweep past the locking stretch keeps the points before it
// on both sides and names the locking in the error (rather than a NaN).
#[test]
fn eight_chain_sweep_stops_at_locking_on_both_sides() {
    let m = registry::material(
        "eight-chain",
        &[("shear_modulus", 1.0), ("locking_stretch", 2.5), ("bulk_modulus", 1e4)],
        VolumetricForm::Quadratic,
    )
    .unwrap();
    let stretches: Vec<f64> = (0..60).map(|i| 0.1 + 0.1 * i as f64).collect();
    let (points, errors) = sweep(&m, Mode::Uniaxial, &stretches, &Settings::default());
    assert_eq!(errors.len(), 2, "{errors:?}");
    for e in &errors {
        assert!(matches!(e, HomogeneousError::Material { source: MaterialError::ChainLocking { .. }, .. }), "{e}");
    }
    assert!(points.iter().all(|p| p.nominal_stress.is_finite()));
    // Incompressible uniaxial chain stretch √((λ² + 2/λ)/3) is 2.58 at λ = 0.1,
    // 2.457 at 4.2 and 2.514 at 4.3: on this grid only 0.2 ≤ λ ≤ 4.2 are below 2.5.
    let lo = points.first().unwrap().stretch;
    let hi = points.last().unwrap().stretch;
    assert!((lo - 0.2).abs() < 1e-9 && (hi - 4.2).abs() < 1e-9, "{lo} .. {hi}");
}
