//! Seal figures of a converged increment that belong to no single load or
//! contact pair: a gland's fill and squeeze (2-D) and the rubber's
//! extrusion past the edge of a clearance gap.
//!
//! Gland fill is the rubber's section area over the gland's free area, in
//! percent; squeeze is how much of the rubber's free height across the
//! gland the gland's depth takes away, in percent (both common practice for
//! seal glands). The gland's free area is the region enclosed by the groove
//! profile (segments and fillet arcs, integrated exactly) and the straight
//! line between the closing surface's points nearest to the profile's two
//! ends; a profile that runs on along a clearance gap adds the gap's area.
//! The gland's depth is the largest distance of the profile from the
//! closing surface (its bottom); the rubber's free height is the extent of
//! the undeformed section along the closing surface's normal there.

use nalgebra::Vector3;
use olli_mesh::Mesh;

use crate::contact::active::ActiveContacts;
use crate::contact::surface::{Piece2, RigidSurface, Shape};
use crate::model::{ExtrusionGap, Gland};
use crate::results::{ExtrusionSummary, GlandSummary};

/// Figures of every gland of the model at displaced nodes `x`.
pub fn glands(glands: &[Gland], mesh: &Mesh, x: &[Vector3<f64>], contacts: &ActiveContacts) -> Vec<GlandSummary> {
    if glands.is_empty() {
        return Vec::new();
    }
    let rubber_area = section_area(mesh, x);
    glands
        .iter()
        .filter_map(|g| {
            let groove = contacts.surface(&g.groove)?;
            let closing = contacts.surface(&g.closed_by)?;
            let Shape::Profile(pieces) = &groove.shape else { return None };
            let free_area = free_area(pieces, groove, closing);
            let (depth, normal) = depth(pieces, groove, closing)?;
            let along = mesh.nodes.iter().map(|p| Vector3::from(*p).dot(&normal));
            let (lo, hi) = along.fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| (lo.min(v), hi.max(v)));
            let height = hi - lo;
            Some(GlandSummary {
                name: g.name.clone(),
                fill: if free_area > 0.0 { 100.0 * rubber_area / free_area } else { f64::INFINITY },
                squeeze: if height > 0.0 { 100.0 * (height - depth) / height } else { 0.0 },
                rubber_area,
                free_area,
                depth,
            })
        })
        .collect()
}

/// Current section area of a 2-D mesh: each element's ½∮(x dy − y dx)
/// over its sides, exact for straight and for parabolic (line3) sides.
pub fn section_area(mesh: &Mesh, x: &[Vector3<f64>]) -> f64 {
    let cross = |a: Vector3<f64>, b: Vector3<f64>| a.x * b.y - a.y * b.x;
    let mut area = 0.0;
    for e in 0..mesh.element_count() {
        let kind = mesh.kinds[e];
        let nodes = mesh.element_nodes(e);
        for side in kind.sides() {
            let (a, b) = (x[nodes[side[0]]], x[nodes[side[1]]]);
            area += 0.5 * cross(a, b);
            if let Some(&m) = side.get(2) {
                // A parabola through a, m, b bulges (2/3)·chord·height past its chord.
                area -= 2.0 / 3.0 * cross(b - a, x[nodes[m]] - 0.5 * (a + b));
            }
        }
    }
    area.abs()
}

/// ½∮(x dy − y dx) along the profile (in its own frame), closed through
/// the closing surface's nearest points to its two ends.
fn free_area(pieces: &[Piece2], groove: &RigidSurface, closing: &RigidSurface) -> f64 {
    let cross = |a: Vector3<f64>, b: Vector3<f64>| a.x * b.y - a.y * b.x;
    let mut twice = 0.0;
    for piece in pieces {
        twice += match *piece {
            Piece2::Segment { a, b } => cross(v2(a), v2(b)),
            Piece2::Arc { center, radius, start, end } => {
                // ∫(x dy − y dx) over x = c + r(cos t, sin t).
                let (cx, cy) = (center[0], center[1]);
                radius * cx * (end.sin() - start.sin()) - radius * cy * (end.cos() - start.cos()) + radius * radius * (end - start)
            }
        };
    }
    let (first, last) = (end_point(&pieces[0], false), end_point(&pieces[pieces.len() - 1], true));
    // The closing surface's nearest points, brought into the groove's frame.
    let nearest = |p: Vector3<f64>| {
        let moved = groove.placement.apply(&p);
        closing.project(&moved).map_or(p, |q| groove.placement.to_local(&q.point))
    };
    let (a, b) = (nearest(last), nearest(first));
    twice += cross(last, a) + cross(a, b) + cross(b, first);
    0.5 * twice.abs()
}

/// Depth of the gland (largest distance of the profile from the closing
/// surface, over nine points of each piece: exact for the straight bottom of
/// a groove) and the closing surface's unit normal at the point nearest the
/// deepest one (global frame, for the rubber's reference extent).
fn depth(pieces: &[Piece2], groove: &RigidSurface, closing: &RigidSurface) -> Option<(f64, Vector3<f64>)> {
    let mut best: Option<(f64, Vector3<f64>)> = None;
    for piece in pieces {
        for k in 0..=8 {
            let p = groove.placement.apply(&point_on(piece, k as f64 / 8.0));
            let Some(q) = closing.project(&p) else { continue };
            if best.is_none_or(|(d, _)| q.gap.abs() > d) {
                best = Some((q.gap.abs(), q.normal));
            }
        }
    }
    best
}

