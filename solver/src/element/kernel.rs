//! The integration loop shared by every element: `F = I + B u`, stress and
//! tangent from the material, and the mean-dilatation condensation.

use nalgebra::{Matrix3, SMatrix, SVector};

use super::geometry::{point_geometry, PointGeometry};
use super::pressure_space::{Gram, PressureBasis, PressureSpace, MAX_PRESSURES};
use super::{Analysis, ElementContext, ElementError, Formulation, Shape};
use crate::material::{Material, MaterialError, Response, Tangent};

/// Largest number of element degrees of freedom (hex27: 27 × 3).
pub const MAX_DOFS: usize = 81;
/// Largest number of integration points per element (hex20/hex27: 3 × 3 × 3).
pub const MAX_POINTS: usize = 27;

type M9 = SMatrix<f64, 9, 9>;
type V9 = SVector<f64, 9>;

/// Voigt index of tensor component (I, J).
const VI: [[usize; 3]; 3] = [[0, 3, 5], [3, 1, 4], [5, 4, 2]];

fn to9(m: &Matrix3<f64>) -> V9 {
    V9::from_fn(|k, _| m[(k / 3, k % 3)])
}

/// `A_iJkL = δ_ik S_JL + F_iI F_kK D_IJKL`: the first elasticity tensor as a
/// 9×9 matrix with row index 3i+J and column index 3k+L.
fn first_elasticity(f: &Matrix3<f64>, s: &Matrix3<f64>, d: &Tangent) -> M9 {
    // t[i][J][K][L] = F_iI D_IJKL
    let mut t = [[[[0.0; 3]; 3]; 3]; 3];
    for i in 0..3 {
        for jj in 0..3 {
            for kk in 0..3 {
                for ll in 0..3 {
                    let c = VI[kk][ll];
                    t[i][jj][kk][ll] = (0..3).map(|ii| f[(i, ii)] * d[(VI[ii][jj], c)]).sum();
                }
            }
        }
    }
    let mut a = M9::zeros();
    for i in 0..3 {
        for jj in 0..3 {
            for k in 0..3 {
                for ll in 0..3 {
                    let mut v: f64 = (0..3).map(|kk| f[(k, kk)] * t[i][jj][kk][ll]).sum();
                    if i == k {
                        v += s[(jj, ll)];
                    }
                    a[(3 * i + jj, 3 * k + ll)] = v;
                }
            }
        }
    }
    a
}

/// `∂(J F⁻ᵀ)/∂F` as a 9×9 matrix: `J (F⁻¹_Ii F⁻¹_Kk − F⁻¹_Ik F⁻¹_Ki)`.
fn cofactor_derivative(j: f64, fi: &Matrix3<f64>) -> M9 {
    M9::from_fn(|r, c| {
        let (i, ii) = (r / 3, r % 3);
        let (k, kk) = (c / 3, c % 3);
        j * (fi[(ii, i)] * fi[(kk, k)] - fi[(ii, k)] * fi[(kk, i)])
    })
}

/// The B operator is sparse: column (a, i) holds ∂N_a/∂X_J in rows 3i+J, plus
/// N_a/R in row 8 (the hoop stretch) for the radial dof of an axisymmetric
/// element. These helpers apply it without forming it.
#[derive(Clone, Copy)]
struct BOp<'g> {
    geo: &'g PointGeometry,
    dim: usize,
    axisymmetric: bool,
}

