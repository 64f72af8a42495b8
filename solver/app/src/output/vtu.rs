//! One result frame as a VTK XML unstructured grid (`.vtu`), through vtkio.
//!
//! The frame holds the reference geometry, the cells and named point and cell
//! arrays; viewers warp by the `displacement` array. Symmetric tensors are
//! written with 6 components in the order VTK viewers expect
//! (xx, yy, zz, xy, yz, xz).
//!
//! The arrays are zlib-compressed (level 1) in VTK's block layout. vtkio
//! lays out the file, but its own compressor is fed one value at a time,
//! and the deflate wrapper clears its 32 KiB output buffer on every feed:
//! that took 13 % of a face-seal run. So vtkio writes the arrays
//! uncompressed and [`compress_arrays`] compresses each whole block in one
//! call, into the very bytes vtkio's compressed output has (a test checks it).

use std::fmt;
use std::io::Write;
use std::path::Path;

use base64::engine::general_purpose::STANDARD as BASE64;
use base64::Engine as _;
use flate2::write::ZlibEncoder;
use flate2::Compression;
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
    vtk.try_into_xml_format(Compressor::None, 0)
        .and_then(|file| file.write(&mut bytes))
        .map_err(|e| std::io::Error::other(format!("{e}")))?;
    let text = String::from_utf8(bytes).map_err(|_| std::io::Error::other(ArrayError::NotText))?;
    write_atomic(path, compress_arrays(&text).map_err(std::io::Error::other)?.as_bytes())
}

/// Bytes of a block before compression (VTK's and vtkio's block size).
const BLOCK: usize = 32768;

/// Compression level of the frames (1: fastest).
const LEVEL: u32 = 1;

/// The header VTK writes before a file's arrays: 64-bit sizes (vtkio's choice).
const HEADER_TYPE: &str = "header_type=\"UInt64\"";

/// An uncompressed `.vtu` text that [`compress_arrays`] cannot read.
#[derive(Debug, Clone, PartialEq)]
pub enum ArrayError {
    /// The XML writer produced bytes that are not UTF-8.
    NotText,
    /// The file has no `header_type="UInt64"` attribute.
    NoHeaderType,
    /// An array's data is not base64 of a 64-bit size and that many bytes.
    BadArray {
        /// 0-based index of the array in the file.
        index: usize,
    },
}

impl fmt::Display for ArrayError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ArrayError::NotText => write!(f, "the .vtu writer produced bytes that are not text"),
            ArrayError::NoHeaderType => write!(f, "the .vtu text has no {HEADER_TYPE} attribute"),
            ArrayError::BadArray { index } => write!(f, "array {index} of the .vtu text is not a sized base64 block"),
        }
    }
}

impl std::error::Error for ArrayError {}

/// The `.vtu` text `xml` (inline binary arrays, uncompressed, 64-bit
/// headers) with every array zlib-compressed and the file marked so: the
/// same blocks (VTK XML's `[nb][nu][np][nc_1..nc_nb]` header, then the
/// compressed blocks), each header and data base64-encoded on its own.
pub fn compress_arrays(xml: &str) -> Result<String, ArrayError> {
    const END: &str = "</DataArray>";
    let at = xml.find(HEADER_TYPE).ok_or(ArrayError::NoHeaderType)? + HEADER_TYPE.len();
    let mut out = String::with_capacity(xml.len() / 2);
    out.push_str(&xml[..at]);
    out.push_str(" compressor=\"vtkZLibDataCompressor\"");
    let mut rest = &xml[at..];
    let mut index = 0;
    while let Some(end) = rest.find(END) {
        let start = rest[..end].rfind('>').map_or(0, |p| p + 1);
        out.push_str(&rest[..start]);
        compress_array(&rest[start..end], &mut out).ok_or(ArrayError::BadArray { index })?;
        out.push_str(END);
        rest = &rest[end + END.len()..];
        index += 1;
    }
    out.push_str(rest);
    Ok(out)
}

/// Appends the compressed form of one uncompressed array (base64 of a
/// 64-bit little-endian size and that many bytes); `None` if it is not one.
fn compress_array(encoded: &str, out: &mut String) -> Option<()> {
    let raw = BASE64.decode(encoded.trim()).ok()?;
    let (size, data) = raw.split_at_checked(8)?;
    if u64::from_le_bytes(size.try_into().ok()?) != data.len() as u64 {
        return None;
    }
    // As vtkio counts: one block more than the whole ones, the last one
    // holding the remainder (empty when the size is a multiple of BLOCK).
    let blocks = data.len() / BLOCK + 1;
    let mut header = Vec::with_capacity((3 + blocks) * 8);
    header.extend_from_slice(&(blocks as u64).to_le_bytes());
    header.extend_from_slice(&(BLOCK as u64).to_le_bytes());
    header.extend_from_slice(&((data.len() % BLOCK) as u64).to_le_bytes());
    let mut compressed = Vec::new();
    for i in 0..blocks {
        let block = &data[(i * BLOCK).min(data.len())..((i + 1) * BLOCK).min(data.len())];
        let mut e = ZlibEncoder::new(Vec::with_capacity(block.len() / 2 + 64), Compression::new(LEVEL));
        e.write_all(block).ok()?;
        let z = e.finish().ok()?;
        header.extend_from_slice(&(z.len() as u64).to_le_bytes());
        compressed.extend_from_slice(&z);
    }
    BASE64.encode_string(&header, out);
    BASE64.encode_string(&compressed, out);
    Some(())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The frames keep the bytes vtkio's own zlib path writes (its layout,
    /// blocks and level), for a mesh whose arrays span several blocks.
    #[test]
    fn compressed_frames_equal_vtkio_compressed_output() {
        let mesh = olli_mesh::generate::rectangle(&olli_mesh::generate::RectangleParams {
            size: [3.0, 2.0],
            divisions: [80, 50],
            ..Default::default()
        })
        .expect("mesh");
        let n = mesh.node_count();
        let fields = || {
            let wave: Vec<f64> = (0..3 * n).map(|i| (i as f64 * 0.37).sin() * 1e-3).collect();
            let zero = vec![0.0; n];
            (
                vec![Field::new("displacement", 3, wave), Field::new("pressure", 1, zero)],
                vec![Field::new("ratio", 1, vec![1.0; mesh.element_count()])],
            )
        };
        let model = |(point, cell): (Vec<Field>, Vec<Field>)| {
            let extra = Attributes { point: point.into_iter().map(attribute).collect(), cell: cell.into_iter().map(attribute).collect() };
            olli_mesh::export::grid(&mesh, extra)
        };
        let write = |vtk: vtkio::model::Vtk, compressor, level| {
            let mut bytes = Vec::new();
            vtk.try_into_xml_format(compressor, level).unwrap().write(&mut bytes).unwrap();
            String::from_utf8(bytes).unwrap()
        };
        assert!(3 * n * 8 > 2 * BLOCK, "the displacement spans several blocks");
        let theirs = write(model(fields()), Compressor::ZLib, LEVEL);
        let ours = compress_arrays(&write(model(fields()), Compressor::None, 0)).unwrap();
        assert_eq!(ours, theirs);
    }

    #[test]
    fn a_text_without_sized_arrays_is_refused() {
        assert_eq!(compress_arrays("<VTKFile>").unwrap_err(), ArrayError::NoHeaderType);
        let bad = format!("<VTKFile {HEADER_TYPE}><DataArray>AAAA</DataArray></VTKFile>");
        assert_eq!(compress_arrays(&bad).unwrap_err(), ArrayError::BadArray { index: 0 });
    }
}
