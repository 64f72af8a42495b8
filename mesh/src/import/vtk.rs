//! VTK reader: XML unstructured grids (`.vtu`, by our own reader in
//! [`super::vtu_format`]) and legacy files (`.vtk`, by vtkio). Restores the
//! sets written by [`crate::export`].
//!
//! vtkio's errors carry no position, so a legacy file it rejects is scanned
//! again by a small structural check (the section headers and counts) to name
//! the line or offset at fault.

use std::collections::BTreeMap;
use std::path::Path;

use vtkio::model::{Attribute, CellType, DataSet, ElementType, VertexNumbers, Vtk};

use super::vtu_format::{self, NamedArray};
use super::{line_of, Imported, PointArray};
use crate::element::ElementKind;
use crate::error::{Location, MeshError};
use crate::export::{ELEMENT_SET_PREFIX, NODE_SET_PREFIX, SIDE_SET_PREFIX};
use crate::model::{Mesh, Side};

/// Element kind of a VTK cell type code: `Ok(None)` for lower-dimensional
/// cells (vertices, lines) that carry no volume, `Err` for unsupported ones.
fn kind_of(code: u8) -> Result<Option<ElementKind>, ()> {
    let kinds = [
        (CellType::Triangle, ElementKind::Tri3),
        (CellType::QuadraticTriangle, ElementKind::Tri6),
        (CellType::Quad, ElementKind::Quad4),
        (CellType::QuadraticQuad, ElementKind::Quad8),
        (CellType::BiquadraticQuad, ElementKind::Quad9),
        (CellType::Tetra, ElementKind::Tet4),
        (CellType::QuadraticTetra, ElementKind::Tet10),
        (CellType::Wedge, ElementKind::Wedge6),
        (CellType::Hexahedron, ElementKind::Hex8),
        (CellType::QuadraticHexahedron, ElementKind::Hex20),
        (CellType::TriquadraticHexahedron, ElementKind::Hex27),
    ];
    let lower = [CellType::Vertex, CellType::PolyVertex, CellType::Line, CellType::PolyLine, CellType::QuadraticEdge];
    if let Some(&(_, kind)) = kinds.iter().find(|(t, _)| *t as u8 == code) {
        Ok(Some(kind))
    } else if lower.iter().any(|&t| t as u8 == code) {
        Ok(None)
    } else {
        Err(())
    }
}

/// Reads a `.vtu` (`xml = true`) or legacy `.vtk` file from its bytes.
pub(crate) fn read(path: &Path, bytes: &[u8], xml: bool) -> Result<Imported, MeshError> {
    let grid = if xml { read_xml(path, bytes)? } else { read_legacy(path, bytes)? };
    build(path, grid)
}

/// A `.vtu` file through our own reader ([`super::vtu_format`]).
fn read_xml(path: &Path, bytes: &[u8]) -> Result<Grid, MeshError> {
    let piece = vtu_format::parse(bytes).map_err(|e| {
        // Files written as one long line (ours are) are better served by an offset.
        let multi_line = bytes.iter().filter(|&&b| b == b'\n').count() > 1;
        let location = if multi_line { Location::Line(line_of(bytes, e.offset)) } else { Location::Offset(e.offset) };
        MeshError::parse(path, location, e.message)
    })?;
    Ok(Grid {
        points: piece.points,
        cells: Cells::Xml { connectivity: piece.connectivity, offsets: piece.offsets },
        types: piece.types,
        point_data: piece.point_data,
        cell_data: piece.cell_data,
    })
}

