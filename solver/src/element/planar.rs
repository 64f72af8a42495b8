//! The spatial form of the 2-D elements (quad4, tri6 and quad8 with a
//! constant pressure or none, quad9 without one), in plane strain and
//! axisymmetry: the element of [`super::kernel`] (`∫ Bᵀ P dV`,
//! `∫ Bᵀ A B dV` over the 9-row B of a 3×3 F) written, as the 3-D solids
//! in [`super::solid`], with spatial gradients and the Kirchhoff stress,
//! over the four stress components a 2-D section has:
//!
//! ```text
//! f_a  = ∫ B_aᵀ τ dV
//! K_ab = ∫ B_aᵀ c B_b dV + ∫ (∇N_a · τ ∇N_b) dV · I₂ + [axisymmetric] ∫ τ_θθ h_a h_b dV e_r e_rᵀ
//! ```
//!
//! in Voigt order (xx, yy, θθ or zz, xy). `B_a` is the 4×2 operator of node
//! a: `∇N_a = F⁻ᵀ ∂N_a/∂X` in its in-plane rows and, axisymmetric, the hoop
//! term `h_a = N_a / r` (current radius r = R F_θθ) in the θθ row of the
//! radial column; `c` is the 4×4 block of the push-forward `T D Tᵀ` (F has
//! no out-of-plane shear, so T maps these four components among
//! themselves; Bonet & Wood 2008, *Nonlinear Continuum Mechanics for Finite
//! Element Analysis*, §9.4 for the 3-D form, §9.5 for the axisymmetric
//! rows). The element pressure p adds `J p` to the normal components of τ
//! and `J p (I⊗I − 2𝕀)` to c.
//!
//! The reference gradients and weights are computed once per element
//! ([`super::geometry::reference_geometry_into`]), the hoop factor `N_a / R` stored as the
//! third gradient component, so one cached layout serves both the 3-D and
//! the 2-D elements. Per-node quantities are lanes `[f64; N]` under pulp's
//! run-time dispatch, as in the solids.

use nalgebra::Matrix3;

use super::spatial::{axpy, finish, spatial_formulation, spatial_stress, volumetric_terms, Input, Lanes as SpatialLanes, Output};
use super::{Analysis, ElementError, Formulation, Shape};

/// Whether an element of `shape` running `formulation` (as resolved, see
/// [`Formulation::resolve`]) in `analysis` takes the 2-D spatial form: a
/// plane-strain or axisymmetric quad4, tri6, quad8 or quad9, either a
/// displacement element or a mixed one with a constant pressure.
pub fn supports(shape: Shape, analysis: Analysis, formulation: Formulation) -> bool {
    let nodes_ok = matches!(shape, Shape::Quad4 | Shape::Tri6 | Shape::Quad8 | Shape::Quad9);
    analysis != Analysis::Solid3d && nodes_ok && spatial_formulation(shape, formulation)
}

/// F at one point of a 2-D element from its node displacements `u` and
/// the point's cached reference gradients `g` (for
/// [`super::solid::SolidKinematics::fill`]): the in-plane block `I + Σ u_a ⊗ ∇₀N_a` and
/// `F_θθ = 1 + Σ u_a,r N_a/R` (1 in plane strain).
#[inline]
pub fn deformation_gradient(u: &[[f64; 3]], g: &[[f64; 3]]) -> Matrix3<f64> {
    let mut f = [[0.0; 2]; 2];
    let mut hoop = 0.0;
    for (ua, ga) in u.iter().zip(g) {
        for i in 0..2 {
            for jj in 0..2 {
                f[i][jj] += ua[i] * ga[jj];
            }
        }
        hoop += ua[0] * ga[2];
    }
    Matrix3::new(f[0][0] + 1.0, f[0][1], 0.0, f[1][0], f[1][1] + 1.0, 0.0, 0.0, 0.0, hoop + 1.0)
}

