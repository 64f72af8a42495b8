//! The arrays of one result frame, computed from a converged displacement:
//! integration-point states per element (the element kernel's own
//! [`point_states_with_history`]), their volume-weighted element means (cell data), the
//! node averages of those means (point data), the nodal reaction forces, and
//! the peak values the run summary reports.
//!
//! Frames are computed only for the increments that are written, so the
//! solver keeps no per-increment fields and memory stays bounded.

use rayon::prelude::*;
use serde::Serialize;

use super::vtu::Field;
use olli_solver::assembly::{point_states_with_history, Discretization};
use olli_solver::element::taylor_hood::MAX_PRESSURE_NODES;
use olli_solver::element::{PointState, MAX_POINTS};
use olli_solver::error::SolveError;
use olli_solver::results::{element_mean, nodal_average, nodal_quantities, HistoryValues};
use olli_solver::shape::MAX_NODES;

pub use olli_solver::results::von_mises;

/// A value and where it occurs.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Peak {
    /// The peak value, in the field's units.
    pub value: f64,
    /// Reference position (node, or integration point).
    pub at: [f64; 3],
}

impl Peak {
    fn none() -> Self {
        Peak { value: f64::NEG_INFINITY, at: [0.0; 3] }
    }

    fn offer(&mut self, value: f64, at: [f64; 3]) {
        if value > self.value {
            *self = Peak { value, at };
        }
    }

    /// Replaces the empty-mesh sentinel so JSON never holds infinities.
    fn finite(self) -> Self {
        if self.value.is_finite() {
            self
        } else {
            Peak { value: 0.0, at: [0.0; 3] }
        }
    }
}

/// Peak values of one frame (stress units, length units, strain dimensionless).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Peaks {
    /// Largest displacement magnitude, at a node.
    pub displacement: Peak,
    /// Largest maximum principal logarithmic strain, at an integration point.
    pub max_principal_log_strain: Peak,
    /// Largest von Mises stress, at an integration point.
    pub von_mises: Peak,
    /// Largest principal Cauchy stress (most tensile), at an integration point.
    pub max_principal_stress: Peak,
    /// Smallest principal Cauchy stress (most compressive), at an integration point.
    pub min_principal_stress: Peak,
    /// Largest hydrostatic pressure (compression positive), at an integration point.
    pub max_pressure: Peak,
    /// Most negative hydrostatic pressure (hydrostatic tension), at an integration point.
    pub min_pressure: Peak,
}

impl Peaks {
    fn empty() -> Self {
        Peaks {
            displacement: Peak::none(),
            max_principal_log_strain: Peak::none(),
            von_mises: Peak::none(),
            max_principal_stress: Peak::none(),
            min_principal_stress: Peak::none(),
            max_pressure: Peak::none(),
            min_pressure: Peak::none(),
        }
    }

    fn all_mut(&mut self) -> [&mut Peak; 7] {
        [
            &mut self.displacement,
            &mut self.max_principal_log_strain,
            &mut self.von_mises,
            &mut self.max_principal_stress,
            &mut self.min_principal_stress,
            &mut self.max_pressure,
            &mut self.min_pressure,
        ]
    }
}

/// The arrays and peaks of one frame.
#[derive(Debug, Clone, PartialEq)]
pub struct Frame {
    /// Arrays per node.
    pub point: Vec<Field>,
    /// Arrays per element.
    pub cell: Vec<Field>,
    /// Peaks of the frame's fields.
    pub peaks: Peaks,
}

/// Element means, in this order: Cauchy xx yy zz xy yz xz, pressure, J,
/// max log strain, energy density, von Mises.
const MEANS: usize = 11;

struct ElementResult {
    means: [f64; MEANS],
    volume: f64,
    peaks: Peaks,
}

