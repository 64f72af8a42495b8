//! Lagrange shape functions on their reference domains, in the VTK node
//! order used by the mesh model, with the quadrature rules that integrate
//! them ([`rule`]) and each shape's side (face or edge) and edge tables.
//!
//! Every shape is one file holding its reference nodes, an `eval_into`
//! writing values and reference derivatives into caller slices (no
//! allocation), and a [`ShapeDef`] constant; [`ShapeKind::def`] is the one
//! table listing them. Adding a shape is one file and one entry there.
//! [`ShapeKind::table`] precomputes the values and derivatives at the points
//! of the shape's quadrature rule once, so element loops only index them.

pub mod hex20;
pub mod hex27;
pub mod hex8;
mod lagrange;
pub mod line2;
pub mod line3;
pub mod quad4;
pub mod quad8;
pub mod quad9;
pub mod rule;
pub mod tet10;
pub mod tet4;
pub mod tri3;
pub mod tri6;

use std::sync::OnceLock;

use olli_mesh::ElementKind;

pub use rule::{Domain, Rule};

/// Largest node count of any shape (hex27).
pub const MAX_NODES: usize = 27;

/// Largest node count of any side (a quad9 face).
pub const MAX_SIDE_NODES: usize = 9;

/// Every shape the solver knows: elements and the sides of elements.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum ShapeKind {
    /// 2-node line (side of a linear 2-D element).
    Line2,
    /// 3-node line (side of a quadratic 2-D element).
    Line3,
    /// 3-node triangle.
    Tri3,
    /// 6-node triangle.
    Tri6,
    /// 4-node quadrilateral.
    Quad4,
    /// 8-node serendipity quadrilateral.
    Quad8,
    /// 9-node Lagrange quadrilateral.
    Quad9,
    /// 4-node tetrahedron.
    Tet4,
    /// 10-node tetrahedron.
    Tet10,
    /// 8-node hexahedron.
    Hex8,
    /// 20-node serendipity hexahedron.
    Hex20,
    /// 27-node Lagrange hexahedron.
    Hex27,
}

/// Signature of a shape's evaluation: reference point → values and
/// reference derivatives of all its functions (only the shape's node count
/// of entries is written).
pub type EvalFn = fn([f64; 3], &mut [f64], &mut [[f64; 3]]);

/// Everything the element layer needs to know about one shape.
#[derive(Debug, Clone, Copy)]
pub struct ShapeDef {
    /// Which shape.
    pub kind: ShapeKind,
    /// Its reference domain.
    pub domain: Domain,
    /// Number of corner nodes; they come first.
    pub corners: usize,
    /// Reference coordinates of every node (unused coordinates zero); element
    /// shapes take the mesh crate's (`olli_mesh::shape::reference_nodes`).
    pub reference_nodes: &'static [[f64; 3]],
    /// Evaluates the shape functions and their reference derivatives.
    pub eval: EvalFn,
    /// Polynomial degree of the quadrature rule used to integrate over this
    /// shape: full integration of the displacement stiffness of an
    /// undistorted element (gradient · gradient), as [`rule::rule`] reads it.
    pub degree: usize,
    /// Local node lists of the sides (faces in 3-D, edges in 2-D, end points
    /// of a line), in the side shape's own node order: corners first,
    /// counter-clockwise seen from outside (3-D) or in the element's
    /// counter-clockwise sense (2-D), then mid-side nodes. Element shapes take
    /// the mesh crate's table (`ElementKind::sides`), so side numbers agree.
    pub sides: &'static [&'static [usize]],
    /// Shape of every side (`None` for lines, whose sides are points).
    pub side_kind: Option<ShapeKind>,
    /// Edges: their two end corners, then the mid-edge node if any.
    pub edges: &'static [&'static [usize]],
}

impl ShapeKind {
    /// Every shape, in a fixed order.
    pub const ALL: [ShapeKind; 12] = [
        ShapeKind::Line2,
        ShapeKind::Line3,
        ShapeKind::Tri3,
        ShapeKind::Tri6,
        ShapeKind::Quad4,
        ShapeKind::Quad8,
        ShapeKind::Quad9,
        ShapeKind::Tet4,
        ShapeKind::Tet10,
        ShapeKind::Hex8,
        ShapeKind::Hex20,
        ShapeKind::Hex27,
    ];

