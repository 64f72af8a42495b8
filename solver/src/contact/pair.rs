//! One contact pair: the nodes of a rubber side set against one rigid
//! surface. Holds each node's tributary area and history, evaluates the node
//! law for the whole set, and reports what a seal designer reads: the total
//! force on the surface, the contact width and the peak contact pressure.

use nalgebra::Vector3;
use olli_mesh::{Mesh, Side};

use crate::element::side::{self, for_each_point, SideRule};
use crate::element::Analysis;
use crate::shape::ShapeKind;

use super::law::{evaluate, smoothed_pressure, Approach, ContactParameters, FrictionTangent, NodeResponse, NodeState, Status};
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
    PlaneStrain {
        /// Out-of-plane thickness (length units).
        thickness: f64,
    },
    /// Axisymmetric: edge length × 2π r (the full ring).
    Axisymmetric,
}

impl AreaMeasure {
    /// The analysis whose sides this measure integrates.
    pub fn analysis(self) -> Analysis {
        match self {
            AreaMeasure::Solid => Analysis::Solid3d,
            AreaMeasure::PlaneStrain { thickness } => Analysis::PlaneStrain { thickness },
            AreaMeasure::Axisymmetric => Analysis::Axisymmetric,
        }
    }
}

/// Contact of a set of rubber nodes with one rigid surface.
#[derive(Debug, Clone)]
pub struct ContactPair {
    /// The nodes that may touch (sorted).
    pub nodes: Vec<usize>,
    /// The pieces of their sides (see `side_pieces`), as local node indices into `nodes`.
    sides: Vec<Vec<usize>>,
    /// Tributary area of each node in the reference configuration.
    pub areas: Vec<f64>,
    /// Local element size at each node: mean reference size of its sides.
    pub sizes: Vec<f64>,
    /// Normal penalty of each node (stress / length); the tangential penalty equals it.
    pub penalties: Vec<f64>,
    /// Penalty, augmentation and friction settings of the pair.
    pub params: ContactParameters,
    /// History of each node (same order as `nodes`).
    pub states: Vec<NodeState>,
    /// Each node's multiplier and the pressure it gave at the last
    /// augmentation of the current increment (none before the first).
    updates: Vec<Option<(f64, f64)>>,
    /// Stick anchors (surface frame) of the current increment for nodes
    /// open at the last converged state (see [`ContactPair::anchor_approaches`]).
    entries: Vec<Option<Vector3<f64>>>,
    measure: AreaMeasure,
    /// Sides around each node (indices into `sides`).
    neighbours: Vec<Vec<usize>>,
    /// Faces whose reported pressure is recovered (see `recover_pressures`):
    /// piece index, the face's area and its nodes' shares of it.
    recovered: Vec<(usize, f64, Vec<f64>)>,
    /// Every whole side, as local node indices in the side's own order, with
    /// its nodes' reference shares of its area (for the current tributary
    /// areas, see [`ContactPair::current_areas`]).
    whole_sides: Vec<(Vec<usize>, Vec<f64>)>,
    /// Per node, where the last tangent was built (see
    /// [`ContactPair::evaluate_into`]); none before the first, after a
    /// restore, or while the node is out of the surface's reach.
    tangent_points: Vec<Option<TangentPoint>>,
    /// Stiffness β of the multipliers' Newton update as a multiple of each
    /// node's penalty (0: the multipliers change only by augmentation; see
    /// [`ContactPair::evaluate_into`]).
    pub constraint_factor: f64,
    /// Per node touching where the last tangent was built: the point the
    /// multiplier's Newton update starts from (none: open there, or no
    /// tangent built since the last restore).
    linearized: Vec<Option<Linearization>>,
}

/// A touching node where the last tangent was built: its normal, gap and
/// multiplier there, its β, and ∂force/∂λ. With β > 0 its constraint is
/// active (trial pressure λ − ε g > 0) and the step closes its gap; with
/// β = 0 it touches only within the law's rounding near p = 0 and the step
/// releases it (λ → 0), the semi-smooth Newton rule for an inactive
/// constraint. (The activity test takes the law's penalty ε, not β: with β
/// a node whose multiplier was predicted from the last increments and
/// whose gap is still open by more than λ/β at the predictor was released
/// and caught again, and a pressed roller's Newton steps lost their
/// quadratic rate.)
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Linearization {
    /// Outward surface normal.
    pub normal: Vector3<f64>,
    /// Signed gap.
    pub gap: f64,
    /// Multiplier.
    pub multiplier: f64,
    /// Stiffness β of the constraint (0: released).
    pub beta: f64,
    /// ∂force/∂λ.
    pub rate: Vector3<f64>,
}

impl Linearization {
    /// The multiplier change the step makes before the node moves (−β g;
    /// released: −λ); its force, change × ∂f/∂λ, goes to the right-hand side.
    pub fn change_at_rest(&self) -> f64 {
        if self.beta > 0.0 {
            -self.beta * self.gap
        } else {
            -self.multiplier
        }
    }

    /// The multiplier after the node moved by `dx` from here:
    /// λ − β (g + n·dx), never below zero (released: 0).
    pub fn stepped(&self, dx: &Vector3<f64>) -> f64 {
        if self.beta > 0.0 {
            (self.multiplier - self.beta * (self.gap + self.normal.dot(dx))).max(0.0)
        } else {
            0.0
        }
    }
}

/// A node where the last tangent was built: its position and shear there,
/// and whether it took the stick tangent.
#[derive(Debug, Clone, Copy, PartialEq)]
struct TangentPoint {
    position: Vector3<f64>,
    shear: Vector3<f64>,
    held: bool,
}

/// Whether a sliding node's friction reversed between two Newton iterates:
/// its shear at the new one points against its shear at the last one.
pub fn slip_reversed(before: &Vector3<f64>, now: &Vector3<f64>) -> bool {
    before.dot(now) < 0.0
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
    /// Work space of the pressure recovery: force and area per node.
    recovery: Vec<(f64, f64)>,
}

