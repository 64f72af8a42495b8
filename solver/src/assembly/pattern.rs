//! The sparse pattern of the free-dof tangent (lower triangle, CSC) and the
//! element-to-storage scatter map, both built once per mesh and constraint
//! set, so Newton iterations write straight into the value array without
//! triplets, sorting or allocation.

use super::discretization::Discretization;
use super::dofs::{DofMap, NONE};
use super::error::AssemblyError;
use crate::element::taylor_hood::MAX_PRESSURE_NODES;
use crate::element::MAX_DOFS;

/// Marks an element matrix entry that is not stored (upper triangle or a prescribed dof).
pub const SKIP: u32 = u32::MAX;

/// Sparsity pattern of the tangent (compressed columns) with each element's scatter map.
#[derive(Debug, Clone)]
pub struct Pattern {
    /// Number of equations.
    pub n: usize,
    /// Start of each column in `row_idx` (length `n + 1`).
    pub col_ptr: Vec<usize>,
    /// Row index of each stored entry, sorted within a column.
    pub row_idx: Vec<usize>,
    /// For each element, `dofs²` storage slots (column-major over local dofs).
    pub scatter: Vec<u32>,
    /// Start of each element's block in `scatter`.
    pub scatter_offset: Vec<usize>,
    /// Mesh node of each equation (for node-level orderings).
    pub eq_node: Vec<usize>,
    /// Free pressure unknowns (continuous pressure): the negative pivots
    /// a stable tangent has.
    pub negative: usize,
}

impl Pattern {
    /// Builds the pattern and the scatter maps of every element of `disc`.
    pub fn build(disc: &Discretization, dofs: &DofMap) -> Result<Self, AssemblyError> {
        let mesh = disc.mesh();
        let dim = dofs.dim;
        // Node adjacency, each list sorted: with node-major equation numbers
        // (a node's pressure unknown, if any, after its displacements; see
        // `DofMap::with_pressures`) the rows of every column come out sorted.
        // A pressure couples with every node beside its own (a superset of
        // its Taylor–Hood elements' nodes where kinds are mixed: zeros).
        let mut adj: Vec<Vec<usize>> = vec![Vec::new(); mesh.node_count()];
        for e in 0..mesh.element_count() {
            let nodes = mesh.element_nodes(e);
            for &a in nodes {
                adj[a].extend_from_slice(nodes);
            }
        }
        for list in adj.iter_mut() {
            list.sort_unstable();
            list.dedup();
        }
        let pressure_base = mesh.node_count() * dim;
        let pressure_eq = |node: usize| match disc.pressures.of_node.get(node) {
            Some(&k) if k != NONE => dofs.eq[pressure_base + k],
            _ => NONE,
        };
        let n = dofs.n_free;
        let mut col_ptr = vec![0; n + 1];
        let mut row_idx = Vec::new();
        let mut eq_node = vec![0; n];
        let column = |c: usize, node: usize, row_idx: &mut Vec<usize>| {
            for &m in &adj[node] {
                for j in 0..dim {
                    let r = dofs.eq[m * dim + j];
                    if r != NONE && r >= c {
                        row_idx.push(r);
                    }
                }
                let r = pressure_eq(m);
                if r != NONE && r >= c {
                    row_idx.push(r);
                }
            }
        };
        // Columns in equation order (node-major).
        let mut next = 0;
        for node in 0..mesh.node_count() {
            let own = (0..dim).map(|i| dofs.eq[node * dim + i]).chain(std::iter::once(pressure_eq(node)));
            for c in own.filter(|&c| c != NONE) {
                debug_assert_eq!(c, next, "equations are node-major");
                eq_node[c] = node;
                column(c, node, &mut row_idx);
                col_ptr[c + 1] = row_idx.len();
                next += 1;
            }
        }
        if row_idx.len() >= SKIP as usize {
            return Err(AssemblyError::PatternTooLarge(row_idx.len()));
        }
        drop(adj);
        let mut scatter_offset = Vec::with_capacity(mesh.element_count() + 1);
        scatter_offset.push(0);
        let mut scatter = Vec::new();
        let mut gdof = [0usize; MAX_DOFS + MAX_PRESSURE_NODES];
        let mut global = [0usize; MAX_DOFS + MAX_PRESSURE_NODES];
        for e in 0..mesh.element_count() {
            let nd = disc.element_dofs(e, &mut global);
            for (g, &d) in gdof.iter_mut().zip(&global[..nd]) {
                *g = dofs.eq[d];
            }
            for c in 0..nd {
                for r in 0..nd {
                    let (gr, gc) = (gdof[r], gdof[c]);
                    let slot = if gr != NONE && gc != NONE && gr >= gc {
                        find(&col_ptr, &row_idx, gr, gc).map(|s| s as u32).unwrap_or(SKIP)
                    } else {
                        SKIP
                    };
                    scatter.push(slot);
                }
            }
            scatter_offset.push(scatter.len());
        }
        let negative = (0..disc.pressures.count()).filter(|&k| dofs.eq.get(pressure_base + k).is_some_and(|&q| q != NONE)).count();
        Ok(Pattern { n, col_ptr, row_idx, scatter, scatter_offset, eq_node, negative })
    }

    /// Storage slot of entry (row, col) with row ≥ col, if in the pattern.
    pub fn slot(&self, row: usize, col: usize) -> Option<usize> {
        find(&self.col_ptr, &self.row_idx, row, col)
    }

    /// Number of stored entries.
    pub fn nnz(&self) -> usize {
        self.row_idx.len()
    }
}

fn find(col_ptr: &[usize], row_idx: &[usize], row: usize, col: usize) -> Option<usize> {
    let (a, b) = (col_ptr[col], col_ptr[col + 1]);
    row_idx[a..b].binary_search(&row).ok().map(|k| a + k)
}
