//! Finite-difference checks of every element variant: the tangent against
//! central differences of the internal force, and the force against central
//! differences of the energy (the element is hyperelastic, so both must hold).

use super::kernel::{element_into, element_with_state_into, point_states, ElementContext, KernelError};
use crate::element::{Analysis, ElementError, Formulation, MixedState, PointState, Shape, MAX_POINTS};
use crate::material::{registry, Material, VolumetricForm};

fn material() -> Material {
    // Near-incompressible (κ/μ = 100) so the volumetric terms dominate, as in rubber.
    registry::material("neo-hookean", &[("shear_modulus", 0.7), ("bulk_modulus", 70.0)], VolumetricForm::Logarithmic).unwrap()
}

/// A distorted element: reference nodes perturbed by a fixed pattern, and a
/// large displacement field (stretches up to ~1.3, shear ~0.2).
pub(super) fn distorted(shape: Shape) -> (Vec<[f64; 3]>, Vec<[f64; 3]>) {
    let base: Vec<[f64; 3]> = if shape.dimension() == 3 {
        shape.def().reference_nodes.iter().map(|p| [1.0 + 0.5 * p[0], 2.0 + 0.6 * p[1], 0.4 * p[2]]).collect()
    } else {
        shape.def().reference_nodes.iter().map(|p| [1.5 + 0.5 * p[0], 0.7 * p[1], 0.0]).collect()
    };
    let dim = shape.dimension();
    let x: Vec<[f64; 3]> = base
        .iter()
        .enumerate()
        .map(|(a, p)| {
            let s = ((a * 7 + 3) % 5) as f64 * 0.03 - 0.06;
            let mut q = *p;
            q[0] += s;
            q[1] -= 0.5 * s;
            if dim == 3 {
                q[2] += 0.7 * s;
            }
            q
        })
        .collect();
    let u: Vec<[f64; 3]> = x
        .iter()
        .enumerate()
        .map(|(a, p)| {
            let w = ((a * 5 + 1) % 7) as f64 * 0.01;
            let mut d = [0.25 * p[0] + 0.2 * p[1] + w, -0.1 * p[1] + 0.05 * p[0] - w, 0.0];
            if dim == 3 {
                d[2] = 0.15 * p[2] - 0.1 * p[0] + w;
            }
            d
        })
        .collect();
    (x, u)
}

fn check(shape: Shape, analysis: Analysis, formulation: Formulation) {
    let mat = material();
    let ctx = ElementContext { shape, analysis, formulation, material: &mat };
    let (x, u) = distorted(shape);
    let nd = shape.dofs();
    let dim = shape.dimension();
    let mut f = vec![0.0; nd];
    let mut k = vec![0.0; nd * nd];
    element_into(&ctx, &x, &u, &mut f, Some(&mut k)).unwrap();
    let h = 1e-6;
    let kmax = k.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    let fmax = f.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    let (mut fp, mut fm) = (vec![0.0; nd], vec![0.0; nd]);
    for c in 0..nd {
        let (mut up, mut um) = (u.clone(), u.clone());
        up[c / dim][c % dim] += h;
        um[c / dim][c % dim] -= h;
        let ep = element_into(&ctx, &x, &up, &mut fp, None).unwrap();
        let em = element_into(&ctx, &x, &um, &mut fm, None).unwrap();
        // Central differences are O(h²) ≈ 1e-12 relative; rounding in f is
        // ~1e-16·|f|/h ≈ 1e-10 relative, so 1e-6 leaves a wide margin yet
        // catches any missing tangent term (those are O(1) relative).
        let fd_force = (ep - em) / (2.0 * h);
        assert!((fd_force - f[c]).abs() <= 1e-6 * fmax, "{shape:?} {analysis:?} {formulation:?} force {c}: {} vs {fd_force}", f[c]);
        for r in 0..nd {
            let fd = (fp[r] - fm[r]) / (2.0 * h);
            let an = k[c * nd + r];
            assert!((fd - an).abs() <= 1e-6 * kmax, "{shape:?} {analysis:?} {formulation:?} K[{r},{c}] = {an} vs FD {fd}");
        }
    }
    // Symmetry of the condensed tangent.
    for r in 0..nd {
        for c in 0..nd {
            assert!((k[c * nd + r] - k[r * nd + c]).abs() <= 1e-10 * kmax);
        }
    }
}

