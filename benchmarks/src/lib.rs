//! What every benchmark shares: its command line's size argument, an
//! observer printing the increments, and the closing report (size, Newton
//! iterations, time split, factor, peak memory).

use std::time::Instant;

use olli_solver::driver::Event;
use olli_solver::linear::{FactorPrecision, LinearSettings, Ordering, Threads};
use olli_solver::{solve, Model, Solution};

/// `A,B,...` as `N` positive integers.
pub fn parse_counts<const N: usize>(s: &str) -> Option<[usize; N]> {
    let v: Vec<usize> = s.split(',').map(|t| t.trim().parse().ok()).collect::<Option<_>>()?;
    let a: [usize; N] = v.try_into().ok()?;
    a.iter().all(|&x| x > 0).then_some(a)
}

/// The `--ordering` argument: `best` (the default: the smaller factor), `amd`, `nd`.
pub fn parse_ordering(s: &str) -> Option<Ordering> {
    match s {
        "amd" => Some(Ordering::Amd),
        "nd" => Some(Ordering::NestedDissection),
        "best" => Some(Ordering::LeastFill),
        _ => None,
    }
}

/// The linear-solver flags every benchmark takes, in `USAGE` form.
pub const LINEAR_FLAGS: &str = "[--threads auto|N] [--reuse on|off] [--krylov-iterations N] [--precision auto|double|single]";

/// Applies `flag value` to `linear` if it is one of [`LINEAR_FLAGS`]:
/// `--threads auto|N` (factorization threads), `--reuse on|off`
/// (factorization reuse with a Krylov correction), `--krylov-iterations N`
/// (its iterations before refactorizing), `--precision auto|double|single`
/// (of the Cholesky factor). Returns whether it was one;
/// exits with a usage error on a bad value.
pub fn linear_flag(flag: &str, value: Option<&String>, linear: &mut LinearSettings) -> bool {
    let count = |v: Option<&String>| v.and_then(|v| v.parse::<usize>().ok()).filter(|&n| n > 0);
    match flag {
        "--threads" => {
            linear.threads = match value.map(String::as_str) {
                Some("auto") => Threads::Auto,
                _ => Threads::Count(count(value).unwrap_or_else(|| usage("--threads must be auto or a positive integer"))),
            }
        }
        "--reuse" => {
            linear.reuse.enabled = match value.map(String::as_str) {
                Some("on") => true,
                Some("off") => false,
                _ => usage("--reuse must be on or off"),
            }
        }
        "--precision" => {
            linear.precision = match value.map(String::as_str) {
                Some("auto") => FactorPrecision::Auto,
                Some("double") => FactorPrecision::Double,
                Some("single") => FactorPrecision::Single,
                _ => usage("--precision must be auto, double or single"),
            }
        }
        "--krylov-iterations" => {
            linear.reuse.max_iterations = count(value).unwrap_or_else(|| usage("--krylov-iterations must be a positive integer"))
        }
        _ => return false,
    }
    true
}

/// Prints a usage error and exits with status 2.
pub fn usage(message: &str) -> ! {
    eprintln!("{message}");
    std::process::exit(2)
}

/// Peak resident memory of this process (Linux `VmHWM`), in MiB.
pub fn peak_memory_mib() -> Option<f64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kib: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kib / 1024.0)
}

/// Solves `model`, printing each increment, then the report; exits with
/// status 1 if the solve fails. `setup` is the time spent building the model.
pub fn run_and_report(model: &Model, setup: f64) -> Solution {
    let t = Instant::now();
    let mut observer = |e: &Event| match e {
        Event::StageStart { equations, .. } => println!("dofs={equations}"),
        Event::Converged(r) => println!(
            "increment {:2} load_factor={:.3} newton_iterations={} residuals={:?}",
            r.increment,
            r.load_factor,
            r.newton_iterations,
            r.residual_history.iter().map(|v| format!("{v:.1e}")).collect::<Vec<_>>()
        ),
        Event::Cutback { load_factor, step, reason, .. } => println!("cutback at {load_factor:.3} to step {step:.4}: {reason}"),
        Event::LinearFallback { iteration, factor, .. } => {
            println!("  iteration {iteration}: tangent not positive definite, used {factor:?}")
        }
        _ => {}
    };
    let sol = solve(model, &mut observer).unwrap_or_else(|e| {
        eprintln!("solve failed: {e}");
        std::process::exit(1)
    });
    let total = t.elapsed().as_secs_f64();
    let s = &sol.stats;
    let l = &s.linear;
    let iters = s.newton_iterations.max(1) as f64;
    let bare = l.numeric_time / l.numeric_count.max(1) as f64;
    println!("termination={:?}", sol.termination);
    println!(
        "increments={} newton_iterations={} mean_per_increment={:.2} cutbacks={}",
        s.increments,
        s.newton_iterations,
        s.newton_iterations as f64 / s.increments.max(1) as f64,
        s.cutbacks
    );
    println!("nnz_matrix_lower={} nnz_factor={} factor_flops={:.3e}", l.nnz_matrix, l.nnz_factor, l.factor_flops);
    println!("time_setup_s={setup:.3} time_pattern_s={:.3} time_total_s={total:.3}", s.pattern_time);
    println!(
        "time_assembly_s={:.3} assemblies={} time_symbolic_s={:.3} time_numeric_s={:.3} numeric_factorizations={} time_solve_s={:.3}",
        s.assembly_time, s.assemblies, l.symbolic_time, l.numeric_time, l.numeric_count, l.solve_time
    );
    println!("ldlt_fallbacks={} lu_fallbacks={}", l.ldlt_fallbacks, l.lu_fallbacks);
    println!(
        "factor_threads={} single_precision_factorizations={} refinement_iterations={} reused_factorizations={} krylov_iterations={} krylov_refactorizations={} time_krylov_s={:.3}",
        l.factor_threads,
        l.single_precision_factorizations,
        l.refinement_iterations,
        l.reused_factorizations,
        l.krylov_iterations,
        l.krylov_refactorizations,
        l.krylov_time
    );
    let fill = |v: Option<usize>| v.map(|v| v.to_string()).unwrap_or("-".into());
    println!("ordering_used={} factor_entries_amd={} factor_entries_nd={}", l.ordering, fill(l.fill_amd), fill(l.fill_nested_dissection));
    println!("time_per_newton_iteration_s={:.3} bare_numeric_factorization_s={bare:.3} ratio={:.3}", total / iters, total / iters / bare);
    if let Some(mib) = peak_memory_mib() {
        println!("peak_memory_MB={mib:.1}");
    }
    sol
}
