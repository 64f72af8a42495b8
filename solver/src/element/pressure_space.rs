//! The element's discontinuous pressure (and dilatation) space of the mixed
//! u–p elements, and the element-level L² projection that condenses it.
//!
//! Following Simo, Taylor & Pister (1985, CMAME 51:177–208), the pressure p
//! and the dilatation θ of a mixed element live in the same space Q_e of
//! polynomials per element, with no continuity between elements, so both are
//! eliminated element by element. With basis functions φ_k of Q_e, the Gram
//! matrix `M = ∫ φ φᵀ dV`, and the volume ratio J at the integration points:
//!
//! ```text
//! θ_h = φ · θ,   θ = M⁻¹ ∫ φ J dV           (θ_h: L² projection of J)
//! p_h = φ · p,   p = M⁻¹ ∫ φ U'(θ_h) dV     (p_h: L² projection of U'(θ_h))
//! f   = ∫ Bᵀ (P_iso + p_h J F⁻ᵀ) dV
//! K   = ∫ Bᵀ (A_iso + p_h ∂(J F⁻ᵀ)/∂F) B dV + Σ_kl C_kl g_k g_lᵀ
//! g_k = ∫ φ_k Bᵀ J F⁻ᵀ dV,   C = M⁻¹ (∫ U''(θ_h) φ φᵀ dV) M⁻¹
//! ```
//!
//! which is the exact derivative of the condensed energy
//! `∫ W_iso dV + ∫ U(θ_h) dV`. With Q_e the constants this is the
//! mean-dilatation Q1/P0 element (M = V, C = U''/V). The linear space is
//! spanned by 1 and the reference coordinates X − X_c (centred and scaled by
//! the element size for conditioning); using the physical rather than the
//! mapped reference coordinates keeps Q2/P1 optimal on distorted meshes
//! (Boffi, Brezzi & Fortin 2013, Mixed Finite Element Methods and
//! Applications, §8.6.3).

use nalgebra::{Matrix4, Vector4};

use crate::shape::ShapeKind;

/// Largest pressure-space dimension (linear in 3-D: 1, X, Y, Z).
pub const MAX_PRESSURES: usize = 4;

/// Pressure interpolation of a mixed element, discontinuous between elements.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PressureSpace {
    /// One constant per element (P0).
    Constant,
    /// Linear in the reference coordinates (P1 discontinuous): 3 values per
    /// element in 2-D, 4 in 3-D.
    Linear,
}

impl PressureSpace {
    /// The pressure space of the mixed element of `shape`. Linear
    /// discontinuous for the Lagrange quad9 and hex27 (Q2/P1, textbook
    /// stable: Boffi, Brezzi & Fortin 2013, §8.6.3); constant for the rest:
    /// Q1/P0 for quad4 and hex8 (Simo, Taylor & Pister 1985), P2/P0 for tri6
    /// (stable in 2-D, ibid. §8.4) and tet10, and Q2'/P0 for the serendipity
    /// quad8 and hex20, which lose stability with a linear pressure (the
    /// numerical inf-sup tests in `tests/tests/inf_sup.rs` show both).
    pub fn of_shape(shape: ShapeKind) -> PressureSpace {
        match shape {
            ShapeKind::Quad9 | ShapeKind::Hex27 => PressureSpace::Linear,
            _ => PressureSpace::Constant,
        }
    }

    /// Number of basis functions in `dim` dimensions.
    pub fn count(self, dim: usize) -> usize {
        match self {
            PressureSpace::Constant => 1,
            PressureSpace::Linear => dim + 1,
        }
    }
}

/// The basis of one element's pressure space: centre and size of the
/// element in the reference configuration.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PressureBasis {
    /// Which pressure field the element carries.
    pub space: PressureSpace,
    /// Spatial dimension, 2 or 3.
    pub dim: usize,
    center: [f64; 3],
    inverse_size: f64,
}

