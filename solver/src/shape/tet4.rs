//! Linear tetrahedron on the unit tetrahedron (VTK order: base triangle
//! 0-1-2 counter-clockwise seen from the apex 3).

use olli_mesh::shape::reference_nodes;
use olli_mesh::ElementKind;

use super::{lagrange, Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes (the mesh model's).
pub const REFERENCE_NODES: &[[f64; 3]] = reference_nodes(ElementKind::Tet4);

/// Values (the barycentric coordinates) and reference derivatives at `xi`.
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let (l, dl) = lagrange::barycentric(xi, 3);
    n[..4].copy_from_slice(&l);
    dn[..4].copy_from_slice(&dl);
}

/// Registry entry. Faces counter-clockwise seen from outside.
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Tet4,
    domain: Domain::Tetrahedron,
    corners: 4,
    reference_nodes: REFERENCE_NODES,
    eval: eval_into,
    degree: 2,
    sides: ElementKind::Tet4.sides(),
    side_kind: Some(ShapeKind::Tri3),
    edges: &[&[0, 1], &[1, 2], &[2, 0], &[0, 3], &[1, 3], &[2, 3]],
};
