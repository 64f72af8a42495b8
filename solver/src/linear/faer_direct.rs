//! The faer backend: sparse direct solve of the free-dof tangent.
//!
//! The symbolic Cholesky analysis (fill-reducing ordering, elimination tree,
//! supernodes) is done once per pattern; every Newton iteration reuses it and
//! the factor's value buffer and workspace. When the tangent is not positive
//! definite (a buckling or unstable state), the solver falls back to a sparse
//! LU of the full matrix, whose symbolic analysis is also built once, lazily,
//! and says so in its statistics. Before LU it tries LDLᵀ without pivoting
//! on the Cholesky structure, which costs the same as the Cholesky
//! factorization and succeeds for the mildly indefinite tangents met in
//! Newton iterations of nearly incompressible rubber. The LU path keeps its
//! full pattern, numeric factor and workspace across factorizations.
//!
//! Factorization and solves run on the threads [`Threads`] asks for; by
//! default on one thread unless the factor is large (see [`parallelism`]).

use std::time::Instant;

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::cholesky::ldlt::factor::LdltRegularization;
use faer::linalg::cholesky::llt::factor::LltRegularization;
use faer::sparse::linalg::cholesky::{
    factorize_symbolic_cholesky, CholeskySymbolicParams, LdltRef, LltRef, SymbolicCholesky, SymbolicCholeskyRaw, SymmetricOrdering,
};
use faer::sparse::linalg::lu::{factorize_symbolic_lu, LuRef, LuSymbolicParams, NumericLu, SymbolicLu};
use faer::sparse::linalg::{SupernodalThreshold, SymbolicSupernodalParams};
use faer::sparse::{SparseColMatRef, SymbolicSparseColMat};
use faer::{Conj, MatMut, Par, Side};

use super::krylov::{conjugate_gradients, Budget, KrylovOutcome};
use super::reuse::multiply;
use super::supernodal_solve::{FactorScalar, SupernodalSolve};
use super::{
    nested_dissection, FactorKind, FactorPrecision, Factorization, LinearError, LinearSettings, LinearSolver, LinearStats, Ordering,
    SymmetricPattern, SystemMatrix, Threads, PARALLEL_FLOPS, PARALLEL_MIN_THREADS, REFINED_TOLERANCE, REFINEMENT_ITERATIONS,
    SINGLE_PRECISION_FLOPS,
};

/// The LU path: the full (both triangles) pattern of the matrix, where each
/// lower-triangle slot's value and its mirror go, and the symbolic and
/// numeric LU with their workspace, all kept across factorizations.
struct LuFallback {
    symbolic_full: SymbolicSparseColMat<usize>,
    /// For each lower-triangle slot, its position in the full pattern's values.
    own: Vec<usize>,
    /// For each lower-triangle slot, the position of its mirror (the slot's
    /// own position on the diagonal).
    mirror: Vec<usize>,
    values: Vec<f64>,
    symbolic_lu: SymbolicLu<usize>,
    numeric: NumericLu<usize, f64>,
    mem: MemBuffer,
    factored: bool,
}

impl LuFallback {
    /// The full pattern of the symmetric lower-triangle pattern (`col_ptr`,
    /// `row_idx`): column j holds first the rows i < j (mirrors of column
    /// i's entry j, in increasing i), then column j of the lower triangle.
    fn new(n: usize, col_ptr: &[usize], row_idx: &[usize], par: Par) -> Result<Self, LinearError> {
        let nnz = row_idx.len();
        let mut upper = vec![0usize; n];
        for s in 0..nnz {
            let r = row_idx[s];
            if r != col_of(col_ptr, s) {
                upper[r] += 1;
            }
        }
        let mut full_ptr = vec![0usize; n + 1];
        for j in 0..n {
            full_ptr[j + 1] = full_ptr[j] + upper[j] + (col_ptr[j + 1] - col_ptr[j]);
        }
        let mut full_rows = vec![0usize; full_ptr[n]];
        let (mut own, mut mirror) = (vec![0usize; nnz], vec![0usize; nnz]);
        let mut next_upper: Vec<usize> = full_ptr[..n].to_vec();
        for c in 0..n {
            for s in col_ptr[c]..col_ptr[c + 1] {
                let r = row_idx[s];
                let p = full_ptr[c] + upper[c] + (s - col_ptr[c]);
                full_rows[p] = r;
                own[s] = p;
                mirror[s] = p;
                if r != c {
                    let q = next_upper[r];
                    next_upper[r] += 1;
                    full_rows[q] = c;
                    mirror[s] = q;
                }
            }
        }
        let symbolic_full = SymbolicSparseColMat::new_checked(n, n, full_ptr, None, full_rows);
        let params = LuSymbolicParams { supernodal_flop_ratio_threshold: supernodal(n), ..Default::default() };
        let symbolic_lu = factorize_symbolic_lu(symbolic_full.as_ref(), params)
            .map_err(|e| LinearError::Factorization { step: "symbolic LU", detail: format!("{e:?}") })?;
        let scratch =
            symbolic_lu.factorize_numeric_lu_scratch::<f64>(par, Default::default()).or(symbolic_lu.solve_in_place_scratch::<f64>(1, par));
        let mem = MemBuffer::try_new(scratch).map_err(|_| LinearError::OutOfMemory)?;
        let values = vec![0.0; symbolic_full.compute_nnz()];
        Ok(LuFallback { symbolic_full, own, mirror, values, symbolic_lu, numeric: NumericLu::new(), mem, factored: false })
    }
}

/// Equations from which the factors are always supernodal (dense blocks of
/// columns with one pattern): faer's own choice, by flops per factor entry,
/// picks the simplicial (column by column) form for 2-D meshes of a few
/// thousand equations, where it is slower (the tri6 seal example, 1602
/// equations: 229 factorizations in 1.0–1.2 s supernodal against 1.1–1.4 s,
/// on a loaded 2-core machine).
pub const SUPERNODAL_FROM: usize = 1000;

