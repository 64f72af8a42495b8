//! Kernel parity: the 3-D solids run the spatial form
//! ([`crate::element::solid`]: Kirchhoff stress, symmetric 6×6 spatial
//! tangent, geometric term as a scalar per node pair), the 2-D elements its
//! four-component version ([`crate::element::planar`]), and the quad9 with
//! its linear pressure the total-Lagrangian kernel integrating only the
//! lower triangle of the (symmetric) tangent. The reference is the
//! total-Lagrangian kernel forming every entry of `∫ Bᵀ A B dV`, as it did
//! before any of them (`integrate_with::<false>`). All must agree to 1e-12
//! of the largest entry, for the residual and the tangent, on distorted
//! hex8, tet10, hex20, hex27, quad4, tri6, quad8 and quad9 elements of every
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
        (Shape::Tet10, Analysis::Solid3d),
        (Shape::Hex20, Analysis::Solid3d),
        (Shape::Hex27, Analysis::Solid3d),
        (Shape::Quad4, Analysis::Axisymmetric),
        (Shape::Quad4, Analysis::PlaneStrain { thickness: 2.0 }),
        (Shape::Tri6, Analysis::Axisymmetric),
        (Shape::Tri6, Analysis::PlaneStrain { thickness: 2.0 }),
        (Shape::Quad8, Analysis::Axisymmetric),
        (Shape::Quad8, Analysis::PlaneStrain { thickness: 2.0 }),
        (Shape::Quad9, Analysis::Axisymmetric),
        (Shape::Quad9, Analysis::PlaneStrain { thickness: 2.0 }),
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
                    // The same F but for the hoop stretch, summed as u_a (N_a/R)
                    // from the cached N_a/R instead of (u_a N_a)/R: round-off.
                    assert!((w_new - w_ref).abs() <= 1e-13 * w_ref.abs(), "{what}: energy {w_new} vs {w_ref}");
                    let (fs, ks) = (largest(&f_ref), largest(&k_ref));
                    assert!(fs > 0.0 && ks > 0.0, "{what}: a loaded element");
                    for (a, b) in f_new.iter().zip(&f_ref) {
                        assert!((a - b).abs() <= 1e-12 * fs, "{what}: force {a} vs {b}");
                    }
                    for (i, (a, b)) in k_new.iter().zip(&k_ref).enumerate() {
                        assert!((a - b).abs() <= 1e-12 * ks, "{what}: K[{}, {}] {a} vs {b}", i % nd, i / nd);
                    }
                    if let (Some(a), Some(b)) = (&s_new, &s_ref) {
                        assert!((a.volume_ratio - b.volume_ratio).abs() <= 1e-13 * b.volume_ratio, "{what}: v/V");
                        let gs = largest(&b.dvolume_du[..nd]);
                        for (x, y) in a.dvolume_du[..nd].iter().zip(&b.dvolume_du[..nd]) {
                            assert!((x - y).abs() <= 1e-12 * gs, "{what}: ∂(v/V)/∂u {x} vs {y}");
                        }
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
    assert_eq!(checked, registry::SAMPLES.len() * cases.len() * 2 * 2);
}

/// The run-time dispatched (vector) paths of the spatial kernels, the 3-D
/// solid's (hex8) and the 2-D one's (quad4, axisymmetric and plane
/// strain), give the same bits as their plain scalar builds: each lane does
/// the same operations in the same order (a check of the implementation,
/// no reference values).
#[test]
fn vector_and_scalar_spatial_kernels_agree_bit_for_bit() {
    use crate::element::planar::{self, planar_integrate_into, planar_integrate_scalar};
    use crate::element::reference_geometry_into;
    use crate::element::solid::{self, solid_integrate_into, solid_integrate_scalar, SolidKinematics, TangentLanes};
    use crate::element::spatial::{Input, Output};
    use crate::element::{PointResponse, VolumetricResponse};
    for (name, constants) in registry::SAMPLES {
        let mut all = constants.to_vec();
        all.push(("bulk_modulus", 150.0));
        let mat = registry::material(name, &all, VolumetricForm::Logarithmic).unwrap();
        for analysis in [Analysis::Solid3d, Analysis::Axisymmetric, Analysis::PlaneStrain { thickness: 2.0 }] {
            let solid = analysis == Analysis::Solid3d;
            let shape = if solid { Shape::Hex8 } else { Shape::Quad4 };
            let (nodes, nd) = (shape.nodes(), shape.dofs());
            let (x, u) = distorted(shape);
            let (mut grads, mut dv) = (vec![[0.0; 3]; nodes * shape.points()], vec![0.0; shape.points()]);
            reference_geometry_into(shape, analysis, &x, &mut grads, &mut dv).unwrap();
            let mut kin = SolidKinematics::default();
            let gradient = if solid { solid::deformation_gradient } else { planar::deformation_gradient };
            kin.fill(nodes, &grads, &dv, &u, gradient).unwrap();
            let responses: Vec<PointResponse> = kin
                .points()
                .iter()
                .map(|p| {
                    let r = mat.isochoric_response(&(p.f.transpose() * p.f)).unwrap();
                    PointResponse { energy: r.energy, stress: r.stress, tangent: r.tangent }
                })
                .collect();
            let law = VolumetricResponse { energy: 0.01, pressure: 0.3, law_pressure: 0.25, stiffness: 150.0 };
            let input = Input { grads: &grads, dv: &dv, kin: &kin, responses: &responses, volumetric: Some(&law) };
            let axisymmetric = analysis == Analysis::Axisymmetric;
            let run = |vector: bool| {
                let (mut f, mut k) = (vec![0.0; nd], vec![0.0; nd * nd]);
                let mut state = MixedState { pressure: 0.3, dilatation: 1.02, ..MixedState::default() };
                let out = Output { force: &mut f, stiffness: Some(&mut k), state: Some(&mut state) };
                let w = if solid {
                    // Lanes left over from another element must not show.
                    let mut lanes = TangentLanes::default();
                    solid_integrate_into(
                        8,
                        Input { volumetric: None, ..input },
                        Output { force: &mut [0.0; 24], stiffness: Some(&mut [0.0; 576]), state: None },
                        &mut lanes,
                    )
                    .unwrap();
                    if vector {
                        solid_integrate_into(8, input, out, &mut lanes)
                    } else {
                        solid_integrate_scalar(input, out, &mut lanes)
                    }
                } else if vector {
                    planar_integrate_into(4, axisymmetric, input, out)
                } else {
                    planar_integrate_scalar(axisymmetric, input, out)
                };
                (w.unwrap(), f, k, state)
            };
            let (wv, fv, kv, sv) = run(true);
            let (ws, fs, ks, ss) = run(false);
            let what = format!("{name} {analysis:?}");
            assert_eq!(wv, ws, "{what}");
            assert_eq!(fv, fs, "{what}");
            assert_eq!(kv, ks, "{what}");
            assert_eq!(sv, ss, "{what}");
            assert!(kv.iter().any(|v| *v != 0.0));
        }
    }
}

