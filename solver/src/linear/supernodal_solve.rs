//! Triangular solves `L y = b`, `Lᵀ x = y` with a supernodal Cholesky
//! factor, in f32 or f64, parallel over independent subtrees of the
//! supernodal elimination tree.
//!
//! A solve reads every factor entry once per triangle and does two flops
//! with it, so it runs at the speed memory delivers the factor: on the
//! single-precision factor of a 472k-equation block (845 M entries) the
//! Krylov iterations on a kept factor are mostly these solves. faer's own
//! solve walks the supernodes in order and hands each one's small dense
//! products to its thread pool. Here each thread walks whole subtrees
//! instead (subtree-to-thread mapping; George, Liu & Ng 1989,
//! "Communication results for parallel sparse Cholesky factorization",
//! Parallel Computing 10): columns of two disjoint subtrees never meet
//! until their common ancestors, so the subtrees' forward sweeps run at
//! once, each collecting its updates to the ancestors' rows in a buffer of
//! its own, and after the ancestors ("the top") the backward sweeps run at
//! once again, reading the ancestors' final values. The arithmetic per
//! entry is the same as a sequential sweep's; only the order in which the
//! updates to an ancestor row are summed differs.
//!
//! The factor's layout is faer's: supernode `s` holds columns
//! `begin[s]..end[s]` (k of them) and below them the rows of its pattern
//! (m of them, all in ancestors), column-major in a (k + m) × k block whose
//! top k × k part is lower triangular.

use std::ops::Range;

use faer::sparse::linalg::cholesky::supernodal::SymbolicSupernodalCholesky;
use rayon::prelude::*;

/// A factor entry type: f32 or f64.
pub trait FactorScalar:
    Copy
    + Send
    + Sync
    + PartialEq
    + std::ops::Add<Output = Self>
    + std::ops::Sub<Output = Self>
    + std::ops::Mul<Output = Self>
    + std::ops::Div<Output = Self>
    + std::ops::AddAssign
    + std::ops::SubAssign
{
    /// Zero.
    const ZERO: Self;
}

impl FactorScalar for f32 {
    const ZERO: Self = 0.0;
}

impl FactorScalar for f64 {
    const ZERO: Self = 0.0;
}

/// Subtrees smaller than this share of the factor (over the threads) are not
/// split further: with four or more subtrees per thread, rayon's work
/// stealing evens out the rest.
const TASKS_PER_THREAD: usize = 4;

/// One subtree of the supernodal elimination tree solved by one thread: its
/// supernodes and the rows (columns of L) they own, both contiguous because
/// the supernodes are numbered in a postorder.
#[derive(Debug, Clone)]
struct Subtree {
    supernodes: Range<usize>,
    rows: Range<usize>,
}

/// Where the supernodes of a factor are solved: independent subtrees on
/// the threads, then the top supernodes (their common ancestors) in order.
#[derive(Debug, Clone)]
pub struct SupernodalSolve {
    /// Subtrees, in increasing row order; empty for a sequential solve.
    subtrees: Vec<Subtree>,
    /// The supernodes outside every subtree, increasing (all of them for a
    /// sequential solve).
    top: Vec<usize>,
    /// Threads among which the top's large supernodes split their work.
    threads: usize,
}

