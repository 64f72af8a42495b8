//! Fluid pressure that penetrates between the rubber and the metal.
//!
//! A fluid enters at a source facet of its side set and wets every facet it
//! can reach from there through facets of the set that share a corner (2-D)
//! or an edge (3-D). A facet lets the fluid in unless one of its corners is
//! pressed against a rigid surface at least as hard as the fluid pressure:
//! the pressure-penetration criterion of seal engineering, "the interface is
//! tight where the contact pressure exceeds the pressure of the fluid to be
//! sealed" (Müller & Nau 1998, *Fluid Sealing Technology: Principles and
//! Applications*, Marcel Dekker, ch. on static seals; from memory). Wetted
//! facets carry the fluid pressure as a follower load on their current
//! position, with its full (non-symmetric) load stiffness.
//!
//! The wetted set is discrete, so it is updated between equilibrium solves,
//! not inside the Newton iteration. The front of an increment is a fixed
//! point of the rule at the increment's load: the set the fluid floods
//! through the contact pressures of the equilibrium with that very set
//! wetted. Each increment starts from the front of the last converged
//! increment; after every equilibrium the front is found again from the
//! current contact pressures (facets may wet and dry, by the same
//! criterion), and the increment is re-balanced at the same load while it
//! changes. Starting from the converged front, never from a flood of old
//! contact pressures at a new fluid pressure, the front follows the load as
//! a slow pressurisation would, whatever the increment size: a flood of the
//! last increment's contact pressures at the new fluid pressure overshoots
//! (a self-energised seal presses harder as the pressure rises) onto facets
//! that, once wetted, stay open, so the front found depended on the step.
//! A front that would oscillate (the rule maps a set back to one it met
//! before in this increment) settles on the union of the sets of the cycle,
//! from which it may only grow: the result depends on the sets of the
//! cycle, not on how many updates came before it.

use nalgebra::Vector3;
use olli_mesh::{select::boundary_sides, Side};

use super::pressure::{pressure_side_into, MAX_SIDE_DOFS};
use crate::assembly::global::GlobalSystem;
use crate::assembly::Discretization;
use crate::element::{side, Analysis};
use crate::model::{Ramp, Stage};
use crate::shape::MAX_SIDE_NODES;

/// A fluid that cannot be set up: an unknown or empty side set, a source
/// off its sides, a stage pressure that is not finite.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("fluid `{fluid}`: {reason}")]
pub struct FluidError {
    /// Name of the fluid.
    pub fluid: String,
    /// What is wrong with it.
    pub reason: String,
}

/// One side of a fluid's set: its nodes in the side shape's order, corners first.
#[derive(Debug, Clone, PartialEq)]
struct Facet {
    nodes: Vec<usize>,
    /// Number of corner nodes (2 on an edge, 3 or 4 on a face).
    corners: usize,
}

impl Facet {
    fn corners(&self) -> &[usize] {
        &self.nodes[..self.corners]
    }
}

/// One fluid during the run.
#[derive(Debug, Clone)]
struct FluidFront {
    name: String,
    /// The facets the fluid may wet (every node loaded, mid-side nodes included).
    facets: Vec<Facet>,
    /// Facets sharing a corner (2-D) or an edge (3-D) with each facet.
    neighbours: Vec<Vec<usize>>,
    /// The facet the fluid enters through.
    source: usize,
    /// Pressure at the stage start and end, and its ramp.
    start: f64,
    end: f64,
    ramp: Ramp,
    wetted: Vec<bool>,
}

/// Figures of one fluid at a converged increment.
#[derive(Debug, Clone, PartialEq)]
pub struct FluidSummary {
    /// Name of the fluid.
    pub name: String,
    /// Fluid pressure applied (stress units).
    pub pressure: f64,
    /// Wetted length of the section (2-D) or wetted area (3-D), in the
    /// current configuration.
    pub wetted_measure: f64,
    /// Number of wetted facets.
    pub wetted_facets: usize,
}

/// Every fluid of a model, with the state of its wetted front.
#[derive(Debug, Clone, Default)]
pub struct Fluids {
    fluids: Vec<FluidFront>,
    dim: usize,
    analysis: Option<Analysis>,
    /// Wetted facets of every fluid at the last converged increment.
    committed: Vec<Vec<bool>>,
    /// The fronts (all fluids) met in the current increment, the start first.
    seen: Vec<Vec<Vec<bool>>>,
    /// A cycle was met in this increment: the front may only grow.
    grow_only: bool,
}