/// The residual-only path (no tangent wanted: the material computes its
/// stress alone, [`crate::material::IsochoricModel::stress`]) gives the
/// residual and energy of the full path to 1e-13 of the largest force, for
/// every model of the registry, with and without a Prony series (whose
/// history keeps the full path), on the spatial-form solids, the
/// total-Lagrangian 2-D and linear-pressure elements, and the Taylor–Hood
/// tet10 with its corner pressures. (A check of two code paths against each
/// other; the stress itself is checked by finite differences in `fd_check`.)
#[test]
fn residual_only_path_matches_the_full_path() {
    use super::history::ElementHistory;
    use super::kernel::{element_continuous_into, element_with_history_into};
    use crate::material::Prony;
    let cases = [
        (Shape::Hex8, Analysis::Solid3d, Formulation::Mixed),
        (Shape::Hex8, Analysis::Solid3d, Formulation::Displacement),
        (Shape::Hex27, Analysis::Solid3d, Formulation::Mixed),
        (Shape::Quad4, Analysis::Axisymmetric, Formulation::Mixed),
        (Shape::Quad9, Analysis::PlaneStrain { thickness: 2.0 }, Formulation::Mixed),
        (Shape::Tet10, Analysis::Solid3d, Formulation::ContinuousPressure),
    ];
    let mut checked = 0;
    for (name, constants) in registry::SAMPLES {
        let mut all = constants.to_vec();
        all.push(("bulk_modulus", 150.0));
        let elastic = registry::material(name, &all, VolumetricForm::Logarithmic).unwrap();
        let relaxing = registry::material(name, &all, VolumetricForm::Logarithmic).unwrap().with_prony(Prony::new(&[[0.3, 0.5]]).unwrap());
        for mat in [&elastic, &relaxing] {
            let width = mat.history_len() * 27;
            let previous: Vec<f64> = (0..width).map(|i| 0.01 * (i % 5) as f64).collect();
            for (shape, analysis, formulation) in cases {
                let ctx = ElementContext { shape, analysis, formulation, material: mat };
                let (x, u) = distorted(shape);
                let corners = [0.2, -0.1, 0.15, 0.05];
                let nd = shape.dofs() + if formulation == Formulation::ContinuousPressure { corners.len() } else { 0 };
                let eval = |k: Option<&mut [f64]>, f: &mut [f64]| {
                    let mut current = vec![0.0; width];
                    let mut history =
                        ElementHistory { previous: &previous, current: &mut current, time_step: 0.1, tangent: Default::default() };
                    let history = if width > 0 { Some(&mut history) } else { None };
                    let w = if formulation == Formulation::ContinuousPressure {
                        element_continuous_into(&ctx, &x, &u, &corners, 2.0, f, k, history)
                    } else {
                        let mut state = MixedState { pressure: 0.3, dilatation: 1.02, ..MixedState::default() };
                        let state = if formulation == Formulation::Mixed && shape == Shape::Hex8 { Some(&mut state) } else { None };
                        element_with_history_into(&ctx, &x, &u, f, k, state, history)
                    };
                    (w.unwrap(), current)
                };
                let (mut f_full, mut k_full, mut f_alone) = (vec![0.0; nd], vec![0.0; nd * nd], vec![0.0; nd]);
                let (w_full, h_full) = eval(Some(&mut k_full), &mut f_full);
                let (w_alone, h_alone) = eval(None, &mut f_alone);
                let what = format!("{name} (history {width}) {shape:?} {analysis:?} {formulation:?}");
                let scale = largest(&f_full);
                assert!(scale > 0.0, "{what}: a loaded element");
                assert!((w_full - w_alone).abs() <= 1e-13 * w_full.abs(), "{what}: energy {w_full} vs {w_alone}");
                for (a, b) in f_alone.iter().zip(&f_full) {
                    assert!((a - b).abs() <= 1e-13 * scale, "{what}: force {a} vs {b}");
                }
                assert_eq!(h_full, h_alone, "{what}: trial history");
                checked += 1;
            }
        }
    }
    assert_eq!(checked, registry::SAMPLES.len() * 2 * cases.len());
}