/// Supernode amalgamation: two adjacent supernodes of `n` columns together
/// merge when at most the given share of the merged block is zeros (the
/// first pair whose `n` bound holds decides). Twice faer's default column
/// bounds and shares, so more of the factor is in larger dense blocks: on
/// the 45k-equation block the factor has 4 % more entries and its
/// single-precision factorization on two threads took 0.62 against 0.78 s;
/// on the 156k-equation mount of `benchmarks/jobs/mount-150k.toml` nine
/// factorizations took 84.7 against 105.1 s (paired runs, loaded machine).
pub const RELAX: &[(usize, f64)] = &[(8, 1.0), (32, 0.8), (128, 0.2), (usize::MAX, 0.1)];

/// faer's supernodal threshold for `n` equations (see [`SUPERNODAL_FROM`]).
fn supernodal(n: usize) -> SupernodalThreshold {
    if n >= SUPERNODAL_FROM {
        SupernodalThreshold::FORCE_SUPERNODAL
    } else {
        SupernodalThreshold::AUTO
    }
}

/// Column of lower-triangle slot `s`.
fn col_of(col_ptr: &[usize], s: usize) -> usize {
    col_ptr.partition_point(|&p| p <= s) - 1
}

/// faer's sparse Cholesky (LDLᵀ, then LU, when the matrix is not positive
/// definite; LU for non-symmetric matrices), bound to one pattern.
pub struct FaerDirect {
    symbolic_matrix: SymbolicSparseColMat<usize>,
    symbolic: SymbolicCholesky<usize>,
    /// Double-precision factor values (allocated at the first double factorization).
    l_values: Vec<f64>,
    /// Single precision is tried first for Cholesky factors.
    single: bool,
    /// Single-precision factor values and the matrix they factor (for the
    /// refinement), allocated at the first single factorization.
    l_single: Vec<f32>,
    refined_matrix: Vec<f64>,
    /// Single-precision scratch: the matrix values while factorizing, a
    /// right-hand side while solving.
    single_scratch: Vec<f32>,
    /// Double-precision scratch of a solve's length.
    double_scratch: Vec<f64>,
    /// The tree-parallel order of a supernodal factor's solves on several
    /// threads (None on one thread or for a simplicial factor: faer solves).
    schedule: Option<SupernodalSolve>,
    /// The last factorization is the single-precision one.
    single_active: bool,
    mem: MemBuffer,
    par: Par,
    lu: Option<LuFallback>,
    last: Option<FactorKind>,
    /// Negative pivots the pattern expects (pressure unknowns).
    expected_negative: usize,
    /// Negative pivots of the last LDLᵀ factorization.
    negative_pivots: Option<usize>,
    /// Counters and timings of this solver.
    pub stats: LinearStats,
}

impl std::fmt::Debug for FaerDirect {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("FaerDirect").field("stats", &self.stats).finish()
    }
}

impl FaerDirect {
    /// Symbolic analysis of the pattern (done once).
    pub fn new(pattern: &SymmetricPattern, settings: &LinearSettings) -> Result<Self, LinearError> {
        let t = Instant::now();
        let symbolic_matrix =
            SymbolicSparseColMat::new_checked(pattern.n, pattern.n, pattern.col_ptr.to_vec(), None, pattern.row_idx.to_vec());
        let symbolic_with = |perm: Option<&Vec<usize>>| -> Result<SymbolicCholesky<usize>, LinearError> {
            let perm_storage;
            let ordering = match perm {
                None => SymmetricOrdering::Amd,
                Some(p) => {
                    if p.len() != pattern.n {
                        return Err(LinearError::OrderingLength { given: p.len(), equations: pattern.n });
                    }
                    let mut inv = vec![0usize; p.len()];
                    for (k, &i) in p.iter().enumerate() {
                        inv[i] = k;
                    }
                    perm_storage = faer::perm::Perm::new_checked(p.clone().into_boxed_slice(), inv.into_boxed_slice(), p.len());
                    SymmetricOrdering::Custom(perm_storage.as_ref())
                }
            };
            let params = CholeskySymbolicParams {
                supernodal_flop_ratio_threshold: supernodal(pattern.n),
                supernodal_params: SymbolicSupernodalParams { relax: Some(RELAX) },
                ..Default::default()
            };
            factorize_symbolic_cholesky(symbolic_matrix.as_ref(), Side::Lower, ordering, params)
                .map_err(|e| LinearError::Factorization { step: "symbolic Cholesky", detail: format!("{e:?}") })
        };
        let mut fill_amd = None;
        let mut fill_nd = None;
        let (symbolic, chosen) = match &settings.ordering {
            Ordering::Amd => (symbolic_with(None)?, Ordering::Amd),
            Ordering::Custom(p) => (symbolic_with(Some(p))?, Ordering::Custom(Vec::new())),
            Ordering::NestedDissection => (symbolic_with(Some(&nested_dissection::order(pattern)?))?, Ordering::NestedDissection),
            Ordering::LeastFill => {
                // The two analyses are independent: one on each of two threads.
                let (amd, nd) =
                    rayon::join(|| symbolic_with(None), || nested_dissection::order(pattern).ok().map(|perm| symbolic_with(Some(&perm))));
                let amd = amd?;
                fill_amd = Some(factor_counts(&amd).0);
                match nd.transpose()? {
                    Some(nd) => {
                        fill_nd = Some(factor_counts(&nd).0);
                        if fill_nd < fill_amd {
                            (nd, Ordering::NestedDissection)
                        } else {
                            (amd, Ordering::Amd)
                        }
                    }
                    // METIS refused the graph: AMD is always there.
                    None => (amd, Ordering::Amd),
                }
            }
        };
        let (nnz_factor, factor_flops) = factor_counts(&symbolic);
        let par = parallelism(settings.threads, factor_flops);
        let single = match settings.precision {
            FactorPrecision::Auto => factor_flops >= SINGLE_PRECISION_FLOPS,
            FactorPrecision::Double => false,
            FactorPrecision::Single => true,
        };
        let mut scratch = symbolic
            .factorize_numeric_llt_scratch::<f64>(par, Default::default())
            .or(symbolic.factorize_numeric_ldlt_scratch::<f64>(par, Default::default()))
            .or(symbolic.solve_in_place_scratch::<f64>(1, par));
        if single {
            scratch = scratch
                .or(symbolic.factorize_numeric_llt_scratch::<f32>(par, Default::default()))
                .or(symbolic.solve_in_place_scratch::<f32>(1, par));
        }
        let mem = MemBuffer::try_new(scratch).map_err(|_| LinearError::OutOfMemory)?;
        let l_values = if single { Vec::new() } else { vec![0.0; symbolic.len_val()] };
        let schedule = match symbolic.raw() {
            // On one thread faer's own sweeps are as fast or faster.
            SymbolicCholeskyRaw::Supernodal(sup) if par.degree() > 1 => Some(SupernodalSolve::new(sup, par.degree())),
            SymbolicCholeskyRaw::Supernodal(_) => None,
            SymbolicCholeskyRaw::Simplicial(_) => None,
        };
        let stats = LinearStats {
            equations: pattern.n,
            nnz_matrix: pattern.nnz(),
            nnz_factor,
            factor_flops,
            symbolic_time: t.elapsed().as_secs_f64(),
            ordering: match chosen {
                Ordering::Amd => "amd",
                Ordering::NestedDissection => "nested-dissection",
                _ => "custom",
            },
            fill_amd,
            fill_nested_dissection: fill_nd,
            factor_threads: match par {
                Par::Seq => 1,
                Par::Rayon(n) => n.get(),
            },
            ..Default::default()
        };
        Ok(FaerDirect {
            symbolic_matrix,
            symbolic,
            l_values,
            single,
            l_single: Vec::new(),
            refined_matrix: Vec::new(),
            single_scratch: Vec::new(),
            double_scratch: Vec::new(),
            schedule,
            single_active: false,
            mem,
            par,
            lu: None,
            last: None,
            expected_negative: pattern.negative,
            negative_pivots: None,
            stats,
        })
    }