impl BOp<'_> {
    /// `F − I = B u` as a 9-vector.
    fn apply<const ND: usize>(&self, u: &SVector<f64, ND>) -> V9 {
        let mut f = V9::zeros();
        for a in 0..ND / self.dim {
            let g = &self.geo.g[a];
            for i in 0..self.dim {
                let ua = u[a * self.dim + i];
                for jj in 0..3 {
                    f[3 * i + jj] += ua * g[jj];
                }
            }
            if self.axisymmetric {
                f[8] += u[a * self.dim] * self.geo.n[a] / self.geo.radius;
            }
        }
        f
    }

    /// `out += s · Bᵀ v`.
    fn add_transpose<const ND: usize>(&self, v: &V9, s: f64, out: &mut SVector<f64, ND>) {
        for a in 0..ND / self.dim {
            let g = &self.geo.g[a];
            for i in 0..self.dim {
                let mut t = g[0] * v[3 * i] + g[1] * v[3 * i + 1] + g[2] * v[3 * i + 2];
                if self.axisymmetric && i == 0 {
                    t += v[8] * self.geo.n[a] / self.geo.radius;
                }
                out[a * self.dim + i] += s * t;
            }
        }
    }

    /// `k += s · Bᵀ A B`, using the sparsity of B (about a third of the dense product's work).
    fn add_btab<const ND: usize>(&self, a: &M9, s: f64, k: &mut SMatrix<f64, ND, ND>) {
        let mut ab = SMatrix::<f64, 9, ND>::zeros();
        for b in 0..ND / self.dim {
            let g = &self.geo.g[b];
            for kk in 0..self.dim {
                let col = b * self.dim + kk;
                for r in 0..9 {
                    let mut t = a[(r, 3 * kk)] * g[0] + a[(r, 3 * kk + 1)] * g[1] + a[(r, 3 * kk + 2)] * g[2];
                    if self.axisymmetric && kk == 0 {
                        t += a[(r, 8)] * self.geo.n[b] / self.geo.radius;
                    }
                    ab[(r, col)] = s * t;
                }
            }
        }
        for c in 0..ND {
            let abc = ab.column(c);
            for a_ in 0..ND / self.dim {
                let g = &self.geo.g[a_];
                for i in 0..self.dim {
                    let mut t = g[0] * abc[3 * i] + g[1] * abc[3 * i + 1] + g[2] * abc[3 * i + 2];
                    if self.axisymmetric && i == 0 {
                        t += abc[8] * self.geo.n[a_] / self.geo.radius;
                    }
                    k[(a_ * self.dim + i, c)] += t;
                }
            }
        }
    }
}

fn map_material(e: MaterialError, point: usize, j: f64) -> ElementError {
    match e {
        MaterialError::NonPositiveVolume { .. } => ElementError::Inverted { point, j },
        other => ElementError::Material(other),
    }
}

/// The material's response at one Gauss point: the isochoric part alone for
/// the mixed form (it adds the element pressure itself), the full one
/// otherwise.
fn point_response(mat: &Material, mixed: bool, k: &Kin, q: usize) -> Result<Response, ElementError> {
    let c = k.f.transpose() * k.f;
    let resp = if mixed { mat.isochoric_response(&c) } else { mat.response(&c) };
    resp.map_err(|e| map_material(e, q, k.j))
}

/// Deformation state of one Gauss point.
#[derive(Debug, Clone, Copy, Default)]
struct Kin {
    geo: PointGeometry,
    f: Matrix3<f64>,
    j: f64,
}

/// Pass 1: geometry, F and J at every point; the element's reference volume V
/// and deformed volume v = ∫ J dV.
fn kinematics<const ND: usize, const NP: usize>(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &SVector<f64, ND>,
    out: &mut [Kin; NP],
) -> Result<(f64, f64), ElementError> {
    let axi = ctx.analysis == Analysis::Axisymmetric;
    let (mut vol, mut vol_def) = (0.0, 0.0);
    for q in 0..ctx.shape.points() {
        let geo = point_geometry(ctx.shape, ctx.analysis, x, q)?;
        let f9 = BOp { geo: &geo, dim: ND / ctx.shape.nodes(), axisymmetric: axi }.apply(u);
        let f = Matrix3::from_fn(|i, jj| f9[3 * i + jj] + if i == jj { 1.0 } else { 0.0 });
        let j = f.determinant();
        if !(j > 0.0 && j.is_finite()) {
            return Err(ElementError::Inverted { point: q, j });
        }
        vol += geo.dv;
        vol_def += j * geo.dv;
        out[q] = Kin { geo, f, j };
    }
    Ok((vol, vol_def))
}

