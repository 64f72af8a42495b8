//! Reference geometry at the integration points of any registered shape:
//! shape values, reference gradients ∂N/∂X, and the volume weight dV
//! (quadrature weight × det J, times 2πR axisymmetric or t plane strain).

use std::f64::consts::PI;

use nalgebra::{Matrix3, Vector3};

use super::{Analysis, ElementError};
use crate::shape::{ShapeKind, MAX_NODES};

/// Element shapes the solver integrates: any registered shape of dimension
/// 2 or 3 (the registry in [`crate::shape`]).
pub type Shape = ShapeKind;

/// Geometry of one integration point (from [`point_geometry`], entries
/// beyond the node count are zero).
#[derive(Debug, Clone, Copy)]
pub struct PointGeometry {
    /// Shape function values N_a at the point.
    pub n: [f64; MAX_NODES],
    /// ∂N_a/∂X (third entry zero in 2-D).
    pub g: [[f64; 3]; MAX_NODES],
    /// Reference volume weight of the point.
    pub dv: f64,
    /// Reference radius (axisymmetric only, else 0).
    pub radius: f64,
}

impl Default for PointGeometry {
    fn default() -> Self {
        PointGeometry { n: [0.0; MAX_NODES], g: [[0.0; 3]; MAX_NODES], dv: 0.0, radius: 0.0 }
    }
}

/// Geometry of integration point `point` of the shape's rule for an element
/// with reference node positions `x`.
pub fn point_geometry(shape: ShapeKind, analysis: Analysis, x: &[[f64; 3]], point: usize) -> Result<PointGeometry, ElementError> {
    let mut out = PointGeometry::default();
    point_geometry_into(shape, analysis, x, point, &mut out)?;
    Ok(out)
}

/// [`point_geometry`] written in place: only the entries of the shape's
/// nodes are written (the others keep what `out` held), so a reused buffer
/// costs no copy of the largest element's arrays.
pub fn point_geometry_into(
    shape: ShapeKind,
    analysis: Analysis,
    x: &[[f64; 3]],
    point: usize,
    out: &mut PointGeometry,
) -> Result<(), ElementError> {
    let table = shape.table();
    let (n, d) = (table.values(point), table.derivatives(point));
    let nodes = n.len();
    out.n[..nodes].copy_from_slice(n);
    // One 3×3 Jacobian for both dimensions: a 2-D shape's third row and
    // column are the identity, so its determinant and inverse are the 2×2 ones.
    let planar = shape.dimension() == 2;
    let mut jac = if planar { Matrix3::from_diagonal(&Vector3::new(0.0, 0.0, 1.0)) } else { Matrix3::zeros() };
    for a in 0..nodes {
        let xa = if planar { Vector3::new(x[a][0], x[a][1], 0.0) } else { Vector3::from(x[a]) };
        let da = if planar { Vector3::new(d[a][0], d[a][1], 0.0) } else { Vector3::from(d[a]) };
        jac += xa * da.transpose();
    }
    let det = jac.determinant();
    let inv = match jac.try_inverse() {
        Some(inv) if det > 0.0 => inv,
        _ => return Err(ElementError::BadReference { point, det }),
    };
    for a in 0..nodes {
        let da = if planar { Vector3::new(d[a][0], d[a][1], 0.0) } else { Vector3::from(d[a]) };
        let g = inv.transpose() * da;
        out.g[a] = [g[0], g[1], g[2]];
    }
    let w = table.weights[point] * det;
    out.dv = match analysis {
        Analysis::Axisymmetric => {
            let r: f64 = (0..nodes).map(|a| n[a] * x[a][0]).sum();
            out.radius = r;
            if r <= 0.0 {
                return Err(ElementError::BadReference { point, det: r });
            }
            2.0 * PI * r * w
        }
        Analysis::PlaneStrain { thickness } => {
            out.radius = 0.0;
            thickness * w
        }
        Analysis::Solid3d => {
            out.radius = 0.0;
            w
        }
    };
    Ok(())
}

/// Reference gradients of every point of an element with reference node
/// positions `x` (`grads[q · nodes + a]`) and the points' volume weights
/// (`dv[q]`), what the spatial forms keep per element: ∂N_a/∂X in 3-D;
/// `[∂N_a/∂X, ∂N_a/∂Y, N_a/R]` in 2-D, the hoop term of an axisymmetric
/// element third (zero in plane strain).
pub fn reference_geometry_into(
    shape: ShapeKind,
    analysis: Analysis,
    x: &[[f64; 3]],
    grads: &mut [[f64; 3]],
    dv: &mut [f64],
) -> Result<(), ElementError> {
    let nodes = shape.nodes();
    let hoop = analysis == Analysis::Axisymmetric;
    let mut geo = PointGeometry::default();
    for q in 0..shape.points() {
        point_geometry_into(shape, analysis, x, q, &mut geo)?;
        for (a, out) in grads[q * nodes..(q + 1) * nodes].iter_mut().enumerate() {
            let g = geo.g[a];
            *out = if hoop { [g[0], g[1], geo.n[a] / geo.radius] } else { g };
        }
        dv[q] = geo.dv;
    }
    Ok(())
}