    /// Numeric factorization of the tangent with the given lower-triangle values;
    /// Cholesky first (in single precision where chosen), LDLᵀ, then LU if
    /// the matrix is not positive definite.
    pub fn factor(&mut self, values: &[f64]) -> Result<FactorKind, LinearError> {
        let t = Instant::now();
        self.single_active = false;
        if self.single && self.expected_negative == 0 && self.factor_single(values) {
            self.stats.numeric_time += t.elapsed().as_secs_f64();
            self.stats.numeric_count += 1;
            self.stats.single_precision_factorizations += 1;
            self.last = Some(FactorKind::Cholesky);
            return Ok(FactorKind::Cholesky);
        }
        self.factor_double(values, t)
    }

    /// Single-precision Cholesky factorization of `values`; false when the
    /// matrix is not positive definite in single precision.
    fn factor_single(&mut self, values: &[f64]) -> bool {
        if self.l_single.len() != self.symbolic.len_val() {
            self.l_single = vec![0.0; self.symbolic.len_val()];
        }
        self.single_scratch.clear();
        self.single_scratch.extend(values.iter().map(|&v| v as f32));
        let a = SparseColMatRef::new(self.symbolic_matrix.as_ref(), &self.single_scratch[..]);
        let factored = self.symbolic.factorize_numeric_llt::<f32>(
            &mut self.l_single,
            a,
            Side::Lower,
            LltRegularization::default(),
            self.par,
            MemStack::new(&mut self.mem),
            Default::default(),
        );
        if factored.is_err() || !self.l_single.iter().all(|v| v.is_finite()) {
            return false;
        }
        self.refined_matrix.clear();
        self.refined_matrix.extend_from_slice(values);
        self.single_active = true;
        true
    }

    /// Double-precision factorization (see [`Self::factor`]), timed from `t`.
    fn factor_double(&mut self, values: &[f64], t: Instant) -> Result<FactorKind, LinearError> {
        if self.l_values.len() != self.symbolic.len_val() {
            self.l_values = vec![0.0; self.symbolic.len_val()];
        }
        let a = SparseColMatRef::new(self.symbolic_matrix.as_ref(), values);
        self.negative_pivots = None;
        // A system with pressure unknowns is indefinite: no Cholesky attempt.
        let res = if self.expected_negative > 0 {
            Err(())
        } else {
            self.symbolic
                .factorize_numeric_llt::<f64>(
                    &mut self.l_values,
                    a,
                    Side::Lower,
                    LltRegularization::default(),
                    self.par,
                    MemStack::new(&mut self.mem),
                    Default::default(),
                )
                .map(|_| ())
                .map_err(|_| ())
        };
        let kind = match res {
            Ok(_) => FactorKind::Cholesky,
            Err(_) => {
                // Not positive definite: LDLᵀ on the same symbolic structure
                // (no pivoting, so it needs nonzero pivots), then LU.
                let ldlt = self.symbolic.factorize_numeric_ldlt::<f64>(
                    &mut self.l_values,
                    a,
                    Side::Lower,
                    LdltRegularization::default(),
                    self.par,
                    MemStack::new(&mut self.mem),
                    Default::default(),
                );
                if ldlt.is_ok() && self.l_values.iter().all(|v| v.is_finite()) {
                    // An indefinite (pressure) system uses LDLᵀ by design, not as a fallback.
                    if self.expected_negative == 0 {
                        self.stats.ldlt_fallbacks += 1;
                    }
                    self.negative_pivots = Some(negative_pivots(&self.symbolic, &self.l_values));
                    FactorKind::Ldlt
                } else {
                    self.factor_lu(values, &[])?;
                    self.stats.lu_fallbacks += 1;
                    FactorKind::LuFallback
                }
            }
        };
        self.stats.numeric_time += t.elapsed().as_secs_f64();
        self.stats.numeric_count += 1;
        self.last = Some(kind);
        Ok(kind)
    }

    /// Numeric factorization of a non-symmetric tangent: the symmetric part
    /// as lower-triangle `values`, plus skew-symmetric entries `(slot, w)`
    /// (w at the slot's below-diagonal position, −w at its mirror), as
    /// friction produces. Uses LU; with no skew entries it is [`Self::factor`].
    pub fn factor_nonsymmetric(&mut self, values: &[f64], skew: &[(usize, f64)]) -> Result<FactorKind, LinearError> {
        if skew.is_empty() {
            return self.factor(values);
        }
        let t = Instant::now();
        self.factor_lu(values, skew)?;
        self.stats.numeric_time += t.elapsed().as_secs_f64();
        self.stats.numeric_count += 1;
        self.stats.lu_nonsymmetric += 1;
        self.last = Some(FactorKind::LuNonsymmetric);
        Ok(FactorKind::LuNonsymmetric)
    }