/// Element pressure and dilatation carried as Newton unknowns of the
/// three-field form (Simo, Taylor & Pister 1985), with what the element
/// reports back for their update.
///
/// Carrying p and θ as element unknowns, updated by the linearised
/// equations `θ = v/V` and `p = U'(θ)`, keeps the large volumetric error of a
/// predictor step (κ times a second-order dilatation) out of the pressure
/// used in the tangent's initial-stress term, so the tangent stays positive
/// definite and Newton converges in fewer iterations for nearly
/// incompressible rubber. The condensed residual itself does not depend on
/// the carried p (it is eliminated) and on θ only to second order, so the
/// converged solution is that of the condensed (two-field) element.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MixedState {
    /// Element pressure p (input).
    pub pressure: f64,
    /// Element dilatation θ (input).
    pub dilatation: f64,
    /// v/V at the current displacement (output).
    pub volume_ratio: f64,
    /// ∂(v/V)/∂u_e (output).
    pub dvolume_du: [f64; MAX_DOFS],
}

impl Default for MixedState {
    fn default() -> Self {
        MixedState { pressure: 0.0, dilatation: 1.0, volume_ratio: 1.0, dvolume_du: [0.0; MAX_DOFS] }
    }
}

impl MixedState {
    /// Linearised changes (dθ, dp) for an element displacement change `du`
    /// (only the first `nd` entries used).
    pub fn increments(&self, du: &[f64], material: &crate::material::Material) -> Result<(f64, f64), MaterialError> {
        let dtheta = self.volume_ratio - self.dilatation + self.dvolume_du.iter().zip(du).map(|(a, b)| a * b).sum::<f64>();
        let dp = material.volumetric.pressure_derivative(self.dilatation)? * dtheta + material.volumetric.pressure(self.dilatation)?
            - self.pressure;
        Ok((dtheta, dp))
    }
}

fn integrate<const ND: usize, const NP: usize>(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &SVector<f64, ND>,
    force: &mut SVector<f64, ND>,
    mut stiffness: Option<&mut SMatrix<f64, ND, ND>>,
    state: Option<&mut MixedState>,
) -> Result<f64, ElementError> {
    let axi = ctx.analysis == Analysis::Axisymmetric;
    let mut kin = [Kin::default(); NP];
    let (vol, vol_def) = kinematics::<ND, NP>(ctx, x, u, &mut kin)?;
    if ctx.formulation == Formulation::Mixed && PressureSpace::of_shape(ctx.shape) == PressureSpace::Linear {
        return integrate_linear_pressure::<ND, NP>(ctx, x, &kin, force, stiffness);
    }
    force.fill(0.0);
    if let Some(k) = stiffness.as_deref_mut() {
        k.fill(0.0);
    }
    let mat = ctx.material;
    let mut energy = 0.0;
    let mixed = ctx.formulation == Formulation::Mixed;
    let ratio = vol_def / vol;
    // Pressure and dilatation: condensed from u, or the carried unknowns.
    let (p, dp, theta) = if !mixed {
        (0.0, 0.0, ratio)
    } else {
        let theta = state.as_ref().map(|s| s.dilatation).unwrap_or(ratio);
        let m = |e| map_material(e, 0, theta);
        energy += vol * mat.volumetric.energy(ratio).map_err(|e| map_material(e, 0, ratio))?;
        let p = match state.as_ref() {
            Some(s) => s.pressure,
            None => mat.volumetric.pressure(theta).map_err(m)?,
        };
        (p, mat.volumetric.pressure_derivative(theta).map_err(m)?, theta)
    };
    let mut g = SVector::<f64, ND>::zeros();
    for (q, k) in kin.iter().enumerate() {
        let resp = point_response(mat, mixed, k, q)?;
        energy += resp.energy * k.geo.dv;
        let b = BOp { geo: &k.geo, dim: ND / ctx.shape.nodes(), axisymmetric: axi };
        let mut p9 = to9(&(k.f * resp.stress));
        let fi = k.f.try_inverse().ok_or(ElementError::Inverted { point: q, j: k.j })?;
        if mixed {
            let jfit = to9(&(fi.transpose() * k.j));
            p9 += jfit * p;
            b.add_transpose(&jfit, k.geo.dv, &mut g);
        }
        b.add_transpose(&p9, k.geo.dv, force);
        if let Some(kk) = stiffness.as_deref_mut() {
            let mut a = first_elasticity(&k.f, &resp.stress, &resp.tangent);
            if mixed {
                a += cofactor_derivative(k.j, &fi) * p;
            }
            b.add_btab(&a, k.geo.dv, kk);
        }
    }
    if mixed {
        if let Some(kk) = stiffness {
            kk.ger(dp / vol, &g, &g, 1.0);
        }
        if let Some(st) = state {
            // Condensed residual of the three-field equations:
            // f += g [U''(θ)(v/V − θ) + U'(θ) − p].
            let u1 = mat.volumetric.pressure(theta).map_err(|e| map_material(e, 0, theta))?;
            *force += g * (dp * (ratio - theta) + u1 - p);
            st.volume_ratio = ratio;
            for (d, gv) in st.dvolume_du.iter_mut().zip(g.iter()) {
                *d = gv / vol;
            }
        }
    }
    Ok(energy)
}

