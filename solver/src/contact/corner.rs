//! Convex corners of a rigid 2-D profile against the rubber's surface edges.
//!
//! Node contact ([`super::law`]) keeps the rubber's nodes out of the metal,
//! but not the metal out of the rubber's edges: where a profile turns toward
//! the rubber (the edge of a seal gland at its clearance gap, sharp or with a
//! fillet), a rubber edge whose nodes sit on either side of it can pass
//! straight through the corner. Here each convex corner (a sharp corner, or
//! the circle of a convex fillet) is kept out of every edge it could enter:
//! the point of the corner deepest in the edge's line, `q = c − R n` (centre
//! c, radius R, edge normal n pointing out of the rubber), has the signed gap
//!
//! ```text
//! g = (c − x_a)·n − R,   n = J (x_b − x_a) / L,   ξ = (c − x_a)·(x_b − x_a) / L²
//! ```
//!
//! checked where ξ ∈ [0, 1], −L < g (the edge itself, not one across the
//! part) and −n lies in the corner's cone of outward normals (otherwise a
//! flat piece beside the corner is deeper, and the edge's nodes see it). The
//! contact force is N = max(0, λ − k g) (k ten times the nodes' penalty,
//! rounded near 0 like the node law), frictionless: the nodes get
//! `W N ∂g/∂x` (the edge's linear shape functions at ξ times −n), with a
//! weight W that fades the corner out near the edge's ends and the cone's
//! edges, where node contact takes over; the tangent is consistent
//! (checked against finite differences below) and symmetric where W = 1.
//! λ is a multiplier per corner and edge, moved
//! to N by the same augmented-Lagrangian updates as the nodes'. This is
//! two-pass node-to-segment contact with the rigid corner as the "slave"
//! point (Zavarise & De Lorenzis 2009, "The node-to-segment algorithm for
//! 2D frictionless contact: classical formulation and special cases",
//! Comput. Methods Appl. Mech. Engrg. 198, 3428–3451; from memory).

use std::collections::BTreeMap;

use nalgebra::{Matrix2, Matrix4, Vector2, Vector3, Vector4};
use olli_mesh::{Mesh, Side};

use super::law::smoothed_pressure;
use super::surface::{Piece2, RigidSurface, Shape};

/// One convex corner of a profile, in the surface's own frame.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Corner {
    /// Sharp corner point, or the centre of a convex fillet.
    pub center: Vector2<f64>,
    /// 0 for a sharp corner, else the fillet radius.
    pub radius: f64,
    /// Cone of outward normals (toward the rubber), counter-clockwise from
    /// `from` to `to` (radians, `to ≥ from`).
    pub from: f64,
    /// End of the cone (radians).
    pub to: f64,
}

/// The convex corners of a profile whose rubber lies on its left: fillets
/// travelled clockwise (arcs between two other pieces) and sharp right
/// turns between two segments.
pub fn convex_corners(shape: &Shape) -> Vec<Corner> {
    let Shape::Profile(pieces) = shape else { return Vec::new() };
    let mut out = Vec::new();
    for (i, piece) in pieces.iter().enumerate() {
        match *piece {
            // A fillet between two pieces; a free-standing arc (a roller, an
            // indenter) is smooth at the scale of the elements: node contact.
            Piece2::Arc { center, radius, start, end } if end < start && i > 0 && i + 1 < pieces.len() => {
                out.push(Corner { center: Vector2::from(center), radius, from: end, to: start });
            }
            Piece2::Segment { a, b } => {
                let Some(Piece2::Segment { a: a2, b: b2 }) = pieces.get(i + 1) else { continue };
                let (d_in, d_out) = (Vector2::from(b) - Vector2::from(a), Vector2::from(*b2) - Vector2::from(*a2));
                let turn = d_in.x * d_out.y - d_in.y * d_out.x;
                if turn < 0.0 {
                    // Left normals of the two segments bound the cone, clockwise from in to out.
                    let angle = |d: Vector2<f64>| (d.x).atan2(-d.y);
                    let (to, mut from) = (angle(d_in), angle(d_out));
                    while from > to {
                        from -= std::f64::consts::TAU;
                    }
                    out.push(Corner { center: Vector2::from(b), radius: 0.0, from, to });
                }
            }
            _ => {}
        }
    }
    out
}

