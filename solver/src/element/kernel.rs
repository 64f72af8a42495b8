//! The integration loop shared by every element, in two halves around the
//! material: [`kinematics`] gives `F = I + B u` and J at every Gauss point;
//! the caller evaluates the material there ([`PointResponse`], and the
//! volumetric law of a mixed element, [`VolumetricResponse`]); then
//! [`integrate_into`] forms `∫ Bᵀ P dV`, `∫ Bᵀ A B dV` and the
//! condensation of the element's pressure space ([`super::pressure_space`]:
//! the mean dilatation for a constant pressure, the L² projection for a
//! linear one). The element never calls a material: the assembly kernel
//! ([`crate::assembly::kernel`]) is where they meet.

use nalgebra::{Matrix3, SMatrix, SVector};

use nalgebra::Vector4;

use super::geometry::{point_geometry_into, PointGeometry};
use super::pressure_space::{Gram, PressureBasis, PressureSpace, MAX_PRESSURES};
use super::{Analysis, ElementError, Shape};

/// Largest number of element degrees of freedom (hex27: 27 × 3).
pub const MAX_DOFS: usize = 81;
/// Largest number of integration points per element (hex20/hex27: 3 × 3 × 3).
pub const MAX_POINTS: usize = 27;

type M9 = SMatrix<f64, 9, 9>;
type V9 = SVector<f64, 9>;

/// Voigt index of tensor component (I, J).
const VI: [[usize; 3]; 3] = [[0, 3, 5], [3, 1, 4], [5, 4, 2]];

pub(super) fn to9(m: &Matrix3<f64>) -> V9 {
    V9::from_fn(|k, _| m[(k / 3, k % 3)])
}

