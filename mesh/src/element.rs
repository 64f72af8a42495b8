//! Element shapes known to the mesh model, with their node counts, dimensions
//! and local side (edge or face) numbering.
//!
//! Node orders follow the VTK convention for every kind, so meshes can be
//! written to `.vtu` without permutation. Importers of other formats map their
//! node order onto this one. Two VTK details matter: the wedge's base triangle
//! 0-1-2 faces away from the top triangle 3-4-5 (VTK file-format document),
//! and the hex27 face centres come in the order x-min, x-max, y-min, y-max,
//! z-min, z-max (VTK's vtkTriQuadraticHexahedron face table). The test
//! `side_normals_point_outward` checks every side table on generated elements.

/// One element shape. The mesh side reads and checks all of them; the solver
/// supports a subset.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum ElementKind {
    /// 3-node triangle (2-D), linear.
    Tri3,
    /// 6-node triangle (2-D), quadratic: corners then edge midpoints.
    Tri6,
    /// 4-node quadrilateral (2-D), bilinear.
    Quad4,
    /// 8-node serendipity quadrilateral (2-D): corners then edge midpoints.
    Quad8,
    /// 9-node Lagrange quadrilateral (2-D): quad8 plus a centre node.
    Quad9,
    /// 4-node tetrahedron, linear.
    Tet4,
    /// 10-node tetrahedron, quadratic: corners then edge midpoints.
    Tet10,
    /// 6-node wedge (triangular prism): base triangle 0-1-2, top triangle 3-4-5.
    Wedge6,
    /// 8-node hexahedron, trilinear.
    Hex8,
    /// 20-node serendipity hexahedron: corners then edge midpoints.
    Hex20,
    /// 27-node Lagrange hexahedron: hex20 plus six face centres and a body centre.
    Hex27,
}

impl ElementKind {
    /// Every kind, in a fixed order (used for per-kind summaries).
    pub const ALL: [ElementKind; 11] = [
        ElementKind::Tri3,
        ElementKind::Tri6,
        ElementKind::Quad4,
        ElementKind::Quad8,
        ElementKind::Quad9,
        ElementKind::Tet4,
        ElementKind::Tet10,
        ElementKind::Wedge6,
        ElementKind::Hex8,
        ElementKind::Hex20,
        ElementKind::Hex27,
    ];

    /// Number of nodes of one element.
    pub fn node_count(self) -> usize {
        match self {
            ElementKind::Tri3 => 3,
            ElementKind::Tri6 => 6,
            ElementKind::Quad4 => 4,
            ElementKind::Quad8 => 8,
            ElementKind::Quad9 => 9,
            ElementKind::Tet4 => 4,
            ElementKind::Tet10 => 10,
            ElementKind::Wedge6 => 6,
            ElementKind::Hex8 => 8,
            ElementKind::Hex20 => 20,
            ElementKind::Hex27 => 27,
        }
    }

    /// Number of corner (vertex) nodes; they always come first.
    pub fn corner_count(self) -> usize {
        match self {
            ElementKind::Tri3 | ElementKind::Tri6 => 3,
            ElementKind::Quad4 | ElementKind::Quad8 | ElementKind::Quad9 => 4,
            ElementKind::Tet4 | ElementKind::Tet10 => 4,
            ElementKind::Wedge6 => 6,
            ElementKind::Hex8 | ElementKind::Hex20 | ElementKind::Hex27 => 8,
        }
    }

    /// Spatial dimension of the reference shape (2 or 3).
    pub fn dimension(self) -> usize {
        match self {
            ElementKind::Tri3 | ElementKind::Tri6 | ElementKind::Quad4 | ElementKind::Quad8 | ElementKind::Quad9 => 2,
            _ => 3,
        }
    }

    /// Short lower-case name used in summaries and job files (`quad4`, `hex8`, ...).
    pub fn name(self) -> &'static str {
        match self {
            ElementKind::Tri3 => "tri3",
            ElementKind::Tri6 => "tri6",
            ElementKind::Quad4 => "quad4",
            ElementKind::Quad8 => "quad8",
            ElementKind::Quad9 => "quad9",
            ElementKind::Tet4 => "tet4",
            ElementKind::Tet10 => "tet10",
            ElementKind::Wedge6 => "wedge6",
            ElementKind::Hex8 => "hex8",
            ElementKind::Hex20 => "hex20",
            ElementKind::Hex27 => "hex27",
        }
    }

    /// Number of corner nodes of local side `side` (2 for an edge, 3 or 4 for a face).
    pub fn side_corner_count(self, side: usize) -> usize {
        if self.dimension() == 2 {
            2
        } else if matches!(self.sides()[side].len(), 3 | 6) {
            3
        } else {
            4
        }
    }

    /// Local node indices of each side: edges in 2-D, faces in 3-D.
    /// Corner nodes of a side are listed first, counter-clockwise seen from
    /// outside (3-D) or in the element's counter-clockwise sense (2-D), then
    /// any mid-side nodes.
    pub const fn sides(self) -> &'static [&'static [usize]] {
        match self {
            ElementKind::Tri3 => &[&[0, 1], &[1, 2], &[2, 0]],
            ElementKind::Tri6 => &[&[0, 1, 3], &[1, 2, 4], &[2, 0, 5]],
            ElementKind::Quad4 => &[&[0, 1], &[1, 2], &[2, 3], &[3, 0]],
            ElementKind::Quad8 | ElementKind::Quad9 => &[&[0, 1, 4], &[1, 2, 5], &[2, 3, 6], &[3, 0, 7]],
            ElementKind::Tet4 => &[&[0, 2, 1], &[0, 1, 3], &[1, 2, 3], &[0, 3, 2]],
            ElementKind::Tet10 => &[&[0, 2, 1, 6, 5, 4], &[0, 1, 3, 4, 8, 7], &[1, 2, 3, 5, 9, 8], &[0, 3, 2, 7, 9, 6]],
            ElementKind::Wedge6 => &[&[0, 1, 2], &[3, 5, 4], &[0, 3, 4, 1], &[1, 4, 5, 2], &[0, 2, 5, 3]],
            ElementKind::Hex8 => &[&[0, 3, 2, 1], &[4, 5, 6, 7], &[0, 1, 5, 4], &[1, 2, 6, 5], &[2, 3, 7, 6], &[3, 0, 4, 7]],
            ElementKind::Hex20 => &[
                &[0, 3, 2, 1, 11, 10, 9, 8],
                &[4, 5, 6, 7, 12, 13, 14, 15],
                &[0, 1, 5, 4, 8, 17, 12, 16],
                &[1, 2, 6, 5, 9, 18, 13, 17],
                &[2, 3, 7, 6, 10, 19, 14, 18],
                &[3, 0, 4, 7, 11, 16, 15, 19],
            ],
            ElementKind::Hex27 => &[
                &[0, 3, 2, 1, 11, 10, 9, 8, 24],
                &[4, 5, 6, 7, 12, 13, 14, 15, 25],
                &[0, 1, 5, 4, 8, 17, 12, 16, 22],
                &[1, 2, 6, 5, 9, 18, 13, 17, 21],
                &[2, 3, 7, 6, 10, 19, 14, 18, 23],
                &[3, 0, 4, 7, 11, 16, 15, 19, 20],
            ],
        }
    }
}

impl std::fmt::Display for ElementKind {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}