/// The pieces of one side that the width and node-spacing measures see, as
/// mesh node lists: a line2 edge or a linear face as it is; a line3 edge as
/// its two halves (corner, mid-side node, corner) so that the contact band
/// follows node to node; a quadratic face whole. With the piece comes its
/// node spacing (2-D: the piece's length; 3-D: √area of the corner polygon,
/// halved on quadratic faces).
fn side_pieces(all: &[usize], x: &[Vector3<f64>], dimension: usize) -> Vec<(Vec<usize>, f64)> {
    if dimension == 2 {
        let halves: &[[usize; 2]] = if all.len() == 3 { &[[0, 2], [2, 1]] } else { &[[0, 1]] };
        return halves.iter().map(|&[a, b]| (vec![all[a], all[b]], (x[b] - x[a]).norm())).collect();
    }
    let corners = if matches!(all.len(), 3 | 6) { 3 } else { 4 };
    let spacing = if all.len() > corners { 0.5 } else { 1.0 };
    vec![(all.to_vec(), spacing * side_size(&x[..corners]))]
}

impl ContactPair {
    /// Builds the pair from the side set `sides` of `mesh`. Every node of a
    /// side takes part, mid-side nodes of quadratic sides included (see
    /// [`tributary`] for their areas).
    pub fn new(mesh: &Mesh, sides: &[Side], measure: AreaMeasure, params: ContactParameters) -> Self {
        let mut nodes: Vec<usize> = sides.iter().flat_map(|&s| mesh.side_nodes(s)).collect();
        nodes.sort_unstable();
        nodes.dedup();
        let local = |n: usize| nodes.binary_search(&n).expect("node of the side set");
        let mut polys: Vec<Vec<usize>> = Vec::new();
        let mut areas = vec![0.0; nodes.len()];
        let mut sizes = vec![0.0; nodes.len()];
        let mut count = vec![0usize; nodes.len()];
        let mut recovered = Vec::new();
        let mut whole_sides = Vec::with_capacity(sides.len());
        for &s in sides {
            let all = mesh.side_nodes(s);
            let x: Vec<Vector3<f64>> = all.iter().map(|&n| Vector3::from(mesh.nodes[n])).collect();
            let shares = tributary(&x, measure);
            for (&n, a) in all.iter().zip(&shares) {
                areas[local(n)] += a;
            }
            whole_sides.push((all.iter().map(|&n| local(n)).collect(), shares.clone()));
            if mesh.dimension == 3 && matches!(all.len(), 6 | 8) {
                recovered.push((polys.len(), shares.iter().sum(), shares));
            }
            for (piece, size) in side_pieces(&all, &x, mesh.dimension) {
                let piece: Vec<usize> = piece.into_iter().map(local).collect();
                for &k in &piece {
                    sizes[k] += size;
                    count[k] += 1;
                }
                polys.push(piece);
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
        let n_nodes = nodes.len();
        ContactPair {
            nodes,
            sides: polys,
            areas,
            sizes,
            penalties,
            params,
            states,
            updates: vec![None; n_nodes],
            entries: vec![None; n_nodes],
            measure,
            neighbours,
            recovered,
            whole_sides,
            tangent_points: vec![None; n_nodes],
            constraint_factor: 0.0,
            linearized: vec![None; n_nodes],
        }
    }

    /// Where the last tangent of each node was built (see [`Linearization`]).
    pub fn linearizations(&self) -> &[Option<Linearization>] {
        &self.linearized
    }

    /// The multiplier of each node touching where the last tangent was
    /// built, moved by its Newton update for the step `change` (per mesh
    /// node, the displacement change from that point; see
    /// [`Linearization::stepped`]).
    pub fn step_multipliers(&mut self, change: impl Fn(usize) -> Vector3<f64>) {
        for k in 0..self.nodes.len() {
            if let Some(l) = self.linearized[k] {
                let dx = change(self.nodes[k]);
                self.states[k].multiplier = l.stepped(&dx);
            }
        }
    }

    /// Tributary area of each node at the positions of evaluation `r` (the
    /// deformed surface): each side's reference shares scaled by the ratio
    /// of its deformed to its reference area, so the split between a
    /// quadratic side's nodes stays the one the law uses.
    pub fn current_areas(&self, r: &PairResponse) -> Vec<f64> {
        let mut areas = vec![0.0; self.nodes.len()];
        if r.positions.len() != self.nodes.len() {
            return areas;
        }
        for (side, shares) in &self.whole_sides {
            let x: Vec<Vector3<f64>> = side.iter().map(|&k| r.positions[k]).collect();
            let reference: f64 = shares.iter().sum();
            let stretch = if reference > 0.0 { tributary(&x, self.measure).iter().sum::<f64>() / reference } else { 1.0 };
            for (&k, a) in side.iter().zip(shares) {
                areas[k] += a * stretch;
            }
        }
        areas
    }

    /// The contact pressure of each node as a true (Cauchy) traction: its
    /// force over its tributary area on the deformed surface. The law and
    /// [`NodeResponse::pressure`] work per reference area (a nominal
    /// pressure); where the rubber's surface stretches or shrinks in contact
    /// the two differ by the area ratio, and a seal's contact pressure is
    /// compared with a fluid pressure that acts on the deformed surface.
    /// Nodes without area in either configuration keep the nominal value.
    pub fn true_pressures(&self, r: &PairResponse) -> Vec<f64> {
        let current = self.current_areas(r);
        r.nodes
            .iter()
            .enumerate()
            .map(|(k, n)| {
                let (a0, a) = (self.areas[k], current[k]);
                if a0 > 0.0 && a > 0.0 {
                    n.pressure * a0 / a
                } else {
                    n.pressure
                }
            })
            .collect()
    }

    /// Evaluates every node at the current positions (`position(node)` gives
    /// the current coordinates of a mesh node); `want_k`: the evaluation
    /// builds a tangent.
    ///
    /// A sliding node has no friction stiffness along its slip in 2-D (the
    /// force stays μ p), so Newton moves it to where the rubber alone
    /// balances μ p; when the stick state lies between the two slip
    /// directions, that lands on the other side of the anchor, the friction
    /// reverses, and the next step jumps back: a cycle of period 2 (the face
    /// seal's first pressurised increment, measured). A node whose shear
    /// reversed since the last tangent was built ([`slip_reversed`]) is
    /// therefore given the elastic stick tangent for the next step (an
    /// active-set rule: hold it where it is and see whether it sticks); its
    /// force stays the law's, so the equilibrium is unchanged. A node that
    /// keeps sliding one way takes the consistent tangent again.
    pub fn evaluate_into(
        &mut self,
        surface: &RigidSurface,
        position: impl Fn(usize) -> Vector3<f64>,
        out: &mut PairResponse,
        want_k: bool,
    ) {
        // The buffers keep their capacity: no allocation per Newton evaluation.
        out.nodes.clear();
        out.gaps.clear();
        out.positions.clear();
        out.surface_force = Vector3::zeros();
        out.peak_pressure = 0.0;
        out.max_penetration = 0.0;
        for k in 0..self.nodes.len() {
            let xi = position(self.nodes[k]);
            out.positions.push(xi);
            let r = match surface.project(&xi) {
                Some(proj) => {
                    out.gaps.push(proj.gap);
                    let anchor = self.states[k].anchor.or(self.entries[k]).map(|a| surface.placement.apply(&a));
                    let params = self.node_params(k);
                    let mut r = evaluate(&proj, &xi, self.areas[k], &params, &self.states[k], anchor, FrictionTangent::Consistent);
                    if want_k {
                        let before = self.tangent_points[k];
                        // The same point evaluated again (after a multiplier
                        // update, or for its tangent after a residual-only
                        // evaluation) keeps the decision taken there.
                        let held = match before {
                            Some(p) if p.position == xi => p.held,
                            Some(p) => r.status != Status::Open && slip_reversed(&p.shear, &r.shear),
                            None => false,
                        };
                        if held {
                            r = evaluate(&proj, &xi, self.areas[k], &params, &self.states[k], anchor, FrictionTangent::Stick);
                        }
                        let shear = match before {
                            Some(p) if p.position == xi => p.shear,
                            _ => r.shear,
                        };
                        self.tangent_points[k] = Some(TangentPoint { position: xi, shear, held });
                        self.linearized[k] = None;
                        if self.constraint_factor > 0.0 && r.status != Status::Open && self.areas[k] > 0.0 {
                            // The multiplier as a Newton unknown with the
                            // constraint g + n·Δx = −Δλ/β: the step sees the
                            // stiffness ε + β along the normal and the force
                            // −β g ∂f/∂λ that closes the gap (added by the
                            // caller to the right-hand side only). A node
                            // touching only within the law's rounding
                            // (λ − ε g ≤ 0: the constraint is not active)
                            // takes β = 0: the step releases it, λ → 0, and
                            // takes up the force it loses (−λ ∂f/∂λ).
                            let multiplier = self.states[k].multiplier;
                            let active = multiplier - self.penalties[k] * proj.gap > 0.0;
                            let beta = if active { self.constraint_factor * self.penalties[k] } else { 0.0 };
                            r.stiffness += r.rate * proj.normal.transpose() * beta;
                            self.linearized[k] = Some(Linearization { normal: proj.normal, gap: proj.gap, multiplier, beta, rate: r.rate });
                        }
                    }
                    r
                }
                None => {
                    out.gaps.push(f64::INFINITY);
                    if want_k {
                        self.tangent_points[k] = None;
                        self.linearized[k] = None;
                    }
                    NodeResponse::open()
                }
            };
            if r.status != Status::Open && self.areas[k] > 0.0 {
                out.surface_force -= r.force;
                out.peak_pressure = out.peak_pressure.max(r.pressure);
                out.max_penetration = out.max_penetration.max(-out.gaps[k]);
            }
            out.nodes.push(r);
        }
        self.recover_pressures(out);
        self.follow_on_the_axis(out);
    }

    /// Anchors, for the coming increment, each node open at the last
    /// converged state where it is expected to reach `surface`
    /// ([`Approach::entry`]) when the displacement predictor moves it by
    /// `ratio` times its motion over the last converged increment (0: no
    /// predictor, as in the first increment of a stage: the node is
    /// anchored where it was, as if it approached along the normal). Friction
    /// then acts from where the node touches instead of only from the next
    /// increment, so it does not depend on the step size to first order.
    pub fn anchor_approaches(&mut self, surface: &RigidSurface, ratio: f64) {
        for (entry, s) in self.entries.iter_mut().zip(&self.states) {
            *entry = s.approach.and_then(|a| {
                let normal = surface.shape.project_local(&a.from)?.normal;
                Some(a.entry(&(a.moved * ratio), &normal))
            });
        }
    }

    /// Nodes without area (a line3 corner on the axis in axisymmetry: the
    /// consistent ring area of a point on the axis is zero) carry no force,
    /// so no penetration check or multiplier applies to them. They report
    /// the state and pressure of the next node along their side, so the
    /// contact band and the pressure field run on to the axis.
    fn follow_on_the_axis(&self, out: &mut PairResponse) {
        for k in (0..self.nodes.len()).filter(|&k| self.areas[k] == 0.0) {
            let Some(&piece) = self.neighbours[k].first() else { continue };
            let next = self.sides[piece].iter().copied().find(|&j| j != k).unwrap_or(k);
            let (status, pressure) = (out.nodes[next].status, out.nodes[next].pressure);
            out.nodes[k] = NodeResponse { status, pressure, ..NodeResponse::open() };
        }
    }

    /// The reported pressure on tri6 and quad8 faces. Their nodes carry
    /// the forces of the consistent nodal loads, which put nothing (tri6) or
    /// a pull (quad8) on the corners, while their areas are the positive
    /// scaled diagonal (see `lumped_areas`): force / area would read zero at
    /// the corners and 19 % (tri6) too much at the mid-side nodes of a
    /// uniformly pressed face. So each such face reports its mean pressure,
    /// its nodes' forces Σ p_b A_b over its area, and a node the area-weighted
    /// mean over its faces (a patch average, as stresses are recovered at
    /// nodes): smooth, exact for a uniform pressure, and the total force it
    /// integrates to is the nodes' own. Only what is reported changes; the
    /// nodes' forces and the law are untouched.
    fn recover_pressures(&self, out: &mut PairResponse) {
        if self.recovered.is_empty() {
            return;
        }
        out.recovery.clear();
        out.recovery.resize(self.nodes.len(), (0.0, 0.0));
        for (piece, area, shares) in &self.recovered {
            let face = &self.sides[*piece];
            let force: f64 = face.iter().zip(shares).map(|(&k, a)| out.nodes[k].pressure * a).sum();
            for &k in face {
                out.recovery[k].0 += force;
                out.recovery[k].1 += area;
            }
        }
        for (k, &(force, area)) in out.recovery.iter().enumerate() {
            if area > 0.0 && out.nodes[k].status != Status::Open {
                out.nodes[k].pressure = force / area;
            }
        }
        out.peak_pressure = out.nodes.iter().filter(|r| r.status != Status::Open).map(|r| r.pressure).fold(0.0, f64::max);
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
    /// estimated contact edge (see [`ContactPair::edge_touching_length`]).
    fn band_length(&self, r: &PairResponse) -> f64 {
        (0..self.sides.len()).filter_map(|e| self.edge_touching_length(e, r)).map(|(_, length)| length).sum()
    }

    /// 2-D: the touching length of edge piece `e` with one of its touching
    /// nodes, or `None` when neither end touches. An edge with both ends
    /// touching counts whole; on an edge where the contact ends, the part up
    /// to the estimated contact edge: near the edge of a contact the
    /// pressure of a smooth profile falls like a square root (Hertz: p² ∝
    /// a² − x²), so p² is extrapolated linearly from the last two touching
    /// nodes; without a usable neighbour, half the edge is counted.
    pub fn edge_touching_length(&self, e: usize, r: &PairResponse) -> Option<(usize, f64)> {
        let touching = |k: usize| r.nodes[k].status != Status::Open;
        let (a, b) = (self.sides[e][0], self.sides[e][1]);
        let len = (r.positions[a] - r.positions[b]).norm();
        match (touching(a), touching(b)) {
            (true, true) => Some((a, len)),
            (false, false) => None,
            (true, false) => Some((a, len * self.edge_fraction(e, a, r))),
            (false, true) => Some((b, len * self.edge_fraction(e, b, r))),
        }
    }

    /// The pieces of the pair's sides (see `side_pieces`) as local node
    /// indices into `nodes`: 2-D edges (line3 edges as their two halves),
    /// 3-D whole faces.
    pub fn pieces(&self) -> &[Vec<usize>] {
        &self.sides
    }

    /// Whether the pair's sides are 3-D faces.
    pub fn is_solid(&self) -> bool {
        self.measure == AreaMeasure::Solid
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

    /// Augmented-Lagrangian update after a converged solve: each node's
    /// multiplier moves toward the pressure p = max(0, λ − ε g) (rounded
    /// near zero) of the equilibrium just found, by [`relaxed_multiplier`].
    pub fn augment(&mut self, response: &PairResponse) {
        for k in 0..self.nodes.len() {
            let g = response.gaps[k];
            if !(g.is_finite() && self.areas[k] > 0.0) {
                continue;
            }
            let smoothing = self.node_params(k).smoothing;
            let s = &mut self.states[k];
            let lambda = s.multiplier;
            let p = smoothed_pressure(lambda - self.penalties[k] * g, smoothing).0;
            s.multiplier = relaxed_multiplier(lambda, p, self.updates[k]);
            self.updates[k] = Some((lambda, p));
        }
    }

    /// Forgets the updates of the current increment (a new increment or a retry begins).
    pub fn reset_updates(&mut self) {
        self.updates.fill(None);
    }

    /// Forgets the points where tangents were built (a failed attempt is
    /// abandoned: its iterates say nothing about the retry's).
    pub fn forget_tangent_points(&mut self) {
        self.tangent_points.fill(None);
        self.forget_linearizations();
    }

    /// Forgets where the multipliers' Newton update starts from (no step
    /// moves them until the next tangent is built).
    pub fn forget_linearizations(&mut self) {
        self.linearized.fill(None);
    }

    /// Each node held off the surface (gap > 0) takes its pressure at
    /// `response` as its multiplier: as a relaxing or unloading seal's
    /// pressure falls, the multipliers follow it, so the next increment does
    /// not start held off and the predictor extrapolates the fall.
    /// Penetrating nodes keep theirs: raised to their pressure as well, they
    /// held the edge nodes of a growing contact on the surface at small
    /// positive gaps (the V-groove Hertz bands one node too wide, measured).
    fn settle_multipliers(&mut self, response: &PairResponse) {
        for k in 0..self.nodes.len() {
            let g = response.gaps[k];
            if g.is_finite() && g > 0.0 && self.areas[k] > 0.0 {
                let smoothing = self.node_params(k).smoothing;
                let s = &mut self.states[k];
                s.multiplier = smoothed_pressure(s.multiplier - self.penalties[k] * g, smoothing).0;
            }
        }
    }

    /// Predicts the multipliers of the next increment from the last two
    /// converged ones (`before`: the increment before the last): each node
    /// touching at both moves on by `ratio` times its last change (the step
    /// ratio, as the displacement predictor), never below zero. The contact
    /// pressure of a seal under rising load grows steadily, so the
    /// penetration the prediction leaves is of second order in the step and
    /// mostly within tolerance without an augmentation.
    pub fn predict_multipliers(&mut self, before: &[NodeState], ratio: f64) {
        for (s, b) in self.states.iter_mut().zip(before) {
            if s.multiplier > 0.0 && b.multiplier > 0.0 {
                s.multiplier = (s.multiplier + ratio * (s.multiplier - b.multiplier)).max(0.0);
            }
        }
    }

    /// Stores the converged state: the multipliers of held-off nodes
    /// settled to their pressures (see `settle_multipliers`); stick anchors in the surface frame (the
    /// elastic-slip origin of touching nodes); for open ones, where they are,
    /// their gap and their motion over the increment, from which their
    /// first contact is anchored (see [`ContactPair::anchor_approaches`]).
    ///
    /// The anchor keeps the elastic trial traction t_trial of the law where
    /// it lies within the rounded stick–slip transition, and shortens it to
    /// the end of that transition, (1 + δ_f) μ p, beyond: evaluated again at
    /// the same position the law gives the same shear, and a node that keeps
    /// sliding stays at μ p. (Placing it at the returned shear, below the
    /// trial value inside the rounding, would start every increment of a
    /// sliding node below μ p: with small steps its shear would settle at
    /// (1 − δ_f) μ p, a friction force depending on the step size.)
    pub fn commit(&mut self, surface: &RigidSurface, response: &PairResponse) {
        self.settle_multipliers(response);
        self.reset_updates();
        for k in 0..self.nodes.len() {
            let r = &response.nodes[k];
            let params = self.node_params(k);
            let tangential = params.tangential_penalty;
            let gap = response.gaps[k];
            let x = response.positions[k];
            let s = &mut self.states[k];
            s.anchor = match r.status {
                Status::Open => None,
                _ if tangential > 0.0 => {
                    let trial = -r.slip * tangential;
                    let limit = (1.0 + params.slip_rounding) * params.friction * r.pressure;
                    let kept = if trial.norm() > limit { trial * (limit / trial.norm()) } else { trial };
                    Some(surface.placement.to_local(&(x + kept / tangential)))
                }
                _ => None,
            };
            s.approach = match (r.status, s.approach) {
                (Status::Open, _) if !gap.is_finite() => None,
                (Status::Open, before) => {
                    let from = surface.placement.to_local(&x);
                    Some(Approach { from, gap: gap.max(0.0), moved: before.map_or(Vector3::zeros(), |b| from - b.from) })
                }
                _ => None,
            };
            if r.status == Status::Open {
                s.multiplier = 0.0;
            }
        }
        self.entries.fill(None);
    }

    /// Anchors the nodes that touch `surface` (gap ≤ 0) in the reference
    /// configuration where they are, so friction holds them from the start;
    /// the others approach from there.
    pub fn anchor_initial_contacts(&mut self, mesh: &Mesh, surface: &RigidSurface) {
        for (k, &n) in self.nodes.iter().enumerate() {
            let x = Vector3::from(mesh.nodes[n]);
            match surface.project(&x) {
                Some(p) if p.gap <= 0.0 => self.states[k].anchor = Some(surface.placement.to_local(&x)),
                Some(p) => {
                    self.states[k].approach = Some(Approach { from: surface.placement.to_local(&x), gap: p.gap, moved: Vector3::zeros() })
                }
                None => {}
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
    /// `fraction × size`; the largest ratio (> 1: needs augmentation). A
    /// node held off the surface by its multiplier (λ beyond the rounding of
    /// the law, pressure at a positive gap: a multiplier larger than the
    /// pressure, as when the pressure falls or was over-predicted) counts
    /// its gap the same way.
    pub fn worst_penetration_ratio(&self, response: &PairResponse, fraction: f64) -> (f64, f64) {
        let mut worst = (0.0, 0.0, 0.0);
        for (k, r) in response.nodes.iter().enumerate() {
            if r.status == Status::Open || self.areas[k] == 0.0 {
                continue;
            }
            let gap = response.gaps[k];
            let held_off = gap > 0.0 && self.states[k].multiplier > self.node_params(k).smoothing;
            let pen = if held_off { gap } else { -gap };
            let tol = fraction * self.sizes[k];
            let ratio = pen / tol;
            if ratio > worst.0 {
                worst = (ratio, pen, tol);
            }
        }
        (worst.1, worst.2)
    }
}

/// The next multiplier of a node whose multiplier `lambda` gave the
/// equilibrium pressure `p`, with `previous` the multiplier and pressure of
/// its last update in this increment.
///
/// The plain update λ ← p solves p(λ) = λ (the multiplier that leaves no
/// gap) by fixed-point iteration, which converges while the equilibrium
/// pressure follows the multiplier with a slope s = dp/dλ of magnitude
/// below 1: usually 0 < s ≪ 1, the penalty being stiff next to the rubber.
/// Nodes of a confined cord at an extrusion gap can answer the wrong way
/// (the O-ring example near 9 MPa: s ≈ −1.35 at two neighbouring nodes
/// trading the load): the plain updates then alternate between penetration
/// and a gap with growing amplitude until the increment runs out of
/// augmentations, at any increment size. There the step is the secant
/// one, λ + (p − λ) / (1 − s) with s from the last two updates (exact for a
/// linear response), never longer than the plain step nor shorter than a
/// tenth of it; with s ≥ 0 the plain step is kept.
pub fn relaxed_multiplier(lambda: f64, p: f64, previous: Option<(f64, f64)>) -> f64 {
    let relax = match previous {
        Some((lambda0, p0)) if lambda != lambda0 => {
            let slope = (p - p0) / (lambda - lambda0);
            if slope < 0.0 {
                (1.0 / (1.0 - slope)).clamp(0.1, 1.0)
            } else {
                1.0
            }
        }
        _ => 1.0,
    };
    (lambda + relax * (p - lambda)).max(0.0)
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

/// Tributary areas of the nodes of one side (reference geometry), in the
/// side's node order.
fn tributary(x: &[Vector3<f64>], measure: AreaMeasure) -> Vec<f64> {
    let dimension = if measure == AreaMeasure::Solid { 3 } else { 2 };
    match ShapeKind::side_with_nodes(dimension, x.len()) {
        Some(side) if side.is_quadratic() => lumped_areas(side, x, measure),
        _ => linear_tributary(x, measure),
    }
}

/// Nodal areas of a quadratic side.
///
/// Line3 edges and quad9 faces take the consistent areas ∫ N_a dA (ring
/// area ∫ N_a 2πr ds in axisymmetry), the nodal loads of a uniform pressure:
/// they are positive (L/6, 2L/3, L/6 on a straight edge, their tensor
/// product on a flat quad9 face), so a uniform contact pressure gives equal
/// nodal pressures and no corner/mid-side oscillation.
///
/// Tri6 and quad8 faces cannot: their consistent areas are zero (tri6) or
/// negative (quad8, −A/12) at the corners, so a corner node would carry no
/// or a pulling contact force. They take the diagonal scaling of the side's
/// "mass" matrix M_ab = ∫ N_a N_b dA (Hinton, Rock & Zienkiewicz 1976, "A
/// note on mass lumping and related processes in the finite element method",
/// Earthquake Engng Struct. Dyn. 4, 245–249): A_a = A · M_aa / Σ_b M_bb. It
/// is positive at every node, sums to the exact side area, and shrinks with
/// the side, so Σ_a p_a A_a converges to ∫ p dA; on a flat tri6 face it is
/// A/19 at corners and 16A/57 at mid-side nodes, on a flat square quad8 face
/// 3A/76 and 4A/19 (unit test `lumped_areas_of_flat_sides`). (The row sums
/// of M are the consistent areas again, so row-sum lumping would not do.)
/// The same scaling replaces the consistent areas of a line3 or quad9 side
/// so curved that one of them turns negative. A line3 edge from the axis in
/// axisymmetry keeps its consistent areas, zero at the axis corner: that
/// node carries no ring and follows its side (`follow_on_the_axis`).
fn lumped_areas(side: ShapeKind, x: &[Vector3<f64>], measure: AreaMeasure) -> Vec<f64> {
    let nn = x.len();
    let (mut consistent, mut diagonal) = (vec![0.0; nn], vec![0.0; nn]);
    let mut area = 0.0;
    // N_a² is of degree 4 per coordinate and the axisymmetric radius adds one.
    for_each_point(measure.analysis(), x, SideRule::Degree(5), |p| {
        let da = p.area();
        area += da;
        for (a, n) in p.values.iter().enumerate() {
            consistent[a] += n * da;
            diagonal[a] += n * n * da;
        }
    });
    // A corner on the axis has no consistent ring area (see
    // `follow_on_the_axis`); rounding may leave a trace of either sign.
    let floor = 1e-12 * area.abs();
    if matches!(side, ShapeKind::Line3 | ShapeKind::Quad9) && consistent.iter().all(|&c| c >= -floor) {
        return consistent.iter().map(|&c| if c > floor { c } else { 0.0 }).collect();
    }
    let total: f64 = diagonal.iter().sum();
    diagonal.iter().map(|m| if total > 0.0 { area * m / total } else { 0.0 }).collect()
}

/// Tributary areas of a linear side: on an edge its consistent shares
/// ∫ N_a dA (half the length × thickness each in plane strain; the ring
/// shares 2πL(2r₀ + r₁)/6, 2πL(r₀ + 2r₁)/6 in axisymmetry), on a face its
/// area split equally among the corners.
fn linear_tributary(x: &[Vector3<f64>], measure: AreaMeasure) -> Vec<f64> {
    let mut shares = vec![0.0; x.len()];
    let area = side::nodal_areas(measure.analysis(), x, &mut shares);
    if measure == AreaMeasure::Solid {
        shares.fill(area / x.len() as f64);
    }
    shares
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Nodes of `side` mapped affinely from its reference nodes (scale 1.5 in
    /// x, 0.5 in y, shifted to x ≥ 2), and the areas of [`tributary`].
    fn affine_areas(side: ShapeKind, measure: AreaMeasure) -> (Vec<[f64; 3]>, Vec<f64>) {
        let refs = side.def().reference_nodes;
        let x: Vec<Vector3<f64>> = refs.iter().map(|r| Vector3::new(2.0 + 1.5 * (r[0] + 1.0), 0.5 * r[1], 0.0)).collect();
        (refs.to_vec(), tributary(&x, measure))
    }

    // The multiplier updates as a scalar fixed-point iteration on a model
    // response p(λ) = a + s λ (mathematics, no published value): the fixed
    // point λ* = a / (1 − s) leaves no gap. The plain update converges for
    // s = 0.02 (a stiff penalty) and diverges, alternating, for s = −1.35
    // (the O-ring's corner node); the relaxed one reaches λ* in both.
    #[test]
    fn relaxed_multiplier_updates_converge_where_plain_ones_alternate() {
        let iterate = |a: f64, s: f64, relaxed: bool| {
            let (mut lambda, mut previous) = (0.0, None);
            let mut history = Vec::new();
            for _ in 0..12 {
                let p = a + s * lambda;
                let next = if relaxed { relaxed_multiplier(lambda, p, previous) } else { p };
                previous = Some((lambda, p));
                lambda = next;
                history.push(lambda);
            }
            history
        };
        for s in [0.02, -1.35] {
            let fixed = 10.0 / (1.0 - s);
            let relaxed = iterate(10.0, s, true);
            assert!((relaxed.last().unwrap() - fixed).abs() < 1e-9 * fixed, "s = {s}: {relaxed:?}");
        }
        let plain = iterate(10.0, -1.35, false);
        assert!((plain[11] - plain[10]).abs() > (plain[1] - plain[0]).abs(), "{plain:?}");
        // Never below zero, and the plain step where the slope is positive.
        assert_eq!(relaxed_multiplier(1.0, 0.0, Some((2.0, 0.5))), 0.0);
        assert_eq!(relaxed_multiplier(1.0, 1.5, Some((0.5, 1.2))), 1.5);
    }

    /// The top side of a plane-strain rectangle of `columns` elements, frictionless.
    fn frictionless_top(columns: usize) -> ContactPair {
        use olli_mesh::generate::{rectangle, RectangleParams};
        let params =
            ContactParameters { normal_penalty: 100.0, tangential_penalty: 10.0, friction: 0.0, smoothing: 0.0, slip_rounding: 0.0 };
        let mesh = rectangle(&RectangleParams { divisions: [columns, 1], ..Default::default() }).unwrap();
        ContactPair::new(&mesh, &mesh.side_sets["top"], AreaMeasure::PlaneStrain { thickness: 1.0 }, params)
    }

    // A node held off the surface by its multiplier (pressure at a positive
    // gap, the multiplier above the pressure) violates the contact as much
    // as one penetrating by that gap; without a multiplier the same gap is
    // only the rounding of the law (definition of the check, no published value).
    #[test]
    fn a_node_held_off_by_its_multiplier_needs_augmentation() {
        let mut pair = frictionless_top(4);
        pair.penalties.fill(100.0);
        let gap = 0.01 * pair.sizes[0];
        let touching = NodeResponse { status: Status::Slip, pressure: 1.0, ..NodeResponse::open() };
        let r = PairResponse { nodes: vec![touching; pair.nodes.len()], gaps: vec![gap; pair.nodes.len()], ..Default::default() };
        assert_eq!(pair.worst_penetration_ratio(&r, 1e-3).0, 0.0, "no multiplier: no violation");
        pair.states[1].multiplier = 2.0;
        let (violation, tolerance) = pair.worst_penetration_ratio(&r, 1e-3);
        assert!((violation - gap).abs() < 1e-15 && violation > tolerance, "{violation} {tolerance}");
    }

    // The face seal's first pressurised increment cycled with period 2: a
    // sliding node (no friction stiffness along its slip in 2-D) was moved
    // by each Newton step through its stick point to slide the other way,
    // and back. A node whose shear reversed since the last tangent must get
    // the stick tangent, keep it when the same point is evaluated again,
    // and lose it once it slides on the same way; the force is always the
    // law's (definition of the rule, no published value).
    // The multipliers' Newton update (definition of the step, no published
    // value): a node pressed 0.01 into a plane takes the stiffness (ε + β) A
    // along the normal and the closing force −β g ∂f/∂λ for the right-hand
    // side; stepping it by Δx sets λ = λ₀ − β (g + n·Δx): the step that
    // closes the gap keeps λ₀, no step takes up the whole penetration, and a
    // node pulled far off keeps λ ≥ 0; a node touching only within the
    // law's rounding is released (the semi-smooth rule, λ − ε g ≤ 0).
    #[test]
    fn a_touching_node_steps_its_multiplier_with_the_newton_step() {
        use crate::contact::surface::{Placement, Shape};
        let mut pair = frictionless_top(1);
        pair.penalties.fill(100.0);
        pair.constraint_factor = 100.0;
        let beta = 1e4;
        for s in &mut pair.states {
            s.multiplier = 0.5;
        }
        let plane =
            RigidSurface { shape: Shape::Plane { point: [0.0, 1.0, 0.0], normal: [0.0, -1.0, 0.0] }, placement: Placement::default() };
        let nodes: Vec<Vector3<f64>> = {
            use olli_mesh::generate::{rectangle, RectangleParams};
            let mesh = rectangle(&RectangleParams { divisions: [1, 1], ..Default::default() }).unwrap();
            mesh.nodes.iter().map(|&x| Vector3::from(x)).collect()
        };
        let mut out = PairResponse::default();
        pair.evaluate_into(&plane, |n| nodes[n] + Vector3::new(0.0, 0.01, 0.0), &mut out, true);
        let (r, area) = (out.nodes[0], pair.areas[0]);
        assert!((r.pressure - 1.5).abs() < 1e-12, "p = λ − ε g: {}", r.pressure);
        assert!((r.stiffness[(1, 1)] - (100.0 + beta) * area).abs() < 1e-9 * beta, "{}", r.stiffness);
        let l = pair.linearizations()[0].expect("touching");
        assert!((l.gap + 0.01).abs() < 1e-12 && (l.rate - Vector3::new(0.0, -area, 0.0)).norm() < 1e-12);
        let closing = -l.beta * l.gap * l.rate;
        assert!((closing.y + 100.0 * area).abs() < 1e-9, "pushes the node out of the plane: {closing}");
        let multiplier_after = |pair: &mut ContactPair, dy: f64| {
            pair.step_multipliers(|_| Vector3::new(0.0, dy, 0.0));
            pair.states[0].multiplier
        };
        assert!((multiplier_after(&mut pair, -0.01) - 0.5).abs() < 1e-9);
        assert!((multiplier_after(&mut pair, 0.0) - (0.5 + beta * 0.01)).abs() < 1e-9);
        assert_eq!(multiplier_after(&mut pair, -1.0), 0.0);
        // 0.0055 off the plane with λ = 0.5: trial pressure λ − ε g = −0.05,
        // inside the law's rounding (δ = 1e-3 ε h = 0.1), p = 0.05²/(4δ) > 0:
        // released, the step asks for λ → 0 and the force it loses, and the
        // tangent is the law's own, ε dp A with dp = 0.25.
        for s in &mut pair.states {
            s.multiplier = 0.5;
        }
        pair.evaluate_into(&plane, |n| nodes[n] - Vector3::new(0.0, 0.0055, 0.0), &mut out, true);
        assert!((out.nodes[0].pressure - 0.00625).abs() < 1e-12, "{}", out.nodes[0].pressure);
        assert!((out.nodes[0].stiffness[(1, 1)] - 25.0 * area).abs() < 1e-9, "no constraint stiffness: {}", out.nodes[0].stiffness);
        let l = pair.linearizations()[0].expect("touching");
        assert_eq!((l.beta, l.change_at_rest()), (0.0, -0.5));
        assert_eq!(multiplier_after(&mut pair, 0.0), 0.0);
    }

    #[test]
    fn a_node_whose_slip_reverses_takes_the_stick_tangent_once() {
        use crate::contact::surface::{Placement, Shape};
        use olli_mesh::generate::{rectangle, RectangleParams};
        let params =
            ContactParameters { normal_penalty: 100.0, tangential_penalty: 10.0, friction: 0.5, smoothing: 0.0, slip_rounding: 0.0 };
        let mesh = rectangle(&RectangleParams { divisions: [1, 1], ..Default::default() }).unwrap();
        let mut pair = ContactPair::new(&mesh, &mesh.side_sets["top"], AreaMeasure::PlaneStrain { thickness: 1.0 }, params);
        pair.penalties.fill(100.0);
        // A plane along the rubber's top (y = 1), the rubber below it.
        let plane =
            RigidSurface { shape: Shape::Plane { point: [0.0, 1.0, 0.0], normal: [0.0, -1.0, 0.0] }, placement: Placement::default() };
        for (k, &n) in pair.nodes.iter().enumerate() {
            pair.states[k].anchor = Some(Vector3::from(mesh.nodes[n]));
        }
        // Pressed in by 0.01 (p = 1, μ p = 0.5) and slid by `dx`: with the
        // tangential penalty 0.1 × 100 = 10, |dx| = 0.2 slides at μ p.
        let mut out = PairResponse::default();
        let mut at = |pair: &mut ContactPair, dx: f64, want_k: bool| {
            pair.evaluate_into(&plane, |n| Vector3::from(mesh.nodes[n]) + Vector3::new(dx, 0.01, 0.0), &mut out, want_k);
            let r = out.nodes[0];
            assert_eq!(r.status, Status::Slip);
            assert!((r.shear.x + 0.5 * dx.signum()).abs() < 1e-12, "the force is the law's: {}", r.shear.x);
            r.stiffness[(0, 0)] / pair.areas[0]
        };
        let stick = 0.1 * 100.0;
        assert!(at(&mut pair, 0.2, true).abs() < 1e-12, "sliding: no stiffness along the slip");
        assert!((at(&mut pair, -0.2, true) - stick).abs() < 1e-9, "reversed: the stick tangent");
        assert!((at(&mut pair, -0.2, true) - stick).abs() < 1e-9, "the same point again: held still");
        assert!(at(&mut pair, -0.3, true).abs() < 1e-12, "sliding on the same way: consistent again");
        // A residual-only evaluation is no tangent point: the reversal is
        // seen against the last point where a tangent was built.
        at(&mut pair, 0.3, false);
        assert!((at(&mut pair, 0.3, true) - stick).abs() < 1e-9);
        // A retry starts without history.
        pair.forget_tangent_points();
        assert!(at(&mut pair, -0.3, true).abs() < 1e-12);
    }

    // The multipliers of the next increment continue the last change by the
    // step ratio, never below zero; a node open at either increment keeps its
    // own (definition of the predictor, no published value).
    #[test]
    fn multipliers_are_predicted_from_the_last_two_increments() {
        let mut pair = frictionless_top(2);
        let mut before = pair.states.clone();
        for (k, (now, then)) in [(2.0, 1.0), (1.0, 2.0), (0.0, 1.0)].into_iter().enumerate() {
            pair.states[k].multiplier = now;
            before[k].multiplier = then;
        }
        pair.predict_multipliers(&before, 1.5);
        let got: Vec<f64> = pair.states.iter().map(|s| s.multiplier).collect();
        assert_eq!(got, [3.5, 0.0, 0.0]);
    }

    /// A uniformly stretched face carries the same force on a larger area:
    /// the true pressure is the nominal one over the area stretch (here a
    /// quad8 face stretched 1.25 × 1.6 = 2 in its plane, a line3 edge 1.25).
    #[test]
    fn true_pressure_is_force_over_the_deformed_area() {
        use olli_mesh::generate::Order;
        use olli_mesh::generate::{block, rectangle, BlockParams, RectangleParams};
        let params =
            ContactParameters { normal_penalty: 100.0, tangential_penalty: 80.0, friction: 0.0, smoothing: 0.0, slip_rounding: 0.0 };
        let cases = [
            (block(&BlockParams { divisions: [2, 2, 1], order: Order::Quadratic, ..Default::default() }).unwrap(), AreaMeasure::Solid, 2.0),
            (
                rectangle(&RectangleParams { divisions: [3, 1], order: Order::Quadratic, ..Default::default() }).unwrap(),
                AreaMeasure::PlaneStrain { thickness: 1.0 },
                1.25,
            ),
        ];
        for (mesh, measure, stretch) in cases {
            let sides = &mesh.side_sets["top"];
            let pair = ContactPair::new(&mesh, sides, measure, params);
            let positions =
                pair.nodes.iter().map(|&n| Vector3::new(1.25 * mesh.nodes[n][0], 1.6 * mesh.nodes[n][1], mesh.nodes[n][2])).collect();
            let nodes = pair.nodes.iter().map(|_| NodeResponse { pressure: 3.0, ..NodeResponse::open() }).collect();
            let r = PairResponse { nodes, positions, ..Default::default() };
            for (k, p) in pair.true_pressures(&r).iter().enumerate() {
                if pair.areas[k] > 0.0 {
                    assert!((p - 3.0 / stretch).abs() < 1e-12, "node {k}: {p}");
                }
            }
        }
    }

    /// Hand-integrated HRZ areas of flat sides (M_aa by the product formulas
    /// ∫ N² on the reference shapes), as fractions of the side area.
    #[test]
    fn lumped_areas_of_flat_sides() {
        let cases: [(ShapeKind, AreaMeasure, f64, [f64; 3]); 4] = [
            // (side, measure, area, [corner, mid-side, centre] fractions)
            (ShapeKind::Line3, AreaMeasure::PlaneStrain { thickness: 2.0 }, 3.0 * 2.0, [1.0 / 6.0, 2.0 / 3.0, 0.0]),
            (ShapeKind::Tri6, AreaMeasure::Solid, 0.5 * 1.5 * 0.5, [1.0 / 19.0, 16.0 / 57.0, 0.0]),
            (ShapeKind::Quad8, AreaMeasure::Solid, 3.0 * 1.0, [3.0 / 76.0, 4.0 / 19.0, 0.0]),
            (ShapeKind::Quad9, AreaMeasure::Solid, 3.0 * 1.0, [1.0 / 36.0, 1.0 / 9.0, 4.0 / 9.0]),
        ];
        for (side, measure, area, fractions) in cases {
            let (refs, a) = affine_areas(side, measure);
            let corners = side.def().corners;
            for (k, (r, ak)) in refs.iter().zip(&a).enumerate() {
                let centre = side == ShapeKind::Quad9 && r[0] == 0.0 && r[1] == 0.0;
                let expected = area
                    * if k < corners {
                        fractions[0]
                    } else if centre {
                        fractions[2]
                    } else {
                        fractions[1]
                    };
                assert!((ak - expected).abs() < 1e-12 * area, "{side} node {k}: {ak} vs {expected}");
            }
        }
    }

    /// In axisymmetry a straight line3 edge off the axis gets its consistent
    /// ring areas ∫ N_a 2πr ds (r linear from r0 to r1: πL/3 · (r0, r1,
    /// 2(r0 + r1)), hand-integrated), summing to the ring area 2π r̄ L, and
    /// an edge from the axis (r0 = 0) the same formula: none on the axis.
    #[test]
    fn lumped_ring_areas_are_positive_and_sum_to_the_ring() {
        let pi = std::f64::consts::PI;
        let (r0, r1) = (1.0, 4.0);
        let x = [Vector3::new(r0, 0.0, 0.0), Vector3::new(r1, 4.0, 0.0), Vector3::new(0.5 * (r0 + r1), 2.0, 0.0)];
        let a = tributary(&x, AreaMeasure::Axisymmetric);
        let third = pi * 5.0 / 3.0;
        for (ak, expected) in a.iter().zip([third * r0, third * r1, third * 2.0 * (r0 + r1)]) {
            assert!((ak - expected).abs() < 1e-12 * expected, "{a:?}");
        }
        let from_axis = [Vector3::new(0.0, 0.0, 0.0), Vector3::new(3.0, 4.0, 0.0), Vector3::new(1.5, 2.0, 0.0)];
        let a = tributary(&from_axis, AreaMeasure::Axisymmetric);
        let ring = 2.0 * pi * 1.5 * 5.0;
        assert!((a.iter().sum::<f64>() - ring).abs() < 1e-12 * ring);
        assert!(a[0] == 0.0 && (a[1] - 5.0 * pi).abs() < 1e-12 * ring, "{a:?}");
    }
}
