//! The element table resolved from a model: shape and region of every
//! element (kinds may be mixed in one mesh), with checks that each element
//! has a supported kind and exactly one region.

use olli_mesh::{ElementKind, Mesh};

use super::dofs::NONE;
use super::error::AssemblyError;
use super::kernel::{spatial_form, ElementContext, ReferenceGeometry};
use super::pressure::ContinuousPressures;
use crate::element::taylor_hood::{pressure_nodes, MAX_PRESSURE_NODES};
use crate::element::{reference_geometry_into, Analysis, Formulation, Shape};
use crate::model::Model;
use crate::shape::{ShapeKind, MAX_NODES};

/// The analysis kind in words, for messages (`3-D solid`, `axisymmetric`, `plane strain`).
pub fn analysis_name(a: Analysis) -> &'static str {
    match a {
        Analysis::Solid3d => "3-D solid",
        Analysis::Axisymmetric => "axisymmetric",
        Analysis::PlaneStrain { .. } => "plane strain",
    }
}

/// What to use instead of an element kind the solver refuses.
fn element_hint(kind: ElementKind, dim: usize) -> &'static str {
    match kind {
        ElementKind::Tri3 => {
            "linear triangles lock for nearly incompressible rubber; use tri6 (generator option order = \"quadratic\", or a quadratic mesh)"
        }
        ElementKind::Tet4 => {
            "linear tetrahedra lock for nearly incompressible rubber; use tet10 (generator option order = \"quadratic\", or a quadratic mesh)"
        }
        ElementKind::Wedge6 => "wedges are not supported; use hexahedra or tetrahedra (tet10)",
        _ if kind.dimension() != dim => "the element's dimension does not match the analysis",
        _ => "",
    }
}

/// Elements of a model, ready for assembly.
#[derive(Debug)]
pub struct Discretization<'m> {
    /// The model being discretized.
    pub model: &'m Model,
    /// The element shape of each mesh element.
    pub shapes: Vec<Shape>,
    /// Index into `model.regions` of each element.
    pub region_of: Vec<usize>,
    /// Displacement components per node: 3 in 3-D, 2 in 2-D.
    pub dim: usize,
    /// Largest element degree-of-freedom count in the mesh, pressure
    /// unknowns included (sizes buffers).
    pub max_dofs: usize,
    /// What each element runs: its region's formulation resolved for its shape.
    pub formulation: Vec<Formulation>,
    /// The continuous (Taylor–Hood) pressure unknowns, after the displacements.
    pub pressures: ContinuousPressures,
    /// Reference gradients and volume weights of the elements that take the
    /// spatial form, computed once.
    geometry: CachedGeometry,
}

/// The reference geometry of every spatial-form element
/// ([`super::kernel::spatial_form`]: the 3-D solids and the 2-D elements),
/// computed once per mesh: the reference gradients ∂N_a/∂X (2-D: with
/// N_a/R of an axisymmetric element third) and volume weights of all points
/// laid end to end (hex8: 200 values per element, quad4: 52). An element whose reference
/// geometry is bad keeps none, so the kernel that computes it on the fly
/// reports the error with the element's index.
#[derive(Debug, Default)]
struct CachedGeometry {
    /// Start of element e's gradients and weights (`NONE`: not cached).
    start: Vec<(usize, usize)>,
    grads: Vec<[f64; 3]>,
    dv: Vec<f64>,
}

impl CachedGeometry {
    fn new(mesh: &Mesh, analysis: Analysis, shapes: &[Shape], formulation: &[Formulation]) -> Self {
        let mut out = CachedGeometry::default();
        out.start.reserve(shapes.len());
        for (e, (&shape, &form)) in shapes.iter().zip(formulation).enumerate() {
            if !spatial_form(shape, analysis, form) {
                out.start.push((NONE, NONE));
                continue;
            }
            let x: Vec<[f64; 3]> = mesh.element_nodes(e).iter().map(|&n| mesh.nodes[n]).collect();
            let (g0, d0) = (out.grads.len(), out.dv.len());
            out.grads.resize(g0 + shape.nodes() * shape.points(), [0.0; 3]);
            out.dv.resize(d0 + shape.points(), 0.0);
            if reference_geometry_into(shape, analysis, &x, &mut out.grads[g0..], &mut out.dv[d0..]).is_ok() {
                out.start.push((g0, d0));
            } else {
                out.grads.truncate(g0);
                out.dv.truncate(d0);
                out.start.push((NONE, NONE));
            }
        }
        out
    }
}

