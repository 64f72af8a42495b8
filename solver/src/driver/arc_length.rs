//! Arc-length control of a stage driven by loads: Crisfield's cylindrical
//! arc-length method (M. A. Crisfield 1981, "A fast incremental/iterative
//! solution procedure that handles snap-through", Computers & Structures
//! 13:55–62), which follows the equilibrium path past limit points where
//! the load factor must fall.
//!
//! The load factor t (stage fraction) is an unknown of each increment, and
//! the increment's change of the free displacements Δu is held on the
//! cylinder ‖Δu‖ = Δl. Every iteration solves the tangent twice, for the
//! out-of-balance force and for the load's rate q = ∂f_ext/∂t,
//! `K δu_r = −r` and `K δu_q = q`, and corrects by `δu = δu_r + δt δu_q`
//! with δt a root of `‖Δu + δu_r + δt δu_q‖² = Δl²`: of the two, the one
//! whose new Δu makes the smaller angle with the old (Crisfield's choice).
//! When the roots are complex the increment fails and the arc is cut back.
//!
//! The predictor `δt = ±Δl / ‖δu_q‖` takes the sign that continues the
//! previous increment's direction (`Δu_prev · δu_q > 0`), so the load
//! factor falls after a limit point and rises again on a stiffening branch
//! (Crisfield 1991, "Non-linear Finite Element Analysis of Solids and
//! Structures", vol. 1, §9.5; from memory). The first arc is the one whose
//! predictor changes the load factor by the stage's first increment; after
//! each increment the arc is scaled by `√(I_d / I)` (Crisfield 1981, I the
//! iterations it took, I_d the stage's `fast_iterations`), within half and
//! `growth` times, and it stays between `min / first` and `max / first`
//! times the first arc. A failed increment retries with the arc times
//! `cutback`.
//!
//! The stage ends when the load factor reaches 1 (the last increment lands
//! on it under load control) or stops the run: after `max_increments`
//! increments, or when the path comes back to no load.

use super::newton::{IncrementOutcome, NewtonContext};
use super::observer::{Event, Observer};
use super::stages::StageProgram;
use super::{Converged, Recorder};
use crate::assembly::dofs::NONE;
use crate::assembly::global::GlobalSystem;
use crate::assembly::Discretization;
use crate::contact::active::MAX_AUGMENTATIONS;
use crate::error::SolveError;
use crate::load::follower::add_pressure;
use crate::model::{Ramp, Stage};
use crate::results::SolveStats;

/// The arc of a stage: its length now, its bounds, and the direction of
/// the last converged increment.
#[derive(Debug, Clone, Default)]
struct Arc {
    /// Current arc length Δl (displacement units); 0 until the first predictor.
    length: f64,
    /// The first arc's length.
    first: f64,
    /// Displacement change of the last converged increment (free equations).
    previous: Vec<f64>,
}

/// One converged arc-length increment.
struct ArcStep {
    /// Load factor reached.
    t: f64,
    iterations: usize,
    residuals: Vec<f64>,
    energy: f64,
}

/// Refuses arc-length control where it cannot drive the stage: it scales
/// loads, so something must be loaded and nothing moved, every load ramped
/// linearly (the load factor then scales them all alike), no insert and no
/// duration (the load factor is not the time).
pub fn check_applicable(disc: &Discretization, stage: &Stage, prog: &StageProgram, start: &[f64]) -> Result<(), SolveError> {
    let needs = |needs: &str| Err(SolveError::ArcLengthNotApplicable { stage: stage.name.clone(), needs: needs.to_string() });
    if !super::limit_point::load_driven(stage, prog, start) {
        return needs("a stage driven by loads (forces, pressures, fluids or body force) that moves nothing");
    }
    if !disc.model.inserts.is_empty() {
        return needs("a model without bonded inserts");
    }
    if stage.duration.is_some() {
        return needs("a stage without a duration");
    }
    let linear = prog.pressures.iter().all(|p| p.ramp == Ramp::Linear)
        && prog.dead_changes.iter().all(|(r, _)| *r == Ramp::Linear)
        && stage.ramps.values().all(|r| *r == Ramp::Linear);
    if !linear {
        return needs("loads ramped linearly (no `ramps` on the stage)");
    }
    Ok(())
}