/// One rubber surface edge: mesh nodes with the rubber on the left of a → b.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Edge {
    a: usize,
    b: usize,
}

/// A corner pressing into an edge at one evaluation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CornerHit {
    /// Index of the corner and of the edge.
    pub corner: usize,
    /// Index of the edge.
    pub edge: usize,
    /// Mesh nodes of the edge.
    pub nodes: [usize; 2],
    /// Position of the contact point along the edge (0 at `nodes[0]`).
    pub xi: f64,
    /// Signed gap (< 0: the corner is inside the rubber).
    pub gap: f64,
    /// Current edge length.
    pub length: f64,
    /// Contact force W N (≥ 0, force units of the analysis: whole ring in axisymmetry).
    pub force: f64,
    /// N, the force before the fade (the next multiplier).
    pub multiplier_force: f64,
    /// Fade weight W ∈ (0, 1] (1 away from the edge's ends and the cone's edges).
    pub weight: f64,
    /// Force on each node, global frame (x, y of a then b).
    pub nodal_force: Vector4<f64>,
    /// Tangent −∂(nodal force)/∂(x_a, x_b), global frame (symmetric).
    pub stiffness: Matrix4<f64>,
}

/// The corners of one rigid profile against the edges of one side set.
#[derive(Debug, Clone, Default)]
pub struct CornerContacts {
    corners: Vec<Corner>,
    edges: Vec<Edge>,
    /// Corner penalty per unit ring length or thickness: k = this × 2π r (axisymmetric) or × thickness.
    line_penalty: f64,
    axisymmetric: bool,
    thickness: f64,
    /// Multiplier per (corner, edge): current and at the last converged increment.
    multipliers: BTreeMap<(usize, usize), f64>,
    committed: BTreeMap<(usize, usize), f64>,
    /// Hits of the last evaluation.
    pub hits: Vec<CornerHit>,
}

impl CornerContacts {
    /// Corners of `shape` against the edges of `sides` (2-D meshes; none
    /// otherwise). `line_penalty` is the nodes' normal penalty per unit
    /// length of ring or thickness (the node law's ε times the local side
    /// size; the corners take [`CORNER_PENALTY_RATIO`] times it);
    /// `thickness` is `None` in axisymmetry, else the plane-strain thickness.
    pub fn new(mesh: &Mesh, sides: &[Side], shape: &Shape, line_penalty: f64, thickness: Option<f64>) -> Self {
        let corners = if mesh.dimension == 2 { convex_corners(shape) } else { Vec::new() };
        let mut edges = Vec::new();
        if !corners.is_empty() {
            for &s in sides {
                let n = mesh.side_nodes(s);
                // Counter-clockwise elements: the rubber lies left of side a → b.
                match n.len() {
                    3 => edges.extend([Edge { a: n[0], b: n[2] }, Edge { a: n[2], b: n[1] }]),
                    _ => edges.push(Edge { a: n[0], b: n[1] }),
                }
            }
        }
        CornerContacts {
            corners,
            edges,
            line_penalty: CORNER_PENALTY_RATIO * line_penalty,
            axisymmetric: thickness.is_none(),
            thickness: thickness.unwrap_or(1.0),
            multipliers: BTreeMap::new(),
            committed: BTreeMap::new(),
            hits: Vec::new(),
        }
    }

    /// Whether the profile has no convex corner.
    pub fn is_empty(&self) -> bool {
        self.corners.is_empty()
    }

