//! The nonlinear solution driver: stages run one after another; each stage
//! is split into load increments with adaptive size; each increment is solved
//! by Newton–Raphson with the consistent tangent and a backtracking line
//! search ([`newton`]).
//!
//! Increment control: the first increment is `controls.first` of the stage;
//! a failed increment (divergence, NaN, an inverted integration point, too
//! many iterations) is retried with `cutback` times the size; after a fast
//! convergence the next one grows by `growth`; below `min` the run stops
//! cleanly, keeping every converged increment.

pub mod newton;
pub mod observer;
pub mod stabilization;
pub mod stages;

pub use observer::{Event, Observer, Quiet};

use std::time::Instant;

use rayon::prelude::*;

use crate::assembly::{Discretization, DofMap, Pattern};
use crate::contact::active::ActiveContacts;
use crate::element::{point_states, MixedState, PointState};
use crate::error::SolveError;
use crate::insert::Inserts;
use crate::linear::{LinearSolver, LinearStats};
use crate::model::Model;
use crate::results::{IncrementResult, NodalFields, PointFields, Solution, SolveStats, Termination};
use newton::{IncrementOutcome, NewtonContext};

/// Solves a model. Input errors (unknown sets, unsupported elements, missing
/// regions) return `Err` before any work; a run that stops part-way returns
/// `Ok` with the converged increments and [`Termination::Stopped`].
pub fn solve(model: &Model, observer: &mut dyn Observer) -> Result<Solution, SolveError> {
    let disc = Discretization::new(model)?;
    if model.stages.is_empty() {
        return Err(SolveError::NoStages);
    }
    let (programs, report_sets) = stages::resolve(&disc)?;
    let mut contacts = ActiveContacts::new(&disc)?;
    let mut inserts = Inserts::new(&disc)?;
    let dim = disc.dim;
    let ndof = model.mesh.node_count() * dim;
    let mut stats = SolveStats::default();
    let mut increments = Vec::new();
    let mut u = vec![0.0; ndof];
    let mut states: Vec<MixedState> = Vec::new();
    let mut system: Option<(Vec<bool>, DofMap, Pattern, LinearSolver)> = None;
    for (si, (stage, prog)) in model.stages.iter().zip(&programs).enumerate() {
        if system.as_ref().map(|s| s.0 != prog.prescribed).unwrap_or(true) {
            if let Some((_, _, _, old)) = system.take() {
                add_linear_stats(&mut stats.linear, &old.stats);
            }
            let t = Instant::now();
            let dofs = DofMap::new(dim, &prog.prescribed);
            let pattern = Pattern::build(&disc, &dofs)?;
            stats.pattern_time += t.elapsed().as_secs_f64();
            let linear = LinearSolver::new(&pattern, &model.linear)?;
            system = Some((prog.prescribed.clone(), dofs, pattern, linear));
        }
        let (_, dofs, pattern, linear) = system.as_mut().expect("built above");
        observer.event(&Event::StageStart { stage: si, name: &stage.name, equations: dofs.n_free });
        let start: Vec<f64> = u.clone();
        contacts.begin_stage(&stage.rigid_motions, &stage.ramps);
        inserts.begin_stage(stage);
        let mut ctx = NewtonContext::new(&disc, dofs, pattern, linear, prog, &start, &stage.controls, &stage.name, &mut contacts)
            .with_inserts(std::mem::take(&mut inserts));
        if stage.controls.carry_pressure {
            if states.is_empty() {
                states = vec![MixedState::default(); model.mesh.element_count()];
            }
            ctx = ctx.with_states(std::mem::take(&mut states));
        }
        let c = &stage.controls;
        let (mut t, mut dt) = (0.0f64, c.first.clamp(c.min, c.max).min(1.0));
        let mut history: Option<(Vec<f64>, f64)> = None;
        let mut count = 0;
        while t < 1.0 - 1e-12 {
            let step = dt.min(1.0 - t);
            observer.event(&Event::IncrementStart { stage: si, increment: count + 1, load_factor: t + step, step });
            let extrapolation = if c.extrapolate { history.as_ref().map(|(prev, h)| (prev.as_slice(), step / h)) } else { None };
            match ctx.increment(&mut u, t + step, extrapolation, si, count + 1, observer, &mut stats) {
                IncrementOutcome::Converged { iterations, residuals, energy } => {
                    count += 1;
                    stats.increments += 1;
                    t += step;
                    let prev_u = ctx.last_converged.clone();
                    history = Some((prev_u, step));
                    // Springs pull toward the previous increment: measure before replacing it.
                    let share = ctx.stabilization_share(&u);
                    ctx.last_converged.copy_from_slice(&u);
                    ctx.contacts.commit();
                    ctx.inserts.commit();
                    let result = increment_result(
                        &disc,
                        &ctx,
                        &u,
                        si,
                        &stage.name,
                        count,
                        t,
                        step,
                        iterations,
                        residuals,
                        energy,
                        share,
                        &report_sets,
                    );
                    let result = match result {
                        Ok(r) => r,
                        Err(e) => return Ok(finish(increments, Termination::Stopped(e), stats, system)),
                    };
                    observer.event(&Event::Converged(&result));
                    if stage.controls.carry_pressure {
                        states.clone_from(&ctx.states_converged);
                    }
                    increments.push(result);
                    if iterations <= c.fast_iterations {
                        dt = (step * c.growth).min(c.max);
                    } else {
                        dt = step.min(c.max);
                    }
                }
                IncrementOutcome::Failed(err) => {
                    stats.cutbacks += 1;
                    u.copy_from_slice(&ctx.last_converged);
                    ctx.contacts.restore();
                    let next = step * c.cutback;
                    if next < c.min {
                        let stop = SolveError::IncrementTooSmall {
                            stage: stage.name.clone(),
                            load_factor: t,
                            step: next,
                            min: c.min,
                            reason: err.to_string(),
                        };
                        return Ok(finish(increments, Termination::Stopped(stop), stats, system));
                    }
                    observer.event(&Event::Cutback { stage: si, load_factor: t, step: next, reason: &err });
                    dt = next;
                    // The extrapolation belongs to the old step size; keep it, scaled by the new ratio.
                }
            }
        }
        inserts = std::mem::take(&mut ctx.inserts);
    }
    Ok(finish(increments, Termination::Completed, stats, system))
}