/// Computes the frame of displacement `u` (flat, `dim` per node);
/// `reactions` are the solver's nodal reactions of the increment
/// ([`olli_solver::IncrementResult::nodal_reactions`]), so the `reaction`
/// array sums over a set to the summary's reaction of that set;
/// `history` holds the converged history values of materials with memory
/// (their stresses depend on it); `wanted` names the arrays to keep (see
/// [`crate::job::FIELD_NAMES`]).
pub fn frame(
    disc: &Discretization,
    u: &[f64],
    reactions: &[[f64; 3]],
    history: Option<&HistoryValues>,
    wanted: &[String],
) -> Result<Frame, SolveError> {
    let mesh = disc.mesh();
    let dim = disc.dim;
    let per: Vec<Result<ElementResult, SolveError>> =
        (0..mesh.element_count()).into_par_iter().map(|e| element_result(disc, e, u, history)).collect();
    let nn = mesh.node_count();
    let mut cell = Vec::with_capacity(per.len());
    let mut volumes = Vec::with_capacity(per.len());
    let mut peaks = Peaks::empty();
    for r in per {
        let mut r = r?;
        cell.push(r.means);
        volumes.push(r.volume);
        merge(&mut peaks, &mut r.peaks);
    }
    let node = nodal_average(mesh, &cell, &volumes);
    for n in 0..nn {
        let mut d = [0.0; 3];
        d[..dim].copy_from_slice(&u[n * dim..n * dim + dim]);
        let size = (d[0] * d[0] + d[1] * d[1] + d[2] * d[2]).sqrt();
        peaks.displacement.offer(size, mesh.nodes[n]);
    }
    let want = |name: &str| wanted.iter().any(|w| w == name);
    let column = |rows: &[[f64; MEANS]], k: usize| rows.iter().map(|r| r[k]).collect::<Vec<f64>>();
    let mut point = Vec::new();
    if want("displacement") {
        let mut d = vec![0.0; nn * 3];
        for n in 0..nn {
            d[n * 3..n * 3 + dim].copy_from_slice(&u[n * dim..n * dim + dim]);
        }
        point.push(Field::new("displacement", 3, d));
    }
    if want("cauchy_stress") {
        point.push(Field::new("cauchy_stress", 6, node.iter().flat_map(|r| r[..6].to_vec()).collect()));
    }
    for (name, k) in [("pressure", 6), ("von_mises", 10), ("max_principal_log_strain", 8), ("energy_density", 9)] {
        if want(name) {
            point.push(Field::new(name, 1, column(&node, k)));
        }
    }
    if want("reaction") {
        point.push(Field::new("reaction", 3, reactions.iter().flatten().copied().collect()));
    }
    let mut cells = Vec::new();
    if want("material") {
        cells.push(Field::new("material", 1, disc.region_of.iter().map(|&r| r as f64).collect()));
    }
    if want("volume_ratio") {
        cells.push(Field::new("volume_ratio", 1, column(&cell, 7)));
    }
    if want("element_pressure") {
        cells.push(Field::new("element_pressure", 1, column(&cell, 6)));
    }
    for peak in peaks.all_mut() {
        *peak = peak.finite();
    }
    let p = &mut peaks;
    // Minima were tracked as maxima of the negated value.
    p.min_principal_stress.value = -p.min_principal_stress.value;
    p.min_pressure.value = -p.min_pressure.value;
    Ok(Frame { point, cell: cells, peaks })
}

fn merge(into: &mut Peaks, from: &mut Peaks) {
    for (a, b) in into.all_mut().into_iter().zip(from.all_mut()) {
        a.offer(b.value, b.at);
    }
}

