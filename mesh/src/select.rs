//! Geometric selections: node sets and side sets built from geometry, so a
//! job file can name "the nodes on this plane" or "the faces on that
//! cylinder" without a set in the mesh file.
//!
//! A node is selected when it lies in the region (within the tolerance); a
//! side when it lies on the boundary and all its nodes are selected. Named
//! sets and the set operations union, intersection and difference combine
//! selections. The serde form reads naturally in TOML:
//! `{ plane = { point = [0, 0], normal = [0, 1] } }`,
//! `{ difference = [{ set = "outer" }, { box = { min = [0, 0], max = [1, 1] } }] }`.

use std::collections::HashMap;

use crate::error::MeshError;
use crate::model::{Mesh, Side};

/// A point or vector given as 2 (x, y; z = 0) or 3 numbers.
#[derive(Debug, Clone, Copy, PartialEq, serde::Deserialize, serde::Serialize)]
#[serde(try_from = "Vec<f64>", into = "Vec<f64>")]
pub struct Vec3(pub [f64; 3]);

impl TryFrom<Vec<f64>> for Vec3 {
    type Error = String;
    fn try_from(v: Vec<f64>) -> Result<Self, String> {
        match v.as_slice() {
            [x, y] => Ok(Vec3([*x, *y, 0.0])),
            [x, y, z] => Ok(Vec3([*x, *y, *z])),
            _ => Err(format!("expected 2 or 3 numbers, got {}", v.len())),
        }
    }
}

impl From<Vec3> for Vec<f64> {
    fn from(v: Vec3) -> Self {
        v.0.to_vec()
    }
}

/// What to select. Geometric regions test each node against the tolerance.
#[derive(Debug, Clone, PartialEq, serde::Deserialize, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Selection {
    /// Inside the axis-aligned box (boundary included).
    Box {
        /// Corner with the smallest coordinates.
        min: Vec3,
        /// Corner with the largest coordinates.
        max: Vec3,
    },
    /// On the plane through `point` with normal `normal`. In 2-D a plane with
    /// normal in the x–y plane is a line.
    Plane {
        /// Any point of the plane.
        point: Vec3,
        /// Normal of the plane (need not be of unit length).
        normal: Vec3,
    },
    /// On the straight line through `point` along `direction`.
    Line {
        /// Any point of the line.
        point: Vec3,
        /// Direction of the line (need not be of unit length).
        direction: Vec3,
    },
    /// On the cylinder of `radius` around the axis through `point` along `axis`.
    Cylinder {
        /// Any point of the axis.
        point: Vec3,
        /// Direction of the axis (need not be of unit length).
        axis: Vec3,
        /// Radius of the cylinder, in mesh length units.
        radius: f64,
    },
    /// On the circle of `radius` around `center` in the x–y plane (2-D).
    Circle {
        /// Centre of the circle (its z is ignored).
        center: Vec3,
        /// Radius of the circle, in mesh length units.
        radius: f64,
    },
    /// The single node nearest to the point (for sides: the boundary side
    /// whose centre is nearest).
    Nearest(Vec3),
    /// A named set of the mesh (node, side or element set, see [`Mesh::nodes_of_set`]).
    Set(String),
    /// Everything any of the selections picks.
    Union(Vec<Selection>),
    /// Only what every one of the selections picks.
    Intersection(Vec<Selection>),
    /// The first selection minus all the others.
    Difference(Vec<Selection>),
}

fn sub(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}
fn dot(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}
fn unit(key: &str, v: [f64; 3]) -> Result<[f64; 3], MeshError> {
    let l = dot(v, v).sqrt();
    if !(l.is_finite() && l > 0.0) {
        return Err(MeshError::param(key, "must be a non-zero vector"));
    }
    Ok([v[0] / l, v[1] / l, v[2] / l])
}
/// Distance of `x` from the line through `p` along unit `d`.
fn line_distance(x: [f64; 3], p: [f64; 3], d: [f64; 3]) -> f64 {
    let r = sub(x, p);
    let t = dot(r, d);
    (dot(r, r) - t * t).max(0.0).sqrt()
}

/// A default tolerance: 1e-6 of the bounding-box diagonal.
pub fn default_tolerance(mesh: &Mesh) -> f64 {
    let (lo, hi) = mesh.bounding_box();
    let d = dot(sub(hi, lo), sub(hi, lo)).sqrt();
    if d.is_finite() {
        1e-6 * d
    } else {
        0.0
    }
}

/// A predicate on positions for a geometric selection, or `None` if `sel` is not geometric.
type Predicate = Box<dyn Fn([f64; 3]) -> bool>;

fn predicate(sel: &Selection, tol: f64) -> Result<Option<Predicate>, MeshError> {
    Ok(Some(match sel.clone() {
        Selection::Box { min, max } => Box::new(move |x| (0..3).all(|k| x[k] >= min.0[k] - tol && x[k] <= max.0[k] + tol)),
        Selection::Plane { point, normal } => {
            let n = unit("normal", normal.0)?;
            Box::new(move |x| dot(sub(x, point.0), n).abs() <= tol)
        }
        Selection::Line { point, direction } => {
            let d = unit("direction", direction.0)?;
            Box::new(move |x| line_distance(x, point.0, d) <= tol)
        }
        Selection::Cylinder { point, axis, radius } => {
            let a = unit("axis", axis.0)?;
            Box::new(move |x| (line_distance(x, point.0, a) - radius).abs() <= tol)
        }
        Selection::Circle { center, radius } => Box::new(move |x| {
            let r = sub(x, center.0);
            ((r[0] * r[0] + r[1] * r[1]).sqrt() - radius).abs() <= tol && r[2].abs() <= tol
        }),
        _ => return Ok(None),
    }))
}

