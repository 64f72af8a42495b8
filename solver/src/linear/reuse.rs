//! Factorization reuse: a backend wrapped so that a system the caller lets
//! it reuse for is solved by a Krylov method preconditioned with the last
//! factor (conjugate gradients when the system is symmetric and the factor
//! a Cholesky one, GMRES otherwise), to the relative residual of
//! [`FactorReuse::tolerance`]. When that does not converge within
//! [`FactorReuse::max_iterations`] the system is factorized and solved
//! directly (a Krylov refactorization). Between the Newton iterations of
//! one increment the tangent changes little, so a few iterations, each a
//! product with the matrix and a pair of triangular solves, replace a
//! factorization.

use std::time::Instant;

use super::krylov::{conjugate_gradients, gmres, Budget, KrylovOutcome};
use super::{
    FactorKind, FactorReuse, Factorization, LinearError, LinearSettings, LinearSolver, LinearStats, Reuse, SymmetricPattern, SystemMatrix,
};

/// Attempts to skip after the second failed one in a row (doubled for
/// each further failure in a row, up to 8 times this). After a single
/// failure nothing is skipped: the factor then made is of the very tangent
/// that failed, the best preconditioner for the next system (on the
/// 156k-equation mount this saved one of ten factorizations).
pub const BACK_OFF: usize = 1;

/// Share of a factorization's cost, in Krylov iterations, that one reuse
/// may spend (see `Reusing::budget`).
pub const BUDGET_SHARE: f64 = 0.5;

/// A [`LinearSolver`] that may solve on its kept factor (see the module).
#[derive(Debug)]
pub struct Reusing<S> {
    inner: S,
    settings: FactorReuse,
    col_ptr: Vec<usize>,
    row_idx: Vec<usize>,
    /// The summary of the kept factorization.
    kept: Option<Factorization>,
    /// Attempts still to be skipped after failures, and the failures in a row.
    skip: usize,
    failures: u32,
    /// The inner solver's statistics with this wrapper's counters.
    stats: LinearStats,
}

impl<S: LinearSolver> Reusing<S> {
    /// Wraps `inner`, analysed for `pattern`.
    pub fn new(inner: S, pattern: &SymmetricPattern, settings: FactorReuse) -> Self {
        let stats = inner.stats().clone();
        Reusing {
            inner,
            settings,
            col_ptr: pattern.col_ptr.to_vec(),
            row_idx: pattern.row_idx.to_vec(),
            kept: None,
            skip: 0,
            failures: 0,
            stats,
        }
    }

    /// Copies the inner solver's statistics, keeping this wrapper's counters.
    fn sync(&mut self) {
        let own = self.stats.clone();
        self.stats = self.inner.stats().clone();
        self.stats.reused_factorizations = own.reused_factorizations;
        self.stats.krylov_iterations = own.krylov_iterations;
        self.stats.krylov_refactorizations = own.krylov_refactorizations;
        self.stats.krylov_time = own.krylov_time;
    }

    /// Whether `reuse` lets the kept factor serve, and then the tolerance
    /// (the caller's, or the settings' floor if that is looser) and the
    /// iteration budget. After a second failed attempt in a row the next
    /// [`BACK_OFF`] attempts (doubling with every further failure in a row)
    /// factorize at once: where the kept factor is a poor preconditioner (a nearly
    /// incompressible part whose tangent moves much from one iteration to
    /// the next) the Krylov iterations then stop wasting time. The decision
    /// rests on the iterations alone, so a run takes the same path on any
    /// machine and under any load.
    fn plan(&self, reuse: Reuse) -> Option<(f64, usize)> {
        match reuse {
            Reuse::Kept { tolerance, last } if self.settings.enabled && self.kept.is_some() && self.skip == 0 => {
                Some((tolerance.max(self.settings.tolerance), self.budget(last)))
            }
            _ => None,
        }
    }