/// The condensed linear discontinuous pressure of one element (see
/// [`super::pressure_space`]): basis values at the points, the projected
/// dilatation θ_h and pressure p_h, and `C = M⁻¹ (∫ U''(θ_h) φ φᵀ) M⁻¹`.
struct LinearPressure<const NP: usize> {
    phi: [nalgebra::Vector4<f64>; NP],
    dv: [f64; NP],
    coefficients: nalgebra::Vector4<f64>,
    coupling: nalgebra::Matrix4<f64>,
    /// U(θ_h) at each point.
    energy_density: [f64; NP],
}

impl<const NP: usize> LinearPressure<NP> {
    fn new(ctx: &ElementContext, x: &[[f64; 3]], kin: &[Kin; NP]) -> Result<Self, ElementError> {
        let dim = ctx.shape.dimension();
        let nodes = ctx.shape.nodes();
        let basis = PressureBasis::new(PressureSpace::Linear, dim, &x[..nodes]);
        let phi: [nalgebra::Vector4<f64>; NP] = std::array::from_fn(|q| {
            let g = &kin[q].geo;
            basis.values(std::array::from_fn(|c| (0..nodes).map(|a| g.n[a] * x[a][c]).sum()))
        });
        let dv: [f64; NP] = std::array::from_fn(|q| kin[q].geo.dv);
        let gram = Gram::new(basis.count(), &phi, &dv).map_err(|_| ElementError::BadReference { point: 0, det: 0.0 })?;
        let theta = gram.project(&phi, &dv, |q| kin[q].j);
        let vol = &ctx.material.volumetric;
        let mut first = [0.0; NP];
        let mut second = [0.0; NP];
        let mut energy_density = [0.0; NP];
        for q in 0..NP {
            let t = theta.dot(&phi[q]);
            let m = |e| map_material(e, q, t);
            first[q] = vol.pressure(t).map_err(m)?;
            second[q] = vol.pressure_derivative(t).map_err(m)?;
            energy_density[q] = vol.energy(t).map_err(m)?;
        }
        let coefficients = gram.project(&phi, &dv, |q| first[q]);
        let coupling = gram.sandwich(&phi, &dv, |q| second[q]);
        Ok(LinearPressure { phi, dv, coefficients, coupling, energy_density })
    }

    fn pressure(&self, q: usize) -> f64 {
        self.coefficients.dot(&self.phi[q])
    }
}

