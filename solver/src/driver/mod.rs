//! The nonlinear solution driver: stages run one after another; each stage
//! is split into load increments with adaptive size; each increment is solved
//! by Newton–Raphson with the consistent tangent and a backtracking line
//! search ([`newton`]).
//!
//! Increment control: the first increment is `controls.first` of the stage;
//! a failed increment (divergence, NaN, an inverted integration point, too
//! many iterations) is tried again with damped Newton steps, then retried
//! with `cutback` times the size; after a fast
//! convergence (within `fast_iterations`, not counting the first
//! [`REBALANCE_ALLOWANCE`] iterations of one re-balance after a contact
//! multiplier update or a fluid-front move) the next one grows by `growth`; below `min` the run stops
//! cleanly, keeping every converged increment.

pub mod arc_length;
pub mod fields;
pub mod harmonic;
pub mod held;
pub mod limit_point;
pub mod newton;
pub mod observer;
pub mod roundoff;
pub mod seal_figures;
pub mod stabilization;
pub mod stages;

pub use observer::{Event, Observer, Quiet};

use std::time::Instant;

use crate::assembly::{Discretization, DofMap, Pattern, PointHistories};
use crate::contact::active::ActiveContacts;
use crate::element::MixedState;
use crate::error::SolveError;
use crate::insert::Inserts;
use crate::linear::{self, LinearSolver, LinearStats, SymmetricPattern};
use crate::load::fluid::Fluids;
use crate::model::{Control, IncrementControls, Model, SettingsError, Stage};
use crate::results::{DynamicResult, HistoryValues, IncrementResult, Solution, SolveStats, Termination};
use newton::{IncrementOutcome, NewtonContext};
use stages::{ReportSets, StageProgram};

/// The equations of one set of constraints: which dofs are prescribed,
/// their numbering, the sparse pattern and the linear solver analysed for
/// it. Built again only when a stage changes the constraints.
struct Equations {
    prescribed: Vec<bool>,
    dofs: DofMap,
    pattern: Pattern,
    linear: Box<dyn LinearSolver>,
}

/// Everything a run carries from one increment and stage to the next.
struct RunState {
    /// Displacement at every global dof (last converged, or the current iterate).
    u: Vec<f64>,
    /// Carried pressure/dilatation of the mixed elements (empty when condensed).
    mixed: Vec<MixedState>,
    /// History variables of the integration points (empty without memory).
    history: PointHistories,
    /// Time at the last converged increment (job's time unit).
    time: f64,
    contacts: ActiveContacts,
    /// Fluids whose wetted front follows the contact (may hold none).
    fluids: Fluids,
    /// Bonded inserts with their unknowns (may hold none).
    inserts: Inserts,
    equations: Option<Equations>,
    increments: Vec<IncrementResult>,
    /// What the harmonic stages found.
    dynamic: Vec<DynamicResult>,
    stats: SolveStats,
}

/// Solves a model. Input errors (unknown sets, unsupported elements, missing
/// regions) return `Err` before any work; a run that stops part-way returns
/// `Ok` with the converged increments and [`Termination::Stopped`].
pub fn solve(model: &Model, observer: &mut dyn Observer) -> Result<Solution, SolveError> {
    let disc = Discretization::new(model)?;
    if model.stages.is_empty() {
        return Err(SolveError::NoStages);
    }
    model.validate().map_err(|e| match e {
        SettingsError::Controls { stage, source } => SolveError::BadControls { stage, source },
        other => SolveError::BadSettings(other),
    })?;
    let (programs, report_sets) = stages::resolve(&disc)?;
    if let Some(free) = held::unheld(&disc, &programs) {
        return Err(free.into());
    }
    let mut run = RunState {
        u: vec![0.0; disc.dof_count()],
        mixed: Vec::new(),
        history: PointHistories::new(&disc),
        time: 0.0,
        contacts: ActiveContacts::new(&disc)?,
        fluids: Fluids::new(&disc)?,
        inserts: Inserts::new(&disc)?,
        equations: None,
        increments: Vec::new(),
        dynamic: Vec::new(),
        stats: SolveStats::default(),
    };
    for (si, prog) in programs.iter().enumerate() {
        if let Err(stop) = run_stage(&disc, si, prog, &report_sets, &mut run, observer)? {
            return Ok(run.finish(Termination::Stopped(stop)));
        }
    }
    Ok(run.finish(Termination::Completed))
}

