//! One contact pair: the nodes of a rubber side set against one rigid
//! surface. Holds each node's tributary area and history, evaluates the node
//! law for the whole set, and reports what a seal designer reads: the total
//! force on the surface, the contact width and the peak contact pressure.

use nalgebra::Vector3;
use olli_mesh::{Mesh, Side};

use super::law::{evaluate, smoothed_pressure, ContactParameters, NodeResponse, NodeState, Status};
use super::surface::RigidSurface;

/// Tangential (stick) penalty as a fraction of the normal one. A softer
/// stick law lets Newton settle the stick/slip state of each node in few
/// iterations; the elastic slip it allows before sliding is μ p / ε_t.
pub const TANGENTIAL_RATIO: f64 = 0.1;

/// Rounding of the pressure law as a penetration, relative to the local side
/// size: the law is sharp except within ±1e-4 h of zero trial pressure (a
/// tenth of the default penetration tolerance).
pub const SMOOTHING_FRACTION: f64 = 1e-3;

/// Relative width of the rounded stick–slip transition of the friction law
/// (see [`ContactParameters::slip_rounding`]): the shear traction is within
/// 5 % of the elastic trial value or of μ p everywhere outside ±5 % of the limit.
pub const SLIP_ROUNDING: f64 = 0.05;

/// How a side's length or area becomes a load-carrying area.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum AreaMeasure {
    /// 3-D faces: their area.
    Solid,
    /// Plane strain: edge length × thickness.
    PlaneStrain { thickness: f64 },
    /// Axisymmetric: edge length × 2π r (the full ring).
    Axisymmetric,
}

/// Contact of a set of rubber nodes with one rigid surface.
#[derive(Debug, Clone)]
pub struct ContactPair {
    /// The nodes that may touch (sorted).
    pub nodes: Vec<usize>,
    /// The sides they belong to, as local node index pairs/polygons into `nodes`.
    sides: Vec<Vec<usize>>,
    /// Tributary area of each node in the reference configuration.
    pub areas: Vec<f64>,
    /// Local element size at each node: mean reference size of its sides.
    pub sizes: Vec<f64>,
    /// Normal penalty of each node (stress / length); the tangential penalty equals it.
    pub penalties: Vec<f64>,
    pub params: ContactParameters,
    pub states: Vec<NodeState>,
    measure: AreaMeasure,
    /// Sides around each node (indices into `sides`).
    neighbours: Vec<Vec<usize>>,
}

/// Evaluation of a whole pair at one iterate.
#[derive(Debug, Clone, Default)]
pub struct PairResponse {
    /// Per node of the pair (same order as `ContactPair::nodes`).
    pub nodes: Vec<NodeResponse>,
    /// Signed gap per node.
    pub gaps: Vec<f64>,
    /// Total force the rubber exerts on the surface (= −Σ node forces).
    pub surface_force: Vector3<f64>,
    /// Peak contact pressure.
    pub peak_pressure: f64,
    /// Current positions of the pair's nodes (indexed like `nodes`).
    pub positions: Vec<Vector3<f64>>,
    /// Largest penetration (−gap) of a touching node, ≥ 0.
    pub max_penetration: f64,
}

fn corner_count(n: usize, dimension: usize) -> usize {
    match (dimension, n) {
        (2, _) => 2,
        (_, 3) | (_, 6) => 3,
        _ => 4,
    }
}

impl ContactPair {
    /// Builds the pair from the side set `sides` of `mesh`. Only corner nodes
    /// of each side take part (olli's contact elements are linear).
    pub fn new(mesh: &Mesh, sides: &[Side], measure: AreaMeasure, params: ContactParameters) -> Self {
        let mut polys: Vec<Vec<usize>> = sides
            .iter()
            .map(|&s| {
                let all = mesh.side_nodes(s);
                let k = corner_count(all.len(), mesh.dimension);
                all[..k].to_vec()
            })
            .collect();
        let mut nodes: Vec<usize> = polys.iter().flatten().copied().collect();
        nodes.sort_unstable();
        nodes.dedup();
        for p in &mut polys {
            for n in p.iter_mut() {
                *n = nodes.binary_search(n).expect("node of the side set");
            }
        }
        let mut areas = vec![0.0; nodes.len()];
        let mut sizes = vec![0.0; nodes.len()];
        let mut count = vec![0usize; nodes.len()];
        for p in &polys {
            let x: Vec<Vector3<f64>> = p.iter().map(|&i| Vector3::from(mesh.nodes[nodes[i]])).collect();
            for (k, a) in tributary(&x, measure).into_iter().enumerate() {
                areas[p[k]] += a;
            }
            let size = side_size(&x);
            for &k in p {
                sizes[k] += size;
                count[k] += 1;
            }
        }
        for (s, c) in sizes.iter_mut().zip(&count) {
            *s /= *c as f64;
        }
        let states = vec![NodeState::default(); nodes.len()];
        let penalties = vec![params.normal_penalty; nodes.len()];
        let mut neighbours = vec![Vec::new(); nodes.len()];
        for (e, p) in polys.iter().enumerate() {
            for &k in p {
                neighbours[k].push(e);
            }
        }
        ContactPair { nodes, sides: polys, areas, sizes, penalties, params, states, measure, neighbours }
    }

