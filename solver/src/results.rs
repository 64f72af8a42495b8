//! What a solve returns: one [`IncrementResult`] per converged increment,
//! the reason the run ended, and solver statistics.

use std::collections::BTreeMap;
use std::f64::consts::PI;

pub use crate::contact::active::{ContactFields, ContactSummary};
use olli_mesh::Mesh;

use crate::element::PointState;
use crate::error::SolveError;
use crate::linear::LinearStats;
pub use crate::load::fluid::FluidSummary;

/// Integration-point fields of every element.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PointFields {
    /// Start of each element's points in `states` (length elements + 1).
    pub offsets: Vec<usize>,
    /// State of every integration point, element after element.
    pub states: Vec<PointState>,
}

impl PointFields {
    /// The integration-point states of element `e`.
    pub fn element(&self, e: usize) -> &[PointState] {
        &self.states[self.offsets[e]..self.offsets[e + 1]]
    }
}

/// History values of every element's integration points, `stride` values
/// per element in element order (see [`crate::assembly::history`]).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct HistoryValues {
    /// Values per element.
    pub stride: usize,
    /// All values, element after element.
    pub values: Vec<f64>,
}

impl HistoryValues {
    /// The values of element `e`.
    pub fn element(&self, e: usize) -> &[f64] {
        &self.values[e * self.stride..(e + 1) * self.stride]
    }
}

/// Point fields averaged to nodes (weighted by the integration-point volume
/// of the elements around each node).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct NodalFields {
    /// Cauchy stress in Voigt order xx, yy, zz, xy, yz, xz (axisymmetric:
    /// rr, zz, θθ, rz, 0, 0).
    pub cauchy: Vec<[f64; 6]>,
    /// Hydrostatic pressure −tr σ / 3, positive in compression.
    pub pressure: Vec<f64>,
    /// Volume ratio J.
    pub j: Vec<f64>,
    /// Largest principal logarithmic strain.
    pub max_log_strain: Vec<f64>,
    /// Strain energy density per unit reference volume.
    pub energy_density: Vec<f64>,
}

/// One converged increment.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct IncrementResult {
    /// Index of the stage in the model.
    pub stage: usize,
    /// Name of the stage.
    pub stage_name: String,
    /// Converged increments of this stage so far (1-based).
    pub increment: usize,
    /// Fraction of the stage reached (0–1].
    pub load_factor: f64,
    /// Size of this increment (fraction of the stage).
    pub step: f64,
    /// Time at the end of the increment since the start of the run (job's
    /// time unit; stages without a duration take none).
    pub time: f64,
    /// The converged history values of the integration points (materials
    /// with memory): handed to observers with [`crate::driver::Event::Converged`]
    /// so they can evaluate stresses, and dropped from the stored increments.
    pub history: Option<HistoryValues>,
    /// Node displacements (2-D: third entry zero).
    pub displacement: Vec<[f64; 3]>,
    /// The solution's unknowns after the displacements: the continuous
    /// (Taylor–Hood) pressure of tet10 elements at their corner nodes, as
    /// carried (p = s π, s = `Discretization::pressures.scale`), in the
    /// order of `Discretization::pressures.node`; empty without them.
    /// [`Self::solution_vector`] puts both back together.
    pub pressure_unknowns: Vec<f64>,
    /// Reaction force summed over each named set (the sum of
    /// [`Self::nodal_reactions`] over its nodes); axisymmetric: over the full 2π.
    pub reactions: BTreeMap<String, [f64; 3]>,
    /// Moment of the reactions of each set in [`crate::Model::moment_points`]
    /// about its point, at the deformed node positions.
    pub reaction_moments: BTreeMap<String, [f64; 3]>,
    /// Reaction force at every node: internal minus external force at its
    /// prescribed components, zero at free ones (2-D: third entry zero).
    pub nodal_reactions: Vec<[f64; 3]>,
    /// Linear solves of this increment.
    pub newton_iterations: usize,
    /// Out-of-balance force relative to the force scale after each Newton
    /// correction (the last entry is the converged one).
    pub residual_history: Vec<f64>,
    /// Total strain energy (axisymmetric: full 2π; plane strain: thickness).
    pub strain_energy: f64,
    /// Whether the model is axisymmetric (forces and energy over the full 2π).
    pub axisymmetric: bool,
    /// Integration-point fields (None when [`crate::model::OutputSettings::point_fields`] is off).
    pub points: Option<PointFields>,
    /// Nodal averages (None when [`crate::model::OutputSettings::nodal_fields`] is off).
    pub nodal: Option<NodalFields>,
    /// Stabilization springs' force relative to the problem's force scale
    /// (0 without stabilization); keep it well below 1 %.
    pub stabilization_share: f64,
    /// Per bonded insert: its position and the force and moment on it.
    pub inserts: Vec<crate::insert::InsertResult>,
    /// Per rigid body: total force, contact width, peak pressure.
    pub contact: Vec<ContactSummary>,
    /// Contact pressure, gap, slip and status at nodes (when the model has rigid bodies).
    pub contact_fields: Option<ContactFields>,
    /// Per fluid: applied pressure and wetted length (2-D) or area (3-D).
    pub fluids: Vec<FluidSummary>,
    /// Fluid pressure at every node of a wetted facet, 0 elsewhere (when the model has fluids).
    pub fluid_pressure: Option<Vec<f64>>,
    /// Per gland: fill and squeeze.
    pub glands: Vec<GlandSummary>,
    /// Per extrusion gap: the rubber's largest intrusion past its edge.
    pub extrusions: Vec<ExtrusionSummary>,
    /// Extremes over every integration point of the mesh at this increment.
    pub peaks: IncrementPeaks,
}

