//! Connected contact bands of one pair: the touching nodes split into the
//! groups that touch one another through their sides, each with its own
//! contact width and peak pressure, so a groove's bottom and its wall (two
//! bands on one rigid surface) are told apart.
//!
//! Bands are numbered along the surface, so a band keeps its number while
//! it grows: 2-D surfaces from their end with the smaller x (the smaller y
//! where both ends share x), a line toward increasing x (increasing y where
//! it runs along y); a plane by distance from its `point` (rings of a face
//! seal, inside out); a cylinder along its axis (pointing to increasing x,
//! else y, else z); a sphere by height z.

use nalgebra::Vector3;

use super::law::Status;
use super::pair::{ContactPair, PairResponse};
use super::surface::{Piece2, RigidSurface, Shape};

/// One connected contact band of a rigid surface.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ContactBand {
    /// Width of the band (2-D: its length along the surface, ends found as
    /// for the whole surface's contact width; 3-D: the largest distance
    /// between two of its touching nodes).
    pub contact_width: f64,
    /// Largest true contact pressure in the band (stress units).
    pub peak_pressure: f64,
    /// Where the band lies along the surface (mean over its nodes, length
    /// units; the measure that numbers the bands, see the module text).
    pub position: f64,
}

/// The bands of evaluation `r` of `pair` against `surface`, numbered along
/// the surface; `pressures` are the nodes' true pressures.
pub fn bands(pair: &ContactPair, r: &PairResponse, pressures: &[f64], surface: &RigidSurface) -> Vec<ContactBand> {
    let n = pair.nodes.len();
    if r.nodes.len() != n || r.positions.len() != n {
        return Vec::new();
    }
    let touching = |k: usize| r.nodes[k].status != Status::Open;
    let mut groups = Groups::new(n);
    for piece in pair.pieces() {
        let mut inside = piece.iter().copied().filter(|&k| touching(k));
        if let Some(first) = inside.next() {
            inside.for_each(|k| groups.join(first, k));
        }
    }
    // Band of each touching node (usize::MAX for open ones), numbered in order of first appearance.
    let mut band_of_root = vec![usize::MAX; n];
    let mut band_of = vec![usize::MAX; n];
    let mut members: Vec<Vec<usize>> = Vec::new();
    for k in (0..n).filter(|&k| touching(k)) {
        let root = groups.root(k);
        if band_of_root[root] == usize::MAX {
            band_of_root[root] = members.len();
            members.push(Vec::new());
        }
        band_of[k] = band_of_root[root];
        members[band_of[k]].push(k);
    }
    let widths = if pair.is_solid() {
        members.iter().map(|m| extent(m.iter().map(|&k| r.positions[k]))).collect()
    } else {
        band_lengths(pair, r, members.len(), |k| band_of[k])
    };
    let mut out: Vec<ContactBand> = members
        .iter()
        .zip(widths)
        .map(|(m, contact_width)| {
            let along: f64 = m.iter().map(|&k| position_along(&surface.shape, &surface.placement.to_local(&r.positions[k]))).sum();
            ContactBand {
                contact_width,
                peak_pressure: m.iter().map(|&k| pressures[k]).fold(0.0, f64::max),
                position: along / m.len() as f64,
            }
        })
        .collect();
    out.sort_by(|a, b| a.position.total_cmp(&b.position));
    out
}

/// 2-D band lengths: each edge's touching length (see
/// [`ContactPair::edge_touching_length`]) added to its band.
fn band_lengths(pair: &ContactPair, r: &PairResponse, count: usize, band: impl Fn(usize) -> usize) -> Vec<f64> {
    let mut widths = vec![0.0; count];
    for e in 0..pair.pieces().len() {
        if let Some((k, length)) = pair.edge_touching_length(e, r) {
            widths[band(k)] += length;
        }
    }
    widths
}

/// The largest distance between two of `points` (two farthest-point sweeps,
/// as for the whole surface's 3-D contact width).
fn extent(points: impl Iterator<Item = Vector3<f64>> + Clone) -> f64 {
    let Some(start) = points.clone().next() else { return 0.0 };
    let far = |from: Vector3<f64>| points.clone().max_by(|a, b| (a - from).norm().total_cmp(&(b - from).norm())).unwrap_or(from);
    let a = far(start);
    (far(a) - a).norm()
}

/// Position of point `x` (surface frame) along `shape`, the measure that
/// numbers the bands (see the module text).
pub fn position_along(shape: &Shape, x: &Vector3<f64>) -> f64 {
    match shape {
        Shape::Line { point, direction } => {
            let d = canonical(Vector3::new(direction[0], direction[1], 0.0));
            (x - Vector3::new(point[0], point[1], 0.0)).dot(&d)
        }
        Shape::Profile(pieces) => along_profile(pieces, x),
        Shape::Plane { point, normal } => {
            let n = Vector3::from(*normal).try_normalize(0.0).unwrap_or_else(Vector3::z);
            let r = x - Vector3::from(*point);
            (r - n * r.dot(&n)).norm()
        }
        Shape::Cylinder { point, axis, .. } => (x - Vector3::from(*point)).dot(&canonical(Vector3::from(*axis))),
        Shape::Sphere { .. } => x.z,
    }
}