/// The increments of an arc-length stage (see the module documentation).
pub(super) fn run_stage(
    ctx: &mut NewtonContext,
    u: &mut [f64],
    recorder: &mut Recorder,
    max_increments: usize,
    stats: &mut SolveStats,
    observer: &mut dyn Observer,
) -> Result<Result<(), SolveError>, SolveError> {
    let (_, prog, _, _) = ctx.parts();
    let (c, name) = ctx.stage_controls();
    let si = recorder.si;
    let mut arc = Arc::default();
    let (mut t, mut count, mut peak, mut last_step) = (0.0f64, 0, 0.0f64, c.first);
    while t < 1.0 - 1e-12 {
        if count >= max_increments {
            return Ok(Err(SolveError::ArcLengthUnfinished {
                stage: name.to_string(),
                increments: count,
                load_factor: t,
                peak,
                peak_load: super::limit_point::loads_at(prog, peak),
            }));
        }
        // The increment's load factor is found on the arc; the last one's change is the guess told.
        observer.event(&Event::IncrementStart { stage: si, increment: count + 1, load_factor: t + last_step, step: last_step });
        match attempt(ctx, u, t, &mut arc, (si, count + 1), observer, stats) {
            Ok(step) => {
                count += 1;
                let change: Vec<f64> = free_change(ctx, u);
                let done = Converged {
                    increment: count,
                    t: step.t,
                    step: step.t - t,
                    iterations: step.iterations,
                    residuals: step.residuals,
                    energy: step.energy,
                };
                last_step = step.t - t;
                t = step.t;
                peak = peak.max(t);
                arc.previous = change;
                if let Err(e) = recorder.record(ctx, u, done, stats, observer) {
                    return Ok(Err(e));
                }
                let wanted = c.fast_iterations.max(1) as f64;
                let scale = (wanted / step.iterations.max(1) as f64).sqrt().clamp(0.5, c.growth);
                arc.length = (arc.length * scale).clamp(arc.first * c.min / c.first, arc.first * c.max / c.first);
                if t <= 0.0 {
                    return Ok(Err(SolveError::ArcLengthUnloaded { stage: name.to_string(), increments: count, load_factor: t }));
                }
            }
            Err(err) => {
                if let Some(stop) = shorten(ctx, u, &mut arc, (si, t), err, stats, observer)? {
                    return Ok(Err(stop));
                }
            }
        }
    }
    Ok(Ok(()))
}

/// One increment on the arc from load factor `t`; an increment that would
/// pass the stage's end lands on it under load control instead.
fn attempt(
    ctx: &mut NewtonContext,
    u: &mut [f64],
    t: f64,
    arc: &mut Arc,
    (si, increment): (usize, usize),
    observer: &mut dyn Observer,
    stats: &mut SolveStats,
) -> Result<ArcStep, SolveError> {
    // The arc's own corrections step the displacements, not the contact
    // multipliers: their Newton update is off for them.
    ctx.contacts.set_newton_multipliers(false);
    let step = arc_increment(ctx, u, t, arc, (si, increment), observer, stats);
    ctx.contacts.set_newton_multipliers(true);
    let step = step?;
    if step.t <= 1.0 {
        return Ok(step);
    }
    u.copy_from_slice(&ctx.last_converged);
    ctx.contacts.restore();
    match ctx.increment(u, 1.0, None, si, increment, observer, stats) {
        IncrementOutcome::Converged { iterations, residuals, energy, .. } => Ok(ArcStep { t: 1.0, iterations, residuals, energy }),
        IncrementOutcome::Failed(e) => Err(e),
    }
}

/// After a failed increment at load factor `t`: back to the last converged
/// state with the arc cut back; `Some` stop when the arc became shorter than
/// the stage's smallest increment allows.
fn shorten(
    ctx: &mut NewtonContext,
    u: &mut [f64],
    arc: &mut Arc,
    (si, t): (usize, f64),
    err: SolveError,
    stats: &mut SolveStats,
    observer: &mut dyn Observer,
) -> Result<Option<SolveError>, SolveError> {
    let (c, name) = ctx.stage_controls();
    stats.cutbacks += 1;
    u.copy_from_slice(&ctx.last_converged);
    ctx.contacts.restore();
    if arc.length == 0.0 {
        return Err(err);
    }
    arc.length *= c.cutback;
    let (ratio, min) = (arc.length / arc.first, c.min / c.first);
    if ratio < min {
        return Ok(Some(SolveError::ArcTooShort { stage: name.to_string(), load_factor: t, ratio, min, reason: err.to_string() }));
    }
    observer.event(&Event::Cutback { stage: si, load_factor: t, step: ratio * c.first, reason: &err });
    Ok(None)
}

/// The change of the free dofs since the last converged increment.
fn free_change(ctx: &NewtonContext, u: &[f64]) -> Vec<f64> {
    let dofs = ctx.dofs();
    let mut change = vec![0.0; dofs.n_free];
    for (d, &q) in dofs.eq.iter().enumerate() {
        if q != NONE {
            change[q] = u[d] - ctx.last_converged[d];
        }
    }
    change
}

