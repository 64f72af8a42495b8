//! Kernel parity: the element kernel integrates only the lower triangle of
//! the (symmetric) tangent and mirrors it; the reference is the same kernel
//! forming every entry, as it did before (`integrate_with::<false>`). Both must agree to 1e-12 of the largest entry, for the
//! residual and the tangent, on distorted hex8 and quad4 elements of every
//! analysis, every material of the registry, both formulations, and the
//! three-field form with carried pressure and dilatation off the consistent
//! point. A regression test of the kernel against its former self: the
//! independent check of the tangent itself is `fd_tests` (finite
//! differences).

use super::fd_tests::distorted;
use super::kernel::{element_through, element_with_state_into, ElementContext};
use crate::element::kernel::integrate_with;
use crate::element::{Analysis, Formulation, MixedState, Shape};
use crate::material::{registry, VolumetricForm};

fn largest(v: &[f64]) -> f64 {
    v.iter().fold(0.0f64, |m, x| m.max(x.abs()))
}

#[test]
fn symmetric_kernel_matches_the_full_reference() {
    let cases = [
        (Shape::Hex8, Analysis::Solid3d),
        (Shape::Quad4, Analysis::Axisymmetric),
        (Shape::Quad4, Analysis::PlaneStrain { thickness: 2.0 }),
    ];
    let mut checked = 0;
    for (name, constants) in registry::SAMPLES {
        let mut all = constants.to_vec();
        all.push(("bulk_modulus", 150.0));
        let mat = registry::material(name, &all, VolumetricForm::Logarithmic).unwrap();
        for (shape, analysis) in cases {
            for formulation in [Formulation::Mixed, Formulation::Displacement] {
                let ctx = ElementContext { shape, analysis, formulation, material: &mat };
                let (x, u) = distorted(shape);
                let nd = shape.dofs();
                // Carried state away from the consistent point (mixed only).
                for carried in [None, Some((0.3, 1.02))] {
                    let state = |_: ()| carried.map(|(p, t)| MixedState { pressure: p, dilatation: t, ..MixedState::default() });
                    let (mut f_new, mut k_new) = (vec![0.0; nd], vec![0.0; nd * nd]);
                    let (mut f_ref, mut k_ref) = (vec![0.0; nd], vec![0.0; nd * nd]);
                    let (mut s_new, mut s_ref) = (state(()), state(()));
                    let w_new = element_with_state_into(&ctx, &x, &u, &mut f_new, Some(&mut k_new), s_new.as_mut()).unwrap();
                    let w_ref =
                        element_through(integrate_with::<false>, &ctx, &x, &u, &mut f_ref, Some(&mut k_ref), s_ref.as_mut(), None).unwrap();
                    let what = format!("{name} {shape:?} {analysis:?} {formulation:?} carried {carried:?}");
                    assert_eq!(w_new, w_ref, "{what}: energy");
                    let (fs, ks) = (largest(&f_ref), largest(&k_ref));
                    assert!(fs > 0.0 && ks > 0.0, "{what}: a loaded element");
                    for (a, b) in f_new.iter().zip(&f_ref) {
                        assert!((a - b).abs() <= 1e-12 * fs, "{what}: force {a} vs {b}");
                    }
                    for (i, (a, b)) in k_new.iter().zip(&k_ref).enumerate() {
                        assert!((a - b).abs() <= 1e-12 * ks, "{what}: K[{}, {}] {a} vs {b}", i % nd, i / nd);
                    }
                    if let (Some(a), Some(b)) = (&s_new, &s_ref) {
                        assert_eq!(a.volume_ratio, b.volume_ratio);
                        assert_eq!(a.dvolume_du[..nd], b.dvolume_du[..nd]);
                    }
                    // Without a tangent the residual is the same too.
                    let mut f_only = vec![0.0; nd];
                    element_with_state_into(&ctx, &x, &u, &mut f_only, None, state(()).as_mut()).unwrap();
                    assert_eq!(f_only, f_new, "{what}: residual-only evaluation");
                    checked += 1;
                }
            }
        }
    }
    assert_eq!(checked, registry::SAMPLES.len() * 3 * 2 * 2);
}
