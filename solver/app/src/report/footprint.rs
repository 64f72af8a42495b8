//! Contact in 3-D: for each rigid surface, its footprint (the rubber faces
//! near the surface laid flat in the surface's own coordinates and filled
//! with the contact pressure) and the contact pressure along a line through
//! the peak, across the narrower extent of the contact (across a seal's band).
//!
//! Flattening: a plane is seen face on; a cylinder is unrolled (arc length
//! around it, position along its axis); a sphere is mapped by arc length
//! from the contact's centre (azimuthal equidistant). All three keep
//! lengths along the surface near the contact, so a width read off the
//! picture is a width on the part.

use nalgebra::Vector3;
use olli_solver::contact::{RigidSurface, Shape};

use super::contact::placement;
use super::results::{Frame, RunResults};
use crate::job::Job;
use crate::plot::{number, Axis, ColorMap, ContourPlot, Corner, LineChart, Series};

/// Faces whose nearest corner is farther from the surface than this share of
/// the part's diagonal are left out of a footprint.
const BAND_SHARE: f64 = 0.1;
/// Faces more steeply inclined to the surface than this (|cos| of the angle
/// between the face and surface normals below it) are left out: they are
/// seen edge on.
const MIN_FACING: f64 = 0.3;

/// Two unit vectors completing `n` (unit) to a right-handed basis; the first
/// lies along the global axis least aligned with `n`, made normal to it.
fn basis(n: &Vector3<f64>) -> (Vector3<f64>, Vector3<f64>) {
    let k = (0..3).min_by(|&a, &b| n[a].abs().total_cmp(&n[b].abs())).unwrap_or(0);
    let axis = Vector3::ith(k, 1.0);
    let e1 = (axis - n * n.dot(&axis)).normalize();
    (e1, n.cross(&e1))
}

/// A direction as `(a, b, c)` with four significant digits.
fn direction_text(d: &Vector3<f64>) -> String {
    format!("({}, {}, {})", number(d[0]), number(d[1]), number(d[2]))
}

/// How a rigid surface is laid flat, in the surface's own frame.
#[derive(Debug, Clone, PartialEq)]
enum Flattening {
    /// Plane seen face on: coordinates along `e1`, `e2` from `origin`.
    Plane { origin: Vector3<f64>, e1: Vector3<f64>, e2: Vector3<f64> },
    /// Cylinder unrolled: arc length at `radius` from `e1` toward `e2`, and
    /// position along `axis` from `origin` (on the axis).
    Cylinder { origin: Vector3<f64>, axis: Vector3<f64>, e1: Vector3<f64>, e2: Vector3<f64>, radius: f64 },
    /// Sphere: arc length at `radius` from the direction `centre_dir`, split along `e1`, `e2`.
    Sphere { center: Vector3<f64>, centre_dir: Vector3<f64>, e1: Vector3<f64>, e2: Vector3<f64>, radius: f64 },
}

impl Flattening {
    /// The flattening of a 3-D `shape` centred on the local point `toward`
    /// (the contact's centroid); `None` for 2-D shapes or degenerate data.
    fn new(shape: &Shape, toward: &Vector3<f64>) -> Option<Flattening> {
        let unit = |v: [f64; 3]| Some(Vector3::from(v)).filter(|v| v.norm() > 0.0).map(|v| v.normalize());
        match shape {
            Shape::Plane { point, normal } => {
                let n = unit(*normal)?;
                let p = Vector3::from(*point);
                let (e1, e2) = basis(&n);
                Some(Flattening::Plane { origin: toward - n * n.dot(&(toward - p)), e1, e2 })
            }
            Shape::Cylinder { point, axis, radius, .. } => {
                let a = unit(*axis)?;
                let p = Vector3::from(*point);
                let d = toward - p;
                let radial = d - a * a.dot(&d);
                let e1 = if radial.norm() > 1e-12 * (1.0 + d.norm()) { radial.normalize() } else { basis(&a).0 };
                Some(Flattening::Cylinder { origin: p + a * a.dot(&d), axis: a, e1, e2: a.cross(&e1), radius: *radius })
            }
            Shape::Sphere { center, radius, .. } => {
                let c = Vector3::from(*center);
                let m = Some(toward - c).filter(|v| v.norm() > 0.0).map_or_else(Vector3::z, |v| v.normalize());
                let (e1, e2) = basis(&m);
                Some(Flattening::Sphere { center: c, centre_dir: m, e1, e2, radius: *radius })
            }
            _ => None,
        }
    }