/// An extreme value at one integration point, and where it is.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct PointPeak {
    /// The extreme value (log strain, stress units, or volume ratio J).
    pub value: f64,
    /// Element index (0-based, as in messages and the `.vtu` frames).
    pub element: usize,
    /// Integration point of the element (0-based).
    pub point: usize,
    /// Reference position of the point.
    pub at: [f64; 3],
}

/// The extremes of one converged increment over all integration points.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct IncrementPeaks {
    /// Largest maximum principal logarithmic strain ln λ_max.
    pub max_principal_log_strain: PointPeak,
    /// Largest von Mises equivalent Cauchy stress.
    pub von_mises: PointPeak,
    /// Smallest volume ratio J = det F.
    pub min_volume_ratio: PointPeak,
}

impl IncrementPeaks {
    /// The extremes over `states`, the points of element `element`
    /// (`None` for no points).
    pub fn of_element(element: usize, states: &[PointState]) -> Option<Self> {
        let peak = |p: usize, value: f64| PointPeak { value, element, point: p, at: states[p].position };
        let mut out: Option<Self> = None;
        for (p, s) in states.iter().enumerate() {
            let here = IncrementPeaks {
                max_principal_log_strain: peak(p, s.max_log_strain()),
                von_mises: peak(p, von_mises(&s.cauchy)),
                min_volume_ratio: peak(p, s.j),
            };
            out = Some(match out {
                None => here,
                Some(o) => o.merge(here),
            });
        }
        out
    }

    /// The extremes of both (the first wins ties, so the lower element and point).
    pub fn merge(self, other: Self) -> Self {
        let larger = |a: PointPeak, b: PointPeak| if b.value > a.value { b } else { a };
        let smaller = |a: PointPeak, b: PointPeak| if b.value < a.value { b } else { a };
        IncrementPeaks {
            max_principal_log_strain: larger(self.max_principal_log_strain, other.max_principal_log_strain),
            von_mises: larger(self.von_mises, other.von_mises),
            min_volume_ratio: smaller(self.min_volume_ratio, other.min_volume_ratio),
        }
    }
}

/// Von Mises equivalent stress √(3/2 s:s) of a symmetric stress tensor (s its deviator).
pub fn von_mises(s: &nalgebra::Matrix3<f64>) -> f64 {
    let (a, b, c) = (s[(0, 0)], s[(1, 1)], s[(2, 2)]);
    let shear = s[(0, 1)].powi(2) + s[(1, 2)].powi(2) + s[(0, 2)].powi(2);
    (0.5 * ((a - b).powi(2) + (b - c).powi(2) + (c - a).powi(2)) + 3.0 * shear).max(0.0).sqrt()
}