impl PressureBasis {
    /// The basis of an element with reference node positions `x` (the
    /// centre is the mean of the nodes, the size their largest distance from it).
    pub fn new(space: PressureSpace, dim: usize, x: &[[f64; 3]]) -> PressureBasis {
        let n = x.len().max(1) as f64;
        let center: [f64; 3] = std::array::from_fn(|c| x.iter().map(|p| p[c]).sum::<f64>() / n);
        let size = x.iter().map(|p| (0..3).map(|c| (p[c] - center[c]).powi(2)).sum::<f64>().sqrt()).fold(0.0, f64::max);
        PressureBasis { space, dim, center, inverse_size: if size > 0.0 { 1.0 / size } else { 1.0 } }
    }

    /// Number of basis functions.
    pub fn count(&self) -> usize {
        self.space.count(self.dim)
    }

    /// Basis values at reference position `x` (entries beyond `count` zero).
    pub fn values(&self, x: [f64; 3]) -> Vector4<f64> {
        let mut phi = Vector4::zeros();
        phi[0] = 1.0;
        if self.space == PressureSpace::Linear {
            for c in 0..self.dim {
                phi[c + 1] = (x[c] - self.center[c]) * self.inverse_size;
            }
        }
        phi
    }
}

/// Accumulates `∫ φ φᵀ w dV`-type sums over the integration points of one
/// element and solves with the Gram matrix. Unused rows and columns (beyond
/// the basis count) hold an identity block so the 4×4 algebra stays regular.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Gram {
    count: usize,
    inverse: Matrix4<f64>,
}

/// Error: the Gram matrix is singular (a degenerate element).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SingularGram;

impl Gram {
    /// The Gram matrix `M = Σ_q φ_q φ_qᵀ dV_q` from basis values and volume weights.
    pub fn new(count: usize, phi: &[Vector4<f64>], dv: &[f64]) -> Result<Gram, SingularGram> {
        let mut m = weighted_outer(count, phi, dv);
        for k in count..MAX_PRESSURES {
            m[(k, k)] = 1.0;
        }
        let inverse = m.try_inverse().ok_or(SingularGram)?;
        if !inverse.iter().all(|v| v.is_finite()) {
            return Err(SingularGram);
        }
        Ok(Gram { count, inverse })
    }

    /// Coefficients of the L² projection of the point values `f_q`: `M⁻¹ Σ φ_q f_q dV_q`.
    pub fn project(&self, phi: &[Vector4<f64>], dv: &[f64], f: impl Fn(usize) -> f64) -> Vector4<f64> {
        let mut rhs = Vector4::zeros();
        for (q, (p, &w)) in phi.iter().zip(dv).enumerate() {
            rhs += p * (f(q) * w);
        }
        self.mask(self.inverse * rhs)
    }

    /// `M⁻¹ (Σ_q φ_q φ_qᵀ h_q dV_q) M⁻¹` for point values `h_q`.
    pub fn sandwich(&self, phi: &[Vector4<f64>], dv: &[f64], h: impl Fn(usize) -> f64) -> Matrix4<f64> {
        let weights: Vec<f64> = dv.iter().enumerate().map(|(q, &w)| w * h(q)).collect();
        let inner = weighted_outer(self.count, phi, &weights);
        let mut c = self.inverse * inner * self.inverse;
        for k in self.count..MAX_PRESSURES {
            for l in 0..MAX_PRESSURES {
                c[(k, l)] = 0.0;
                c[(l, k)] = 0.0;
            }
        }
        c
    }

    fn mask(&self, mut v: Vector4<f64>) -> Vector4<f64> {
        for k in self.count..MAX_PRESSURES {
            v[k] = 0.0;
        }
        v
    }
}

