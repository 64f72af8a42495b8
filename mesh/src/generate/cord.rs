//! Circular sections meshed as an O-grid: the O-ring cord section and the
//! mount disc, and the solid cylinder made by extruding the disc.
//!
//! Layout: a curved-sided inner block of n × n elements and four outer blocks
//! of n × m elements, one per quadrant. The inner block's sides bulge halfway
//! between a square and a circle (β = 1/2), which makes its corner angle about
//! 119°, so the three elements meeting there each get close to 120°: no
//! element degenerates, and the worst Jacobian ratio does not grow under
//! refinement (checked in the tests). Outer-block grid lines are radial.

use std::f64::consts::FRAC_PI_4;

use super::extrude::extrude_named;
use super::{add_patch, check_divisions, check_finite, check_mesh_size, check_positive, finish, node_params, Order};
use crate::error::MeshError;
use crate::model::{Mesh, Side};

/// A circle of `radius` around `center` in the x–y (r–z) plane; extruded
/// along z by `height` for [`solid_cylinder`].
#[derive(Debug, Clone, PartialEq, serde::Deserialize, serde::Serialize)]
#[serde(default, deny_unknown_fields)]
pub struct CircleParams {
    /// Centre in the x–y plane. Default [0, 0].
    pub center: [f64; 2],
    /// Radius, length units. Default 1. (A job file may give `diameter` instead.)
    pub radius: f64,
    /// Diameter, length units; overrides `radius` when given. Default none.
    pub diameter: Option<f64>,
    /// Elements around the circumference; a multiple of 4, at least 4. Default 16.
    pub divisions: usize,
    /// Element layers between the inner block and the surface. Default none =
    /// about divisions / 8, which keeps elements near square.
    pub radial_divisions: Option<usize>,
    /// Cylinder length along z (solid cylinder only). Default 1.
    pub height: f64,
    /// Elements along z (solid cylinder only). Default 4.
    pub axial_divisions: usize,
    /// Element order. Default linear.
    pub order: Order,
    /// Triangles instead of quads. Default false.
    pub triangles: bool,
}

impl Default for CircleParams {
    fn default() -> Self {
        CircleParams {
            center: [0.0, 0.0],
            radius: 1.0,
            diameter: None,
            divisions: 16,
            radial_divisions: None,
            height: 1.0,
            axial_divisions: 4,
            order: Order::Linear,
            triangles: false,
        }
    }
}

impl CircleParams {
    /// The radius after applying `diameter`, if given.
    pub fn effective_radius(&self) -> f64 {
        self.diameter.map_or(self.radius, |d| 0.5 * d)
    }
}

/// Half-width of the inner block at its side centres, as a fraction of the radius.
const INNER: f64 = 0.5;
/// Blend between a square (0) and a circle (1) for the inner block's sides.
const BULGE: f64 = 0.5;