    /// Flat coordinates of a point given in the surface's own frame.
    fn map(&self, x: &Vector3<f64>) -> [f64; 2] {
        match self {
            Flattening::Plane { origin, e1, e2 } => {
                let d = x - origin;
                [d.dot(e1), d.dot(e2)]
            }
            Flattening::Cylinder { origin, axis, e1, e2, radius } => {
                let d = x - origin;
                [radius * d.dot(e2).atan2(d.dot(e1)), d.dot(axis)]
            }
            Flattening::Sphere { center, centre_dir, e1, e2, radius } => {
                let d = x - center;
                let Some(u) = Some(d).filter(|d| d.norm() > 0.0).map(|d| d.normalize()) else { return [0.0, 0.0] };
                let psi = u.dot(centre_dir).clamp(-1.0, 1.0).acos();
                let phi = u.dot(e2).atan2(u.dot(e1));
                [radius * psi * phi.cos(), radius * psi * phi.sin()]
            }
        }
    }

    /// The two flat axes, named after what they measure.
    fn axes(&self) -> (Axis, Axis) {
        match self {
            Flattening::Plane { e1, e2, .. } => (
                Axis::new(format!("on the plane, along {}", direction_text(e1)), "L"),
                Axis::new(format!("on the plane, along {}", direction_text(e2)), "L"),
            ),
            Flattening::Cylinder { axis, radius, .. } => (
                Axis::new(format!("around the cylinder, arc length at radius {}", number(*radius)), "L"),
                Axis::new(format!("along the cylinder axis {}", direction_text(axis)), "L"),
            ),
            Flattening::Sphere { radius, .. } => (
                Axis::new(format!("arc length on the sphere (radius {}) from the contact centre", number(*radius)), "L"),
                Axis::new("arc length, across", "L"),
            ),
        }
    }
}

/// The rubber faces of `sides` that face `surface` and come near it, as
/// corner-node lists, farthest first (so touching faces are painted last).
fn near_faces(job: &Job, sides: &str, surface: &RigidSurface, current: &[[f64; 3]], band: f64) -> Vec<Vec<usize>> {
    let mesh = &job.model.mesh;
    let Some(set) = mesh.side_sets.get(sides) else { return Vec::new() };
    let mut faces: Vec<(f64, Vec<usize>)> = Vec::new();
    for side in set {
        let nodes = mesh.side_nodes(*side);
        let corners: Vec<usize> = match nodes.len() {
            3 | 6 => nodes[..3].to_vec(),
            4 | 8 | 9 => nodes[..4].to_vec(),
            _ => continue,
        };
        if corners.iter().any(|&n| n >= current.len()) {
            continue;
        }
        let x: Vec<Vector3<f64>> = corners.iter().map(|&n| Vector3::from(current[n])).collect();
        let normal = (x[1] - x[0]).cross(&(x[x.len() - 1] - x[0]));
        let centroid = x.iter().sum::<Vector3<f64>>() / x.len() as f64;
        let Some(projection) = surface.project(&centroid) else { continue };
        let gaps: Vec<f64> = x.iter().filter_map(|p| surface.project(p)).map(|p| p.gap).collect();
        let nearest = gaps.iter().copied().fold(f64::INFINITY, f64::min);
        let facing = normal.norm() > 0.0 && (normal.normalize().dot(&projection.normal)).abs() >= MIN_FACING;
        if facing && nearest <= band {
            faces.push((gaps.iter().sum::<f64>() / gaps.len().max(1) as f64, corners));
        }
    }
    faces.sort_by(|a, b| b.0.total_cmp(&a.0));
    faces.into_iter().map(|(_, c)| c).collect()
}

/// The footprint and the line chart of one rigid surface.
pub struct Footprint {
    /// The contact pressure over the flattened faces near the surface.
    pub map: ContourPlot,
    /// The contact pressure along a line through the peak.
    pub profile: LineChart,
}