/// Internal force (and, if asked, the tangent, column-major, `2N × 2N`) of
/// a 2-D spatial-form element of `nodes` nodes into caller buffers, from
/// its cached reference geometry ([`super::reference_geometry_into`]), its
/// kinematics ([`super::solid::SolidKinematics::fill`] with [`deformation_gradient`]) and the material's answer at
/// every point; `axisymmetric` adds the hoop rows. A mixed element takes the
/// volumetric law at its mean dilatation (`volumetric`) and, in the
/// three-field form, its carried unknowns (`state`, whose outputs are
/// filled in), as [`super::integrate_into`]. Returns the element's strain
/// energy.
pub fn planar_integrate_into(nodes: usize, axisymmetric: bool, input: Input, out: Output) -> Result<f64, ElementError> {
    let arch = pulp::Arch::new();
    macro_rules! run {
        ($n:literal) => {
            if axisymmetric {
                arch.dispatch(Run::<$n, true> { input, out })
            } else {
                arch.dispatch(Run::<$n, false> { input, out })
            }
        };
    }
    match nodes {
        4 => run!(4),
        6 => run!(6),
        8 => run!(8),
        9 => run!(9),
        _ => Err(ElementError::NotAnElement { shape: "a 2-D element of this node count" }),
    }
}

/// [`planar_integrate_into`] without run-time dispatch (a quad4): the plain
/// scalar build, for the test that both paths agree bit for bit.
#[cfg(test)]
pub(crate) fn planar_integrate_scalar(axisymmetric: bool, input: Input, out: Output) -> Result<f64, ElementError> {
    if axisymmetric {
        integrate::<4, true>(&input, out)
    } else {
        integrate::<4, false>(&input, out)
    }
}

struct Run<'a, 'o, const N: usize, const HOOP: bool> {
    input: Input<'a>,
    out: Output<'o>,
}

impl<const N: usize, const HOOP: bool> pulp::WithSimd for Run<'_, '_, N, HOOP> {
    type Output = Result<f64, ElementError>;

    #[inline(always)]
    fn with_simd<S: pulp::Simd>(self, _simd: S) -> Self::Output {
        integrate::<N, HOOP>(&self.input, self.out)
    }
}

/// The element tangent in lanes: `k[a][2i + k][b]` is `K[(a, i), (b, k)]`.
type Lanes<const N: usize> = SpatialLanes<N, 4>;

/// One point's share of the tangent lanes: `K_ab += B_aᵀ (c B_b w)` with
/// `cb[r][k]` holding `(c B_b w)[r][k]`, plus the geometric term with
/// `hv[i] = (τ w ∇N_b)_i` and, axisymmetric, `hh = τ_θθ w h_b`.
#[inline(always)]
fn add_point_tangent<const N: usize, const HOOP: bool>(
    kl: &mut Lanes<N>,
    g: &[[f64; N]; 2],
    h: &[f64; N],
    cb: &[[[f64; N]; 2]; 4],
    hv: &[[f64; N]; 2],
    hh: &[f64; N],
) {
    for (a, ka) in kl.iter_mut().enumerate() {
        let (g0, g1, ha) = (g[0][a], g[1][a], h[a]);
        for k in 0..2 {
            // Radial row of B_aᵀ: ∇N_a in the xx and xy rows, h_a in θθ.
            let out = &mut ka[k];
            for b in 0..N {
                let mut v = g1.mul_add(cb[3][k][b], g0.mul_add(cb[0][k][b], out[b]));
                if HOOP {
                    v = ha.mul_add(cb[2][k][b], v);
                }
                out[b] = v;
            }
            // Axial row: ∇N_a in the yy and xy rows.
            let out = &mut ka[2 + k];
            for b in 0..N {
                out[b] = g0.mul_add(cb[3][k][b], g1.mul_add(cb[1][k][b], out[b]));
            }
        }
        let mut s = [0.0; N];
        for b in 0..N {
            s[b] = g1.mul_add(hv[1][b], g0 * hv[0][b]);
        }
        for b in 0..N {
            ka[3][b] += s[b];
        }
        if HOOP {
            for b in 0..N {
                s[b] = ha.mul_add(hh[b], s[b]);
            }
        }
        for b in 0..N {
            ka[0][b] += s[b];
        }
    }
}

