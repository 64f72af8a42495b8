//! Linear triangle on the unit triangle (VTK order, counter-clockwise); also
//! the faces of tet4 elements.

use olli_mesh::shape::reference_nodes;
use olli_mesh::ElementKind;

use super::{lagrange, Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes (the mesh model's).
pub const REFERENCE_NODES: &[[f64; 3]] = reference_nodes(ElementKind::Tri3);

/// Values (the barycentric coordinates) and reference derivatives at `xi`.
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let (l, dl) = lagrange::barycentric(xi, 2);
    n[..3].copy_from_slice(&l[..3]);
    dn[..3].copy_from_slice(&dl[..3]);
}

/// Registry entry. Edges in the element's counter-clockwise sense.
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Tri3,
    domain: Domain::Triangle,
    corners: 3,
    reference_nodes: REFERENCE_NODES,
    eval: eval_into,
    degree: 2,
    sides: ElementKind::Tri3.sides(),
    side_kind: Some(ShapeKind::Line2),
    edges: &[&[0, 1], &[1, 2], &[2, 0]],
};
