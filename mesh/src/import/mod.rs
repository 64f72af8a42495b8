//! Reading meshes from files: VTK (`.vtu`, `.vtk`) and Gmsh MSH 4.1 (`.msh`),
//! chosen by extension. Every reader returns a typed error naming the file
//! and the line, offset or cell at fault; none panics on bad input (a panic
//! inside a dependency is caught and reported as an error, though inputs are
//! checked so that none is reached). Files are read with a size limit.
//!
//! After reading, clockwise 2-D elements are turned counter-clockwise and a
//! note says how many.

mod gmsh;
mod msh_format;
mod vtk;
mod vtu_format;

use std::path::Path;

use crate::cleanup::reorient_clockwise_2d;
use crate::error::{Location, MeshError};
use crate::model::Mesh;

/// A mesh read from a file, with notes about repairs made on the way.
#[derive(Debug, Clone, PartialEq)]
pub struct Imported {
    /// The mesh as read, after the repairs listed in `notes`.
    pub mesh: Mesh,
    /// Human-readable remarks (reoriented elements, skipped cells, ...).
    pub notes: Vec<String>,
    /// Numeric point arrays of a VTK file other than the `set_*` arrays
    /// (result fields such as `displacement`), in file order; empty for Gmsh.
    pub point_arrays: Vec<PointArray>,
}

/// A named array with `components` values per node, in node order.
#[derive(Debug, Clone, PartialEq)]
pub struct PointArray {
    /// The array's name in the file.
    pub name: String,
    /// Values per node (1 for a scalar, 3 for a vector, ...).
    pub components: usize,
    /// `components` values per node, node after node.
    pub values: Vec<f64>,
}

/// Reads a mesh file, choosing the format by extension (`.vtu`, `.vtk`, `.msh`).
pub fn read_mesh(path: &Path) -> Result<Mesh, MeshError> {
    import(path).map(|i| i.mesh)
}

/// Like [`read_mesh`], also returning notes about repairs.
pub fn import(path: &Path) -> Result<Imported, MeshError> {
    format_of(path)?;
    let bytes = crate::memory::read_bounded(path, crate::memory::mesh_file_limit())
        .map_err(|source| MeshError::Io { path: path.to_path_buf(), source })?;
    import_bytes(path, &bytes)
}

/// Reads a mesh from bytes; `path` gives the format (by extension) and the name used in errors.
pub fn import_bytes(path: &Path, bytes: &[u8]) -> Result<Imported, MeshError> {
    let mut imported = match format_of(path)? {
        Format::Vtu => vtk::read(path, bytes, true)?,
        Format::LegacyVtk => vtk::read(path, bytes, false)?,
        Format::Gmsh => gmsh::read(path, bytes)?,
    };
    finish(path, &mut imported)?;
    Ok(imported)
}

enum Format {
    Vtu,
    LegacyVtk,
    Gmsh,
}

fn format_of(path: &Path) -> Result<Format, MeshError> {
    let ext = path.extension().and_then(|e| e.to_str()).map(|e| e.to_ascii_lowercase());
    match ext.as_deref() {
        Some("vtu") => Ok(Format::Vtu),
        Some("vtk") => Ok(Format::LegacyVtk),
        Some("msh") => Ok(Format::Gmsh),
        _ => Err(MeshError::UnknownFormat { path: path.to_path_buf() }),
    }
}

/// Checks a 2-D mesh lies in the x–y plane and reorients clockwise elements.
fn finish(path: &Path, imported: &mut Imported) -> Result<(), MeshError> {
    let mesh = &mut imported.mesh;
    if mesh.kinds.is_empty() {
        return Err(MeshError::parse(path, Location::Unknown, "no elements"));
    }
    if mesh.dimension == 2 {
        let (lo, hi) = mesh.bounding_box();
        let size = (hi[0] - lo[0]).max(hi[1] - lo[1]);
        if let Some(n) = mesh.nodes.iter().position(|x| x[2].abs() > 1e-9 * size.max(1e-300)) {
            return Err(MeshError::parse(
                path,
                Location::Unknown,
                format!("2-D elements must lie in the x–y plane (z = 0); node {n} has z = {}", mesh.nodes[n][2]),
            ));
        }
        let flipped = reorient_clockwise_2d(mesh);
        if !flipped.is_empty() {
            imported.notes.push(format!("{} clockwise 2-D elements were reoriented counter-clockwise", flipped.len()));
        }
    }
    for sides in imported.mesh.side_sets.values_mut() {
        sides.sort_unstable();
        sides.dedup();
    }
    Ok(())
}

/// A format reader's error: what went wrong, and the byte offset where.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct FormatError {
    pub offset: usize,
    pub message: String,
}

/// Runs a dependency's parser (vtkio's legacy reader), turning a panic into
/// an error. A last resort: its inputs are checked first, and the property
/// tests assert this is never reached. The panic message is not printed.
pub(crate) fn guard<T>(path: &Path, f: impl FnOnce() -> T) -> Result<T, MeshError> {
    thread_local!(static GUARDED: std::cell::Cell<bool> = const { std::cell::Cell::new(false) });
    static QUIET_HOOK: std::sync::Once = std::sync::Once::new();
    QUIET_HOOK.call_once(|| {
        let previous = std::panic::take_hook();
        std::panic::set_hook(Box::new(move |info| {
            if !GUARDED.with(|g| g.get()) {
                previous(info)
            }
        }));
    });
    GUARDED.with(|g| g.set(true));
    let result = std::panic::catch_unwind(std::panic::AssertUnwindSafe(f));
    GUARDED.with(|g| g.set(false));
    result.map_err(|_| MeshError::parse(path, Location::Unknown, "the file's structure made the reader fail"))
}

/// 1-based line number of byte `offset`.
pub(crate) fn line_of(bytes: &[u8], offset: usize) -> usize {
    1 + bytes[..offset.min(bytes.len())].iter().filter(|&&b| b == b'\n').count()
}
