//! What the spatial forms of the 3-D solids ([`super::solid`]) and the 2-D
//! elements ([`super::planar`]) share: their input, the lane arithmetic,
//! and the element's end (the three-field outputs, `U''(θ)/V g gᵀ`, force
//! and tangent out of their lanes). Everything here is inlined into the
//! kernels compiled under pulp's run-time dispatch.

use nalgebra::{Matrix3, SMatrix};

use super::kernel::{MixedState, PointResponse, VolumetricResponse, MAX_DOFS};
use super::pressure_space::PressureSpace;
use super::solid::SolidKinematics;
use super::{Formulation, Shape};

/// What a spatial-form kernel integrates: the cached reference geometry
/// (gradients `grads[q · nodes + a]`, weights `dv[q]`), the kinematics, the
/// material's answer at every point and, mixed, the volumetric law at the
/// mean dilatation.
#[derive(Clone, Copy)]
pub struct Input<'a> {
    /// Reference gradients of every point, point after point
    /// ([`super::reference_geometry_into`]).
    pub grads: &'a [[f64; 3]],
    /// Reference volume weight of every point.
    pub dv: &'a [f64],
    /// F and J at every point, V and v.
    pub kin: &'a SolidKinematics,
    /// The material's answer at every point.
    pub responses: &'a [PointResponse],
    /// The volumetric law at the mean dilatation (mixed elements only).
    pub volumetric: Option<&'a VolumetricResponse>,
}

/// Whether an element of `shape` running `formulation` (as resolved, see
/// [`Formulation::resolve`]) has a spatial form: a displacement element or
/// a mixed one with a constant pressure.
pub(super) fn spatial_formulation(shape: Shape, formulation: Formulation) -> bool {
    match formulation {
        Formulation::Displacement => true,
        Formulation::Mixed => PressureSpace::of_shape(shape) == PressureSpace::Constant,
        Formulation::ElementPressure | Formulation::ContinuousPressure => false,
    }
}

/// An element tangent in lanes: `k[a][D i + k][b]` is `K[(a, i), (b, k)]`
/// for `D` components per node (`R = D²`).
pub(super) type Lanes<const N: usize, const R: usize> = [[[f64; N]; R]; N];

/// The Voigt order xx, yy, zz, xy, yz, xz; its first four components are
/// those of a 2-D section (zz the hoop component θθ of an axisymmetric one),
/// where F has no out-of-plane shear and T maps them among themselves.
const PAIRS: [(usize, usize); 6] = [(0, 0), (1, 1), (2, 2), (0, 1), (1, 2), (0, 2)];

/// The Voigt transformation of F over the first `V` components of
/// [`PAIRS`] (6 in 3-D, 4 in 2-D): `τ = T S` for symmetric S, and the
/// push-forward of a tangent acting on engineering strains is `T D Tᵀ`.
#[inline(always)]
fn voigt_transform<const V: usize>(f: &Matrix3<f64>) -> [[f64; V]; V] {
    let f: [[f64; 3]; 3] = std::array::from_fn(|i| std::array::from_fn(|j| f[(i, j)]));
    let pairs: [(usize, usize); V] = std::array::from_fn(|n| PAIRS[n]);
    let mut t = [[0.0; V]; V];
    for (n, &(i, j)) in pairs.iter().enumerate() {
        for (m, &(ii, jj)) in pairs.iter().enumerate() {
            t[n][m] = if ii == jj { f[i][ii] * f[j][ii] } else { f[i][ii] * f[j][jj] + f[i][jj] * f[j][ii] };
        }
    }
    t
}

/// Kirchhoff stress τ = F S Fᵀ (the first `V` Voigt components) from S,
/// with `t` the Voigt transformation of F.
#[inline(always)]
fn kirchhoff<const V: usize>(t: &[[f64; V]; V], s: &Matrix3<f64>) -> [f64; V] {
    let sv = [s[(0, 0)], s[(1, 1)], s[(2, 2)], s[(0, 1)], s[(1, 2)], s[(0, 2)]];
    let mut tau = [0.0; V];
    for n in 0..V {
        for m in 0..V {
            tau[n] += t[n][m] * sv[m];
        }
    }
    tau
}

/// Spatial tangent `T D Tᵀ` (symmetric V×V) pushed forward from the
/// material tangent D (6×6, its first `V` rows and columns), with `t` the
/// Voigt transformation of F: rows of `T D` first, then the rows of
/// `(T D) Tᵀ`, each a sum of rows of `Tᵀ` (whole rows at a time, so the
/// loops vectorise; the two triangles agree to rounding).
#[inline(always)]
fn push_forward<const V: usize>(t: &[[f64; V]; V], d: &SMatrix<f64, 6, 6>) -> [[f64; V]; V] {
    // D is symmetric: its columns are its rows.
    let d: [[f64; V]; V] = std::array::from_fn(|l| std::array::from_fn(|m| d[(m, l)]));
    let tt: [[f64; V]; V] = std::array::from_fn(|l| std::array::from_fn(|m| t[m][l]));
    product(&product(t, &d), &tt)
}

/// `a b` for square V×V arrays, each row of the product a sum of whole rows
/// of `b` (so the inner loop vectorises).
#[inline(always)]
fn product<const V: usize>(a: &[[f64; V]; V], b: &[[f64; V]; V]) -> [[f64; V]; V] {
    let mut out = [[0.0; V]; V];
    for n in 0..V {
        for l in 0..V {
            let s = a[n][l];
            for m in 0..V {
                out[n][m] += s * b[l][m];
            }
        }
    }
    out
}

