//! Trilinear hexahedron on [−1, 1]³ (VTK order: bottom face counter-clockwise,
//! then top face).

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
