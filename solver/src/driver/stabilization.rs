//! Viscous-like stabilization for parts that are not held in every direction
//! until contact closes: an O-ring lying loose between frictionless plates,
//! a seal about to roll. Each free node is tied to its position at the last
//! converged increment by a weak spring, k = factor · μ · V / h² (μ the
//! shear modulus, V the node's share of element volume, h the element size),
//! so the spring force, k Δu, vanishes as the increment's motion settles and
//! never accumulates over increments. It removes the rigid-body modes that
//! make the tangent singular and damps snap-through, at the price of a small
//! force on each moving node. Keep the factor small (1e-4 to 1e-3) and check
//! that the results do not change when it is halved: a part that travels far
//! in every increment (a loose cord carried along by a plate) feels the
//! springs most (about 5 % on the squeeze force at 1e-3, 0.5 % at 1e-4, in
//! the loose-cord test).

use crate::assembly::global::GlobalSystem;
use crate::assembly::Discretization;

/// Spring stiffness per dof for `factor` (0: none), indexed like the global dofs.
pub fn dof_weights(disc: &Discretization, factor: f64) -> Vec<f64> {
    let mesh = disc.mesh();
    let dim = disc.dim;
    // Pressure unknowns (after the displacements) get no spring.
    let mut w = vec![0.0; disc.dof_count()];
    if factor <= 0.0 {
        return w;
    }
    let thickness = match disc.model.analysis {
        crate::element::Analysis::PlaneStrain { thickness } => thickness,
        _ => 1.0,
    };
    for e in 0..mesh.element_count() {
        let nodes = mesh.element_nodes(e);
        let x: Vec<[f64; 3]> = nodes.iter().map(|&n| mesh.nodes[n]).collect();
        // Element size from its bounding box: robust and cheap, enough for a weight.
        let mut size: f64 = 0.0;
        let mut extent = [0.0f64; 3];
        for k in 0..dim {
            let (lo, hi) = x.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), p| (l.min(p[k]), h.max(p[k])));
            extent[k] = hi - lo;
            size = size.max(hi - lo);
        }
        let volume: f64 = match (dim, disc.model.analysis) {
            (3, _) => extent[0] * extent[1] * extent[2],
            (_, crate::element::Analysis::Axisymmetric) => {
                let r = x.iter().map(|p| p[0]).sum::<f64>() / x.len() as f64;
                extent[0] * extent[1] * std::f64::consts::TAU * r.abs()
            }
            _ => extent[0] * extent[1] * thickness,
        };
        if !(size > 0.0) {
            continue;
        }
        let mu = disc.model.regions[disc.region_of[e]].material.shear_modulus();
        let k = factor * mu * volume / (size * size) / nodes.len() as f64;
        for &n in nodes {
            for i in 0..dim {
                w[n * dim + i] += k;
            }
        }
    }
    w
}

/// Adds the springs `weights` (per global dof, see [`dof_weights`]) tying
/// the displacement `u` to `anchor` (the last converged one) to `system`.
pub fn add_springs(weights: &[f64], u: &[f64], anchor: &[f64], system: &mut GlobalSystem) {
    for (d, &w) in weights.iter().enumerate() {
        if w != 0.0 {
            system.add_spring(d, w, u[d] - anchor[d]);
        }
    }
}