#[test]
fn hex8_tangents_match_finite_differences() {
    check(Shape::Hex8, Analysis::Solid3d, Formulation::Mixed);
    check(Shape::Hex8, Analysis::Solid3d, Formulation::Displacement);
}

#[test]
fn quad4_axisymmetric_tangents_match_finite_differences() {
    check(Shape::Quad4, Analysis::Axisymmetric, Formulation::Mixed);
    check(Shape::Quad4, Analysis::Axisymmetric, Formulation::Displacement);
}

#[test]
fn quad4_plane_strain_tangents_match_finite_differences() {
    check(Shape::Quad4, Analysis::PlaneStrain { thickness: 2.5 }, Formulation::Mixed);
    check(Shape::Quad4, Analysis::PlaneStrain { thickness: 2.5 }, Formulation::Displacement);
}

/// Every quadratic element, mixed (constant or linear pressure) and
/// displacement, in each analysis it serves.
#[test]
fn quadratic_element_tangents_match_finite_differences() {
    for shape in [Shape::Tri6, Shape::Quad8, Shape::Quad9] {
        for analysis in [Analysis::Axisymmetric, Analysis::PlaneStrain { thickness: 2.5 }] {
            check(shape, analysis, Formulation::Mixed);
            check(shape, analysis, Formulation::Displacement);
        }
    }
    for shape in [Shape::Tet10, Shape::Hex20, Shape::Hex27] {
        check(shape, Analysis::Solid3d, Formulation::Mixed);
        check(shape, Analysis::Solid3d, Formulation::Displacement);
    }
}

/// The compile-time point counts of the kernel match the shapes' rules.
#[test]
fn kernel_point_counts_match_the_rules() {
    let mat = material();
    for shape in crate::shape::ShapeKind::ALL.into_iter().filter(|s| s.dimension() >= 2) {
        let analysis = if shape.dimension() == 3 { Analysis::Solid3d } else { Analysis::PlaneStrain { thickness: 1.0 } };
        let ctx = ElementContext { shape, analysis, formulation: Formulation::Mixed, material: &mat };
        let (x, u) = distorted(shape);
        let mut out = vec![PointState::default(); MAX_POINTS];
        point_states(&ctx, &x, &u, &mut out).unwrap();
        let used = out.iter().filter(|p| p.volume > 0.0).count();
        assert_eq!(used, shape.points(), "{shape}");
    }
}

#[test]
fn inverted_point_is_reported() {
    let mat = material();
    let ctx = ElementContext {
        shape: Shape::Quad4,
        analysis: Analysis::PlaneStrain { thickness: 1.0 },
        formulation: Formulation::Mixed,
        material: &mat,
    };
    let (x, _) = distorted(Shape::Quad4);
    // Fold node 2 through node 0: the element turns inside out.
    let mut u = vec![[0.0; 3]; 4];
    u[2] = [x[0][0] - x[2][0] - 0.5, x[0][1] - x[2][1] - 0.5, 0.0];
    let mut f = vec![0.0; 8];
    assert!(matches!(element_into(&ctx, &x, &u, &mut f, None), Err(KernelError::Element(ElementError::Inverted { .. }))));
}

#[test]
fn carried_state_at_the_consistent_point_reproduces_the_condensed_element() {
    // With p = U'(v/V) and θ = v/V the three-field residual and tangent are
    // those of the condensed element, so both paths converge to one solution.
    let mat = material();
    let ctx = ElementContext { shape: Shape::Hex8, analysis: Analysis::Solid3d, formulation: Formulation::Mixed, material: &mat };
    let (x, u) = distorted(Shape::Hex8);
    let (mut f0, mut k0) = (vec![0.0; 24], vec![0.0; 576]);
    element_into(&ctx, &x, &u, &mut f0, Some(&mut k0)).unwrap();
    // First pass only to learn v/V.
    let mut st = MixedState::default();
    let (mut f1, mut k1) = (vec![0.0; 24], vec![0.0; 576]);
    element_with_state_into(&ctx, &x, &u, &mut f1, Some(&mut k1), Some(&mut st)).unwrap();
    st.dilatation = st.volume_ratio;
    st.pressure = mat.volumetric.pressure(st.volume_ratio).unwrap();
    element_with_state_into(&ctx, &x, &u, &mut f1, Some(&mut k1), Some(&mut st)).unwrap();
    let scale = f0.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    for (a, b) in f0.iter().zip(&f1) {
        assert!((a - b).abs() <= 1e-12 * scale);
    }
    let kscale = k0.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    for (a, b) in k0.iter().zip(&k1) {
        assert!((a - b).abs() <= 1e-12 * kscale);
    }
    // Away from it: the carried pressure cancels from the condensed residual
    // (p is eliminated) but enters the tangent's initial-stress term ...
    st.pressure += 1.0;
    element_with_state_into(&ctx, &x, &u, &mut f1, Some(&mut k1), Some(&mut st)).unwrap();
    assert!(f0.iter().zip(&f1).all(|(a, b)| (a - b).abs() <= 1e-10 * scale));
    assert!(k0.iter().zip(&k1).any(|(a, b)| (a - b).abs() > 1e-3 * kscale));
    // (A carried θ off v/V enters the residual only through
    // U'(θ) + U''(θ)(v/V − θ), a Taylor step to U'(v/V): second order.)
}