    /// Krylov iterations a reuse may take: the settings' count, or more for
    /// a large factor, whose factorization costs more solves with it: about
    /// √(flops / entries) of them (Σ colcount² over the factor entries; on
    /// the 2-core test machine a factorization took 10, 19 and 57 iterations'
    /// time at 8k, 45k and 470k equations, where this is 16, 31 and 67).
    /// [`BUDGET_SHARE`] of that, so a factorization, whose fresh factor also
    /// preconditions the next systems better, still wins a close call; all
    /// of it for the `last` system the factor serves, where a fresh factor
    /// would precondition nothing more (on the 156k-equation mount the
    /// closing system of an increment of 0.25 converges at about 0.7 an
    /// iteration and needs some 25 iterations, a factorization's cost
    /// being about 53). Solves that converge too slowly for it stop early
    /// ([`super::krylov::out_of_reach`]).
    fn budget(&self, last: bool) -> usize {
        let s = self.inner.stats();
        let solves_per_factorization = (s.factor_flops / s.nnz_factor.max(1) as f64).sqrt();
        let share = if last { 1.0 } else { BUDGET_SHARE };
        self.settings.max_iterations.max((share * solves_per_factorization) as usize)
    }

    /// Tries the Krylov solve on the kept factor to `tolerance` in at most
    /// `max` iterations; `Some` summary when it converged (`rhs` then holds
    /// the solution).
    fn iterate(
        &mut self,
        kept: Factorization,
        matrix: SystemMatrix,
        rhs: &mut [f64],
        (tolerance, max): (f64, usize),
    ) -> Result<Option<Factorization>, LinearError> {
        let t = Instant::now();
        let mut x = vec![0.0; rhs.len()];
        let (col_ptr, row_idx) = (&self.col_ptr, &self.row_idx);
        let mut apply = |v: &[f64], y: &mut [f64]| multiply(col_ptr, row_idx, matrix, v, y);
        let inner = &mut self.inner;
        let mut precondition = |v: &mut [f64]| inner.precondition(v);
        let symmetric = matrix.skew.is_empty() && kept.kind == FactorKind::Cholesky;
        // A preconditioner solve that fails (a singular kept factor) is a
        // failed reuse, not a failed system.
        let outcome = if symmetric {
            conjugate_gradients(&mut apply, &mut precondition, rhs, &mut x, tolerance, Budget::Projected(max))
        } else {
            gmres(&mut apply, &mut precondition, rhs, &mut x, tolerance, Budget::Projected(max))
        }
        .unwrap_or(KrylovOutcome { converged: false, iterations: 0, relative_residual: f64::NAN });
        self.stats.krylov_iterations += outcome.iterations;
        self.stats.krylov_time += t.elapsed().as_secs_f64();
        if !(outcome.converged && x.iter().all(|v| v.is_finite())) {
            return Ok(None);
        }
        rhs.copy_from_slice(&x);
        self.stats.reused_factorizations += 1;
        // The answer rests on the kept factor; it was reported when made.
        Ok(Some(Factorization { fallback: false, ..kept }))
    }
}

/// `y = A x` for the symmetric lower triangle `matrix.lower` in the pattern
/// (`col_ptr`, `row_idx`) plus its skew-symmetric entries.
pub(super) fn multiply(col_ptr: &[usize], row_idx: &[usize], matrix: SystemMatrix, x: &[f64], y: &mut [f64]) {
    y.fill(0.0);
    for c in 0..col_ptr.len() - 1 {
        let xc = x[c];
        let mut acc = 0.0;
        for s in col_ptr[c]..col_ptr[c + 1] {
            let (r, v) = (row_idx[s], matrix.lower[s]);
            y[r] += v * xc;
            if r != c {
                acc += v * x[r];
            }
        }
        y[c] += acc;
    }
    for &(slot, w) in matrix.skew {
        let (r, c) = (row_idx[slot], col_ptr.partition_point(|&p| p <= slot) - 1);
        y[r] += w * x[c];
        y[c] -= w * x[r];
    }
}

impl<S: LinearSolver> LinearSolver for Reusing<S> {
    fn analyse(pattern: &SymmetricPattern, settings: &LinearSettings) -> Result<Self, LinearError> {
        Ok(Reusing::new(S::analyse(pattern, settings)?, pattern, settings.reuse))
    }

    fn factorize(&mut self, matrix: SystemMatrix) -> Result<Factorization, LinearError> {
        self.kept = None;
        let factorization = self.inner.factorize(matrix);
        self.kept = factorization.as_ref().ok().copied();
        self.sync();
        factorization
    }

    fn solve(&mut self, rhs: &mut [f64]) -> Result<(), LinearError> {
        let solved = self.inner.solve(rhs);
        self.sync();
        solved
    }

