//! Structured generators for the part families of rubber engineering.
//!
//! Every generator maps one or more logically rectangular blocks (patches)
//! onto the part, builds them independently and stitches them by merging
//! coincident nodes. Quadratic nodes are placed by the same mapping at the
//! mid-parameters, so curved boundaries (circles) are followed exactly at
//! every node and quadratic meshes converge faster than linear ones.
//!
//! Each generator returns a mesh with the element set `all` and names its
//! natural boundaries twice, as a side set and as a node set of the same name.

mod annulus;
mod block;
mod cord;
mod extrude;
mod rectangle;
mod tets;

pub use annulus::{annulus, hollow_cylinder, AnnulusParams};
pub use block::{block, BlockParams};
pub use cord::{cord, disc, solid_cylinder, CircleParams};
pub use extrude::{extrude, sweep};
pub use rectangle::{rectangle, RectangleParams};

use crate::cleanup::merge_duplicate_nodes;
use crate::element::ElementKind;
use crate::error::MeshError;
use crate::model::{Mesh, Side};

/// Polynomial order of generated elements.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Deserialize, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Order {
    /// quad4 / tri3 / hex8 / wedge6.
    #[default]
    Linear,
    /// Serendipity quad8 / hex20 (and tri6; triangles are extruded only when linear).
    Quadratic,
    /// Full Lagrange quad9 / hex27 (and tri6).
    QuadraticFull,
}

impl Order {
    /// Nodes per element edge minus one: 1 for linear, 2 for quadratic.
    pub(crate) fn steps(self) -> usize {
        if self == Order::Linear {
            1
        } else {
            2
        }
    }
}

/// One face of a rectangle or block, for grading.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Deserialize, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Face {
    /// The face at minimum x.
    Left,
    /// The face at maximum x.
    Right,
    /// The face at minimum y of a block (3-D only).
    Front,
    /// The face at maximum y of a block (3-D only).
    Back,
    /// The face at minimum y of a rectangle, minimum z of a block.
    Bottom,
    /// The face at maximum y of a rectangle, maximum z of a block.
    Top,
}

/// Geometric grading of element sizes toward one face.
#[derive(Debug, Clone, Copy, PartialEq, serde::Deserialize, serde::Serialize)]
pub struct Grading {
    /// The face at which elements are smallest.
    pub toward: Face,
    /// Largest / smallest element size across the graded direction (≥ 1; 1 = uniform).
    pub ratio: f64,
}

/// Parameter values in [0, 1] of the `steps·n + 1` nodes along one direction:
/// corners in geometric progression (sizes from largest/smallest = `ratio`,
/// smallest at 0 unless `reverse`), mid-nodes halfway between corners.
pub(crate) fn node_params(n: usize, steps: usize, ratio: f64, reverse: bool) -> Vec<f64> {
    let q = if n > 1 { ratio.powf(1.0 / (n as f64 - 1.0)) } else { 1.0 };
    let mut sizes: Vec<f64> = (0..n).map(|k| q.powi(k as i32)).collect();
    if reverse {
        sizes.reverse();
    }
    let total: f64 = sizes.iter().sum();
    let mut corners = vec![0.0];
    let mut acc = 0.0;
    for s in &sizes {
        acc += s;
        corners.push(acc / total);
    }
    *corners.last_mut().unwrap() = 1.0;
    let mut out = Vec::with_capacity(steps * n + 1);
    for k in 0..n {
        out.push(corners[k]);
        if steps == 2 {
            out.push(0.5 * (corners[k] + corners[k + 1]));
        }
    }
    out.push(1.0);
    out
}

/// The boundary pieces of one structured patch: edge 0 is v = 0, edge 1 is
/// u = 1, edge 2 is v = 1, edge 3 is u = 0 (counter-clockwise).
pub(crate) struct Patch {
    pub edges: [Vec<Side>; 4],
}