    /// Evaluates every corner against every edge at the current positions.
    pub fn evaluate(&mut self, surface: &RigidSurface, position: impl Fn(usize) -> Vector3<f64>) {
        self.hits.clear();
        if self.corners.is_empty() {
            return;
        }
        let rot = surface.placement.rotation.matrix();
        let r2 = Matrix2::new(rot[(0, 0)], rot[(0, 1)], rot[(1, 0)], rot[(1, 1)]);
        let mut r4 = Matrix4::zeros();
        r4.fixed_view_mut::<2, 2>(0, 0).copy_from(&r2);
        r4.fixed_view_mut::<2, 2>(2, 2).copy_from(&r2);
        let local = |n: usize| {
            let x = surface.placement.to_local(&position(n));
            Vector2::new(x.x, x.y)
        };
        for (ci, c) in self.corners.iter().enumerate() {
            let placed = surface.placement.apply(&Vector3::new(c.center.x, c.center.y, 0.0));
            let ring = if self.axisymmetric { std::f64::consts::TAU * placed.x.abs() } else { self.thickness };
            let k = self.line_penalty * ring;
            for (ei, e) in self.edges.iter().enumerate() {
                let (a, b) = (local(e.a), local(e.b));
                let lambda = self.multipliers.get(&(ci, ei)).copied().unwrap_or(0.0);
                let Some(hit) = edge_contact(c, a, b, k, lambda) else { continue };
                self.hits.push(CornerHit {
                    corner: ci,
                    edge: ei,
                    nodes: [e.a, e.b],
                    xi: hit.xi,
                    gap: hit.gap,
                    length: hit.length,
                    multiplier_force: hit.normal_force,
                    weight: hit.weight,
                    force: hit.normal_force * hit.weight,
                    nodal_force: r4 * hit.force,
                    stiffness: r4 * hit.stiffness * r4.transpose(),
                });
            }
        }
    }

    /// Whether some corner is deeper in an edge than `fraction` of its length.
    pub fn worst_penetration(&self, fraction: f64) -> (f64, f64) {
        let mut worst = (0.0, 0.0, 0.0);
        for h in &self.hits {
            // A faded corner hands the penetration to the node contact.
            let (pen, tol) = (-h.gap * h.weight, fraction * h.length);
            if pen / tol > worst.0 {
                worst = (pen / tol, pen, tol);
            }
        }
        (worst.1, worst.2)
    }

    /// Augmented-Lagrangian update: each multiplier becomes its current force.
    pub fn augment(&mut self) {
        self.multipliers = self.hits.iter().filter(|h| h.force > 0.0).map(|h| ((h.corner, h.edge), h.multiplier_force)).collect();
    }

    /// Keeps the multipliers of a converged increment.
    pub fn commit(&mut self) {
        self.augment();
        self.committed = self.multipliers.clone();
    }

    /// Returns to the multipliers of the last converged increment.
    pub fn restore(&mut self) {
        self.multipliers = self.committed.clone();
    }
}

/// Corner penalty as a multiple of the nodes' (ε h per unit ring length or
/// thickness): a corner carries the load of a whole edge on one point. With
/// the nodes' value itself, the augmentation of corner and node multipliers
/// grew without bound on an O-ring pressed into a 0.1 mm gap at 9.5 MPa;
/// with ten times it the same job reaches 10 MPa (measured).
pub const CORNER_PENALTY_RATIO: f64 = 10.0;

/// Fraction of the edge, from each end, over which a corner's force fades
/// out (node contact takes over at the nodes).
pub const END_FADE: f64 = 0.25;

/// Angle (radians) over which a corner's force fades out at the edges of its
/// cone of normals (15°; at most a quarter of the cone), where the edge lies
/// along a flat piece beside the corner and node contact takes over.
pub const CONE_FADE: f64 = 0.26;

/// 0 below 0, 1 above 1, `3u² − 2u³` between; and its derivative.
fn smoothstep(u: f64) -> (f64, f64) {
    if u <= 0.0 {
        (0.0, 0.0)
    } else if u >= 1.0 {
        (1.0, 0.0)
    } else {
        (u * u * (3.0 - 2.0 * u), 6.0 * u * (1.0 - u))
    }
}

