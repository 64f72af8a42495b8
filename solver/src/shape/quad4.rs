//! Bilinear quadrilateral on [−1, 1]²; also the faces of hex8 elements.

use olli_mesh::ElementKind;

use super::{Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes, counter-clockwise (VTK order).
pub const NODES: [[f64; 2]; 4] = [[-1.0, -1.0], [1.0, -1.0], [1.0, 1.0], [-1.0, 1.0]];

/// Values and reference gradients (∂/∂ξ, ∂/∂η) of the four shape functions.
pub fn eval(xi: [f64; 2]) -> ([f64; 4], [[f64; 2]; 4]) {
    let mut n = [0.0; 4];
    let mut d = [[0.0; 2]; 4];
    for (a, p) in NODES.iter().enumerate() {
        let (u, v) = (1.0 + p[0] * xi[0], 1.0 + p[1] * xi[1]);
        n[a] = 0.25 * u * v;
        d[a] = [0.25 * p[0] * v, 0.25 * p[1] * u];
    }
    (n, d)
}

/// Reference coordinates of the nodes as 3-D points (the registry's form).
pub const REFERENCE_NODES: &[[f64; 3]] = olli_mesh::shape::reference_nodes(ElementKind::Quad4);

/// Values and reference derivatives into caller slices (the registry's signature).
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let (values, gradients) = eval([xi[0], xi[1]]);
    n[..4].copy_from_slice(&values);
    for a in 0..4 {
        dn[a] = [gradients[a][0], gradients[a][1], 0.0];
    }
}

/// Registry entry. Sides in the element's counter-clockwise sense.
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Quad4,
    domain: Domain::Square,
    corners: 4,
    reference_nodes: REFERENCE_NODES,
    eval: eval_into,
    degree: 3,
    sides: ElementKind::Quad4.sides(),
    side_kind: Some(ShapeKind::Line2),
    edges: &[&[0, 1], &[1, 2], &[2, 3], &[3, 0]],
};