/// The equations for the constraints of `prog`: those in `current` when
/// they fit, else new ones (the old solver's statistics kept in `stats`).
fn equations_for<'r>(
    disc: &Discretization,
    prog: &StageProgram,
    current: &'r mut Option<Equations>,
    stats: &mut SolveStats,
) -> Result<&'r mut Equations, SolveError> {
    if current.as_ref().is_none_or(|e| e.prescribed != prog.prescribed) {
        if let Some(old) = current.take() {
            add_linear_stats(&mut stats.linear, old.linear.stats());
        }
        let t = Instant::now();
        let dofs = DofMap::with_pressures(disc.dim, &prog.prescribed, &disc.pressures.of_node);
        let pattern = Pattern::build(disc, &dofs)?;
        stats.pattern_time += t.elapsed().as_secs_f64();
        let linear = linear::analyse(&linear_pattern(&pattern), &disc.model.linear)?;
        *current = Some(Equations { prescribed: prog.prescribed.clone(), dofs, pattern, linear });
    }
    Ok(current.as_mut().expect("built above"))
}

/// Runs stage `si` through its increments. `Ok(Err(stop))`: the run stops
/// here (increment too small, or results that cannot be formed).
fn run_stage(
    disc: &Discretization,
    si: usize,
    prog: &StageProgram,
    report_sets: &ReportSets,
    run: &mut RunState,
    observer: &mut dyn Observer,
) -> Result<Result<(), SolveError>, SolveError> {
    let model = disc.model;
    let stage = &model.stages[si];
    let c = &stage.controls;
    let start: Vec<f64> = run.u.clone();
    let released = begin_stage(disc, si, prog, run);
    let prog = released.as_ref().unwrap_or(prog);
    if stage.harmonic.is_some() {
        return run_harmonic(disc, si, prog, run, observer);
    }
    if let Control::ArcLength { .. } = stage.control {
        arc_length::check_applicable(disc, stage, prog, &start)?;
    }
    let RunState { u, mixed, history: point_history, time, contacts, fluids, inserts, equations, increments, stats, .. } = run;
    let eq = equations_for(disc, prog, equations, stats)?;
    observer.event(&Event::StageStart { stage: si, name: &stage.name, equations: eq.dofs.n_free });
    let mut ctx = NewtonContext::new(disc, &eq.dofs, &eq.pattern, eq.linear.as_mut(), prog, &start, c, &stage.name, contacts)
        .with_inserts(std::mem::take(inserts))
        .with_fluids(fluids)
        .with_history(std::mem::take(point_history));
    if c.carry_pressure {
        ctx = ctx.with_states(std::mem::take(mixed));
    }
    let mut recorder = Recorder {
        disc,
        si,
        report_sets,
        stage_start_time: *time,
        duration: stage.duration.unwrap_or(0.0),
        carry_pressure: c.carry_pressure,
        mixed,
        time,
        increments,
    };
    let outcome = match stage.control {
        Control::Load => load_steps(&mut ctx, u, &mut recorder, &start, stats, observer)?,
        Control::ArcLength { max_increments } => arc_length::run_stage(&mut ctx, u, &mut recorder, max_increments, stats, observer)?,
    };
    if outcome.is_err() {
        return Ok(outcome);
    }
    *inserts = std::mem::take(&mut ctx.inserts);
    *point_history = std::mem::take(&mut ctx.history);
    Ok(Ok(()))
}

