//! Mesh repair: merging coincident nodes, dropping unreferenced ones and
//! turning clockwise 2-D elements counter-clockwise. Generators build their
//! blocks independently and rely on the merge to stitch them; importers use
//! the reorientation so the solver only ever sees positive elements.

use std::collections::{BTreeMap, HashMap};

use crate::element::ElementKind;
use crate::model::{Mesh, Side};

/// Groups of nodes closer than `tol` to each other: `rep[i]` is the node that
/// represents node `i`: the earliest representative within `tol`, or `i` itself.
///
/// Representatives go into a hash grid with cells of 4 `tol`, so a node is
/// compared only with the few representatives in its own cell and, when it
/// lies within `tol` of a cell face, the neighbouring cells: linear time,
/// where a sort along one axis would compare whole planes of a structured mesh.
pub fn duplicate_representatives(mesh: &Mesh, tol: f64) -> Vec<usize> {
    let n = mesh.nodes.len();
    let mut rep: Vec<usize> = (0..n).collect();
    if !(tol > 0.0 && tol.is_finite()) {
        // Exact duplicates only: the coordinates' bit patterns are the key.
        let mut seen: HashMap<(u64, u64, u64), usize, CellHash> = HashMap::with_capacity_and_hasher(n, CellHash::default());
        for (i, x) in mesh.nodes.iter().enumerate() {
            rep[i] = *seen.entry((x[0].to_bits(), x[1].to_bits(), x[2].to_bits())).or_insert(i);
        }
        return rep;
    }
    let size = 4.0 * tol;
    // Head of each cell's list of representatives; `next` chains them.
    let mut head: HashMap<(i64, i64, i64), usize, CellHash> = HashMap::with_capacity_and_hasher(n, CellHash::default());
    let mut next = vec![usize::MAX; n];
    for i in 0..n {
        let x = mesh.nodes[i];
        // Cells to search along each axis: own cell, plus a neighbour within tol.
        // Float-to-int casts saturate, so far-away points share edge cells and
        // are still told apart by the distance test.
        let mut span = [[0i64; 2]; 3];
        let mut own = [0i64; 3];
        for k in 0..3 {
            let t = x[k] / size;
            let c = t.floor();
            own[k] = c as i64;
            let f = t - c;
            span[k] = [own[k] - i64::from(f < 0.25), own[k] + i64::from(f > 0.75)];
        }
        // The earliest representative within tol, so the result does not
        // depend on the grid (a node near two groups joins the older one).
        let mut found = usize::MAX;
        for cx in span[0][0]..=span[0][1] {
            for cy in span[1][0]..=span[1][1] {
                for cz in span[2][0]..=span[2][1] {
                    let mut j = head.get(&(cx, cy, cz)).copied().unwrap_or(usize::MAX);
                    while j != usize::MAX {
                        let y = mesh.nodes[j];
                        let d2 = (x[0] - y[0]).powi(2) + (x[1] - y[1]).powi(2) + (x[2] - y[2]).powi(2);
                        if d2 <= tol * tol {
                            found = found.min(j);
                        }
                        j = next[j];
                    }
                }
            }
        }
        match found {
            j if j != usize::MAX => rep[i] = j,
            _ => {
                let slot = head.entry((own[0], own[1], own[2])).or_insert(usize::MAX);
                next[i] = *slot;
                *slot = i;
            }
        }
    }
    rep
}

/// A fast multiplicative hash for integer cell keys (not DoS-resistant, which
/// mesh coordinates do not need).
#[derive(Default, Clone, Copy)]
struct CellHasher(u64);

impl std::hash::Hasher for CellHasher {
    fn write(&mut self, bytes: &[u8]) {
        for &b in bytes {
            self.write_u64(u64::from(b));
        }
    }
    fn write_u64(&mut self, v: u64) {
        self.0 = (self.0.rotate_left(5) ^ v).wrapping_mul(0x517c_c1b7_2722_0a95);
    }
    fn write_i64(&mut self, v: i64) {
        self.write_u64(v as u64);
    }
    fn finish(&self) -> u64 {
        self.0
    }
}

type CellHash = std::hash::BuildHasherDefault<CellHasher>;

/// Merges nodes closer than `tol` and returns how many nodes were removed.
pub fn merge_duplicate_nodes(mesh: &mut Mesh, tol: f64) -> usize {
    let rep = duplicate_representatives(mesh, tol);
    let removed = rep.iter().enumerate().filter(|&(i, &r)| r != i).count();
    if removed > 0 {
        for c in mesh.connectivity.iter_mut() {
            *c = rep[*c];
        }
        for set in mesh.node_sets.values_mut() {
            for n in set.iter_mut() {
                *n = rep[*n];
            }
        }
        let keep: Vec<bool> = rep.iter().enumerate().map(|(i, &r)| r == i).collect();
        drop_nodes(mesh, &keep);
    }
    removed
}