impl IncrementResult {
    /// The global solution vector of the increment for a model whose nodes
    /// have `dim` displacement components: every node's displacements,
    /// then the pressure unknowns (what `Discretization::gather` and
    /// `Discretization::gather_pressures` read).
    pub fn solution_vector(&self, dim: usize) -> Vec<f64> {
        let mut u: Vec<f64> = self.displacement.iter().flat_map(|d| d[..dim].to_vec()).collect();
        u.extend_from_slice(&self.pressure_unknowns);
        u
    }

    /// Reaction on a set per radian of revolution (axisymmetric), else the reaction itself.
    pub fn reaction_per_radian(&self, set: &str) -> Option<[f64; 3]> {
        let r = *self.reactions.get(set)?;
        Some(if self.axisymmetric { r.map(|v| v / (2.0 * PI)) } else { r })
    }
}

/// Why a run ended.
#[derive(Debug, Clone, PartialEq)]
pub enum Termination {
    /// Every stage reached its end.
    Completed,
    /// The run stopped part-way; the increments before it are kept.
    Stopped(SolveError),
}

/// Timings (seconds) and counts of a run.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct SolveStats {
    /// Element loops (force and tangent, including line-search evaluations).
    pub assembly_time: f64,
    /// Number of element loops.
    pub assemblies: usize,
    /// Sparse-pattern and scatter-map construction.
    pub pattern_time: f64,
    /// Newton iterations over the run.
    pub newton_iterations: usize,
    /// Converged increments over the run.
    pub increments: usize,
    /// Increments cut back.
    pub cutbacks: usize,
    /// Linear solver statistics, summed over the patterns used.
    pub linear: LinearStats,
}

/// Everything a solve produced.
#[derive(Debug, Clone, PartialEq)]
pub struct Solution {
    /// The converged increments, in order.
    pub increments: Vec<IncrementResult>,
    /// How the run ended.
    pub termination: Termination,
    /// Counts and timings.
    pub stats: SolveStats,
    /// The complex stiffness found by each harmonic stage, in stage order.
    pub dynamic: Vec<DynamicResult>,
}

/// What a harmonic stage finds: the complex stiffness of every driven set
/// and component at every frequency, about the preloaded state.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct DynamicResult {
    /// 0-based stage index.
    pub stage: usize,
    /// Stage name.
    pub stage_name: String,
    /// Frequencies (cycles per job time unit), in the order given.
    pub frequencies: Vec<f64>,
    /// One entry per driven set and component.
    pub stiffness: Vec<DynamicStiffness>,
}

/// The complex stiffness K* = K′ + i K″ of one driven set in one component:
/// the amplitude of the force the set's nodes need (the sum of their
/// reactions in that component) over the set's displacement amplitude in
/// it, at each frequency. With several sets or components driven at once,
/// each ratio includes the force the others cause (they move together).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct DynamicStiffness {
    /// Node set driven (or the insert's name, when `insert`).
    pub set: String,
    /// Component index (0, 1, 2; an insert's 0..6: x, y, z, rx, ry, rz).
    pub component: usize,
    /// Whether `set` names an insert: the stiffness is then the amplitude
    /// of the force (or moment) the insert applies to the rubber over that
    /// of its translation (or rotation, in radians).
    pub insert: bool,
    /// Storage stiffness K′ (in phase with the motion; force per length) per frequency.
    pub storage: Vec<f64>,
    /// Loss stiffness K″ (a quarter period ahead; force per length) per frequency.
    pub loss: Vec<f64>,
}

impl DynamicStiffness {
    /// The loss angle δ = atan2(K″, K′) in degrees at frequency index `k`.
    pub fn loss_angle(&self, k: usize) -> f64 {
        self.loss[k].atan2(self.storage[k]).to_degrees()
    }
}

impl Solution {
    /// Whether every stage reached its end.
    pub fn completed(&self) -> bool {
        self.termination == Termination::Completed
    }

