//! Numbering of the free degrees of freedom. Global dof `node·dim + i`,
//! then the continuous pressure unknowns (`node_count·dim + k`); prescribed
//! dofs get no equation (they are eliminated, not penalised).

/// Marks a prescribed dof in [`DofMap::eq`].
pub const NONE: usize = usize::MAX;

/// Numbering of the global dofs (node × component) into equations.
#[derive(Debug, Clone, PartialEq)]
pub struct DofMap {
    /// Displacement components per node.
    pub dim: usize,
    /// Equation number of each global dof, or [`NONE`] if prescribed.
    pub eq: Vec<usize>,
    /// Number of free dofs (equations).
    pub n_free: usize,
}

impl DofMap {
    /// Equations in increasing global dof order, so a node's free dofs are
    /// consecutive and node order is kept.
    pub fn new(dim: usize, prescribed: &[bool]) -> Self {
        let mut n_free = 0;
        let eq = prescribed
            .iter()
            .map(|&p| {
                if p {
                    NONE
                } else {
                    n_free += 1;
                    n_free - 1
                }
            })
            .collect();
        DofMap { dim, eq, n_free }
    }

    /// Equations node by node, a node's pressure unknown (if it has one,
    /// `pressure_of_node[node]` ≠ [`NONE`]) right after its displacements,
    /// so the equations of a node stay consecutive for the node-level
    /// orderings and the pressure joins its node's supernode. Without
    /// pressures this is [`DofMap::new`].
    pub fn with_pressures(dim: usize, prescribed: &[bool], pressure_of_node: &[usize]) -> Self {
        let nodes = pressure_of_node.len();
        let base = nodes * dim;
        if prescribed.len() == base {
            return DofMap::new(dim, prescribed);
        }
        let mut eq = vec![NONE; prescribed.len()];
        let mut n_free = 0;
        let mut number = |d: usize, eq: &mut Vec<usize>| {
            if !prescribed[d] {
                eq[d] = n_free;
                n_free += 1;
            }
        };
        for (node, &k) in pressure_of_node.iter().enumerate() {
            for i in 0..dim {
                number(node * dim + i, &mut eq);
            }
            if k != NONE {
                number(base + k, &mut eq);
            }
        }
        DofMap { dim, eq, n_free }
    }

    /// Whether the global dof is an unknown (not prescribed).
    pub fn is_free(&self, dof: usize) -> bool {
        self.eq[dof] != NONE
    }
}
