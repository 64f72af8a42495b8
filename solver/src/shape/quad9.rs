//! Nine-node Lagrange quadrilateral on [−1, 1]² (VTK order: corners, mid-side
//! nodes of edges 0-1, 1-2, 2-3, 3-0, then the centre); also the faces of
//! hex27 elements.

use olli_mesh::shape::reference_nodes;
use olli_mesh::ElementKind;

use super::{lagrange, Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes (the mesh model's).
pub const REFERENCE_NODES: &[[f64; 3]] = reference_nodes(ElementKind::Quad9);

/// Values and reference derivatives: products of 1-D quadratic Lagrange functions.
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    lagrange::tensor(xi, REFERENCE_NODES, 2, true, n, dn);
}

/// Registry entry. Sides list their end nodes, then the mid-side node (line3 order).
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Quad9,
    domain: Domain::Square,
    corners: 4,
    reference_nodes: REFERENCE_NODES,
    eval: eval_into,
    degree: 5,
    sides: ElementKind::Quad9.sides(),
    side_kind: Some(ShapeKind::Line3),
    edges: &[&[0, 1, 4], &[1, 2, 5], &[2, 3, 6], &[3, 0, 7]],
};
