//! The deformed shape filled with a contour of a result field: in 2-D the
//! section with its undeformed outline (and the rigid surfaces, when the job
//! is at hand); in 3-D the outer surface seen along an axis, nearer faces
//! painted over farther ones.

use olli_mesh::select::boundary_sides;
use olli_mesh::Mesh;

use super::results::Frame;
use crate::plot::{Axis, ColorMap, ContourPlot, LineKind, Outline};

/// A field that can be contoured: array name, quantity, unit.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, clap::ValueEnum)]
pub enum Field {
    /// Largest principal logarithmic strain (default).
    #[default]
    MaxPrincipalLogStrain,
    /// Von Mises equivalent stress.
    VonMises,
    /// Hydrostatic pressure, positive in compression.
    Pressure,
    /// Strain energy per unit reference volume.
    EnergyDensity,
}

impl Field {
    /// Name of the `.vtu` point array.
    pub fn array(self) -> &'static str {
        match self {
            Field::MaxPrincipalLogStrain => "max_principal_log_strain",
            Field::VonMises => "von_mises",
            Field::Pressure => "pressure",
            Field::EnergyDensity => "energy_density",
        }
    }

    /// Quantity and unit for the colour bar (F, L: the job's force and length units).
    pub fn axis(self) -> Axis {
        match self {
            Field::MaxPrincipalLogStrain => Axis::new("max principal log strain", ""),
            Field::VonMises => Axis::new("von Mises stress", "F/L²"),
            Field::Pressure => Axis::new("pressure (compression +)", "F/L²"),
            Field::EnergyDensity => Axis::new("strain energy density", "F·L/L³"),
        }
    }
}

/// Axis a 3-D part is seen along.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum View {
    /// Along x: the y–z plane is drawn.
    X,
    /// Along y: the x–z plane is drawn.
    Y,
    /// Along z: the x–y plane is drawn.
    Z,
}

impl View {
    /// (right, up, depth) coordinate indices and the sign making larger depth nearer.
    pub(crate) fn axes(self) -> (usize, usize, usize, f64) {
        match self {
            View::X => (1, 2, 0, 1.0),
            // Seen from −y so that x runs right and z up.
            View::Y => (0, 2, 1, -1.0),
            View::Z => (0, 1, 2, 1.0),
        }
    }

    /// The default view of a 3-D part: along its thinnest direction, unless
    /// the part moves mostly that way (a mount pressed along its axis is
    /// seen from the side), then along the next thinnest.
    pub fn choose(mesh: &Mesh, deformed: &[[f64; 3]]) -> View {
        let (lo, hi) = mesh.bounding_box();
        let mut order = [0usize, 1, 2];
        order.sort_by(|&a, &b| (hi[a] - lo[a]).total_cmp(&(hi[b] - lo[b])));
        let mut travel = [0.0f64; 3];
        for (x, y) in mesh.nodes.iter().zip(deformed) {
            for k in 0..3 {
                travel[k] = travel[k].max((y[k] - x[k]).abs());
            }
        }
        let most = (0..3).max_by(|&a, &b| travel[a].total_cmp(&travel[b])).unwrap_or(2);
        let axis = if order[0] == most && travel[most] > 0.0 { order[1] } else { order[0] };
        [View::X, View::Y, View::Z][axis]
    }

    /// The axis letter, as on the command line.
    pub fn name(self) -> &'static str {
        match self {
            View::X => "x",
            View::Y => "y",
            View::Z => "z",
        }
    }
}

/// Corner nodes of a side, with a quadratic side's mid node between its ends (2-D).
fn side_path(nodes: &[usize]) -> Vec<usize> {
    match nodes.len() {
        3 => vec![nodes[0], nodes[2], nodes[1]],
        _ => nodes.to_vec(),
    }
}

/// Corner count of a 3-D face from its node count (tri 3/6, quad 4/8/9).
fn face_corners(nodes: &[usize]) -> &[usize] {
    match nodes.len() {
        3 | 6 => &nodes[..3],
        _ => &nodes[..4],
    }
}

/// Draws the rigid-surface polylines over `plot`, naming each surface once
/// in the legend (a surface may come as several polylines).
fn add_rigid(plot: &mut ContourPlot, rigid: &[(String, Vec<[f64; 2]>)]) {
    for (i, (name, points)) in rigid.iter().enumerate() {
        let first = rigid[..i].iter().all(|(other, _)| other != name);
        let label = if first { format!("rigid `{name}`") } else { String::new() };
        plot.outlines.push(Outline { points: points.clone(), kind: LineKind::Rigid, label });
    }
}