impl SupernodalSolve {
    /// The schedule of `symbolic`'s supernodes for `threads` threads (a
    /// sequential one for one thread, or when the tree has no two
    /// independent subtrees worth splitting).
    pub fn new(symbolic: &SymbolicSupernodalCholesky<usize>, threads: usize) -> Self {
        let nsup = symbolic.n_supernodes();
        let sequential = SupernodalSolve { subtrees: Vec::new(), top: (0..nsup).collect(), threads: threads.max(1) };
        if threads < 2 || nsup < 2 {
            return sequential;
        }
        let (begin, end) = (symbolic.supernode_begin(), symbolic.supernode_end());
        let n = symbolic.nrows();
        let mut owner = vec![0usize; n];
        for s in 0..nsup {
            owner[begin[s]..end[s]].fill(s);
        }
        // Parent: the supernode of the first row below the diagonal block.
        let mut parent = vec![usize::MAX; nsup];
        let mut work = vec![0f64; nsup];
        for s in 0..nsup {
            let pattern = symbolic.supernode(s).pattern();
            let k = end[s] - begin[s];
            work[s] = ((k + pattern.len()) * k) as f64;
            if let Some(&first) = pattern.first() {
                parent[s] = owner[first];
                if parent[s] <= s {
                    return sequential;
                }
            }
        }
        let mut subtree_work = work.clone();
        let mut size = vec![1usize; nsup];
        let mut first = (0..nsup).collect::<Vec<_>>();
        let mut children = vec![Vec::new(); nsup];
        for s in 0..nsup {
            let p = parent[s];
            if p != usize::MAX {
                subtree_work[p] += subtree_work[s];
                size[p] += size[s];
                first[p] = first[p].min(first[s]);
                children[p].push(s);
            }
        }
        let contiguous = |s: usize| size[s] == s - first[s] + 1;
        let total: f64 = work.iter().sum();
        let small_enough = total / (TASKS_PER_THREAD * threads) as f64;
        // Split the heaviest subtree into its children until every subtree
        // is small enough (or a leaf), keeping the split-off roots on top.
        let mut candidates: Vec<usize> = (0..nsup).filter(|&s| parent[s] == usize::MAX).collect();
        let mut top = Vec::new();
        let heaviest = |c: &[usize]| c.iter().copied().enumerate().max_by(|a, b| subtree_work[a.1].total_cmp(&subtree_work[b.1]));
        while let Some((i, root)) = heaviest(&candidates) {
            let split = !children[root].is_empty() && (subtree_work[root] > small_enough || !contiguous(root));
            if !split {
                break;
            }
            candidates.swap_remove(i);
            top.push(root);
            candidates.extend_from_slice(&children[root]);
        }
        // A small subtree that is not contiguous (not met with faer's
        // postordered supernodes) goes to the top with all its supernodes.
        let mut subtrees = Vec::new();
        for &root in &candidates {
            if contiguous(root) {
                subtrees.push(Subtree { supernodes: first[root]..root + 1, rows: begin[first[root]]..end[root] });
            } else {
                let mut stack = vec![root];
                while let Some(s) = stack.pop() {
                    top.push(s);
                    stack.extend_from_slice(&children[s]);
                }
            }
        }
        if subtrees.len() < 2 {
            return sequential;
        }
        subtrees.sort_by_key(|t| t.rows.start);
        top.sort_unstable();
        SupernodalSolve { subtrees, top, threads }
    }

    /// Whether independent subtrees are solved on several threads.
    pub fn is_parallel(&self) -> bool {
        !self.subtrees.is_empty()
    }

    /// `x ← L⁻ᵀ L⁻¹ x` for the factor `values` of `symbolic` (x in the
    /// factor's own, permuted, order).
    pub fn solve<T: FactorScalar>(&self, symbolic: &SymbolicSupernodalCholesky<usize>, values: &[T], x: &mut [T]) {
        let factor = Factor { symbolic, values };
        self.forward(&factor, x);
        self.backward(&factor, x);
    }