/// What one corner does to one edge (surface frame).
#[derive(Debug, Clone, Copy, PartialEq)]
struct EdgeContact {
    /// Force on (x_a, x_b).
    force: Vector4<f64>,
    /// −∂force/∂(x_a, x_b).
    stiffness: Matrix4<f64>,
    xi: f64,
    gap: f64,
    /// N before the fade, and the fade weight W.
    normal_force: f64,
    weight: f64,
    length: f64,
}

/// One corner against one edge; `None` when not touching. The force is
/// `W N ∇g` with the fade weight `W = w(ξ) w(φ)` (ξ along the edge, φ the
/// direction −n within the corner's cone), so the corner hands over to the
/// node contact continuously at the edge's ends and at the cone's edges:
/// `−∂f/∂x = W k N′ ∇g⊗∇g − W N ∇²g − N ∇g⊗∇W` (not symmetric where W varies).
fn edge_contact(c: &Corner, a: Vector2<f64>, b: Vector2<f64>, k: f64, lambda: f64) -> Option<EdgeContact> {
    let t = b - a;
    let length = t.norm();
    if length <= 0.0 {
        return None;
    }
    let e = t / length;
    let n = Vector2::new(e.y, -e.x);
    let d = c.center - a;
    let xi = d.dot(&t) / (length * length);
    if !(0.0..=1.0).contains(&xi) {
        return None;
    }
    let h = d.dot(&n);
    let gap = h - c.radius;
    let phi = cone_position(-n, c)?;
    if gap <= -length {
        return None;
    }
    let smoothing = super::pair::SMOOTHING_FRACTION * k * length;
    let (normal_force, slope) = smoothed_pressure(lambda - k * gap, smoothing);
    if normal_force <= 0.0 {
        return None;
    }
    // Fade weights and their gradients: ∇ξ = [(−d + (2ξ − 1) t); (d − 2ξ t)] / L², ∇φ = [n; −n] / L.
    let (wa, dwa) = smoothstep(xi / END_FADE);
    let (wb, dwb) = smoothstep((1.0 - xi) / END_FADE);
    let width = c.to - c.from;
    let fade = CONE_FADE.min(0.25 * width);
    let (va, dva) = if fade > 0.0 { smoothstep(phi / fade) } else { (1.0, 0.0) };
    let (vb, dvb) = if fade > 0.0 { smoothstep((width - phi) / fade) } else { (1.0, 0.0) };
    let weight = wa * wb * va * vb;
    if weight <= 0.0 {
        return None;
    }
    let dw_dxi = (dwa * wb - wa * dwb) / END_FADE * va * vb;
    let dw_dphi = if fade > 0.0 { (dva * vb - va * dvb) / fade * wa * wb } else { 0.0 };
    let l2 = length * length;
    let (gxa, gxb) = ((-d + t * (2.0 * xi - 1.0)) / l2, (d - t * (2.0 * xi)) / l2);
    let (gpa, gpb) = (n / length, -n / length);
    let grad_w = Vector4::new(
        dw_dxi * gxa.x + dw_dphi * gpa.x,
        dw_dxi * gxa.y + dw_dphi * gpa.y,
        dw_dxi * gxb.x + dw_dphi * gpb.x,
        dw_dxi * gxb.y + dw_dphi * gpb.y,
    );
    // ∇g = −[(1 − ξ) n; ξ n].
    let grad = Vector4::new(-(1.0 - xi) * n.x, -(1.0 - xi) * n.y, -xi * n.x, -xi * n.y);
    let hess = gap_hessian(n, e, xi, h, length);
    let stiffness = (grad * grad.transpose() * (k * slope) - hess * normal_force) * weight - grad * grad_w.transpose() * normal_force;
    Some(EdgeContact { force: grad * (weight * normal_force), stiffness, xi, gap, normal_force, weight, length })
}

