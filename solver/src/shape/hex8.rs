//! Trilinear hexahedron on [−1, 1]³ (VTK order: bottom face counter-clockwise,
//! then top face).

use olli_mesh::ElementKind;

use super::{Domain, ShapeDef, ShapeKind};

/// Reference coordinates of the nodes.
pub const NODES: [[f64; 3]; 8] = [
    [-1.0, -1.0, -1.0],
    [1.0, -1.0, -1.0],
    [1.0, 1.0, -1.0],
    [-1.0, 1.0, -1.0],
    [-1.0, -1.0, 1.0],
    [1.0, -1.0, 1.0],
    [1.0, 1.0, 1.0],
    [-1.0, 1.0, 1.0],
];

/// Values and reference gradients of the eight shape functions.
pub fn eval(xi: [f64; 3]) -> ([f64; 8], [[f64; 3]; 8]) {
    let mut n = [0.0; 8];
    let mut d = [[0.0; 3]; 8];
    for (a, p) in NODES.iter().enumerate() {
        let f = [1.0 + p[0] * xi[0], 1.0 + p[1] * xi[1], 1.0 + p[2] * xi[2]];
        n[a] = 0.125 * f[0] * f[1] * f[2];
        d[a] = [0.125 * p[0] * f[1] * f[2], 0.125 * p[1] * f[0] * f[2], 0.125 * p[2] * f[0] * f[1]];
    }
    (n, d)
}

/// Values and reference derivatives into caller slices (the registry's signature).
pub fn eval_into(xi: [f64; 3], n: &mut [f64], dn: &mut [[f64; 3]]) {
    let (values, gradients) = eval(xi);
    n[..8].copy_from_slice(&values);
    dn[..8].copy_from_slice(&gradients);
}

/// Registry entry. Faces list their corners counter-clockwise seen from outside.
pub const SHAPE: ShapeDef = ShapeDef {
    kind: ShapeKind::Hex8,
    domain: Domain::Cube,
    corners: 8,
    reference_nodes: &NODES,
    eval: eval_into,
    degree: 3,
    sides: ElementKind::Hex8.sides(),
    side_kind: Some(ShapeKind::Quad4),
    edges: &[&[0, 1], &[1, 2], &[2, 3], &[3, 0], &[4, 5], &[5, 6], &[6, 7], &[7, 4], &[0, 4], &[1, 5], &[2, 6], &[3, 7]],
};

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn partition_of_unity_and_zero_gradient_sum() {
        let (n, d) = eval([0.3, -0.7, 0.1]);
        assert!((n.iter().sum::<f64>() - 1.0).abs() < 1e-15);
        for k in 0..3 {
            assert!(d.iter().map(|g| g[k]).sum::<f64>().abs() < 1e-15);
        }
    }
}
