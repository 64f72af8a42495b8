//! Turning a 2-D section into a 3-D mesh: straight extrusion along z, and
//! sweeping an axisymmetric r–z section around the axis.
//!
//! quad4 → hex8, quad8 → hex20, quad9 → hex27, tri3 → wedge6. Side sets of the
//! section become the faces swept from those edges, node and element sets are
//! carried to every layer, and the two end caps get their own side sets.

use std::f64::consts::PI;

use super::{check_divisions, check_mesh_size, check_positive, finish, node_params, Order};
use crate::element::ElementKind;
use crate::error::MeshError;
use crate::model::{Mesh, Side};

/// Extrudes a 2-D section from z = 0 to z = `length` in `layers` element
/// layers. The caps get side/node sets `start` (z = 0) and `end`.
pub fn extrude(section: &Mesh, length: f64, layers: usize) -> Result<Mesh, MeshError> {
    let mesh = extrude_named(section, length, layers, ("start", "end"))?;
    let (lo, hi) = section.bounding_box();
    let size = (0..2).map(|k| hi[k] - lo[k]).fold(length, f64::max);
    Ok(finish(mesh, size))
}

/// [`extrude`] with chosen names for the two caps, without the final stitching.
pub(crate) fn extrude_named(section: &Mesh, length: f64, layers: usize, caps: (&str, &str)) -> Result<Mesh, MeshError> {
    check_positive("length", length)?;
    check_divisions("layers", layers)?;
    let steps = section_steps(section)?;
    let elements = section.element_count() as u128 * layers as u128;
    check_mesh_size("layers", &format!("{} section elements × {layers} layers", section.element_count()), elements, order_of(steps))?;
    let ts = node_params(layers, steps, 1.0, false);
    build(section, &ts, steps, false, |p, t| [p[0], p[1], length * t], Some(caps))
}

/// Sweeps an axisymmetric r–z section (x = r > 0, y = z) around the axis by
/// `angle` degrees in `divisions` element layers. The 3-D axis is z; the
/// section starts in the x–z plane and turns toward +y. A partial sweep gets
/// the side/node sets `start` (angle 0) and `end`; a full one is closed.
pub fn sweep(section: &Mesh, angle: f64, divisions: usize) -> Result<Mesh, MeshError> {
    if !(angle > 0.0 && angle <= 360.0 + 1e-9) {
        return Err(MeshError::param("angle", format!("must be in (0, 360] degrees, got {angle}")));
    }
    check_divisions("divisions", divisions)?;
    let full = (angle - 360.0).abs() < 1e-9;
    if full && divisions < 3 {
        return Err(MeshError::param("divisions", "a full sweep needs at least 3"));
    }
    let (lo, hi) = section.bounding_box();
    let size = (hi[0] - lo[0]).max(hi[1] - lo[1]).max(hi[0].abs());
    if section.nodes.iter().any(|x| x[0] <= 1e-9 * size) {
        return Err(MeshError::param(
            "section",
            "every node needs r = x > 0 to sweep (a section touching the axis would give collapsed elements); \
             use the solid cylinder generator for parts on the axis",
        ));
    }
    let steps = section_steps(section)?;
    let elements = section.element_count() as u128 * divisions as u128;
    check_mesh_size(
        "divisions",
        &format!("{} section elements × {divisions} divisions", section.element_count()),
        elements,
        order_of(steps),
    )?;
    let ts = node_params(divisions, steps, 1.0, false);
    let a = angle * PI / 180.0;
    let caps = if full { None } else { Some(("start", "end")) };
    // Sweeping turns the section's counter-clockwise normal (−y at angle 0)
    // against the sweep direction (+y), so elements take layers in reverse.
    let mesh = build(
        section,
        &ts,
        steps,
        true,
        |p, t| {
            let phi = a * t;
            [p[0] * phi.cos(), p[0] * phi.sin(), p[1]]
        },
        caps,
    )?;
    Ok(finish(mesh, size))
}

/// 1 if every element is linear, 2 if every element is quadratic.
fn section_steps(section: &Mesh) -> Result<usize, MeshError> {
    if section.dimension != 2 {
        return Err(MeshError::param("section", "must be a 2-D mesh"));
    }
    let mut steps = None;
    for &k in &section.kinds {
        let s = match k {
            ElementKind::Quad4 | ElementKind::Tri3 => 1,
            ElementKind::Quad8 | ElementKind::Quad9 => 2,
            other => return Err(MeshError::param("section", format!("cannot extrude {other} elements (no 3-D counterpart)"))),
        };
        if steps.is_some_and(|x| x != s) {
            return Err(MeshError::param("section", "mixes linear and quadratic elements"));
        }
        steps = Some(s);
    }
    steps.ok_or_else(|| MeshError::param("section", "has no elements"))
}