/// `A_iJkL = δ_ik S_JL + F_iI F_kK D_IJKL`: the first elasticity tensor as a
/// 9×9 matrix with row index 3i+J and column index 3k+L.
pub(super) fn first_elasticity(f: &Matrix3<f64>, s: &Matrix3<f64>, d: &SMatrix<f64, 6, 6>) -> M9 {
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
pub(super) fn cofactor_derivative(j: f64, fi: &Matrix3<f64>) -> M9 {
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
pub(super) struct BOp<'g> {
    geo: &'g PointGeometry,
    dim: usize,
    axisymmetric: bool,
}

impl BOp<'_> {
    /// `out += s · Bᵀ v`.
    pub(super) fn add_transpose<const ND: usize>(&self, v: &V9, s: f64, out: &mut SVector<f64, ND>) {
        if self.dim == 3 {
            // 3-D: no hoop row; the same sums over plain node blocks.
            let v: &[f64; 9] = v.as_slice().try_into().expect("a 9-vector");
            for (g, o) in self.geo.g.iter().zip(out.as_mut_slice().chunks_exact_mut(3)).take(ND / 3) {
                for i in 0..3 {
                    o[i] += s * (g[0] * v[3 * i] + g[1] * v[3 * i + 1] + g[2] * v[3 * i + 2]);
                }
            }
            return;
        }
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

    /// `k += s · Bᵀ A B`, using the sparsity of B (about a third of the dense
    /// product's work). `LOWER`: only the lower triangle (rows ≥ column),
    /// for a symmetric `A`; the caller mirrors it once per element.
    pub(super) fn add_btab<const ND: usize, const LOWER: bool>(&self, a: &M9, s: f64, k: &mut SMatrix<f64, ND, ND>) {
        if LOWER && self.dim == 3 {
            return self.add_btab_solid::<ND>(a, s, k);
        }
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
            let first = if LOWER { c / self.dim } else { 0 };
            for a_ in first..ND / self.dim {
                let g = &self.geo.g[a_];
                for i in 0..self.dim {
                    if LOWER && a_ * self.dim + i < c {
                        continue;
                    }
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

impl BOp<'_> {
    /// [`BOp::add_btab`] lower triangle for a 3-D element (no hoop row), node
    /// block by node block over plain arrays: the same sums in the same order
    /// (so the same bits) with no per-entry branches or index arithmetic
    /// beyond the blocks, which the compiler unrolls.
    fn add_btab_solid<const ND: usize>(&self, a: &M9, s: f64, k: &mut SMatrix<f64, ND, ND>) {
        let a: &[f64; 81] = a.as_slice().try_into().expect("a 9×9 matrix");
        let nodes = ND / 3;
        let g = &self.geo.g[..nodes];
        // ab[c][r] = s · (A B)[r][c] for column c = 3b + kk of node b.
        let mut ab = [[0.0; 9]; ND];
        for (b, gb) in g.iter().enumerate() {
            for kk in 0..3 {
                let (c0, c1, c2) = (&a[27 * kk..27 * kk + 9], &a[27 * kk + 9..27 * kk + 18], &a[27 * kk + 18..27 * kk + 27]);
                let col = &mut ab[3 * b + kk];
                for r in 0..9 {
                    col[r] = s * (c0[r] * gb[0] + c1[r] * gb[1] + c2[r] * gb[2]);
                }
            }
        }
        let kv = k.as_mut_slice();
        for b in 0..nodes {
            for kk in 0..3 {
                let c = 3 * b + kk;
                let abc = &ab[c];
                let column = &mut kv[c * ND..(c + 1) * ND];
                // The diagonal block from row c down, then the blocks below.
                let ga = &g[b];
                for i in kk..3 {
                    column[3 * b + i] += ga[0] * abc[3 * i] + ga[1] * abc[3 * i + 1] + ga[2] * abc[3 * i + 2];
                }
                for (an, ga) in g.iter().enumerate().skip(b + 1) {
                    let rows = &mut column[3 * an..3 * an + 3];
                    for i in 0..3 {
                        rows[i] += ga[0] * abc[3 * i] + ga[1] * abc[3 * i + 1] + ga[2] * abc[3 * i + 2];
                    }
                }
            }
        }
    }
}

/// Constitutive answer at one integration point, as the element needs it:
/// computed by the caller (the assembly kernel) from the point's
/// [`PointKinematics`], so the element never sees a material model.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct PointResponse {
    /// Strain energy density per unit reference volume (mixed elements: the
    /// isochoric part alone).
    pub energy: f64,
    /// Second Piola–Kirchhoff stress S (mixed elements: isochoric part).
    pub stress: Matrix3<f64>,
    /// Material tangent 4 ∂²W/∂C∂C in Voigt order xx, yy, zz, xy, yz, xz.
    pub tangent: SMatrix<f64, 6, 6>,
}

/// The volumetric law of a mixed element evaluated by the caller at one
/// dilatation θ: for a constant pressure the element's (see
/// [`ElementKinematics::volume_ratio`] and [`MixedState::dilatation`]), for a
/// linear pressure the projected θ_h at one integration point (see
/// [`ElementKinematics::dilatations`]).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct VolumetricResponse {
    /// Volumetric energy density U at the current volume ratio v/V (linear
    /// pressure: U(θ_h) at the point).
    pub energy: f64,
    /// Element pressure p entering the stress: U'(θ), or the carried unknown.
    pub pressure: f64,
    /// U'(θ): the pressure the law gives at the element dilatation.
    pub law_pressure: f64,
    /// U''(θ): the volumetric stiffness at the element dilatation.
    pub stiffness: f64,
}

impl VolumetricResponse {
    /// Factor of ∂v/∂u in the condensed residual of the three-field
    /// equations at volume ratio v/V `ratio` and carried dilatation θ:
    /// U''(θ)(v/V − θ) + U'(θ) − p.
    pub fn three_field_residual_factor(&self, ratio: f64, dilatation: f64) -> f64 {
        self.stiffness * (ratio - dilatation) + self.law_pressure - self.pressure
    }
}

/// Deformation of one Gauss point: its reference geometry, the deformation
/// gradient F and J = det F.
#[derive(Debug, Clone, Copy, Default)]
pub struct PointKinematics {
    geo: PointGeometry,
    /// Deformation gradient F (3×3; the hoop stretch in F₃₃ for axisymmetry).
    pub f: Matrix3<f64>,
    /// Volume ratio J = det F (> 0).
    pub j: f64,
    /// Reference position of the point.
    pub position: [f64; 3],
}

impl PointKinematics {
    /// Reference volume weight dV of the point.
    pub fn volume_weight(&self) -> f64 {
        self.geo.dv
    }

    /// Right Cauchy–Green tensor C = FᵀF, what a material is evaluated at.
    pub fn right_cauchy_green(&self) -> Matrix3<f64> {
        self.f.transpose() * self.f
    }
}

/// Deformation of every Gauss point of one element, with its reference
/// volume V and deformed volume v = ∫ J dV.
#[derive(Debug, Clone, Copy)]
pub struct ElementKinematics {
    shape: Shape,
    analysis: Analysis,
    points: [PointKinematics; MAX_POINTS],
    /// Basis of the element's pressure space (used by mixed elements).
    basis: PressureBasis,
    /// Reference volume V (axisymmetric: over 2π; plane strain: times the thickness).
    pub volume: f64,
    /// Deformed volume v = ∫ J dV.
    pub deformed_volume: f64,
}

impl ElementKinematics {
    /// The element's integration points.
    pub fn points(&self) -> &[PointKinematics] {
        &self.points[..self.shape.points()]
    }

    /// Mean dilatation v/V.
    pub fn volume_ratio(&self) -> f64 {
        self.deformed_volume / self.volume
    }

    /// The pressure space of the element's mixed form.
    pub fn pressure_space(&self) -> PressureSpace {
        PressureSpace::of_shape(self.shape)
    }

    /// Dilatations at which a mixed element's volumetric law is to be
    /// evaluated, into `out` (length ≥ `MAX_POINTS`); returns their count.
    /// Constant pressure: one, the mean dilatation v/V. Linear pressure: the
    /// L² projection θ_h of J at each integration point.
    pub fn dilatations(&self, out: &mut [f64]) -> Result<usize, ElementError> {
        match self.pressure_space() {
            PressureSpace::Constant => {
                out[0] = self.volume_ratio();
                Ok(1)
            }
            PressureSpace::Linear => {
                let lin = self.linear_pressure()?;
                let theta = lin.gram.project(lin.phi(), lin.dv(), |q| self.points[q].j);
                for (o, phi) in out.iter_mut().zip(lin.phi()) {
                    *o = theta.dot(phi);
                }
                Ok(lin.count)
            }
        }
    }

    fn linear_pressure(&self) -> Result<LinearPressure, ElementError> {
        let count = self.shape.points();
        let phi: [Vector4<f64>; MAX_POINTS] = std::array::from_fn(|q| self.basis.values(self.points[q].position));
        let dv: [f64; MAX_POINTS] = std::array::from_fn(|q| self.points[q].geo.dv);
        let gram =
            Gram::new(self.basis.count(), &phi[..count], &dv[..count]).map_err(|_| ElementError::BadReference { point: 0, det: 0.0 })?;
        Ok(LinearPressure { count, phi, dv, gram })
    }

    /// The element's shape.
    pub fn shape(&self) -> Shape {
        self.shape
    }

    fn dim(&self) -> usize {
        self.shape.dimension()
    }

    pub(super) fn bop<'g>(&self, p: &'g PointKinematics) -> BOp<'g> {
        BOp { geo: &p.geo, dim: self.dim(), axisymmetric: self.analysis == Analysis::Axisymmetric }
    }
}

