//! The Taylor–Hood element: quadratic displacements with a continuous
//! pressure, linear on each element and shared by the elements at a corner
//! node (P2/P1 on tet10; Taylor & Hood 1973, "A numerical solution of the
//! Navier–Stokes equations using the finite element technique", Computers &
//! Fluids 1:73–100). Unlike the element pressures of
//! [`super::pressure_space`] it is not condensed: its corner values are
//! unknowns of the global system, which is then symmetric indefinite. The
//! pair satisfies the discrete inf-sup condition uniformly in h (Brezzi &
//! Fortin 1991, Mixed and Hybrid Finite Element Methods, §VI.6; Boffi,
//! Brezzi & Fortin 2013, §8.8), so the pressure has no spurious modes and
//! the displacement no locking.
//!
//! With the split `W = W_iso(C) + U(J)` and the complementary volumetric
//! energy `U*(p) = p θ(p) − U(θ(p))`, θ(p) the inverse of `p = U'(θ)`, the
//! element's share of the stationary functional is
//!
//! ```text
//! Π_e(u, p) = ∫ W_iso(C) + p_h J − U*(p_h) dV,   p_h = Σ_k L_k p_k
//! r_u  = ∫ Bᵀ (P_iso + p_h J F⁻ᵀ) dV
//! r_pk = ∫ L_k (J − θ(p_h)) dV
//! K_uu = ∫ Bᵀ (A_iso + p_h ∂(J F⁻ᵀ)/∂F) B dV
//! K_upk = ∫ L_k Bᵀ J F⁻ᵀ dV,   K_pkpl = −∫ L_k L_l / U''(θ(p_h)) dV
//! ```
//!
//! (L_k the linear functions of the corners). The pressure unknowns are
//! carried scaled, `p = s π` with one scale s (stress per length), so
//! their residuals are forces and their tangent entries stiffnesses, like
//! the displacements': rows and columns of π are those of p times s.

use nalgebra::{SMatrix, SVector};

use super::kernel::{cofactor_derivative, first_elasticity, to9, ElementKinematics, PointResponse, MAX_POINTS};
use super::{ElementError, Shape};

/// Largest number of pressure nodes of a Taylor–Hood element (tet10's corners).
pub const MAX_PRESSURE_NODES: usize = 4;

/// The shapes that have a Taylor–Hood form, with their pressure nodes
/// (the corners, listed first): tet10 (P2/P1).
pub fn pressure_nodes(shape: Shape) -> Option<usize> {
    match shape {
        Shape::Tet10 => Some(4),
        _ => None,
    }
}

/// The corners' linear functions L_k at integration point `q` of `shape`:
/// a linear function is reproduced by the quadratic ones from its nodal
/// values (1 at its corner, ½ at the mid-edge nodes beside it).
pub fn corner_functions(shape: Shape, q: usize) -> [f64; MAX_PRESSURE_NODES] {
    let def = shape.def();
    let n = shape.table().values(q);
    let mut l = [0.0; MAX_PRESSURE_NODES];
    for (k, lk) in l.iter_mut().enumerate().take(def.corners) {
        *lk = n[k];
    }
    for edge in def.edges {
        if let [a, b, mid] = edge[..] {
            l[a] += 0.5 * n[mid];
            l[b] += 0.5 * n[mid];
        }
    }
    l
}

/// The volumetric law evaluated by the caller at the pressure p_h of one
/// integration point (the element never sees a material).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct PressureResponse {
    /// The pressure p_h there (stress, positive in tension).
    pub pressure: f64,
    /// θ(p_h): the volume ratio at which the law gives that pressure.
    pub dilatation: f64,
    /// 1 / U''(θ): the volumetric compliance.
    pub compliance: f64,
    /// U*(p_h) = p_h θ − U(θ): the complementary energy density.
    pub complementary: f64,
    /// U(θ): the volumetric energy density (for results).
    pub energy: f64,
}

impl ElementKinematics {
    /// Pressure p_h at every integration point from the corner values
    /// `corner` (stress units), into `out`; returns the point count.
    pub fn continuous_pressures(&self, corner: &[f64], out: &mut [f64; MAX_POINTS]) -> usize {
        let count = self.points().len();
        for (q, o) in out.iter_mut().enumerate().take(count) {
            let l = corner_functions(self.shape(), q);
            *o = l.iter().zip(corner).map(|(a, b)| a * b).sum();
        }
        count
    }
}

/// Force and tangent of a Taylor–Hood element (column-major, displacement
/// dofs first, then the scaled pressure unknowns of its corners) from its
/// kinematics, the isochoric answer at every point (`responses`) and the law
/// at every point's pressure (`laws`); `scale` is s of `p = s π`. Returns
/// the element's share of Π.
pub fn integrate_continuous_into(
    kin: &ElementKinematics,
    responses: &[PointResponse],
    laws: &[PressureResponse],
    scale: f64,
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
) -> Result<f64, ElementError> {
    match kin.shape() {
        Shape::Tet10 => run::<30, 4>(kin, responses, laws, scale, force, stiffness),
        other => Err(ElementError::NotAnElement { shape: other.name() }),
    }
}

fn run<const ND: usize, const NP: usize>(
    kin: &ElementKinematics,
    responses: &[PointResponse],
    laws: &[PressureResponse],
    scale: f64,
    force: &mut [f64],
    stiffness: Option<&mut [f64]>,
) -> Result<f64, ElementError> {
    let want_k = stiffness.is_some();
    let mut fu = SVector::<f64, ND>::zeros();
    let mut fp = [0.0; NP];
    let mut kuu = SMatrix::<f64, ND, ND>::zeros();
    let mut kup = [SVector::<f64, ND>::zeros(); NP];
    let mut kpp = [[0.0; NP]; NP];
    let mut energy = 0.0;
    for (q, ((k, resp), law)) in kin.points().iter().zip(responses).zip(laws).enumerate() {
        let dv = k.volume_weight();
        let p = law.pressure;
        energy += (resp.energy + p * k.j - law.complementary) * dv;
        let b = kin.bop(k);
        let fi = k.f.try_inverse().ok_or(ElementError::Inverted { point: q, j: k.j })?;
        let jfit = to9(&(fi.transpose() * k.j));
        b.add_transpose(&(to9(&(k.f * resp.stress)) + jfit * p), dv, &mut fu);
        let l = corner_functions(kin.shape(), q);
        for m in 0..NP {
            fp[m] += scale * l[m] * (k.j - law.dilatation) * dv;
        }
        if want_k {
            let a = first_elasticity(&k.f, &resp.stress, &resp.tangent) + cofactor_derivative(k.j, &fi) * p;
            b.add_btab::<ND, true>(&a, dv, &mut kuu);
            for m in 0..NP {
                b.add_transpose(&jfit, scale * l[m] * dv, &mut kup[m]);
                for n in 0..NP {
                    kpp[m][n] -= scale * scale * l[m] * l[n] * law.compliance * dv;
                }
            }
        }
    }
    let nt = ND + NP;
    force[..ND].copy_from_slice(fu.as_slice());
    force[ND..nt].copy_from_slice(&fp);
    if let Some(out) = stiffness {
        for c in 0..ND {
            for r in 0..ND {
                out[c * nt + r] = if r >= c { kuu[(r, c)] } else { kuu[(c, r)] };
            }
        }
        for m in 0..NP {
            for r in 0..ND {
                out[(ND + m) * nt + r] = kup[m][r];
                out[r * nt + ND + m] = kup[m][r];
            }
            for n in 0..NP {
                out[(ND + n) * nt + ND + m] = kpp[m][n];
            }
        }
    }
    Ok(energy)
}
