//! Krylov solvers preconditioned by a kept factorization: conjugate
//! gradients for symmetric positive-definite systems and GMRES for the
//! others (Saad 2003, Iterative Methods for Sparse Linear Systems, 2nd ed.,
//! algorithms 9.1 and 9.5). Both start from x = 0 and stop when the relative
//! residual `|b − A x| / |b|` falls below the tolerance; the residual of the
//! recurrences is then checked once against the true one. Both give up
//! early when their rate projects the tolerance out of reach of the
//! iteration budget, if asked ([`Budget::Projected`]).
//!
//! The operator and the preconditioner are closures: `apply(x, y)` sets
//! `y = A x`, `precondition(v)` replaces `v` by `M⁻¹ v`.

/// How a Krylov solve ended.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct KrylovOutcome {
    /// The tolerance was reached; `x` holds the solution.
    pub converged: bool,
    /// Iterations (operator products) taken.
    pub iterations: usize,
    /// Relative residual at the end (of the recurrence when not converged).
    pub relative_residual: f64,
}

/// How many iterations a Krylov solve may take.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Budget {
    /// Up to this many.
    Fixed(usize),
    /// Up to this many, but given up as soon as the convergence rate
    /// projects the tolerance out of their reach ([`out_of_reach`]): for a
    /// solve whose failure has a known fallback (a factorization). Not for
    /// a solve that may rely on conjugate gradients' or GMRES's finite
    /// termination, whose rate is far from geometric.
    Projected(usize),
}

impl Budget {
    /// The iteration count.
    pub fn iterations(self) -> usize {
        match self {
            Budget::Fixed(n) | Budget::Projected(n) => n,
        }
    }

    /// Whether to stop after the relative residuals `history`.
    fn give_up(self, history: &[f64], tolerance: f64) -> bool {
        matches!(self, Budget::Projected(n) if out_of_reach(history, tolerance, n))
    }
}

/// Iterations before a solve may be given up as out of reach.
pub const PROJECT_FROM: usize = 8;

/// Iterations over which the convergence rate is measured for that.
pub const RATE_WINDOW: usize = 4;