/// A legacy `.vtk` file through vtkio, its counts checked first.
fn read_legacy(path: &Path, bytes: &[u8]) -> Result<Grid, MeshError> {
    check_legacy_counts(path, bytes)?;
    let parsed = super::guard(path, || Vtk::parse_legacy_be(bytes))?;
    let vtk = parsed.map_err(|e| MeshError::parse(path, legacy_error_location(bytes), format!("not a readable VTK file: {e}")))?;
    let piece = match vtk.data {
        DataSet::UnstructuredGrid { pieces, .. } => {
            if pieces.len() != 1 {
                return Err(MeshError::parse(path, Location::Unknown, format!("{} pieces; expected exactly one", pieces.len())));
            }
            let p = &pieces[0];
            if !matches!(p, vtkio::model::Piece::Inline(_)) {
                return Err(MeshError::parse(path, Location::Unknown, "pieces in other files are not supported"));
            }
            super::guard(path, || p.load_piece_data(None))?
                .map_err(|e| MeshError::parse(path, Location::Unknown, format!("cannot load piece: {e}")))?
        }
        _ => return Err(MeshError::parse(path, Location::Unknown, "not an unstructured grid")),
    };
    let points = piece.points.cast_into::<f64>().ok_or_else(|| MeshError::parse(path, Location::Unknown, "points are not numbers"))?;
    let cells = match piece.cells.cell_verts {
        VertexNumbers::Legacy { num_cells, vertices } => Cells::Legacy { num_cells: num_cells as usize, vertices },
        VertexNumbers::XML { connectivity, offsets } => Cells::Xml {
            connectivity: connectivity.into_iter().map(|v| v as f64).collect(),
            offsets: offsets.into_iter().map(|v| v as f64).collect(),
        },
    };
    let arrays = |list: &[Attribute]| -> Vec<NamedArray> {
        list.iter()
            .filter_map(|a| match a {
                Attribute::DataArray(d) => Some(NamedArray {
                    name: d.name.clone(),
                    components: legacy_components(&d.elem),
                    values: d.data.cast_into::<f64>().unwrap_or_default(),
                }),
                _ => None,
            })
            .collect()
    };
    Ok(Grid {
        points,
        types: piece.cells.types.iter().map(|&t| t as u8 as f64).collect(),
        cells,
        point_data: arrays(&piece.data.point),
        cell_data: arrays(&piece.data.cell),
    })
}

/// Values per point or cell of a legacy attribute, by its kind.
fn legacy_components(elem: &ElementType) -> usize {
    match *elem {
        ElementType::Scalars { num_comp, .. } | ElementType::Generic(num_comp) | ElementType::ColorScalars(num_comp) => num_comp as usize,
        ElementType::Vectors | ElementType::Normals => 3,
        ElementType::TCoords(n) => n as usize,
        ElementType::Tensors => 9,
        ElementType::LookupTable => 4,
    }
}

/// An unstructured grid as plain arrays, from either reader.
struct Grid {
    points: Vec<f64>,
    cells: Cells,
    types: Vec<f64>,
    point_data: Vec<NamedArray>,
    cell_data: Vec<NamedArray>,
}

/// Cell node lists: legacy (count then nodes per cell) or XML (connectivity and end offsets).
enum Cells {
    Legacy { num_cells: usize, vertices: Vec<u32> },
    Xml { connectivity: Vec<f64>, offsets: Vec<f64> },
}

/// `" (Pyramid)"` for the VTK cell types olli does not read, from the VTK
/// file-format document's cell-type table.
fn cell_type_name(code: f64) -> &'static str {
    match code as i64 {
        6 => " (TriangleStrip)",
        7 => " (Polygon)",
        8 => " (Pixel)",
        11 => " (Voxel)",
        14 => " (Pyramid)",
        26 => " (QuadraticWedge)",
        27 => " (QuadraticPyramid)",
        32 => " (BiquadraticQuadraticWedge)",
        _ => "",
    }
}

/// A value that must be a non-negative whole number (a node index, an offset, a type code).
fn whole(v: f64) -> Option<u64> {
    (v >= 0.0 && v.fract() == 0.0 && v < 2f64.powi(53)).then_some(v as u64)
}