/// The increments of a load-controlled stage: each prescribes its load
/// factor; a failed one is cut back, a fast one lets the next grow.
fn load_steps(
    ctx: &mut NewtonContext,
    u: &mut [f64],
    recorder: &mut Recorder,
    start: &[f64],
    stats: &mut SolveStats,
    observer: &mut dyn Observer,
) -> Result<Result<(), SolveError>, SolveError> {
    let (si, disc) = (recorder.si, recorder.disc);
    let stage = &disc.model.stages[si];
    let (c, prog) = (&stage.controls, ctx.parts().1);
    let (mut t, mut dt) = (0.0f64, c.first.clamp(c.min, c.max).min(1.0));
    let mut history: Option<(Vec<f64>, f64)> = None;
    let mut count = 0;
    let load_driven = limit_point::load_driven(stage, prog, start);
    let mut path = limit_point::LoadPath::default();
    while t < 1.0 - 1e-12 {
        let step = dt.min(1.0 - t);
        observer.event(&Event::IncrementStart { stage: si, increment: count + 1, load_factor: t + step, step });
        ctx.history.time_step = step * recorder.duration;
        let extrapolation = if c.extrapolate { history.as_ref().map(|(prev, h)| (prev.as_slice(), step / h)) } else { None };
        match ctx.increment(u, t + step, extrapolation, si, count + 1, observer, stats) {
            IncrementOutcome::Converged { iterations, rebalances, residuals, energy } => {
                count += 1;
                t += step;
                history = Some((ctx.last_converged.clone(), step));
                path.record(step, &ctx.last_converged, u);
                let done = Converged { increment: count, t, step, iterations, residuals, energy };
                if let Err(e) = recorder.record(ctx, u, done, stats, observer) {
                    return Ok(Err(e));
                }
                dt = next_step(c, step, 1.0 - t, is_fast(c, iterations, rebalances));
            }
            IncrementOutcome::Failed(err) => {
                stats.cutbacks += 1;
                u.copy_from_slice(&ctx.last_converged);
                ctx.contacts.restore();
                let next = step * c.cutback;
                if next < c.min {
                    let limit = path.ratio().filter(|&r| load_driven && r < limit_point::LIMIT_STIFFNESS_RATIO);
                    let context =
                        recorder.increments.last().filter(|r| r.stage == si).map(|r| extrusion_context(disc, r)).unwrap_or_default();
                    return Ok(Err(stopped(stage, prog, (t, next), limit, &err, context)));
                }
                observer.event(&Event::Cutback { stage: si, load_factor: t, step: next, reason: &err });
                // The extrapolation belongs to the old step size; it is kept, scaled by the new ratio.
                dt = next;
            }
        }
    }
    Ok(Ok(()))
}

/// Iterations one re-balance may take without counting against growth: one
/// correction takes up the contact multipliers' (or the front's) change, one
/// confirms the equilibrium.
pub const REBALANCE_ALLOWANCE: usize = 2;

/// Whether an increment that took `iterations` Newton iterations with
/// `rebalances` re-balances lets the next one grow. One re-balance (the
/// usual single augmented-Lagrangian multiplier update) starts at an
/// equilibrium and costs about [`REBALANCE_ALLOWANCE`] iterations at any step
/// size: counted, it kept every contact increment from growing. More than
/// one means the step moved the contact or the fluid front too far to grow.
fn is_fast(c: &IncrementControls, iterations: usize, rebalances: usize) -> bool {
    rebalances <= 1 && iterations <= c.fast_iterations + REBALANCE_ALLOWANCE * rebalances
}

/// Largest growth of one increment over the last one when that growth ends
/// the stage in fewer increments (see [`next_step`]).
pub const PLANNED_GROWTH: f64 = 2.0;

/// Steps are planned only when the stage can end in at most this many
/// increments (see [`next_step`]).
pub const PLANNED_SPAN: f64 = 3.0;

/// The increment after a converged `step` of a stage with `remaining` of it
/// left: `growth` times the step after a fast convergence, the same step
/// otherwise, never above `max`. After a fast convergence the step is
/// planned too: where the grown step would leave a remainder that takes
/// one more increment than the fewest the largest step allows (0.1, 0.15,
/// 0.225, 0.25, 0.25 and a 0.025 sliver), it takes the smallest step that
/// ends the stage in that fewest number instead (0.25, so 0.1, 0.15, 0.25,
/// 0.25, 0.25), if that is at most [`PLANNED_GROWTH`] times the last one.
/// Only near the end of a stage, when at most [`PLANNED_SPAN`] increments
/// remain: there a sliver is a quarter of the work left, while early on an
/// earlier jump in step changes the load path of a whole frictional stage
/// (the O-ring example took a doubled step at 2 MPa into a different,
/// harder path) to save one increment of many.
fn next_step(c: &IncrementControls, step: f64, remaining: f64, fast: bool) -> f64 {
    if !fast {
        return step.min(c.max);
    }
    let grown = (step * c.growth).min(c.max);
    // Increments of at most `max` that cover `length` (a hair's overlap is
    // no increment).
    let count = |length: f64| (length / c.max - 1e-9).ceil().max(0.0);
    let fewest = count(remaining);
    if remaining <= grown || fewest > PLANNED_SPAN || 1.0 + count(remaining - grown) <= fewest {
        return grown;
    }
    let planned = remaining - (fewest - 1.0) * c.max;
    if planned <= PLANNED_GROWTH * step {
        planned.min(c.max)
    } else {
        grown
    }
}