/// The Taylor–Hood tet10 ([`crate::element::taylor_hood`]): its force is
/// the derivative of the element's share of the stationary functional
/// Π(u, π), and its tangent (pressure rows and columns included) the
/// derivative of the force, both by central differences on the distorted
/// element, with corner pressures near the logarithmic law's range and a
/// pressure scale s ≠ 1 (so a missing factor s shows). The tangent is
/// symmetric and, in its pressure block, negative definite.
#[test]
fn tangent_fd_tet10_taylor_hood_with_pressure_rows() {
    use super::kernel::element_continuous_into;
    let mat = material();
    let shape = Shape::Tet10;
    let ctx = ElementContext { shape, analysis: Analysis::Solid3d, formulation: Formulation::ContinuousPressure, material: &mat };
    let (x, u) = distorted(shape);
    let scale = 3.0;
    let pi = [8.0 / scale, 12.0 / scale, 5.0 / scale, 10.0 / scale];
    let (nu, nt) = (30, 34);
    let eval = |u: &[[f64; 3]], pi: &[f64; 4], f: &mut [f64], k: Option<&mut [f64]>| {
        let p: Vec<f64> = pi.iter().map(|v| v * scale).collect();
        element_continuous_into(&ctx, &x, u, &p, scale, f, k, None).unwrap()
    };
    let mut f = vec![0.0; nt];
    let mut k = vec![0.0; nt * nt];
    eval(&u, &pi, &mut f, Some(&mut k));
    let kmax = k.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    let fmax = f.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    assert!(f[nu..].iter().any(|v| v.abs() > 1e-3 * fmax), "pressure rows carry a residual");
    let h = 1e-6;
    let (mut fp, mut fm) = (vec![0.0; nt], vec![0.0; nt]);
    for c in 0..nt {
        let (mut up, mut um, mut pp, mut pm) = (u.clone(), u.clone(), pi, pi);
        if c < nu {
            up[c / 3][c % 3] += h;
            um[c / 3][c % 3] -= h;
        } else {
            pp[c - nu] += h;
            pm[c - nu] -= h;
        }
        let ep = eval(&up, &pp, &mut fp, None);
        let em = eval(&um, &pm, &mut fm, None);
        let fd_force = (ep - em) / (2.0 * h);
        assert!((fd_force - f[c]).abs() <= 1e-6 * fmax, "force {c}: {} vs {fd_force}", f[c]);
        for r in 0..nt {
            let fd = (fp[r] - fm[r]) / (2.0 * h);
            let an = k[c * nt + r];
            assert!((fd - an).abs() <= 1e-6 * kmax, "K[{r},{c}] = {an} vs FD {fd}");
        }
    }
    for r in 0..nt {
        for c in 0..nt {
            assert!((k[c * nt + r] - k[r * nt + c]).abs() <= 1e-12 * kmax);
        }
    }
    let kpp = nalgebra::Matrix4::from_fn(|r, c| k[(nu + c) * nt + nu + r]);
    assert!(kpp.symmetric_eigenvalues().iter().all(|v| *v < 0.0), "pressure block negative definite");
}

