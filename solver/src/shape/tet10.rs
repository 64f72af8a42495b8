//! Quadratic tetrahedron on the unit tetrahedron (VTK order: corners, then
//! the mid-edge nodes of edges 0-1, 1-2, 2-0, 0-3, 1-3, 2-3): the element
//! general-purpose meshers produce for solid parts.

use olli_mesh::shape::reference_nodes;
use olli_mesh::ElementKind;

use super::{lagrange, Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes (the mesh model's).
pub const REFERENCE_NODES: &[[f64; 3]] = reference_nodes(ElementKind::Tet10);

/// Values and reference derivatives of the ten functions at `xi`.
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let (l, dl) = lagrange::barycentric(xi, 3);
    lagrange::quadratic_simplex(&l, &dl, &[[0, 1], [1, 2], [2, 0], [0, 3], [1, 3], [2, 3]], n, dn);
}

/// Registry entry. Faces list their corners counter-clockwise seen from
/// outside, then their mid-edge nodes (tri6 order).
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Tet10,
    domain: Domain::Tetrahedron,
    corners: 4,
    reference_nodes: REFERENCE_NODES,
    eval: eval_into,
    degree: 2,
    sides: ElementKind::Tet10.sides(),
    side_kind: Some(ShapeKind::Tri6),
    edges: &[&[0, 1, 4], &[1, 2, 5], &[2, 0, 6], &[0, 3, 7], &[1, 3, 8], &[2, 3, 9]],
};