/// The mixed element with a linear discontinuous pressure (quad9, hex27:
/// Q2/P1, Simo–Taylor–Pister condensation with the projection of
/// [`super::pressure_space`]); always condensed from u (the carried
/// three-field state is used by the constant-pressure elements only).
fn integrate_linear_pressure<const ND: usize, const NP: usize>(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    kin: &[Kin; NP],
    force: &mut SVector<f64, ND>,
    mut stiffness: Option<&mut SMatrix<f64, ND, ND>>,
) -> Result<f64, ElementError> {
    let axi = ctx.analysis == Analysis::Axisymmetric;
    let lin = LinearPressure::<NP>::new(ctx, x, kin)?;
    force.fill(0.0);
    if let Some(k) = stiffness.as_deref_mut() {
        k.fill(0.0);
    }
    let mut energy: f64 = (0..NP).map(|q| lin.energy_density[q] * lin.dv[q]).sum();
    let mut g = [SVector::<f64, ND>::zeros(); MAX_PRESSURES];
    let count = PressureSpace::Linear.count(ctx.shape.dimension());
    for (q, k) in kin.iter().enumerate() {
        let resp = point_response(ctx.material, true, k, q)?;
        energy += resp.energy * k.geo.dv;
        let b = BOp { geo: &k.geo, dim: ND / ctx.shape.nodes(), axisymmetric: axi };
        let fi = k.f.try_inverse().ok_or(ElementError::Inverted { point: q, j: k.j })?;
        let jfit = to9(&(fi.transpose() * k.j));
        let p = lin.pressure(q);
        let p9 = to9(&(k.f * resp.stress)) + jfit * p;
        b.add_transpose(&p9, k.geo.dv, force);
        for (m, gm) in g.iter_mut().enumerate().take(count) {
            b.add_transpose(&jfit, lin.phi[q][m] * k.geo.dv, gm);
        }
        if let Some(kk) = stiffness.as_deref_mut() {
            let a = first_elasticity(&k.f, &resp.stress, &resp.tangent) + cofactor_derivative(k.j, &fi) * p;
            b.add_btab(&a, k.geo.dv, kk);
        }
    }
    if let Some(kk) = stiffness {
        for m in 0..count {
            for l in 0..count {
                kk.ger(lin.coupling[(m, l)], &g[m], &g[l], 1.0);
            }
        }
    }
    Ok(energy)
}

/// Internal force (and, if asked, the tangent, column-major ND×ND) of one
/// element into caller buffers of length `shape.dofs()` and its square.
/// `x` are the reference node positions and `u` the node displacements, both
/// with three entries per node (the third ignored in 2-D). Returns the
/// element's strain energy.
pub fn element_into(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
) -> Result<f64, ElementError> {
    element_with_state_into(ctx, x, u, force, stiffness, None)
}

/// As [`element_into`], with the mixed element's pressure and dilatation
/// taken from `state` (three-field form) instead of condensed from u.
/// Ignored by displacement elements.
pub fn element_with_state_into(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    state: Option<&mut MixedState>,
) -> Result<f64, ElementError> {
    // One monomorphised kernel per shape: dofs and integration points are
    // compile-time sizes, so the linear elements keep their fixed-size loops.
    match ctx.shape {
        Shape::Hex8 => run::<24, 8>(ctx, x, u, 3, force, stiffness, state),
        Shape::Quad4 => run::<8, 4>(ctx, x, u, 2, force, stiffness, state),
        Shape::Tri3 => run::<6, 3>(ctx, x, u, 2, force, stiffness, state),
        Shape::Tri6 => run::<12, 6>(ctx, x, u, 2, force, stiffness, state),
        Shape::Quad8 => run::<16, 9>(ctx, x, u, 2, force, stiffness, state),
        Shape::Quad9 => run::<18, 9>(ctx, x, u, 2, force, stiffness, state),
        Shape::Tet4 => run::<12, 4>(ctx, x, u, 3, force, stiffness, state),
        Shape::Tet10 => run::<30, 4>(ctx, x, u, 3, force, stiffness, state),
        Shape::Hex20 => run::<60, 27>(ctx, x, u, 3, force, stiffness, state),
        Shape::Hex27 => run::<81, 27>(ctx, x, u, 3, force, stiffness, state),
        Shape::Line2 | Shape::Line3 => Err(ElementError::NotAnElement { shape: ctx.shape.name() }),
    }
}

fn run<const ND: usize, const NP: usize>(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    dim: usize,
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    state: Option<&mut MixedState>,
) -> Result<f64, ElementError> {
    let uv = SVector::<f64, ND>::from_fn(|r, _| u[r / dim][r % dim]);
    let mut f = SVector::<f64, ND>::zeros();
    match stiffness {
        Some(kbuf) => {
            let mut k = SMatrix::<f64, ND, ND>::zeros();
            let e = integrate::<ND, NP>(ctx, x, &uv, &mut f, Some(&mut k), state)?;
            kbuf[..ND * ND].copy_from_slice(k.as_slice());
            force[..ND].copy_from_slice(f.as_slice());
            Ok(e)
        }
        None => {
            let e = integrate::<ND, NP>(ctx, x, &uv, &mut f, None, state)?;
            force[..ND].copy_from_slice(f.as_slice());
            Ok(e)
        }
    }
}