/// Adds a structured patch of quads (or triangles, two per quad) whose node
/// at parameters (us[i], vs[j]) sits at `map(u, v)`. `us`, `vs` come from
/// [`node_params`] with the same order; elements are counter-clockwise when
/// `map` preserves orientation.
pub(crate) fn add_patch(
    mesh: &mut Mesh,
    us: &[f64],
    vs: &[f64],
    order: Order,
    triangles: bool,
    map: impl Fn(f64, f64) -> [f64; 2],
) -> Patch {
    let s = order.steps();
    let (nx, ny) = ((us.len() - 1) / s, (vs.len() - 1) / s);
    let mut ids = vec![usize::MAX; us.len() * vs.len()];
    let mut node = |mesh: &mut Mesh, i: usize, j: usize| -> usize {
        let k = j * us.len() + i;
        if ids[k] == usize::MAX {
            let p = map(us[i], vs[j]);
            ids[k] = mesh.add_node([p[0], p[1], 0.0]);
        }
        ids[k]
    };
    let mut edges: [Vec<Side>; 4] = Default::default();
    for ey in 0..ny {
        for ex in 0..nx {
            let (i, j) = (ex * s, ey * s);
            let c = [node(mesh, i, j), node(mesh, i + s, j), node(mesh, i + s, j + s), node(mesh, i, j + s)];
            let mid = |mesh: &mut Mesh, node: &mut dyn FnMut(&mut Mesh, usize, usize) -> usize| {
                [node(mesh, i + 1, j), node(mesh, i + 2, j + 1), node(mesh, i + 1, j + 2), node(mesh, i, j + 1)]
            };
            // (element, local side) for each patch edge this cell touches.
            let mut sides = [(0usize, 0u8); 4];
            if triangles {
                let (a, b) = if s == 1 {
                    (mesh.add_element(ElementKind::Tri3, &[c[0], c[1], c[2]]), mesh.add_element(ElementKind::Tri3, &[c[0], c[2], c[3]]))
                } else {
                    let m = mid(mesh, &mut node);
                    let centre = node(mesh, i + 1, j + 1);
                    (
                        mesh.add_element(ElementKind::Tri6, &[c[0], c[1], c[2], m[0], m[1], centre]),
                        mesh.add_element(ElementKind::Tri6, &[c[0], c[2], c[3], centre, m[2], m[3]]),
                    )
                };
                sides = [(a, 0), (a, 1), (b, 1), (b, 2)];
            } else {
                let e = match order {
                    Order::Linear => mesh.add_element(ElementKind::Quad4, &c),
                    Order::Quadratic => {
                        let m = mid(mesh, &mut node);
                        mesh.add_element(ElementKind::Quad8, &[c[0], c[1], c[2], c[3], m[0], m[1], m[2], m[3]])
                    }
                    Order::QuadraticFull => {
                        let m = mid(mesh, &mut node);
                        let centre = node(mesh, i + 1, j + 1);
                        let all = [c[0], c[1], c[2], c[3], m[0], m[1], m[2], m[3], centre];
                        mesh.add_element(ElementKind::Quad9, &all)
                    }
                };
                for (k, side) in sides.iter_mut().enumerate() {
                    *side = (e, k as u8);
                }
            }
            let on_edge = [ey == 0, ex == nx - 1, ey == ny - 1, ex == 0];
            for k in 0..4 {
                if on_edge[k] {
                    edges[k].push(Side { element: sides[k].0, local: sides[k].1 });
                }
            }
        }
    }
    Patch { edges }
}

/// Checks a division count.
pub(crate) fn check_divisions(key: &str, n: usize) -> Result<(), MeshError> {
    if n == 0 || n > 100_000 {
        return Err(MeshError::param(key, format!("must be between 1 and 100000, got {n}")));
    }
    Ok(())
}

/// Refuses a mesh that would not fit in memory, before any of it is built:
/// `asked` says what was asked for (e.g. `"divisions 4000 × 4000 × 10"`).
pub(crate) fn check_mesh_size(key: &str, asked: &str, elements: u128, order: Order) -> Result<(), MeshError> {
    let nodes_per_element: u128 = match order {
        Order::Linear => 8,
        Order::Quadratic => 20,
        Order::QuadraticFull => 27,
    };
    // Per element node: coordinates (24 bytes), merge bookkeeping (about 40)
    // and its connectivity entry (8); 16 bytes of element bookkeeping.
    let bytes = elements.saturating_mul(nodes_per_element * 72 + 16);
    let asked = format!("{asked} ({elements} elements)");
    crate::memory::check_allocation(&asked, u64::try_from(bytes).unwrap_or(u64::MAX)).map_err(|e| MeshError::param(key, e.to_string()))
}

/// Checks that every coordinate of a point is finite (not NaN or infinite).
pub(crate) fn check_finite(key: &str, x: &[f64]) -> Result<(), MeshError> {
    if x.iter().any(|c| !c.is_finite()) {
        return Err(MeshError::param(key, format!("must be finite numbers, got {x:?}")));
    }
    Ok(())
}

/// Checks a positive finite length.
pub(crate) fn check_positive(key: &str, x: f64) -> Result<(), MeshError> {
    if !(x.is_finite() && x > 0.0) {
        return Err(MeshError::param(key, format!("must be a positive number, got {x}")));
    }
    Ok(())
}

/// Stitches blocks, names the element set `all`, sorts the side sets and
/// gives every side set a node set of the same name.
pub(crate) fn finish(mut mesh: Mesh, size: f64) -> Mesh {
    merge_duplicate_nodes(&mut mesh, 1e-9 * size);
    mesh.element_sets.insert("all".into(), (0..mesh.kinds.len()).collect());
    for sides in mesh.side_sets.values_mut() {
        sides.sort_unstable();
        sides.dedup();
    }
    let names: Vec<String> = mesh.side_sets.keys().cloned().collect();
    for name in names {
        if let Some(nodes) = mesh.side_set_nodes(&name) {
            mesh.node_sets.insert(name, nodes);
        }
    }
    mesh
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Graded parameters: first/last size ratio equals the requested ratio and
    /// mid-nodes sit halfway (definition of a geometric progression).
    #[test]
    fn graded_parameters_follow_the_ratio() {
        let p = node_params(4, 2, 8.0, false);
        assert_eq!(p.len(), 9);
        let first = p[2] - p[0];
        let last = p[8] - p[6];
        assert!((last / first - 8.0).abs() < 1e-12);
        assert!((p[1] - 0.5 * (p[0] + p[2])).abs() < 1e-15);
        let r = node_params(4, 1, 8.0, true);
        assert!(((r[1] - r[0]) / (r[4] - r[3]) - 8.0).abs() < 1e-12);
    }
}