/// The linear discontinuous pressure of one element: basis values and
/// volume weights at the points and the Gram matrix of the projection.
struct LinearPressure {
    count: usize,
    phi: [Vector4<f64>; MAX_POINTS],
    dv: [f64; MAX_POINTS],
    gram: Gram,
}

impl LinearPressure {
    fn phi(&self) -> &[Vector4<f64>] {
        &self.phi[..self.count]
    }

    fn dv(&self) -> &[f64] {
        &self.dv[..self.count]
    }

    /// Coefficients of p_h (projection of U'(θ_h)) and the coupling
    /// `C = M⁻¹ (∫ U''(θ_h) φ φᵀ) M⁻¹`, from the law at each point.
    fn condense(&self, volumetric: &[VolumetricResponse]) -> (Vector4<f64>, nalgebra::Matrix4<f64>) {
        let coefficients = self.gram.project(self.phi(), self.dv(), |q| volumetric[q].law_pressure);
        let coupling = self.gram.sandwich(self.phi(), self.dv(), |q| volumetric[q].stiffness);
        (coefficients, coupling)
    }
}

/// Geometry, F and J at every Gauss point of an element with reference node
/// positions `x` and displacements `u` (three entries per node, the third
/// ignored in 2-D). Fails on a bad reference element or an inverted point.
pub fn kinematics(shape: Shape, analysis: Analysis, x: &[[f64; 3]], u: &[[f64; 3]]) -> Result<ElementKinematics, ElementError> {
    let mut out = ElementKinematics::blank();
    kinematics_into(shape, analysis, x, u, &mut out)?;
    Ok(out)
}