/// Builds the layered mesh. `ts` are node-layer parameters, `place` puts a
/// section point at a layer parameter, `flip` swaps the lower and upper layer
/// of each element (for maps that reverse orientation).
fn build(
    section: &Mesh,
    ts: &[f64],
    steps: usize,
    flip: bool,
    place: impl Fn([f64; 3], f64) -> [f64; 3],
    caps: Option<(&str, &str)>,
) -> Result<Mesh, MeshError> {
    let nl = ts.len();
    let layers = (nl - 1) / steps;
    let mut mesh = Mesh::new(3);
    let mut ids = vec![usize::MAX; section.nodes.len() * nl];
    let mut node = |mesh: &mut Mesh, n: usize, l: usize| {
        let k = n * nl + l;
        if ids[k] == usize::MAX {
            ids[k] = mesh.add_node(place(section.nodes[n], ts[l]));
        }
        ids[k]
    };
    let ne = section.kinds.len();
    let mut conn = Vec::with_capacity(27);
    for k in 0..layers {
        let (mut lo, mid, mut hi) = (k * steps, k * steps + steps / 2, (k + 1) * steps);
        if flip {
            std::mem::swap(&mut lo, &mut hi);
        }
        for e in 0..ne {
            let q = section.element_nodes(e);
            conn.clear();
            let kind = match section.kinds[e] {
                ElementKind::Tri3 => {
                    // VTK wedges want the base triangle facing away from the other one.
                    for l in [hi, lo] {
                        conn.extend(q.iter().map(|&n| node(&mut mesh, n, l)));
                    }
                    ElementKind::Wedge6
                }
                ElementKind::Quad4 => {
                    for l in [lo, hi] {
                        conn.extend(q.iter().map(|&n| node(&mut mesh, n, l)));
                    }
                    ElementKind::Hex8
                }
                kind => {
                    for l in [lo, hi] {
                        conn.extend(q[..4].iter().map(|&n| node(&mut mesh, n, l)));
                    }
                    for l in [lo, hi] {
                        conn.extend(q[4..8].iter().map(|&n| node(&mut mesh, n, l)));
                    }
                    conn.extend(q[..4].iter().map(|&n| node(&mut mesh, n, mid)));
                    if kind == ElementKind::Quad8 {
                        ElementKind::Hex20
                    } else {
                        // Face centres in VTK order: x-min (edge 3), x-max (edge 1),
                        // y-min (edge 0), y-max (edge 2), bottom, top; then the centre.
                        for i in [7, 5, 4, 6] {
                            conn.push(node(&mut mesh, q[i], mid));
                        }
                        conn.push(node(&mut mesh, q[8], lo));
                        conn.push(node(&mut mesh, q[8], hi));
                        conn.push(node(&mut mesh, q[8], mid));
                        ElementKind::Hex27
                    }
                }
            };
            mesh.add_element(kind, &conn);
        }
    }
    let element = |k: usize, e: usize| k * ne + e;
    for (name, sides) in &section.side_sets {
        let mut out = Vec::with_capacity(sides.len() * layers);
        for k in 0..layers {
            out.extend(sides.iter().map(|s| Side { element: element(k, s.element), local: s.local + 2 }));
        }
        mesh.side_sets.insert(name.clone(), out);
    }
    if let Some((start, end)) = caps {
        // Cap faces: hex face 0 is the `lo` quad, wedge face 1 is the `lo` triangle.
        let cap = |k: usize, at_lo: bool| -> Vec<Side> {
            (0..ne)
                .map(|e| {
                    let wedge = section.kinds[e] == ElementKind::Tri3;
                    let lo_face = if wedge { 1 } else { 0 };
                    let local = if at_lo { lo_face } else { 1 - lo_face };
                    Side { element: element(k, e), local }
                })
                .collect()
        };
        // The first layer touches t = 0 on its `lo` side unless flipped.
        mesh.side_sets.insert(start.into(), cap(0, !flip));
        mesh.side_sets.insert(end.into(), cap(layers - 1, flip));
    }
    for (name, elems) in &section.element_sets {
        let out = (0..layers).flat_map(|k| elems.iter().map(move |&e| element(k, e))).collect();
        mesh.element_sets.insert(name.clone(), out);
    }
    for (name, nodes) in &section.node_sets {
        if section.side_sets.contains_key(name) {
            continue;
        }
        let mut out: Vec<usize> =
            nodes.iter().flat_map(|&n| (0..nl).map(move |l| n * nl + l)).map(|k| ids[k]).filter(|&i| i != usize::MAX).collect();
        out.sort_unstable();
        mesh.node_sets.insert(name.clone(), out);
    }
    Ok(mesh)
}

/// The order whose elements have `steps` node steps per edge (for size estimates).
fn order_of(steps: usize) -> Order {
    if steps == 1 {
        Order::Linear
    } else {
        Order::QuadraticFull
    }
}
