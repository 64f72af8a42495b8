//! Annulus (ring or ring sector) in the x–y plane and the hollow cylinder made
//! by extruding it: the cross-section and body of a bushing.

use std::f64::consts::PI;

use super::extrude::extrude_named;
use super::{add_patch, check_divisions, check_finite, check_mesh_size, check_positive, finish, node_params, Order};
use crate::error::MeshError;
use crate::model::Mesh;

/// A ring `inner_radius ≤ r ≤ outer_radius` around `center`, over `angle`
/// degrees counter-clockwise from `start_angle`; extruded along z by
/// `height` for [`hollow_cylinder`].
#[derive(Debug, Clone, PartialEq, serde::Deserialize, serde::Serialize)]
#[serde(default, deny_unknown_fields)]
pub struct AnnulusParams {
    /// Centre in the x–y plane. Default [0, 0].
    pub center: [f64; 2],
    /// Inner radius, length units. Default 0.5.
    pub inner_radius: f64,
    /// Outer radius, length units. Default 1.
    pub outer_radius: f64,
    /// Angle covered, degrees, in (0, 360]. Default 360 (closed ring, no `start`/`end` sets).
    pub angle: f64,
    /// Angle of the first radial edge, degrees from +x. Default 0.
    pub start_angle: f64,
    /// Elements across the wall. Default 2.
    pub radial_divisions: usize,
    /// Elements around the ring (or sector). Default 16.
    pub circumferential_divisions: usize,
    /// Cylinder length along z (hollow cylinder only). Default 1.
    pub height: f64,
    /// Elements along z (hollow cylinder only). Default 4.
    pub axial_divisions: usize,
    /// Element order. Default linear.
    pub order: Order,
    /// Triangles (tri3 / tri6; wedge6 when extruded) instead of quads. Default false.
    pub triangles: bool,
}

impl Default for AnnulusParams {
    fn default() -> Self {
        AnnulusParams {
            center: [0.0, 0.0],
            inner_radius: 0.5,
            outer_radius: 1.0,
            angle: 360.0,
            start_angle: 0.0,
            radial_divisions: 2,
            circumferential_divisions: 16,
            height: 1.0,
            axial_divisions: 4,
            order: Order::Linear,
            triangles: false,
        }
    }
}

fn full_circle(angle: f64) -> bool {
    (angle - 360.0).abs() < 1e-9
}

/// Ring section with side/node sets `inner`, `outer` and, for a sector,
/// `start` and `end` (the radial edges at `start_angle` and `start_angle + angle`).
pub fn annulus(p: &AnnulusParams) -> Result<Mesh, MeshError> {
    check_positive("inner_radius", p.inner_radius)?;
    check_positive("outer_radius", p.outer_radius)?;
    if p.outer_radius <= p.inner_radius {
        return Err(MeshError::param("outer_radius", "must exceed inner_radius"));
    }
    if !(p.angle > 0.0 && p.angle <= 360.0 + 1e-9) {
        return Err(MeshError::param("angle", format!("must be in (0, 360] degrees, got {}", p.angle)));
    }
    check_divisions("radial_divisions", p.radial_divisions)?;
    check_divisions("circumferential_divisions", p.circumferential_divisions)?;
    check_finite("center", &p.center)?;
    let (nr, nc) = (p.radial_divisions as u128, p.circumferential_divisions as u128);
    check_mesh_size("circumferential_divisions", &format!("divisions {nr} × {nc}"), nr * nc * (1 + p.triangles as u128), p.order)?;
    if full_circle(p.angle) && p.circumferential_divisions < 3 {
        return Err(MeshError::param("circumferential_divisions", "a closed ring needs at least 3"));
    }
    let steps = p.order.steps();
    let us = node_params(p.radial_divisions, steps, 1.0, false);
    let vs = node_params(p.circumferential_divisions, steps, 1.0, false);
    let (ri, ro) = (p.inner_radius, p.outer_radius);
    let (t0, dt) = (p.start_angle * PI / 180.0, p.angle * PI / 180.0);
    let [cx, cy] = p.center;
    let mut mesh = Mesh::new(2);
    // u runs outward and v counter-clockwise, so the map keeps orientation.
    let patch = add_patch(&mut mesh, &us, &vs, p.order, p.triangles, |u, v| {
        let (r, t) = (ri + (ro - ri) * u, t0 + dt * v);
        [cx + r * t.cos(), cy + r * t.sin()]
    });
    let [start, outer, end, inner] = patch.edges;
    mesh.side_sets.insert("inner".into(), inner);
    mesh.side_sets.insert("outer".into(), outer);
    if !full_circle(p.angle) {
        mesh.side_sets.insert("start".into(), start);
        mesh.side_sets.insert("end".into(), end);
    }
    Ok(finish(mesh, ro))
}

/// Bushing body: the annulus extruded from z = 0 to z = `height`, with sets
/// `inner`, `outer`, `bottom` (z = 0), `top` and, for a sector, `start`, `end`.
pub fn hollow_cylinder(p: &AnnulusParams) -> Result<Mesh, MeshError> {
    check_positive("height", p.height)?;
    check_divisions("axial_divisions", p.axial_divisions)?;
    let (nr, nc, na) = (p.radial_divisions as u128, p.circumferential_divisions as u128, p.axial_divisions as u128);
    check_mesh_size("axial_divisions", &format!("divisions {nr} × {nc} × {na}"), nr * nc * na * (1 + p.triangles as u128), p.order)?;
    let section = annulus(p)?;
    let mesh = extrude_named(&section, p.height, p.axial_divisions, ("bottom", "top"))?;
    Ok(finish(mesh, p.outer_radius.max(p.height)))
}