/// The point a fraction `s` along a piece.
fn point_on(piece: &Piece2, s: f64) -> Vector3<f64> {
    match *piece {
        Piece2::Segment { a, b } => v2(a) + (v2(b) - v2(a)) * s,
        Piece2::Arc { center, radius, start, end } => {
            let t = start + s * (end - start);
            Vector3::new(center[0] + radius * t.cos(), center[1] + radius * t.sin(), 0.0)
        }
    }
}

fn end_point(piece: &Piece2, last: bool) -> Vector3<f64> {
    point_on(piece, if last { 1.0 } else { 0.0 })
}

fn v2(a: [f64; 2]) -> Vector3<f64> {
    Vector3::new(a[0], a[1], 0.0)
}

/// The rubber's largest intrusion into every gap at displaced nodes `x`.
pub fn extrusions(gaps: &[ExtrusionGap], mesh: &Mesh, x: &[Vector3<f64>], contacts: &ActiveContacts) -> Vec<ExtrusionSummary> {
    gaps.iter()
        .map(|g| {
            let (mut edge, mut into) = (Vector3::from(g.edge), Vector3::from(g.into).try_normalize(0.0).unwrap_or_else(Vector3::zeros));
            if let Some(s) = g.follows.as_deref().and_then(|name| contacts.surface(name)) {
                edge = s.placement.apply(&edge);
                into = s.placement.rotation * into;
            }
            let nodes: Vec<usize> = match &g.nodes {
                Some(set) => mesh.nodes_of_set(set).unwrap_or_default(),
                None => (0..mesh.node_count()).collect(),
            };
            let mut out = ExtrusionSummary { name: g.name.clone(), depth: 0.0, node: 0, at: [0.0; 3] };
            for n in nodes {
                let past = (x[n] - edge).dot(&into);
                if past > out.depth {
                    out = ExtrusionSummary { name: g.name.clone(), depth: past, node: n, at: x[n].into() };
                }
            }
            out
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contact::surface::{filleted_polyline, Placement};
    use olli_mesh::{ElementKind, Mesh};

    fn placed(shape: Shape, t: [f64; 2]) -> RigidSurface {
        RigidSurface { shape, placement: Placement::new(Vector3::new(t[0], t[1], 0.0), Vector3::z(), 0.0, Vector3::zeros()) }
    }

    /// A rectangular groove W × D with fillet radius r at its two bottom
    /// corners, closed by a line at its top: W D − 2 (1 − π/4) r² (each
    /// fillet removes a square r² less a quarter circle; hand geometry).
    /// The groove moved by (1, 2) and the cover brought down to depth 0.9 D
    /// change nothing but the depth.
    #[test]
    fn free_area_of_a_filleted_rectangular_groove() {
        let (w, d, r) = (3.0, 1.5, 0.2);
        let pieces = filleted_polyline(&[[0.0, d], [0.0, 0.0], [w, 0.0], [w, d]], r).unwrap();
        let corner = 2.0 * (1.0 - std::f64::consts::FRAC_PI_4) * r * r;
        for (shift, depth) in [([0.0, 0.0], d), ([1.0, 2.0], 0.9 * d)] {
            let groove = placed(Shape::Profile(pieces.clone()), shift);
            let cover = placed(Shape::Line { point: [0.0, depth + shift[1]], direction: [1.0, 0.0] }, [0.0, 0.0]);
            let area = free_area(&pieces, &groove, &cover);
            assert!((area - (w * depth - corner)).abs() < 1e-12, "{area} vs {}", w * depth - corner);
            let (found, normal) = super::depth(&pieces, &groove, &cover).unwrap();
            assert!((found - depth).abs() < 1e-12 && normal.y.abs() > 1.0 - 1e-12, "{found} {normal:?}");
        }
    }

    /// A quad9 square 2 × 2 with its top edge's mid-side node lifted by h:
    /// the edge is a parabola, and the area gains (2/3) · 2 · h (Archimedes'
    /// quadrature of the parabola); a quad4 of the same corners is 4.
    #[test]
    fn section_area_is_exact_for_parabolic_sides() {
        let h = 0.3;
        let mut mesh = Mesh::new(2);
        for p in [[0.0, 0.0], [2.0, 0.0], [2.0, 2.0], [0.0, 2.0], [1.0, 0.0], [2.0, 1.0], [1.0, 2.0 + h], [0.0, 1.0], [1.0, 1.0]] {
            mesh.add_node([p[0], p[1], 0.0]);
        }
        mesh.add_element(ElementKind::Quad9, &[0, 1, 2, 3, 4, 5, 6, 7, 8]);
        let x: Vec<Vector3<f64>> = mesh.nodes.iter().map(|&p| Vector3::from(p)).collect();
        assert!((section_area(&mesh, &x) - (4.0 + 2.0 / 3.0 * 2.0 * h)).abs() < 1e-12);
        let mut linear = Mesh::new(2);
        for p in &mesh.nodes[..4] {
            linear.add_node(*p);
        }
        linear.add_element(ElementKind::Quad4, &[0, 1, 2, 3]);
        assert!((section_area(&linear, &x[..4]) - 4.0).abs() < 1e-12);
    }
}
