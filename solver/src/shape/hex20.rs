//! Twenty-node serendipity hexahedron on [−1, 1]³ (VTK order: corners, then
//! the mid-edge nodes of the bottom face, the top face and the vertical edges).

use olli_mesh::shape::reference_nodes;
use olli_mesh::ElementKind;

use super::{hex27, Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes (the mesh model's).
pub const REFERENCE_NODES: &[[f64; 3]] = reference_nodes(ElementKind::Hex20);

/// Values and reference derivatives of the twenty serendipity functions
/// (Zienkiewicz & Taylor, The Finite Element Method, vol. 1, §8.8).
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let [x, y, z] = xi;
    for (a, p) in REFERENCE_NODES.iter().enumerate() {
        let (u, v, w) = (1.0 + p[0] * x, 1.0 + p[1] * y, 1.0 + p[2] * z);
        if a < 8 {
            let s = p[0] * x + p[1] * y + p[2] * z - 2.0;
            n[a] = 0.125 * u * v * w * s;
            dn[a] = [0.125 * p[0] * v * w * (s + u), 0.125 * p[1] * u * w * (s + v), 0.125 * p[2] * u * v * (s + w)];
        } else if p[0] == 0.0 {
            n[a] = 0.25 * (1.0 - x * x) * v * w;
            dn[a] = [-0.5 * x * v * w, 0.25 * p[1] * (1.0 - x * x) * w, 0.25 * p[2] * (1.0 - x * x) * v];
        } else if p[1] == 0.0 {
            n[a] = 0.25 * u * (1.0 - y * y) * w;
            dn[a] = [0.25 * p[0] * (1.0 - y * y) * w, -0.5 * y * u * w, 0.25 * p[2] * u * (1.0 - y * y)];
        } else {
            n[a] = 0.25 * u * v * (1.0 - z * z);
            dn[a] = [0.25 * p[0] * v * (1.0 - z * z), 0.25 * p[1] * u * (1.0 - z * z), -0.5 * z * u * v];
        }
    }
}

/// Registry entry. Faces list their corners counter-clockwise seen from
/// outside, then their mid-edge nodes (quad8 order).
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Hex20,
    domain: Domain::Cube,
    corners: 8,
    reference_nodes: REFERENCE_NODES,
    eval: eval_into,
    degree: 5,
    sides: ElementKind::Hex20.sides(),
    side_kind: Some(ShapeKind::Quad8),
    edges: hex27::EDGES,
};