#[inline(always)]
fn integrate<const N: usize, const HOOP: bool>(input: &Input, out: Output) -> Result<f64, ElementError> {
    let Output { force, stiffness, state } = out;
    let Input { grads, dv, kin, responses, volumetric } = *input;
    let (mut energy, p, _) = volumetric_terms(volumetric, kin.volume);
    let (mixed, want_k) = (volumetric.is_some(), stiffness.is_some());
    // Tangent, force and ∂v/∂u in lanes: k[a][2i + k][b], f[i][a].
    let mut kl: Lanes<N> = [[[0.0; N]; 4]; N];
    let (mut fl, mut gl) = ([[0.0; N]; 2], [[0.0; N]; 2]);
    for (q, ((point, resp), &w)) in kin.points().iter().zip(responses).zip(dv).enumerate() {
        energy += resp.energy * w;
        let f = &point.f;
        let det = f[(0, 0)] * f[(1, 1)] - f[(0, 1)] * f[(1, 0)];
        if !(det != 0.0 && f[(2, 2)] != 0.0) {
            return Err(ElementError::Inverted { point: q, j: point.j });
        }
        // F⁻¹ of the in-plane block, and 1/F_θθ.
        let fi = [[f[(1, 1)] / det, -f[(0, 1)] / det], [-f[(1, 0)] / det, f[(0, 0)] / det]];
        let hoop_inverse = 1.0 / f[(2, 2)];
        // Spatial gradients ∇N_b = F⁻ᵀ ∂N_b/∂X and h_b = N_b/r, in lanes.
        let g0 = &grads[q * N..(q + 1) * N];
        let mut g = [[0.0; N]; 2];
        let mut h = [0.0; N];
        for (b, gb) in g0.iter().enumerate() {
            for i in 0..2 {
                g[i][b] = gb[0] * fi[0][i] + gb[1] * fi[1][i];
            }
            if HOOP {
                h[b] = gb[2] * hoop_inverse;
            }
        }
        let mut c = [[0.0; 4]; 4];
        let tau = spatial_stress::<4>(f, resp, mixed.then_some(point.j * p), want_k.then_some(&mut c));
        if mixed {
            let jw = point.j * w;
            axpy(&mut gl[0], jw, &g[0]);
            if HOOP {
                axpy(&mut gl[0], jw, &h);
            }
            axpy(&mut gl[1], jw, &g[1]);
        }
        // Scaled gradients w ∇N_b, w h_b.
        let mut gs = [[0.0; N]; 2];
        let mut hs = [0.0; N];
        for b in 0..N {
            gs[0][b] = w * g[0][b];
            gs[1][b] = w * g[1][b];
            hs[b] = w * h[b];
        }
        // hv_b = τ w ∇N_b (in-plane) and hh_b = τ_θθ w h_b: the force
        // f_a += B_aᵀ τ w, and the geometric term of the tangent.
        let tm = [[tau[0], tau[3]], [tau[3], tau[1]]];
        let mut hv = [[0.0; N]; 2];
        let mut hh = [0.0; N];
        for i in 0..2 {
            for jj in 0..2 {
                axpy(&mut hv[i], tm[i][jj], &gs[jj]);
            }
            axpy(&mut fl[i], 1.0, &hv[i]);
        }
        if HOOP {
            axpy(&mut hh, tau[2], &hs);
            axpy(&mut fl[0], 1.0, &hh);
        }
        if !want_k {
            continue;
        }
        // cb[r][k][b] = (c B_b w)[r][k]: the radial column of B_b holds ∇N_b
        // in the xx and xy rows and h_b in θθ, the axial one ∇N_b in yy
        // and xy.
        let mut cb = [[[0.0; N]; 2]; 4];
        for r in 0..4 {
            let cr = &c[r];
            for b in 0..N {
                let mut v = cr[3].mul_add(gs[1][b], cr[0] * gs[0][b]);
                if HOOP {
                    v = cr[2].mul_add(hs[b], v);
                }
                cb[r][0][b] = v;
                cb[r][1][b] = cr[3].mul_add(gs[0][b], cr[1] * gs[1][b]);
            }
        }
        add_point_tangent::<N, HOOP>(&mut kl, &g, &h, &cb, &hv, &hh);
    }
    let stiffness = stiffness.map(|k| (k, &mut kl));
    finish::<N, 2, 4>(input, fl, &gl, force, stiffness, state);
    Ok(energy)
}
