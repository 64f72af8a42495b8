//! The mesh model: nodes, elements of one or more kinds, and named sets.
//!
//! A mesh is 2-D (an r–z or x–y section for axisymmetric and plane-strain
//! analyses; z coordinates are zero) or 3-D. Elements are stored flat
//! (kind + offset into one connectivity array) so a mesh of millions of
//! elements is a handful of allocations.

use std::collections::BTreeMap;

use crate::element::ElementKind;

/// A side of an element: an edge in 2-D, a face in 3-D, by local index into
/// [`ElementKind::sides`]. Its outward direction is the element's outward normal
/// on that side (see [`Mesh::side_normal`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Side {
    /// Index of the element in the mesh.
    pub element: usize,
    /// Local side number, an index into the kind's [`ElementKind::sides`] table.
    pub local: u8,
}

/// Nodes, elements and named sets of one part.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Mesh {
    /// Spatial dimension, 2 or 3.
    pub dimension: usize,
    /// Node coordinates; in 2-D the third entry is zero.
    pub nodes: Vec<[f64; 3]>,
    /// Kind of each element.
    pub kinds: Vec<ElementKind>,
    /// Start of each element's nodes in `connectivity`; `offsets.len() == kinds.len() + 1`.
    pub offsets: Vec<usize>,
    /// Node indices of all elements, one after another.
    pub connectivity: Vec<usize>,
    /// Named node sets (sorted, without repeats).
    pub node_sets: BTreeMap<String, Vec<usize>>,
    /// Named element sets, used as material regions (sorted, without repeats).
    pub element_sets: BTreeMap<String, Vec<usize>>,
    /// Named side sets: loaded or contacting edges (2-D) and faces (3-D).
    pub side_sets: BTreeMap<String, Vec<Side>>,
}

impl Mesh {
    /// An empty mesh of the given dimension (2 or 3).
    pub fn new(dimension: usize) -> Self {
        Mesh { dimension, offsets: vec![0], ..Default::default() }
    }

    /// Appends a node and returns its index.
    pub fn add_node(&mut self, x: [f64; 3]) -> usize {
        self.nodes.push(x);
        self.nodes.len() - 1
    }

    /// Appends an element and returns its index.
    ///
    /// # Panics
    /// If `nodes.len()` differs from the kind's node count (a programming error;
    /// importers check counts before calling this).
    pub fn add_element(&mut self, kind: ElementKind, nodes: &[usize]) -> usize {
        assert_eq!(nodes.len(), kind.node_count(), "node count of {kind}");
        self.kinds.push(kind);
        self.connectivity.extend_from_slice(nodes);
        self.offsets.push(self.connectivity.len());
        self.kinds.len() - 1
    }

    /// Number of nodes.
    pub fn node_count(&self) -> usize {
        self.nodes.len()
    }

    /// Number of elements.
    pub fn element_count(&self) -> usize {
        self.kinds.len()
    }

    /// Node indices of element `e`.
    pub fn element_nodes(&self, e: usize) -> &[usize] {
        &self.connectivity[self.offsets[e]..self.offsets[e + 1]]
    }

    /// Mutable node indices of element `e` (for reorientation).
    pub fn element_nodes_mut(&mut self, e: usize) -> &mut [usize] {
        let (a, b) = (self.offsets[e], self.offsets[e + 1]);
        &mut self.connectivity[a..b]
    }

    /// Global node indices of one side, corners first.
    pub fn side_nodes(&self, side: Side) -> Vec<usize> {
        let local = self.kinds[side.element].sides()[side.local as usize];
        let nodes = self.element_nodes(side.element);
        local.iter().map(|&i| nodes[i]).collect()
    }

    /// Sorted corner nodes of a side: equal for the two elements sharing it.
    pub fn side_key(&self, side: Side) -> Vec<usize> {
        let kind = self.kinds[side.element];
        let local = kind.sides()[side.local as usize];
        let nodes = self.element_nodes(side.element);
        let mut key: Vec<usize> = local[..kind.side_corner_count(side.local as usize)].iter().map(|&i| nodes[i]).collect();
        key.sort_unstable();
        key
    }

    /// Outward unit normal of a side in the undeformed configuration, at its
    /// corner-node centroid (2-D: in the x–y plane; 3-D: from the corner polygon).
    pub fn side_normal(&self, side: Side) -> [f64; 3] {
        let kind = self.kinds[side.element];
        let local = kind.sides()[side.local as usize];
        let nodes = self.element_nodes(side.element);
        let p = |i: usize| self.nodes[nodes[local[i]]];
        let n = if kind.dimension() == 2 {
            let (a, b) = (p(0), p(1));
            // Counter-clockwise elements: the outward normal is the edge direction turned clockwise.
            [b[1] - a[1], -(b[0] - a[0]), 0.0]
        } else {
            let corners = kind.side_corner_count(side.local as usize);
            // Newell's method: robust for warped quadrilateral faces.
            let mut n = [0.0; 3];
            for i in 0..corners {
                let (a, b) = (p(i), p((i + 1) % corners));
                n[0] += (a[1] - b[1]) * (a[2] + b[2]);
                n[1] += (a[2] - b[2]) * (a[0] + b[0]);
                n[2] += (a[0] - b[0]) * (a[1] + b[1]);
            }
            n
        };
        let len = (n[0] * n[0] + n[1] * n[1] + n[2] * n[2]).sqrt();
        if len > 0.0 {
            [n[0] / len, n[1] / len, n[2] / len]
        } else {
            n
        }
    }

    /// Nodes touched by a side set, sorted without repeats.
    pub fn side_set_nodes(&self, name: &str) -> Option<Vec<usize>> {
        let sides = self.side_sets.get(name)?;
        let mut nodes: Vec<usize> = sides.iter().flat_map(|&s| self.side_nodes(s)).collect();
        nodes.sort_unstable();
        nodes.dedup();
        Some(nodes)
    }

    /// Nodes of any named set: a node set, or the nodes of a side set or an
    /// element set of that name (looked up in that order).
    pub fn nodes_of_set(&self, name: &str) -> Option<Vec<usize>> {
        if let Some(n) = self.node_sets.get(name) {
            return Some(n.clone());
        }
        if let Some(n) = self.side_set_nodes(name) {
            return Some(n);
        }
        let elems = self.element_sets.get(name)?;
        let mut nodes: Vec<usize> = elems.iter().flat_map(|&e| self.element_nodes(e).iter().copied()).collect();
        nodes.sort_unstable();
        nodes.dedup();
        Some(nodes)
    }

    /// Axis-aligned bounding box `(min, max)` of the nodes.
    pub fn bounding_box(&self) -> ([f64; 3], [f64; 3]) {
        let mut lo = [f64::INFINITY; 3];
        let mut hi = [f64::NEG_INFINITY; 3];
        for x in &self.nodes {
            for k in 0..3 {
                lo[k] = lo[k].min(x[k]);
                hi[k] = hi[k].max(x[k]);
            }
        }
        (lo, hi)
    }
}
