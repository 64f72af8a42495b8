//! Quadratic triangle on the unit triangle (VTK order: corners, then the
//! mid-side nodes of edges 0-1, 1-2, 2-0); also the faces of tet10 elements.

use olli_mesh::shape::reference_nodes;
use olli_mesh::ElementKind;

use super::{lagrange, Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes (the mesh model's).
pub const REFERENCE_NODES: &[[f64; 3]] = reference_nodes(ElementKind::Tri6);

/// Values and reference derivatives of the six functions at `xi`.
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let (l, dl) = lagrange::barycentric(xi, 2);
    lagrange::quadratic_simplex(&l[..3], &dl[..3], &[[0, 1], [1, 2], [2, 0]], n, dn);
}

/// Registry entry. Sides list their end nodes, then the mid-side node (line3 order).
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Tri6,
    domain: Domain::Triangle,
    corners: 3,
    reference_nodes: REFERENCE_NODES,
    eval: eval_into,
    degree: 2,
    sides: ElementKind::Tri6.sides(),
    side_kind: Some(ShapeKind::Line3),
    edges: &[&[0, 1, 3], &[1, 2, 4], &[2, 0, 5]],
};