/// Runs harmonic stage `si` about the converged state ([`harmonic`]),
/// leaving that state as it was.
fn run_harmonic(
    disc: &Discretization,
    si: usize,
    prog: &StageProgram,
    run: &mut RunState,
    observer: &mut dyn Observer,
) -> Result<Result<(), SolveError>, SolveError> {
    let name = &disc.model.stages[si].name;
    observer.event(&Event::StageStart { stage: si, name, equations: 0 });
    let preload =
        harmonic::Preload { u: &run.u, contacts: &mut run.contacts, fluids: &run.fluids, inserts: &run.inserts, history: &mut run.history };
    let result = harmonic::run(disc, si, prog, preload)?;
    observer.event(&Event::Harmonic(&result));
    run.dynamic.push(result);
    // The history shows every stage: a harmonic stage's row is the static
    // state it vibrated about, under its own name (no time passes, no iteration).
    if let Some(last) = run.increments.last() {
        let mut row = IncrementResult {
            stage: si,
            stage_name: name.clone(),
            increment: 1,
            load_factor: 1.0,
            step: 1.0,
            newton_iterations: 0,
            residual_history: Vec::new(),
            ..last.clone()
        };
        if !run.history.is_empty() {
            row.history = Some(HistoryValues { stride: run.history.stride(), values: run.history.all_converged().to_vec() });
        }
        observer.event(&Event::Converged(&row));
        row.history = None;
        run.increments.push(row);
    }
    Ok(Ok(()))
}

/// Starts stage `si` in the run's contact, fluids, inserts and carried
/// pressures; returns the program with its release loads when the stage
/// lets go of held dofs.
fn begin_stage(disc: &Discretization, si: usize, prog: &StageProgram, run: &mut RunState) -> Option<StageProgram> {
    let stage = &disc.model.stages[si];
    let released = (!prog.released.is_empty()).then(|| {
        let reactions = run.increments.last().map(|r| r.nodal_reactions.as_slice()).unwrap_or_default();
        prog.with_release_loads(reactions, disc.dim)
    });
    run.contacts.begin_stage(&stage.rigid_motions, &stage.ramps);
    run.fluids.begin_stage(stage);
    if stage.harmonic.is_none() {
        // A harmonic stage's insert drives are amplitudes: the static modes stay.
        run.inserts.begin_stage(stage);
    }
    if stage.controls.carry_pressure && run.mixed.is_empty() {
        run.mixed = vec![MixedState::default(); disc.mesh().element_count()];
    }
    released
}

/// A converged increment as a stage loop hands it to [`Recorder::record`].
struct Converged {
    /// 1-based increment of the stage.
    increment: usize,
    /// Stage fraction (load factor) reached.
    t: f64,
    /// Change of the load factor over the increment.
    step: f64,
    iterations: usize,
    residuals: Vec<f64>,
    energy: f64,
}

/// Why a run stops at stage fraction `t` when the next step `next` would be
/// below the smallest: a limit load (the load path's stiffness fell to
/// `limit` of its initial value on a load-driven stage), or the increment too small.
fn stopped(stage: &Stage, prog: &StageProgram, (t, next): (f64, f64), limit: Option<f64>, err: &SolveError, context: String) -> SolveError {
    match limit {
        Some(ratio) => SolveError::LimitPoint {
            stage: stage.name.clone(),
            load_factor: t,
            load: limit_point::loads_at(prog, t),
            percent: 100.0 * ratio,
            context,
        },
        None => SolveError::IncrementTooSmall {
            stage: stage.name.clone(),
            load_factor: t,
            step: next,
            min: stage.controls.min,
            reason: err.to_string(),
            context,
        },
    }
}

/// Keeps the converged increments of a stage: commits the state the
/// context carries, forms the results, tells the observer and stores them.
struct Recorder<'r> {
    disc: &'r Discretization<'r>,
    si: usize,
    report_sets: &'r ReportSets,
    stage_start_time: f64,
    duration: f64,
    carry_pressure: bool,
    mixed: &'r mut Vec<MixedState>,
    time: &'r mut f64,
    increments: &'r mut Vec<IncrementResult>,
}

