//! The `performance` object of `summary.json` and its one line in the run's
//! closing summary: problem size, the ordering the linear solver kept and
//! its factor, counts and seconds of the expensive steps, and the peak
//! memory of the process.

use serde::Serialize;

use olli_solver::SolveStats;

/// What a run cost.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Performance {
    /// Equations of the last linear system (free dofs).
    pub equations: usize,
    /// Fill-reducing ordering of the factor: `amd` or `nested-dissection`.
    pub ordering: String,
    /// Stored entries of the sparse factor with that ordering.
    /// Entries of the Cholesky factor with the ordering kept.
    pub factor_entries: usize,
    /// Factor entries with each ordering, when both were measured.
    pub factor_entries_amd: Option<usize>,
    /// Factor entries with nested dissection (AMD's are the line above).
    pub factor_entries_nested_dissection: Option<usize>,
    /// Element loops (residual, with or without the tangent).
    pub assemblies: usize,
    /// Numeric factorizations of the tangent.
    pub factorizations: usize,
    /// Seconds in the element loops and the loads added to them.
    pub assembly_s: f64,
    /// Seconds in orderings and symbolic analyses.
    pub analysis_s: f64,
    /// Seconds in numeric factorizations.
    pub factorization_s: f64,
    /// Seconds in triangular solves.
    pub solve_s: f64,
    /// Threads of the factorization and solves (1: sequential).
    pub factor_threads: usize,
    /// Factorizations done in single precision, their solves refined in
    /// double precision (included in `factorizations`).
    pub single_precision_factorizations: usize,
    /// Double-precision refinement iterations of those solves.
    pub refinement_iterations: usize,
    /// Newton systems solved on a kept factorization by a Krylov method
    /// instead of factorizing.
    pub reused_factorizations: usize,
    /// Krylov iterations of those solves.
    pub krylov_iterations: usize,
    /// Krylov solves that did not converge, so the system was factorized
    /// (included in `factorizations`).
    pub krylov_refactorizations: usize,
    /// Seconds in Krylov iterations (their triangular solves are in `solve_s` too).
    pub krylov_s: f64,
    /// Peak resident memory of the process in MiB (absent where the system does not say).
    pub peak_memory_mib: Option<f64>,
}

impl Performance {
    /// From the solver's statistics; `peak_memory_mib` from [`peak_memory_mib`].
    pub fn new(stats: &SolveStats, peak_memory_mib: Option<f64>) -> Self {
        let l = &stats.linear;
        Performance {
            equations: l.equations,
            ordering: l.ordering.to_string(),
            factor_entries: l.nnz_factor,
            factor_entries_amd: l.fill_amd,
            factor_entries_nested_dissection: l.fill_nested_dissection,
            assemblies: stats.assemblies,
            factorizations: l.numeric_count,
            assembly_s: stats.assembly_time,
            analysis_s: l.symbolic_time,
            factorization_s: l.numeric_time,
            solve_s: l.solve_time,
            factor_threads: l.factor_threads,
            single_precision_factorizations: l.single_precision_factorizations,
            refinement_iterations: l.refinement_iterations,
            reused_factorizations: l.reused_factorizations,
            krylov_iterations: l.krylov_iterations,
            krylov_refactorizations: l.krylov_refactorizations,
            krylov_s: l.krylov_time,
            peak_memory_mib,
        }
    }

    /// One line for the terminal and the log.
    pub fn line(&self) -> String {
        let memory = self.peak_memory_mib.map(|m| format!(", peak memory {m:.0} MiB")).unwrap_or_default();
        format!(
            "performance: {} equations, {} ordering ({} factor entries), {} assemblies {:.2} s, {} factorizations {:.2} s, solves {:.2} s{memory}",
            self.equations,
            self.ordering,
            self.factor_entries,
            self.assemblies,
            self.assembly_s,
            self.factorizations,
            self.factorization_s + self.analysis_s,
            self.solve_s
        )
    }
}

/// Peak resident memory of this process in MiB: `VmHWM` of `/proc/self/status`
/// (Linux); `None` elsewhere.
pub fn peak_memory_mib() -> Option<f64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    parse_vm_hwm(&status)
}

fn parse_vm_hwm(status: &str) -> Option<f64> {
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let mut words = line.split_whitespace().skip(1);
    let kib: f64 = words.next()?.parse().ok()?;
    (words.next() == Some("kB")).then_some(kib / 1024.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn peak_memory_is_read_from_the_status_text() {
        let status = "Name:\tolli\nVmPeak:\t  900000 kB\nVmHWM:\t  204800 kB\nVmRSS:\t  1024 kB\n";
        assert_eq!(parse_vm_hwm(status), Some(200.0));
        assert_eq!(parse_vm_hwm("Name:\tolli\n"), None);
        assert_eq!(parse_vm_hwm("VmHWM:\t12 pages\n"), None);
        if cfg!(target_os = "linux") {
            assert!(peak_memory_mib().is_some_and(|m| m > 0.0));
        }
    }

    #[test]
    fn the_line_names_every_figure() {
        let mut stats = SolveStats { assemblies: 40, assembly_time: 1.25, ..Default::default() };
        stats.linear.equations = 7923;
        stats.linear.ordering = "nested-dissection";
        stats.linear.nnz_factor = 1_200_000;
        stats.linear.numeric_count = 31;
        stats.linear.numeric_time = 0.5;
        stats.linear.symbolic_time = 0.25;
        stats.linear.solve_time = 0.05;
        let line = Performance::new(&stats, Some(120.4)).line();
        assert_eq!(
            line,
            "performance: 7923 equations, nested-dissection ordering (1200000 factor entries), 40 assemblies 1.25 s, \
             31 factorizations 0.75 s, solves 0.05 s, peak memory 120 MiB"
        );
    }
}
