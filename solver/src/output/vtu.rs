//! One result frame as a VTK XML unstructured grid (`.vtu`), through vtkio.
//!
//! The frame holds the reference geometry, the cells and named point and cell
//! arrays; viewers warp by the `displacement` array. Symmetric tensors are
//! written with 6 components in the order VTK viewers expect
//! (xx, yy, zz, xy, yz, xz).

use std::path::Path;

use olli_mesh::{ElementKind, Mesh};
use vtkio::xml::Compressor;
use vtkio::model::{
    Attribute, Attributes, ByteOrder, CellType, Cells, DataSet, IOBuffer, UnstructuredGridPiece,
    Version, VertexNumbers, Vtk,
};

use super::atomic::write_atomic;

/// A named array with `components` values per point or cell.
#[derive(Debug, Clone, PartialEq)]
pub struct Field {
    pub name: String,
    pub components: usize,
    pub values: Vec<f64>,
}

impl Field {
    pub fn new(name: impl Into<String>, components: usize, values: Vec<f64>) -> Self {
        Field {
            name: name.into(),
            components,
            values,
        }
    }
}

/// The VTK cell type of an element kind (olli keeps VTK node order).
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

fn attribute(f: &Field) -> Attribute {
    let a = match f.components {
        3 => Attribute::vectors(f.name.clone()),
        1 => Attribute::scalars(f.name.clone(), 1),
        n => Attribute::generic(f.name.clone(), n as u32),
    };
    a.with_data(IOBuffer::F64(f.values.clone()))
}

/// Writes `mesh` with the given arrays to `path` atomically.
pub fn write_vtu(
    path: &Path,
    title: &str,
    mesh: &Mesh,
    point_fields: &[Field],
    cell_fields: &[Field],
) -> std::io::Result<()> {
    let points: Vec<f64> = mesh.nodes.iter().flatten().copied().collect();
    let connectivity: Vec<u64> = mesh.connectivity.iter().map(|&n| n as u64).collect();
    let offsets: Vec<u64> = mesh.offsets[1..].iter().map(|&o| o as u64).collect();
    let types = mesh.kinds.iter().map(|&k| vtk_cell_type(k)).collect();
    let piece = UnstructuredGridPiece {
        points: IOBuffer::F64(points),
        cells: Cells {
            cell_verts: VertexNumbers::XML {
                connectivity,
                offsets,
            },
            types,
        },
        data: Attributes {
            point: point_fields.iter().map(attribute).collect(),
            cell: cell_fields.iter().map(attribute).collect(),
        },
    };
    let vtk = Vtk {
        version: Version::new_xml(1, 0),
        byte_order: ByteOrder::LittleEndian,
        title: if title.is_empty() { "olli".into() } else { title.into() },
        file_path: None,
        data: DataSet::inline(piece),
    };
    let mut bytes = Vec::new();
    vtk.try_into_xml_format(Compressor::ZLib, 6)
        .and_then(|file| file.write(&mut bytes))
        .map_err(|e| std::io::Error::other(format!("{e}")))?;
    write_atomic(path, &bytes)
}