impl Recorder<'_> {
    fn record(
        &mut self,
        ctx: &mut NewtonContext,
        u: &[f64],
        done: Converged,
        stats: &mut SolveStats,
        observer: &mut dyn Observer,
    ) -> Result<(), SolveError> {
        let (disc, model) = (self.disc, self.disc.model);
        let stage = &model.stages[self.si];
        stats.increments += 1;
        // Springs pull toward the previous increment: measure before replacing it.
        let share = ctx.stabilization_share(u);
        ctx.last_converged.copy_from_slice(u);
        ctx.contacts.commit();
        if let Some(f) = ctx.fluids.as_deref_mut() {
            f.commit();
        }
        ctx.inserts.commit();
        let result = IncrementResult {
            stage: self.si,
            stage_name: stage.name.clone(),
            increment: done.increment,
            load_factor: done.t,
            step: done.step,
            time: self.stage_start_time + done.t * self.duration,
            newton_iterations: done.iterations,
            residual_history: done.residuals,
            strain_energy: done.energy,
            stabilization_share: share,
            ..fields::increment_fields(disc, ctx, u, done.t, self.report_sets)
        };
        let mut result = fields::with_point_fields(disc, u, &ctx.history, result)?;
        *self.time = result.time;
        // Observers see the history (to evaluate stresses); stored increments do not keep it.
        if !ctx.history.is_empty() {
            result.history = Some(HistoryValues { stride: ctx.history.stride(), values: ctx.history.all_converged().to_vec() });
        }
        observer.event(&Event::Converged(&result));
        result.history = None;
        let extruded = extrusion_stop(disc, &result);
        if self.carry_pressure {
            self.mixed.clone_from(&ctx.mixed.converged);
        }
        self.increments.push(result);
        extruded.map_or(Ok(()), Err)
    }
}

/// What increment `r`, the last to converge before a stop, shows when the
/// rubber has entered an extrusion gap: how far, where, at which fluid
/// pressure, and where the strain peaks; empty otherwise.
fn extrusion_context(disc: &Discretization, r: &IncrementResult) -> String {
    let Some(e) = r.extrusions.iter().filter(|e| e.depth > 0.0).max_by(|a, b| a.depth.total_cmp(&b.depth)) else { return String::new() };
    let xy = |p: &[f64; 3]| p[..disc.dim].iter().map(|v| format!("{v:.4}")).collect::<Vec<_>>().join(", ");
    let fluids: String = r.fluids.iter().map(|f| format!(" at fluid `{}` {:.4}", f.name, f.pressure)).collect();
    let strain = &r.peaks.max_principal_log_strain;
    format!(
        "; at the last converged increment{fluids} the rubber had flowed {:.4} past the edge of extrusion gap `{}` (node {} at ({})), \
         with the largest log strain {:.3} in element {} (reference position ({})): the seal is extruding into the gap. Narrow the \
         gap, add a back-up ring or choose a harder compound",
        e.depth,
        e.name,
        e.node,
        xy(&e.at),
        strain.value,
        strain.element,
        xy(&strain.at),
    )
}

/// The stop when increment `r` takes the rubber past an extrusion gap's
/// `max_depth` (the first such gap in model order).
fn extrusion_stop(disc: &Discretization, r: &IncrementResult) -> Option<SolveError> {
    let (gap, e) = disc.model.extrusion_gaps.iter().zip(&r.extrusions).find(|(g, e)| g.max_depth.is_some_and(|m| e.depth > m))?;
    let loads: String = r.fluids.iter().map(|f| format!(", fluid `{}` at {:.4}", f.name, f.pressure)).collect();
    let at: Vec<String> = e.at[..disc.dim].iter().map(|v| format!("{v:.4}")).collect();
    Some(SolveError::Extruded(Box::new(crate::error::ExtrusionStop {
        stage: r.stage_name.clone(),
        increment: r.increment,
        load_factor: r.load_factor,
        loads,
        gap: gap.name.clone(),
        depth: e.depth,
        node: e.node,
        at: format!("({})", at.join(", ")),
        limit: gap.max_depth.unwrap_or(0.0),
    })))
}

impl RunState {
    fn finish(mut self, termination: Termination) -> Solution {
        if let Some(eq) = self.equations.take() {
            add_linear_stats(&mut self.stats.linear, eq.linear.stats());
        }
        Solution { increments: self.increments, termination, stats: self.stats, dynamic: self.dynamic }
    }
}

/// The sparsity the linear solver analyses, borrowed from the assembly pattern.
fn linear_pattern(p: &Pattern) -> SymmetricPattern<'_> {
    SymmetricPattern { n: p.n, col_ptr: &p.col_ptr, row_idx: &p.row_idx, eq_node: &p.eq_node, negative: p.negative }
}