    /// The shape's definition: the registry.
    pub fn def(self) -> &'static ShapeDef {
        match self {
            ShapeKind::Line2 => &line2::SHAPE,
            ShapeKind::Line3 => &line3::SHAPE,
            ShapeKind::Tri3 => &tri3::SHAPE,
            ShapeKind::Tri6 => &tri6::SHAPE,
            ShapeKind::Quad4 => &quad4::SHAPE,
            ShapeKind::Quad8 => &quad8::SHAPE,
            ShapeKind::Quad9 => &quad9::SHAPE,
            ShapeKind::Tet4 => &tet4::SHAPE,
            ShapeKind::Tet10 => &tet10::SHAPE,
            ShapeKind::Hex8 => &hex8::SHAPE,
            ShapeKind::Hex20 => &hex20::SHAPE,
            ShapeKind::Hex27 => &hex27::SHAPE,
        }
    }

    /// The shape of a mesh element kind, if the solver has it.
    pub fn of_element(kind: ElementKind) -> Option<ShapeKind> {
        ShapeKind::ALL.into_iter().find(|s| s.element_kind() == Some(kind))
    }

    /// The mesh element kind of this shape (`None` for lines, which are only sides).
    pub fn element_kind(self) -> Option<ElementKind> {
        Some(match self {
            ShapeKind::Line2 | ShapeKind::Line3 => return None,
            ShapeKind::Tri3 => ElementKind::Tri3,
            ShapeKind::Tri6 => ElementKind::Tri6,
            ShapeKind::Quad4 => ElementKind::Quad4,
            ShapeKind::Quad8 => ElementKind::Quad8,
            ShapeKind::Quad9 => ElementKind::Quad9,
            ShapeKind::Tet4 => ElementKind::Tet4,
            ShapeKind::Tet10 => ElementKind::Tet10,
            ShapeKind::Hex8 => ElementKind::Hex8,
            ShapeKind::Hex20 => ElementKind::Hex20,
            ShapeKind::Hex27 => ElementKind::Hex27,
        })
    }

    /// Lower-case name (`tet10`, `line3`, ...), as the mesh crate spells elements.
    pub fn name(self) -> &'static str {
        match self {
            ShapeKind::Line2 => "line2",
            ShapeKind::Line3 => "line3",
            other => other.element_kind().map_or("", ElementKind::name),
        }
    }

    /// The side shape with `nodes` nodes of an element of dimension
    /// `element_dimension`: edges (line2, line3) in 2-D, faces (tri3, quad4,
    /// tri6, quad8, quad9) in 3-D.
    pub fn side_with_nodes(element_dimension: usize, nodes: usize) -> Option<ShapeKind> {
        ShapeKind::ALL.into_iter().find(|k| k.dimension() + 1 == element_dimension && k.nodes() == nodes)
    }

    /// Number of nodes.
    pub fn nodes(self) -> usize {
        self.def().reference_nodes.len()
    }

    /// Number of integration points of [`ShapeKind::rule`].
    pub fn points(self) -> usize {
        self.table().len()
    }

    /// Degrees of freedom of a displacement element of this shape.
    pub fn dofs(self) -> usize {
        self.nodes() * self.dimension()
    }

    /// Dimension of the reference domain (1, 2 or 3).
    pub fn dimension(self) -> usize {
        self.def().domain.dimension()
    }

    /// Whether the shape has mid-side nodes.
    pub fn is_quadratic(self) -> bool {
        self.nodes() > self.def().corners
    }

    /// The quadrature rule used to integrate over this shape.
    pub fn rule(self) -> &'static Rule {
        let def = self.def();
        rule::rule(def.domain, def.degree).expect("every shape's degree has a rule")
    }

    /// Values and reference derivatives at the points of [`ShapeKind::rule`],
    /// computed once per shape.
    pub fn table(self) -> &'static PointTable {
        static TABLES: OnceLock<Vec<PointTable>> = OnceLock::new();
        let tables = TABLES.get_or_init(|| ShapeKind::ALL.iter().map(|&k| PointTable::new(k)).collect());
        &tables[ShapeKind::ALL.iter().position(|&k| k == self).unwrap_or(0)]
    }
}

impl std::fmt::Display for ShapeKind {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// Shape values and reference derivatives tabulated at the points of a
/// shape's quadrature rule, point-major.
#[derive(Debug, Clone)]
pub struct PointTable {
    /// Number of nodes of the shape.
    pub nodes: usize,
    /// The rule's weights, one per point.
    pub weights: &'static [f64],
    /// The rule's points.
    pub points: &'static [[f64; 3]],
    values: Vec<f64>,
    derivatives: Vec<[f64; 3]>,
}

impl PointTable {
    fn new(kind: ShapeKind) -> PointTable {
        let rule = kind.rule();
        let nodes = kind.nodes();
        let mut values = vec![0.0; rule.len() * nodes];
        let mut derivatives = vec![[0.0; 3]; rule.len() * nodes];
        for (p, &xi) in rule.points.iter().enumerate() {
            let range = p * nodes..(p + 1) * nodes;
            (kind.def().eval)(xi, &mut values[range.clone()], &mut derivatives[range]);
        }
        PointTable { nodes, weights: &rule.weights, points: &rule.points, values, derivatives }
    }

    /// Number of points.
    pub fn len(&self) -> usize {
        self.weights.len()
    }

    /// Whether there are no points (never true for a registered shape).
    pub fn is_empty(&self) -> bool {
        self.weights.is_empty()
    }

    /// Shape values at point `p`.
    pub fn values(&self, p: usize) -> &[f64] {
        &self.values[p * self.nodes..(p + 1) * self.nodes]
    }

    /// Reference derivatives at point `p`.
    pub fn derivatives(&self, p: usize) -> &[[f64; 3]] {
        &self.derivatives[p * self.nodes..(p + 1) * self.nodes]
    }
}

#[cfg(test)]
mod tests;
