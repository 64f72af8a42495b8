//! Reusing a factorization across Newton iterations changes how each Newton
//! system is solved, not the system: conjugate gradients preconditioned by
//! the kept factor (Saad 2003, Iterative Methods for Sparse Linear Systems,
//! §9.2) solve it to a relative residual η that the driver ties to the
//! out-of-balance force (a hundredth of it, at most 1e-3, at least 1e-10).
//! With such forcing terms an inexact Newton method keeps Newton's
//! quadratic convergence (Dembo, Eisenstat & Steihaug 1982, "Inexact Newton
//! methods", SIAM J. Numer. Anal. 19:400–408, theorem 3.3: η_k = O(|r_k|)
//! gives quadratic convergence) and converges to the same state within its
//! tolerance. Likewise the number of threads changes only the order of the
//! factor's floating-point sums, and a single-precision factor is refined
//! to the same double-precision answers (Higham 2002, Accuracy and
//! Stability of Numerical Algorithms, 2nd ed., §12.1).
//!
//! Case: a distorted bonded hex8 block (Q1/P0), 20 % compression in four
//! increments, solved with reuse (the default), without it, on two
//! threads, and with single- and double-precision factors.

use olli_solver::linear::{FactorPrecision, FactorReuse, LinearSettings, Threads};
use olli_solver::*;
use olli_verification::*;

fn compress(linear: LinearSettings) -> Solution {
    let mesh = block([4.0, 4.0, 1.0], [10, 10, 3], 0.2);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(0.5, 500.0), Formulation::Mixed);
    model.output.point_fields = false;
    model.output.nodal_fields = false;
    model.linear = linear;
    model.stages.push(Stage {
        name: "compress".into(),
        controls: IncrementControls { first: 0.25, max: 0.25, force_tolerance: 1e-9, ..Default::default() },
        supports: vec![Support { set: "z0".into(), components: [true, true, true] }],
        motions: vec![Motion { set: "z1".into(), displacement: [Some(0.0), Some(0.0), Some(-0.2)] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    sol
}

fn force(s: &Solution) -> f64 {
    s.last().unwrap().reactions["z1"][2]
}

/// Largest difference of the final displacements, relative to the largest one.
fn displacement_difference(a: &Solution, b: &Solution) -> f64 {
    let (ua, ub) = (&a.last().unwrap().displacement, &b.last().unwrap().displacement);
    let scale = ua.iter().flatten().fold(0.0f64, |m, v| m.max(v.abs()));
    ua.iter().flatten().zip(ub.iter().flatten()).fold(0.0f64, |m, (x, y)| m.max((x - y).abs())) / scale
}

/// Every step from below 1e-2 that does not yet reach the force tolerance
/// (1e-9) has order above 1.75; returns how many steps were checked. The
/// step that reaches the tolerance is solved only as far as it needs
/// (Kelley 2003, "Solving Nonlinear Equations with Newton's Method", SIAM,
/// §3.2.3: the forcing term is kept above 0.5 τ/‖F‖ against oversolving),
/// so its order is not Newton's.
fn quadratic_steps(s: &Solution) -> usize {
    let mut orders = 0;
    for a in &s.increments {
        eprintln!("increment {}: {:?}", a.increment, a.residual_history);
        for h in a.residual_history.windows(2).filter(|h| h[0] < 1e-2 && h[1] > 1e-9) {
            let order = h[1].ln() / h[0].ln();
            assert!(order > 1.75, "increment {}: {:e} → {:e}, order {order:.2}", a.increment, h[0], h[1]);
            orders += 1;
        }
        assert!(*a.residual_history.last().unwrap() < 1e-9);
    }
    orders
}

#[test]
fn reused_factorizations_give_the_same_answer_with_quadratic_newton() {
    let reuse = compress(LinearSettings::default());
    let direct = compress(LinearSettings { reuse: FactorReuse { enabled: false, ..Default::default() }, ..Default::default() });

    let (lr, ld) = (&reuse.stats.linear, &direct.stats.linear);
    eprintln!(
        "factorizations: {} with reuse ({} reused, {} Krylov iterations, {} refactorized), {} without",
        lr.numeric_count, lr.reused_factorizations, lr.krylov_iterations, lr.krylov_refactorizations, ld.numeric_count
    );
    // Every Newton system was either factorized or solved on a kept factor.
    assert_eq!(lr.numeric_count + lr.reused_factorizations, reuse.stats.newton_iterations);
    assert_eq!((ld.numeric_count, ld.reused_factorizations, ld.krylov_iterations), (direct.stats.newton_iterations, 0, 0));
    // The first system of each increment is factorized, the later ones reuse.
    assert!(lr.reused_factorizations > 0 && lr.numeric_count >= reuse.stats.increments, "{lr:?}");
    assert!(lr.numeric_count < ld.numeric_count);
    assert!(lr.krylov_iterations >= lr.reused_factorizations);

    // At most one more Newton iteration per increment, and quadratic convergence.
    for (a, b) in reuse.increments.iter().zip(&direct.increments) {
        assert!(a.newton_iterations <= b.newton_iterations + 1, "increment {}", a.increment);
    }
    assert!(quadratic_steps(&reuse) >= 2, "too few steps in the asymptotic range");

    // The same state, to the Newton tolerance (force 1e-9 relative).
    let d = displacement_difference(&reuse, &direct);
    assert!(d < 1e-8, "displacements differ by {d:e} of the largest");
    assert!(rel(force(&reuse), force(&direct)) < 1e-8, "{} vs {}", force(&reuse), force(&direct));
}

#[test]
fn two_threads_give_the_same_answer() {
    let one = compress(LinearSettings { threads: Threads::Count(1), ..Default::default() });
    let two = compress(LinearSettings { threads: Threads::Count(2), ..Default::default() });
    assert_eq!((one.stats.linear.factor_threads, two.stats.linear.factor_threads), (1, 2));
    let d = displacement_difference(&one, &two);
    assert!(d < 1e-8, "displacements differ by {d:e} of the largest");
    assert!(rel(force(&one), force(&two)) < 1e-8);
}

#[test]
fn single_precision_factors_give_the_same_answer() {
    let single = compress(LinearSettings { precision: FactorPrecision::Single, ..Default::default() });
    let double = compress(LinearSettings { precision: FactorPrecision::Double, ..Default::default() });
    let (ls, ld) = (&single.stats.linear, &double.stats.linear);
    assert_eq!((ls.single_precision_factorizations, ld.single_precision_factorizations), (ls.numeric_count, 0));
    assert!(ls.refinement_iterations >= ls.numeric_count, "{ls:?}");
    for (a, b) in single.increments.iter().zip(&double.increments) {
        assert_eq!(a.newton_iterations, b.newton_iterations, "increment {}", a.increment);
    }
    let d = displacement_difference(&single, &double);
    assert!(d < 1e-8, "displacements differ by {d:e} of the largest");
    assert!(rel(force(&single), force(&double)) < 1e-8, "{} vs {}", force(&single), force(&double));
}
