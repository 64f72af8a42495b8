//! The linear-solver interface of the Newton driver, and its backends.
//!
//! A [`LinearSolver`] is built for one sparsity pattern ([`LinearSolver::analyse`]:
//! ordering, symbolic factorization, workspaces), then factorises the tangent
//! of every Newton iteration ([`LinearSolver::factorize`]) and solves with it
//! ([`LinearSolver::solve`]), keeping [`LinearStats`]. The driver sees only
//! this interface and the [`Factorization`] summary it returns (whether the
//! matrix was positive definite, whether a fallback was needed); it never
//! asks which factorization ran. One backend exists: [`FaerDirect`], faer's
//! sparse Cholesky with LDLᵀ and LU fallbacks ([`faer_direct`]). An
//! iterative or distributed backend implements the same trait and is chosen
//! in [`analyse`] from [`LinearSettings`]. [`reuse::Reusing`] wraps a
//! backend so that [`LinearSolver::solve_system`] may solve on the kept
//! factor with a Krylov method ([`krylov`]) instead of factorizing.

use thiserror::Error;

pub mod faer_direct;
pub mod krylov;
pub mod nested_dissection;
pub mod reuse;
pub mod supernodal_solve;

pub use faer_direct::FaerDirect;
pub use reuse::Reusing;

pub use crate::model::{FactorPrecision, FactorReuse, LinearSettings, Ordering, Threads};

/// Estimated factor flops (Σ colcount², [`LinearStats::factor_flops`]) from
/// which [`Threads::Auto`] factorizes on several threads. Measured on a
/// 2-core machine: a 7.9k-equation block (2.9e8) factorized in 20 ms on one
/// thread and 51 ms on two; at 45k equations (about 6e9) one or two threads
/// took the same time; the 156k-equation mount of
/// `benchmarks/jobs/mount-150k.toml` (208 M factor entries) took 20.1 s on
/// one thread and 14.0 s on two (quiet machine).
pub const PARALLEL_FLOPS: f64 = 1e10;

/// Estimated factor flops (Σ colcount², [`LinearStats::factor_flops`]) from
/// which [`FactorPrecision::Auto`] factorizes in single precision (a
/// symmetric positive-definite system only), each solve refined in double
/// precision by conjugate gradients to [`REFINED_TOLERANCE`]. Measured on
/// the 45k-equation block (2.5e10, loaded 2-core machine): the single
/// factor took 0.5–0.7 of the double one's time, and three refinement
/// iterations reached a relative residual of 7e-14; at 7.9k equations
/// (2.9e8) both factors took the same time.
pub const SINGLE_PRECISION_FLOPS: f64 = 1e10;

/// Relative residual `|b − A x| / |b|` to which a solve on a
/// single-precision factor is refined.
pub const REFINED_TOLERANCE: f64 = 1e-12;

/// Refinement iterations before a single-precision factor is given up and
/// the matrix factorized in double precision.
pub const REFINEMENT_ITERATIONS: usize = 10;

/// Fewest hardware threads with which [`Threads::Auto`] goes parallel.
pub const PARALLEL_MIN_THREADS: usize = 2;

/// Why the linear solve failed.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum LinearError {
    /// A custom ordering whose length is not the number of equations.
    #[error("custom ordering has {given} entries for {equations} equations")]
    OrderingLength {
        /// Entries of the given permutation.
        given: usize,
        /// Equations of the system.
        equations: usize,
    },
    /// METIS rejected the node graph.
    #[error("METIS graph: {0}")]
    Metis(String),
    /// A step of the sparse factorization failed inside faer.
    #[error("{step}: {detail}")]
    Factorization {
        /// The step (symbolic Cholesky, LU pattern, LU factorization, …).
        step: &'static str,
        /// faer's report.
        detail: String,
    },
    /// The factor's workspace could not be allocated.
    #[error("out of memory for the factor workspace")]
    OutOfMemory,
    /// `solve` called before any factorization.
    #[error("solve before factorization")]
    NotFactored,
    /// The solution has NaN or infinite entries: the matrix is singular.
    #[error("solution is not finite (singular tangent)")]
    NotFinite,
    /// Fewer negative pivots than pressure unknowns: the volumetric block
    /// of a mixed tangent is not negative definite (a law past its range,
    /// or a factorization broken by round-off), so the step is not trusted.
    #[error("the tangent has {found} negative pivots but {expected} pressure unknowns (inertia check)")]
    Inertia {
        /// Negative pivots a stable mixed tangent has (its pressure unknowns).
        expected: usize,
        /// Negative pivots found.
        found: usize,
    },
}

