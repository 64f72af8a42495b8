//! Three-node line on [−1, 1] (VTK order: ends −1, 1, then the middle 0):
//! the edges of quadratic 2-D elements.

use super::{lagrange, Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes.
pub const REFERENCE_NODES: [[f64; 3]; 3] = [[-1.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, 0.0, 0.0]];

/// Values and reference derivatives of the three functions at `xi`.
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    lagrange::tensor(xi, &REFERENCE_NODES, 1, true, n, dn);
}

/// Registry entry.
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Line3,
    domain: Domain::Line,
    corners: 2,
    reference_nodes: &REFERENCE_NODES,
    eval: eval_into,
    degree: 5,
    sides: &[&[0], &[1]],
    side_kind: None,
    edges: &[&[0, 1, 2]],
};
