//! The sparse pattern of the free-dof tangent (lower triangle, CSC) and the
//! element-to-storage scatter plan ([`super::scatter`]), both built once
//! per mesh and constraint set, so Newton iterations write straight into
//! the value array without triplets, sorting or allocation.

use super::discretization::Discretization;
use super::dofs::{DofMap, NONE};
use super::error::AssemblyError;
use super::scatter::{default_parts, ScatterPlan};

/// Sparsity pattern of the tangent (compressed columns) with the elements' scatter plan.
#[derive(Debug, Clone)]
pub struct Pattern {
    /// Number of equations.
    pub n: usize,
    /// Start of each column in `row_idx` (length `n + 1`).
    pub col_ptr: Vec<usize>,
    /// Row index of each stored entry, sorted within a column.
    pub row_idx: Vec<usize>,
    /// Where the elements' forces and stored tangent entries go, split
    /// among threads.
    pub scatter: ScatterPlan,
    /// Mesh node of each equation (for node-level orderings).
    pub eq_node: Vec<usize>,
    /// Free pressure unknowns (continuous pressure): the negative pivots
    /// a stable tangent has.
    pub negative: usize,
}

impl Pattern {
    /// Builds the pattern and the scatter plan of every element of `disc`
    /// (two parts per thread, [`default_parts`]).
    pub fn build(disc: &Discretization, dofs: &DofMap) -> Result<Self, AssemblyError> {
        Self::build_with_parts(disc, dofs, default_parts())
    }

    /// As [`Self::build`], the scatter split into `parts` parts (the
    /// assembled sums do not depend on it).
    pub fn build_with_parts(disc: &Discretization, dofs: &DofMap, parts: usize) -> Result<Self, AssemblyError> {
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
        if row_idx.len() >= u32::MAX as usize {
            return Err(AssemblyError::PatternTooLarge(row_idx.len()));
        }
        drop(adj);
        let scatter = ScatterPlan::build(disc, dofs, &col_ptr, &row_idx, parts)?;
        let negative = (0..disc.pressures.count()).filter(|&k| dofs.eq.get(pressure_base + k).is_some_and(|&q| q != NONE)).count();
        Ok(Pattern { n, col_ptr, row_idx, scatter, eq_node, negative })
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