/// A direction as a unit vector pointing to increasing x, else y, else z.
fn canonical(d: Vector3<f64>) -> Vector3<f64> {
    let d = d.try_normalize(0.0).unwrap_or_else(Vector3::x);
    let first = d.iter().copied().find(|c| c.abs() > 1e-12).unwrap_or(1.0);
    if first < 0.0 {
        -d
    } else {
        d
    }
}

/// Arc length along a profile to the point nearest `x`, from the profile's
/// end with the smaller x (then y).
fn along_profile(pieces: &[Piece2], x: &Vector3<f64>) -> f64 {
    let mut best = (f64::INFINITY, 0.0);
    let mut total = 0.0;
    for piece in pieces {
        let (distance, along, length) = on_piece(piece, x);
        if distance < best.0 {
            best = (distance, total + along);
        }
        total += length;
    }
    let ends = |p: &Piece2, last: bool| match *p {
        Piece2::Segment { a, b } => Vector3::new(if last { b[0] } else { a[0] }, if last { b[1] } else { a[1] }, 0.0),
        Piece2::Arc { center, radius, start, end } => {
            let t = if last { end } else { start };
            Vector3::new(center[0] + radius * t.cos(), center[1] + radius * t.sin(), 0.0)
        }
    };
    let reversed = match (pieces.first(), pieces.last()) {
        (Some(f), Some(l)) => {
            let (a, b) = (ends(f, false), ends(l, true));
            (b.x, b.y) < (a.x - 1e-12 * (1.0 + a.x.abs()), a.y) || ((b.x - a.x).abs() <= 1e-12 * (1.0 + a.x.abs()) && b.y < a.y)
        }
        _ => false,
    };
    if reversed {
        total - best.1
    } else {
        best.1
    }
}

/// Distance from `x` to `piece`, arc length from the piece's start to the
/// nearest point, and the piece's length.
fn on_piece(piece: &Piece2, x: &Vector3<f64>) -> (f64, f64, f64) {
    match *piece {
        Piece2::Segment { a, b } => {
            let (a, b) = (Vector3::new(a[0], a[1], 0.0), Vector3::new(b[0], b[1], 0.0));
            let t = b - a;
            let length = t.norm();
            let s = if length > 0.0 { ((x - a).dot(&t) / (length * length)).clamp(0.0, 1.0) } else { 0.0 };
            ((a + t * s - x).norm(), s * length, length)
        }
        Piece2::Arc { center, radius, start, end } => {
            let c = Vector3::new(center[0], center[1], 0.0);
            let sweep = (end - start).abs();
            let angle = (x.y - c.y).atan2(x.x - c.x);
            let tau = std::f64::consts::TAU;
            let offset = if end >= start { (angle - start).rem_euclid(tau) } else { (start - angle).rem_euclid(tau) };
            // Beyond the arc: the nearer end.
            let offset = if offset <= sweep {
                offset
            } else if offset - sweep < tau - offset {
                sweep
            } else {
                0.0
            };
            let t = if end >= start { start + offset } else { start - offset };
            let q = c + Vector3::new(t.cos(), t.sin(), 0.0) * radius;
            ((q - x).norm(), offset * radius, sweep * radius)
        }
    }
}

/// Union–find over the pair's nodes (path halving).
struct Groups(Vec<usize>);

impl Groups {
    fn new(n: usize) -> Self {
        Groups((0..n).collect())
    }

    fn root(&mut self, mut k: usize) -> usize {
        while self.0[k] != k {
            self.0[k] = self.0[self.0[k]];
            k = self.0[k];
        }
        k
    }

    fn join(&mut self, a: usize, b: usize) {
        let (ra, rb) = (self.root(a), self.root(b));
        self.0[ra] = rb;
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contact::surface::filleted_polyline;

    /// Positions along a groove profile are arc lengths from its end with
    /// the smaller x, whichever way it is listed (hand geometry: a point on
    /// the bottom at x = 1.5 of a groove 1 deep with sharp corners is
    /// 1 + 1.5 from the left top corner), and a line counts toward +x.
    #[test]
    fn positions_run_from_the_end_with_the_smaller_x() {
        let points = [[0.0, 1.0], [0.0, 0.0], [3.0, 0.0], [3.0, 1.0]];
        let forward = Shape::Profile(filleted_polyline(&points, 0.0).unwrap());
        let mut reversed = points;
        reversed.reverse();
        let backward = Shape::Profile(filleted_polyline(&reversed, 0.0).unwrap());
        let x = Vector3::new(1.5, -0.01, 0.0);
        for shape in [forward, backward] {
            assert!((position_along(&shape, &x) - 2.5).abs() < 1e-12);
        }
        let line = Shape::Line { point: [0.0, 0.0], direction: [-2.0, 0.0] };
        assert!((position_along(&line, &Vector3::new(4.0, 1.0, 0.0)) - 4.0).abs() < 1e-12);
        // A fillet arc: a quarter circle of radius 0.5 at the left bottom corner
        // shortens the profile by (2 − π/2) · 0.5 before the bottom.
        let filleted = Shape::Profile(filleted_polyline(&points, 0.5).unwrap());
        // Wall down to the fillet (0.5), the quarter arc (π/2 · 0.5), the bottom on to x = 1.5 (1.0).
        let before = 0.5 + std::f64::consts::FRAC_PI_2 * 0.5 + 1.0;
        assert!((position_along(&filleted, &x) - before).abs() < 1e-9, "{}", position_along(&filleted, &x));
    }
}
