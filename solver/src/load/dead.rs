//! Dead (configuration-independent) loads as a nodal force vector: a total
//! force on a set, and a body force per unit reference volume.

use nalgebra::Vector3;
use olli_mesh::{Mesh, Side};

use crate::assembly::Discretization;
use crate::element::geometry::point_geometry;
use crate::element::{side, Analysis};
use crate::shape::MAX_SIDE_NODES;

/// Reference-area weights ∫ N_a dA of the nodes of one side (2πR·ds
/// axisymmetric, t·ds plane strain), integrated with the side shape's own
/// functions ([`side::nodal_areas`]) and added into `weights` by global node.
/// On quadratic sides these are the consistent shares (zero at tri6 corners,
/// negative at quad8 corners), so a force spread by them is statically
/// equivalent and exact for uniform traction.
pub fn side_weights(mesh: &Mesh, analysis: Analysis, side: Side, weights: &mut [f64]) {
    let nodes = mesh.side_nodes(side);
    let x: Vec<Vector3<f64>> = nodes.iter().map(|&n| Vector3::from(mesh.nodes[n])).collect();
    let mut shares = [0.0; MAX_SIDE_NODES];
    if nodes.len() > MAX_SIDE_NODES {
        return;
    }
    side::nodal_areas(analysis, &x, &mut shares);
    for (&node, share) in nodes.iter().zip(shares) {
        weights[node] += share;
    }
}

/// Adds a total force spread uniformly over the reference area of `sides`.
pub fn add_side_force(mesh: &Mesh, analysis: Analysis, dim: usize, sides: &[Side], total: [f64; 3], f: &mut [f64]) {
    let mut w = vec![0.0; mesh.node_count()];
    for &s in sides {
        side_weights(mesh, analysis, s, &mut w);
    }
    let area: f64 = w.iter().sum();
    if area <= 0.0 {
        return;
    }
    for (n, wn) in w.iter().enumerate() {
        if *wn != 0.0 {
            for i in 0..dim {
                f[n * dim + i] += total[i] * wn / area;
            }
        }
    }
}

/// Adds a total force split equally among `nodes`.
pub fn add_node_force(dim: usize, nodes: &[usize], total: [f64; 3], f: &mut [f64]) {
    if nodes.is_empty() {
        return;
    }
    let share = 1.0 / nodes.len() as f64;
    for &n in nodes {
        for i in 0..dim {
            f[n * dim + i] += total[i] * share;
        }
    }
}

/// Adds the consistent nodal forces of a body force `b` per unit reference volume.
pub fn add_body_force(disc: &Discretization, b: [f64; 3], f: &mut [f64]) {
    let mesh = disc.mesh();
    let dim = disc.dim;
    for e in 0..mesh.element_count() {
        let nodes = mesh.element_nodes(e);
        let x: Vec<[f64; 3]> = nodes.iter().map(|&n| mesh.nodes[n]).collect();
        let shape = disc.shapes[e];
        for q in 0..shape.points() {
            // A bad reference element is reported by the first assembly.
            if let Ok(g) = point_geometry(shape, disc.model.analysis, &x, q) {
                for (a, &n) in nodes.iter().enumerate() {
                    for i in 0..dim {
                        f[n * dim + i] += g.n[a] * g.dv * b[i];
                    }
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use olli_mesh::generate::{block, rectangle, BlockParams, Order, RectangleParams};

    use super::*;

    fn set_area(mesh: &Mesh, analysis: Analysis, name: &str) -> f64 {
        let mut w = vec![0.0; mesh.node_count()];
        for &side in &mesh.side_sets[name] {
            side_weights(mesh, analysis, side, &mut w);
        }
        w.iter().sum()
    }

    /// The side weights of quadratic faces and edges add up to the exact
    /// area (flat faces; 2πR·ds is linear in R on a straight edge, so the
    /// axisymmetric areas π(r₂² − r₁²) and 2πRh are exact too).
    #[test]
    fn quadratic_side_weights_add_up_to_the_area() {
        for (order, tetrahedra) in [(Order::Quadratic, false), (Order::QuadraticFull, false), (Order::Quadratic, true)] {
            let mesh =
                block(&BlockParams { size: [2.0, 3.0, 1.0], divisions: [2, 2, 1], order, tetrahedra, ..Default::default() }).unwrap();
            let area = set_area(&mesh, Analysis::Solid3d, "top");
            assert!((area - 6.0).abs() < 1e-12, "{:?}: {area}", mesh.kinds[0]);
        }
        for (order, triangles) in [(Order::Quadratic, false), (Order::QuadraticFull, false), (Order::Quadratic, true)] {
            let p = RectangleParams { origin: [1.0, 0.0], size: [1.0, 2.0], divisions: [2, 3], order, triangles, ..Default::default() };
            let mesh = rectangle(&p).unwrap();
            let pi = std::f64::consts::PI;
            let top = set_area(&mesh, Analysis::Axisymmetric, "top");
            let right = set_area(&mesh, Analysis::Axisymmetric, "right");
            assert!((top - 3.0 * pi).abs() < 1e-12 && (right - 8.0 * pi).abs() < 1e-12, "{:?}: {top} {right}", mesh.kinds[0]);
        }
    }
}
