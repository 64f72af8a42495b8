//! One-dimensional Lagrange factors and the quadratic simplex construction
//! that several shapes are built from.

/// Value and derivative at `x` of the linear Lagrange function on the nodes
/// −1, 1 that is one at `at` (±1).
pub fn linear(x: f64, at: f64) -> (f64, f64) {
    (0.5 * (1.0 + at * x), 0.5 * at)
}

/// Value and derivative at `x` of the quadratic Lagrange function on the
/// nodes −1, 0, 1 that is one at `at`.
pub fn quadratic(x: f64, at: f64) -> (f64, f64) {
    if at == 0.0 {
        (1.0 - x * x, -2.0 * x)
    } else {
        (0.5 * x * (x + at), x + 0.5 * at)
    }
}

/// Tensor-product Lagrange functions of the nodes `nodes` (coordinates −1, 0
/// or 1 in each of the first `dim` directions), quadratic or linear in each.
pub fn tensor(xi: [f64; 3], nodes: &[[f64; 3]], dim: usize, quadratic_factors: bool, n: &mut [f64], dn: &mut [[f64; 3]]) {
    let factor = if quadratic_factors { quadratic } else { linear };
    for (a, p) in nodes.iter().enumerate() {
        let mut f = [(1.0, 0.0); 3];
        for c in 0..dim {
            f[c] = factor(xi[c], p[c]);
        }
        n[a] = f[0].0 * f[1].0 * f[2].0;
        dn[a] = [f[0].1 * f[1].0 * f[2].0, f[0].0 * f[1].1 * f[2].0, f[0].0 * f[1].0 * f[2].1];
    }
}

/// Barycentric coordinates of a point of the unit triangle (`dim` = 2) or
/// tetrahedron (`dim` = 3) and their constant reference gradients.
pub fn barycentric(xi: [f64; 3], dim: usize) -> ([f64; 4], [[f64; 3]; 4]) {
    let mut l = [0.0; 4];
    let mut dl = [[0.0; 3]; 4];
    l[0] = 1.0 - xi[..dim].iter().sum::<f64>();
    for c in 0..dim {
        l[c + 1] = xi[c];
        dl[0][c] = -1.0;
        dl[c + 1][c] = 1.0;
    }
    (l, dl)
}

/// Quadratic simplex functions: λᵢ(2λᵢ − 1) at the corners, then 4λₐλ_b for
/// each edge (a, b) in `edges` order.
pub fn quadratic_simplex(l: &[f64], dl: &[[f64; 3]], edges: &[[usize; 2]], n: &mut [f64], dn: &mut [[f64; 3]]) {
    for i in 0..l.len() {
        n[i] = l[i] * (2.0 * l[i] - 1.0);
        dn[i] = dl[i].map(|d| (4.0 * l[i] - 1.0) * d);
    }
    for (k, &[a, b]) in edges.iter().enumerate() {
        n[l.len() + k] = 4.0 * l[a] * l[b];
        dn[l.len() + k] = std::array::from_fn(|c| 4.0 * (dl[a][c] * l[b] + l[a] * dl[b][c]));
    }
}
