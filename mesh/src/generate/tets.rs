//! Splitting structured hexahedra into tetrahedra, for tet4 / tet10 meshes of
//! the same shapes (useful to compare element families on one geometry).
//!
//! Each hex is cut into six tetrahedra around its diagonal from local corner 0
//! to 6 (the Kuhn / Freudenthal subdivision). Hexes that share their local axes,
//! as in a structured block, then cut every shared face along the same
//! diagonal, so the tetrahedral mesh is conforming. A hex27 gives tet10s: the
//! tet edges are hex edges, face diagonals and the body diagonal, whose
//! midpoints are hex27 nodes.

use crate::element::ElementKind;
use crate::model::{Mesh, Side};
use crate::shape::reference_nodes;

/// Local hex corners of the six tets, positively oriented.
fn kuhn_tets() -> Vec<[usize; 4]> {
    let refs = reference_nodes(ElementKind::Hex8);
    let corner = |bits: [i32; 3]| refs.iter().position(|r| (0..3).all(|k| (r[k] > 0.0) == (bits[k] == 1))).unwrap_or(0);
    let mut out = Vec::new();
    for (a, b) in [(0, 1), (0, 2), (1, 0), (1, 2), (2, 0), (2, 1)] {
        let mut p1 = [0; 3];
        p1[a] = 1;
        let mut p2 = p1;
        p2[b] = 1;
        let mut t = [0, corner(p1), corner(p2), 6];
        let x = |i: usize| refs[t[i]];
        let d = |i: usize, k: usize| x(i)[k] - x(0)[k];
        let det = d(1, 0) * (d(2, 1) * d(3, 2) - d(2, 2) * d(3, 1)) - d(1, 1) * (d(2, 0) * d(3, 2) - d(2, 2) * d(3, 0))
            + d(1, 2) * (d(2, 0) * d(3, 1) - d(2, 1) * d(3, 0));
        if det < 0.0 {
            t.swap(1, 2);
        }
        out.push(t);
    }
    out
}

/// Replaces every hex8 by six tet4 and every hex27 by six tet10; sets follow.
pub(crate) fn split_hexes(mesh: &Mesh) -> Mesh {
    let tets = kuhn_tets();
    let h27 = reference_nodes(ElementKind::Hex27);
    // Hex27 node at the midpoint of two local corners.
    let mid = |i: usize, j: usize| {
        let m: Vec<f64> = (0..3).map(|k| 0.5 * (h27[i][k] + h27[j][k])).collect();
        h27.iter().position(|r| (0..3).all(|k| r[k] == m[k])).unwrap_or(26)
    };
    let mut out = Mesh::new(3);
    out.nodes = mesh.nodes.clone();
    let mut children = Vec::with_capacity(mesh.kinds.len());
    for e in 0..mesh.kinds.len() {
        let nodes = mesh.element_nodes(e);
        let quadratic = mesh.kinds[e] == ElementKind::Hex27;
        let first = out.kinds.len();
        for t in &tets {
            let mut conn: Vec<usize> = t.iter().map(|&i| nodes[i]).collect();
            if quadratic {
                for (a, b) in [(0, 1), (1, 2), (2, 0), (0, 3), (1, 3), (2, 3)] {
                    conn.push(nodes[mid(t[a], t[b])]);
                }
                out.add_element(ElementKind::Tet10, &conn);
            } else {
                out.add_element(ElementKind::Tet4, &conn);
            }
        }
        children.push(first..out.kinds.len());
    }
    for (name, sides) in &mesh.side_sets {
        let mut list = Vec::with_capacity(2 * sides.len());
        for s in sides {
            let face = mesh.side_key(*s);
            for t in children[s.element].clone() {
                for local in 0..4u8 {
                    let side = Side { element: t, local };
                    if out.side_key(side).iter().all(|n| face.binary_search(n).is_ok()) {
                        list.push(side);
                    }
                }
            }
        }
        list.sort_unstable();
        out.side_sets.insert(name.clone(), list);
    }
    for (name, elems) in &mesh.element_sets {
        let list = elems.iter().flat_map(|&e| children[e].clone()).collect();
        out.element_sets.insert(name.clone(), list);
    }
    out.node_sets = mesh.node_sets.clone();
    out
}