fn build(path: &Path, grid: Grid) -> Result<Imported, MeshError> {
    let perr = |loc: Location, msg: String| MeshError::parse(path, loc, msg);
    let coords = grid.points;
    if !coords.len().is_multiple_of(3) || coords.iter().any(|c| !c.is_finite()) {
        return Err(perr(Location::Unknown, "points must be finite x y z triples".into()));
    }
    let npoints = coords.len() / 3;
    let types = grid.types;
    // Cell node lists as (start, end) ranges into one connectivity array.
    let (conn, ranges): (Vec<f64>, Vec<(usize, usize)>) = match grid.cells {
        Cells::Legacy { num_cells, vertices } => {
            let mut ranges = Vec::with_capacity(types.len());
            let mut conn = Vec::with_capacity(vertices.len());
            let mut i = 0usize;
            for c in 0..num_cells.min(vertices.len()) {
                let n = *vertices.get(i).ok_or_else(|| perr(Location::Cell(c), "cell list ends early".into()))? as usize;
                let nodes = vertices.get(i + 1..i + 1 + n).ok_or_else(|| perr(Location::Cell(c), "cell list ends early".into()))?;
                ranges.push((conn.len(), conn.len() + n));
                conn.extend(nodes.iter().map(|&v| v as f64));
                i += 1 + n;
            }
            (conn, ranges)
        }
        Cells::Xml { connectivity, offsets } => {
            let offs: &[f64] = if offsets.len() == types.len() + 1 && offsets.first() == Some(&0.0) { &offsets[1..] } else { &offsets };
            let mut ranges = Vec::with_capacity(offs.len());
            let mut start = 0u64;
            for (c, &end) in offs.iter().enumerate() {
                let end = whole(end).filter(|&e| e >= start && e <= connectivity.len() as u64);
                let Some(end) = end else {
                    return Err(perr(Location::Cell(c), format!("offset {} out of order or beyond the connectivity", offs[c])));
                };
                ranges.push((start as usize, end as usize));
                start = end;
            }
            (connectivity, ranges)
        }
    };
    if ranges.len() != types.len() {
        return Err(perr(Location::Unknown, format!("{} cells but {} cell types", ranges.len(), types.len())));
    }
    let mut kinds = Vec::with_capacity(types.len());
    let mut skipped = 0usize;
    for (c, &t) in types.iter().enumerate() {
        match whole(t).filter(|&t| t < 256).ok_or(()).and_then(|t| kind_of(t as u8)) {
            Ok(k) => kinds.push(k),
            Err(()) => return Err(perr(Location::Cell(c), format!("unsupported cell type {t}{}", cell_type_name(t)))),
        }
    }
    let dimension = kinds.iter().flatten().map(|k| k.dimension()).max().unwrap_or(3);
    let mut mesh = Mesh::new(dimension);
    for p in coords.chunks_exact(3) {
        mesh.add_node([p[0], p[1], p[2]]);
    }
    // File cell index -> mesh element index (lower-dimensional cells are dropped).
    let mut element_of = vec![usize::MAX; types.len()];
    let mut nodes = Vec::with_capacity(27);
    for (c, (&kind, &(a, b))) in kinds.iter().zip(&ranges).enumerate() {
        let Some(kind) = kind.filter(|k| k.dimension() == dimension) else {
            skipped += 1;
            continue;
        };
        if b - a != kind.node_count() {
            return Err(perr(Location::Cell(c), format!("{kind} cell with {} nodes; expected {}", b - a, kind.node_count())));
        }
        nodes.clear();
        for &v in &conn[a..b] {
            match whole(v).filter(|&v| v < npoints as u64) {
                Some(v) => nodes.push(v as usize),
                None => return Err(perr(Location::Cell(c), format!("node {v} does not exist ({npoints} points)"))),
            }
        }
        element_of[c] = mesh.add_element(kind, &nodes);
    }
    let mut notes = Vec::new();
    if skipped > 0 {
        notes.push(format!("{skipped} cells of lower dimension than the mesh were skipped"));
    }
    read_sets(path, &mut mesh, &grid.point_data, &grid.cell_data, &element_of)?;
    let point_arrays = read_point_arrays(path, grid.point_data, mesh.nodes.len())?;
    Ok(Imported { mesh, notes, point_arrays })
}

