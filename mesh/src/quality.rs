//! Element quality: inverted and degenerate elements from the Jacobian
//! determinant at the corners and Gauss points, the Jacobian ratio
//! (smallest / largest determinant in an element), the aspect ratio, and
//! unreferenced or duplicate nodes.

use crate::cleanup::{duplicate_representatives, unreferenced_nodes};
use crate::model::Mesh;
use crate::shape::{gauss_rule, jacobian_det, reference_nodes};

/// Quality measures of one element.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ElementQuality {
    /// Smallest Jacobian determinant over corners and Gauss points.
    pub min_det: f64,
    /// Largest Jacobian determinant over corners and Gauss points.
    pub max_det: f64,
    /// `min_det / max_det` when `max_det > 0`: 1 for an affine element, ≤ 0 when inverted.
    pub jacobian_ratio: f64,
    /// Longest / shortest corner-to-corner edge.
    pub aspect_ratio: f64,
}

/// Thresholds for [`check`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct QualitySettings {
    /// Jacobian ratio below which an element counts as degenerate (but not
    /// inverted). Default 0.05; raising it flags more distorted elements.
    pub degenerate_ratio: f64,
    /// Distance below which two nodes count as duplicates, relative to the
    /// bounding-box diagonal. Default 1e-9.
    pub duplicate_tolerance: f64,
    /// How many worst elements to list. Default 5.
    pub worst_count: usize,
}

impl Default for QualitySettings {
    fn default() -> Self {
        QualitySettings { degenerate_ratio: 0.05, duplicate_tolerance: 1e-9, worst_count: 5 }
    }
}

/// Summary of a mesh's quality.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct QualityReport {
    /// Elements with a non-positive Jacobian somewhere.
    pub inverted: Vec<usize>,
    /// Positive elements whose Jacobian ratio is below the threshold.
    pub degenerate: Vec<usize>,
    /// The elements with the lowest Jacobian ratio, worst first.
    pub worst: Vec<(usize, ElementQuality)>,
    /// Lowest Jacobian ratio in the mesh (1 for an empty mesh).
    pub min_jacobian_ratio: f64,
    /// Highest aspect ratio in the mesh.
    pub max_aspect_ratio: f64,
    /// Nodes no element uses.
    pub unreferenced_nodes: usize,
    /// Nodes that duplicate another node within the tolerance.
    pub duplicate_nodes: usize,
}

/// Quality of element `e`.
pub fn element_quality(mesh: &Mesh, e: usize) -> ElementQuality {
    let kind = mesh.kinds[e];
    let nodes = mesh.element_nodes(e);
    let mut x = [[0.0; 3]; crate::shape::MAX_NODES];
    for (k, &n) in nodes.iter().enumerate() {
        x[k] = mesh.nodes[n];
    }
    let x = &x[..nodes.len()];
    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
    let corners = &reference_nodes(kind)[..kind.corner_count()];
    for p in corners.iter().copied().chain(gauss_rule(kind).iter().map(|g| g.0)) {
        let d = jacobian_det(kind, x, p);
        let d = if d.is_nan() { f64::NEG_INFINITY } else { d };
        lo = lo.min(d);
        hi = hi.max(d);
    }
    let jacobian_ratio = if hi > 0.0 { lo / hi } else { -1.0 };
    let (mut shortest, mut longest) = (f64::INFINITY, 0.0f64);
    for (k, side) in kind.sides().iter().enumerate() {
        let c = kind.side_corner_count(k);
        for i in 0..c {
            let (a, b) = (x[side[i]], x[side[(i + 1) % c]]);
            let l = ((a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2) + (a[2] - b[2]).powi(2)).sqrt();
            shortest = shortest.min(l);
            longest = longest.max(l);
            if c == 2 {
                break;
            }
        }
    }
    let aspect_ratio = if shortest > 0.0 { longest / shortest } else { f64::INFINITY };
    ElementQuality { min_det: lo, max_det: hi, jacobian_ratio, aspect_ratio }
}

/// Checks every element and node of `mesh`.
pub fn check(mesh: &Mesh, settings: &QualitySettings) -> QualityReport {
    let mut report = QualityReport { min_jacobian_ratio: 1.0, ..Default::default() };
    let mut all = Vec::with_capacity(mesh.kinds.len());
    for e in 0..mesh.kinds.len() {
        let q = element_quality(mesh, e);
        if q.min_det <= 0.0 {
            report.inverted.push(e);
        } else if q.jacobian_ratio < settings.degenerate_ratio {
            report.degenerate.push(e);
        }
        report.min_jacobian_ratio = report.min_jacobian_ratio.min(q.jacobian_ratio);
        report.max_aspect_ratio = report.max_aspect_ratio.max(q.aspect_ratio);
        all.push((e, q));
    }
    all.sort_by(|a, b| a.1.jacobian_ratio.total_cmp(&b.1.jacobian_ratio));
    all.truncate(settings.worst_count);
    report.worst = all;
    report.unreferenced_nodes = unreferenced_nodes(mesh).len();
    let (lo, hi) = mesh.bounding_box();
    let diag = (0..3).map(|k| (hi[k] - lo[k]).powi(2)).sum::<f64>().sqrt();
    let tol = settings.duplicate_tolerance * if diag.is_finite() { diag } else { 0.0 };
    report.duplicate_nodes = duplicate_representatives(mesh, tol).iter().enumerate().filter(|&(i, &r)| r != i).count();
    report
}

/// Area (2-D) or volume (3-D) of the whole mesh.
pub fn measure(mesh: &Mesh) -> f64 {
    let mut x = [[0.0; 3]; crate::shape::MAX_NODES];
    (0..mesh.kinds.len())
        .map(|e| {
            let nodes = mesh.element_nodes(e);
            for (k, &n) in nodes.iter().enumerate() {
                x[k] = mesh.nodes[n];
            }
            crate::shape::element_measure(mesh.kinds[e], &x[..nodes.len()])
        })
        .sum()
}