impl Factorization {
    /// The inertia check of a mixed system with `expected` pressure
    /// unknowns: fewer negative pivots than that is an error (the step is
    /// not trusted); more means the displacements lost stability (a limit
    /// or bifurcation point), which, like an indefinite tangent of a
    /// displacement model, is reported through `fallback` and solved.
    pub fn check_inertia(&self, expected: usize) -> Result<(), LinearError> {
        match self.negative_pivots {
            Some(found) if found < expected => Err(LinearError::Inertia { expected, found }),
            _ => Ok(()),
        }
    }
}

/// The sparsity of a symmetric system as the solver analyses it: the lower
/// triangle in compressed columns (rows sorted within each column), and the
/// mesh node of each equation, which node-level orderings keep together.
#[derive(Debug, Clone, Copy)]
pub struct SymmetricPattern<'a> {
    /// Number of equations.
    pub n: usize,
    /// Start of each column in `row_idx` (length n + 1).
    pub col_ptr: &'a [usize],
    /// Row of each stored entry.
    pub row_idx: &'a [usize],
    /// Mesh node of each equation.
    pub eq_node: &'a [usize],
    /// Equations expected to give a negative pivot: the pressure unknowns
    /// of a mixed system, whose matrix is then symmetric indefinite with
    /// this many negative eigenvalues while the displacements are stable.
    /// With any, the solver goes straight to LDLᵀ and counts the inertia.
    pub negative: usize,
}

impl SymmetricPattern<'_> {
    /// Stored entries of the lower triangle.
    pub fn nnz(&self) -> usize {
        self.row_idx.len()
    }
}

/// The matrix of one Newton system: the symmetric part of the tangent as
/// lower-triangle values in the analysed pattern's order, plus skew-symmetric
/// entries `(slot, w)` (w at the slot's below-diagonal position, −w at its
/// mirror), as friction produces. Empty `skew`: a symmetric matrix.
#[derive(Debug, Clone, Copy)]
pub struct SystemMatrix<'a> {
    /// Lower-triangle values of the symmetric part, one per pattern entry.
    pub lower: &'a [f64],
    /// Skew-symmetric entries by lower-triangle slot.
    pub skew: &'a [(usize, f64)],
}

/// What a numeric factorization produced, as the driver needs to know it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Factorization {
    /// The method used (for reports).
    pub kind: FactorKind,
    /// The matrix was found symmetric positive definite, so the Newton
    /// direction descends the energy and a line search on it is sound.
    pub positive_definite: bool,
    /// The preferred method failed and a more general one was used (an
    /// indefinite tangent: worth a note in the log). For a system with
    /// expected negative pivots: the inertia differed from the expected one,
    /// or LU was needed.
    pub fallback: bool,
    /// Negative pivots of an LDLᵀ factorization (the matrix's count of
    /// negative eigenvalues, by Sylvester's law of inertia); `None` for
    /// Cholesky (none) and LU (not counted).
    pub negative_pivots: Option<usize>,
}

/// A sparse linear solver bound to one pattern.
pub trait LinearSolver: std::fmt::Debug + Send {
    /// Analyses `pattern` once (ordering, symbolic factorization, workspaces).
    fn analyse(pattern: &SymmetricPattern, settings: &LinearSettings) -> Result<Self, LinearError>
    where
        Self: Sized;

    /// Numeric factorization of `matrix` (values in the analysed pattern).
    fn factorize(&mut self, matrix: SystemMatrix) -> Result<Factorization, LinearError>;

    /// Solves with the last factorization, in place: `rhs` becomes the solution.
    fn solve(&mut self, rhs: &mut [f64]) -> Result<(), LinearError>;

    /// Applies the last factor as a preconditioner, in place: the solve
    /// itself, or for a single-precision factor its bare solve without the
    /// refinement (the Krylov method around it refines).
    fn precondition(&mut self, v: &mut [f64]) -> Result<(), LinearError> {
        self.solve(v)
    }

    /// Solves with the last factorization, in place, to at least the
    /// relative residual `tolerance`: a solve refined iteratively (on a
    /// single-precision factor) may stop there instead of at round-off; a
    /// direct solve is exact to round-off anyway.
    fn solve_to(&mut self, rhs: &mut [f64], tolerance: f64) -> Result<(), LinearError> {
        let _ = tolerance;
        self.solve(rhs)
    }

    /// Solves `matrix x = rhs` in place and says which factorization the
    /// answer rests on. What `reuse` allows, the solver may do: keep its
    /// last factor and iterate on `matrix` instead of factorizing (see
    /// [`Reusing`]), or stop a refined solve at the accuracy it names; the
    /// plain backends always factorize. After a reused solve,
    /// [`Self::solve`] still solves with the kept factor, not with `matrix`.
    fn solve_system(&mut self, matrix: SystemMatrix, rhs: &mut [f64], reuse: Reuse) -> Result<Factorization, LinearError> {
        let factorization = self.factorize(matrix)?;
        self.solve_to(rhs, reuse.tolerance())?;
        Ok(factorization)
    }