    /// `x ← L⁻¹ x`.
    fn forward<T: FactorScalar>(&self, factor: &Factor<T>, x: &mut [T]) {
        let n = x.len();
        if self.is_parallel() {
            let parts = split_rows(x, &self.subtrees);
            let updates = parts
                .into_par_iter()
                .fold(
                    || vec![T::ZERO; n],
                    |mut outside, (subtree, own)| {
                        let mut scratch = Vec::new();
                        for s in subtree.supernodes.clone() {
                            factor.forward_supernode(s, own, subtree.rows.start, &mut outside, &mut scratch, 1);
                        }
                        outside
                    },
                )
                .reduce(
                    || vec![T::ZERO; n],
                    |mut a, b| {
                        for (x, y) in a.iter_mut().zip(&b) {
                            *x += *y;
                        }
                        a
                    },
                );
            for (xi, u) in x.iter_mut().zip(&updates) {
                *xi += *u;
            }
        }
        let mut scratch = Vec::new();
        for &s in &self.top {
            factor.forward_supernode(s, x, 0, &mut [], &mut scratch, self.threads);
        }
    }

    /// `x ← L⁻ᵀ x`.
    fn backward<T: FactorScalar>(&self, factor: &Factor<T>, x: &mut [T]) {
        let mut scratch = Vec::new();
        for &s in self.top.iter().rev() {
            factor.backward_supernode(s, x, 0, &[], &mut scratch, self.threads);
        }
        if self.is_parallel() {
            let ancestors = x.to_vec();
            split_rows(x, &self.subtrees).into_par_iter().for_each(|(subtree, own)| {
                let mut scratch = Vec::new();
                for s in subtree.supernodes.clone().rev() {
                    factor.backward_supernode(s, own, subtree.rows.start, &ancestors, &mut scratch, 1);
                }
            });
        }
    }
}

/// `x`'s rows of each subtree (in increasing row order), as disjoint slices.
fn split_rows<'a, 't, T>(x: &'a mut [T], subtrees: &'t [Subtree]) -> Vec<(&'t Subtree, &'a mut [T])> {
    let mut parts = Vec::with_capacity(subtrees.len());
    let (mut rest, mut at) = (x, 0);
    for subtree in subtrees {
        let (_, tail) = rest.split_at_mut(subtree.rows.start - at);
        let (own, tail) = tail.split_at_mut(subtree.rows.len());
        parts.push((subtree, own));
        rest = tail;
        at = subtree.rows.end;
    }
    parts
}

/// A supernodal factor's structure and values.
struct Factor<'a, T> {
    symbolic: &'a SymbolicSupernodalCholesky<usize>,
    values: &'a [T],
}