/// The Kirchhoff stress τ and, into `tangent` if given, the spatial
/// tangent c of one point, in the first `V` Voigt components, from the
/// material's S and D at deformation gradient `f`; a mixed element's
/// pressure term with `jp` = J p: `J p` on the normal components of τ and
/// `J p (I⊗I − 2𝕀)` in c. τ comes out the same with or without the tangent,
/// so a residual-only evaluation gives the same bits.
#[inline(always)]
pub(super) fn spatial_stress<const V: usize>(
    f: &Matrix3<f64>,
    response: &PointResponse,
    jp: Option<f64>,
    tangent: Option<&mut [[f64; V]; V]>,
) -> [f64; V] {
    let t = voigt_transform::<V>(f);
    let mut tau = kirchhoff::<V>(&t, &response.stress);
    if let Some(c) = tangent {
        *c = push_forward::<V>(&t, &response.tangent);
        if let Some(jp) = jp {
            for n in 0..3 {
                for m in 0..3 {
                    c[n][m] += if n == m { -jp } else { jp };
                }
            }
            for n in 3..V {
                c[n][n] -= jp;
            }
        }
    }
    if let Some(jp) = jp {
        for n in 0..3 {
            tau[n] += jp;
        }
    }
    tau
}

/// Where a spatial-form kernel writes: the force (`nodes · D` entries), the
/// tangent if wanted (column-major, its square) and, in the three-field
/// form of a mixed element, the carried unknowns' outputs.
pub struct Output<'o> {
    /// Internal force.
    pub force: &'o mut [f64],
    /// Tangent, if wanted.
    pub stiffness: Option<&'o mut [f64]>,
    /// Carried pressure and dilatation (their outputs filled in).
    pub state: Option<&'o mut MixedState>,
}

/// `out[b] += s · x[b]` over a node lane, rounded once (a fused
/// multiply–add).
#[inline(always)]
pub(super) fn axpy<const N: usize>(out: &mut [f64; N], s: f64, x: &[f64; N]) {
    for b in 0..N {
        out[b] = s.mul_add(x[b], out[b]);
    }
}

/// The volumetric energy `V U` of a mixed element, its pressure p and its
/// stiffness U''(θ) (all zero for a displacement element).
#[inline(always)]
pub(super) fn volumetric_terms(volumetric: Option<&VolumetricResponse>, volume: f64) -> (f64, f64, f64) {
    match volumetric {
        Some(v) => (volume * v.energy, v.pressure, v.stiffness),
        None => (0.0, 0.0, 0.0),
    }
}

/// The end of a spatial-form element of `N` nodes and `D` displacement
/// components per node (`R = D²` lanes per node pair): with the force lanes
/// `fl[i][a]` and `gl[i][a] = ∂v/∂u_a,i`, the three-field term and outputs
/// (`state`), the force into `force`, and with the tangent lanes
/// `kl[a][D i + k][b]` the volumetric term `U''(θ)/V g gᵀ` and the tangent
/// into `kbuf`, column-major, its lower triangle mirrored so K is symmetric
/// to the bit.
#[inline(always)]
pub(super) fn finish<const N: usize, const D: usize, const R: usize>(
    input: &Input,
    mut fl: [[f64; N]; D],
    gl: &[[f64; N]; D],
    force: &mut [f64],
    stiffness: Option<(&mut [f64], &mut Lanes<N, R>)>,
    state: Option<&mut MixedState>,
) {
    let (kin, volumetric) = (input.kin, input.volumetric);
    let vol = kin.volume;
    let nd = D * N;
    debug_assert!(nd <= MAX_DOFS && R == D * D);
    if let (Some(v), Some(st)) = (volumetric, state) {
        let ratio = kin.volume_ratio();
        let s = v.three_field_residual_factor(ratio, st.dilatation);
        for i in 0..D {
            axpy(&mut fl[i], s, &gl[i]);
        }
        st.volume_ratio = ratio;
        for a in 0..N {
            for i in 0..D {
                st.dvolume_du[D * a + i] = gl[i][a] / vol;
            }
        }
    }
    for a in 0..N {
        for i in 0..D {
            force[D * a + i] = fl[i][a];
        }
    }
    let Some((kbuf, kl)) = stiffness else {
        return;
    };
    if let Some(v) = volumetric {
        // K += U''(θ)/V g gᵀ.
        let s = v.stiffness / vol;
        for (a, ka) in kl.iter_mut().enumerate() {
            for i in 0..D {
                let gai = s * gl[i][a];
                for k in 0..D {
                    axpy(&mut ka[D * i + k], gai, &gl[k]);
                }
            }
        }
    }
    let kbuf = &mut kbuf[..nd * nd];
    for (a, ka) in kl.iter().enumerate() {
        for i in 0..D {
            let row = D * a + i;
            // The blocks left of the diagonal block, then its lower part.
            for b in 0..a {
                for k in 0..D {
                    let (col, v) = (D * b + k, ka[D * i + k][b]);
                    kbuf[col * nd + row] = v;
                    kbuf[row * nd + col] = v;
                }
            }
            for k in 0..=i {
                let (col, v) = (D * a + k, ka[D * i + k][a]);
                kbuf[col * nd + row] = v;
                kbuf[row * nd + col] = v;
            }
        }
    }
}