/// Stress and strain measures at one integration point.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct PointState {
    /// Reference position of the point.
    pub position: [f64; 3],
    /// Cauchy stress (true stress).
    pub cauchy: Matrix3<f64>,
    /// Hydrostatic pressure −tr(σ)/3, positive in compression.
    pub pressure: f64,
    /// Volume ratio det F at the point.
    pub j: f64,
    /// Principal stretches, descending.
    pub stretches: [f64; 3],
    /// Strain energy density per unit reference volume (mixed: W_iso(C) + U(θ)).
    pub energy_density: f64,
    /// Reference volume weight of the point.
    pub volume: f64,
}

/// Per-point results of one element into `out` (length ≥ `shape.points()`).
pub fn point_states(ctx: &ElementContext, x: &[[f64; 3]], u: &[[f64; 3]], out: &mut [PointState]) -> Result<(), ElementError> {
    match ctx.shape {
        Shape::Hex8 => states::<24, 8>(ctx, x, u, 3, out),
        Shape::Quad4 => states::<8, 4>(ctx, x, u, 2, out),
        Shape::Tri3 => states::<6, 3>(ctx, x, u, 2, out),
        Shape::Tri6 => states::<12, 6>(ctx, x, u, 2, out),
        Shape::Quad8 => states::<16, 9>(ctx, x, u, 2, out),
        Shape::Quad9 => states::<18, 9>(ctx, x, u, 2, out),
        Shape::Tet4 => states::<12, 4>(ctx, x, u, 3, out),
        Shape::Tet10 => states::<30, 4>(ctx, x, u, 3, out),
        Shape::Hex20 => states::<60, 27>(ctx, x, u, 3, out),
        Shape::Hex27 => states::<81, 27>(ctx, x, u, 3, out),
        Shape::Line2 | Shape::Line3 => Err(ElementError::NotAnElement { shape: ctx.shape.name() }),
    }
}

fn states<const ND: usize, const NP: usize>(
    ctx: &ElementContext,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    dim: usize,
    out: &mut [PointState],
) -> Result<(), ElementError> {
    let uv = SVector::<f64, ND>::from_fn(|r, _| u[r / dim][r % dim]);
    let mut kin = [Kin::default(); NP];
    let (vol, vol_def) = kinematics::<ND, NP>(ctx, x, &uv, &mut kin)?;
    let mat = ctx.material;
    let mixed = ctx.formulation == Formulation::Mixed;
    let theta = vol_def / vol;
    // Pressure and volumetric energy density at each point: one value per
    // element for the constant pressure, the projected fields for the linear one.
    let mut point_pressure = [0.0; NP];
    let mut point_u = [0.0; NP];
    if mixed && PressureSpace::of_shape(ctx.shape) == PressureSpace::Linear {
        let lin = LinearPressure::new(ctx, x, &kin)?;
        point_pressure = std::array::from_fn(|q| lin.pressure(q));
        point_u = lin.energy_density;
    } else if mixed {
        let m = |e| map_material(e, 0, theta);
        point_pressure = [mat.volumetric.pressure(theta).map_err(m)?; NP];
        point_u = [mat.volumetric.energy(theta).map_err(m)?; NP];
    }
    for (q, k) in kin.iter().enumerate() {
        let (p, u_vol) = (point_pressure[q], point_u[q]);
        let resp = point_response(mat, mixed, k, q)?;
        let mut sigma = k.f * resp.stress * k.f.transpose() / k.j;
        if mixed {
            sigma += Matrix3::identity() * p;
        }
        let mut ev = (k.f.transpose() * k.f).symmetric_eigenvalues().map(|l| l.max(0.0).sqrt());
        ev.as_mut_slice().sort_by(|a, b| b.total_cmp(a));
        let mut position = [0.0; 3];
        for a in 0..ctx.shape.nodes() {
            for i in 0..3 {
                position[i] += k.geo.n[a] * x[a][i];
            }
        }
        out[q] = PointState {
            position,
            cauchy: sigma,
            pressure: -sigma.trace() / 3.0,
            j: k.j,
            stretches: [ev[0], ev[1], ev[2]],
            energy_density: resp.energy + u_vol,
            volume: k.geo.dv,
        };
    }
    Ok(())
}
