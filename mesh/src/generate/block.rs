//! Block: a rectangular rubber pad or a test specimen in 3-D.

use super::extrude::extrude_named;
use super::rectangle::graded_params;
use super::tets::split_hexes;
use super::{add_patch, check_divisions, check_finite, check_mesh_size, check_positive, finish, node_params, Face, Grading, Order};
use crate::error::MeshError;
use crate::model::Mesh;

/// A box `origin + [0, size]` with structured hexahedra (or wedges).
#[derive(Debug, Clone, PartialEq, serde::Deserialize, serde::Serialize)]
#[serde(default, deny_unknown_fields)]
pub struct BlockParams {
    /// Corner with the smallest coordinates. Default [0, 0, 0].
    pub origin: [f64; 3],
    /// Edge lengths along x, y, z. Default [1, 1, 1].
    pub size: [f64; 3],
    /// Elements along x, y, z. Default [4, 4, 4].
    pub divisions: [usize; 3],
    /// Element order. Default linear.
    pub order: Order,
    /// Wedges (two per hex) instead of hexahedra; linear only. Default false.
    pub triangles: bool,
    /// Optional grading toward any face. Default none (uniform).
    pub grading: Option<Grading>,
    /// Six tetrahedra per hex (tet4, or tet10 for either quadratic order). Default false.
    pub tetrahedra: bool,
}

impl Default for BlockParams {
    fn default() -> Self {
        BlockParams {
            origin: [0.0; 3],
            size: [1.0; 3],
            divisions: [4; 3],
            order: Order::Linear,
            triangles: false,
            grading: None,
            tetrahedra: false,
        }
    }
}

/// Structured block with side/node sets `left` (x min), `right`, `front`
/// (y min), `back`, `bottom` (z min), `top`.
pub fn block(p: &BlockParams) -> Result<Mesh, MeshError> {
    for k in 0..3 {
        check_positive(&format!("size[{k}]"), p.size[k])?;
        check_divisions(&format!("divisions[{k}]"), p.divisions[k])?;
    }
    check_finite("origin", &p.origin)?;
    let [n0, n1, n2] = p.divisions.map(|n| n as u128);
    let per_box = if p.tetrahedra {
        6
    } else if p.triangles {
        2
    } else {
        1
    };
    check_mesh_size("divisions", &format!("divisions {n0} × {n1} × {n2}"), n0 * n1 * n2 * per_box, p.order)?;
    if p.triangles && p.tetrahedra {
        return Err(MeshError::param("tetrahedra", "choose either wedges (triangles) or tetrahedra"));
    }
    // Tet10s take their mid-face nodes from a hex27 grid.
    let order = if p.tetrahedra && p.order == Order::Quadratic { Order::QuadraticFull } else { p.order };
    if p.triangles && p.order != Order::Linear {
        return Err(MeshError::param("triangles", "quadratic wedges are not supported; use hexahedra"));
    }
    let in_plane = p.grading.filter(|g| !matches!(g.toward, Face::Bottom | Face::Top));
    let faces = [Face::Left, Face::Right, Face::Front, Face::Back];
    let (us, vs) = graded_params([p.divisions[0], p.divisions[1]], order.steps(), in_plane, faces)?;
    let mut section = Mesh::new(2);
    let [w, d, h] = p.size;
    let patch = add_patch(&mut section, &us, &vs, order, p.triangles, |u, v| [w * u, d * v]);
    for (name, sides) in ["front", "right", "back", "left"].iter().zip(patch.edges) {
        section.side_sets.insert(name.to_string(), sides);
    }
    let section = finish(section, w.max(d));
    let mut mesh = extrude_named(&section, h, p.divisions[2], ("bottom", "top"))?;
    if let Some(g) = p.grading.filter(|g| matches!(g.toward, Face::Bottom | Face::Top)) {
        if !(g.ratio.is_finite() && g.ratio >= 1.0) {
            return Err(MeshError::param("grading.ratio", format!("must be ≥ 1, got {}", g.ratio)));
        }
        // Re-place z with the graded parameters (extrusion used uniform layers).
        let uniform = node_params(p.divisions[2], order.steps(), 1.0, false);
        let graded = node_params(p.divisions[2], order.steps(), g.ratio, g.toward == Face::Top);
        for x in mesh.nodes.iter_mut() {
            let t = x[2] / h;
            let l = uniform.iter().position(|&s| (s - t).abs() < 1e-9).unwrap_or(0);
            x[2] = h * graded[l];
        }
    }
    for x in mesh.nodes.iter_mut() {
        for k in 0..3 {
            x[k] += p.origin[k];
        }
    }
    if p.tetrahedra {
        mesh = split_hexes(&mesh);
    }
    Ok(finish(mesh, w.max(d).max(h)))
}