impl Fluids {
    /// Sets up every fluid of the model: its facets, their connectivity and
    /// the source facet. Errors name the fluid: an unknown side set, a set
    /// with no facet on the mesh boundary, a source point off the set.
    pub fn new(disc: &Discretization) -> Result<Self, FluidError> {
        let model = disc.model;
        let mesh = disc.mesh();
        let dim = disc.dim;
        let boundary = if model.fluids.is_empty() { Vec::new() } else { boundary_sides(mesh) };
        let mut fluids = Vec::new();
        for def in &model.fluids {
            let bad = |reason: String| FluidError { fluid: def.name.clone(), reason };
            let sides = mesh.side_sets.get(&def.sides).ok_or_else(|| bad(format!("no side set named `{}`", def.sides)))?;
            let free: Vec<Side> = sides.iter().copied().filter(|s| boundary.binary_search(s).is_ok()).collect();
            if free.is_empty() {
                return Err(bad(format!("side set `{}` has no free facet (no side on the surface of the rubber)", def.sides)));
            }
            let facets: Vec<Facet> = free
                .iter()
                .map(|&s| {
                    let nodes = mesh.side_nodes(s);
                    let corners = side::side_kind(model.analysis, nodes.len()).map_or(nodes.len(), |k| k.def().corners);
                    Facet { nodes, corners }
                })
                .collect();
            let neighbours = neighbours(&facets, dim, mesh.node_count());
            let (source, distance, size) = facets
                .iter()
                .enumerate()
                .map(|(i, f)| {
                    let corners: Vec<[f64; 3]> = f.corners().iter().map(|&n| mesh.nodes[n]).collect();
                    let x: Vec<Vector3<f64>> = f.nodes.iter().map(|&n| Vector3::from(mesh.nodes[n])).collect();
                    (i, distance_to_facet(&corners, def.source), facet_size(model.analysis, &x))
                })
                .min_by(|a, b| a.1.total_cmp(&b.1))
                .expect("at least one facet");
            // A point on a curved surface may sit off the facets' chords by their sagitta.
            if !(distance <= 0.25 * size) {
                let p = def.source;
                return Err(bad(format!(
                    "source point ({}) is not on side set `{}`: the nearest facet is {distance:.4} away (allowed {:.4})",
                    p[..dim].iter().map(|v| format!("{v}")).collect::<Vec<_>>().join(", "),
                    def.sides,
                    0.25 * size
                )));
            }
            let n = facets.len();
            fluids.push(FluidFront {
                name: def.name.clone(),
                facets,
                neighbours,
                source,
                start: 0.0,
                end: 0.0,
                ramp: Ramp::Linear,
                wetted: vec![false; n],
            });
        }
        for stage in &model.stages {
            for p in &stage.fluid_pressures {
                if !model.fluids.iter().any(|f| f.name == p.fluid) {
                    return Err(FluidError {
                        fluid: p.fluid.clone(),
                        reason: format!("stage `{}` sets the pressure of a fluid that does not exist", stage.name),
                    });
                }
                if !p.value.is_finite() {
                    return Err(FluidError { fluid: p.fluid.clone(), reason: "pressure must be finite".into() });
                }
            }
        }
        let committed = fluids.iter().map(|f| vec![false; f.facets.len()]).collect();
        Ok(Fluids { fluids, dim, analysis: Some(model.analysis), committed, seen: Vec::new(), grow_only: false })
    }

    /// Whether the model has no fluid.
    pub fn is_empty(&self) -> bool {
        self.fluids.is_empty()
    }

    /// Starts a stage: fluids named by it ramp from their pressure at the
    /// stage start to the stage's value; the others hold theirs.
    pub fn begin_stage(&mut self, stage: &Stage) {
        for f in &mut self.fluids {
            f.start = f.end;
            if let Some(p) = stage.fluid_pressures.iter().find(|p| p.fluid == f.name) {
                f.end = p.value;
            }
            f.ramp = stage.ramps.get(&f.name).cloned().unwrap_or_default();
        }
    }