fn finish(
    increments: Vec<IncrementResult>,
    termination: Termination,
    mut stats: SolveStats,
    system: Option<(Vec<bool>, DofMap, Pattern, LinearSolver)>,
) -> Solution {
    if let Some((_, _, _, lin)) = system {
        add_linear_stats(&mut stats.linear, &lin.stats);
    }
    Solution { increments, termination, stats }
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
}

#[allow(clippy::too_many_arguments)]
fn increment_result(
    disc: &Discretization,
    ctx: &NewtonContext,
    u: &[f64],
    stage: usize,
    stage_name: &str,
    increment: usize,
    load_factor: f64,
    step: f64,
    iterations: usize,
    residual_history: Vec<f64>,
    strain_energy: f64,
    stabilization_share: f64,
    report_sets: &std::collections::BTreeMap<String, Vec<usize>>,
) -> Result<IncrementResult, SolveError> {
    let model = disc.model;
    let dim = disc.dim;
    let mesh = disc.mesh();
    let displacement: Vec<[f64; 3]> = (0..mesh.node_count())
        .map(|n| {
            let mut d = [0.0; 3];
            d[..dim].copy_from_slice(&u[n * dim..n * dim + dim]);
            d
        })
        .collect();
    let reactions = report_sets
        .iter()
        .map(|(name, nodes)| {
            let mut r = [0.0; 3];
            for &n in nodes {
                for i in 0..dim {
                    r[i] += ctx.residual[n * dim + i];
                }
            }
            (name.clone(), r)
        })
        .collect();
    let want_points = model.output.point_fields || model.output.nodal_fields;
    let points = if want_points {
        let per: Vec<Result<Vec<PointState>, SolveError>> = (0..mesh.element_count())
            .into_par_iter()
            .map(|e| {
                let (mut x, mut ue) = ([[0.0; 3]; 8], [[0.0; 3]; 8]);
                disc.gather(e, u, &mut x, &mut ue);
                let ctx = disc.context(e);
                let mut out = vec![PointState::default(); ctx.shape.points()];
                point_states(&ctx, &x, &ue, &mut out).map_err(|err| SolveError::from_element(e, err))?;
                Ok(out)
            })
            .collect();
        let mut fields = PointFields { offsets: vec![0], states: Vec::new() };
        for p in per {
            fields.states.extend(p?);
            fields.offsets.push(fields.states.len());
        }
        Some(fields)
    } else {
        None
    };
    let nodal = if model.output.nodal_fields { points.as_ref().map(|p| nodal_average(disc, p)) } else { None };
    Ok(IncrementResult {
        stage,
        stage_name: stage_name.to_string(),
        increment,
        load_factor,
        step,
        displacement,
        reactions,
        newton_iterations: iterations,
        residual_history,
        strain_energy,
        stabilization_share,
        axisymmetric: model.analysis == crate::element::Analysis::Axisymmetric,
        contact: ctx.contacts.summaries(),
        inserts: ctx.inserts.results(),
        contact_fields: if ctx.contacts.is_empty() { None } else { Some(ctx.contacts.fields(mesh.node_count())) },
        points: if model.output.point_fields { points } else { None },
        nodal,
    })
}

/// Volume-weighted average, at each node, of the points of the elements around it.
fn nodal_average(disc: &Discretization, p: &PointFields) -> NodalFields {
    let mesh = disc.mesh();
    let nn = mesh.node_count();
    let mut w = vec![0.0; nn];
    let mut f = NodalFields {
        cauchy: vec![[0.0; 6]; nn],
        pressure: vec![0.0; nn],
        j: vec![0.0; nn],
        max_log_strain: vec![0.0; nn],
        energy_density: vec![0.0; nn],
    };
    for e in 0..mesh.element_count() {
        let pts = p.element(e);
        let vol: f64 = pts.iter().map(|s| s.volume).sum();
        let mut mean = [0.0; 10];
        for s in pts {
            let c = &s.cauchy;
            let v =
                [c[(0, 0)], c[(1, 1)], c[(2, 2)], c[(0, 1)], c[(1, 2)], c[(0, 2)], s.pressure, s.j, s.max_log_strain(), s.energy_density];
            for k in 0..10 {
                mean[k] += v[k] * s.volume / vol;
            }
        }
        for &n in mesh.element_nodes(e) {
            w[n] += vol;
            for k in 0..6 {
                f.cauchy[n][k] += mean[k] * vol;
            }
            f.pressure[n] += mean[6] * vol;
            f.j[n] += mean[7] * vol;
            f.max_log_strain[n] += mean[8] * vol;
            f.energy_density[n] += mean[9] * vol;
        }
    }
    for n in 0..nn {
        if w[n] > 0.0 {
            let s = 1.0 / w[n];
            f.cauchy[n].iter_mut().for_each(|v| *v *= s);
            f.pressure[n] *= s;
            f.j[n] *= s;
            f.max_log_strain[n] *= s;
            f.energy_density[n] *= s;
        }
    }
    f
}