    fn factor_lu(&mut self, values: &[f64], skew: &[(usize, f64)]) -> Result<(), LinearError> {
        if self.lu.is_none() {
            let m = self.symbolic_matrix.as_ref();
            self.lu = Some(LuFallback::new(m.nrows(), m.col_ptr(), m.row_idx(), self.par)?);
        }
        let lu = self.lu.as_mut().expect("built above");
        for (s, &v) in values.iter().enumerate() {
            lu.values[lu.own[s]] = v;
            lu.values[lu.mirror[s]] = v;
        }
        // Non-symmetric part: +w at (row, col) below the diagonal, −w at its mirror.
        for &(slot, w) in skew {
            lu.values[lu.own[slot]] += w;
            lu.values[lu.mirror[slot]] -= w;
        }
        lu.factored = false;
        let a = SparseColMatRef::new(lu.symbolic_full.as_ref(), &lu.values);
        lu.symbolic_lu
            .factorize_numeric_lu(&mut lu.numeric, a, self.par, MemStack::new(&mut lu.mem), Default::default())
            .map_err(|e| LinearError::Factorization { step: "LU factorization", detail: format!("{e:?}") })?;
        lu.factored = true;
        Ok(())
    }

    /// Solves with the last factorization, in place.
    pub fn solve_in_place(&mut self, rhs: &mut [f64]) -> Result<(), LinearError> {
        self.solve_in_place_to(rhs, REFINED_TOLERANCE)
    }

    /// Solves with the last factorization, in place; a solve on a
    /// single-precision factor is refined to the relative residual
    /// `tolerance` (not below [`REFINED_TOLERANCE`]).
    fn solve_in_place_to(&mut self, rhs: &mut [f64], tolerance: f64) -> Result<(), LinearError> {
        let t = Instant::now();
        let n = rhs.len();
        let x = MatMut::from_column_major_slice_mut(rhs, n, 1);
        match self.last {
            Some(FactorKind::Cholesky) if self.single_active => {
                if !self.solve_refined(rhs, tolerance.max(REFINED_TOLERANCE)) {
                    // Single precision did not reach the answer: factorize
                    // the same matrix in double precision and solve directly.
                    let values = std::mem::take(&mut self.refined_matrix);
                    self.factor_double(&values, Instant::now())?;
                    self.refined_matrix = values;
                    return self.solve_in_place_to(rhs, tolerance);
                }
            }
            Some(FactorKind::Cholesky) => {
                self.double_scratch.resize(n, 0.0);
                let mut scratch = std::mem::take(&mut self.double_scratch);
                let factor = LltFactor { symbolic: &self.symbolic, schedule: self.schedule.as_ref(), values: &self.l_values[..] };
                factor.solve(self.par, &mut self.mem, &mut scratch, rhs, |v| v, |v| v);
                self.double_scratch = scratch;
            }
            Some(FactorKind::Ldlt) => {
                let ldlt = LdltRef::<usize, f64>::new(&self.symbolic, &self.l_values);
                ldlt.solve_in_place_with_conj(Conj::No, x, self.par, MemStack::new(&mut self.mem));
            }
            Some(FactorKind::LuFallback | FactorKind::LuNonsymmetric) => {
                let lu = self.lu.as_mut().filter(|l| l.factored).ok_or(LinearError::NotFactored)?;
                let f = LuRef::new_unchecked(&lu.symbolic_lu, &lu.numeric);
                f.solve_in_place_with_conj(Conj::No, x, self.par, MemStack::new(&mut lu.mem));
            }
            None => return Err(LinearError::NotFactored),
        }
        self.stats.solve_time += t.elapsed().as_secs_f64();
        if rhs.iter().any(|v| !v.is_finite()) {
            return Err(LinearError::NotFinite);
        }
        Ok(())
    }
}

impl FaerDirect {
    /// Solves on the single-precision factor, refined in double precision
    /// by conjugate gradients on the factorized matrix (the factor as their
    /// preconditioner) to the relative residual `tolerance`; false (and
    /// `rhs` as given) when [`REFINEMENT_ITERATIONS`] do not reach it.
    fn solve_refined(&mut self, rhs: &mut [f64], tolerance: f64) -> bool {
        let n = rhs.len();
        let b = rhs.to_vec();
        self.single_scratch.resize(n, 0.0);
        let FaerDirect { symbolic_matrix, symbolic, schedule, l_single, refined_matrix, single_scratch: single, mem, par, .. } = self;
        let factor = LltFactor { symbolic, schedule: schedule.as_ref(), values: &l_single[..] };
        let matrix = SystemMatrix { lower: refined_matrix, skew: &[] };
        let (col_ptr, row_idx) = (symbolic_matrix.col_ptr(), symbolic_matrix.row_idx());
        let mut apply = |x: &[f64], y: &mut [f64]| multiply(col_ptr, row_idx, matrix, x, y);
        let mut precondition = |v: &mut [f64]| -> Result<(), LinearError> {
            factor.solve(*par, mem, single, v, |x| x as f32, f64::from);
            Ok(())
        };
        let outcome = conjugate_gradients(&mut apply, &mut precondition, &b, rhs, tolerance, Budget::Fixed(REFINEMENT_ITERATIONS));
        let outcome = outcome.unwrap_or(KrylovOutcome { converged: false, iterations: 0, relative_residual: f64::NAN });
        self.stats.refinement_iterations += outcome.iterations;
        if outcome.converged && rhs.iter().all(|v| v.is_finite()) {
            return true;
        }
        rhs.copy_from_slice(&b);
        false
    }
}

/// A Cholesky factor LLᵀ (values in f32 or f64) with its symbolic structure.
struct LltFactor<'a, T> {
    symbolic: &'a SymbolicCholesky<usize>,
    schedule: Option<&'a SupernodalSolve>,
    values: &'a [T],
}

