//! One result frame as a VTK XML unstructured grid (`.vtu`), through vtkio.
//!
//! The frame holds the reference geometry, the cells and named point and cell
//! arrays; viewers warp by the `displacement` array. Symmetric tensors are
//! written with 6 components in the order VTK viewers expect
//! (xx, yy, zz, xy, yz, xz).

use std::path::Path;

use olli_mesh::Mesh;
use vtkio::model::{Attribute, Attributes, IOBuffer};
use vtkio::xml::Compressor;

use super::atomic::write_atomic;

/// A named array with `components` values per point or cell.
#[derive(Debug, Clone, PartialEq)]
pub struct Field {
    /// Array name in the `.vtu` file.
    pub name: String,
    /// Values per point or cell (1 scalar, 3 vector, 6 or 9 tensor).
    pub components: usize,
    /// `components` values per point or cell, one after another.
    pub values: Vec<f64>,
}

impl Field {
    /// A field from its name, component count and values.
    pub fn new(name: impl Into<String>, components: usize, values: Vec<f64>) -> Self {
        Field { name: name.into(), components, values }
    }
}

fn attribute(f: Field) -> Attribute {
    let a = match f.components {
        3 => Attribute::vectors(f.name),
        1 => Attribute::scalars(f.name, 1),
        n => Attribute::generic(f.name, n as u32),
    };
    a.with_data(IOBuffer::F64(f.values))
}

/// Writes `mesh` with the given arrays to `path` atomically (the arrays move
/// into the file model rather than being copied).
pub fn write_vtu(path: &Path, title: &str, mesh: &Mesh, point_fields: Vec<Field>, cell_fields: Vec<Field>) -> std::io::Result<()> {
    // The mesh crate's grid with exactly the chosen result arrays.
    let extra =
        Attributes { point: point_fields.into_iter().map(attribute).collect(), cell: cell_fields.into_iter().map(attribute).collect() };
    let mut vtk = olli_mesh::export::grid(mesh, extra);
    vtk.title = if title.is_empty() { "olli".into() } else { title.into() };
    let mut bytes = Vec::new();
    vtk.try_into_xml_format(Compressor::ZLib, 1)
        .and_then(|file| file.write(&mut bytes))
        .map_err(|e| std::io::Error::other(format!("{e}")))?;
    write_atomic(path, &bytes)
}