impl<T: FactorScalar> Factor<'_, T> {
    /// Supernode `s`: its first column, its pattern and its (k + m) × k block.
    fn supernode(&self, s: usize) -> (usize, usize, &[usize], &[T]) {
        let sym = self.symbolic;
        let start = sym.supernode_begin()[s];
        let k = sym.supernode_end()[s] - start;
        let pattern = sym.supernode(s).pattern();
        let ptr = sym.col_ptr_for_val();
        (start, k, pattern, &self.values[ptr[s]..ptr[s + 1]])
    }

    /// The forward sweep over supernode `s`, whose columns lie in `own`
    /// (rows `lo..lo + own.len()`): solves its diagonal block and subtracts
    /// its columns from the rows below, in `own` or, outside it, from
    /// `outside` (indexed by row; never touched when every row is own).
    /// `threads` > 1 splits the rows of a large block among threads.
    fn forward_supernode(&self, s: usize, own: &mut [T], lo: usize, outside: &mut [T], work: &mut Vec<T>, threads: usize) {
        pulp::Arch::new().dispatch(SupernodeSweep { factor: self, s, own, lo, outside: Outside::Forward(outside), work, threads });
    }

    #[inline(always)]
    fn forward_kernel(&self, s: usize, own: &mut [T], lo: usize, outside: &mut [T], work: &mut Vec<T>, threads: usize) {
        let (start, k, pattern, block) = self.supernode(s);
        let rows = k + pattern.len();
        work.clear();
        work.extend_from_slice(&own[start - lo..start - lo + k]);
        work.resize(rows, T::ZERO);
        let threads = if rows * k >= PARALLEL_ENTRIES { threads } else { 1 };
        for b0 in (0..k).step_by(BLOCK) {
            let b1 = (b0 + BLOCK).min(k);
            for j in b0..b1 {
                let column = &block[j * rows..(j + 1) * rows];
                let xj = work[j] / column[j];
                work[j] = xj;
                for (w, &l) in work[j + 1..b1].iter_mut().zip(&column[j + 1..b1]) {
                    *w -= l * xj;
                }
            }
            let (solved, rest) = work.split_at_mut(b1);
            subtract_columns(block, rows, b0..b1, &solved[b0..b1], b1, rest, threads);
        }
        own[start - lo..start - lo + k].copy_from_slice(&work[..k]);
        let own_rows = lo..lo + own.len();
        for (&row, &w) in pattern.iter().zip(&work[k..]) {
            if own_rows.contains(&row) {
                own[row - lo] += w;
            } else {
                outside[row] += w;
            }
        }
    }

    /// The backward sweep over supernode `s`: its columns' values from the
    /// rows below (in `own`, or, outside it, final in `outside`) and its
    /// diagonal block. `threads` > 1 splits a large block's columns.
    fn backward_supernode(&self, s: usize, own: &mut [T], lo: usize, outside: &[T], work: &mut Vec<T>, threads: usize) {
        pulp::Arch::new().dispatch(SupernodeSweep { factor: self, s, own, lo, outside: Outside::Backward(outside), work, threads });
    }

    #[inline(always)]
    fn backward_kernel(&self, s: usize, own: &mut [T], lo: usize, outside: &[T], work: &mut Vec<T>, threads: usize) {
        let (start, k, pattern, block) = self.supernode(s);
        let rows = k + pattern.len();
        let own_rows = lo..lo + own.len();
        work.clear();
        work.extend_from_slice(&own[start - lo..start - lo + k]);
        work.extend(pattern.iter().map(|&row| if own_rows.contains(&row) { own[row - lo] } else { outside[row] }));
        let threads = if rows * k >= PARALLEL_ENTRIES { threads } else { 1 };
        for b0 in (0..k.div_ceil(BLOCK)).rev().map(|b| b * BLOCK) {
            let b1 = (b0 + BLOCK).min(k);
            let (head, known) = work.split_at_mut(b1);
            dot_columns(block, rows, b0..b1, known, b1, &mut head[b0..b1], threads);
            for j in (b0..b1).rev() {
                let column = &block[j * rows..(j + 1) * rows];
                let sum = dot(&column[j + 1..b1], &head[j + 1..b1]);
                head[j] = (head[j] - sum) / column[j];
            }
        }
        own[start - lo..start - lo + k].copy_from_slice(&work[..k]);
    }
}

// The kernels run compiled for the widest vector instructions the
// processor has (AVX2 where present, else the x86-64 baseline), by `pulp`'s
// run-time dispatch of these `WithSimd` wrappers, whose bodies are inlined
// into the dispatched function (a closure is not, and stays baseline). A
// solve reads each factor entry once for two flops; compiled for the
// baseline (SSE2) its arithmetic, not memory, set the pace: about 10 GB/s
// of f32 entries on the 2-core test machine, on one thread or two, where
// AVX2 reads 13 GB/s on one.

