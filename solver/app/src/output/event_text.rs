//! One line of text per solver event, shared by the run log and the plain
//! (non-terminal) progress output so both read the same.

use std::time::Instant;

use olli_solver::driver::Event;

/// Formats events; remembers the current stage name and the run's start.
#[derive(Debug, Clone)]
pub struct EventText {
    start: Instant,
    stage: String,
    stage_count: usize,
}

impl EventText {
    /// A formatter for a run of `stage_count` stages, its clock started now.
    pub fn new(stage_count: usize) -> Self {
        EventText { start: Instant::now(), stage: String::new(), stage_count }
    }

    /// Seconds since the run started.
    pub fn elapsed(&self) -> f64 {
        self.start.elapsed().as_secs_f64()
    }

    /// The line for `event`; increment starts and Newton iterations only
    /// when `iterations` is set (the log has them, plain progress does not).
    pub fn line(&mut self, event: &Event, iterations: bool) -> Option<String> {
        let t = self.elapsed();
        let text = match event {
            Event::StageStart { stage, name, equations } => {
                self.stage = name.to_string();
                format!("stage `{name}` ({} of {}): {equations} equations", stage + 1, self.stage_count)
            }
            Event::IncrementStart { increment, load_factor, step, .. } => {
                if !iterations {
                    return None;
                }
                format!("stage `{}` increment {increment}: to load factor {load_factor:.4} (increment {step:.4})", self.stage)
            }
            Event::Iteration { iteration, residual, relative, line_search, .. } => {
                if !iterations {
                    return None;
                }
                format!("  iteration {iteration}: residual {residual:.3e} (relative {relative:.3e}), step length {line_search:.3}")
            }
            Event::LinearFallback { iteration, factor, .. } => {
                if !iterations {
                    return None;
                }
                format!("  iteration {iteration}: tangent not positive definite, solved with {factor:?}")
            }
            Event::DampedRetry { increment, reason, .. } => {
                format!("stage `{}` increment {increment}: retried with damped Newton steps ({reason})", self.stage)
            }
            Event::Cutback { load_factor, step, reason, .. } => {
                format!("stage `{}` cutback at load factor {load_factor:.4} ({reason}); retrying with increment {step:.3e}", self.stage)
            }
            Event::Harmonic(d) => {
                let driven = d.stiffness.len();
                format!("harmonic stage `{}`: {} frequencies, {driven} driven set and insert components", d.stage_name, d.frequencies.len())
            }
            Event::Converged(r) => {
                // + 0.0: an empty sum (a stage with no free equations) is −0.0, printed "-0.00e0".
                let res = r.residual_history.last().copied().unwrap_or(0.0) + 0.0;
                format!(
                    "stage `{}` increment {}: load factor {:.4} (increment {:.4}), {} iterations, residual {res:.2e}",
                    r.stage_name, r.increment, r.load_factor, r.step, r.newton_iterations
                )
            }
        };
        Some(format!("[{t:8.2} s] {text}"))
    }
}
