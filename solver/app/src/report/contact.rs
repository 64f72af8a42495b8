//! Seal contact in 2-D: the rigid surfaces where they stand at a frame, and
//! the contact pressure along each surface (position along the rubber's
//! contact edge on the horizontal axis) with the peak, the contact band and
//! any fluid pressure marked. Both need the job: the results folder holds
//! neither the surfaces' geometry nor which nodes face which surface.

use std::collections::BTreeMap;

use nalgebra::Vector3;
use olli_mesh::Mesh;
use olli_solver::contact::{Piece2, Placement, RigidSurface, Shape};
use olli_solver::model::RigidBody;

use super::results::{Frame, RunResults};
use super::section::View;
use crate::job::Job;
use crate::plot::{number, Axis, Corner, LineChart, Series};

/// Points along a 2-D shape in its own frame; an infinite line is cut to
/// `reach` either side of the foot of `near` on it.
fn shape_points(shape: &Shape, near: [f64; 2], reach: f64) -> Vec<[f64; 2]> {
    match shape {
        Shape::Line { point, direction } => {
            let n = direction[0].hypot(direction[1]).max(1e-300);
            let d = [direction[0] / n, direction[1] / n];
            let along = (near[0] - point[0]) * d[0] + (near[1] - point[1]) * d[1];
            let foot = [point[0] + along * d[0], point[1] + along * d[1]];
            vec![[foot[0] - reach * d[0], foot[1] - reach * d[1]], [foot[0] + reach * d[0], foot[1] + reach * d[1]]]
        }
        Shape::Profile(pieces) => {
            let mut points: Vec<[f64; 2]> = Vec::new();
            for piece in pieces {
                match *piece {
                    Piece2::Segment { a, b } => points.extend([a, b]),
                    Piece2::Arc { center, radius, start, end } => {
                        points.extend((0..=16).map(|k| {
                            let t = start + (end - start) * k as f64 / 16.0;
                            [center[0] + radius * t.cos(), center[1] + radius * t.sin()]
                        }));
                    }
                }
            }
            points
        }
        _ => Vec::new(),
    }
}

/// Where `body` stands at `.pvd` time `time` (stage index + load factor):
/// from its position at the end of the previous stage toward this stage's
/// target along this stage's ramp, as the driver moves it.
pub(crate) fn placement(job: &Job, body: &RigidBody, time: f64) -> Placement {
    let stages = &job.model.stages;
    let index = ((time - 1e-9).floor().max(0.0) as usize).min(stages.len().saturating_sub(1));
    let t = time - index as f64;
    let reached = |upto: usize| {
        stages[..upto]
            .iter()
            .rev()
            .find_map(|s| s.rigid_motions.iter().find(|m| m.body == body.name))
            .map_or(([0.0; 3], 0.0), |m| (m.translation, m.rotation))
    };
    let from = reached(index);
    let to =
        stages.get(index).and_then(|s| s.rigid_motions.iter().find(|m| m.body == body.name)).map_or(from, |m| (m.translation, m.rotation));
    let f = stages.get(index).and_then(|s| s.ramps.get(&body.name)).map_or(t, |r| r.fraction(t));
    let lerp = |a: f64, b: f64| a + f * (b - a);
    let translation = Vector3::new(lerp(from.0[0], to.0[0]), lerp(from.0[1], to.0[1]), lerp(from.0[2], to.0[2]));
    Placement::new(translation, Vector3::from(body.rotation_axis), lerp(from.1, to.1), Vector3::from(body.rotation_center))
}

/// Each 2-D rigid surface as a polyline where it stands at `time` (none in 3-D).
pub fn rigid_outlines(job: &Job, mesh: &Mesh, time: f64) -> Vec<(String, Vec<[f64; 2]>)> {
    if mesh.dimension != 2 {
        return Vec::new();
    }
    let (lo, hi) = mesh.bounding_box();
    // Lines reach a little beyond the part, around its centre.
    let reach = 0.6 * ((hi[0] - lo[0]).hypot(hi[1] - lo[1]));
    let centre = [0.5 * (lo[0] + hi[0]), 0.5 * (lo[1] + hi[1])];
    job.model
        .rigid
        .iter()
        .map(|body| {
            let p = placement(job, body, time);
            // The centre in the surface's own frame, so the cut line stays beside the part.
            let local = p.to_local(&Vector3::new(centre[0], centre[1], 0.0));
            let points = shape_points(&body.shape, [local[0], local[1]], reach).into_iter().map(|x| {
                let y = p.apply(&Vector3::new(x[0], x[1], 0.0));
                [y[0], y[1]]
            });
            (body.name.clone(), points.collect())
        })
        .collect()
}