/// The tangent of the three-field element (carried pressure p and
/// dilatation θ, Simo, Taylor & Pister 1985, "Variational and projection
/// methods for the volume constraint in finite deformation
/// elasto-plasticity", CMAME 51) is the Schur complement of the full
/// Jacobian of its three equations, by central differences, also where
/// the carried unknowns are far from the displacement's (after a load
/// change, a moved fluid front or a contact update):
///
/// ```text
/// R_u = f_iso(u) + p g(u)        (g = ∂v/∂u)
/// R_θ = V (U'(θ) − p)
/// R_p = V (v/V − θ)
/// K   = ∂R_u/∂u + U''(θ)/V g gᵀ  (θ and p eliminated)
/// ```
///
/// A finite difference of the condensed residual at fixed (θ, p) is not
/// this tangent: it differs by (p̂ − p) ∂g/∂u with p̂ = U'(θ) +
/// U''(θ)(v/V − θ), the initial-stress term the three-field iteration keeps
/// at the carried p on purpose. A check against it reports a tangent
/// "several per cent off" in every element away from the consistent point;
/// that is the wrong reference, not a wrong tangent.
#[test]
fn three_field_tangent_is_the_schur_complement_of_its_fd_jacobian() {
    let mat = material();
    for (shape, analysis) in
        [(Shape::Quad4, Analysis::Axisymmetric), (Shape::Quad4, Analysis::PlaneStrain { thickness: 2.5 }), (Shape::Hex8, Analysis::Solid3d)]
    {
        let ctx = ElementContext { shape, analysis, formulation: Formulation::Mixed, material: &mat };
        let (x, u) = distorted(shape);
        let (nd, dim) = (shape.dofs(), shape.dimension());
        let volume = crate::element::kinematics(shape, analysis, &x, &u).unwrap().volume;
        let law = &mat.volumetric;
        // Carried unknowns well off the consistent point: θ by 3 %, p by
        // about μ·7 besides that.
        let mut st = MixedState::default();
        let (mut f, mut k) = (vec![0.0; nd], vec![0.0; nd * nd]);
        element_with_state_into(&ctx, &x, &u, &mut f, Some(&mut k), Some(&mut st)).unwrap();
        st.dilatation = st.volume_ratio * 1.03;
        st.pressure = law.pressure(st.volume_ratio).unwrap() + 5.0;
        element_with_state_into(&ctx, &x, &u, &mut f, Some(&mut k), Some(&mut st)).unwrap();
        let (theta, p) = (st.dilatation, st.pressure);
        let (u1, u2) = (law.pressure(theta).unwrap(), law.pressure_derivative(theta).unwrap());
        // R_u and v/V at u, with the carried (θ, p) held: the condensed
        // residual minus its consistency term g [U''(θ)(v/V − θ) + U'(θ) − p].
        let balance = |u: &[[f64; 3]], r: &mut [f64], naive: &mut [f64]| -> f64 {
            let mut s = st;
            element_with_state_into(&ctx, &x, u, naive, None, Some(&mut s)).unwrap();
            let c = u2 * (s.volume_ratio - theta) + u1 - p;
            for (a, ra) in r.iter_mut().enumerate().take(nd) {
                *ra = naive[a] - volume * s.dvolume_du[a] * c;
            }
            s.volume_ratio
        };
        let h = 1e-6;
        let kmax = k.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        let (mut rp, mut rm, mut np, mut nm) = (vec![0.0; nd], vec![0.0; nd], vec![0.0; nd], vec![0.0; nd]);
        let mut naive_gap = 0.0f64;
        for c in 0..nd {
            let (mut up, mut um) = (u.clone(), u.clone());
            up[c / dim][c % dim] += h;
            um[c / dim][c % dim] -= h;
            let vp = balance(&up, &mut rp, &mut np);
            let vm = balance(&um, &mut rm, &mut nm);
            // ∂(v/V)/∂u, the coupling to R_p, by differences too.
            let dv = (vp - vm) / (2.0 * h);
            assert!(
                (dv - st.dvolume_du[c]).abs() <= 1e-7 * st.dvolume_du.iter().fold(0.0f64, |m, v| m.max(v.abs())),
                "{shape:?} dv/du {c}"
            );
            for r in 0..nd {
                // Eliminating θ and p from the linearised R_θ and R_p: dθ = g·du/V + …, dp = U''(θ) dθ + …
                let schur = (rp[r] - rm[r]) / (2.0 * h) + u2 * volume * st.dvolume_du[r] * st.dvolume_du[c];
                let an = k[c * nd + r];
                assert!((schur - an).abs() <= 1e-6 * kmax, "{shape:?} {analysis:?} K[{r},{c}] = {an} vs Schur complement of FD {schur}");
                naive_gap = naive_gap.max(((np[r] - nm[r]) / (2.0 * h) - an).abs());
            }
        }
        // The naive reference misses (p̂ − p) ∂g/∂u, large here.
        assert!(naive_gap > 1e-3 * kmax, "{shape:?}: naive FD gap {naive_gap:e} of {kmax:e}");
    }
}