    /// Counters and timings so far.
    fn stats(&self) -> &LinearStats;
}

/// What the caller of [`LinearSolver::solve_system`] allows for one system.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Reuse {
    /// Factorize this very matrix; the solve need only reach the relative
    /// residual `tolerance` (an inexact Newton step: a refined solve on a
    /// single-precision factor stops there; 0: to round-off).
    Fresh {
        /// Relative residual `|b − A x| / |b|` the caller needs.
        tolerance: f64,
    },
    /// The matrix is near the factorized one (a later Newton iteration of
    /// the same increment): the kept factor may precondition a Krylov solve
    /// to the relative residual `tolerance`, or to
    /// [`FactorReuse::tolerance`] if that is looser.
    Kept {
        /// Relative residual `|b − A x| / |b|` the caller needs.
        tolerance: f64,
        /// The caller expects no later system to use this factor (Newton
        /// likely converges with this solve, and the next increment
        /// factorizes anew): a factorization made now would serve this one
        /// system, so the Krylov solve may spend up to a whole
        /// factorization's cost before giving up.
        last: bool,
    },
}

impl Reuse {
    /// The relative residual the caller needs.
    pub fn tolerance(self) -> f64 {
        match self {
            Reuse::Fresh { tolerance } | Reuse::Kept { tolerance, .. } => tolerance,
        }
    }
}

/// The solver `settings` choose, analysed for `pattern`.
pub fn analyse(pattern: &SymmetricPattern, settings: &LinearSettings) -> Result<Box<dyn LinearSolver>, LinearError> {
    let direct = FaerDirect::analyse(pattern, settings)?;
    if settings.reuse.enabled {
        Ok(Box::new(Reusing::new(direct, pattern, settings.reuse)))
    } else {
        Ok(Box::new(direct))
    }
}

/// Which factorization solved the last system.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FactorKind {
    /// Sparse Cholesky (the tangent was positive definite).
    Cholesky,
    /// The tangent was not positive definite; LDLᵀ without pivoting was used.
    Ldlt,
    /// The tangent was not positive definite; LU was used instead.
    LuFallback,
    /// The tangent is non-symmetric (friction); LU was used.
    LuNonsymmetric,
}

/// Counters and timings (seconds) of the linear solver.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct LinearStats {
    /// Number of equations.
    pub equations: usize,
    /// Stored entries of the lower triangle of the tangent.
    pub nnz_matrix: usize,
    /// Stored entries of the Cholesky factor.
    pub nnz_factor: usize,
    /// Σ colcount² over the factor (a flop-count proxy).
    pub factor_flops: f64,
    /// Time in symbolic analysis (ordering, elimination tree), seconds.
    pub symbolic_time: f64,
    /// Time in numeric factorizations, seconds.
    pub numeric_time: f64,
    /// Time in triangular solves, seconds.
    pub solve_time: f64,
    /// Number of numeric factorizations.
    pub numeric_count: usize,
    /// Factorizations that fell back to LU.
    pub lu_fallbacks: usize,
    /// Factorizations that fell back to LDLᵀ (a system with pressure
    /// unknowns uses LDLᵀ by design and is not counted).
    pub ldlt_fallbacks: usize,
    /// LU factorizations of non-symmetric (frictional) tangents.
    pub lu_nonsymmetric: usize,
    /// Ordering used for the factor (`amd`, `nested-dissection`, `custom`).
    pub ordering: &'static str,
    /// Factor entries with each ordering, when [`Ordering::LeastFill`] compared them.
    pub fill_amd: Option<usize>,
    /// Factor entries with the nested-dissection ordering, when compared.
    pub fill_nested_dissection: Option<usize>,
    /// Threads of the factorization and solves (1: sequential).
    pub factor_threads: usize,
    /// Factorizations done in single precision (counted in `numeric_count` too).
    pub single_precision_factorizations: usize,
    /// Double-precision refinement iterations of the solves on them.
    pub refinement_iterations: usize,
    /// Systems solved on a kept factor by a Krylov method instead of
    /// factorizing.
    pub reused_factorizations: usize,
    /// Krylov iterations of those solves (and of the ones that gave up).
    pub krylov_iterations: usize,
    /// Krylov solves that did not converge in time, so the system was
    /// factorized after all (counted in `numeric_count` too).
    pub krylov_refactorizations: usize,
    /// Seconds in Krylov iterations, their preconditioning solves included
    /// (those are also in `solve_time`).
    pub krylov_time: f64,
}
