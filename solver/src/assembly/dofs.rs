//! Numbering of the free degrees of freedom. Global dof `node·dim + i`;
//! prescribed dofs get no equation (they are eliminated, not penalised).

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

    /// Whether the global dof is an unknown (not prescribed).
    pub fn is_free(&self, dof: usize) -> bool {
        self.eq[dof] != NONE
    }
}