    /// The last converged increment, if any.
    pub fn last(&self) -> Option<&IncrementResult> {
        self.increments.last()
    }
}

/// Volume-weighted mean over one element's integration points of
/// `value(point)`, and the element's volume (the sum of the point weights;
/// a plain mean when that is not positive).
pub fn element_mean<const N: usize>(points: &[PointState], value: impl Fn(&PointState) -> [f64; N]) -> ([f64; N], f64) {
    let volume: f64 = points.iter().map(|s| s.volume).sum();
    let mut mean = [0.0; N];
    for s in points {
        let w = if volume > 0.0 { s.volume / volume } else { 1.0 / points.len() as f64 };
        for (m, v) in mean.iter_mut().zip(value(s)) {
            *m += v * w;
        }
    }
    (mean, volume)
}

/// Average at each node of per-element values, weighted by the volumes of
/// the elements around the node (zero at nodes of no element). The one
/// nodal averaging of olli: the solver's [`NodalFields`] and the result
/// files' point data both come from it.
pub fn nodal_average<const N: usize>(mesh: &Mesh, element_values: &[[f64; N]], element_volumes: &[f64]) -> Vec<[f64; N]> {
    let nn = mesh.node_count();
    let mut weight = vec![0.0; nn];
    let mut out = vec![[0.0; N]; nn];
    for (e, (values, &volume)) in element_values.iter().zip(element_volumes).enumerate() {
        for &n in mesh.element_nodes(e) {
            weight[n] += volume;
            for (o, v) in out[n].iter_mut().zip(values) {
                *o += v * volume;
            }
        }
    }
    for (o, w) in out.iter_mut().zip(weight) {
        if w > 0.0 {
            o.iter_mut().for_each(|v| *v /= w);
        }
    }
    out
}

/// The quantities [`NodalFields`] averages, per point: Cauchy stress (Voigt
/// order), pressure, J, largest log strain, energy density.
pub fn nodal_quantities(s: &PointState) -> [f64; 10] {
    let c = &s.cauchy;
    [c[(0, 0)], c[(1, 1)], c[(2, 2)], c[(0, 1)], c[(1, 2)], c[(0, 2)], s.pressure, s.j, s.max_log_strain(), s.energy_density]
}

impl NodalFields {
    /// Node averages of the point fields of every element of `mesh`.
    pub fn from_points(mesh: &Mesh, points: &PointFields) -> Self {
        let (means, volumes): (Vec<[f64; 10]>, Vec<f64>) =
            (0..mesh.element_count()).map(|e| element_mean(points.element(e), nodal_quantities)).unzip();
        let nodal = nodal_average(mesh, &means, &volumes);
        NodalFields {
            cauchy: nodal.iter().map(|v| [v[0], v[1], v[2], v[3], v[4], v[5]]).collect(),
            pressure: nodal.iter().map(|v| v[6]).collect(),
            j: nodal.iter().map(|v| v[7]).collect(),
            max_log_strain: nodal.iter().map(|v| v[8]).collect(),
            energy_density: nodal.iter().map(|v| v[9]).collect(),
        }
    }
}

/// Fill and squeeze of one gland at one increment.
#[derive(Debug, Clone, PartialEq)]
pub struct GlandSummary {
    /// Name of the gland.
    pub name: String,
    /// Rubber section area over the gland's free area, in percent.
    pub fill: f64,
    /// (free height − gland depth) / free height, in percent (negative
    /// while the gland is deeper than the rubber is high).
    pub squeeze: f64,
    /// Current section area of the rubber (length²).
    pub rubber_area: f64,
    /// Current free area of the gland (length²).
    pub free_area: f64,
    /// Current depth of the gland (length).
    pub depth: f64,
}

/// The rubber's extrusion into one clearance gap at one increment.
#[derive(Debug, Clone, PartialEq)]
pub struct ExtrusionSummary {
    /// Name of the gap.
    pub name: String,
    /// Largest distance of a rubber node past the edge, along the direction
    /// into the gap (length, ≥ 0).
    pub depth: f64,
    /// The node that reaches furthest (0-based mesh index).
    pub node: usize,
    /// Its current position.
    pub at: [f64; 3],
}