/// Where a supernode's sweep reads or adds the rows outside its thread's own.
enum Outside<'x, T> {
    /// The forward sweep adds its updates there.
    Forward(&'x mut [T]),
    /// The backward sweep reads their final values there.
    Backward(&'x [T]),
}

/// [`Factor::forward_supernode`] or [`Factor::backward_supernode`] under
/// run-time dispatch.
struct SupernodeSweep<'f, 'x, T> {
    factor: &'f Factor<'f, T>,
    s: usize,
    own: &'x mut [T],
    lo: usize,
    outside: Outside<'x, T>,
    work: &'x mut Vec<T>,
    threads: usize,
}

impl<T: FactorScalar> pulp::WithSimd for SupernodeSweep<'_, '_, T> {
    type Output = ();

    #[inline(always)]
    fn with_simd<S: pulp::Simd>(self, _simd: S) {
        let (f, s, own, lo, work, threads) = (self.factor, self.s, self.own, self.lo, self.work, self.threads);
        match self.outside {
            Outside::Forward(outside) => f.forward_kernel(s, own, lo, outside, work, threads),
            Outside::Backward(outside) => f.backward_kernel(s, own, lo, outside, work, threads),
        }
    }
}

/// One thread's share of [`subtract_columns`] or [`dot_columns`].
enum Pass<'a, T> {
    /// [`subtract_rows`] of these arguments.
    Subtract { columns: Range<usize>, x: &'a [T], row0: usize, y: &'a mut [T] },
    /// [`dot_rows`] of these arguments.
    Dot { j0: usize, y: &'a [T], first: usize, x: &'a mut [T] },
}

/// A [`Pass`] over a supernode's block (`rows` rows) under run-time dispatch.
struct BlockPass<'a, T> {
    block: &'a [T],
    rows: usize,
    pass: Pass<'a, T>,
}

impl<T: FactorScalar> pulp::WithSimd for BlockPass<'_, T> {
    type Output = ();

    #[inline(always)]
    fn with_simd<S: pulp::Simd>(self, _simd: S) {
        match self.pass {
            Pass::Subtract { columns, x, row0, y } => subtract_rows(self.block, self.rows, columns, x, row0, y),
            Pass::Dot { j0, y, first, x } => dot_rows(self.block, self.rows, j0, y, first, x),
        }
    }
}

/// Columns per block of the dense kernels: a block's triangle is solved
/// alone, its rectangle below in one pass over the rows.
const BLOCK: usize = 128;

/// Entries of a supernode's block from which its dense kernels are split
/// among threads (smaller blocks cost less than the threads' hand-over).
const PARALLEL_ENTRIES: usize = 1 << 17;

/// `y[i] −= Σ_j L[first + i, j] x[j]` over the columns `columns` of the
/// column-major block (`rows` rows) with `x` their solved values; `y` holds
/// rows `first..`. Four columns per pass over y; rows split among `threads`.
#[inline(always)]
fn subtract_columns<T: FactorScalar>(block: &[T], rows: usize, columns: Range<usize>, x: &[T], first: usize, y: &mut [T], threads: usize) {
    if threads > 1 && y.len() >= 64 * threads {
        let chunk = y.len().div_ceil(threads).next_multiple_of(16);
        y.par_chunks_mut(chunk).enumerate().for_each(|(c, part)| {
            let row0 = first + c * chunk;
            let pass = Pass::Subtract { columns: columns.clone(), x, row0, y: part };
            pulp::Arch::new().dispatch(BlockPass { block, rows, pass });
        });
    } else {
        subtract_rows(block, rows, columns, x, first, y);
    }
}

/// The rows `row0..row0 + y.len()` of [`subtract_columns`].
#[inline(always)]
fn subtract_rows<T: FactorScalar>(block: &[T], rows: usize, columns: Range<usize>, x: &[T], row0: usize, y: &mut [T]) {
    let len = y.len();
    let col = |j: usize| &block[j * rows + row0..j * rows + row0 + len];
    let mut j = columns.start;
    while j + 4 <= columns.end {
        let (c0, c1, c2, c3) = (col(j), col(j + 1), col(j + 2), col(j + 3));
        let i = j - columns.start;
        let (x0, x1, x2, x3) = (x[i], x[i + 1], x[i + 2], x[i + 3]);
        for ((((yr, &l0), &l1), &l2), &l3) in y.iter_mut().zip(c0).zip(c1).zip(c2).zip(c3) {
            *yr -= l0 * x0 + l1 * x1 + l2 * x2 + l3 * x3;
        }
        j += 4;
    }
    while j < columns.end {
        let (c, xj) = (col(j), x[j - columns.start]);
        for (yr, &l) in y.iter_mut().zip(c) {
            *yr -= l * xj;
        }
        j += 1;
    }
}

