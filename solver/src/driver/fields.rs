//! The fields of a converged increment: displacements, reactions (per node
//! and per reported set), contact figures, and the integration-point and
//! nodal fields the model's output settings ask for, and the peaks of
//! every increment (largest log strain and von Mises stress, smallest J).

use rayon::prelude::*;

use super::newton::NewtonContext;
use super::stages::ReportSets;
use crate::assembly::dofs::NONE;
use crate::assembly::{point_states_with_history, Discretization, PointHistories};
use crate::element::taylor_hood::MAX_PRESSURE_NODES;
use crate::element::{Analysis, PointState};
use crate::error::SolveError;
use crate::results::{IncrementPeaks, IncrementResult, NodalFields, PointFields};
use crate::shape::MAX_NODES;

/// Displacements, reactions, contact and fluid figures at the converged
/// `u` and stage fraction `t` (the residual of the last evaluation gives the
/// reactions); the increment's counters and its point fields are left to
/// the caller.
pub fn increment_fields(disc: &Discretization, ctx: &NewtonContext, u: &[f64], t: f64, report_sets: &ReportSets) -> IncrementResult {
    let dim = disc.dim;
    let mesh = disc.mesh();
    let per_node = |values: &dyn Fn(usize) -> f64| -> Vec<[f64; 3]> {
        (0..mesh.node_count())
            .map(|n| {
                let mut d = [0.0; 3];
                for (i, v) in d.iter_mut().enumerate().take(dim) {
                    *v = values(n * dim + i);
                }
                d
            })
            .collect()
    };
    let displacement = per_node(&|d| u[d]);
    let pressure_unknowns = u[mesh.node_count() * dim..].to_vec();
    let nodal_reactions = per_node(&|d| if ctx.dofs().eq[d] == NONE { ctx.residual[d] } else { 0.0 });
    let reactions = report_sets
        .iter()
        .map(|(name, nodes)| {
            let mut r = [0.0; 3];
            for &n in nodes {
                for i in 0..3 {
                    r[i] += nodal_reactions[n][i];
                }
            }
            (name.clone(), r)
        })
        .collect();
    let current: Vec<nalgebra::Vector3<f64>> =
        displacement.iter().zip(&mesh.nodes).map(|(d, x)| nalgebra::Vector3::new(x[0] + d[0], x[1] + d[1], x[2] + d[2])).collect();
    IncrementResult {
        glands: super::seal_figures::glands(&disc.model.glands, mesh, &current, ctx.contacts),
        extrusions: super::seal_figures::extrusions(&disc.model.extrusion_gaps, mesh, &current, ctx.contacts),
        reaction_moments: reaction_moments(disc, &nodal_reactions, u, report_sets),
        displacement,
        pressure_unknowns,
        reactions,
        nodal_reactions,
        axisymmetric: disc.model.analysis == Analysis::Axisymmetric,
        contact: ctx.contacts.summaries(),
        inserts: ctx.inserts.results(),
        contact_fields: if ctx.contacts.is_empty() { None } else { Some(ctx.contacts.fields(mesh.node_count())) },
        fluids: ctx.fluids.as_deref().map(|f| f.summaries(&mesh.nodes, u, t)).unwrap_or_default(),
        fluid_pressure: ctx.fluids.as_deref().map(|f| f.nodal_pressure(mesh.node_count(), t)),
        ..Default::default()
    }
}

/// Σ (x_i − p) × r_i over the nodes of each set with a moment point, at the
/// deformed positions x_i = X_i + u_i.
fn reaction_moments(
    disc: &Discretization,
    nodal_reactions: &[[f64; 3]],
    u: &[f64],
    report_sets: &ReportSets,
) -> std::collections::BTreeMap<String, [f64; 3]> {
    let dim = disc.dim;
    let mesh = disc.mesh();
    disc.model
        .moment_points
        .iter()
        .filter_map(|(name, p)| {
            let nodes = report_sets.get(name)?;
            let mut m = [0.0; 3];
            for &n in nodes {
                let mut arm = [0.0; 3];
                for i in 0..dim {
                    arm[i] = mesh.nodes[n][i] + u[n * dim + i] - p[i];
                }
                let c = crate::insert::rotation::cross(arm, nodal_reactions[n]);
                (0..3).for_each(|i| m[i] += c[i]);
            }
            Some((name.clone(), m))
        })
        .collect()
}

/// `result` with the peaks of every integration point at `u` (with the
/// converged `history` of materials with memory) and the point and nodal
/// fields that the model's output settings keep.
pub fn with_point_fields(
    disc: &Discretization,
    u: &[f64],
    history: &PointHistories,
    mut result: IncrementResult,
) -> Result<IncrementResult, SolveError> {
    let output = disc.model.output;
    let mesh = disc.mesh();
    let per: Vec<Result<Vec<PointState>, SolveError>> = (0..mesh.element_count())
        .into_par_iter()
        .map(|e| {
            let (mut x, mut ue) = ([[0.0; 3]; MAX_NODES], [[0.0; 3]; MAX_NODES]);
            disc.gather(e, u, &mut x, &mut ue);
            let mut p = [0.0; MAX_PRESSURE_NODES];
            let np = disc.gather_pressures(e, u, &mut p);
            let ctx = disc.context(e);
            let mut out = vec![PointState::default(); ctx.shape.points()];
            let converged = if history.is_empty() { None } else { Some(history.converged(e)) };
            point_states_with_history(&ctx, &x, &ue, &p[..np], converged, &mut out).map_err(|err| SolveError::from_element(e, err))?;
            Ok(out)
        })
        .collect();
    let mut points = PointFields { offsets: vec![0], states: Vec::new() };
    let mut peaks: Option<IncrementPeaks> = None;
    for (e, p) in per.into_iter().enumerate() {
        let p = p?;
        if let Some(here) = IncrementPeaks::of_element(e, &p) {
            peaks = Some(peaks.map_or(here, |all| all.merge(here)));
        }
        if output.point_fields || output.nodal_fields {
            points.states.extend(p);
            points.offsets.push(points.states.len());
        }
    }
    result.peaks = peaks.unwrap_or_default();
    if output.nodal_fields {
        result.nodal = Some(NodalFields::from_points(mesh, &points));
    }
    if output.point_fields {
        result.points = Some(points);
    }
    Ok(result)
}