impl<T: FactorScalar + faer::traits::ComplexField> LltFactor<'_, T> {
    /// `v ← L⁻ᵀ L⁻¹ v` (in the permuted order the factor has), in the
    /// factor's precision through `scratch` (of v's length): by the
    /// tree-parallel sweeps of a supernodal factor, or by faer for a
    /// simplicial one.
    fn solve(&self, par: Par, mem: &mut MemBuffer, scratch: &mut [T], v: &mut [f64], narrow: fn(f64) -> T, widen: fn(T) -> f64) {
        let n = v.len();
        match (self.schedule, self.symbolic.raw()) {
            (Some(schedule), SymbolicCholeskyRaw::Supernodal(sup)) => {
                match self.symbolic.perm() {
                    Some(perm) => {
                        for (x, &i) in scratch.iter_mut().zip(perm.arrays().0) {
                            *x = narrow(v[i]);
                        }
                    }
                    None => scratch.iter_mut().zip(v.iter()).for_each(|(x, &y)| *x = narrow(y)),
                }
                schedule.solve(sup, self.values, scratch);
                match self.symbolic.perm() {
                    Some(perm) => {
                        for (y, &i) in v.iter_mut().zip(perm.arrays().1) {
                            *y = widen(scratch[i]);
                        }
                    }
                    None => v.iter_mut().zip(scratch.iter()).for_each(|(y, &x)| *y = widen(x)),
                }
            }
            _ => {
                for (x, &y) in scratch.iter_mut().zip(v.iter()) {
                    *x = narrow(y);
                }
                let llt = LltRef::<usize, T>::new(self.symbolic, self.values);
                llt.solve_in_place_with_conj(Conj::No, MatMut::from_column_major_slice_mut(scratch, n, 1), par, MemStack::new(mem));
                for (y, &x) in v.iter_mut().zip(scratch.iter()) {
                    *y = widen(x);
                }
            }
        }
    }
}

impl LinearSolver for FaerDirect {
    fn analyse(pattern: &SymmetricPattern, settings: &LinearSettings) -> Result<Self, LinearError> {
        FaerDirect::new(pattern, settings)
    }

    fn factorize(&mut self, matrix: SystemMatrix) -> Result<Factorization, LinearError> {
        let kind = self.factor_nonsymmetric(matrix.lower, matrix.skew)?;
        let negative_pivots = if kind == FactorKind::Ldlt { self.negative_pivots } else { None };
        let fallback = if self.expected_negative > 0 {
            kind == FactorKind::LuFallback || negative_pivots != Some(self.expected_negative)
        } else {
            matches!(kind, FactorKind::Ldlt | FactorKind::LuFallback)
        };
        Ok(Factorization { kind, positive_definite: kind == FactorKind::Cholesky, fallback, negative_pivots })
    }

    fn solve(&mut self, rhs: &mut [f64]) -> Result<(), LinearError> {
        self.solve_in_place(rhs)
    }

    fn solve_to(&mut self, rhs: &mut [f64], tolerance: f64) -> Result<(), LinearError> {
        self.solve_in_place_to(rhs, tolerance)
    }

    fn precondition(&mut self, v: &mut [f64]) -> Result<(), LinearError> {
        if !(self.single_active && self.last == Some(FactorKind::Cholesky)) {
            return self.solve_in_place(v);
        }
        let t = Instant::now();
        self.single_scratch.resize(v.len(), 0.0);
        let factor = LltFactor { symbolic: &self.symbolic, schedule: self.schedule.as_ref(), values: &self.l_single[..] };
        factor.solve(self.par, &mut self.mem, &mut self.single_scratch, v, |x| x as f32, f64::from);
        self.stats.solve_time += t.elapsed().as_secs_f64();
        if v.iter().any(|x| !x.is_finite()) {
            return Err(LinearError::NotFinite);
        }
        Ok(())
    }

    fn stats(&self) -> &LinearStats {
        &self.stats
    }
}

/// The parallelism `threads` asks for, for a factor of `flops` (Σ colcount²).
/// [`Threads::Auto`]: sequential below [`PARALLEL_FLOPS`] or with fewer than
/// [`PARALLEL_MIN_THREADS`] hardware threads (on small factors the threads'
/// synchronisation costs more than it saves), else every hardware thread.
fn parallelism(threads: Threads, flops: f64) -> Par {
    let available = std::thread::available_parallelism().map(|n| n.get()).unwrap_or(1);
    let n = match threads {
        Threads::Count(n) => n,
        Threads::Auto if flops < PARALLEL_FLOPS || available < PARALLEL_MIN_THREADS => 1,
        Threads::Auto => available,
    };
    if n <= 1 {
        Par::Seq
    } else {
        Par::rayon(n)
    }
}

/// Negative entries of D in an LDLᵀ factor: the diagonal of every
/// supernode's block, or the first entry of every simplicial column.
fn negative_pivots(symbolic: &SymbolicCholesky<usize>, l_values: &[f64]) -> usize {
    match symbolic.raw() {
        SymbolicCholeskyRaw::Supernodal(s) => {
            let mut count = 0;
            for k in 0..s.n_supernodes() {
                let ncol = s.supernode_end()[k] - s.supernode_begin()[k];
                let nrow = ncol + s.supernode(k).pattern().len();
                let block = &l_values[s.col_ptr_for_val()[k]..];
                count += (0..ncol).filter(|&j| block[j * nrow + j] < 0.0).count();
            }
            count
        }
        SymbolicCholeskyRaw::Simplicial(s) => {
            let cp = s.col_ptr();
            (0..cp.len() - 1).filter(|&j| l_values[cp[j]] < 0.0).count()
        }
    }
}

