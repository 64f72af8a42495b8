//! Nested-dissection fill-reducing ordering of an undirected graph: METIS's
//! multilevel node-separator bisection (Karypis & Kumar 1998, "A fast and
//! high quality multilevel scheme for partitioning irregular graphs", SIAM
//! J. Sci. Comput. 20:359–392) applied recursively (George 1973), with
//! minimum degree on the small parts, as METIS 5's `METIS_NodeND` does it.
//!
//! The graph is checked in safe code (sizes, indices, symmetry, no self
//! loops, positive weights) before the one foreign call, so the call cannot
//! read outside the arrays it is given; its result is checked to be a
//! permutation.

#![warn(missing_docs)]

use metis_sys::idx_t;
use thiserror::Error;

/// Why a graph could not be ordered.
#[derive(Debug, Clone, PartialEq, Eq, Error)]
pub enum OrderingError {
    /// The adjacency lists do not describe a simple undirected graph.
    #[error("vertex {vertex}: {problem}")]
    BadGraph {
        /// The vertex whose list is wrong.
        vertex: usize,
        /// What is wrong with it.
        problem: &'static str,
    },
    /// The graph is too large for METIS's 32-bit indices.
    #[error("{vertices} vertices and {edges} adjacency entries exceed METIS's 32-bit indices")]
    TooLarge {
        /// Vertices of the graph.
        vertices: usize,
        /// Adjacency entries (twice the edges).
        edges: usize,
    },
    /// METIS returned an error status.
    #[error("METIS_NodeND returned status {0}")]
    Metis(i32),
    /// METIS returned something that is not a permutation.
    #[error("METIS_NodeND returned an invalid permutation")]
    NotAPermutation,
}

/// Elimination order of the vertices of the graph with adjacency lists
/// `adjacency` (each edge listed from both ends, no self loops) and vertex
/// weights `weights` (≥ 1; the number of equations a vertex stands for):
/// `order[k]` is the vertex eliminated k-th.
pub fn nested_dissection(adjacency: &[Vec<usize>], weights: &[usize]) -> Result<Vec<usize>, OrderingError> {
    let n = adjacency.len();
    if weights.len() != n {
        return Err(OrderingError::BadGraph { vertex: weights.len().min(n), problem: "weight count differs from vertex count" });
    }
    let edges: usize = adjacency.iter().map(Vec::len).sum();
    if n >= idx_t::MAX as usize || edges >= idx_t::MAX as usize || weights.iter().sum::<usize>() >= idx_t::MAX as usize {
        return Err(OrderingError::TooLarge { vertices: n, edges });
    }
    if n == 0 {
        return Ok(Vec::new());
    }
    check_symmetric(adjacency, weights)?;
    let mut xadj: Vec<idx_t> = Vec::with_capacity(n + 1);
    let mut adjncy: Vec<idx_t> = Vec::with_capacity(edges);
    xadj.push(0);
    for list in adjacency {
        adjncy.extend(list.iter().map(|&w| w as idx_t));
        xadj.push(adjncy.len() as idx_t);
    }
    let mut vwgt: Vec<idx_t> = weights.iter().map(|&w| w as idx_t).collect();
    let mut options = [0 as idx_t; metis_sys::METIS_NOPTIONS as usize];
    let mut nvtxs = n as idx_t;
    let mut perm = vec![0 as idx_t; n];
    let mut iperm = vec![0 as idx_t; n];
    // SAFETY: `options` has METIS_NOPTIONS entries; xadj has n + 1 entries,
    // non-decreasing from 0 to adjncy.len(); every adjncy entry is a vertex
    // below n (checked above); vwgt, perm and iperm have n entries. METIS
    // reads only these and writes only perm and iperm.
    #[allow(unsafe_code)]
    let status = unsafe {
        metis_sys::METIS_SetDefaultOptions(options.as_mut_ptr());
        metis_sys::METIS_NodeND(
            &mut nvtxs,
            xadj.as_mut_ptr(),
            adjncy.as_mut_ptr(),
            vwgt.as_mut_ptr(),
            options.as_mut_ptr(),
            perm.as_mut_ptr(),
            iperm.as_mut_ptr(),
        )
    };
    if status != metis_sys::rstatus_et_METIS_OK {
        return Err(OrderingError::Metis(status));
    }
    let mut seen = vec![false; n];
    let mut order = Vec::with_capacity(n);
    for &v in &perm {
        let v = usize::try_from(v).map_err(|_| OrderingError::NotAPermutation)?;
        if v >= n || std::mem::replace(&mut seen[v], true) {
            return Err(OrderingError::NotAPermutation);
        }
        order.push(v);
    }
    Ok(order)
}