fn weighted_outer(count: usize, phi: &[Vector4<f64>], w: &[f64]) -> Matrix4<f64> {
    let mut m = Matrix4::zeros();
    for (p, &wq) in phi.iter().zip(w) {
        for k in 0..count {
            for l in 0..count {
                m[(k, l)] += p[k] * p[l] * wq;
            }
        }
    }
    m
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::shape::ShapeKind;

    /// Basis, point positions, basis values and volume weights.
    type Points = (PressureBasis, Vec<[f64; 3]>, Vec<Vector4<f64>>, Vec<f64>);

    /// Points, weights and basis values of a distorted quad9 (2-D) under its rule.
    fn quad9_points() -> Points {
        let shape = ShapeKind::Quad9;
        let def = shape.def();
        let x: Vec<[f64; 3]> =
            def.reference_nodes.iter().map(|p| [2.0 + p[0] + 0.2 * p[1] * p[1], 1.0 + 0.8 * p[1] + 0.1 * p[0], 0.0]).collect();
        let table = shape.table();
        let basis = PressureBasis::new(PressureSpace::Linear, 2, &x);
        let (mut pos, mut phi, mut dv) = (Vec::new(), Vec::new(), Vec::new());
        for q in 0..table.len() {
            let (n, d) = (table.values(q), table.derivatives(q));
            let xq: [f64; 3] = std::array::from_fn(|c| (0..9).map(|a| n[a] * x[a][c]).sum());
            let j: [[f64; 2]; 2] = std::array::from_fn(|r| std::array::from_fn(|c| (0..9).map(|a| d[a][c] * x[a][r]).sum()));
            pos.push(xq);
            phi.push(basis.values(xq));
            dv.push(table.weights[q] * (j[0][0] * j[1][1] - j[0][1] * j[1][0]));
        }
        (basis, pos, phi, dv)
    }

    /// A linear field is its own L² projection onto the linear space, and a
    /// constant one onto the constants; the projection of a general field
    /// onto the constants is its mean (mean dilatation).
    #[test]
    fn projection_reproduces_its_space_and_the_mean() {
        let (basis, pos, phi, dv) = quad9_points();
        let gram = Gram::new(basis.count(), &phi, &dv).unwrap();
        let field = |x: [f64; 3]| 1.3 - 0.4 * x[0] + 0.7 * x[1];
        let coef = gram.project(&phi, &dv, |q| field(pos[q]));
        for (q, p) in phi.iter().enumerate() {
            assert!((coef.dot(p) - field(pos[q])).abs() < 1e-12);
        }
        let constant = PressureBasis { space: PressureSpace::Constant, ..basis };
        let phi0: Vec<_> = pos.iter().map(|&x| constant.values(x)).collect();
        let gram0 = Gram::new(1, &phi0, &dv).unwrap();
        let curved = |x: [f64; 3]| (x[0] * x[1]).sin();
        let mean = pos.iter().zip(&dv).map(|(&x, w)| curved(x) * w).sum::<f64>() / dv.iter().sum::<f64>();
        let c0 = gram0.project(&phi0, &dv, |q| curved(pos[q]));
        assert!((c0[0] - mean).abs() < 1e-14 && c0.rows(1, 3).iter().all(|v| *v == 0.0));
    }

    /// For the constants, the sandwich is U''/V, as in the mean-dilatation
    /// tangent; for the linear space it is symmetric.
    #[test]
    fn sandwich_reduces_to_mean_dilatation_and_is_symmetric() {
        let (basis, pos, phi, dv) = quad9_points();
        let volume: f64 = dv.iter().sum();
        let constant = PressureBasis { space: PressureSpace::Constant, ..basis };
        let phi0: Vec<_> = pos.iter().map(|&x| constant.values(x)).collect();
        let c0 = Gram::new(1, &phi0, &dv).unwrap().sandwich(&phi0, &dv, |_| 7.0);
        assert!((c0[(0, 0)] - 7.0 / volume).abs() < 1e-12);
        let c = Gram::new(3, &phi, &dv).unwrap().sandwich(&phi, &dv, |q| 1.0 + pos[q][0]);
        assert!((c - c.transpose()).norm() < 1e-12 * c.norm());
        assert!(c.row(3).iter().all(|v| *v == 0.0));
    }

    #[test]
    fn a_degenerate_element_is_reported() {
        let phi = vec![Vector4::new(1.0, 0.0, 0.0, 0.0); 4];
        assert_eq!(Gram::new(2, &phi, &[1.0; 4]), Err(SingularGram));
    }
}