    /// Pressure of fluid `i` at stage fraction `t`.
    fn pressure(&self, i: usize, t: f64) -> f64 {
        let f = &self.fluids[i];
        f.start + f.ramp.fraction(t) * (f.end - f.start)
    }

    /// Starts an increment: the front of the last converged increment.
    pub fn begin_increment(&mut self) {
        for (f, c) in self.fluids.iter_mut().zip(&self.committed) {
            f.wetted.clone_from(c);
        }
        self.seen = vec![self.fronts()];
        self.grow_only = false;
    }

    /// Starts the damped retry of a failed increment from the front its
    /// plain attempt reached at the same load (an iterate of the same rule,
    /// so the fixed point it settles on is the same; the dry start would
    /// cost the retry its damped iterations).
    pub fn resume_increment(&mut self) {
        self.seen = vec![self.fronts()];
        self.grow_only = false;
    }

    fn fronts(&self) -> Vec<Vec<bool>> {
        self.fluids.iter().map(|f| f.wetted.clone()).collect()
    }

    /// Finds the front again from `contact` (contact pressure per mesh node
    /// at the current equilibrium) at stage fraction `t` and returns whether
    /// it moved. A front met before in this increment closes a cycle: the
    /// front becomes the union of the cycle's sets and only grows from then on.
    pub fn update_front(&mut self, contact: &[f64], t: f64) -> bool {
        let mut next: Vec<Vec<bool>> = (0..self.fluids.len()).map(|i| flood(&self.fluids[i], contact, self.pressure(i, t))).collect();
        let current = self.fronts();
        if self.grow_only {
            union_into(&mut next, &current);
        } else if let Some(first) = self.seen.iter().position(|s| *s == next) {
            // The cycle: the sets met from `next`'s first appearance on.
            for set in &self.seen[first..] {
                union_into(&mut next, set);
            }
            self.grow_only = true;
        }
        if next == current {
            return false;
        }
        for (f, w) in self.fluids.iter_mut().zip(&next) {
            f.wetted.clone_from(w);
        }
        self.seen.push(next);
        true
    }

    /// Front updates so far in the current increment.
    pub fn updates(&self) -> usize {
        self.seen.len().saturating_sub(1)
    }

    /// Most front updates an increment may take: every update before a
    /// cycle meets a new set, and after one the front only grows; this
    /// bounds the updates of any front that settles in practice (a front
    /// that wanders through more distinct sets than twice the facets is
    /// reported as unsettled).
    pub fn update_limit(&self) -> usize {
        2 * self.facet_count() + 1
    }

    /// Facets of all fluids (bounds the number of wetting-only updates).
    pub fn facet_count(&self) -> usize {
        self.fluids.iter().map(|f| f.facets.len()).sum()
    }

    /// Keeps the converged front as the next increment's start.
    pub fn commit(&mut self) {
        self.committed = self.fronts();
    }

    /// Adds the wetted facets' follower pressure at `u` and stage fraction
    /// `t` to `system`: the force, and `−∂f/∂u` to the tangent with its skew
    /// part kept (a wetted front on a sliding seal is not conservative).
    pub fn add_loads(&self, nodes: &[[f64; 3]], u: &[f64], t: f64, system: &mut GlobalSystem) {
        let dim = self.dim;
        let Some(analysis) = self.analysis else { return };
        let mut fs = [0.0; MAX_SIDE_DOFS];
        let mut ks = [0.0; MAX_SIDE_DOFS * MAX_SIDE_DOFS];
        let mut gdofs = [0usize; MAX_SIDE_DOFS];
        let want_k = system.wants_stiffness();
        for i in 0..self.fluids.len() {
            let p = self.pressure(i, t);
            if p == 0.0 {
                continue;
            }
            let f = &self.fluids[i];
            for (facet, _) in f.facets.iter().zip(&f.wetted).filter(|(_, &w)| w) {
                let nn = facet.nodes.len();
                let nd = nn * dim;
                let (mut x, mut us) = ([[0.0; 3]; MAX_SIDE_NODES], [[0.0; 3]; MAX_SIDE_NODES]);
                for (a, &node) in facet.nodes.iter().enumerate() {
                    x[a] = nodes[node];
                    for c in 0..dim {
                        us[a][c] = u[node * dim + c];
                        gdofs[a * dim + c] = node * dim + c;
                    }
                }
                pressure_side_into(analysis, &x[..nn], &us[..nn], p, &mut fs, if want_k { Some(&mut ks) } else { None });
                system.add_force(&gdofs[..nd], &fs[..nd]);
                if want_k {
                    // The tangent holds −∂f/∂u.
                    ks[..nd * nd].iter_mut().for_each(|v| *v = -*v);
                    system.add_stiffness(&gdofs[..nd], &ks[..nd * nd], true);
                }
            }
        }
    }