impl<'m> Discretization<'m> {
    /// Checks the mesh against the analysis (dimension, thickness, element kinds) and maps each element to its shape and region.
    pub fn new(model: &'m Model) -> Result<Self, AssemblyError> {
        let mesh: &Mesh = &model.mesh;
        let dim = match model.analysis {
            Analysis::Solid3d => 3,
            Analysis::Axisymmetric => 2,
            Analysis::PlaneStrain { thickness } => {
                if !(thickness > 0.0 && thickness.is_finite()) {
                    return Err(AssemblyError::BadThickness(thickness));
                }
                2
            }
        };
        if mesh.dimension != dim {
            return Err(AssemblyError::DimensionMismatch { mesh: mesh.dimension, analysis: analysis_name(model.analysis) });
        }
        let n = mesh.element_count();
        let mut shapes = Vec::with_capacity(n);
        for (e, &k) in mesh.kinds.iter().enumerate() {
            let shape = ShapeKind::of_element(k).filter(|s| s.dimension() == dim && !matches!(s, ShapeKind::Tri3 | ShapeKind::Tet4));
            let Some(shape) = shape else {
                return Err(AssemblyError::UnsupportedElement {
                    element: e,
                    kind: k.name().to_string(),
                    analysis: analysis_name(model.analysis),
                    hint: element_hint(k, dim),
                });
            };
            shapes.push(shape);
        }
        let mut region_of = vec![usize::MAX; n];
        for (r, region) in model.regions.iter().enumerate() {
            for &e in &region.elements {
                if e >= n {
                    return Err(AssemblyError::ElementOutOfRange { region: region.name.clone(), element: e, count: n });
                }
                if region_of[e] != usize::MAX {
                    return Err(AssemblyError::OverlappingRegions {
                        element: e,
                        first: model.regions[region_of[e]].name.clone(),
                        second: region.name.clone(),
                    });
                }
                region_of[e] = r;
            }
        }
        if let Some(e) = region_of.iter().position(|&r| r == usize::MAX) {
            return Err(AssemblyError::MissingRegion { element: e });
        }
        let formulation: Vec<Formulation> = shapes.iter().zip(&region_of).map(|(s, &r)| model.regions[r].formulation.resolve(*s)).collect();
        let bulk: Vec<f64> = region_of.iter().map(|&r| model.regions[r].material.volumetric.bulk_modulus).collect();
        let pressures = ContinuousPressures::new(mesh, &shapes, &formulation, &bulk);
        let max_dofs = shapes
            .iter()
            .zip(&formulation)
            .map(|(s, f)| s.dofs() + if *f == Formulation::ContinuousPressure { pressure_nodes(*s).unwrap_or(0) } else { 0 })
            .max()
            .unwrap_or(0);
        let geometry = CachedGeometry::new(mesh, model.analysis, &shapes, &formulation);
        Ok(Discretization { model, shapes, region_of, dim, max_dofs, formulation, pressures, geometry })
    }

    /// Number of global dofs: the displacements of every node, then the
    /// continuous pressure unknowns.
    pub fn dof_count(&self) -> usize {
        self.mesh().node_count() * self.dim + self.pressures.count()
    }

    /// Number of pressure unknowns of element `e` (0 unless it carries a continuous pressure).
    pub fn element_pressures(&self, e: usize) -> usize {
        if self.formulation[e] == Formulation::ContinuousPressure {
            pressure_nodes(self.shapes[e]).unwrap_or(0)
        } else {
            0
        }
    }

    /// Global dofs of element `e` in its local order (displacements node by
    /// node, then its pressure unknowns) into `out`; returns their count.
    pub fn element_dofs(&self, e: usize, out: &mut [usize]) -> usize {
        let nodes = self.mesh().element_nodes(e);
        let dim = self.dim;
        for (a, &n) in nodes.iter().enumerate() {
            for i in 0..dim {
                out[a * dim + i] = n * dim + i;
            }
        }
        let nd = nodes.len() * dim;
        let np = self.element_pressures(e);
        let base = self.mesh().node_count() * dim;
        for (k, &n) in nodes[..np].iter().enumerate() {
            out[nd + k] = base + self.pressures.of_node[n];
        }
        nd + np
    }

    /// The continuous pressure (stress units) at the corners of element `e`
    /// from the global vector `u` into `out`; returns their count (0 for an
    /// element without one).
    pub fn gather_pressures(&self, e: usize, u: &[f64], out: &mut [f64; MAX_PRESSURE_NODES]) -> usize {
        let np = self.element_pressures(e);
        let base = self.mesh().node_count() * self.dim;
        for (o, &n) in out.iter_mut().zip(&self.mesh().element_nodes(e)[..np]) {
            let k = self.pressures.of_node[n];
            debug_assert!(k != NONE);
            *o = u.get(base + k).map_or(0.0, |v| v * self.pressures.scale);
        }
        np
    }

    /// The cached reference geometry of element `e`, if it takes the
    /// spatial form ([`super::kernel::element_cached_into`]).
    pub fn reference_geometry(&self, e: usize) -> Option<ReferenceGeometry<'_>> {
        let (g0, d0) = self.geometry.start[e];
        if g0 == NONE {
            return None;
        }
        let shape = self.shapes[e];
        let (nodes, points) = (shape.nodes(), shape.points());
        Some(ReferenceGeometry { grads: &self.geometry.grads[g0..g0 + nodes * points], dv: &self.geometry.dv[d0..d0 + points] })
    }

    /// The model's mesh.
    pub fn mesh(&self) -> &'m Mesh {
        &self.model.mesh
    }

    /// What the element kernel needs for element `e`: shape, analysis, formulation, material.
    pub fn context(&self, e: usize) -> ElementContext<'m> {
        let region = &self.model.regions[self.region_of[e]];
        ElementContext {
            shape: self.shapes[e],
            analysis: self.model.analysis,
            formulation: self.formulation[e],
            material: &region.material,
        }
    }

    /// Displacements of element `e`'s nodes into a fixed array.
    pub fn gather_displacements(&self, e: usize, u: &[f64], ue: &mut [[f64; 3]; MAX_NODES]) {
        for (a, &n) in self.mesh().element_nodes(e).iter().enumerate() {
            ue[a] = [0.0; 3];
            for i in 0..self.dim {
                ue[a][i] = u[n * self.dim + i];
            }
        }
    }

    /// Reference positions and displacements of element `e`'s nodes into fixed arrays.
    pub fn gather(&self, e: usize, u: &[f64], x: &mut [[f64; 3]; MAX_NODES], ue: &mut [[f64; 3]; MAX_NODES]) {
        let mesh = self.mesh();
        for (a, &n) in mesh.element_nodes(e).iter().enumerate() {
            x[a] = mesh.nodes[n];
            ue[a] = [0.0; 3];
            for i in 0..self.dim {
                ue[a][i] = u[n * self.dim + i];
            }
        }
    }
}