/// The fluid pressures of the history row at `.pvd` time `time`, by fluid name.
fn fluid_pressures(r: &RunResults, time: f64) -> Vec<(String, f64)> {
    let Some(row) = r.history.cumulative_load().iter().position(|t| (t - time).abs() < 1e-9) else { return Vec::new() };
    r.history
        .columns
        .iter()
        .filter(|c| c.starts_with("fluid_") && c.ends_with("_pressure"))
        .filter_map(|c| {
            let p = r.history.column(c)?[row];
            p.is_finite().then(|| (c.trim_start_matches("fluid_").trim_end_matches("_pressure").to_string(), p))
        })
        .collect()
}

/// Footprint and pressure profile of every 3-D rigid surface at frame
/// `index` (none in 2-D, without a `contact_pressure` array, or where no
/// rubber face comes near a surface).
pub fn footprints(job: &Job, frame: &Frame, r: &RunResults, index: usize, heading: &str, colors: ColorMap) -> Vec<(String, Footprint)> {
    let mesh = &frame.mesh;
    let Some(pressure) = frame.array("contact_pressure").filter(|a| a.components == 1) else { return Vec::new() };
    if mesh.dimension != 3 || pressure.values.len() != mesh.node_count() {
        return Vec::new();
    }
    let current = frame.deformed();
    let (lo, hi) = mesh.bounding_box();
    let diagonal = ((hi[0] - lo[0]).powi(2) + (hi[1] - lo[1]).powi(2) + (hi[2] - lo[2]).powi(2)).sqrt();
    let time = r.frames[index].time;
    let fluids = fluid_pressures(r, time);
    let mut out = Vec::new();
    for body in &job.model.rigid {
        let surface = RigidSurface { shape: body.shape.clone(), placement: placement(job, body, time) };
        let faces = near_faces(job, &body.sides, &surface, &current, BAND_SHARE * diagonal);
        if faces.is_empty() {
            continue;
        }
        let mut used: Vec<usize> = faces.iter().flatten().copied().collect();
        used.sort_unstable();
        used.dedup();
        // Centre the flattening on the touching nodes (on all near nodes when none touches).
        let touching: Vec<usize> = used.iter().copied().filter(|&n| pressure.values[n] > 0.0).collect();
        let centre_of = if touching.is_empty() { &used } else { &touching };
        let local = |n: usize| surface.placement.to_local(&Vector3::from(current[n]));
        let toward = centre_of.iter().map(|&n| local(n)).sum::<Vector3<f64>>() / centre_of.len() as f64;
        let Some(flat) = Flattening::new(&body.shape, &toward) else { continue };
        let position: Vec<[f64; 2]> = used.iter().map(|&n| flat.map(&local(n))).collect();
        let values: Vec<f64> = used.iter().map(|&n| pressure.values[n]).collect();
        let renumber = |n: usize| used.binary_search(&n).unwrap_or(0);
        let cells: Vec<Vec<usize>> = faces.iter().map(|f| f.iter().map(|&n| renumber(n)).collect()).collect();
        let (u, v) = flat.axes();
        let peak = (0..used.len()).max_by(|&a, &b| values[a].total_cmp(&values[b])).unwrap_or(0);
        let mut title = format!("{heading}: contact pressure on `{}`, peak {} F/L²", body.name, number(values[peak]));
        for (name, p) in &fluids {
            title.push_str(&format!(", fluid `{name}` {} F/L²", number(*p)));
        }
        let mut map = ContourPlot::new(
            title,
            u.clone(),
            v.clone(),
            Axis::new("contact pressure", "F/L²"),
            position.clone(),
            values.clone(),
            cells.clone(),
        );
        map.colors = colors;
        let touching: Vec<usize> = touching.iter().map(|&n| renumber(n)).collect();
        let profile_title = format!("{heading}: contact pressure on `{}` through the peak", body.name);
        let mut profile = profile_chart(profile_title, &position, &values, &cells, peak, &touching, (u, v)).with_legend(Corner::UpperRight);
        for (name, p) in &fluids {
            profile = profile.with_horizontal(*p, format!("fluid `{name}` {} F/L²", number(*p)));
        }
        out.push((body.name.clone(), Footprint { map, profile }));
    }
    out
}