    /// Figures of every fluid at displacement `u` and stage fraction `t`.
    pub fn summaries(&self, nodes: &[[f64; 3]], u: &[f64], t: f64) -> Vec<FluidSummary> {
        let dim = self.dim;
        let analysis = self.analysis.unwrap_or(Analysis::Solid3d);
        let position = |n: usize| {
            let mut x = Vector3::from(nodes[n]);
            for c in 0..dim {
                x[c] += u[n * dim + c];
            }
            x
        };
        self.fluids
            .iter()
            .enumerate()
            .map(|(i, f)| {
                let mut measure = 0.0;
                for (facet, _) in f.facets.iter().zip(&f.wetted).filter(|(_, &w)| w) {
                    let x: Vec<Vector3<f64>> = facet.nodes.iter().map(|&n| position(n)).collect();
                    measure += side::measure(analysis, &x);
                }
                FluidSummary {
                    name: f.name.clone(),
                    pressure: self.pressure(i, t),
                    wetted_measure: measure,
                    wetted_facets: f.wetted.iter().filter(|&&w| w).count(),
                }
            })
            .collect()
    }

    /// Fluid pressure at every mesh node on a wetted facet (the largest of
    /// the fluids wetting it), 0 elsewhere.
    pub fn nodal_pressure(&self, node_count: usize, t: f64) -> Vec<f64> {
        let mut out = vec![0.0; node_count];
        for (i, f) in self.fluids.iter().enumerate() {
            let p = self.pressure(i, t);
            for (facet, _) in f.facets.iter().zip(&f.wetted).filter(|(_, &w)| w) {
                for &n in &facet.nodes {
                    out[n] = f64::max(out[n], p);
                }
            }
        }
        out
    }
}

/// `into ∪= other`, fluid by fluid.
fn union_into(into: &mut [Vec<bool>], other: &[Vec<bool>]) {
    for (a, b) in into.iter_mut().zip(other) {
        for (x, &y) in a.iter_mut().zip(b) {
            *x |= y;
        }
    }
}

/// Facets reachable from the source through facets none of whose corners is
/// pressed (`contact`, per node) at least as hard as the fluid pressure `p`.
fn flood(f: &FluidFront, contact: &[f64], p: f64) -> Vec<bool> {
    let mut wet = vec![false; f.facets.len()];
    let open = |i: usize| p > 0.0 && f.facets[i].corners().iter().all(|&n| contact[n] < p);
    if !open(f.source) {
        return wet;
    }
    let mut stack = vec![f.source];
    wet[f.source] = true;
    while let Some(i) = stack.pop() {
        for &j in &f.neighbours[i] {
            if !wet[j] && open(j) {
                wet[j] = true;
                stack.push(j);
            }
        }
    }
    wet
}

/// Facets sharing `dim − 1` corners (a corner in 2-D, an edge in 3-D).
fn neighbours(facets: &[Facet], dim: usize, node_count: usize) -> Vec<Vec<usize>> {
    let mut at_node = vec![Vec::new(); node_count];
    for (i, f) in facets.iter().enumerate() {
        for &n in f.corners() {
            at_node[n].push(i);
        }
    }
    let need = dim - 1;
    facets
        .iter()
        .enumerate()
        .map(|(i, f)| {
            let mut out: Vec<usize> = Vec::new();
            for &n in f.corners() {
                for &j in &at_node[n] {
                    if j != i && !out.contains(&j) {
                        let shared = f.corners().iter().filter(|a| facets[j].corners().contains(a)).count();
                        if shared >= need {
                            out.push(j);
                        }
                    }
                }
            }
            out
        })
        .collect()
}

fn sub(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}