/// Points of a circle of `radius` about `centre` in the drawing plane.
fn circle(centre: [f64; 2], radius: f64) -> Vec<[f64; 2]> {
    (0..=64)
        .map(|k| {
            let t = std::f64::consts::TAU * k as f64 / 64.0;
            [centre[0] + radius * t.cos(), centre[1] + radius * t.sin()]
        })
        .collect()
}

/// Each 3-D rigid surface where it stands at `time`, as polylines in the
/// drawing plane of `view` (right, up), cut to the deformed part's box
/// widened by a tenth: a plane as its cut through that box, a cylinder as
/// its two silhouette lines (a circle when seen along its axis), a sphere
/// as its outline circle. A surface may give several polylines under one name.
pub fn rigid_outlines_3d(job: &Job, current: &[[f64; 3]], time: f64, view: View) -> Vec<(String, Vec<[f64; 2]>)> {
    let (right, up, depth, _) = view.axes();
    let mut lo = [f64::INFINITY; 3];
    let mut hi = [f64::NEG_INFINITY; 3];
    for x in current.iter().filter(|x| x.iter().all(|v| v.is_finite())) {
        for k in 0..3 {
            lo[k] = lo[k].min(x[k]);
            hi[k] = hi[k].max(x[k]);
        }
    }
    if lo[0] > hi[0] {
        return Vec::new();
    }
    let pad = 0.1 * (0..3).map(|k| hi[k] - lo[k]).fold(0.0, f64::max);
    let (lo, hi) = (lo.map(|v| v - pad), hi.map(|v| v + pad));
    let corners: Vec<Vector3<f64>> =
        (0..8).map(|i| Vector3::new([lo[0], hi[0]][i & 1], [lo[1], hi[1]][(i >> 1) & 1], [lo[2], hi[2]][(i >> 2) & 1])).collect();
    let draw = |x: &Vector3<f64>| [x[right], x[up]];
    let view_dir = Vector3::ith(depth, 1.0);
    let mut out = Vec::new();
    for body in &job.model.rigid {
        let p = placement(job, body, time);
        let turn = |v: [f64; 3]| p.rotation * Vector3::from(v);
        match &body.shape {
            Shape::Plane { point, normal } => {
                let (origin, n) = (p.apply(&Vector3::from(*point)), turn(*normal));
                if n.norm() == 0.0 {
                    continue;
                }
                let n = n.normalize();
                // Where the box's 12 edges cross the plane, in order around it.
                let side = |x: &Vector3<f64>| n.dot(&(x - origin));
                let mut cut: Vec<Vector3<f64>> = Vec::new();
                for a in 0..8 {
                    for bit in [1, 2, 4] {
                        let b = a | bit;
                        if b == a {
                            continue;
                        }
                        let (sa, sb) = (side(&corners[a]), side(&corners[b]));
                        if (sa <= 0.0) != (sb <= 0.0) {
                            cut.push(corners[a] + (corners[b] - corners[a]) * (sa / (sa - sb)));
                        }
                    }
                }
                if cut.len() < 3 {
                    continue;
                }
                let centre = cut.iter().sum::<Vector3<f64>>() / cut.len() as f64;
                let e1 = (cut[0] - centre).normalize();
                let e2 = n.cross(&e1);
                cut.sort_by(|a, b| {
                    let angle = |x: &Vector3<f64>| (x - centre).dot(&e2).atan2((x - centre).dot(&e1));
                    angle(a).total_cmp(&angle(b))
                });
                cut.push(cut[0]);
                out.push((body.name.clone(), cut.iter().map(draw).collect()));
            }
            Shape::Cylinder { point, axis, radius, .. } => {
                let (origin, a) = (p.apply(&Vector3::from(*point)), turn(*axis));
                if a.norm() == 0.0 {
                    continue;
                }
                let a = a.normalize();
                let across = view_dir.cross(&a);
                if across.norm() < 1e-3 {
                    out.push((body.name.clone(), circle(draw(&origin), *radius)));
                    continue;
                }
                let w = across.normalize() * *radius;
                let (t0, t1) =
                    corners.iter().map(|c| a.dot(&(c - origin))).fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), t| (l.min(t), h.max(t)));
                for s in [1.0, -1.0] {
                    out.push((body.name.clone(), vec![draw(&(origin + w * s + a * t0)), draw(&(origin + w * s + a * t1))]));
                }
            }
            Shape::Sphere { center, radius, .. } => {
                out.push((body.name.clone(), circle(draw(&p.apply(&Vector3::from(*center))), *radius)));
            }
            _ => {}
        }
    }
    out
}

