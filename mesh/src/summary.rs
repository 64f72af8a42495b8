//! The `info` view of a mesh: counts per element kind and per set, bounding
//! box and a quality summary, printed one fact per line so scripts can grep
//! them (`nodes: N`, `elements: N`, `quad4: N`, `node set bottom: N`, ...).

use std::fmt;

use crate::element::ElementKind;
use crate::model::Mesh;
use crate::quality::{check, QualityReport, QualitySettings};

/// Counts, extent and quality of a mesh.
#[derive(Debug, Clone, PartialEq)]
pub struct MeshSummary {
    /// Spatial dimension, 2 or 3.
    pub dimension: usize,
    /// Number of nodes.
    pub nodes: usize,
    /// Number of elements of all kinds.
    pub elements: usize,
    /// Elements per kind, in [`ElementKind::ALL`] order, kinds present only.
    pub per_kind: Vec<(ElementKind, usize)>,
    /// Node sets by name with their node counts.
    pub node_sets: Vec<(String, usize)>,
    /// Element sets by name with their element counts.
    pub element_sets: Vec<(String, usize)>,
    /// Side sets by name with their side counts.
    pub side_sets: Vec<(String, usize)>,
    /// Axis-aligned bounding box `(min, max)` of the nodes, in mesh length units.
    pub bounding_box: ([f64; 3], [f64; 3]),
    /// Quality report with the default [`QualitySettings`].
    pub quality: QualityReport,
    /// Kinds of the worst elements, matching `quality.worst`.
    pub worst_kinds: Vec<ElementKind>,
}

/// Summarises `mesh` with default quality settings.
pub fn summary(mesh: &Mesh) -> MeshSummary {
    let per_kind = ElementKind::ALL.iter().map(|&k| (k, mesh.kinds.iter().filter(|&&x| x == k).count())).filter(|&(_, n)| n > 0).collect();
    let sizes = |m: &std::collections::BTreeMap<String, Vec<_>>| m.iter().map(|(k, v)| (k.clone(), v.len())).collect();
    let quality = check(mesh, &QualitySettings::default());
    let worst_kinds = quality.worst.iter().map(|&(e, _)| mesh.kinds[e]).collect();
    MeshSummary {
        dimension: mesh.dimension,
        nodes: mesh.nodes.len(),
        elements: mesh.kinds.len(),
        per_kind,
        node_sets: mesh.node_sets.iter().map(|(k, v)| (k.clone(), v.len())).collect(),
        element_sets: sizes(&mesh.element_sets),
        side_sets: mesh.side_sets.iter().map(|(k, v)| (k.clone(), v.len())).collect(),
        bounding_box: mesh.bounding_box(),
        quality,
        worst_kinds,
    }
}

impl fmt::Display for MeshSummary {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        writeln!(f, "nodes: {}", self.nodes)?;
        writeln!(f, "elements: {}", self.elements)?;
        for (k, n) in &self.per_kind {
            writeln!(f, "{k}: {n}")?;
        }
        for (name, n) in &self.element_sets {
            writeln!(f, "element set {name}: {n}")?;
        }
        for (name, n) in &self.node_sets {
            writeln!(f, "node set {name}: {n}")?;
        }
        for (name, n) in &self.side_sets {
            writeln!(f, "side set {name}: {n}")?;
        }
        writeln!(f, "dimension: {}", self.dimension)?;
        let (lo, hi) = self.bounding_box;
        if self.nodes > 0 {
            writeln!(f, "bounding box: [{}, {}, {}] to [{}, {}, {}]", lo[0], lo[1], lo[2], hi[0], hi[1], hi[2])?;
        }
        let q = &self.quality;
        writeln!(f, "inverted elements: {}", q.inverted.len())?;
        writeln!(f, "degenerate elements: {}", q.degenerate.len())?;
        writeln!(f, "min jacobian ratio: {:.4}", q.min_jacobian_ratio)?;
        writeln!(f, "max aspect ratio: {:.4}", q.max_aspect_ratio)?;
        writeln!(f, "unreferenced nodes: {}", q.unreferenced_nodes)?;
        writeln!(f, "duplicate nodes: {}", q.duplicate_nodes)?;
        for ((e, eq), k) in q.worst.iter().zip(&self.worst_kinds) {
            writeln!(f, "worst element {e}: {k}, jacobian ratio {:.4}, aspect ratio {:.4}", eq.jacobian_ratio, eq.aspect_ratio)?;
        }
        Ok(())
    }
}
