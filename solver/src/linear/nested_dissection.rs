//! Nested-dissection fill-reducing ordering (George 1973, "Nested dissection
//! of a regular finite element mesh", SIAM J. Numer. Anal. 10:345–363) of the
//! node graph, by METIS's multilevel node separators (Karypis & Kumar 1998)
//! through `olli_ordering`. Each node is weighted by its number of
//! equations, and the equations of a node stay together. The result is
//! handed to faer as a custom permutation.

use super::{LinearError, SymmetricPattern};

/// Elimination order of the equations (`perm[k]` = equation eliminated k-th).
pub fn order(pattern: &SymmetricPattern) -> Result<Vec<usize>, LinearError> {
    // Compact node ids in equation order (equations are node-major).
    let mut first_eq = Vec::new();
    let mut cid = Vec::with_capacity(pattern.n);
    for (q, &node) in pattern.eq_node.iter().enumerate() {
        if q == 0 || pattern.eq_node[q - 1] != node {
            first_eq.push(q);
        }
        cid.push(first_eq.len() - 1);
    }
    let nv = first_eq.len();
    first_eq.push(pattern.n);
    let mut adj: Vec<Vec<usize>> = vec![Vec::new(); nv];
    for c in 0..pattern.n {
        for &r in &pattern.row_idx[pattern.col_ptr[c]..pattern.col_ptr[c + 1]] {
            let (a, b) = (cid[c], cid[r]);
            if a != b {
                adj[a].push(b);
                adj[b].push(a);
            }
        }
    }
    for l in &mut adj {
        l.sort_unstable();
        l.dedup();
    }
    let weights: Vec<usize> = first_eq.windows(2).map(|w| w[1] - w[0]).collect();
    let nodes = olli_ordering::nested_dissection(&adj, &weights).map_err(|e| LinearError::Metis(e.to_string()))?;
    let mut perm = Vec::with_capacity(pattern.n);
    for v in nodes {
        perm.extend(first_eq[v]..first_eq[v + 1]);
    }
    Ok(perm)
}
