//! The spatial form of the 3-D solid elements (hex8, tet10 and hex20 with a
//! constant pressure or none, hex27 without one): the same element as
//! [`super::kernel`] (its total-Lagrangian `∫ Bᵀ P dV`, `∫ Bᵀ A B dV`),
//! written with the spatial gradients `∇N_a = F⁻ᵀ ∂N_a/∂X` and the
//! Kirchhoff stress, which needs far fewer operations:
//!
//! ```text
//! f_a  = ∫ τ ∇N_a dV
//! K_ab = ∫ B_aᵀ c B_b dV + ∫ (∇N_a · τ ∇N_b) dV · I
//! ```
//!
//! with `τ = F S Fᵀ`, `c` the push-forward of the material tangent
//! (Kirchhoff-based, a symmetric 6×6 in Voigt form, `c = T D Tᵀ` with the
//! Voigt transformation `T` of F) and `B_a` the 6×3 symmetric-gradient
//! operator of node a (Bonet & Wood 2008, *Nonlinear Continuum Mechanics
//! for Finite Element Analysis*, §9.4). The element pressure p of the mixed
//! form adds `J p I` to τ and `J p (I⊗I − 2𝕀)` to c, which is the
//! spatial form of `p ∂(J F⁻ᵀ)/∂F`.
//!
//! The reference gradients `∂N_a/∂X` and volume weights are computed once
//! per element ([`super::geometry::reference_geometry_into`]) and handed in. Every per-node
//! quantity is held in lanes, one array `[f64; N]` over the element's
//! nodes, so the loops vectorise; the kernel runs under `pulp`'s run-time
//! dispatch, which compiles it once more for the CPU's widest vector
//! instructions. Rust never fuses or reorders floating-point operations,
//! so each lane does the same operations in the same order whatever the
//! vector width: the vector and scalar paths give the same bits (a test
//! checks it).

use nalgebra::Matrix3;

use super::kernel::{MixedState, MAX_POINTS};
use super::spatial::{axpy, finish, spatial_formulation, spatial_stress, volumetric_terms, Input, Lanes as SpatialLanes, Output};
use super::{Analysis, ElementError, Formulation, Shape};

/// Largest node count of a spatial-form element (hex27).
pub const MAX_SOLID_NODES: usize = 27;

/// Whether an element of `shape` running `formulation` (as resolved, see
/// [`Formulation::resolve`]) takes the spatial form: a 3-D shape, either a
/// displacement element or a mixed one with a constant pressure.
pub fn supports(shape: Shape, analysis: Analysis, formulation: Formulation) -> bool {
    let nodes_ok = matches!(shape, Shape::Hex8 | Shape::Tet10 | Shape::Hex20 | Shape::Hex27);
    analysis == Analysis::Solid3d && nodes_ok && spatial_formulation(shape, formulation)
}

/// F and J of one point.
#[derive(Debug, Clone, Copy, Default)]
pub struct SolidPoint {
    /// Deformation gradient F.
    pub f: Matrix3<f64>,
    /// J = det F (> 0).
    pub j: f64,
}

/// F and J at every point of a spatial-form element, with its reference
/// volume V and deformed volume v = ∫ J dV.
#[derive(Debug, Clone, Copy)]
pub struct SolidKinematics {
    /// The element's points (the first `count`).
    pub points: [SolidPoint; MAX_POINTS],
    /// Number of points.
    pub count: usize,
    /// Reference volume V.
    pub volume: f64,
    /// Deformed volume v = ∫ J dV.
    pub deformed_volume: f64,
}

impl Default for SolidKinematics {
    fn default() -> Self {
        SolidKinematics { points: [SolidPoint::default(); MAX_POINTS], count: 0, volume: 0.0, deformed_volume: 0.0 }
    }
}

impl SolidKinematics {
    /// The element's points.
    pub fn points(&self) -> &[SolidPoint] {
        &self.points[..self.count]
    }