fn dot(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

/// Size of a facet: its length, or the square root of its area.
fn facet_size(analysis: Analysis, x: &[Vector3<f64>]) -> f64 {
    let m = side::measure(analysis, x);
    if analysis == Analysis::Solid3d {
        m.sqrt()
    } else {
        m
    }
}

/// Distance from `p` to the corner polygon of a facet: to the segment (2
/// corners), the triangle (3) or the nearer of the face's two triangles (4).
fn distance_to_facet(x: &[[f64; 3]], p: [f64; 3]) -> f64 {
    match x.len() {
        2 => {
            let d = sub(x[1], x[0]);
            let s = (dot(sub(p, x[0]), d) / dot(d, d).max(f64::MIN_POSITIVE)).clamp(0.0, 1.0);
            let q = [x[0][0] + s * d[0], x[0][1] + s * d[1], x[0][2] + s * d[2]];
            dot(sub(p, q), sub(p, q)).sqrt()
        }
        3 => distance_to_triangle(p, x[0], x[1], x[2]),
        _ => distance_to_triangle(p, x[0], x[1], x[2]).min(distance_to_triangle(p, x[0], x[2], x[3])),
    }
}

/// Distance from `p` to triangle `abc` (Ericson 2005, *Real-Time Collision
/// Detection*, closest point on a triangle by its Voronoi regions).
fn distance_to_triangle(p: [f64; 3], a: [f64; 3], b: [f64; 3], c: [f64; 3]) -> f64 {
    let (ab, ac, ap) = (sub(b, a), sub(c, a), sub(p, a));
    let (d1, d2) = (dot(ab, ap), dot(ac, ap));
    let at = |q: [f64; 3]| dot(sub(p, q), sub(p, q)).sqrt();
    let lerp = |o: [f64; 3], d: [f64; 3], s: f64| [o[0] + s * d[0], o[1] + s * d[1], o[2] + s * d[2]];
    if d1 <= 0.0 && d2 <= 0.0 {
        return at(a);
    }
    let bp = sub(p, b);
    let (d3, d4) = (dot(ab, bp), dot(ac, bp));
    if d3 >= 0.0 && d4 <= d3 {
        return at(b);
    }
    let vc = d1 * d4 - d3 * d2;
    if vc <= 0.0 && d1 >= 0.0 && d3 <= 0.0 {
        return at(lerp(a, ab, d1 / (d1 - d3)));
    }
    let cp = sub(p, c);
    let (d5, d6) = (dot(ab, cp), dot(ac, cp));
    if d6 >= 0.0 && d5 <= d6 {
        return at(c);
    }
    let vb = d5 * d2 - d1 * d6;
    if vb <= 0.0 && d2 >= 0.0 && d6 <= 0.0 {
        return at(lerp(a, ac, d2 / (d2 - d6)));
    }
    let va = d3 * d6 - d5 * d4;
    if va <= 0.0 && (d4 - d3) >= 0.0 && (d5 - d6) >= 0.0 {
        return at(lerp(b, sub(c, b), (d4 - d3) / ((d4 - d3) + (d5 - d6))));
    }
    let denom = 1.0 / (va + vb + vc);
    let (v, w) = (vb * denom, vc * denom);
    at([a[0] + ab[0] * v + ac[0] * w, a[1] + ab[1] * v + ac[1] * w, a[2] + ab[2] * v + ac[2] * w])
}

#[cfg(test)]
mod tests {
    use super::*;

    fn front(n: usize) -> FluidFront {
        // A chain of n edges on nodes 0..=n.
        let facets: Vec<Facet> = (0..n).map(|i| Facet { nodes: vec![i, i + 1], corners: 2 }).collect();
        let neighbours = neighbours(&facets, 2, n + 1);
        FluidFront { name: "f".into(), facets, neighbours, source: 0, start: 0.0, end: 1.0, ramp: Ramp::Linear, wetted: vec![false; n] }
    }

    #[test]
    fn flood_stops_at_the_first_corner_pressed_harder_than_the_fluid() {
        let f = front(6);
        // Node 3 pressed at 2.0: edges 2 (nodes 2–3) and 3 (3–4) stay dry, and so does all beyond.
        let contact = [0.0, 0.0, 0.5, 2.0, 0.0, 0.0, 0.0];
        assert_eq!(flood(&f, &contact, 1.0), [true, true, false, false, false, false]);
        // Above the contact pressure, the fluid passes.
        assert_eq!(flood(&f, &contact, 2.5), [true; 6]);
        // No pressure, no wetting.
        assert_eq!(flood(&f, &[0.0; 7], 0.0), [false; 6]);
    }

    fn chain_fluids(n: usize) -> Fluids {
        let mut f = front(n);
        f.start = 1.0;
        let committed = vec![vec![false; n]];
        Fluids { fluids: vec![f], dim: 2, analysis: None, committed, seen: Vec::new(), grow_only: false }
    }

    // The front follows the contact both ways (one criterion for wetting
    // and drying), and an oscillation settles on the union of its cycle
    // whenever it starts: the result does not hang on a count of updates.
    #[test]
    fn the_front_wets_and_dries_and_a_cycle_settles_on_its_union() {
        let (open, tight) = ([0.0; 7], [0.0, 0.0, 2.0, 0.0, 0.0, 0.0, 0.0]);
        let wet = |f: &Fluids| f.fluids[0].wetted.clone();
        let mut f = chain_fluids(6);
        f.begin_increment();
        assert!(f.update_front(&open, 1.0));
        assert_eq!(wet(&f), [true; 6]);
        // Node 2 pressed tight: the front dries back to the first edge.
        assert!(f.update_front(&tight, 1.0));
        assert_eq!(wet(&f), [true, false, false, false, false, false]);
        // Open again: the set met before closes a cycle, settled on the union.
        assert!(f.update_front(&open, 1.0) && wet(&f) == [true; 6]);
        assert!(!f.update_front(&tight, 1.0) && wet(&f) == [true; 6], "after a cycle the front only grows");
        // The same cycle met after more updates settles on the same set.
        let mut g = chain_fluids(6);
        g.begin_increment();
        let half = [0.0, 0.0, 0.0, 0.0, 2.0, 0.0, 0.0];
        for contact in [&half, &tight, &half, &open, &tight, &open] {
            g.update_front(contact, 1.0);
        }
        assert_eq!(wet(&g), [true; 6]);
        // The next increment starts from the converged front.
        g.commit();
        g.begin_increment();
        assert_eq!(wet(&g), [true; 6]);
        assert!(g.update_front(&tight, 1.0));
        assert_eq!(wet(&g), [true, false, false, false, false, false]);
        assert_eq!(g.updates(), 1);
    }

    #[test]
    fn quad_faces_connect_through_edges_not_corners() {
        // Three unit squares in a row plus one touching only at a corner.
        let facets = [[0, 1, 5, 4], [1, 2, 6, 5], [2, 3, 7, 6], [7, 8, 9, 10]].map(|n| Facet { nodes: n.to_vec(), corners: 4 });
        let nb = neighbours(&facets, 3, 11);
        assert_eq!(nb[0], [1]);
        assert_eq!(nb[1], [0, 2]);
        assert_eq!(nb[3], Vec::<usize>::new());
    }

    fn two_squares(source: [f64; 3], interior_only: bool) -> Result<Fluids, FluidError> {
        use crate::material::{registry, VolumetricForm};
        use crate::model::{Fluid, Formulation, Model};
        use olli_mesh::{ElementKind, Mesh};
        let mut mesh = Mesh::new(2);
        for p in [[0.0, 0.0], [1.0, 0.0], [2.0, 0.0], [0.0, 1.0], [1.0, 1.0], [2.0, 1.0]] {
            mesh.add_node([p[0], p[1], 0.0]);
        }
        mesh.add_element(ElementKind::Quad4, &[0, 1, 4, 3]);
        mesh.add_element(ElementKind::Quad4, &[1, 2, 5, 4]);
        // Side 1 of the first square (nodes 1–4) is shared with the second; side 2 (4–3) is on top.
        let mut sides = vec![Side { element: 0, local: 1 }];
        if !interior_only {
            sides.push(Side { element: 0, local: 2 });
        }
        mesh.side_sets.insert("wet".into(), sides);
        let mat = registry::material("neo-hookean", &[("shear_modulus", 1.0), ("bulk_modulus", 100.0)], VolumetricForm::Quadratic).unwrap();
        let mut model = Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, std::sync::Arc::new(mat), Formulation::Mixed);
        model.fluids.push(Fluid { name: "oil".into(), sides: "wet".into(), source });
        let disc = Discretization::new(&model).unwrap();
        Fluids::new(&disc)
    }

    #[test]
    fn a_set_without_free_facets_or_a_source_off_the_set_is_refused() {
        let e = two_squares([1.0, 0.5, 0.0], true).unwrap_err();
        assert!(e.to_string().contains("has no free facet"), "{e}");
        let e = two_squares([0.5, 0.5, 0.0], false).unwrap_err();
        assert!(e.to_string().contains("source point (0.5, 0.5) is not on side set `wet`"), "{e}");
        // On the free top side: accepted, and the interior side is left out.
        let f = two_squares([0.5, 1.0, 0.0], false).unwrap();
        assert_eq!(f.facet_count(), 1);
    }

    #[test]
    fn distances_to_facets() {
        let seg = [[0.0, 0.0, 0.0], [2.0, 0.0, 0.0]];
        assert!((distance_to_facet(&seg, [1.0, 0.5, 0.0]) - 0.5).abs() < 1e-15);
        assert!((distance_to_facet(&seg, [3.0, 0.0, 0.0]) - 1.0).abs() < 1e-15);
        let quad = [[0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [1.0, 1.0, 0.0], [0.0, 1.0, 0.0]];
        assert!((distance_to_facet(&quad, [0.3, 0.8, 0.2]) - 0.2).abs() < 1e-15);
        assert!((distance_to_facet(&quad, [2.0, 0.5, 0.0]) - 1.0).abs() < 1e-15);
        let tri = [[0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, 1.0, 0.0]];
        assert!((distance_to_facet(&tri, [0.8, 0.8, 0.0]) - 0.6 / 2f64.sqrt()).abs() < 1e-15);
    }

    /// A fluid at pressure `p` on the "top" side set of a one-element
    /// quadratic mesh (quad8 in plane strain, thickness 1, or hex20), wetted
    /// from the set's centre, with every dof free.
    fn quadratic_fluid(analysis: Analysis, p: f64) -> (olli_mesh::Mesh, Fluids) {
        use crate::material::{registry, VolumetricForm};
        use crate::model::{Fluid, FluidPressure, Formulation, Model};
        use olli_mesh::generate::{block, rectangle, BlockParams, Order, RectangleParams};
        let (mesh, source) = if analysis == Analysis::Solid3d {
            let params = BlockParams { size: [2.0, 1.5, 1.0], divisions: [1, 1, 1], order: Order::Quadratic, ..Default::default() };
            (block(&params).unwrap(), [1.0, 0.75, 1.0])
        } else {
            let params = RectangleParams { size: [2.0, 1.0], divisions: [1, 1], order: Order::Quadratic, ..Default::default() };
            (rectangle(&params).unwrap(), [1.0, 1.0, 0.0])
        };
        let mat = registry::material("neo-hookean", &[("shear_modulus", 1.0), ("bulk_modulus", 100.0)], VolumetricForm::Quadratic).unwrap();
        let mut model = Model::single_region(mesh.clone(), analysis, std::sync::Arc::new(mat), Formulation::Mixed);
        model.fluids.push(Fluid { name: "oil".into(), sides: "top".into(), source });
        model.stages.push(Stage { fluid_pressures: vec![FluidPressure { fluid: "oil".into(), value: p }], ..Default::default() });
        let disc = Discretization::new(&model).unwrap();
        let mut fluids = Fluids::new(&disc).unwrap();
        fluids.begin_stage(&model.stages[0]);
        fluids.begin_increment();
        fluids.update_front(&vec![0.0; mesh.node_count()], 1.0);
        (mesh, fluids)
    }

    /// The fluid's external force at `u`, and (if asked) its tangent
    /// `−∂f/∂u` as a dense matrix (symmetric part and skew part).
    fn fluid_system(mesh: &olli_mesh::Mesh, fluids: &Fluids, u: &[f64], want_k: bool) -> (Vec<f64>, Vec<f64>) {
        use crate::assembly::{DofMap, Pattern};
        let model = crate::model::Model::single_region(
            mesh.clone(),
            fluids.analysis.unwrap(),
            std::sync::Arc::new(
                crate::material::registry::material(
                    "neo-hookean",
                    &[("shear_modulus", 1.0), ("bulk_modulus", 100.0)],
                    crate::material::VolumetricForm::Quadratic,
                )
                .unwrap(),
            ),
            crate::model::Formulation::Mixed,
        );
        let disc = Discretization::new(&model).unwrap();
        let n = u.len();
        let dofs = DofMap::new(fluids.dim, &vec![false; n]);
        let pattern = Pattern::build(&disc, &dofs).unwrap();
        let (mut external, mut values, mut skew) = (vec![0.0; n], vec![0.0; pattern.nnz()], Vec::new());
        let mut system = GlobalSystem {
            dofs: &dofs,
            pattern: &pattern,
            external: &mut external,
            tangent: if want_k { Some(&mut values) } else { None },
            skew: Some(&mut skew),
            predictor: None,
        };
        fluids.add_loads(&mesh.nodes, u, 1.0, &mut system);
        let mut dense = vec![0.0; n * n];
        let mut at_slot = vec![(0, 0); pattern.nnz()];
        for c in 0..n {
            for r in c..n {
                if let Some(slot) = pattern.slot(r, c) {
                    dense[r * n + c] = values[slot];
                    dense[c * n + r] = values[slot];
                    at_slot[slot] = (r, c);
                }
            }
        }
        for (slot, w) in skew {
            let (r, c) = at_slot[slot];
            dense[r * n + c] += w;
            dense[c * n + r] -= w;
        }
        (external, dense)
    }

    /// Quadratic facets carry the fluid on every node: on an undeformed
    /// line3 edge of length L the consistent loads pL/6, pL/6, 2pL/3 (Simpson's
    /// rule), on a flat quad8 face −pA/12 at the corners and pA/3 at the
    /// mid-side nodes (Zienkiewicz & Taylor, *The Finite Element Method*,
    /// vol. 1, equivalent nodal forces of quadratic elements under uniform
    /// load; from memory, and each set sums to pA); and the follower
    /// tangent, skew part included, equals central differences of the force.
    #[test]
    fn quadratic_facets_take_consistent_loads_and_their_exact_tangent() {
        let p = 1.5;
        for analysis in [Analysis::PlaneStrain { thickness: 1.0 }, Analysis::Solid3d] {
            let (mesh, fluids) = quadratic_fluid(analysis, p);
            let dim = fluids.dim;
            let n = mesh.node_count() * dim;
            let (force, _) = fluid_system(&mesh, &fluids, &vec![0.0; n], false);
            let top = &fluids.fluids[0].facets[0];
            let area = if dim == 3 { 2.0 * 1.5 } else { 2.0 };
            let normal = dim - 1;
            for (a, &node) in top.nodes.iter().enumerate() {
                let corner = a < top.corners;
                let share = match (dim, corner) {
                    (2, true) => 1.0 / 6.0,
                    (2, false) => 2.0 / 3.0,
                    (_, true) => -1.0 / 12.0,
                    (_, false) => 1.0 / 3.0,
                };
                let got = force[node * dim + normal];
                assert!((got + p * area * share).abs() < 1e-12, "{analysis:?} node {a}: {got} vs {}", -p * area * share);
            }
            let total: f64 = (0..mesh.node_count()).map(|k| force[k * dim + normal]).sum();
            assert!((total + p * area).abs() < 1e-12, "{analysis:?}: total {total}");
            // Wetted measure: the undeformed top side.
            let summary = &fluids.summaries(&mesh.nodes, &vec![0.0; n], 1.0)[0];
            assert!((summary.wetted_measure - area).abs() < 1e-12 && summary.wetted_facets == 1);
            // The tangent at a deformed state against central differences.
            let u: Vec<f64> = (0..n).map(|d| 0.04 * ((d * 7 % 11) as f64 - 5.0) / 5.0).collect();
            let (_, k) = fluid_system(&mesh, &fluids, &u, true);
            let kmax = k.iter().fold(0.0f64, |m, v| m.max(v.abs()));
            assert!(kmax > 0.0);
            let h = 1e-6;
            for c in 0..n {
                let (mut up, mut um) = (u.clone(), u.clone());
                up[c] += h;
                um[c] -= h;
                let (fp, _) = fluid_system(&mesh, &fluids, &up, false);
                let (fm, _) = fluid_system(&mesh, &fluids, &um, false);
                for r in 0..n {
                    let fd = -(fp[r] - fm[r]) / (2.0 * h);
                    assert!((fd - k[r * n + c]).abs() <= 1e-6 * kmax, "{analysis:?} K[{r},{c}] = {} vs {fd}", k[r * n + c]);
                }
            }
        }
    }
}
