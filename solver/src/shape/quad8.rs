//! Eight-node serendipity quadrilateral on [−1, 1]² (VTK order: corners
//! counter-clockwise, then the mid-side nodes of edges 0-1, 1-2, 2-3, 3-0);
//! also the faces of hex20 elements.

use olli_mesh::shape::reference_nodes;
use olli_mesh::ElementKind;

use super::{Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes (the mesh model's).
pub const REFERENCE_NODES: &[[f64; 3]] = reference_nodes(ElementKind::Quad8);

/// Values and reference derivatives of the eight serendipity functions
/// (Zienkiewicz & Taylor, The Finite Element Method, vol. 1, §8.7).
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let [x, y, _] = xi;
    for (a, p) in REFERENCE_NODES.iter().enumerate() {
        let (u, v) = (1.0 + p[0] * x, 1.0 + p[1] * y);
        if a < 4 {
            let s = p[0] * x + p[1] * y - 1.0;
            n[a] = 0.25 * u * v * s;
            dn[a] = [0.25 * p[0] * v * (s + u), 0.25 * p[1] * u * (s + v), 0.0];
        } else if p[0] == 0.0 {
            n[a] = 0.5 * (1.0 - x * x) * v;
            dn[a] = [-x * v, 0.5 * p[1] * (1.0 - x * x), 0.0];
        } else {
            n[a] = 0.5 * u * (1.0 - y * y);
            dn[a] = [0.5 * p[0] * (1.0 - y * y), -y * u, 0.0];
        }
    }
}

/// Registry entry. Sides list their end nodes, then the mid-side node (line3 order).
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Quad8,
    domain: Domain::Square,
    corners: 4,
    reference_nodes: REFERENCE_NODES,
    eval: eval_into,
    degree: 5,
    sides: ElementKind::Quad8.sides(),
    side_kind: Some(ShapeKind::Line3),
    edges: &[&[0, 1, 4], &[1, 2, 5], &[2, 3, 6], &[3, 0, 7]],
};