/// Nodes that no element uses.
pub fn unreferenced_nodes(mesh: &Mesh) -> Vec<usize> {
    let mut used = vec![false; mesh.nodes.len()];
    for &c in &mesh.connectivity {
        used[c] = true;
    }
    (0..used.len()).filter(|&i| !used[i]).collect()
}

/// Drops nodes no element uses (and removes them from node sets); returns how many.
pub fn remove_unreferenced_nodes(mesh: &mut Mesh) -> usize {
    let before = mesh.nodes.len();
    let mut keep = vec![false; before];
    for &c in &mesh.connectivity {
        keep[c] = true;
    }
    drop_nodes(mesh, &keep);
    before - mesh.nodes.len()
}

/// Removes the nodes with `keep[i] == false` (no element may still use them)
/// and renumbers connectivity and node sets.
fn drop_nodes(mesh: &mut Mesh, keep: &[bool]) {
    let mut new_index = vec![usize::MAX; mesh.nodes.len()];
    let mut nodes = Vec::with_capacity(mesh.nodes.len());
    for (i, x) in mesh.nodes.iter().enumerate() {
        if keep[i] {
            new_index[i] = nodes.len();
            nodes.push(*x);
        }
    }
    mesh.nodes = nodes;
    for c in mesh.connectivity.iter_mut() {
        *c = new_index[*c];
    }
    for set in mesh.node_sets.values_mut() {
        *set = set.iter().map(|&n| new_index[n]).filter(|&n| n != usize::MAX).collect();
        set.sort_unstable();
        set.dedup();
    }
}

/// Node permutation that mirrors a 2-D element (reverses its sense of rotation).
fn mirror_permutation(kind: ElementKind) -> &'static [usize] {
    match kind {
        ElementKind::Tri3 => &[0, 2, 1],
        ElementKind::Tri6 => &[0, 2, 1, 5, 4, 3],
        ElementKind::Quad4 => &[0, 3, 2, 1],
        ElementKind::Quad8 => &[0, 3, 2, 1, 7, 6, 5, 4],
        ElementKind::Quad9 => &[0, 3, 2, 1, 7, 6, 5, 4, 8],
        _ => &[],
    }
}

/// Signed area of the corner polygon of a 2-D element (positive when counter-clockwise).
pub fn signed_corner_area(mesh: &Mesh, e: usize) -> f64 {
    let kind = mesh.kinds[e];
    let nodes = mesh.element_nodes(e);
    let m = kind.corner_count();
    let mut a = 0.0;
    for i in 0..m {
        let (p, q) = (mesh.nodes[nodes[i]], mesh.nodes[nodes[(i + 1) % m]]);
        a += p[0] * q[1] - q[0] * p[1];
    }
    0.5 * a
}

/// Turns clockwise 2-D elements counter-clockwise, keeping side sets on the
/// same physical edges. Returns the reoriented element indices.
pub fn reorient_clockwise_2d(mesh: &mut Mesh) -> Vec<usize> {
    let mut flipped = Vec::new();
    for e in 0..mesh.kinds.len() {
        let kind = mesh.kinds[e];
        if kind.dimension() != 2 || signed_corner_area(mesh, e) >= 0.0 {
            continue;
        }
        let perm = mirror_permutation(kind);
        let old: Vec<usize> = mesh.element_nodes(e).to_vec();
        for (slot, &p) in mesh.element_nodes_mut(e).iter_mut().zip(perm) {
            *slot = old[p];
        }
        flipped.push(e);
    }
    if !flipped.is_empty() {
        remap_sides(mesh, &flipped);
    }
    flipped
}

/// After the nodes of elements `changed` were permuted, re-find each side of
/// theirs in the side sets by its corner nodes.
fn remap_sides(mesh: &mut Mesh, changed: &[usize]) {
    let changed: std::collections::BTreeSet<usize> = changed.iter().copied().collect();
    let mut sets: BTreeMap<String, Vec<Side>> = std::mem::take(&mut mesh.side_sets);
    for sides in sets.values_mut() {
        for s in sides.iter_mut() {
            if !changed.contains(&s.element) {
                continue;
            }
            let kind = mesh.kinds[s.element];
            let old_perm = mirror_permutation(kind);
            // Corner nodes of the side before the permutation: local index i then was at old_perm^-1.
            let nodes = mesh.element_nodes(s.element);
            let old_local = kind.sides()[s.local as usize];
            let mut old_corners: Vec<usize> =
                old_local[..2].iter().map(|&i| nodes[old_perm.iter().position(|&p| p == i).unwrap_or(i)]).collect();
            old_corners.sort_unstable();
            for (k, local) in kind.sides().iter().enumerate() {
                let mut c: Vec<usize> = local[..2].iter().map(|&i| nodes[i]).collect();
                c.sort_unstable();
                if c == old_corners {
                    s.local = k as u8;
                }
            }
        }
        sides.sort_unstable();
    }
    mesh.side_sets = sets;
}