    /// Evaluates every node at the current positions (`position(node)` gives
    /// the current coordinates of a mesh node).
    pub fn evaluate_into(&self, surface: &RigidSurface, position: impl Fn(usize) -> Vector3<f64>, out: &mut PairResponse) {
        // The buffers keep their capacity: no allocation per Newton evaluation.
        out.nodes.clear();
        out.gaps.clear();
        out.positions.clear();
        out.surface_force = Vector3::zeros();
        out.peak_pressure = 0.0;
        out.max_penetration = 0.0;
        for (k, &node) in self.nodes.iter().enumerate() {
            let xi = position(node);
            out.positions.push(xi);
            let r = match surface.project(&xi) {
                Some(proj) => {
                    out.gaps.push(proj.gap);
                    let anchor = self.states[k].anchor.map(|a| surface.placement.apply(&a));
                    evaluate(&proj, &xi, self.areas[k], &self.node_params(k), &self.states[k], anchor)
                }
                None => {
                    out.gaps.push(f64::INFINITY);
                    NodeResponse::open()
                }
            };
            if r.status != Status::Open {
                out.surface_force -= r.force;
                out.peak_pressure = out.peak_pressure.max(r.pressure);
                out.max_penetration = out.max_penetration.max(-out.gaps[k]);
            }
            out.nodes.push(r);
        }
    }

    /// Contact width of an evaluation (2-D: length of the touching band along
    /// the surface; 3-D: the extent of the touching nodes). Computed for
    /// reports, not at every Newton evaluation.
    pub fn contact_width(&self, r: &PairResponse) -> f64 {
        match self.measure {
            AreaMeasure::Solid => extent(r),
            _ => self.band_length(r),
        }
    }

    /// 2-D contact width: the length of the edges with both ends touching,
    /// plus, on each edge where the contact ends, the part up to the
    /// estimated contact edge. Near the edge of a contact the pressure of a
    /// smooth profile falls like a square root (Hertz: p² ∝ a² − x²), so p²
    /// is extrapolated linearly from the last two touching nodes; without a
    /// usable neighbour, half the edge is counted.
    fn band_length(&self, r: &PairResponse) -> f64 {
        let touching = |k: usize| r.nodes[k].status != Status::Open;
        let mut width = 0.0;
        for (e, side) in self.sides.iter().enumerate() {
            let (a, b) = (side[0], side[1]);
            let len = (r.positions[a] - r.positions[b]).norm();
            width += match (touching(a), touching(b)) {
                (true, true) => len,
                (false, false) => 0.0,
                (true, false) => len * self.edge_fraction(e, a, r),
                (false, true) => len * self.edge_fraction(e, b, r),
            };
        }
        width
    }

    /// Fraction of side `e`, measured from its touching node `i`, that is in contact.
    fn edge_fraction(&self, e: usize, i: usize, r: &PairResponse) -> f64 {
        let inner = self.neighbours[i].iter().filter(|&&f| f != e).find_map(|&f| {
            let other = if self.sides[f][0] == i { self.sides[f][1] } else { self.sides[f][0] };
            (r.nodes[other].status != Status::Open).then_some(other)
        });
        let Some(j) = inner else { return 0.5 };
        let (pi, pj) = (r.nodes[i].pressure, r.nodes[j].pressure);
        let outer = if self.sides[e][0] == i { self.sides[e][1] } else { self.sides[e][0] };
        let len_e = (r.positions[outer] - r.positions[i]).norm();
        let len_ji = (r.positions[i] - r.positions[j]).norm();
        if !(pj > pi && len_e > 0.0) {
            return 0.5;
        }
        // p² linear in arc length: zero at distance len_ji · pi² / (pj² − pi²) beyond i.
        let beyond = len_ji * pi * pi / (pj * pj - pi * pi);
        (beyond / len_e).clamp(0.0, 1.0)
    }

    /// Augmented-Lagrangian update after a converged solve: λ ← max(0, λ − ε g)
    /// (with the rounded law near zero).
    pub fn augment(&mut self, response: &PairResponse) {
        for k in 0..self.nodes.len() {
            let g = response.gaps[k];
            if g.is_finite() {
                let smoothing = self.node_params(k).smoothing;
                let s = &mut self.states[k];
                s.multiplier = smoothed_pressure(s.multiplier - self.penalties[k] * g, smoothing).0;
            }
        }
    }