/// The contour picture of `field` on `frame`; `None` when the frame lacks the field.
/// `rigid` are rigid-surface polylines in drawing coordinates with their
/// names (in 3-D, drawn for the plane of `view`: pass the view they were made for).
pub fn section_plot(
    frame: &Frame,
    field: Field,
    title: &str,
    analysis: &str,
    colors: ColorMap,
    view: Option<View>,
    rigid: &[(String, Vec<[f64; 2]>)],
) -> Option<(ContourPlot, Option<View>)> {
    let values = frame.array(field.array()).filter(|a| a.components == 1)?.values.clone();
    let mesh = &frame.mesh;
    let current = frame.deformed();
    let boundary = boundary_sides(mesh);
    if mesh.dimension == 2 {
        let names = if analysis == "axisymmetric" { ("r", "z") } else { ("x", "y") };
        let nodes: Vec<[f64; 2]> = current.iter().map(|x| [x[0], x[1]]).collect();
        let cells = (0..mesh.element_count()).map(|e| mesh.element_nodes(e)[..mesh.kinds[e].corner_count()].to_vec()).collect();
        let mut plot = ContourPlot::new(title, Axis::new(names.0, "L"), Axis::new(names.1, "L"), field.axis(), nodes, values, cells);
        for (i, s) in boundary.iter().enumerate() {
            let path = side_path(&mesh.side_nodes(*s));
            let label = if i == 0 { "undeformed" } else { "" };
            plot.outlines.push(Outline {
                points: path.iter().map(|&n| [mesh.nodes[n][0], mesh.nodes[n][1]]).collect(),
                kind: LineKind::Undeformed,
                label: label.into(),
            });
            plot.outlines.push(Outline {
                points: path.iter().map(|&n| [current[n][0], current[n][1]]).collect(),
                kind: LineKind::Edge,
                label: String::new(),
            });
        }
        add_rigid(&mut plot, rigid);
        plot.colors = colors;
        return Some((plot, None));
    }
    let view = view.unwrap_or_else(|| View::choose(mesh, &current));
    let (right, up, depth, sign) = view.axes();
    let mut faces: Vec<(f64, Vec<usize>)> = boundary
        .iter()
        .map(|s| {
            let nodes = mesh.side_nodes(*s);
            let corners = face_corners(&nodes).to_vec();
            let d = corners.iter().map(|&n| sign * current[n][depth]).sum::<f64>() / corners.len() as f64;
            (d, corners)
        })
        .collect();
    faces.sort_by(|a, b| a.0.total_cmp(&b.0));
    let axis_name = |k: usize| ["x", "y", "z"][k];
    let nodes: Vec<[f64; 2]> = current.iter().map(|x| [x[right], x[up]]).collect();
    let cells = faces.into_iter().map(|(_, c)| c).collect();
    let mut plot = ContourPlot::new(
        format!("{title}, outer surface seen along {}", view.name()),
        Axis::new(axis_name(right), "L"),
        Axis::new(axis_name(up), "L"),
        field.axis(),
        nodes,
        values,
        cells,
    );
    add_rigid(&mut plot, rigid);
    plot.colors = colors;
    Some((plot, Some(view)))
}

#[cfg(test)]
mod tests {
    use super::*;
    use olli_mesh::generate::{block, rectangle, BlockParams, RectangleParams};
    use olli_mesh::PointArray;

    #[test]
    fn a_2d_frame_gives_one_cell_per_element_and_its_outlines() {
        let mesh = rectangle(&RectangleParams { divisions: [3, 2], ..Default::default() }).unwrap();
        let n = mesh.node_count();
        let frame = Frame { arrays: vec![PointArray { name: "von_mises".into(), components: 1, values: vec![1.0; n] }], mesh };
        assert!(section_plot(&frame, Field::Pressure, "t", "plane-strain", ColorMap::Viridis, None, &[]).is_none(), "no pressure array");
        let (plot, view) = section_plot(&frame, Field::VonMises, "t", "plane-strain", ColorMap::Viridis, None, &[]).unwrap();
        assert_eq!(view, None);
        assert_eq!(plot.cells.len(), 6);
        // 10 boundary edges, each drawn undeformed and deformed.
        assert_eq!(plot.outlines.len(), 20);
    }

    #[test]
    fn a_block_pressed_along_its_thin_axis_is_seen_from_the_side() {
        let mesh = block(&BlockParams { size: [4.0, 4.0, 1.0], divisions: [2, 2, 1], ..Default::default() }).unwrap();
        let pressed: Vec<[f64; 3]> = mesh.nodes.iter().map(|x| [x[0], x[1], 0.8 * x[2]]).collect();
        assert_ne!(View::choose(&mesh, &pressed), View::Z);
        let sheared: Vec<[f64; 3]> = mesh.nodes.iter().map(|x| [x[0] + 0.3 * x[2], x[1], x[2]]).collect();
        assert_eq!(View::choose(&mesh, &sheared), View::Z);
    }
}
