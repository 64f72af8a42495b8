//! Writing a mesh with its sets to VTK XML (`.vtu`), for any VTK viewer and
//! for reading back with [`crate::import`].
//!
//! Sets travel as data arrays (a naming scheme of our own):
//! - `set_node_<name>`: point data, 1 for members, 0 otherwise;
//! - `set_element_<name>`: cell data, 1 for members;
//! - `set_side_<name>`: cell data, bit k set when local side k of the cell is
//!   in the set (so a viewer shows which elements carry the set).

use std::path::Path;

use vtkio::model::{
    Attribute, Attributes, ByteOrder, CellType, Cells, DataSet, IOBuffer, UnstructuredGridPiece, Version, VertexNumbers, Vtk,
};

use crate::element::ElementKind;
use crate::error::MeshError;
use crate::model::Mesh;

/// Prefix of the node-set arrays (point data, 1 for members, 0 otherwise).
pub const NODE_SET_PREFIX: &str = "set_node_";
/// Prefix of the element-set arrays (cell data, 1 for members, 0 otherwise).
pub const ELEMENT_SET_PREFIX: &str = "set_element_";
/// Prefix of the side-set arrays (cell data, bit `local` set for each member side of the cell).
pub const SIDE_SET_PREFIX: &str = "set_side_";

/// VTK cell type of an element kind (node orders agree, see [`crate::element`]).
pub fn vtk_cell_type(kind: ElementKind) -> CellType {
    match kind {
        ElementKind::Tri3 => CellType::Triangle,
        ElementKind::Tri6 => CellType::QuadraticTriangle,
        ElementKind::Quad4 => CellType::Quad,
        ElementKind::Quad8 => CellType::QuadraticQuad,
        ElementKind::Quad9 => CellType::BiquadraticQuad,
        ElementKind::Tet4 => CellType::Tetra,
        ElementKind::Tet10 => CellType::QuadraticTetra,
        ElementKind::Wedge6 => CellType::Wedge,
        ElementKind::Hex8 => CellType::Hexahedron,
        ElementKind::Hex20 => CellType::QuadraticHexahedron,
        ElementKind::Hex27 => CellType::TriquadraticHexahedron,
    }
}

/// The mesh as a vtkio unstructured grid with set markers; `extra` holds
/// further point and cell arrays (results) to write alongside.
pub fn to_vtk(mesh: &Mesh, extra: Attributes) -> Vtk {
    let mut data = extra;
    for (name, nodes) in &mesh.node_sets {
        let mut flag = vec![0u8; mesh.nodes.len()];
        for &n in nodes {
            flag[n] = 1;
        }
        data.point.push(Attribute::scalars(format!("{NODE_SET_PREFIX}{name}"), 1).with_data(flag));
    }
    for (name, elems) in &mesh.element_sets {
        let mut flag = vec![0u8; mesh.kinds.len()];
        for &e in elems {
            flag[e] = 1;
        }
        data.cell.push(Attribute::scalars(format!("{ELEMENT_SET_PREFIX}{name}"), 1).with_data(flag));
    }
    for (name, sides) in &mesh.side_sets {
        let mut mask = vec![0i32; mesh.kinds.len()];
        for s in sides {
            mask[s.element] |= 1 << s.local;
        }
        data.cell.push(Attribute::scalars(format!("{SIDE_SET_PREFIX}{name}"), 1).with_data(mask));
    }
    grid(mesh, data)
}

/// The mesh's nodes and cells as a vtkio unstructured grid holding exactly
/// the arrays in `data` (no set markers).
pub fn grid(mesh: &Mesh, data: Attributes) -> Vtk {
    let points: Vec<f64> = mesh.nodes.iter().flatten().copied().collect();
    let connectivity: Vec<u64> = mesh.connectivity.iter().map(|&c| c as u64).collect();
    let offsets: Vec<u64> = mesh.offsets[1..].iter().map(|&o| o as u64).collect();
    let types = mesh.kinds.iter().map(|&k| vtk_cell_type(k)).collect();
    let piece = UnstructuredGridPiece {
        points: IOBuffer::F64(points),
        cells: Cells { cell_verts: VertexNumbers::XML { connectivity, offsets }, types },
        data,
    };
    Vtk {
        version: Version::new_xml(1, 0),
        byte_order: ByteOrder::LittleEndian,
        title: "olli mesh".into(),
        file_path: None,
        data: DataSet::inline(piece),
    }
}

/// Writes `mesh` with its sets to a `.vtu` file.
pub fn write_vtu(mesh: &Mesh, path: &Path) -> Result<(), MeshError> {
    write_vtk(to_vtk(mesh, Attributes::new()), path)
}

/// Writes a prepared [`Vtk`] model as XML to `path`.
pub fn write_vtk(vtk: Vtk, path: &Path) -> Result<(), MeshError> {
    let err = |message: String| MeshError::Write { path: path.to_path_buf(), message };
    let mut bytes = Vec::new();
    vtk.write_xml(&mut bytes).map_err(|e| err(e.to_string()))?;
    std::fs::write(path, bytes).map_err(|e| err(e.to_string()))
}