/// The nodes of a 2-D side set in order along its edge chain (the longest
/// chain when the set is in pieces), with the side's mid nodes in place.
fn chain(mesh: &Mesh, set: &str) -> Vec<usize> {
    let Some(sides) = mesh.side_sets.get(set) else { return Vec::new() };
    // Each side as a path of nodes; link paths by shared end nodes.
    let paths: Vec<Vec<usize>> = sides
        .iter()
        .map(|s| {
            let n = mesh.side_nodes(*s);
            if n.len() == 3 {
                vec![n[0], n[2], n[1]]
            } else {
                n
            }
        })
        .collect();
    let mut at: BTreeMap<usize, Vec<usize>> = BTreeMap::new();
    for (i, p) in paths.iter().enumerate() {
        at.entry(p[0]).or_default().push(i);
        at.entry(*p.last().unwrap()).or_default().push(i);
    }
    let mut used = vec![false; paths.len()];
    let mut best: Vec<usize> = Vec::new();
    // Start at chain ends (a node of one path) first, then anywhere (closed loops).
    let mut starts: Vec<usize> =
        (0..paths.len()).filter(|&i| at[&paths[i][0]].len() == 1 || at[paths[i].last().unwrap()].len() == 1).collect();
    starts.extend(0..paths.len());
    for start in starts {
        if used[start] {
            continue;
        }
        let mut nodes = paths[start].clone();
        if at[&nodes[0]].len() > 1 && at[nodes.last().unwrap()].len() == 1 {
            nodes.reverse();
        }
        used[start] = true;
        loop {
            let end = *nodes.last().unwrap();
            let Some(&next) = at[&end].iter().find(|&&j| !used[j]) else { break };
            used[next] = true;
            let mut p = paths[next].clone();
            if p[0] != end {
                p.reverse();
            }
            nodes.extend_from_slice(&p[1..]);
        }
        if nodes.len() > best.len() {
            best = nodes;
        }
    }
    best
}