/// Solves one increment on the arc from load factor `t0` (the last
/// converged state), returning the load factor it reached.
fn arc_increment(
    ctx: &mut NewtonContext,
    u: &mut [f64],
    t0: f64,
    arc: &mut Arc,
    (si, increment): (usize, usize),
    observer: &mut dyn Observer,
    stats: &mut SolveStats,
) -> Result<ArcStep, SolveError> {
    let (c, name) = ctx.stage_controls();
    let n = ctx.dofs().n_free;
    let (mut change, mut t) = predict(ctx, u, t0, arc, stats)?;
    let mut residuals = Vec::new();
    let (mut iterations, mut budget, mut augmentations) = (0, c.max_iterations, 0);
    let mut correction = vec![0.0; n];
    let mut factor = crate::linear::FactorKind::Cholesky;
    loop {
        let energy = ctx.evaluate_fixed(u, t, true, stats)?;
        let (res, scale) = ctx.residual_and_scale();
        let rel = res / scale;
        if iterations > 0 {
            residuals.push(rel);
            observer.event(&Event::Iteration { iteration: iterations, residual: res, relative: rel, line_search: 1.0, factor });
            if !rel.is_finite() {
                return Err(SolveError::NonFiniteResidual);
            }
            let small = norm(&correction) <= c.displacement_tolerance * norm(&change).max(f64::MIN_POSITIVE);
            if rel <= c.force_tolerance && small {
                if ctx.contacts.needs_augmentation() {
                    if augmentations >= MAX_AUGMENTATIONS {
                        let (penetration, tolerance) = ctx.contacts.worst_penetration();
                        return Err(SolveError::ContactNotResolved { penetration, tolerance, augmentations });
                    }
                    ctx.contacts.augment();
                    augmentations += 1;
                    budget = iterations + c.max_iterations;
                    continue;
                }
                if !ctx.front_moved(u, t, stats)? {
                    ctx.mixed.commit();
                    ctx.history.commit();
                    return Ok(ArcStep { t, iterations, residuals, energy });
                }
                budget = iterations + c.max_iterations;
            }
        }
        let not_converged = || SolveError::NotConverged { stage: name.to_string(), increment, residual: res, relative: rel };
        if iterations >= budget {
            return Err(not_converged());
        }
        let fact = ctx.factorize_tangent()?;
        factor = fact.kind;
        if fact.fallback {
            observer.event(&Event::LinearFallback { stage: si, increment, iteration: iterations + 1, factor });
        }
        // No real root: the arc misses the path from here (cut back).
        let dt = correct(ctx, u, &change, arc.length, &mut correction)?.ok_or_else(not_converged)?;
        t += dt;
        for (a, b) in change.iter_mut().zip(&correction) {
            *a += b;
        }
        step_by(ctx, u, &correction)?;
        iterations += 1;
    }
}

/// The predictor from the last converged state at load factor `t0`: along
/// the tangent, the arc's length, forward unless the path turned back.
/// Leaves `u` at the predicted state; returns the free dofs' change and
/// the predicted load factor.
fn predict(ctx: &mut NewtonContext, u: &mut [f64], t0: f64, arc: &mut Arc, stats: &mut SolveStats) -> Result<(Vec<f64>, f64), SolveError> {
    let (c, name) = ctx.stage_controls();
    u.copy_from_slice(&ctx.last_converged);
    ctx.mixed.restart();
    if let Some(f) = ctx.fluids.as_deref_mut() {
        f.begin_increment();
    }
    ctx.evaluate_fixed(u, t0, true, stats)?;
    ctx.factorize_tangent()?;
    let mut dq = load_rate(ctx, u);
    ctx.solve_tangent(&mut dq)?;
    let rate = norm(&dq);
    if !(rate.is_finite() && rate > 0.0) {
        return Err(SolveError::ArcLengthNotApplicable {
            stage: name.to_string(),
            needs: "loads that move the free nodes (the stage's loads act on held nodes only)".into(),
        });
    }
    if arc.length == 0.0 {
        arc.length = c.first * rate;
        arc.first = arc.length;
    }
    let forward = arc.previous.is_empty() || dot(&arc.previous, &dq) >= 0.0;
    let dt = if forward { arc.length / rate } else { -arc.length / rate };
    let change: Vec<f64> = dq.iter().map(|v| dt * v).collect();
    step_by(ctx, u, &change)?;
    Ok((change, t0 + dt))
}

