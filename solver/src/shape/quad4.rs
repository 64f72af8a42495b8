//! Bilinear quadrilateral on [−1, 1]²; also the faces of hex8 elements.

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