/// Pressure against position along the flat axis in which the touching
/// nodes spread least (across a band), for the nodes in a strip through
/// the peak half a typical edge wide.
fn profile_chart(
    title: String,
    position: &[[f64; 2]],
    values: &[f64],
    cells: &[Vec<usize>],
    peak: usize,
    touching: &[usize],
    (u, v): (Axis, Axis),
) -> LineChart {
    let spread = |k: usize| {
        let (lo, hi) = touching.iter().map(|&n| position[n][k]).fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), x| (a.min(x), b.max(x)));
        if hi >= lo {
            hi - lo
        } else {
            0.0
        }
    };
    // Along the axis where the contact is narrower; across the other.
    let (along, across, axis) = if touching.is_empty() || spread(0) <= spread(1) { (0, 1, u) } else { (1, 0, v) };
    let mut edges: Vec<f64> = cells
        .iter()
        .flat_map(|c| (0..c.len()).map(move |i| (c[i], c[(i + 1) % c.len()])))
        .map(|(a, b)| (position[a][0] - position[b][0]).hypot(position[a][1] - position[b][1]))
        .filter(|l| *l > 0.0)
        .collect();
    edges.sort_by(f64::total_cmp);
    let half = 0.5 * edges.get(edges.len() / 2).copied().unwrap_or(0.0);
    let mut points: Vec<(f64, f64)> = (0..position.len())
        .filter(|&n| (position[n][across] - position[peak][across]).abs() <= half)
        .map(|n| (position[n][along], values[n]))
        .collect();
    points.sort_by(|a, b| a.0.total_cmp(&b.0));
    let mut chart =
        LineChart::new(title, axis, Axis::new("contact pressure", "F/L²")).with_series(Series::line("contact pressure", points.clone()));
    chart = chart.with_series(Series::points(format!("peak {} F/L²", number(values[peak])), vec![(position[peak][along], values[peak])]));
    let band: Vec<f64> = points.iter().filter(|p| p.1 > 0.0).map(|p| p.0).collect();
    if let (Some(first), Some(last)) = (band.first(), band.last()) {
        chart = chart.with_vertical(*first, format!("contact, {} L across", number(last - first))).with_vertical(*last, "");
    }
    chart
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A plane is seen face on: distances on it are kept, and the origin is
    /// the contact centre's foot.
    #[test]
    fn a_plane_keeps_lengths_on_it() {
        let shape = Shape::Plane { point: [0.0, 0.0, 2.0], normal: [0.0, 0.0, -3.0] };
        let flat = Flattening::new(&shape, &Vector3::new(1.0, 1.0, 1.5)).unwrap();
        let a = flat.map(&Vector3::new(1.0, 1.0, 2.0));
        let b = flat.map(&Vector3::new(4.0, 5.0, 2.0));
        assert!(a[0].abs() < 1e-12 && a[1].abs() < 1e-12, "{a:?}");
        assert!(((b[0] - a[0]).hypot(b[1] - a[1]) - 5.0).abs() < 1e-12);
    }

    /// An unrolled cylinder measures arc length around it and length along it.
    #[test]
    fn a_cylinder_unrolls_to_arc_length() {
        let shape = Shape::Cylinder { point: [0.0, 0.0, 0.0], axis: [0.0, 0.0, 1.0], radius: 2.0, rubber_outside: true };
        let flat = Flattening::new(&shape, &Vector3::new(2.0, 0.0, 5.0)).unwrap();
        let a = flat.map(&Vector3::new(2.0, 0.0, 5.0));
        assert!(a[0].abs() < 1e-12 && a[1].abs() < 1e-12, "{a:?}");
        let b = flat.map(&Vector3::new(0.0, 2.0, 6.0));
        assert!((b[0].abs() - std::f64::consts::PI).abs() < 1e-12 && (b[1] - 1.0).abs() < 1e-12, "{b:?}");
    }

    /// On a sphere the distance from the contact centre is the great-circle arc.
    #[test]
    fn a_sphere_maps_arcs_from_the_contact_centre() {
        let shape = Shape::Sphere { center: [0.0, 0.0, 0.0], radius: 3.0, rubber_outside: true };
        let flat = Flattening::new(&shape, &Vector3::new(0.0, 0.0, 4.0)).unwrap();
        let b = flat.map(&Vector3::new(3.0, 0.0, 0.0));
        assert!((b[0].hypot(b[1]) - 1.5 * std::f64::consts::PI).abs() < 1e-12, "{b:?}");
    }
}