impl ElementKinematics {
    /// An element of no points, to be filled by [`kinematics_into`].
    pub fn blank() -> Self {
        ElementKinematics {
            shape: Shape::Hex8,
            analysis: Analysis::Solid3d,
            points: [PointKinematics::default(); MAX_POINTS],
            basis: PressureBasis::new(PressureSpace::Constant, 3, &[]),
            volume: 0.0,
            deformed_volume: 0.0,
        }
    }
}

/// [`kinematics`] written in place: only the element's own points and nodes
/// are written, so one buffer, sized for the largest element, serves every
/// element of an assembly without being copied or cleared (what made the
/// per-element cost of small meshes).
pub fn kinematics_into(
    shape: Shape,
    analysis: Analysis,
    x: &[[f64; 3]],
    u: &[[f64; 3]],
    out: &mut ElementKinematics,
) -> Result<(), ElementError> {
    let axisymmetric = analysis == Analysis::Axisymmetric;
    let dim = shape.dimension();
    if dim < 2 {
        return Err(ElementError::NotAnElement { shape: shape.name() });
    }
    let nodes = shape.nodes();
    out.shape = shape;
    out.analysis = analysis;
    out.basis = PressureBasis::new(PressureSpace::of_shape(shape), dim, &x[..nodes]);
    out.volume = 0.0;
    out.deformed_volume = 0.0;
    for q in 0..shape.points() {
        let point = &mut out.points[q];
        let geo = &mut point.geo;
        point_geometry_into(shape, analysis, x, q, geo)?;
        // F = I + B u, written out over the sparse B (see `BOp`).
        let mut f = Matrix3::<f64>::zeros();
        for a in 0..nodes {
            for i in 0..dim {
                for jj in 0..3 {
                    f[(i, jj)] += u[a][i] * geo.g[a][jj];
                }
            }
            if axisymmetric {
                f[(2, 2)] += u[a][0] * geo.n[a] / geo.radius;
            }
        }
        f += Matrix3::identity();
        let j = f.determinant();
        if !(j > 0.0 && j.is_finite()) {
            return Err(ElementError::Inverted { point: q, j });
        }
        out.volume += geo.dv;
        out.deformed_volume += j * geo.dv;
        point.position = std::array::from_fn(|c| (0..nodes).map(|a| geo.n[a] * x[a][c]).sum());
        point.f = f;
        point.j = j;
    }
    Ok(())
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

/// Internal force (and, if asked, the tangent, column-major, `shape.dofs()`
/// squared) of one element into caller buffers, from its kinematics and the
/// constitutive answer at each point (`responses`, one per point). Mixed
/// elements also take the volumetric law at their dilatations (`volumetric`,
/// one per entry of [`ElementKinematics::dilatations`]; empty for a
/// displacement element) and, in the three-field form of a constant-pressure
/// element, their carried unknowns (`state`, whose outputs are filled in;
/// a linear pressure is always condensed from u and leaves it untouched).
/// Returns the element's strain energy.
pub fn integrate_into(
    kin: &ElementKinematics,
    responses: &[PointResponse],
    volumetric: &[VolumetricResponse],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    state: Option<&mut MixedState>,
) -> Result<f64, ElementError> {
    integrate_with::<true>(kin, responses, volumetric, force, stiffness, state)
}

/// [`integrate_into`]; `LOWER`: the tangent's lower triangle is integrated
/// and mirrored (the element tangent of a hyperelastic material is
/// symmetric). `integrate_with::<false>` forms the whole tangent entry by
/// entry, as the kernel did before it used the symmetry: the reference of
/// the parity test.
pub(crate) fn integrate_with<const LOWER: bool>(
    kin: &ElementKinematics,
    responses: &[PointResponse],
    volumetric: &[VolumetricResponse],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    state: Option<&mut MixedState>,
) -> Result<f64, ElementError> {
    // One monomorphised kernel per element size: the dofs are compile-time
    // sizes, so the linear elements keep their small fixed-size matrices.
    match kin.shape {
        Shape::Hex8 => run::<24, LOWER>(kin, responses, volumetric, force, stiffness, state),
        Shape::Quad4 => run::<8, LOWER>(kin, responses, volumetric, force, stiffness, state),
        Shape::Tri3 => run::<6, LOWER>(kin, responses, volumetric, force, stiffness, state),
        Shape::Tri6 => run::<12, LOWER>(kin, responses, volumetric, force, stiffness, state),
        Shape::Quad8 => run::<16, LOWER>(kin, responses, volumetric, force, stiffness, state),
        Shape::Quad9 => run::<18, LOWER>(kin, responses, volumetric, force, stiffness, state),
        Shape::Tet4 => run::<12, LOWER>(kin, responses, volumetric, force, stiffness, state),
        Shape::Tet10 => run::<30, LOWER>(kin, responses, volumetric, force, stiffness, state),
        Shape::Hex20 => run::<60, LOWER>(kin, responses, volumetric, force, stiffness, state),
        Shape::Hex27 => run::<81, LOWER>(kin, responses, volumetric, force, stiffness, state),
        Shape::Line2 | Shape::Line3 => Err(ElementError::NotAnElement { shape: kin.shape.name() }),
    }
}

fn run<const ND: usize, const LOWER: bool>(
    kin: &ElementKinematics,
    responses: &[PointResponse],
    volumetric: &[VolumetricResponse],
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
    state: Option<&mut MixedState>,
) -> Result<f64, ElementError> {
    let mut f = SVector::<f64, ND>::zeros();
    match stiffness {
        Some(kbuf) => {
            let mut k = SMatrix::<f64, ND, ND>::zeros();
            let e = integrate::<ND, LOWER>(kin, responses, volumetric, &mut f, Some(&mut k), state)?;
            if LOWER {
                for c in 0..ND {
                    for r in c + 1..ND {
                        k[(c, r)] = k[(r, c)];
                    }
                }
            }
            kbuf[..ND * ND].copy_from_slice(k.as_slice());
            force[..ND].copy_from_slice(f.as_slice());
            Ok(e)
        }
        None => {
            let e = integrate::<ND, LOWER>(kin, responses, volumetric, &mut f, None, state)?;
            force[..ND].copy_from_slice(f.as_slice());
            Ok(e)
        }
    }
}

fn integrate<const ND: usize, const LOWER: bool>(
    kin: &ElementKinematics,
    responses: &[PointResponse],
    volumetric: &[VolumetricResponse],
    force: &mut SVector<f64, ND>,
    stiffness: Option<&mut SMatrix<f64, ND, ND>>,
    state: Option<&mut MixedState>,
) -> Result<f64, ElementError> {
    match (volumetric.first(), kin.pressure_space()) {
        (None, _) => integrate_constant::<ND, LOWER>(kin, responses, None, force, stiffness, state),
        (Some(v), PressureSpace::Constant) => integrate_constant::<ND, LOWER>(kin, responses, Some(v), force, stiffness, state),
        (Some(_), PressureSpace::Linear) => integrate_linear::<ND, LOWER>(kin, responses, volumetric, force, stiffness),
    }
}

/// Displacement element, or mixed element with a constant pressure (mean
/// dilatation, optionally with the carried three-field unknowns).
fn integrate_constant<const ND: usize, const LOWER: bool>(
    kin: &ElementKinematics,
    responses: &[PointResponse],
    volumetric: Option<&VolumetricResponse>,
    force: &mut SVector<f64, ND>,
    mut stiffness: Option<&mut SMatrix<f64, ND, ND>>,
    state: Option<&mut MixedState>,
) -> Result<f64, ElementError> {
    let vol = kin.volume;
    let ratio = kin.volume_ratio();
    let mut energy = 0.0;
    // Pressure p and volumetric stiffness U''(θ) of the mixed element.
    let (p, dp) = match volumetric {
        Some(v) => {
            energy += vol * v.energy;
            (v.pressure, v.stiffness)
        }
        None => (0.0, 0.0),
    };
    let mixed = volumetric.is_some();
    let mut g = SVector::<f64, ND>::zeros();
    for (q, (k, resp)) in kin.points().iter().zip(responses).enumerate() {
        energy += resp.energy * k.geo.dv;
        let b = kin.bop(k);
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
            b.add_btab::<ND, LOWER>(&a, k.geo.dv, kk);
        }
    }
    if let Some(v) = volumetric {
        if let Some(kk) = stiffness {
            kk.ger(dp / vol, &g, &g, 1.0);
        }
        if let Some(st) = state {
            *force += g * v.three_field_residual_factor(ratio, st.dilatation);
            st.volume_ratio = ratio;
            for (d, gv) in st.dvolume_du.iter_mut().zip(g.iter()) {
                *d = gv / vol;
            }
        }
    }
    Ok(energy)
}