/// ∇²g over (x_a, x_b): with d = c − x_a and t = x_b − x_a,
/// g_dt = (J − n⊗e)/L and g_tt = ξ (n⊗e + e⊗n)/L − h n⊗n/L²; then
/// H_aa = g_dt + g_dtᵀ + g_tt, H_ab = −g_dt − g_tt, H_bb = g_tt.
fn gap_hessian(n: Vector2<f64>, e: Vector2<f64>, xi: f64, h: f64, length: f64) -> Matrix4<f64> {
    let j = Matrix2::new(0.0, 1.0, -1.0, 0.0);
    let g_dt = (j - n * e.transpose()) / length;
    let g_tt = (n * e.transpose() + e * n.transpose()) * (xi / length) - n * n.transpose() * (h / (length * length));
    let mut hm = Matrix4::zeros();
    hm.fixed_view_mut::<2, 2>(0, 0).copy_from(&(g_dt + g_dt.transpose() + g_tt));
    let ab = -g_dt - g_tt;
    hm.fixed_view_mut::<2, 2>(0, 2).copy_from(&ab);
    hm.fixed_view_mut::<2, 2>(2, 0).copy_from(&ab.transpose());
    hm.fixed_view_mut::<2, 2>(2, 2).copy_from(&g_tt);
    hm
}

/// Angle of direction `v` from the start of the corner's cone of normals,
/// if it lies in it.
fn cone_position(v: Vector2<f64>, c: &Corner) -> Option<f64> {
    let angle = v.y.atan2(v.x);
    let from_start = (angle - c.from).rem_euclid(std::f64::consts::TAU);
    (from_start <= c.to - c.from + 1e-12).then_some(from_start)
}