/// The point arrays other than sets, checked for length (components × nodes).
fn read_point_arrays(path: &Path, point: Vec<NamedArray>, nodes: usize) -> Result<Vec<PointArray>, MeshError> {
    let mut arrays = Vec::new();
    for NamedArray { name, components, values } in point {
        if name.starts_with("set_") {
            continue;
        }
        let expected = components.checked_mul(nodes);
        if components == 0 || expected != Some(values.len()) {
            let expected = expected.map_or_else(|| "more than memory can hold".to_string(), |e| e.to_string());
            return Err(MeshError::parse(
                path,
                Location::Unknown,
                format!("array {name} has {} values; expected {expected} ({components} per node × {nodes} nodes)", values.len()),
            ));
        }
        arrays.push(PointArray { name, components, values });
    }
    Ok(arrays)
}

/// Restores sets from our `set_*` arrays; other arrays are ignored.
fn read_sets(path: &Path, mesh: &mut Mesh, point: &[NamedArray], cell: &[NamedArray], element_of: &[usize]) -> Result<(), MeshError> {
    let values = |NamedArray { name, values: data, .. }: &NamedArray, len: usize| -> Result<Option<(String, Vec<i64>)>, MeshError> {
        if !name.starts_with("set_") {
            return Ok(None);
        }
        if data.len() != len {
            return Err(MeshError::parse(path, Location::Unknown, format!("array {name} has {} values; expected {len}", data.len())));
        }
        let v = data.iter().map(|&x| if x.is_finite() { x as i64 } else { 0 }).collect();
        Ok(Some((name.clone(), v)))
    };
    for a in point {
        if let Some((name, v)) = values(a, mesh.nodes.len())? {
            if let Some(set) = name.strip_prefix(NODE_SET_PREFIX) {
                let nodes = (0..v.len()).filter(|&i| v[i] != 0).collect();
                mesh.node_sets.insert(set.to_string(), nodes);
            }
        }
    }
    let mut sides: BTreeMap<String, Vec<Side>> = BTreeMap::new();
    for a in cell {
        if let Some((name, v)) = values(a, element_of.len())? {
            if let Some(set) = name.strip_prefix(ELEMENT_SET_PREFIX) {
                let elems = (0..v.len()).filter(|&c| v[c] != 0 && element_of[c] != usize::MAX).map(|c| element_of[c]).collect();
                mesh.element_sets.insert(set.to_string(), elems);
            } else if let Some(set) = name.strip_prefix(SIDE_SET_PREFIX) {
                let out = sides.entry(set.to_string()).or_default();
                for (c, &mask) in v.iter().enumerate() {
                    let e = element_of[c];
                    if mask == 0 || e == usize::MAX {
                        continue;
                    }
                    let n_sides = mesh.kinds[e].sides().len();
                    if mask < 0 || mask >= 1 << n_sides {
                        return Err(MeshError::parse(
                            path,
                            Location::Cell(c),
                            format!("side mask {mask} of {name} names a side the cell lacks"),
                        ));
                    }
                    out.extend((0..n_sides).filter(|k| mask & (1 << k) != 0).map(|k| Side { element: e, local: k as u8 }));
                }
            }
        }
    }
    mesh.side_sets.extend(sides);
    Ok(())
}