/// Stored entries and Σ colcount² of a symbolic factor.
fn factor_counts(symbolic: &SymbolicCholesky<usize>) -> (usize, f64) {
    let (mut nnz, mut flops) = (0usize, 0f64);
    match symbolic.raw() {
        SymbolicCholeskyRaw::Supernodal(s) => {
            for k in 0..s.n_supernodes() {
                let ncol = s.supernode_end()[k] - s.supernode_begin()[k];
                let below = s.supernode(k).pattern().len();
                for j in 0..ncol {
                    let c = ncol - j + below;
                    nnz += c;
                    flops += (c * c) as f64;
                }
            }
        }
        SymbolicCholeskyRaw::Simplicial(s) => {
            let cp = s.col_ptr();
            for j in 0..cp.len() - 1 {
                let c = cp[j + 1] - cp[j];
                nnz += c;
                flops += (c * c) as f64;
            }
        }
    }
    (nnz, flops)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A mixed displacement–pressure system of the perturbed-Lagrangian
    /// form `[[K, Bᵀ], [B, −M/κ]]` on a chain of `m` two-dof "nodes" with
    /// `m − 1` pressures: K a stiffness chain (positive definite when
    /// `shift` is 0, indefinite for a large negative `shift`), B a coupling
    /// of each pressure to its neighbouring nodes, M a mass matrix. Dense,
    /// row-major.
    fn saddle(m: usize, kappa: f64, shift: f64) -> (usize, Vec<f64>) {
        let (nu, np) = (2 * m, m - 1);
        let n = nu + np;
        let mut a = vec![0.0; n * n];
        let mut add = |r: usize, c: usize, v: f64| {
            a[r * n + c] += v;
            if r != c {
                a[c * n + r] += v;
            }
        };
        for i in 0..nu {
            add(i, i, 2.0 + shift + 0.1 * (i % 3) as f64);
            if i + 2 < nu {
                add(i + 2, i, -1.0);
            }
            if i % 2 == 0 {
                add(i + 1, i, 0.3);
            }
        }
        for k in 0..np {
            let row = nu + k;
            for (node, sign) in [(k, -1.0), (k + 1, 1.0)] {
                add(row, 2 * node, sign * 0.7);
                add(row, 2 * node + 1, 0.2 * sign);
            }
            add(row, row, -(2.0 / 3.0) / kappa);
            if k + 1 < np {
                add(row + 1, row, -(1.0 / 6.0) / kappa);
            }
        }
        (n, a)
    }

    /// Lower-triangle pattern and values of a dense symmetric matrix (all
    /// entries stored, zero or not, as an assembled pattern would).
    fn lower(n: usize, a: &[f64]) -> (Vec<usize>, Vec<usize>, Vec<f64>) {
        let (mut col_ptr, mut row_idx, mut values) = (vec![0], Vec::new(), Vec::new());
        for c in 0..n {
            for r in c..n {
                row_idx.push(r);
                values.push(a[r * n + c]);
            }
            col_ptr.push(row_idx.len());
        }
        (col_ptr, row_idx, values)
    }

    /// The chain `tridiag(−1, 2, −1)` of `n` equations with `end` on the
    /// first and last diagonal entries: well conditioned for `end` = 2,
    /// nearly singular (the constant vector) as `end` nears 1. Dense.
    fn chain(n: usize, end: f64) -> Vec<f64> {
        let mut a = vec![0.0; n * n];
        for i in 0..n {
            a[i * n + i] = if i == 0 || i + 1 == n { end } else { 2.0 };
            if i + 1 < n {
                a[i * n + i + 1] = -1.0;
                a[(i + 1) * n + i] = -1.0;
            }
        }
        a
    }

    /// Solves the dense symmetric `a` with `precision`: the solver's
    /// statistics and the relative residual (max norm).
    fn solve_with(n: usize, a: &[f64], precision: FactorPrecision, negative: usize) -> (LinearStats, f64) {
        solve_to_with(n, a, precision, negative, 0.0)
    }

    /// [`solve_with`], the solve asked for the relative residual `tolerance` only.
    fn solve_to_with(n: usize, a: &[f64], precision: FactorPrecision, negative: usize, tolerance: f64) -> (LinearStats, f64) {
        let (col_ptr, row_idx, values) = lower(n, a);
        let eq_node: Vec<usize> = (0..n).collect();
        let pattern = SymmetricPattern { n, col_ptr: &col_ptr, row_idx: &row_idx, eq_node: &eq_node, negative };
        let mut solver = FaerDirect::new(&pattern, &LinearSettings { precision, ..Default::default() }).unwrap();
        solver.factorize(SystemMatrix { lower: &values, skew: &[] }).unwrap();
        let b: Vec<f64> = (0..n).map(|i| ((i * 7 % 5) as f64) - 2.0).collect();
        let mut x = b.clone();
        solver.solve_to(&mut x, tolerance).unwrap();
        let residual = (0..n).map(|r| (0..n).map(|c| a[r * n + c] * x[c]).sum::<f64>() - b[r]).fold(0.0f64, |m, v| m.max(v.abs()));
        (solver.stats.clone(), residual / b.iter().fold(0.0f64, |m, v| m.max(v.abs())))
    }

    /// A single-precision Cholesky factor refined in double precision
    /// (mixed-precision iterative refinement, Higham 2002, Accuracy and
    /// Stability of Numerical Algorithms, 2nd ed., §12.1: it converges to
    /// double-precision accuracy while cond(A) times the single unit
    /// round-off stays below 1) solves a well-conditioned system as a
    /// double factor does. A nearly singular one (cond ≈ 1e11, far past
    /// 1 / 6e-8) is factorized in double precision after all and still
    /// solved; an indefinite system never uses single precision; `Auto`
    /// keeps double precision for small factors.
    #[test]
    fn single_precision_factor_is_refined_to_double_accuracy() {
        let n = 60;
        let (single, residual) = solve_with(n, &chain(n, 2.0), FactorPrecision::Single, 0);
        assert_eq!((single.numeric_count, single.single_precision_factorizations), (1, 1));
        assert!(single.refinement_iterations >= 1 && residual < 1e-12, "{single:?} residual {residual:e}");
        let (double, residual_double) = solve_with(n, &chain(n, 2.0), FactorPrecision::Double, 0);
        assert_eq!((double.single_precision_factorizations, double.refinement_iterations), (0, 0));
        assert!(residual_double < 1e-12);

        let (stats, residual) = solve_with(n, &chain(n, 1.0 + 1e-9), FactorPrecision::Single, 0);
        assert_eq!(stats.numeric_count - stats.single_precision_factorizations, 1, "{stats:?}");
        assert!(residual < 1e-9, "{stats:?} residual {residual:e}");

        let (saddle_n, a) = saddle(6, 1e3, 0.0);
        let (stats, residual) = solve_with(saddle_n, &a, FactorPrecision::Single, 5);
        assert_eq!(stats.single_precision_factorizations, 0);
        assert!(residual < 1e-10);

        let (auto, _) = solve_with(n, &chain(n, 2.0), FactorPrecision::Auto, 0);
        assert!(auto.factor_flops < SINGLE_PRECISION_FLOPS && auto.single_precision_factorizations == 0);
    }

    /// An inexact Newton step needs its linear residual only as small as
    /// its forcing term (Eisenstat & Walker 1996, "Choosing the forcing
    /// terms in an inexact Newton method", SIAM J. Sci. Comput. 17:16–32):
    /// asked for 1e-4, the refinement on a single-precision factor stops
    /// sooner than for round-off and still meets it (in the max norm, within
    /// the √n between the norms); a double factor solves exactly either way.
    #[test]
    fn refined_solves_stop_at_the_accuracy_asked() {
        let n = 60;
        let (full, full_residual) = solve_with(n, &chain(n, 2.0), FactorPrecision::Single, 0);
        let (loose, loose_residual) = solve_to_with(n, &chain(n, 2.0), FactorPrecision::Single, 0, 1e-4);
        assert!(loose.refinement_iterations < full.refinement_iterations, "{loose:?} against {full:?}");
        assert!(loose_residual < 1e-4 * (n as f64).sqrt() && full_residual < 1e-12, "{loose_residual:e} {full_residual:e}");
        let (double, residual) = solve_to_with(n, &chain(n, 2.0), FactorPrecision::Double, 0, 1e-4);
        assert!(double.refinement_iterations == 0 && residual < 1e-12, "{residual:e}");
    }

    /// On two threads a supernodal factor is solved by the tree-parallel
    /// sweeps ([`super::super::supernodal_solve`]): the same solution as on
    /// one thread (faer's own sweeps) to round-off, with a double factor
    /// and with a single one refined in double precision (Higham 2002,
    /// §12.1, as above), both to a relative residual below 1e-12.
    #[test]
    fn two_thread_solves_match_one_thread_solves() {
        let (n, col_ptr, row_idx, values) = crate::linear::supernodal_solve::tests::grid_matrix(8);
        let eq_node: Vec<usize> = (0..n).collect();
        let pattern = SymmetricPattern { n, col_ptr: &col_ptr, row_idx: &row_idx, eq_node: &eq_node, negative: 0 };
        let b: Vec<f64> = (0..n).map(|i| ((i * 7 % 5) as f64) - 2.0).collect();
        let solve = |threads: usize, precision: FactorPrecision| {
            let settings = LinearSettings { threads: Threads::Count(threads), precision, ..Default::default() };
            let mut solver = FaerDirect::new(&pattern, &settings).unwrap();
            assert_eq!(solver.schedule.is_some(), threads > 1);
            solver.factorize(SystemMatrix { lower: &values, skew: &[] }).unwrap();
            let mut x = b.clone();
            solver.solve(&mut x).unwrap();
            let mut ax = vec![0.0; n];
            multiply(&col_ptr, &row_idx, SystemMatrix { lower: &values, skew: &[] }, &x, &mut ax);
            let residual = ax.iter().zip(&b).fold(0f64, |m, (p, q)| m.max((p - q).abs())) / 2.0;
            assert!(residual < 1e-12, "{threads} threads, {precision:?}: residual {residual:e}");
            x
        };
        for precision in [FactorPrecision::Double, FactorPrecision::Single] {
            let (one, two) = (solve(1, precision), solve(2, precision));
            let d = one.iter().zip(&two).fold(0f64, |m, (p, q)| m.max((p - q).abs()));
            assert!(d < 1e-12, "{precision:?}: solutions differ by {d:e}");
        }
    }

    fn solve_saddle(n: usize, a: &[f64], ordering: Ordering) -> (Factorization, f64) {
        solve_saddle_expecting(n, a, ordering, 0)
    }

    fn solve_saddle_expecting(n: usize, a: &[f64], ordering: Ordering, negative: usize) -> (Factorization, f64) {
        let (col_ptr, row_idx, values) = lower(n, a);
        let eq_node: Vec<usize> = (0..n).collect();
        let pattern = SymmetricPattern { n, col_ptr: &col_ptr, row_idx: &row_idx, eq_node: &eq_node, negative };
        let mut solver = FaerDirect::new(&pattern, &LinearSettings { ordering, ..Default::default() }).unwrap();
        let factorization = solver.factorize(SystemMatrix { lower: &values, skew: &[] }).unwrap();
        let b: Vec<f64> = (0..n).map(|i| ((i * 7 % 5) as f64) - 2.0).collect();
        let mut x = b.clone();
        solver.solve(&mut x).unwrap();
        let residual = (0..n).map(|r| (0..n).map(|c| a[r * n + c] * x[c]).sum::<f64>() - b[r]).fold(0.0f64, |m, v| m.max(v.abs()));
        (factorization, residual / b.iter().fold(0.0f64, |m, v| m.max(v.abs())))
    }

    /// With K positive definite and a finite bulk modulus κ the mixed system
    /// is symmetric quasi-definite, so an LDLᵀ factorization without
    /// pivoting exists for every symmetric ordering (Vanderbei 1995,
    /// "Symmetric quasidefinite matrices", SIAM J. Optim. 5:100–113): the
    /// Cholesky attempt fails (negative pivots of the pressure block) and
    /// LDLᵀ, not LU, solves it whichever ordering is chosen, also for
    /// nearly incompressible κ. An ordering that eliminates pressures first
    /// meets pivots of order 1/κ, so rounding grows about with κ: the
    /// residual is required below 1e-7 relative at κ = 10⁶ (measured
    /// 1.7e-9 with the pressures first).
    #[test]
    fn quasi_definite_mixed_system_is_solved_by_ldlt_in_any_ordering() {
        for kappa in [1e2, 1e6] {
            let (n, a) = saddle(12, kappa, 0.0);
            for ordering in [Ordering::Amd, Ordering::NestedDissection, Ordering::Custom((0..n).rev().collect())] {
                let (f, residual) = solve_saddle(n, &a, ordering.clone());
                assert_eq!(f.kind, FactorKind::Ldlt, "κ = {kappa}, {ordering:?}");
                assert!(!f.positive_definite && f.fallback);
                assert!(residual < 1e-7, "κ = {kappa}, {ordering:?}: residual {residual:e}");
            }
        }
    }

    /// When K itself loses definiteness (a buckling state) the system is no
    /// longer quasi-definite; whichever factorization then runs, the driver
    /// is told the matrix is not positive definite (so it drops the line
    /// search) and the solution it gets still solves the system.
    #[test]
    fn indefinite_stiffness_block_is_reported_and_still_solved() {
        let (n, a) = saddle(12, 1e4, -2.2);
        let (f, residual) = solve_saddle(n, &a, Ordering::Amd);
        assert!(!f.positive_definite && f.fallback, "{f:?}");
        assert!(residual < 1e-8, "residual {residual:e}");
    }

    /// The LU path (a non-symmetric matrix: skew entries as friction adds)
    /// solves the dense system it stands for, twice in a row with other
    /// values (the kept numeric factor and workspace are refilled), checked
    /// by the residual of the dense matrix.
    #[test]
    fn lu_path_solves_non_symmetric_systems_repeatedly() {
        let (n, a) = saddle(40, 1e2, -2.2);
        let (col_ptr, row_idx, values) = lower(n, &a);
        let eq_node: Vec<usize> = (0..n).collect();
        let pattern = SymmetricPattern { n, col_ptr: &col_ptr, row_idx: &row_idx, eq_node: &eq_node, negative: 0 };
        let mut solver = FaerDirect::new(&pattern, &LinearSettings::default()).unwrap();
        let slot = |r: usize, c: usize| (col_ptr[c]..col_ptr[c + 1]).find(|&s| row_idx[s] == r).unwrap();
        for (round, w) in [0.3, -0.7].into_iter().enumerate() {
            let skew = [(slot(1, 0), w), (slot(5, 2), 0.5 * w), (slot(n - 1, n - 3), w)];
            let factor = 1.0 + 0.1 * round as f64;
            let scaled: Vec<f64> = values.iter().map(|v| v * factor).collect();
            let mut dense: Vec<f64> = a.iter().map(|v| v * factor).collect();
            for &(s, v) in &skew {
                let (r, c) = (row_idx[s], (0..n).find(|&c| col_ptr[c] <= s && s < col_ptr[c + 1]).unwrap());
                dense[r * n + c] += v;
                dense[c * n + r] -= v;
            }
            let f = solver.factorize(SystemMatrix { lower: &scaled, skew: &skew }).unwrap();
            assert_eq!(f.kind, FactorKind::LuNonsymmetric);
            let b: Vec<f64> = (0..n).map(|i| ((i * 7 % 5) as f64) - 2.0).collect();
            let mut x = b.clone();
            solver.solve(&mut x).unwrap();
            let residual = (0..n).map(|r| (0..n).map(|c| dense[r * n + c] * x[c]).sum::<f64>() - b[r]).fold(0.0f64, |m, v| m.max(v.abs()));
            assert!(residual < 1e-10, "round {round}: residual {residual:e}");
        }
        assert_eq!(solver.stats.lu_nonsymmetric, 2);
    }

    /// Number of negative eigenvalues of a dense symmetric matrix (the
    /// reference for the pivot count).
    fn negative_eigenvalues(n: usize, a: &[f64]) -> usize {
        let m = nalgebra::DMatrix::from_row_slice(n, n, a);
        m.symmetric_eigenvalues().iter().filter(|v| **v < 0.0).count()
    }

    /// The inertia check: told how many pressure unknowns the system has,
    /// the solver skips Cholesky and counts the negative pivots of LDLᵀ,
    /// which by Sylvester's law of inertia (Sylvester 1852; Golub & Van Loan,
    /// Matrix Computations, §8.1) equal the matrix's negative eigenvalues
    /// in every ordering: here the m − 1 = 11 pressures while K is
    /// positive definite, so no fallback is reported; with K indefinite
    /// (a loss of stability) more, and the mismatch is reported. Both
    /// counts are checked against dense eigenvalues, on a small and a
    /// larger chain (faer picks the factor's layout by size).
    #[test]
    fn negative_pivots_count_the_pressures_unless_stability_is_lost() {
        for m in [12, 200] {
            // shift 0.5 makes K diagonally dominant, so positive definite.
            let (n, a) = saddle(m, 1e4, 0.5);
            assert_eq!(negative_eigenvalues(n, &a), m - 1);
            for ordering in [Ordering::Amd, Ordering::NestedDissection, Ordering::Custom((0..n).rev().collect())] {
                let (f, residual) = solve_saddle_expecting(n, &a, ordering.clone(), m - 1);
                assert_eq!(f.kind, FactorKind::Ldlt, "{ordering:?}");
                assert_eq!(f.negative_pivots, Some(m - 1), "{ordering:?}");
                assert!(!f.fallback && residual < 1e-8, "{ordering:?}: {f:?} {residual:e}");
                assert_eq!(f.check_inertia(m - 1), Ok(()));
                // Fewer negative pivots than pressures: the step is refused.
                assert_eq!(f.check_inertia(m + 1), Err(LinearError::Inertia { expected: m + 1, found: m - 1 }));
            }
            let (n, a) = saddle(m, 1e4, -2.2);
            let expected = negative_eigenvalues(n, &a);
            assert!(expected > m - 1);
            let (f, _) = solve_saddle_expecting(n, &a, Ordering::Amd, m - 1);
            if f.kind == FactorKind::Ldlt {
                assert_eq!(f.negative_pivots, Some(expected));
            }
            assert!(f.fallback, "{f:?}");
            // More negative pivots (lost stability) is reported, not refused.
            assert_eq!(f.check_inertia(m - 1), Ok(()));
        }
    }
}