/// The mixed element with a linear discontinuous pressure (quad9, hex27:
/// Q2/P1, Simo–Taylor–Pister condensation with the projection of
/// [`super::pressure_space`]); `volumetric` holds the law at θ_h of each point.
fn integrate_linear<const ND: usize, const LOWER: bool>(
    kin: &ElementKinematics,
    responses: &[PointResponse],
    volumetric: &[VolumetricResponse],
    force: &mut SVector<f64, ND>,
    mut stiffness: Option<&mut SMatrix<f64, ND, ND>>,
) -> Result<f64, ElementError> {
    let lin = kin.linear_pressure()?;
    let (coefficients, coupling) = lin.condense(volumetric);
    force.fill(0.0);
    if let Some(k) = stiffness.as_deref_mut() {
        k.fill(0.0);
    }
    let mut energy: f64 = volumetric.iter().zip(lin.dv()).map(|(v, dv)| v.energy * dv).sum();
    let mut g = [SVector::<f64, ND>::zeros(); MAX_PRESSURES];
    let count = kin.basis.count();
    for (q, (k, resp)) in kin.points().iter().zip(responses).enumerate() {
        energy += resp.energy * k.geo.dv;
        let b = kin.bop(k);
        let fi = k.f.try_inverse().ok_or(ElementError::Inverted { point: q, j: k.j })?;
        let jfit = to9(&(fi.transpose() * k.j));
        let p = coefficients.dot(&lin.phi[q]);
        let p9 = to9(&(k.f * resp.stress)) + jfit * p;
        b.add_transpose(&p9, k.geo.dv, force);
        for (m, gm) in g.iter_mut().enumerate().take(count) {
            b.add_transpose(&jfit, lin.phi[q][m] * k.geo.dv, gm);
        }
        if let Some(kk) = stiffness.as_deref_mut() {
            let a = first_elasticity(&k.f, &resp.stress, &resp.tangent) + cofactor_derivative(k.j, &fi) * p;
            b.add_btab::<ND, LOWER>(&a, k.geo.dv, kk);
        }
    }
    if let Some(kk) = stiffness {
        for m in 0..count {
            for l in 0..count {
                kk.ger(coupling[(m, l)], &g[m], &g[l], 1.0);
            }
        }
    }
    Ok(energy)
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

impl PointState {
    /// Largest principal logarithmic (Hencky) strain ln λ_max.
    pub fn max_log_strain(&self) -> f64 {
        self.stretches[0].ln()
    }
}

/// Per-point results of one element into `out` (length ≥ `shape.points()`),
/// from its kinematics, the constitutive answer at each point and, for a
/// mixed element, the volumetric law at its dilatations (as for
/// [`integrate_into`]): the pressure and volumetric energy added at each
/// point are the element's U'(θ), U(θ) for a constant pressure and the
/// projected p_h, U(θ_h) for a linear one.
pub fn point_states_into(
    kin: &ElementKinematics,
    responses: &[PointResponse],
    volumetric: &[VolumetricResponse],
    out: &mut [PointState],
) -> Result<(), ElementError> {
    let np = kin.points().len();
    let mut point_pressure = [0.0; MAX_POINTS];
    let mut point_energy = [0.0; MAX_POINTS];
    match (volumetric.first(), kin.pressure_space()) {
        (None, _) => {}
        (Some(v), PressureSpace::Constant) => {
            point_pressure[..np].fill(v.pressure);
            point_energy[..np].fill(v.energy);
        }
        (Some(_), PressureSpace::Linear) => {
            let lin = kin.linear_pressure()?;
            let (coefficients, _) = lin.condense(volumetric);
            for q in 0..np {
                point_pressure[q] = coefficients.dot(&lin.phi[q]);
                point_energy[q] = volumetric[q].energy;
            }
        }
    }
    let mixed = !volumetric.is_empty();
    for (q, (k, resp)) in kin.points().iter().zip(responses).enumerate() {
        let (p, u_vol) = (point_pressure[q], point_energy[q]);
        let mut sigma = k.f * resp.stress * k.f.transpose() / k.j;
        if mixed {
            sigma += Matrix3::identity() * p;
        }
        let mut ev = (k.f.transpose() * k.f).symmetric_eigenvalues().map(|l| l.max(0.0).sqrt());
        ev.as_mut_slice().sort_by(|a, b| b.total_cmp(a));
        out[q] = PointState {
            position: k.position,
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
