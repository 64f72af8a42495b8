//! Reference geometry at the Gauss points: shape values, reference gradients
//! ∂N/∂X, and the volume weight dV (2πR·dA axisymmetric, t·dA plane strain).

use std::f64::consts::PI;

use nalgebra::{Matrix2, Matrix3, Vector2, Vector3};

use super::{Analysis, ElementError};
use crate::quadrature::{CUBE8, SQUARE4};
use crate::shape::{hex8, quad4};

/// Element shapes the solver integrates.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shape {
    Hex8,
    Quad4,
}

impl Shape {
    pub fn nodes(self) -> usize {
        match self {
            Shape::Hex8 => 8,
            Shape::Quad4 => 4,
        }
    }

    pub fn dimension(self) -> usize {
        match self {
            Shape::Hex8 => 3,
            Shape::Quad4 => 2,
        }
    }

    pub fn points(self) -> usize {
        match self {
            Shape::Hex8 => 8,
            Shape::Quad4 => 4,
        }
    }

    pub fn dofs(self) -> usize {
        self.nodes() * self.dimension()
    }
}

/// Geometry of one Gauss point (entries beyond the node count are zero).
#[derive(Debug, Clone, Copy, Default)]
pub struct PointGeometry {
    pub n: [f64; 8],
    /// ∂N_a/∂X (third entry zero in 2-D).
    pub g: [[f64; 3]; 8],
    /// Reference volume weight of the point.
    pub dv: f64,
    /// Reference radius (axisymmetric only, else 0).
    pub radius: f64,
}

/// Geometry of Gauss point `point` of an element with reference node positions `x`.
pub fn point_geometry(shape: Shape, analysis: Analysis, x: &[[f64; 3]], point: usize) -> Result<PointGeometry, ElementError> {
    let mut out = PointGeometry::default();
    match shape {
        Shape::Hex8 => {
            let (n, d) = hex8::eval(CUBE8[point]);
            let mut jac = Matrix3::zeros();
            for a in 0..8 {
                jac += Vector3::from(x[a]) * Vector3::from(d[a]).transpose();
            }
            let det = jac.determinant();
            let inv = match jac.try_inverse() {
                Some(inv) if det > 0.0 => inv,
                _ => return Err(ElementError::BadReference { point, det }),
            };
            for a in 0..8 {
                let g = inv.transpose() * Vector3::from(d[a]);
                out.g[a] = [g[0], g[1], g[2]];
            }
            out.n = n;
            out.dv = det;
        }
        Shape::Quad4 => {
            let (n, d) = quad4::eval(SQUARE4[point]);
            let mut jac = Matrix2::zeros();
            for a in 0..4 {
                jac += Vector2::new(x[a][0], x[a][1]) * Vector2::from(d[a]).transpose();
            }
            let det = jac.determinant();
            let inv = match jac.try_inverse() {
                Some(inv) if det > 0.0 => inv,
                _ => return Err(ElementError::BadReference { point, det }),
            };
            for a in 0..4 {
                let g = inv.transpose() * Vector2::from(d[a]);
                out.g[a] = [g[0], g[1], 0.0];
                out.n[a] = n[a];
            }
            out.dv = match analysis {
                Analysis::Axisymmetric => {
                    let r: f64 = (0..4).map(|a| n[a] * x[a][0]).sum();
                    out.radius = r;
                    if r <= 0.0 {
                        return Err(ElementError::BadReference { point, det: r });
                    }
                    2.0 * PI * r * det
                }
                Analysis::PlaneStrain { thickness } => thickness * det,
                Analysis::Solid3d => det,
            };
        }
    }
    Ok(out)
}
