//! Two-node line on [−1, 1]: the edges of quad4 elements.

use super::{Domain, ShapeDef, ShapeKind};

/// Values and d/ds of the two shape functions at `s`.
pub fn eval(s: f64) -> ([f64; 2], [f64; 2]) {
    ([0.5 * (1.0 - s), 0.5 * (1.0 + s)], [-0.5, 0.5])
}

/// Reference coordinates of the nodes as 3-D points (the registry's form).
pub const REFERENCE_NODES: [[f64; 3]; 2] = [[-1.0, 0.0, 0.0], [1.0, 0.0, 0.0]];

/// Values and reference derivatives into caller slices (the registry's signature).
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let (values, derivatives) = eval(xi[0]);
    n[..2].copy_from_slice(&values);
    dn[0] = [derivatives[0], 0.0, 0.0];
    dn[1] = [derivatives[1], 0.0, 0.0];
}

/// Registry entry.
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Line2,
    domain: Domain::Line,
    corners: 2,
    reference_nodes: &REFERENCE_NODES,
    eval: eval_into,
    degree: 3,
    sides: &[&[0], &[1]],
    side_kind: None,
    edges: &[&[0, 1]],
};