    fn solve_to(&mut self, rhs: &mut [f64], tolerance: f64) -> Result<(), LinearError> {
        let solved = self.inner.solve_to(rhs, tolerance);
        self.sync();
        solved
    }

    fn solve_system(&mut self, matrix: SystemMatrix, rhs: &mut [f64], reuse: Reuse) -> Result<Factorization, LinearError> {
        if matches!(reuse, Reuse::Kept { .. }) && self.skip > 0 {
            self.skip -= 1;
        } else if let (Some(kept), Some(plan)) = (self.kept, self.plan(reuse)) {
            let b = rhs.to_vec();
            if let Some(factorization) = self.iterate(kept, matrix, rhs, plan)? {
                self.failures = 0;
                self.sync();
                return Ok(factorization);
            }
            self.stats.krylov_refactorizations += 1;
            // The factor made now is this very tangent's, a better
            // preconditioner for the next system than the one that failed:
            // the next attempt goes ahead; failures in a row back off.
            self.skip = if self.failures == 0 { 0 } else { BACK_OFF << (self.failures - 1).min(3) };
            self.failures += 1;
            rhs.copy_from_slice(&b);
        }
        let factorization = self.factorize(matrix)?;
        self.solve_to(rhs, reuse.tolerance())?;
        Ok(factorization)
    }