/// Nodes selected by `sel`, sorted without repeats. `tol` is an absolute distance.
pub fn select_nodes(mesh: &Mesh, sel: &Selection, tol: f64) -> Result<Vec<usize>, MeshError> {
    if let Some(p) = predicate(sel, tol)? {
        return Ok((0..mesh.nodes.len()).filter(|&n| p(mesh.nodes[n])).collect());
    }
    Ok(match sel {
        Selection::Nearest(x) => nearest_node(mesh, x.0).into_iter().collect(),
        Selection::Set(name) => mesh.nodes_of_set(name).ok_or_else(|| MeshError::param("set", format!("no set named `{name}`")))?,
        Selection::Union(parts) | Selection::Intersection(parts) | Selection::Difference(parts) => {
            let lists = parts.iter().map(|p| select_nodes(mesh, p, tol)).collect::<Result<Vec<_>, _>>()?;
            combine(sel, lists)
        }
        _ => unreachable!("geometric selections are handled above"),
    })
}

/// Boundary sides selected by `sel` (all of a side's nodes selected), sorted.
pub fn select_sides(mesh: &Mesh, sel: &Selection, tol: f64) -> Result<Vec<Side>, MeshError> {
    match sel {
        Selection::Set(name) => {
            if let Some(s) = mesh.side_sets.get(name) {
                return Ok(s.clone());
            }
        }
        Selection::Nearest(x) => {
            let best = boundary_sides(mesh).into_iter().min_by(|&a, &b| {
                let d = |s: Side| {
                    let c = side_centre(mesh, s);
                    dot(sub(c, x.0), sub(c, x.0))
                };
                d(a).total_cmp(&d(b))
            });
            return Ok(best.into_iter().collect());
        }
        Selection::Union(parts) | Selection::Intersection(parts) | Selection::Difference(parts) => {
            let lists = parts.iter().map(|p| select_sides(mesh, p, tol)).collect::<Result<Vec<_>, _>>()?;
            return Ok(combine(sel, lists));
        }
        _ => {}
    }
    let nodes = select_nodes(mesh, sel, tol)?;
    let mut chosen = vec![false; mesh.nodes.len()];
    for n in nodes {
        chosen[n] = true;
    }
    Ok(boundary_sides(mesh).into_iter().filter(|&s| mesh.side_nodes(s).iter().all(|&n| chosen[n])).collect())
}

fn side_centre(mesh: &Mesh, s: Side) -> [f64; 3] {
    let nodes = mesh.side_nodes(s);
    let mut c = [0.0; 3];
    for &n in &nodes {
        for k in 0..3 {
            c[k] += mesh.nodes[n][k] / nodes.len() as f64;
        }
    }
    c
}

/// Applies a set operation to sorted lists.
fn combine<T: Ord + Copy>(sel: &Selection, lists: Vec<Vec<T>>) -> Vec<T> {
    let mut it = lists.into_iter();
    let Some(first) = it.next() else { return Vec::new() };
    it.fold(first, |acc, next| match sel {
        Selection::Union(_) => union(&acc, &next),
        Selection::Intersection(_) => intersection(&acc, &next),
        _ => difference(&acc, &next),
    })
}

/// Union of two sorted lists without repeats.
pub fn union<T: Ord + Copy>(a: &[T], b: &[T]) -> Vec<T> {
    let mut out: Vec<T> = a.iter().chain(b).copied().collect();
    out.sort_unstable();
    out.dedup();
    out
}

/// Members of sorted `a` also in sorted `b`.
pub fn intersection<T: Ord + Copy>(a: &[T], b: &[T]) -> Vec<T> {
    a.iter().copied().filter(|x| b.binary_search(x).is_ok()).collect()
}

/// Members of sorted `a` not in sorted `b`.
pub fn difference<T: Ord + Copy>(a: &[T], b: &[T]) -> Vec<T> {
    a.iter().copied().filter(|x| b.binary_search(x).is_err()).collect()
}

/// The node nearest to `x` (the first of equals), or `None` for an empty mesh.
pub fn nearest_node(mesh: &Mesh, x: [f64; 3]) -> Option<usize> {
    (0..mesh.nodes.len()).min_by(|&a, &b| {
        let d = |n: usize| dot(sub(mesh.nodes[n], x), sub(mesh.nodes[n], x));
        d(a).total_cmp(&d(b))
    })
}

/// Sides that belong to exactly one element (the mesh boundary), sorted.
pub fn boundary_sides(mesh: &Mesh) -> Vec<Side> {
    let mut count: HashMap<Vec<usize>, (usize, Side)> = HashMap::new();
    for e in 0..mesh.kinds.len() {
        for k in 0..mesh.kinds[e].sides().len() {
            let side = Side { element: e, local: k as u8 };
            count.entry(mesh.side_key(side)).or_insert((0, side)).0 += 1;
        }
    }
    let mut out: Vec<Side> = count.into_values().filter(|v| v.0 == 1).map(|v| v.1).collect();
    out.sort_unstable();
    out
}