    /// Mean dilatation v/V.
    pub fn volume_ratio(&self) -> f64 {
        self.deformed_volume / self.volume
    }
}

impl SolidKinematics {
    /// F at every point of an element of `nodes` nodes with displacements
    /// `u`, from its cached reference geometry ([`super::reference_geometry_into`])
    /// and the element's `gradient` ([`deformation_gradient`] of a 3-D
    /// element, [`super::planar::deformation_gradient`] of a 2-D one), with J,
    /// V and v. Fails on an inverted point.
    pub fn fill(
        &mut self,
        nodes: usize,
        grads: &[[f64; 3]],
        dv: &[f64],
        u: &[[f64; 3]],
        gradient: impl Fn(&[[f64; 3]], &[[f64; 3]]) -> Matrix3<f64>,
    ) -> Result<(), ElementError> {
        self.count = dv.len();
        self.volume = 0.0;
        self.deformed_volume = 0.0;
        for (q, (point, &w)) in self.points.iter_mut().zip(dv).enumerate() {
            let f = gradient(&u[..nodes], &grads[q * nodes..(q + 1) * nodes]);
            let j = f.determinant();
            if !(j > 0.0 && j.is_finite()) {
                return Err(ElementError::Inverted { point: q, j });
            }
            self.volume += w;
            self.deformed_volume += j * w;
            *point = SolidPoint { f, j };
        }
        Ok(())
    }
}

/// F = I + Σ u_a ⊗ ∂N_a/∂X at one point of a 3-D element from its node
/// displacements `u` and the point's cached reference gradients `g` (for
/// [`SolidKinematics::fill`]).
#[inline]
pub fn deformation_gradient(u: &[[f64; 3]], g: &[[f64; 3]]) -> Matrix3<f64> {
    let mut f = [[0.0; 3]; 3];
    for (ua, ga) in u.iter().zip(g) {
        for i in 0..3 {
            for jj in 0..3 {
                f[i][jj] += ua[i] * ga[jj];
            }
        }
    }
    Matrix3::new(f[0][0] + 1.0, f[0][1], f[0][2], f[1][0], f[1][1] + 1.0, f[1][2], f[2][0], f[2][1], f[2][2] + 1.0)
}

/// Rows of the Voigt vector (xx, yy, zz, xy, yz, xz) holding the
/// components `(i, 0)`, `(i, 1)`, `(i, 2)` of a symmetric tensor: column
/// `k` of `B_b` holds `∇N_b` in the rows `SHEAR[k]`.
const SHEAR: [[usize; 3]; 3] = [[0, 3, 5], [3, 1, 4], [5, 4, 2]];

/// One point's share of the tangent lanes, `K_ab += B_aᵀ (c B_b w) +
/// (∇N_a · h_b) I` with `cb` holding `c B_b w` and `h_b = τ w ∇N_b`. The
/// element's first point (`FIRST`) writes the lanes instead of adding to
/// them, with the same operations on zeros (so the same bits).
#[inline(always)]
fn add_point_tangent<const N: usize, const FIRST: bool>(kl: &mut Lanes<N>, g: &[[f64; N]; 3], cb: &[[[f64; N]; 3]; 6], h: &[[f64; N]; 3]) {
    for (a, ka) in kl.iter_mut().enumerate() {
        let ga = [g[0][a], g[1][a], g[2][a]];
        // Row i of B_aᵀ: ∇N_a,j in the rows SHEAR[i][j].
        for i in 0..3 {
            let rows = SHEAR[i];
            for k in 0..3 {
                let out = &mut ka[3 * i + k];
                let (c0, c1, c2) = (&cb[rows[0]][k], &cb[rows[1]][k], &cb[rows[2]][k]);
                for b in 0..N {
                    let before = if FIRST { 0.0 } else { out[b] };
                    out[b] = ga[2].mul_add(c2[b], ga[1].mul_add(c1[b], ga[0].mul_add(c0[b], before)));
                }
            }
        }
        let mut s = [0.0; N];
        for b in 0..N {
            s[b] = ga[2].mul_add(h[2][b], ga[1].mul_add(h[1][b], ga[0] * h[0][b]));
        }
        for i in 0..3 {
            let out = &mut ka[4 * i];
            for b in 0..N {
                out[b] += s[b];
            }
        }
    }
}