    fn stats(&self) -> &LinearStats {
        &self.stats
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::linear::{FaerDirect, Ordering};

    /// A symmetric positive-definite tridiagonal system of `n` equations
    /// (the 1-D Laplacian plus `shift` on the diagonal) in lower-triangle form.
    fn laplacian(n: usize, shift: f64) -> (Vec<usize>, Vec<usize>, Vec<f64>) {
        let (mut col_ptr, mut row_idx, mut values) = (vec![0], Vec::new(), Vec::new());
        for c in 0..n {
            row_idx.push(c);
            values.push(2.0 + shift);
            if c + 1 < n {
                row_idx.push(c + 1);
                values.push(-1.0);
            }
            col_ptr.push(row_idx.len());
        }
        (col_ptr, row_idx, values)
    }

    /// Residual `|b − A x| / |b|` through the module's own product, checked
    /// against a dense product first.
    fn relative_residual(col_ptr: &[usize], row_idx: &[usize], m: SystemMatrix, x: &[f64], b: &[f64]) -> f64 {
        let mut ax = vec![0.0; x.len()];
        multiply(col_ptr, row_idx, m, x, &mut ax);
        let r: f64 = ax.iter().zip(b).map(|(a, b)| (a - b).powi(2)).sum::<f64>().sqrt();
        r / b.iter().map(|v| v * v).sum::<f64>().sqrt()
    }

    /// The sparse product of the lower triangle with skew entries equals
    /// the dense matrix it stands for.
    #[test]
    fn product_with_skew_entries_matches_the_dense_matrix() {
        let n = 5;
        let (col_ptr, row_idx, lower) = laplacian(n, 0.5);
        // Slot 1 is (row 1, col 0): +0.3 there, −0.3 at (0, 1).
        let skew = [(1usize, 0.3)];
        let m = SystemMatrix { lower: &lower, skew: &skew };
        let x: Vec<f64> = (0..n).map(|i| 1.0 + i as f64).collect();
        let mut y = vec![0.0; n];
        multiply(&col_ptr, &row_idx, m, &x, &mut y);
        let dense = |i: usize, j: usize| -> f64 {
            let sym = match i.abs_diff(j) {
                0 => 2.5,
                1 => -1.0,
                _ => 0.0,
            };
            sym + if (i, j) == (1, 0) {
                0.3
            } else if (i, j) == (0, 1) {
                -0.3
            } else {
                0.0
            }
        };
        for i in 0..n {
            let expected: f64 = (0..n).map(|j| dense(i, j) * x[j]).sum();
            assert!((y[i] - expected).abs() < 1e-14, "row {i}: {} vs {expected}", y[i]);
        }
    }

    fn solver(n: usize, col_ptr: &[usize], row_idx: &[usize], reuse: FactorReuse) -> Reusing<FaerDirect> {
        let eq_node: Vec<usize> = (0..n).collect();
        let pattern = SymmetricPattern { n, col_ptr, row_idx, eq_node: &eq_node, negative: 0 };
        let settings = LinearSettings { ordering: Ordering::Amd, reuse, ..Default::default() };
        Reusing::analyse(&pattern, &settings).unwrap()
    }

    /// A matrix close to the factorized one is solved on the kept factor
    /// (conjugate gradients, then GMRES once a skew part appears) to the
    /// tolerance, without a new factorization; one far from it (a factor of
    /// a much stiffer matrix is a poor preconditioner) exhausts the
    /// iterations and is factorized, and the answer is still right.
    #[test]
    fn reuse_iterates_on_a_near_matrix_and_refactorizes_when_the_factor_is_poor() {
        let n = 200;
        let reuse = FactorReuse { max_iterations: 10, ..Default::default() };
        let allow = Reuse::Kept { tolerance: 1e-10, last: false };
        let (col_ptr, row_idx, first) = laplacian(n, 0.1);
        let mut s = solver(n, &col_ptr, &row_idx, reuse);
        let b: Vec<f64> = (0..n).map(|i| ((i * 7 % 5) as f64) - 1.5).collect();
        let mut x = b.clone();
        let f = s.solve_system(SystemMatrix { lower: &first, skew: &[] }, &mut x, allow).unwrap();
        assert_eq!((f.kind, s.stats().numeric_count, s.stats().reused_factorizations), (FactorKind::Cholesky, 1, 0));

        // 2 % stiffer: reused, by conjugate gradients.
        let near: Vec<f64> = first.iter().map(|v| 1.02 * v).collect();
        let m = SystemMatrix { lower: &near, skew: &[] };
        let mut x = b.clone();
        let f = s.solve_system(m, &mut x, allow).unwrap();
        assert!(f.positive_definite);
        assert_eq!((s.stats().numeric_count, s.stats().reused_factorizations), (1, 1));
        assert!(relative_residual(&col_ptr, &row_idx, m, &x, &b) < 1e-9);

        // A skew part: GMRES on the same factor.
        let skew = [(1usize, 0.01), (3, -0.02)];
        let m = SystemMatrix { lower: &near, skew: &skew };
        let mut x = b.clone();
        s.solve_system(m, &mut x, allow).unwrap();
        assert_eq!((s.stats().numeric_count, s.stats().reused_factorizations), (1, 2));
        assert!(relative_residual(&col_ptr, &row_idx, m, &x, &b) < 1e-9);

        // Not allowed: factorized.
        let mut x = b.clone();
        s.solve_system(SystemMatrix { lower: &near, skew: &[] }, &mut x, Reuse::Fresh { tolerance: 0.0 }).unwrap();
        assert_eq!(s.stats().numeric_count, 2);

        // The factor of `near` against a matrix whose shift is 100× smaller:
        // its smooth modes are far off, so 10 iterations do not reach 1e-10.
        let (_, _, soft) = laplacian(n, 1e-3);
        let m = SystemMatrix { lower: &soft, skew: &[] };
        let mut x = b.clone();
        s.solve_system(m, &mut x, allow).unwrap();
        let st = s.stats();
        assert_eq!((st.numeric_count, st.reused_factorizations, st.krylov_refactorizations), (3, 2, 1));
        assert!(st.krylov_iterations >= 10);
        assert!(relative_residual(&col_ptr, &row_idx, m, &x, &b) < 1e-12);
    }

    /// The budget is a share of a factorization's cost counted in solves,
    /// √(flops / entries) of the factor, and all of it for the last system
    /// a factor serves (definition of the rule; the cost ratio was measured
    /// on the test machine, see `Reusing::budget`).
    #[test]
    fn the_last_system_on_a_factor_may_spend_a_whole_factorization() {
        let (n, col_ptr, row_idx, values) = crate::linear::supernodal_solve::tests::grid_matrix(40);
        let mut s = solver(n, &col_ptr, &row_idx, FactorReuse { max_iterations: 1, ..Default::default() });
        let mut x = vec![1.0; n];
        s.solve_system(SystemMatrix { lower: &values, skew: &[] }, &mut x, Reuse::Fresh { tolerance: 0.0 }).unwrap();
        let cost = (s.stats().factor_flops / s.stats().nnz_factor as f64).sqrt();
        assert!(cost > 4.0, "{cost}");
        let plan = |last| s.plan(Reuse::Kept { tolerance: 1e-8, last }).unwrap().1;
        assert_eq!(plan(false), (BUDGET_SHARE * cost) as usize);
        assert_eq!(plan(true), cost as usize);
    }

    /// The kept factor serves at the caller's tolerance or the settings'
    /// floor, whichever is looser; after a failed attempt the next one
    /// still tries (on the factor just made), after two failures in a row
    /// the next one factorizes at once, after three the next two.
    #[test]
    fn reuse_tolerance_and_back_off() {
        let n = 200;
        let (col_ptr, row_idx, first) = laplacian(n, 0.1);
        let mut s = solver(n, &col_ptr, &row_idx, FactorReuse { max_iterations: 5, ..Default::default() });
        let loose = Reuse::Kept { tolerance: 1e-4, last: false };
        // Nothing kept yet: always factorize.
        assert_eq!(s.plan(loose), None);
        let b: Vec<f64> = (0..n).map(|i| ((i * 7 % 5) as f64) - 1.5).collect();
        let mut x = b.clone();
        s.solve_system(SystemMatrix { lower: &first, skew: &[] }, &mut x, Reuse::Fresh { tolerance: 0.0 }).unwrap();
        assert_eq!(s.plan(loose), Some((1e-4, 5)));
        assert_eq!(s.plan(Reuse::Kept { tolerance: 1e-12, last: false }), Some((1e-10, 5)));
        assert_eq!(s.plan(Reuse::Fresh { tolerance: 0.0 }), None);
        // A loose tolerance is met in fewer iterations than a tight one.
        let (_, _, near) = laplacian(n, 0.098);
        let m = SystemMatrix { lower: &near, skew: &[] };
        let mut x = b.clone();
        s.solve_system(m, &mut x, loose).unwrap();
        let loose_iterations = s.stats().krylov_iterations;
        assert!(relative_residual(&col_ptr, &row_idx, m, &x, &b) < 1e-4);
        let mut x = b.clone();
        s.solve_system(m, &mut x, Reuse::Kept { tolerance: 1e-12, last: false }).unwrap();
        assert!(s.stats().krylov_iterations - loose_iterations > loose_iterations, "{:?}", s.stats());
        assert_eq!((s.stats().numeric_count, s.stats().reused_factorizations), (1, 2));
        // A matrix the kept factor preconditions poorly: 5 iterations fail
        // (cond(P⁻¹A) ≈ 80 between shifts 0.1 and 0.001).
        let (_, _, soft) = laplacian(n, 1e-3);
        let poor = SystemMatrix { lower: &soft, skew: &[] };
        let stiff = SystemMatrix { lower: &first, skew: &[] };
        let tight = Reuse::Kept { tolerance: 1e-10, last: false };
        let count = |s: &Reusing<FaerDirect>| (s.stats().numeric_count, s.stats().krylov_refactorizations);
        let solve = |s: &mut Reusing<FaerDirect>, m: SystemMatrix, reuse: Reuse| {
            let mut x = b.clone();
            s.solve_system(m, &mut x, reuse).unwrap();
            assert!(relative_residual(&col_ptr, &row_idx, m, &x, &b) < 1e-4);
        };
        solve(&mut s, poor, tight);
        assert_eq!(count(&s), (2, 1));
        // One failure: the next system goes ahead on the factor just made
        // (here its own matrix, so it converges), which resets the count.
        solve(&mut s, poor, tight);
        assert_eq!((count(&s), s.stats().reused_factorizations), ((2, 1), 3));
        // Two failures in a row (each matrix poor for the other's factor):
        // the next allowed system factorizes without trying.
        solve(&mut s, stiff, tight);
        solve(&mut s, poor, tight);
        assert_eq!(count(&s), (4, 3));
        let before = s.stats().krylov_iterations;
        solve(&mut s, m, loose);
        assert_eq!((count(&s), s.stats().krylov_iterations), ((5, 3), before));
        // A third failure in a row: two systems skip.
        solve(&mut s, poor, tight);
        assert_eq!(count(&s), (6, 4));
        for expected in [7, 8] {
            solve(&mut s, m, loose);
            assert_eq!(count(&s), (expected, 4));
        }
        // Then it tries again, and a success resets the back-off.
        let reused = s.stats().reused_factorizations;
        solve(&mut s, m, loose);
        assert_eq!((count(&s), s.stats().reused_factorizations), ((8, 4), reused + 1));
    }
}