/// Whether direction `v` lies in the corner's cone of outward normals.
#[cfg(test)]
fn in_cone(v: Vector2<f64>, c: &Corner) -> bool {
    cone_position(v, c).is_some()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::rigid_surface::filleted_polyline;

    fn gap_of(c: &Corner, x: &Vector4<f64>) -> f64 {
        let (a, b) = (Vector2::new(x[0], x[1]), Vector2::new(x[2], x[3]));
        let t = b - a;
        let n = Vector2::new(t.y, -t.x) / t.norm();
        (c.center - a).dot(&n) - c.radius
    }

    fn contact_at(c: &Corner, x: &Vector4<f64>, k: f64, lambda: f64) -> EdgeContact {
        edge_contact(c, Vector2::new(x[0], x[1]), Vector2::new(x[2], x[3]), k, lambda).expect("touching")
    }

    // The force is W N ∇g with ∇g the gradient of the gap (central
    // differences) and the tangent the derivative of the force, for a
    // fillet and a sharp corner, with and without a multiplier, in the
    // middle of an edge (W = 1) and where the force fades (near an end of
    // the edge, near the edge of the cone of normals).
    #[test]
    fn corner_force_and_tangent_match_finite_differences() {
        let wide = (-3.0, 3.0);
        // Cone of normals from −150° to −90°: −n of the edge below is at −95.7°, near its upper edge.
        let narrow = ((-150f64).to_radians(), (-90f64).to_radians());
        let cases = [
            (Corner { center: Vector2::new(0.5, 0.27), radius: 0.25, from: wide.0, to: wide.1 }, true),
            (Corner { center: Vector2::new(0.45, 0.03), radius: 0.0, from: wide.0, to: wide.1 }, true),
            (Corner { center: Vector2::new(0.9, 0.0), radius: 0.0, from: wide.0, to: wide.1 }, false),
            (Corner { center: Vector2::new(0.5, 0.27), radius: 0.25, from: narrow.0, to: narrow.1 }, false),
        ];
        // Edge from (1, 0) to (0, 0.1): rubber below-left, outward normal up-right.
        let x0 = Vector4::new(1.0, 0.0, 0.0, 0.1);
        let h = 1e-6;
        for (c, full) in &cases {
            for lambda in [0.0, 0.7] {
                let k = 40.0;
                let hit = contact_at(c, &x0, k, lambda);
                assert!(hit.gap < 0.0 && (0.0..=1.0).contains(&hit.xi));
                assert_eq!(hit.weight == 1.0, *full, "weight {} at ξ = {}", hit.weight, hit.xi);
                for i in 0..4 {
                    let (mut xp, mut xm) = (x0, x0);
                    xp[i] += h;
                    xm[i] -= h;
                    let dg = (gap_of(c, &xp) - gap_of(c, &xm)) / (2.0 * h);
                    let expected = hit.weight * hit.normal_force * dg;
                    assert!((expected - hit.force[i]).abs() < 1e-7 * (1.0 + hit.force.norm()), "force {i}: {expected} vs {}", hit.force[i]);
                    let column = -(contact_at(c, &xp, k, lambda).force - contact_at(c, &xm, k, lambda).force) / (2.0 * h);
                    for r in 0..4 {
                        let kk = hit.stiffness;
                        assert!(
                            (column[r] - kk[(r, i)]).abs() < 1e-5 * (1.0 + kk.norm()),
                            "tangent ({r}, {i}): {} vs {}",
                            column[r],
                            kk[(r, i)]
                        );
                    }
                }
                if *full {
                    assert!((hit.stiffness - hit.stiffness.transpose()).norm() < 1e-12 * hit.stiffness.norm());
                }
            }
        }
    }

    // The gland of a piston seal: a groove whose edges at the clearance gap
    // are convex toward the rubber; the groove's own bottom corners are not.
    #[test]
    fn convex_corners_of_a_gland_are_its_gap_edges() {
        let pts = [[16.9, -1.5], [16.9, 0.0], [15.0, 0.0], [15.0, 3.6], [16.9, 3.6], [16.9, 5.1]];
        let shape = Shape::Profile(filleted_polyline(&pts, 0.2).unwrap()).facing([16.0, 1.8, 0.0]);
        let corners = convex_corners(&shape);
        assert_eq!(corners.len(), 2);
        let mut centres: Vec<[f64; 2]> = corners.iter().map(|c| [c.center.x, c.center.y]).collect();
        centres.sort_by(|a, b| a[1].total_cmp(&b[1]));
        assert!((centres[0][0] - 16.7).abs() < 1e-12 && (centres[0][1] + 0.2).abs() < 1e-12, "{centres:?}");
        assert!((centres[1][0] - 16.7).abs() < 1e-12 && (centres[1][1] - 3.8).abs() < 1e-12, "{centres:?}");
        // The lower corner's normals run from the gap side (+r) to the groove side (+z).
        let lower = corners.iter().find(|c| c.center.y < 0.0).unwrap();
        assert!(in_cone(Vector2::new(1.0, 0.0), lower) && in_cone(Vector2::new(0.0, 1.0), lower));
        assert!(in_cone(Vector2::new(1.0, 1.0).normalize(), lower) && !in_cone(Vector2::new(-1.0, 0.0), lower));
        // A free-standing arc (a roller) is no corner.
        let roller = Shape::Profile(vec![Piece2::Arc { center: [0.0, 3.0], radius: 3.0, start: -0.5, end: -2.5 }]);
        assert!(convex_corners(&roller).is_empty());
        // Sharp: the same corners without fillets.
        let sharp = Shape::Profile(filleted_polyline(&pts, 0.0).unwrap()).facing([16.0, 1.8, 0.0]);
        let corners = convex_corners(&sharp);
        assert_eq!(corners.len(), 2);
        let lower = corners.iter().find(|c| c.center.y < 1.0).unwrap();
        assert_eq!((lower.center.x, lower.center.y, lower.radius), (16.9, 0.0, 0.0));
        assert!(in_cone(Vector2::new(1.0, 1.0).normalize(), lower) && !in_cone(Vector2::new(1.0, -0.1).normalize(), lower));
    }
}