/// Internal force (and, if asked, the tangent, column-major, `3N × 3N`)
/// of a spatial-form element with `N` nodes into caller buffers, from its
/// cached reference gradients, its kinematics and the material's answer at
/// every point. A mixed element takes the volumetric law at its mean
/// dilatation (`volumetric`) and, in the three-field form, its carried
/// unknowns (`state`, whose outputs are filled in), as
/// [`super::integrate_into`]. `lanes` is the caller's scratch for the
/// tangent (any content). Returns the element's strain energy.
pub fn solid_integrate_into(nodes: usize, input: Input, out: Output, lanes: &mut TangentLanes) -> Result<f64, ElementError> {
    let arch = pulp::Arch::new();
    match nodes {
        8 => arch.dispatch(Run::<8> { input, out, lanes }),
        10 => arch.dispatch(Run::<10> { input, out, lanes }),
        20 => arch.dispatch(Run::<20> { input, out, lanes }),
        27 => arch.dispatch(Run::<27> { input, out, lanes }),
        _ => Err(ElementError::NotAnElement { shape: "a solid of this node count" }),
    }
}

/// [`solid_integrate_into`] without run-time dispatch: the plain scalar
/// build, for the test that both paths agree bit for bit.
#[cfg(test)]
pub(crate) fn solid_integrate_scalar(input: Input, out: Output, lanes: &mut TangentLanes) -> Result<f64, ElementError> {
    run::<8>(&input, out, lanes)
}

struct Run<'a, 'o, const N: usize> {
    input: Input<'a>,
    out: Output<'o>,
    lanes: &'o mut TangentLanes,
}

impl<const N: usize> pulp::WithSimd for Run<'_, '_, N> {
    type Output = Result<f64, ElementError>;

    #[inline(always)]
    fn with_simd<S: pulp::Simd>(self, _simd: S) -> Self::Output {
        run::<N>(&self.input, self.out, self.lanes)
    }
}

/// The element tangent in lanes: `k[a][3i + k][b]` is `K[(a, i), (b, k)]`.
type Lanes<const N: usize> = SpatialLanes<N, 9>;

/// The tangent lanes of a spatial-form element of up to
/// [`MAX_SOLID_NODES`] nodes, kept by the caller from element to element:
/// the element's first point writes every lane and the others add to
/// them, so no element zeroes its lanes (52 kB for hex27) before use.
#[derive(Debug, Clone)]
pub struct TangentLanes(Vec<f64>);

impl Default for TangentLanes {
    fn default() -> Self {
        TangentLanes(vec![0.0; MAX_SOLID_NODES * 9 * MAX_SOLID_NODES])
    }
}

impl TangentLanes {
    /// The lanes of an `N`-node element (`None` past [`MAX_SOLID_NODES`]).
    fn of<const N: usize>(&mut self) -> Option<&mut Lanes<N>> {
        let (rows, _) = self.0.as_chunks_mut::<N>();
        let (blocks, _) = rows.as_chunks_mut::<9>();
        blocks.first_chunk_mut::<N>()
    }
}

/// [`integrate`] with the tangent's lanes from `lanes` when a tangent is
/// wanted.
#[inline(always)]
fn run<const N: usize>(input: &Input, out: Output, lanes: &mut TangentLanes) -> Result<f64, ElementError> {
    let Output { force, stiffness, state } = out;
    match stiffness {
        Some(k) => {
            let kl = lanes.of::<N>().ok_or(ElementError::NotAnElement { shape: "a solid of this node count" })?;
            if input.dv.is_empty() {
                // No point writes them.
                *kl = [[[0.0; N]; 9]; N];
            }
            integrate::<N>(input, force, Some((k, kl)), state)
        }
        None => integrate::<N>(input, force, None, state),
    }
}

