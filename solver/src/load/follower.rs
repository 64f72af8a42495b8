//! Follower pressure on a set of element sides, added to a Newton
//! evaluation's global system: the force of every side
//! ([`super::pressure::pressure_side_into`]) and its full load stiffness
//! (the tangent is `K_int − ∂f_ext/∂u`). The skew part goes to the skew
//! entries: on a surface whose edge is free (a pressed top face) it keeps
//! Newton quadratic; on a closed or edge-held surface the sides' skew parts
//! cancel ([`crate::assembly::global::consolidate_skew`] drops them) and the
//! symmetric (Cholesky) path applies.

use olli_mesh::{Mesh, Side};

use super::pressure::{pressure_side_into, MAX_SIDE_DOFS};
use crate::assembly::global::GlobalSystem;
use crate::element::Analysis;
use crate::shape::MAX_SIDE_NODES;

/// Adds pressure `p` (positive pushing on the surface) on `sides` at the
/// displacement `u` (global, `dim` per node) to `system`.
pub fn add_pressure(mesh: &Mesh, analysis: Analysis, sides: &[Side], p: f64, u: &[f64], system: &mut GlobalSystem) {
    if p == 0.0 {
        return;
    }
    let dim = system.dofs.dim;
    let want_k = system.wants_stiffness();
    let mut fs = [0.0; MAX_SIDE_DOFS];
    let mut ks = [0.0; MAX_SIDE_DOFS * MAX_SIDE_DOFS];
    for &side in sides {
        // Side nodes without allocating (all nodes of the side, in the side shape's order).
        let local = mesh.kinds[side.element].sides()[side.local as usize];
        let enodes = mesh.element_nodes(side.element);
        let nn = local.len();
        let (mut x, mut us) = ([[0.0; 3]; MAX_SIDE_NODES], [[0.0; 3]; MAX_SIDE_NODES]);
        let mut gdofs = [0usize; MAX_SIDE_DOFS];
        for a in 0..nn {
            let node = enodes[local[a]];
            x[a] = mesh.nodes[node];
            for i in 0..dim {
                us[a][i] = u[node * dim + i];
                gdofs[a * dim + i] = node * dim + i;
            }
        }
        let nd = nn * dim;
        pressure_side_into(analysis, &x[..nn], &us[..nn], p, &mut fs, if want_k { Some(&mut ks) } else { None });
        system.add_force(&gdofs[..nd], &fs[..nd]);
        if want_k {
            // The tangent holds −∂f/∂u.
            ks[..nd * nd].iter_mut().for_each(|v| *v = -*v);
            system.add_stiffness(&gdofs[..nd], &ks[..nd * nd], true);
        }
    }
}