/// Every neighbour is a vertex, no vertex lists itself or a neighbour twice,
/// every edge is listed from both ends, and every weight is at least 1.
fn check_symmetric(adjacency: &[Vec<usize>], weights: &[usize]) -> Result<(), OrderingError> {
    let n = adjacency.len();
    let mut mark = vec![usize::MAX; n];
    for (v, list) in adjacency.iter().enumerate() {
        let bad = |problem| Err(OrderingError::BadGraph { vertex: v, problem });
        if weights[v] == 0 {
            return bad("zero weight");
        }
        for &w in list {
            if w >= n {
                return bad("neighbour out of range");
            }
            if w == v {
                return bad("self loop");
            }
            if mark[w] == v {
                return bad("neighbour listed twice");
            }
            mark[w] = v;
        }
    }
    // Symmetry: count the listings of each edge from its lower end and its upper end.
    let mut from_low: Vec<(usize, usize)> = Vec::new();
    let mut from_high: Vec<(usize, usize)> = Vec::new();
    for (v, list) in adjacency.iter().enumerate() {
        for &w in list {
            if v < w {
                from_low.push((v, w));
            } else {
                from_high.push((w, v));
            }
        }
    }
    from_low.sort_unstable();
    from_high.sort_unstable();
    if from_low != from_high {
        let vertex = from_low.iter().zip(&from_high).find(|(a, b)| a != b).map_or(0, |(a, _)| a.0);
        return Err(OrderingError::BadGraph { vertex, problem: "an edge is listed from one end only" });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The grid graph of an nx × ny five-point stencil.
    fn grid(nx: usize, ny: usize) -> Vec<Vec<usize>> {
        let id = |i: usize, j: usize| i + nx * j;
        let mut adj = vec![Vec::new(); nx * ny];
        for j in 0..ny {
            for i in 0..nx {
                if i + 1 < nx {
                    adj[id(i, j)].push(id(i + 1, j));
                    adj[id(i + 1, j)].push(id(i, j));
                }
                if j + 1 < ny {
                    adj[id(i, j)].push(id(i, j + 1));
                    adj[id(i, j + 1)].push(id(i, j));
                }
            }
        }
        adj
    }

    /// Nonzeros of the Cholesky factor of a graph's matrix under `order`,
    /// by the elimination tree's row counts (symbolic elimination, George &
    /// Liu 1981, "Computer Solution of Large Sparse Positive Definite
    /// Systems", §4.2), diagonal included.
    fn factor_entries(adj: &[Vec<usize>], order: &[usize]) -> usize {
        let n = adj.len();
        let mut pos = vec![0; n];
        for (k, &v) in order.iter().enumerate() {
            pos[v] = k;
        }
        // Rows of L column by column: the structure of column k is its
        // higher neighbours plus those of the eliminated columns whose parent it is.
        let mut cols: Vec<Vec<usize>> = vec![Vec::new(); n];
        let mut children: Vec<Vec<usize>> = vec![Vec::new(); n];
        let mut total = 0;
        for k in 0..n {
            let mut s: Vec<usize> = adj[order[k]].iter().map(|&w| pos[w]).filter(|&p| p > k).collect();
            for &c in &children[k] {
                s.extend(cols[c].iter().copied().filter(|&p| p > k));
            }
            s.sort_unstable();
            s.dedup();
            total += s.len() + 1;
            if let Some(&parent) = s.first() {
                children[parent].push(k);
            }
            cols[k] = s;
        }
        total
    }

    /// On a 2-D grid nested dissection's fill grows as n log n (George
    /// 1973), far below the band ordering's n^1.5: on a 60 × 60 grid its
    /// factor is well under the natural (banded) order's.
    #[test]
    fn orders_a_grid_with_less_fill_than_the_band_order() {
        let adj = grid(60, 60);
        let order = nested_dissection(&adj, &vec![1; adj.len()]).unwrap();
        let natural: Vec<usize> = (0..adj.len()).collect();
        let (nd, band) = (factor_entries(&adj, &order), factor_entries(&adj, &natural));
        // The band order fills each row's envelope: from the row below's
        // neighbour on, nx + 1 entries; the first grid line's rows have 2
        // (its first row 1).
        assert_eq!(band, 1 + 2 * 59 + 61 * (3600 - 60));
        assert!((nd as f64) < 0.45 * band as f64, "nested dissection {nd}, band {band}");
    }

    #[test]
    fn rejects_graphs_that_would_make_metis_read_out_of_bounds() {
        let bad = |adj: Vec<Vec<usize>>| nested_dissection(&adj, &vec![1; adj.len()]).unwrap_err();
        assert!(matches!(bad(vec![vec![1], vec![5]]), OrderingError::BadGraph { vertex: 1, problem: "neighbour out of range" }));
        assert!(matches!(bad(vec![vec![0]]), OrderingError::BadGraph { problem: "self loop", .. }));
        assert!(matches!(bad(vec![vec![1], vec![]]), OrderingError::BadGraph { problem: "an edge is listed from one end only", .. }));
        assert!(matches!(bad(vec![vec![1, 1], vec![0, 0]]), OrderingError::BadGraph { problem: "neighbour listed twice", .. }));
        assert!(nested_dissection(&[vec![1], vec![0]], &[1, 0]).is_err());
        assert_eq!(nested_dissection(&[], &[]).unwrap(), Vec::<usize>::new());
        // Isolated vertices and several components are fine.
        let order = nested_dissection(&[vec![], vec![2], vec![1], vec![]], &[3, 3, 3, 3]).unwrap();
        let mut sorted = order.clone();
        sorted.sort_unstable();
        assert_eq!(sorted, vec![0, 1, 2, 3]);
    }
}