fn add_linear_stats(total: &mut LinearStats, s: &LinearStats) {
    total.equations = s.equations;
    total.nnz_matrix = s.nnz_matrix;
    total.nnz_factor = s.nnz_factor;
    total.factor_flops = s.factor_flops;
    total.symbolic_time += s.symbolic_time;
    total.numeric_time += s.numeric_time;
    total.solve_time += s.solve_time;
    total.numeric_count += s.numeric_count;
    total.lu_fallbacks += s.lu_fallbacks;
    total.ldlt_fallbacks += s.ldlt_fallbacks;
    total.lu_nonsymmetric += s.lu_nonsymmetric;
    total.ordering = s.ordering;
    total.fill_amd = s.fill_amd;
    total.fill_nested_dissection = s.fill_nested_dissection;
    total.factor_threads = s.factor_threads;
    total.single_precision_factorizations += s.single_precision_factorizations;
    total.refinement_iterations += s.refinement_iterations;
    total.reused_factorizations += s.reused_factorizations;
    total.krylov_iterations += s.krylov_iterations;
    total.krylov_refactorizations += s.krylov_refactorizations;
    total.krylov_time += s.krylov_time;
}

#[cfg(test)]
mod tests {
    use super::{is_fast, next_step};
    use crate::model::IncrementControls;

    /// Steps of a stage that converges fast everywhere, from `first`.
    fn steps(c: &IncrementControls, first: f64) -> Vec<f64> {
        let (mut t, mut dt, mut out) = (0.0f64, first, Vec::new());
        while t < 1.0 - 1e-12 {
            let step = dt.min(1.0 - t);
            out.push(step);
            t += step;
            dt = next_step(c, step, 1.0 - t, true);
        }
        out
    }

    // Growth by 1.5 from 0.1 under a largest step of 0.25 leaves a 0.025
    // sliver: 6 increments where 5 do (0.1 + 0.15 + 3 × 0.25). Planning
    // grows the third step by 5/3 instead, and never beyond the maximum;
    // a slow increment keeps its step (definition of the rule, no
    // published value).
    #[test]
    fn fast_steps_end_the_stage_in_the_fewest_increments() {
        let c = IncrementControls { max: 0.25, ..Default::default() };
        let close = |a: &[f64], b: &[f64]| a.len() == b.len() && a.iter().zip(b).all(|(x, y)| (x - y).abs() < 1e-12);
        let planned = steps(&c, 0.1);
        assert!(close(&planned, &[0.1, 0.15, 0.25, 0.25, 0.25]), "{planned:?}");
        // Plain growth already ends well: unchanged.
        let c2 = IncrementControls { max: 0.3, ..Default::default() };
        let plain = steps(&c2, 0.1);
        assert!(close(&plain, &[0.1, 0.15, 0.225, 0.3, 0.225]), "{plain:?}");
        // A step that would have to more than double is not planned.
        let c3 = IncrementControls { max: 0.5, ..Default::default() };
        assert!(close(&steps(&c3, 0.05), &[0.05, 0.075, 0.1125, 0.16875, 0.253125, 0.340625]), "{:?}", steps(&c3, 0.05));
        // Far from the end (9 increments of 0.1 left) a step is not planned:
        // 0.05 grows by 1.5 to 0.075, not to the 0.1 that saves a sliver.
        let c4 = IncrementControls { max: 0.1, ..Default::default() };
        assert!((next_step(&c4, 0.05, 0.9, true) - 0.075).abs() < 1e-15);
        assert!(close(&steps(&c4, 0.05), &[0.05, 0.075, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.075]), "{:?}", steps(&c4, 0.05));
        assert_eq!(next_step(&c, 0.2, 0.5, false), 0.2);
        assert!(steps(&c, 0.1).iter().all(|&s| s <= c.max + 1e-15));
    }

    // The face seal's increments all converged in 3 iterations, then took
    // 2 more after the one contact multiplier update: 5 > 4, so no step
    // ever grew (40 increments of 0.05 where 25 growing ones do).
    #[test]
    fn one_contact_rebalance_does_not_stop_step_growth() {
        let c = IncrementControls::default();
        assert!(is_fast(&c, 4, 0));
        assert!(!is_fast(&c, 5, 0));
        assert!(is_fast(&c, 5, 1) && is_fast(&c, 6, 1));
        assert!(!is_fast(&c, 7, 1));
        assert!(!is_fast(&c, 6, 2), "a second re-balance: the step moved the contact too far");
    }
}