/// `x[j] −= Σ_i L[first + i, j] y[i]` for the columns `columns` of the
/// column-major block (`rows` rows); `y` holds rows `first..`, `x` the
/// columns' values. Columns split among `threads`.
#[inline(always)]
fn dot_columns<T: FactorScalar>(block: &[T], rows: usize, columns: Range<usize>, y: &[T], first: usize, x: &mut [T], threads: usize) {
    if threads > 1 && x.len() >= 2 * threads {
        let chunk = x.len().div_ceil(threads);
        x.par_chunks_mut(chunk).enumerate().for_each(|(c, part)| {
            let pass = Pass::Dot { j0: columns.start + c * chunk, y, first, x: part };
            pulp::Arch::new().dispatch(BlockPass { block, rows, pass });
        });
    } else {
        dot_rows(block, rows, columns.start, y, first, x);
    }
}

/// The columns `j0..j0 + x.len()` of [`dot_columns`].
#[inline(always)]
fn dot_rows<T: FactorScalar>(block: &[T], rows: usize, j0: usize, y: &[T], first: usize, x: &mut [T]) {
    for (i, xj) in x.iter_mut().enumerate() {
        let j = j0 + i;
        *xj -= dot(&block[j * rows + first..(j + 1) * rows], y);
    }
}

