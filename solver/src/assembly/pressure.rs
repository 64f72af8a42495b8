//! The continuous pressure of Taylor–Hood elements
//! ([`crate::element::taylor_hood`]) as global unknowns: one per corner node
//! of such an element, numbered after every displacement dof
//! (`node_count · dim + k`), and carried scaled (`p = s π`) so that their
//! residuals are forces.

use olli_mesh::Mesh;

use super::dofs::NONE;
use crate::element::taylor_hood::pressure_nodes;
use crate::element::{Formulation, Shape};

/// The pressure unknowns of a mesh (none when no element has a continuous pressure).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ContinuousPressures {
    /// Index of each node's pressure unknown, or [`NONE`].
    pub of_node: Vec<usize>,
    /// Node of each pressure unknown.
    pub node: Vec<usize>,
    /// s in `p = s π` (stress per length): the largest bulk modulus of
    /// the regions carrying a continuous pressure over the mean size
    /// (cube root of the corner tetrahedron's volume) of their elements.
    pub scale: f64,
}

impl ContinuousPressures {
    /// The unknowns of the elements whose formulation resolves to
    /// [`Formulation::ContinuousPressure`] (`formulation[e]`, `bulk[e]` the
    /// bulk modulus of element e's material).
    pub fn new(mesh: &Mesh, shapes: &[Shape], formulation: &[Formulation], bulk: &[f64]) -> Self {
        let mut of_node = vec![NONE; mesh.node_count()];
        let (mut kappa, mut size, mut count) = (0.0f64, 0.0, 0usize);
        for e in 0..mesh.element_count() {
            if formulation[e] != Formulation::ContinuousPressure {
                continue;
            }
            let corners = pressure_nodes(shapes[e]).unwrap_or(0);
            let nodes = mesh.element_nodes(e);
            for &n in &nodes[..corners] {
                of_node[n] = 0;
            }
            kappa = kappa.max(bulk[e]);
            size += corner_size(mesh, nodes);
            count += 1;
        }
        let mut node = Vec::new();
        for (n, k) in of_node.iter_mut().enumerate() {
            if *k == 0 {
                *k = node.len();
                node.push(n);
            }
        }
        let size = if count > 0 { size / count as f64 } else { 1.0 };
        let scale = if kappa > 0.0 && size > 0.0 { kappa / size } else { 1.0 };
        ContinuousPressures { of_node, node, scale }
    }

    /// Number of pressure unknowns.
    pub fn count(&self) -> usize {
        self.node.len()
    }

    /// Whether the mesh has none.
    pub fn is_empty(&self) -> bool {
        self.node.is_empty()
    }
}

/// Cube root of the volume of the tetrahedron on the first four nodes
/// (a size that needs no quadrature).
fn corner_size(mesh: &Mesh, nodes: &[usize]) -> f64 {
    let x = |a: usize| mesh.nodes[nodes[a]];
    let d = |a: usize, c: usize| x(a)[c] - x(0)[c];
    let det = d(1, 0) * (d(2, 1) * d(3, 2) - d(2, 2) * d(3, 1)) - d(1, 1) * (d(2, 0) * d(3, 2) - d(2, 2) * d(3, 0))
        + d(1, 2) * (d(2, 0) * d(3, 1) - d(2, 1) * d(3, 0));
    (det.abs() / 6.0).cbrt()
}
