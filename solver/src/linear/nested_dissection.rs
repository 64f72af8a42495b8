//! Nested-dissection fill-reducing ordering (George 1973, "Nested dissection
//! of a regular finite element mesh", SIAM J. Numer. Anal. 10:345–363) of the
//! node graph, with METIS bisections (Karypis & Kumar 1998) as the separator
//! finder: each graph is split in two by METIS, the boundary vertices of the
//! smaller side form the vertex separator, both halves are ordered
//! recursively and the separator is numbered last. Equations of a node stay
//! together. The result is handed to faer as a custom permutation.

use super::{LinearError, SymmetricPattern};

/// Subgraphs at most this large are numbered as they come.
const LEAF: usize = 48;

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
    let mut out = Vec::with_capacity(nv);
    let mut local = vec![usize::MAX; nv];
    let all: Vec<usize> = (0..nv).collect();
    dissect(&all, &adj, &mut local, &mut out)?;
    let mut perm = Vec::with_capacity(pattern.n);
    for v in out {
        perm.extend(first_eq[v]..first_eq[v + 1]);
    }
    Ok(perm)
}

fn dissect(vertices: &[usize], adj: &[Vec<usize>], local: &mut [usize], out: &mut Vec<usize>) -> Result<(), LinearError> {
    if vertices.len() <= LEAF {
        out.extend_from_slice(vertices);
        return Ok(());
    }
    for (i, &v) in vertices.iter().enumerate() {
        local[v] = i;
    }
    let mut xadj: Vec<metis::Idx> = Vec::with_capacity(vertices.len() + 1);
    let mut adjncy: Vec<metis::Idx> = Vec::new();
    xadj.push(0);
    for &v in vertices {
        for &w in &adj[v] {
            if local[w] != usize::MAX {
                adjncy.push(local[w] as metis::Idx);
            }
        }
        xadj.push(adjncy.len() as metis::Idx);
    }
    let mut part = vec![0 as metis::Idx; vertices.len()];
    let split = metis::Graph::new(1, 2, &xadj, &adjncy).map_err(|e| LinearError::Metis(format!("{e:?}")))?.part_recursive(&mut part);
    let boundary = |side: metis::Idx, part: &[metis::Idx]| -> Vec<bool> {
        vertices
            .iter()
            .enumerate()
            .map(|(i, &v)| part[i] == side && adj[v].iter().any(|&w| local[w] != usize::MAX && part[local[w]] != side))
            .collect()
    };
    let ok = split.is_ok() && part.contains(&0) && part.contains(&1);
    let (b0, b1) = if ok { (boundary(0, &part), boundary(1, &part)) } else { (vec![], vec![]) };
    for &v in vertices {
        local[v] = usize::MAX;
    }
    if !ok {
        out.extend_from_slice(vertices);
        return Ok(());
    }
    let sep_mask = if b0.iter().filter(|b| **b).count() <= b1.iter().filter(|b| **b).count() { b0 } else { b1 };
    let (mut a, mut b, mut sep) = (Vec::new(), Vec::new(), Vec::new());
    for (i, &v) in vertices.iter().enumerate() {
        if sep_mask[i] {
            sep.push(v);
        } else if part[i] == 0 {
            a.push(v);
        } else {
            b.push(v);
        }
    }
    dissect(&a, adj, local, out)?;
    dissect(&b, adj, local, out)?;
    out.extend_from_slice(&sep);
    Ok(())
}