    /// Stores the converged state: stick anchors in the surface frame (the
    /// elastic-slip origin of touching nodes; none for open ones).
    pub fn commit(&mut self, surface: &RigidSurface, response: &PairResponse) {
        for k in 0..self.nodes.len() {
            let r = &response.nodes[k];
            let tangential = self.node_params(k).tangential_penalty;
            let s = &mut self.states[k];
            s.anchor = match r.status {
                // An open node has no stick point (see `law::evaluate`).
                Status::Open => None,
                // The anchor sits so that the elastic slip reproduces the current shear.
                _ if tangential > 0.0 => Some(surface.placement.to_local(&(response.positions[k] + r.shear / tangential))),
                _ => None,
            };
            if r.status == Status::Open {
                s.multiplier = 0.0;
            }
        }
    }

    /// Anchors the nodes that touch `surface` (gap ≤ 0) in the reference
    /// configuration where they are, so friction holds them from the start.
    pub fn anchor_initial_contacts(&mut self, mesh: &Mesh, surface: &RigidSurface) {
        for (k, &n) in self.nodes.iter().enumerate() {
            let x = Vector3::from(mesh.nodes[n]);
            if surface.project(&x).is_some_and(|p| p.gap <= 0.0) {
                self.states[k].anchor = Some(surface.placement.to_local(&x));
            }
        }
    }

    /// The law's parameters at node `k` (its own penalty).
    pub fn node_params(&self, k: usize) -> ContactParameters {
        ContactParameters {
            normal_penalty: self.penalties[k],
            tangential_penalty: TANGENTIAL_RATIO * self.penalties[k],
            friction: self.params.friction,
            smoothing: SMOOTHING_FRACTION * self.penalties[k] * self.sizes[k],
            slip_rounding: SLIP_ROUNDING,
        }
    }

    /// Penetration of every touching node relative to its allowed value
    /// `fraction × size`; the largest ratio (> 1: needs augmentation).
    pub fn worst_penetration_ratio(&self, response: &PairResponse, fraction: f64) -> (f64, f64) {
        let mut worst = (0.0, 0.0, 0.0);
        for (k, r) in response.nodes.iter().enumerate() {
            if r.status == Status::Open {
                continue;
            }
            let pen = -response.gaps[k];
            let tol = fraction * self.sizes[k];
            let ratio = pen / tol;
            if ratio > worst.0 {
                worst = (ratio, pen, tol);
            }
        }
        (worst.1, worst.2)
    }
}

/// Extent of the touching nodes: the largest distance between two of them,
/// found by two farthest-point sweeps (exact for the compact, convex contact
/// patches of seals and mounts, and linear in the node count).
fn extent(r: &PairResponse) -> f64 {
    let touching = || r.nodes.iter().zip(&r.positions).filter(|(n, _)| n.status != Status::Open).map(|(_, x)| *x);
    let Some(start) = touching().next() else { return 0.0 };
    let far = |from: Vector3<f64>| touching().max_by(|a, b| (a - from).norm().total_cmp(&(b - from).norm())).unwrap_or(from);
    let a = far(start);
    let b = far(a);
    (a - b).norm()
}

/// Size of one side: its length (2-D) or the square root of its area (3-D).
fn side_size(x: &[Vector3<f64>]) -> f64 {
    match x.len() {
        2 => (x[1] - x[0]).norm(),
        3 => (0.5 * (x[1] - x[0]).cross(&(x[2] - x[0])).norm()).sqrt(),
        _ => (0.5 * (x[2] - x[0]).cross(&(x[3] - x[1])).norm()).sqrt(),
    }
}

/// Tributary areas of the corners of one side (reference geometry).
fn tributary(x: &[Vector3<f64>], measure: AreaMeasure) -> Vec<f64> {
    match measure {
        AreaMeasure::PlaneStrain { thickness } => {
            let half = 0.5 * (x[1] - x[0]).norm() * thickness;
            vec![half, half]
        }
        AreaMeasure::Axisymmetric => {
            // ∫ 2π r N_i ds over the edge, with r linear: exact for the ring area.
            let len = (x[1] - x[0]).norm();
            let (r0, r1) = (x[0].x, x[1].x);
            let tau = std::f64::consts::TAU;
            vec![tau * len * (2.0 * r0 + r1) / 6.0, tau * len * (r0 + 2.0 * r1) / 6.0]
        }
        AreaMeasure::Solid => {
            let area = if x.len() == 3 {
                0.5 * (x[1] - x[0]).cross(&(x[2] - x[0])).norm()
            } else {
                0.5 * (x[2] - x[0]).cross(&(x[3] - x[1])).norm()
            };
            vec![area / x.len() as f64; x.len()]
        }
    }
}