/// Walks the legacy header and the POINTS / CELLS / CELL_TYPES counts of an
/// ASCII file and returns the line where the structure first breaks.
fn legacy_error_location(bytes: &[u8]) -> Location {
    let text = String::from_utf8_lossy(bytes);
    let mut lines = text.lines().enumerate();
    let header_ok = lines.next().is_some_and(|(_, l)| l.starts_with("# vtk DataFile"));
    if !header_ok {
        return Location::Line(1);
    }
    lines.next();
    match lines.next() {
        Some((_, l)) if l.trim().eq_ignore_ascii_case("ascii") => {}
        Some((_, l)) if l.trim().eq_ignore_ascii_case("binary") => return binary_section_location(bytes),
        _ => return Location::Line(3),
    }
    // Tokens with their line numbers, from line 4 on.
    let mut tokens = lines.flat_map(|(i, l)| l.split_whitespace().map(move |t| (i + 1, t)));
    let mut expect = |what: &str| -> Result<(usize, String), usize> {
        match tokens.next() {
            Some((l, t)) if what.is_empty() || t.eq_ignore_ascii_case(what) => Ok((l, t.to_string())),
            Some((l, _)) => Err(l),
            None => Err(text.lines().count().max(1)),
        }
    };
    let mut walk = || -> Result<Location, usize> {
        expect("DATASET")?;
        expect("UNSTRUCTURED_GRID")?;
        expect("POINTS")?;
        let (l, n) = expect("")?;
        let n: usize = n.parse().map_err(|_| l)?;
        expect("")?;
        for _ in 0..n.saturating_mul(3) {
            let (l, t) = expect("")?;
            t.parse::<f64>().map_err(|_| l)?;
        }
        expect("CELLS")?;
        let (l, c) = expect("")?;
        let c: usize = c.parse().map_err(|_| l)?;
        let (l, size) = expect("")?;
        let size: usize = size.parse().map_err(|_| l)?;
        let mut read = 0;
        for _ in 0..c {
            let (l, k) = expect("")?;
            let k: usize = k.parse().map_err(|_| l)?;
            for _ in 0..k {
                let (l, t) = expect("")?;
                t.parse::<u64>().map_err(|_| l)?;
            }
            read += k + 1;
        }
        if read != size {
            return Err(l);
        }
        let (l, _) = expect("CELL_TYPES")?;
        let (l2, n) = expect("")?;
        if n.parse::<usize>().map_err(|_| l2)? != c {
            return Err(l2);
        }
        for _ in 0..c {
            let (l, t) = expect("")?;
            t.parse::<u8>().map_err(|_| l)?;
        }
        Ok(Location::Line(l))
    };
    match walk() {
        Ok(after) => after,
        Err(line) => Location::Line(line),
    }
}

/// In a binary legacy file only the section keywords are text: point at the
/// last one found, since the data after it is where parsing stopped.
fn binary_section_location(bytes: &[u8]) -> Location {
    let mut last = Location::Unknown;
    for key in [&b"POINTS"[..], b"CELLS", b"CELL_TYPES", b"POINT_DATA", b"CELL_DATA"] {
        if let Some(i) = bytes.windows(key.len()).position(|w| w == key) {
            last = Location::Offset(i);
        }
    }
    last
}

/// Refuses counts in POINTS / CELLS headers that the file is too short to
/// hold, before any reader allocates room for them.
fn check_legacy_counts(path: &Path, bytes: &[u8]) -> Result<(), MeshError> {
    for key in [&b"POINTS "[..], b"CELLS ", b"CELL_TYPES "] {
        let Some(i) = bytes.windows(key.len()).position(|w| w == key) else { continue };
        let rest = &bytes[i + key.len()..];
        let digits: Vec<u8> = rest.iter().take_while(|b| b.is_ascii_digit()).copied().collect();
        let n: u128 = std::str::from_utf8(&digits).ok().and_then(|s| s.parse().ok()).unwrap_or(0);
        if n > bytes.len() as u128 {
            return Err(MeshError::parse(
                path,
                Location::Line(line_of(bytes, i)),
                format!("{} count {n} is larger than the file could hold", String::from_utf8_lossy(key).trim()),
            ));
        }
    }
    Ok(())
}
