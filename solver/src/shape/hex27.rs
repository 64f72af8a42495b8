//! Twenty-seven-node Lagrange hexahedron on [−1, 1]³ (VTK order: corners,
//! mid-edge nodes, face centres x-min, x-max, y-min, y-max, z-min, z-max,
//! then the body centre).

use olli_mesh::shape::reference_nodes;
use olli_mesh::ElementKind;

use super::{lagrange, Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes (the mesh model's).
pub const REFERENCE_NODES: &[[f64; 3]] = reference_nodes(ElementKind::Hex27);

/// Values and reference derivatives: products of 1-D quadratic Lagrange functions.
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    lagrange::tensor(xi, REFERENCE_NODES, 3, true, n, dn);
}

/// Mid-edge table shared with hex20: end corners, then the mid-edge node.
pub const EDGES: &[&[usize]] = &[
    &[0, 1, 8],
    &[1, 2, 9],
    &[2, 3, 10],
    &[3, 0, 11],
    &[4, 5, 12],
    &[5, 6, 13],
    &[6, 7, 14],
    &[7, 4, 15],
    &[0, 4, 16],
    &[1, 5, 17],
    &[2, 6, 18],
    &[3, 7, 19],
];

/// Registry entry. Faces list their corners counter-clockwise seen from
/// outside, their mid-edge nodes, then the face centre (quad9 order).
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Hex27,
    domain: Domain::Cube,
    corners: 8,
    reference_nodes: REFERENCE_NODES,
    eval: eval_into,
    degree: 5,
    sides: ElementKind::Hex27.sides(),
    side_kind: Some(ShapeKind::Quad9),
    edges: EDGES,
};