/// Builds the O-grid; returns the surface sides of the four quadrants
/// (centred on +x, +y, −x, −y).
fn ogrid(mesh: &mut Mesh, p: &CircleParams) -> Result<[Vec<Side>; 4], MeshError> {
    let r = p.effective_radius();
    check_positive("radius", r)?;
    if p.divisions < 4 || p.divisions & 3 != 0 {
        return Err(MeshError::param("divisions", format!("must be a multiple of 4, got {}", p.divisions)));
    }
    check_divisions("divisions", p.divisions)?;
    let n = p.divisions / 4;
    let m = p.radial_divisions.unwrap_or(n.div_ceil(2).max(1));
    check_divisions("radial_divisions", m)?;
    check_finite("center", &p.center)?;
    let (nu, mu) = (n as u128, m as u128);
    check_mesh_size("divisions", &format!("divisions {} with {m} radial", p.divisions), nu * nu + 4 * nu * mu, p.order)?;
    let [cx, cy] = p.center;
    let a = INNER * r;
    // Inner-block boundary, quadrant k, position s in [-1, 1] (counter-clockwise).
    let rho = |s: f64| a * ((1.0 - BULGE) / (s * FRAC_PI_4).cos() + BULGE);
    let polar = |k: usize, s: f64, radius: f64| {
        let t = (2 * k) as f64 * FRAC_PI_4 + s * FRAC_PI_4;
        [cx + radius * t.cos(), cy + radius * t.sin()]
    };
    let edge = |k: usize, s: f64| polar(k, s, rho(s));
    let steps = p.order.steps();
    let ts = node_params(n, steps, 1.0, false);
    // Inner block by transfinite (Coons) interpolation of its four sides.
    let right = |v: f64| edge(0, 2.0 * v - 1.0);
    let top = |u: f64| edge(1, 1.0 - 2.0 * u);
    let left = |v: f64| edge(2, 1.0 - 2.0 * v);
    let bottom = |u: f64| edge(3, 2.0 * u - 1.0);
    let (c00, c10, c01, c11) = (bottom(0.0), bottom(1.0), top(0.0), top(1.0));
    add_patch(mesh, &ts, &ts, p.order, p.triangles, |u, v| {
        let (l, rr, b, t) = (left(v), right(v), bottom(u), top(u));
        let f = |k: usize| {
            (1.0 - u) * l[k] + u * rr[k] + (1.0 - v) * b[k] + v * t[k]
                - ((1.0 - u) * (1.0 - v) * c00[k] + u * (1.0 - v) * c10[k] + (1.0 - u) * v * c01[k] + u * v * c11[k])
        };
        [f(0), f(1)]
    });
    let rs = node_params(m, steps, 1.0, false);
    let mut arcs: [Vec<Side>; 4] = Default::default();
    for (k, arc) in arcs.iter_mut().enumerate() {
        // u runs outward along a ray, v counter-clockwise: orientation kept.
        let patch = add_patch(mesh, &rs, &ts, p.order, p.triangles, |u, v| {
            let s = 2.0 * v - 1.0;
            polar(k, s, (1.0 - u) * rho(s) + u * r)
        });
        let [_, outer, _, _] = patch.edges;
        *arc = outer;
    }
    Ok(arcs)
}

/// O-ring cord section. Side/node sets: `surface` (the whole circle) and its
/// quarters `outer` (facing +x, i.e. larger r), `top`, `inner`, `bottom`.
pub fn cord(p: &CircleParams) -> Result<Mesh, MeshError> {
    let mut mesh = Mesh::new(2);
    let arcs = ogrid(&mut mesh, p)?;
    let surface: Vec<Side> = arcs.iter().flatten().copied().collect();
    for (name, arc) in ["outer", "top", "inner", "bottom"].iter().zip(arcs) {
        mesh.side_sets.insert(name.to_string(), arc);
    }
    mesh.side_sets.insert("surface".into(), surface);
    Ok(finish(mesh, p.effective_radius()))
}

/// Disc (mount plan view) with the side/node set `outer`.
pub fn disc(p: &CircleParams) -> Result<Mesh, MeshError> {
    let mut mesh = Mesh::new(2);
    let arcs = ogrid(&mut mesh, p)?;
    mesh.side_sets.insert("outer".into(), arcs.concat());
    Ok(finish(mesh, p.effective_radius()))
}

/// Solid cylinder: the disc extruded from z = 0 to `height`; sets `outer`,
/// `bottom`, `top`.
pub fn solid_cylinder(p: &CircleParams) -> Result<Mesh, MeshError> {
    check_positive("height", p.height)?;
    check_divisions("axial_divisions", p.axial_divisions)?;
    let n = (p.divisions / 4) as u128;
    let m = p.radial_divisions.map_or(n.div_ceil(2).max(1), |m| m as u128);
    let asked = format!("divisions {} with {m} radial and {} axial", p.divisions, p.axial_divisions);
    check_mesh_size("axial_divisions", &asked, (n * n + 4 * n * m) * p.axial_divisions as u128, p.order)?;
    let section = disc(p)?;
    let mesh = extrude_named(&section, p.height, p.axial_divisions, ("bottom", "top"))?;
    Ok(finish(mesh, p.effective_radius().max(p.height)))
}