/// The contact-pressure chart of each 2-D rigid surface at frame `index`
/// (none in 3-D or without a `contact_pressure` array).
pub fn pressure_charts(job: &Job, frame: &Frame, r: &RunResults, index: usize, heading: &str) -> Vec<(String, LineChart)> {
    let mesh = &frame.mesh;
    let Some(pressure) = frame.array("contact_pressure").filter(|a| a.components == 1) else { return Vec::new() };
    if mesh.dimension != 2 {
        return Vec::new();
    }
    let current = frame.deformed();
    // The history row of this frame, for the fluid pressures.
    let time = r.frames[index].time;
    let row = r.history.cumulative_load().iter().position(|t| (t - time).abs() < 1e-9);
    // Distance of every node to every surface where it stands: a node's
    // pressure belongs to the nearest surface (one side set may face several).
    let surfaces: Vec<RigidSurface> =
        job.model.rigid.iter().map(|b| RigidSurface { shape: b.shape.clone(), placement: placement(job, b, time) }).collect();
    let distance = |b: usize, n: usize| surfaces[b].project(&Vector3::from(current[n])).map_or(f64::INFINITY, |p| p.gap.abs());
    let nearest = |n: usize| (0..surfaces.len()).min_by(|&a, &b| distance(a, n).total_cmp(&distance(b, n)));
    let mut charts = Vec::new();
    for (b, body) in job.model.rigid.iter().enumerate() {
        // Result frames carry no sets: the job's mesh has them (same node numbers).
        let mut nodes = chain(&job.model.mesh, &body.sides);
        if nodes.len() < 2 {
            continue;
        }
        // A closed chain starts at its node farthest from this surface.
        if nodes.first() == nodes.last() {
            nodes.pop();
            let far = (0..nodes.len()).max_by(|&i, &j| distance(b, nodes[i]).total_cmp(&distance(b, nodes[j]))).unwrap_or(0);
            nodes.rotate_left(far);
            nodes.push(nodes[0]);
        }
        let mut s = 0.0;
        let points: Vec<(f64, f64)> = nodes
            .iter()
            .enumerate()
            .map(|(k, &n)| {
                if k > 0 {
                    let (a, b) = (current[nodes[k - 1]], current[n]);
                    s += (b[0] - a[0]).hypot(b[1] - a[1]);
                }
                (s, if nearest(n) == Some(b) { pressure.values[n] } else { 0.0 })
            })
            .collect();
        let mut chart = LineChart::new(
            format!("{heading}: contact pressure on `{}`", body.name),
            Axis::new(format!("position along side set `{}` (deformed)", body.sides), "L"),
            Axis::new("contact pressure", "F/L²"),
        )
        .with_legend(Corner::UpperRight)
        .with_series(Series::line("contact pressure", points.clone()));
        let touching: Vec<&(f64, f64)> = points.iter().filter(|p| p.1 > 0.0).collect();
        if let (Some(first), Some(last)) = (touching.first(), touching.last()) {
            let peak = points.iter().copied().max_by(|a, b| a.1.total_cmp(&b.1)).unwrap_or((0.0, 0.0));
            chart = chart.with_series(Series::points(format!("peak {} F/L²", number(peak.1)), vec![peak]));
            let width =
                r.history.column(&format!("rigid_{}_contact_width", body.name)).zip(row).map(|(c, i)| c[i]).unwrap_or(last.0 - first.0);
            chart = chart.with_vertical(first.0, format!("contact band, width {} L", number(width))).with_vertical(last.0, "");
        }
        if let Some(i) = row {
            for column in r.history.columns.iter().filter(|c| c.starts_with("fluid_") && c.ends_with("_pressure")) {
                if let Some(p) = r.history.column(column).map(|c| c[i]).filter(|p| p.is_finite()) {
                    let name = column.trim_start_matches("fluid_").trim_end_matches("_pressure");
                    chart = chart.with_horizontal(p, format!("fluid `{name}` {} F/L²", number(p)));
                }
            }
        }
        charts.push((body.name.clone(), chart));
    }
    charts
}

#[cfg(test)]
mod tests {
    use super::*;
    use olli_mesh::generate::{rectangle, RectangleParams};
    use olli_mesh::select::boundary_sides;

    /// The top edge of a 3 × 1 rectangle, given as a side set in scrambled
    /// order, chains into its four nodes from one end to the other.
    #[test]
    fn a_side_set_chains_along_its_edge() {
        let mut mesh = rectangle(&RectangleParams { size: [3.0, 1.0], divisions: [3, 1], ..Default::default() }).unwrap();
        let mut top: Vec<_> =
            boundary_sides(&mesh).into_iter().filter(|s| mesh.side_nodes(*s).iter().all(|&n| mesh.nodes[n][1] == 1.0)).collect();
        top.reverse();
        mesh.side_sets.insert("top".into(), top);
        let nodes = chain(&mesh, "top");
        let xs: Vec<f64> = nodes.iter().map(|&n| mesh.nodes[n][0]).collect();
        assert!(xs == [0.0, 1.0, 2.0, 3.0] || xs == [3.0, 2.0, 1.0, 0.0], "{xs:?}");
    }

    /// An infinite line is drawn as a segment of the given reach each side of the foot of a point near the part.
    #[test]
    fn a_line_cut_to_reach_has_two_ends() {
        let points = shape_points(&Shape::Line { point: [1.0, 2.0], direction: [2.0, 0.0] }, [3.0, 7.0], 5.0);
        assert_eq!(points, [[-2.0, 2.0], [8.0, 2.0]]);
    }
}