/// Whether the relative residuals so far (`history`, one per iteration)
/// project that `tolerance` is out of reach within `max` iterations: at the
/// geometric rate of the last [`RATE_WINDOW`] iterations (not below 1 means
/// no progress), the remaining iterations would take the total past `max`.
/// Judged from [`PROJECT_FROM`] iterations on, so a stale preconditioner
/// that converges too slowly hands over to a factorization early instead
/// of using up its budget.
pub fn out_of_reach(history: &[f64], tolerance: f64, max: usize) -> bool {
    let k = history.len();
    if k < PROJECT_FROM.max(RATE_WINDOW + 1) {
        return false;
    }
    let (now, before) = (history[k - 1], history[k - 1 - RATE_WINDOW]);
    let rate = (now / before).powf(1.0 / RATE_WINDOW as f64);
    if !(rate < 1.0 && rate > 0.0) {
        return true;
    }
    k as f64 + (tolerance / now).ln() / rate.ln() > max as f64
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

fn norm(a: &[f64]) -> f64 {
    dot(a, a).sqrt()
}

/// The true relative residual of `x`, and whether it confirms convergence:
/// the recurrences' residual drifts from the true one by round-off, so the
/// true one is held to √tolerance (it still makes the solution exact to far
/// below the Newton tolerances).
fn confirm(apply: &mut dyn FnMut(&[f64], &mut [f64]), b: &[f64], x: &[f64], tolerance: f64) -> (bool, f64) {
    let mut ax = vec![0.0; b.len()];
    apply(x, &mut ax);
    let r: f64 = b.iter().zip(&ax).map(|(bi, ai)| (bi - ai).powi(2)).sum::<f64>().sqrt();
    let rel = r / norm(b);
    (rel.is_finite() && rel <= tolerance.sqrt(), rel)
}

/// Preconditioned conjugate gradients (Saad 2003, algorithm 9.1) for a
/// symmetric positive-definite `A` and `M`. Stops without convergence when
/// a curvature `pᵀAp` or `rᵀM⁻¹r` is not positive (the matrix or the
/// preconditioner is not positive definite).
pub fn conjugate_gradients<E>(
    apply: &mut dyn FnMut(&[f64], &mut [f64]),
    precondition: &mut dyn FnMut(&mut [f64]) -> Result<(), E>,
    b: &[f64],
    x: &mut [f64],
    tolerance: f64,
    budget: Budget,
) -> Result<KrylovOutcome, E> {
    let max_iterations = budget.iterations();
    let n = b.len();
    x.fill(0.0);
    let b_norm = norm(b);
    if b_norm == 0.0 {
        return Ok(KrylovOutcome { converged: true, iterations: 0, relative_residual: 0.0 });
    }
    let mut r = b.to_vec();
    let mut z = r.clone();
    precondition(&mut z)?;
    let mut p = z.clone();
    let mut rz = dot(&r, &z);
    let mut q = vec![0.0; n];
    let mut rel = 1.0;
    let mut history = Vec::with_capacity(max_iterations);
    for k in 1..=max_iterations {
        if !(rz > 0.0 && rz.is_finite()) {
            return Ok(KrylovOutcome { converged: false, iterations: k - 1, relative_residual: rel });
        }
        apply(&p, &mut q);
        let pq = dot(&p, &q);
        if !(pq > 0.0 && pq.is_finite()) {
            return Ok(KrylovOutcome { converged: false, iterations: k, relative_residual: rel });
        }
        let alpha = rz / pq;
        for i in 0..n {
            x[i] += alpha * p[i];
            r[i] -= alpha * q[i];
        }
        rel = norm(&r) / b_norm;
        if rel <= tolerance {
            let (converged, relative_residual) = confirm(apply, b, x, tolerance);
            return Ok(KrylovOutcome { converged, iterations: k, relative_residual });
        }
        history.push(rel);
        if budget.give_up(&history, tolerance) {
            return Ok(KrylovOutcome { converged: false, iterations: k, relative_residual: rel });
        }
        z.copy_from_slice(&r);
        precondition(&mut z)?;
        let rz_new = dot(&r, &z);
        let beta = rz_new / rz;
        rz = rz_new;
        for i in 0..n {
            p[i] = z[i] + beta * p[i];
        }
    }
    Ok(KrylovOutcome { converged: false, iterations: max_iterations, relative_residual: rel })
}

/// Right-preconditioned GMRES without restarts (Saad 2003, algorithm 9.5:
/// `A M⁻¹ y = b`, `x = M⁻¹ y`), with modified Gram–Schmidt and Givens
/// rotations, so its residual is that of `x` itself. Keeps the
/// preconditioned basis (`M⁻¹ v_j`) to form `x` without another
/// preconditioner solve.
pub fn gmres<E>(
    apply: &mut dyn FnMut(&[f64], &mut [f64]),
    precondition: &mut dyn FnMut(&mut [f64]) -> Result<(), E>,
    b: &[f64],
    x: &mut [f64],
    tolerance: f64,
    budget: Budget,
) -> Result<KrylovOutcome, E> {
    let n = b.len();
    let m = budget.iterations();
    x.fill(0.0);
    let beta = norm(b);
    if beta == 0.0 {
        return Ok(KrylovOutcome { converged: true, iterations: 0, relative_residual: 0.0 });
    }
    let mut v: Vec<Vec<f64>> = vec![b.iter().map(|bi| bi / beta).collect()];
    let mut z: Vec<Vec<f64>> = Vec::with_capacity(m);
    // Upper Hessenberg columns (after rotation: the triangle R), rotations, and g.
    let mut h: Vec<Vec<f64>> = Vec::with_capacity(m);
    let (mut cs, mut sn): (Vec<f64>, Vec<f64>) = (Vec::with_capacity(m), Vec::with_capacity(m));
    let mut g = vec![0.0; m + 1];
    g[0] = beta;
    let mut rel = 1.0;
    let mut history = Vec::with_capacity(m);
    for j in 0..m {
        let mut zj = v[j].clone();
        precondition(&mut zj)?;
        let mut w = vec![0.0; n];
        apply(&zj, &mut w);
        z.push(zj);
        let mut col = vec![0.0; j + 2];
        for (i, vi) in v.iter().enumerate() {
            col[i] = dot(&w, vi);
            for (wk, vk) in w.iter_mut().zip(vi) {
                *wk -= col[i] * vk;
            }
        }
        col[j + 1] = norm(&w);
        let next = col[j + 1];
        for i in 0..j {
            let (a, b2) = (col[i], col[i + 1]);
            col[i] = cs[i] * a + sn[i] * b2;
            col[i + 1] = -sn[i] * a + cs[i] * b2;
        }
        let r = col[j].hypot(col[j + 1]);
        if !(r > 0.0 && r.is_finite()) {
            return Ok(KrylovOutcome { converged: false, iterations: j + 1, relative_residual: rel });
        }
        let (c, s) = (col[j] / r, col[j + 1] / r);
        col[j] = r;
        col[j + 1] = 0.0;
        g[j + 1] = -s * g[j];
        g[j] *= c;
        cs.push(c);
        sn.push(s);
        h.push(col);
        rel = g[j + 1].abs() / beta;
        // A zero `next` is a lucky breakdown: the solution lies in the space.
        if rel <= tolerance || next == 0.0 {
            let k = j + 1;
            let mut y = vec![0.0; k];
            for i in (0..k).rev() {
                let sum: f64 = (i + 1..k).map(|l| h[l][i] * y[l]).sum();
                y[i] = (g[i] - sum) / h[i][i];
            }
            for (yi, zi) in y.iter().zip(&z) {
                for (xk, zk) in x.iter_mut().zip(zi) {
                    *xk += yi * zk;
                }
            }
            let (converged, relative_residual) = confirm(apply, b, x, tolerance);
            return Ok(KrylovOutcome { converged, iterations: k, relative_residual });
        }
        history.push(rel);
        if budget.give_up(&history, tolerance) {
            return Ok(KrylovOutcome { converged: false, iterations: j + 1, relative_residual: rel });
        }
        v.push(w.iter().map(|wk| wk / next).collect());
    }
    Ok(KrylovOutcome { converged: false, iterations: m, relative_residual: rel })
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::{DMatrix, DVector};

    type Never = std::convert::Infallible;

    /// A dense operator for the closures.
    fn product(a: &DMatrix<f64>) -> impl FnMut(&[f64], &mut [f64]) + '_ {
        move |x, y| {
            let v = a * DVector::from_column_slice(x);
            y.copy_from_slice(v.as_slice());
        }
    }

    /// Jacobi (diagonal) preconditioner of a dense matrix.
    fn jacobi(a: &DMatrix<f64>) -> impl FnMut(&mut [f64]) -> Result<(), Never> + '_ {
        move |v| {
            for (i, vi) in v.iter_mut().enumerate() {
                *vi /= a[(i, i)];
            }
            Ok(())
        }
    }

    /// A symmetric positive-definite matrix: the 1-D Laplacian (−1, 2, −1)
    /// plus a smooth positive diagonal, of condition number ≈ n².
    fn spd(n: usize) -> DMatrix<f64> {
        DMatrix::from_fn(n, n, |i, j| match i.abs_diff(j) {
            0 => 2.0 + 0.01 * (1.0 + (i as f64).sin()),
            1 => -1.0,
            _ => 0.0,
        })
    }

    /// A non-symmetric matrix: the SPD one plus a convection-like skew part
    /// and an unsymmetric coupling two places off the diagonal.
    fn nonsymmetric(n: usize) -> DMatrix<f64> {
        spd(n)
            + DMatrix::from_fn(n, n, |i, j| match (i as isize) - (j as isize) {
                1 => 0.4,
                -1 => -0.4,
                2 => 0.3,
                _ => 0.0,
            })
    }

    fn rhs(n: usize) -> Vec<f64> {
        (0..n).map(|i| ((i * 7 % 5) as f64) - 1.5).collect()
    }

    fn dense_solution(a: &DMatrix<f64>, b: &[f64]) -> DVector<f64> {
        a.clone().lu().solve(&DVector::from_column_slice(b)).unwrap()
    }

    fn max_rel_error(x: &[f64], reference: &DVector<f64>) -> f64 {
        let scale = reference.amax();
        x.iter().zip(reference.iter()).map(|(a, b)| (a - b).abs()).fold(0.0, f64::max) / scale
    }

    /// Conjugate gradients with a Jacobi preconditioner reach the dense LU
    /// solution of a 40-equation SPD system; in exact arithmetic CG ends in
    /// at most n steps (Saad 2003, §6.7), so 60 are ample at 1e-12.
    #[test]
    fn conjugate_gradients_match_a_dense_solve() {
        let n = 40;
        let a = spd(n);
        let b = rhs(n);
        let mut x = vec![1.0; n];
        let out = conjugate_gradients(&mut product(&a), &mut jacobi(&a), &b, &mut x, 1e-12, Budget::Fixed(60)).unwrap();
        assert!(out.converged && out.relative_residual < 1e-6, "{out:?}");
        assert!(max_rel_error(&x, &dense_solution(&a, &b)) < 1e-9);
    }

    /// GMRES with a Jacobi preconditioner on a non-symmetric system reaches
    /// the dense LU solution; without restarts it ends in at most n steps
    /// (Saad 2003, proposition 6.10).
    #[test]
    fn gmres_matches_a_dense_solve() {
        let n = 30;
        let a = nonsymmetric(n);
        let b = rhs(n);
        let mut x = vec![0.0; n];
        let out = gmres(&mut product(&a), &mut jacobi(&a), &b, &mut x, 1e-12, Budget::Fixed(n)).unwrap();
        assert!(out.converged && out.iterations <= n, "{out:?}");
        assert!(max_rel_error(&x, &dense_solution(&a, &b)) < 1e-9);
    }

    /// With the exact inverse as preconditioner both methods end after one
    /// iteration; preconditioned by the inverse of a nearby matrix (the
    /// situation of a kept factorization) they converge in a few. For the
    /// SPD case M = 1.02 A + 0.002 I gives M⁻¹A eigenvalues in about
    /// [0.89, 0.98] (the smallest of A is about 0.02), κ ≈ 1.1, and the CG
    /// error bound 2((√κ − 1)/(√κ + 1))^k (Saad 2003, theorem 6.29) is below
    /// 1e-12 from k = 8: at most 10 iterations are allowed.
    #[test]
    fn a_factor_of_a_nearby_matrix_is_a_good_preconditioner() {
        let n = 30;
        for (a, symmetric) in [(spd(n), true), (nonsymmetric(n), false)] {
            let b = rhs(n);
            let reference = dense_solution(&a, &b);
            let run = |m: &DMatrix<f64>, x: &mut Vec<f64>| {
                let lu = m.clone().lu();
                let mut pre = |v: &mut [f64]| -> Result<(), Never> {
                    let s = lu.solve(&DVector::from_column_slice(v)).unwrap();
                    v.copy_from_slice(s.as_slice());
                    Ok(())
                };
                if symmetric {
                    conjugate_gradients(&mut product(&a), &mut pre, &b, x, 1e-12, Budget::Fixed(20)).unwrap()
                } else {
                    gmres(&mut product(&a), &mut pre, &b, x, 1e-12, Budget::Fixed(20)).unwrap()
                }
            };
            let mut x = vec![0.0; n];
            let exact = run(&a, &mut x);
            assert!(exact.converged && exact.iterations == 1, "{exact:?}");
            let nearby = &a * 1.02 + DMatrix::from_diagonal_element(n, n, 0.002);
            let near = run(&nearby, &mut x);
            assert!(near.converged && near.iterations <= 10, "symmetric {symmetric}: {near:?}");
            assert!(max_rel_error(&x, &reference) < 1e-9);
        }
    }

    /// Conjugate gradients stop, unconverged, on an indefinite matrix
    /// instead of dividing by a non-positive curvature.
    #[test]
    fn conjugate_gradients_stop_on_an_indefinite_matrix() {
        let n = 10;
        let a = spd(n) - DMatrix::from_diagonal_element(n, n, 3.0);
        let b = rhs(n);
        let mut x = vec![0.0; n];
        let mut identity = |_: &mut [f64]| -> Result<(), Never> { Ok(()) };
        let out = conjugate_gradients(&mut product(&a), &mut identity, &b, &mut x, 1e-12, Budget::Fixed(50)).unwrap();
        assert!(!out.converged, "{out:?}");
    }

    /// The projection: at a geometric rate ρ, a relative residual r_k needs
    /// ln(τ/r_k)/ln ρ more iterations to reach τ. Halving per iteration
    /// reaches 1e-3 in 10, within 20; 0.9 per iteration needs 66: out of
    /// reach of 20, within 70; a stall never arrives; fewer than
    /// PROJECT_FROM residuals are not judged.
    #[test]
    fn out_of_reach_projects_the_geometric_rate() {
        let geometric = |rate: f64| -> Vec<f64> { (1..=PROJECT_FROM as i32).map(|k| rate.powi(k)).collect() };
        assert!(!out_of_reach(&geometric(0.5), 1e-3, 20));
        assert!(out_of_reach(&geometric(0.9), 1e-3, 20));
        assert!(!out_of_reach(&geometric(0.9), 1e-3, 70));
        assert!(out_of_reach(&[0.5; PROJECT_FROM], 1e-3, 1000));
        assert!(!out_of_reach(&geometric(0.9)[..PROJECT_FROM - 1], 1e-3, 20));
    }

    /// A projected budget gives up early where a fixed one iterates on: the
    /// 1-D Laplacian of 400 unknowns (condition number about 6.5e4, so the
    /// CG error bound falls by (√κ − 1)/(√κ + 1) ≈ 0.992 an iteration,
    /// Saad 2003, §6.11.3) cannot reach 1e-10 in 40 iterations, and both
    /// methods stop soon after PROJECT_FROM iterations, unconverged.
    #[test]
    fn projected_budgets_give_up_early() {
        let n = 400;
        let a = DMatrix::from_fn(n, n, |i, j| match i.abs_diff(j) {
            0 => 2.0,
            1 => -1.0,
            _ => 0.0,
        });
        let b = rhs(n);
        let mut x = vec![0.0; n];
        let fixed = conjugate_gradients(&mut product(&a), &mut jacobi(&a), &b, &mut x, 1e-10, Budget::Fixed(40)).unwrap();
        assert!(!fixed.converged && fixed.iterations == 40, "{fixed:?}");
        let cg = conjugate_gradients(&mut product(&a), &mut jacobi(&a), &b, &mut x, 1e-10, Budget::Projected(40)).unwrap();
        assert!(!cg.converged && cg.iterations < 20, "{cg:?}");
        let gm = gmres(&mut product(&a), &mut jacobi(&a), &b, &mut x, 1e-10, Budget::Projected(40)).unwrap();
        assert!(!gm.converged && gm.iterations < 20, "{gm:?}");
    }

    /// A zero right-hand side is solved by x = 0 without iterating.
    #[test]
    fn zero_right_hand_side_gives_zero() {
        let a = spd(5);
        let mut x = vec![3.0; 5];
        let out = gmres(&mut product(&a), &mut jacobi(&a), &[0.0; 5], &mut x, 1e-10, Budget::Fixed(5)).unwrap();
        assert!(out.converged && out.iterations == 0 && x.iter().all(|v| *v == 0.0));
    }
}