#[inline(always)]
fn integrate<const N: usize>(
    input: &Input,
    force: &mut [f64],
    mut stiffness: Option<(&mut [f64], &mut Lanes<N>)>,
    state: Option<&mut MixedState>,
) -> Result<f64, ElementError> {
    let Input { grads, dv, kin, responses, volumetric } = *input;
    let want_k = stiffness.is_some();
    let (mut energy, p, _) = volumetric_terms(volumetric, kin.volume);
    let mixed = volumetric.is_some();
    // Force and ∂v/∂u in lanes: f[i][a].
    let mut fl = [[0.0; N]; 3];
    let mut gl = [[0.0; N]; 3];
    for (q, ((point, resp), &w)) in kin.points().iter().zip(responses).zip(dv).enumerate() {
        energy += resp.energy * w;
        let fi = point.f.try_inverse().ok_or(ElementError::Inverted { point: q, j: point.j })?;
        // Spatial gradients ∇N_b = F⁻ᵀ ∂N_b/∂X, in lanes.
        let g0 = &grads[q * N..(q + 1) * N];
        let mut g = [[0.0; N]; 3];
        for (b, gb) in g0.iter().enumerate() {
            for i in 0..3 {
                g[i][b] = gb[0] * fi[(0, i)] + gb[1] * fi[(1, i)] + gb[2] * fi[(2, i)];
            }
        }
        let mut c = [[0.0; 6]; 6];
        let tau = spatial_stress::<6>(&point.f, resp, mixed.then_some(point.j * p), want_k.then_some(&mut c));
        if mixed {
            for i in 0..3 {
                axpy(&mut gl[i], point.j * w, &g[i]);
            }
        }
        // Scaled gradients w ∇N_b.
        let mut gs = [[0.0; N]; 3];
        for i in 0..3 {
            for b in 0..N {
                gs[i][b] = w * g[i][b];
            }
        }
        // h_b = τ w ∇N_b: f_a,i += h_a,i, and the geometric term of the
        // tangent, K_ab += (∇N_a · h_b) I.
        let tm = [[tau[0], tau[3], tau[5]], [tau[3], tau[1], tau[4]], [tau[5], tau[4], tau[2]]];
        let mut h = [[0.0; N]; 3];
        for i in 0..3 {
            for jj in 0..3 {
                axpy(&mut h[i], tm[i][jj], &gs[jj]);
            }
            // fma(1, h, f) = f + h, rounded once.
            axpy(&mut fl[i], 1.0, &h[i]);
        }
        let Some((_, kl)) = stiffness.as_mut() else {
            continue;
        };
        // cb[r][k][b] = (c B_b)[r][k] w: column k of B_b holds ∇N_b,k in the
        // normal row k and the other two components in its shear rows.
        let mut cb = [[[0.0; N]; 3]; 6];
        for r in 0..6 {
            for k in 0..3 {
                let col = SHEAR[k];
                let out = &mut cb[r][k];
                let (c0, c1, c2) = (c[r][col[0]], c[r][col[1]], c[r][col[2]]);
                for b in 0..N {
                    out[b] = c2.mul_add(gs[2][b], c1.mul_add(gs[1][b], c0 * gs[0][b]));
                }
            }
        }
        if q == 0 {
            add_point_tangent::<N, true>(kl, &g, &cb, &h);
        } else {
            add_point_tangent::<N, false>(kl, &g, &cb, &h);
        }
    }
    finish::<N, 3, 9>(input, fl, &gl, force, stiffness, state);
    Ok(energy)
}