/// `a · b` with sixteen partial sums, which the compiler keeps in vector lanes.
#[inline(always)]
fn dot<T: FactorScalar>(a: &[T], b: &[T]) -> T {
    let mut lanes = [T::ZERO; 16];
    let (a16, b16) = (a.chunks_exact(16), b.chunks_exact(16));
    let (ra, rb) = (a16.remainder(), b16.remainder());
    for (x, y) in a16.zip(b16) {
        for i in 0..16 {
            lanes[i] += x[i] * y[i];
        }
    }
    let mut sum = T::ZERO;
    for (&x, &y) in ra.iter().zip(rb) {
        sum += x * y;
    }
    for i in 0..8 {
        lanes[i] += lanes[i + 8];
    }
    for i in 0..4 {
        lanes[i] += lanes[i + 4];
    }
    sum + (lanes[0] + lanes[2]) + (lanes[1] + lanes[3])
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;
    use faer::dyn_stack::{MemBuffer, MemStack};
    use faer::linalg::cholesky::llt::factor::LltRegularization;
    use faer::sparse::linalg::cholesky::{factorize_symbolic_cholesky, CholeskySymbolicParams, SymbolicCholeskyRaw, SymmetricOrdering};
    use faer::sparse::linalg::SupernodalThreshold;
    use faer::sparse::{SparseColMatRef, SymbolicSparseColMat};
    use faer::{Par, Side};

    /// Lower triangle (column-major pattern and values) of a shifted 7-point
    /// Laplacian on an `m`³ grid with two unknowns per point coupled by a
    /// small off-diagonal term: symmetric positive definite, with a wide
    /// elimination tree.
    pub(crate) fn grid_matrix(m: usize) -> (usize, Vec<usize>, Vec<usize>, Vec<f64>) {
        let idx = |i: usize, j: usize, k: usize| (i * m + j) * m + k;
        let n = 2 * m * m * m;
        let (mut col_ptr, mut rows, mut vals) = (vec![0], Vec::new(), Vec::new());
        for i in 0..m {
            for j in 0..m {
                for k in 0..m {
                    let p = idx(i, j, k);
                    let mut neighbours = Vec::new();
                    if i + 1 < m {
                        neighbours.push(idx(i + 1, j, k));
                    }
                    if j + 1 < m {
                        neighbours.push(idx(i, j + 1, k));
                    }
                    if k + 1 < m {
                        neighbours.push(idx(i, j, k + 1));
                    }
                    neighbours.sort_unstable();
                    for c in 0..2 {
                        let col = 2 * p + c;
                        rows.push(col);
                        vals.push(6.5 + c as f64 + 0.01 * (p % 7) as f64);
                        if c == 0 {
                            rows.push(col + 1);
                            vals.push(0.3);
                        }
                        for &q in &neighbours {
                            rows.push(2 * q + c);
                            vals.push(-1.0);
                        }
                        col_ptr.push(rows.len());
                    }
                }
            }
        }
        (n, col_ptr, rows, vals)
    }

    /// The tree-parallel sweeps give faer's own supernodal solve (the
    /// reference: faer's sequential `LltRef::solve_in_place_with_conj`) on
    /// one to three threads, in f64 to round-off and in f32 to its
    /// round-off, with a schedule that really is split for two threads.
    #[test]
    fn parallel_sweeps_match_faer_solve() {
        let (n, col_ptr, rows, vals) = grid_matrix(9);
        let pattern = SymbolicSparseColMat::new_checked(n, n, col_ptr, None, rows);
        let params =
            CholeskySymbolicParams { supernodal_flop_ratio_threshold: SupernodalThreshold::FORCE_SUPERNODAL, ..Default::default() };
        let symbolic = factorize_symbolic_cholesky(pattern.as_ref(), Side::Lower, SymmetricOrdering::Amd, params).unwrap();
        let SymbolicCholeskyRaw::Supernodal(sup) = symbolic.raw() else { panic!("supernodal factor expected") };
        let mut mem = MemBuffer::new(
            symbolic
                .factorize_numeric_llt_scratch::<f64>(Par::Seq, Default::default())
                .or(symbolic.solve_in_place_scratch::<f64>(1, Par::Seq)),
        );
        let mut l = vec![0.0; symbolic.len_val()];
        let a = SparseColMatRef::new(pattern.as_ref(), &vals[..]);
        symbolic
            .factorize_numeric_llt::<f64>(
                &mut l,
                a,
                Side::Lower,
                LltRegularization::default(),
                Par::Seq,
                MemStack::new(&mut mem),
                Default::default(),
            )
            .unwrap();
        let l32: Vec<f32> = l.iter().map(|&v| v as f32).collect();
        let b: Vec<f64> = (0..n).map(|i| ((i * 37 % 101) as f64 - 50.0) / 17.0).collect();
        // faer's solve in the factor's permuted order (no permutation applied).
        let mut reference = |x: &mut [f64]| {
            let llt = faer::sparse::linalg::cholesky::supernodal::SupernodalLltRef::new(sup, &l[..]);
            llt.solve_in_place_with_conj(
                faer::Conj::No,
                faer::MatMut::from_column_major_slice_mut(x, n, 1),
                Par::Seq,
                MemStack::new(&mut mem),
            );
        };
        let mut expected = b.clone();
        reference(&mut expected);
        let scale = expected.iter().fold(0f64, |a, v| a.max(v.abs()));
        assert!(SupernodalSolve::new(sup, 2).is_parallel(), "two threads should get independent subtrees");
        assert!(!SupernodalSolve::new(sup, 1).is_parallel());
        for threads in 1..=3 {
            let schedule = SupernodalSolve::new(sup, threads);
            let mut x = b.clone();
            schedule.solve(sup, &l, &mut x);
            let err = x.iter().zip(&expected).fold(0f64, |a, (p, q)| a.max((p - q).abs())) / scale;
            assert!(err < 1e-13, "f64, {threads} threads: relative difference {err:e}");
            let mut x32: Vec<f32> = b.iter().map(|&v| v as f32).collect();
            schedule.solve(sup, &l32, &mut x32);
            let err = x32.iter().zip(&expected).fold(0f64, |a, (p, q)| a.max((f64::from(*p) - q).abs())) / scale;
            assert!(err < 1e-5, "f32, {threads} threads: relative difference {err:e}");
        }
    }
}
