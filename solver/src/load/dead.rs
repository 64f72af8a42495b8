//! Dead (configuration-independent) loads as a nodal force vector: a total
//! force on a set, and a body force per unit reference volume.

use std::f64::consts::PI;

use nalgebra::Vector3;
use olli_mesh::{Mesh, Side};

use crate::assembly::Discretization;
use crate::element::geometry::point_geometry;
use crate::element::Analysis;
use crate::quadrature::{LINE2, SQUARE4};
use crate::shape::{line2, quad4};

/// Reference-area weights ∫ N_a dA of the nodes of one side (2πR·ds
/// axisymmetric, t·ds plane strain), added into `weights` by global node.
pub fn side_weights(mesh: &Mesh, analysis: Analysis, side: Side, weights: &mut [f64]) {
    let nodes = mesh.side_nodes(side);
    let x = |a: usize| Vector3::from(mesh.nodes[nodes[a]]);
    match analysis {
        Analysis::Solid3d => {
            for q in SQUARE4 {
                let (n, d) = quad4::eval(q);
                let (mut ta, mut tb) = (Vector3::zeros(), Vector3::zeros());
                for a in 0..4 {
                    ta += x(a) * d[a][0];
                    tb += x(a) * d[a][1];
                }
                let da = ta.cross(&tb).norm();
                for a in 0..4 {
                    weights[nodes[a]] += n[a] * da;
                }
            }
        }
        _ => {
            for s in LINE2 {
                let (n, d) = line2::eval(s);
                let t = x(0) * d[0] + x(1) * d[1];
                let r = x(0)[0] * n[0] + x(1)[0] * n[1];
                let scale = match analysis {
                    Analysis::Axisymmetric => 2.0 * PI * r,
                    Analysis::PlaneStrain { thickness } => thickness,
                    Analysis::Solid3d => unreachable!(),
                };
                for a in 0..2 {
                    weights[nodes[a]] += n[a] * t.norm() * scale;
                }
            }
        }
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