/// Point states, means and peaks of element `e`.
fn element_result(disc: &Discretization, e: usize, u: &[f64], history: Option<&HistoryValues>) -> Result<ElementResult, SolveError> {
    let (mut x, mut ue) = ([[0.0; 3]; MAX_NODES], [[0.0; 3]; MAX_NODES]);
    disc.gather(e, u, &mut x, &mut ue);
    let mut pressures = [0.0; MAX_PRESSURE_NODES];
    let corners = disc.gather_pressures(e, u, &mut pressures);
    let ctx = disc.context(e);
    let np = ctx.shape.points();
    let mut states = [PointState::default(); MAX_POINTS];
    point_states_with_history(&ctx, &x, &ue, &pressures[..corners], history.map(|h| h.element(e)), &mut states[..np])
        .map_err(|err| SolveError::from_element(e, err))?;
    let (means, volume) = element_mean(&states[..np], |s| {
        let q = nodal_quantities(s);
        [q[0], q[1], q[2], q[3], q[4], q[5], q[6], q[7], q[8], q[9], von_mises(&s.cauchy)]
    });
    let mut peaks = Peaks::empty();
    for s in &states[..np] {
        let c = &s.cauchy;
        let strain = s.max_log_strain();
        let eig = c.symmetric_eigenvalues();
        peaks.max_principal_log_strain.offer(strain, s.position);
        peaks.von_mises.offer(von_mises(c), s.position);
        peaks.max_principal_stress.offer(eig.max(), s.position);
        peaks.min_principal_stress.offer(-eig.min(), s.position);
        peaks.max_pressure.offer(s.pressure, s.position);
        peaks.min_pressure.offer(-s.pressure, s.position);
    }
    Ok(ElementResult { means, volume, peaks })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::job::load_str;
    use nalgebra::Matrix3;

    /// Von Mises stress of textbook states (general mechanics): uniaxial σ
    /// gives |σ|, pure shear τ gives √3 τ, a hydrostatic state gives 0.
    #[test]
    fn von_mises_of_textbook_states() {
        let uniaxial = Matrix3::new(-3.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0);
        assert!((von_mises(&uniaxial) - 3.0).abs() < 1e-14);
        let shear = Matrix3::new(0.0, 2.0, 0.0, 2.0, 0.0, 0.0, 0.0, 0.0, 0.0);
        assert!((von_mises(&shear) - 2.0 * 3f64.sqrt()).abs() < 1e-14);
        assert!(von_mises(&(Matrix3::identity() * 5.0)).abs() < 1e-14);
    }

    /// The nodal `reaction` array must add up, over a set, to the reaction
    /// the solver reports for that set, also where a load acts on held nodes
    /// (here a force on the moved top edge): both are internal minus
    /// external force at the held components. (The array once held the
    /// internal force alone and differed from the summary by that load.)
    #[test]
    fn reaction_field_sums_to_the_set_reaction() {
        let text = r#"
analysis = "plane-strain"
thickness = 2.0
[mesh]
generate = "rectangle"
size = [4.0, 2.0]
divisions = [4, 2]
[materials.m]
model = "neo-hookean"
shear_modulus = 1.0
bulk_modulus = 500.0
[[region]]
elements = "all"
material = "m"
[[support]]
nodes = "bottom"
fix = ["x", "y"]
[[motion]]
nodes = "top"
displacement = { x = 0.3, y = -0.2 }
[[force]]
set = "top"
stage = "load"
total = { x = 0.5, y = 0.25 }
[[stage]]
name = "load"
first_increment = 0.5
max_increment = 0.5
"#;
        let job = load_str(std::path::Path::new("t.toml"), text).unwrap();
        let sol = olli_solver::solve(&job.model, &mut olli_solver::Quiet).unwrap();
        let last = sol.last().unwrap();
        let disc = Discretization::new(&job.model).unwrap();
        let u: Vec<f64> = last.displacement.iter().flat_map(|d| d[..2].to_vec()).collect();
        let f = frame(&disc, &u, &last.nodal_reactions, None, &["reaction".to_string()]).unwrap();
        // The top's reaction is the internal force less the applied 0.5 (x):
        // compare with the element forces summed over the top edge.
        let mut internal = [0.0; 2];
        for e in 0..job.model.mesh.element_count() {
            let (mut x, mut ue) = ([[0.0; 3]; MAX_NODES], [[0.0; 3]; MAX_NODES]);
            disc.gather(e, &u, &mut x, &mut ue);
            let mut fe = [0.0; 8];
            olli_solver::assembly::element_into(&disc.context(e), &x, &ue, &mut fe, None).unwrap();
            for (a, &n) in job.model.mesh.element_nodes(e).iter().enumerate() {
                if job.model.mesh.node_sets["top"].contains(&n) {
                    internal[0] += fe[2 * a];
                    internal[1] += fe[2 * a + 1];
                }
            }
        }
        let top = last.reactions["top"];
        assert!((internal[0] - top[0] - 0.5).abs() < 1e-8 && (internal[1] - top[1] - 0.25).abs() < 1e-8, "{internal:?} vs {top:?}");
        let reaction = &f.point[0].values;
        for set in ["bottom", "top"] {
            let want = last.reactions[set];
            let mut sum = [0.0; 2];
            for &n in &job.model.mesh.node_sets[set] {
                sum[0] += reaction[n * 3];
                sum[1] += reaction[n * 3 + 1];
            }
            for i in 0..2 {
                assert!((sum[i] - want[i]).abs() < 1e-9 * (1.0 + want[i].abs()), "{set}[{i}]: {} vs {}", sum[i], want[i]);
            }
        }
        assert!(last.reactions["top"][0].abs() > 0.1, "the top is sheared: a real reaction");
        assert!(f.peaks.displacement.value >= (0.3f64.powi(2) + 0.2f64.powi(2)).sqrt() - 1e-12);
    }
}
