//! The complex linear system of a harmonic stage as one real symmetric
//! system of twice the size. With the complex tangent K* = K′ + i K″ (both
//! symmetric, K′ possibly with a skew part from friction) and the complex
//! load f_r + i f_i, the equations K* x = f are
//!
//! ```text
//! [  K′   −K″ ] [x_r]   [  f_r ]
//! [ −K″   −K′ ] [x_i] = [ −f_i ]
//! ```
//!
//! (the second block row is the imaginary part times −1). The matrix is
//! symmetric quasi-definite when K′ is positive definite, so an LDLᵀ
//! factorization exists for every symmetric ordering (R.J. Vanderbei, 1995,
//! "Symmetric quasidefinite matrices", SIAM J. Optim. 5:100–113), and the
//! run's sparse solver, orderings and fallbacks apply unchanged.

use crate::assembly::Pattern;
use crate::error::SolveError;
use crate::linear::{self, LinearSettings, LinearSolver, SymmetricPattern, SystemMatrix};

/// Where one entry of the doubled matrix comes from (a slot of the tangent's pattern).
#[derive(Debug, Clone, Copy)]
enum Source {
    /// K′ at this slot (upper-left block).
    Storage(usize),
    /// −K″ at this slot (lower-left block; both triangles of K″ appear).
    NegLoss(usize),
    /// −K′ at this slot (lower-right block).
    NegStorage(usize),
}

/// The doubled system's pattern, its solver, and the map from the tangent's slots.
pub struct BlockSystem {
    n: usize,
    sources: Vec<Source>,
    /// Block slot of each tangent slot in the upper-left and lower-right blocks.
    upper_left: Vec<usize>,
    lower_right: Vec<usize>,
    values: Vec<f64>,
    skew: Vec<(usize, f64)>,
    linear: Box<dyn LinearSolver>,
}

impl BlockSystem {
    /// The doubled pattern of `pattern` (lower triangle, CSC), analysed once.
    pub fn new(pattern: &Pattern, settings: &LinearSettings) -> Result<Self, SolveError> {
        let n = pattern.n;
        // Entries above the diagonal of K″, per column, from the stored lower triangle.
        let mut upper: Vec<Vec<(usize, usize)>> = vec![Vec::new(); n];
        for c in 0..n {
            for s in pattern.col_ptr[c]..pattern.col_ptr[c + 1] {
                let r = pattern.row_idx[s];
                if r > c {
                    upper[r].push((c, s));
                }
            }
        }
        let mut col_ptr = vec![0];
        let (mut row_idx, mut sources) = (Vec::new(), Vec::new());
        let nnz = pattern.row_idx.len();
        let (mut upper_left, mut lower_right) = (vec![0; nnz], vec![0; nnz]);
        for c in 0..n {
            for s in pattern.col_ptr[c]..pattern.col_ptr[c + 1] {
                upper_left[s] = row_idx.len();
                row_idx.push(pattern.row_idx[s]);
                sources.push(Source::Storage(s));
            }
            for &(r, s) in &upper[c] {
                row_idx.push(n + r);
                sources.push(Source::NegLoss(s));
            }
            for s in pattern.col_ptr[c]..pattern.col_ptr[c + 1] {
                row_idx.push(n + pattern.row_idx[s]);
                sources.push(Source::NegLoss(s));
            }
            col_ptr.push(row_idx.len());
        }
        for c in 0..n {
            for s in pattern.col_ptr[c]..pattern.col_ptr[c + 1] {
                lower_right[s] = row_idx.len();
                row_idx.push(n + pattern.row_idx[s]);
                sources.push(Source::NegStorage(s));
            }
            col_ptr.push(row_idx.len());
        }
        let eq_node: Vec<usize> = pattern.eq_node.iter().chain(&pattern.eq_node).copied().collect();
        let doubled = SymmetricPattern { n: 2 * n, col_ptr: &col_ptr, row_idx: &row_idx, eq_node: &eq_node, negative: 0 };
        let linear = linear::analyse(&doubled, settings)?;
        let values = vec![0.0; sources.len()];
        Ok(BlockSystem { n, sources, upper_left, lower_right, values, skew: Vec::new(), linear })
    }

    /// Factorizes the doubled matrix of K′ (`storage`, lower triangle in
    /// the tangent's slots, with its skew entries) and K″ (`loss`).
    pub fn factorize(&mut self, storage: &[f64], storage_skew: &[(usize, f64)], loss: &[f64]) -> Result<(), SolveError> {
        for (v, src) in self.values.iter_mut().zip(&self.sources) {
            *v = match *src {
                Source::Storage(s) => storage[s],
                Source::NegLoss(s) => -loss[s],
                Source::NegStorage(s) => -storage[s],
            };
        }
        self.skew.clear();
        for &(s, w) in storage_skew {
            self.skew.push((self.upper_left[s], w));
            self.skew.push((self.lower_right[s], -w));
        }
        self.linear.factorize(SystemMatrix { lower: &self.values, skew: &self.skew })?;
        Ok(())
    }

    /// Solves K* x = f_r + i f_i with the last factorization; returns (x_r, x_i).
    pub fn solve(&mut self, f_real: &[f64], f_imag: &[f64]) -> Result<(Vec<f64>, Vec<f64>), SolveError> {
        let mut x: Vec<f64> = f_real.iter().copied().chain(f_imag.iter().map(|v| -v)).collect();
        self.linear.solve(&mut x)?;
        let imag = x.split_off(self.n);
        Ok((x, imag))
    }
}
