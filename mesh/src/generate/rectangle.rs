//! Rectangle: the r–z section of a bonded disc mount or a plane-strain strip.

use super::{add_patch, check_divisions, check_finite, check_mesh_size, check_positive, finish, node_params, Face, Grading, Order};
use crate::error::MeshError;
use crate::model::Mesh;

/// A rectangle `[x0, x0 + width] × [y0, y0 + height]` in the x–y (r–z) plane.
#[derive(Debug, Clone, PartialEq, serde::Deserialize, serde::Serialize)]
#[serde(default, deny_unknown_fields)]
pub struct RectangleParams {
    /// Lower-left corner. Default [0, 0].
    pub origin: [f64; 2],
    /// Width (x) and height (y), length units. Default [1, 1].
    pub size: [f64; 2],
    /// Elements along x and y. Default [4, 4].
    pub divisions: [usize; 2],
    /// Element order. Default linear.
    pub order: Order,
    /// Split every quad into two triangles (tri3 / tri6). Default false.
    pub triangles: bool,
    /// Optional grading toward `left`, `right`, `bottom` or `top`. Default none (uniform).
    pub grading: Option<Grading>,
}

impl Default for RectangleParams {
    fn default() -> Self {
        RectangleParams { origin: [0.0, 0.0], size: [1.0, 1.0], divisions: [4, 4], order: Order::Linear, triangles: false, grading: None }
    }
}

/// Parameter lists along x and y with the requested grading applied.
pub(crate) fn graded_params(
    divisions: [usize; 2],
    steps: usize,
    grading: Option<Grading>,
    faces: [Face; 4],
) -> Result<(Vec<f64>, Vec<f64>), MeshError> {
    let (mut rx, mut ry) = ((1.0, false), (1.0, false));
    if let Some(g) = grading {
        if !(g.ratio.is_finite() && g.ratio >= 1.0) {
            return Err(MeshError::param("grading.ratio", format!("must be ≥ 1, got {}", g.ratio)));
        }
        // faces = [low x, high x, low y, high y]
        match faces.iter().position(|&f| f == g.toward) {
            Some(0) => rx = (g.ratio, false),
            Some(1) => rx = (g.ratio, true),
            Some(2) => ry = (g.ratio, false),
            Some(3) => ry = (g.ratio, true),
            _ => return Err(MeshError::param("grading.toward", format!("{:?} is not a face of this shape", g.toward))),
        }
    }
    Ok((node_params(divisions[0], steps, rx.0, rx.1), node_params(divisions[1], steps, ry.0, ry.1)))
}

/// Structured rectangle with side and node sets `bottom`, `right`, `top`, `left`.
pub fn rectangle(p: &RectangleParams) -> Result<Mesh, MeshError> {
    check_positive("size[0]", p.size[0])?;
    check_positive("size[1]", p.size[1])?;
    check_divisions("divisions[0]", p.divisions[0])?;
    check_divisions("divisions[1]", p.divisions[1])?;
    check_finite("origin", &p.origin)?;
    let [n0, n1] = p.divisions.map(|n| n as u128);
    check_mesh_size("divisions", &format!("divisions {n0} × {n1}"), n0 * n1 * (1 + p.triangles as u128), p.order)?;
    let faces = [Face::Left, Face::Right, Face::Bottom, Face::Top];
    let (us, vs) = graded_params(p.divisions, p.order.steps(), p.grading, faces)?;
    let mut mesh = Mesh::new(2);
    let [x0, y0] = p.origin;
    let [w, h] = p.size;
    let patch = add_patch(&mut mesh, &us, &vs, p.order, p.triangles, |u, v| [x0 + w * u, y0 + h * v]);
    for (name, sides) in ["bottom", "right", "top", "left"].iter().zip(patch.edges) {
        mesh.side_sets.insert(name.to_string(), sides);
    }
    Ok(finish(mesh, w.max(h)))
}