/// One correction on the arc with the factorized tangent at the current
/// state: solves for the out-of-balance force and the load rate and picks
/// the root of the arc equation; writes `δu` into `correction` and returns
/// `δt` (`None`: the arc equation has no real root).
fn correct(ctx: &mut NewtonContext, u: &[f64], change: &[f64], length: f64, correction: &mut [f64]) -> Result<Option<f64>, SolveError> {
    let mut dr = ctx.free_rhs().to_vec();
    ctx.solve_tangent(&mut dr)?;
    let mut dq = load_rate(ctx, u);
    ctx.solve_tangent(&mut dq)?;
    // ‖Δu + δu_r + δt δu_q‖² = Δl²: a δt² + b δt + c = 0.
    let base: Vec<f64> = change.iter().zip(&dr).map(|(a, b)| a + b).collect();
    let a = dot(&dq, &dq);
    let b = 2.0 * dot(&base, &dq);
    let c = dot(&base, &base) - length * length;
    let Some((r1, r2)) = roots(a, b, c) else { return Ok(None) };
    // The root whose new increment turns least from the old one.
    let turn = |dt: f64| base.iter().zip(&dq).zip(change).map(|((b, q), old)| (b + dt * q) * old).sum::<f64>();
    let dt = if turn(r1) >= turn(r2) { r1 } else { r2 };
    for ((x, r), q) in correction.iter_mut().zip(&dr).zip(&dq) {
        *x = r + dt * q;
    }
    Ok(Some(dt))
}

/// The real roots of `a x² + b x + c = 0` (`a > 0`), if any.
fn roots(a: f64, b: f64, c: f64) -> Option<(f64, f64)> {
    let disc = b * b - 4.0 * a * c;
    if !(disc >= 0.0 && a > 0.0) {
        return None;
    }
    // The stable form: no cancellation between −b and the square root.
    let s = -0.5 * (b + b.signum() * disc.sqrt());
    if s == 0.0 {
        return Some((0.0, 0.0));
    }
    Some((s / a, c / s))
}

/// Moves the free dofs by `step` (by equation) and the mixed unknowns along it.
fn step_by(ctx: &mut NewtonContext, u: &mut [f64], step: &[f64]) -> Result<(), SolveError> {
    let (disc, _, _, dofs) = ctx.parts();
    for (d, &q) in dofs.eq.iter().enumerate() {
        if q != NONE {
            u[d] += step[q];
        }
    }
    if !ctx.mixed.is_empty() {
        let none = vec![0.0; u.len()];
        ctx.mixed.directions(disc, dofs, step, &none, None);
        ctx.mixed.apply(disc, 1.0)?;
    }
    Ok(())
}

/// The rate of the external force with the load factor at `u`, `∂f_ext/∂t`
/// at the free equations: dead loads, pressures and fluids at factor 1
/// minus at factor 0 (every load is linear in t, and follower loads are
/// linear in their pressure at fixed `u`).
fn load_rate(ctx: &NewtonContext, u: &[f64]) -> Vec<f64> {
    let (disc, prog, pattern, dofs) = ctx.parts();
    let mesh = disc.mesh();
    let at = |t: f64| {
        let mut f = vec![0.0; u.len()];
        prog.dead_at(t, &mut f);
        let mut system = GlobalSystem { dofs, pattern, external: &mut f, tangent: None, skew: None, predictor: None };
        for p in &prog.pressures {
            add_pressure(mesh, disc.model.analysis, &p.sides, p.start + p.ramp.fraction(t) * (p.end - p.start), u, &mut system);
        }
        if let Some(fluids) = ctx.fluids.as_deref() {
            fluids.add_loads(&mesh.nodes, u, t, &mut system);
        }
        f
    };
    let (end, start) = (at(1.0), at(0.0));
    let mut rate = vec![0.0; dofs.n_free];
    for (d, &q) in dofs.eq.iter().enumerate() {
        if q != NONE {
            rate[q] = end[d] - start[d];
        }
    }
    rate
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

fn norm(a: &[f64]) -> f64 {
    dot(a, a).sqrt()
}

#[cfg(test)]
mod tests {
    use super::roots;

    /// The roots of (x − 2)(x + 3) = x² + x − 6, and none of x² + 1.
    #[test]
    fn quadratic_roots_are_found_without_cancellation() {
        let (a, b) = roots(1.0, 1.0, -6.0).unwrap();
        let (lo, hi) = (a.min(b), a.max(b));
        assert!((lo + 3.0).abs() < 1e-14 && (hi - 2.0).abs() < 1e-14);
        assert!(roots(1.0, 0.0, 1.0).is_none());
        // 1e8 x² − x + ... : a tiny root beside a large one keeps its digits.
        let (a, b) = roots(1.0, -1e8, 1.0).unwrap();
        assert!((a.min(b) - 1e-8).abs() < 1e-20 && (a.max(b) - 1e8).abs() < 1e-6);
    }
}
