//! VTK reader: XML unstructured grids (`.vtu`) and legacy files (`.vtk`),
//! parsed by vtkio. Restores the sets written by [`crate::export`].
//!
//! vtkio's errors carry no position, so a file it rejects is scanned again by
//! a small structural check (XML well-formedness with quick-xml; the section
//! headers and counts of a legacy file) to name the line or offset at fault.

use std::collections::BTreeMap;
use std::path::Path;

use vtkio::model::{Attribute, CellType, DataSet, ElementType, IOBuffer, UnstructuredGridPiece, VertexNumbers, Vtk};

use super::{line_of, Imported, PointArray};
use crate::element::ElementKind;
use crate::error::{Location, MeshError};
use crate::export::{ELEMENT_SET_PREFIX, NODE_SET_PREFIX, SIDE_SET_PREFIX};
use crate::model::{Mesh, Side};

/// Element kind of a VTK cell type: `Ok(None)` for lower-dimensional cells
/// (vertices, lines) that carry no volume, `Err` for unsupported ones.
fn kind_of(t: CellType) -> Result<Option<ElementKind>, ()> {
    Ok(Some(match t {
        CellType::Triangle => ElementKind::Tri3,
        CellType::QuadraticTriangle => ElementKind::Tri6,
        CellType::Quad => ElementKind::Quad4,
        CellType::QuadraticQuad => ElementKind::Quad8,
        CellType::BiquadraticQuad => ElementKind::Quad9,
        CellType::Tetra => ElementKind::Tet4,
        CellType::QuadraticTetra => ElementKind::Tet10,
        CellType::Wedge => ElementKind::Wedge6,
        CellType::Hexahedron => ElementKind::Hex8,
        CellType::QuadraticHexahedron => ElementKind::Hex20,
        CellType::TriquadraticHexahedron => ElementKind::Hex27,
        CellType::Vertex | CellType::PolyVertex | CellType::Line | CellType::PolyLine | CellType::QuadraticEdge => return Ok(None),
        _ => return Err(()),
    }))
}

/// Reads a `.vtu` (`xml = true`) or legacy `.vtk` file from its bytes.
pub(crate) fn read(path: &Path, bytes: &[u8], xml: bool) -> Result<Imported, MeshError> {
    if !xml {
        check_legacy_counts(path, bytes)?;
    }
    let parsed = super::guard(path, || if xml { Vtk::parse_xml(bytes) } else { Vtk::parse_legacy_be(bytes) })?;
    let vtk = match parsed {
        Ok(v) => v,
        Err(e) => {
            let location = if xml { xml_error_location(bytes) } else { legacy_error_location(bytes) };
            return Err(MeshError::parse(path, location, format!("not a readable VTK file: {e}")));
        }
    };
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
    build(path, piece)
}

fn to_f64(buf: &IOBuffer) -> Option<Vec<f64>> {
    buf.cast_into::<f64>()
}

fn build(path: &Path, piece: UnstructuredGridPiece) -> Result<Imported, MeshError> {
    let perr = |loc: Location, msg: String| MeshError::parse(path, loc, msg);
    let coords = to_f64(&piece.points).ok_or_else(|| perr(Location::Unknown, "points are not numbers".into()))?;
    if coords.len() % 3 != 0 || coords.iter().any(|c| !c.is_finite()) {
        return Err(perr(Location::Unknown, "points must be finite x y z triples".into()));
    }
    let npoints = coords.len() / 3;
    let types = piece.cells.types;
    // Cell node lists as (start, end) ranges into one connectivity array.
    let (conn, ranges) = match piece.cells.cell_verts {
        VertexNumbers::Legacy { num_cells, vertices } => {
            let mut ranges = Vec::with_capacity(types.len());
            let mut conn = Vec::with_capacity(vertices.len());
            let mut i = 0usize;
            for c in 0..num_cells as usize {
                let n = *vertices.get(i).ok_or_else(|| perr(Location::Cell(c), "cell list ends early".into()))? as usize;
                let nodes = vertices.get(i + 1..i + 1 + n).ok_or_else(|| perr(Location::Cell(c), "cell list ends early".into()))?;
                ranges.push((conn.len(), conn.len() + n));
                conn.extend(nodes.iter().map(|&v| v as u64));
                i += 1 + n;
            }
            (conn, ranges)
        }
        VertexNumbers::XML { connectivity, offsets } => {
            let offs: &[u64] = if offsets.len() == types.len() + 1 && offsets.first() == Some(&0) { &offsets[1..] } else { &offsets };
            let mut ranges = Vec::with_capacity(offs.len());
            let mut start = 0u64;
            for (c, &end) in offs.iter().enumerate() {
                if end < start || end > connectivity.len() as u64 {
                    return Err(perr(Location::Cell(c), format!("offset {end} out of order or beyond the connectivity")));
                }
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
        match kind_of(t) {
            Ok(k) => kinds.push(k),
            Err(()) => return Err(perr(Location::Cell(c), format!("unsupported cell type {t:?}"))),
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
            if v >= npoints as u64 {
                return Err(perr(Location::Cell(c), format!("node {v} does not exist ({npoints} points)")));
            }
            nodes.push(v as usize);
        }
        element_of[c] = mesh.add_element(kind, &nodes);
    }
    let mut notes = Vec::new();
    if skipped > 0 {
        notes.push(format!("{skipped} cells of lower dimension than the mesh were skipped"));
    }
    read_sets(path, &mut mesh, &piece.data.point, &piece.data.cell, &element_of)?;
    let point_arrays = read_point_arrays(path, &piece.data.point, mesh.nodes.len())?;
    Ok(Imported { mesh, notes, point_arrays })
}

/// The numeric point arrays other than sets, checked for length.
fn read_point_arrays(path: &Path, point: &[Attribute], nodes: usize) -> Result<Vec<PointArray>, MeshError> {
    let mut arrays = Vec::new();
    for a in point {
        let Attribute::DataArray(d) = a else { continue };
        if d.name.starts_with("set_") {
            continue;
        }
        let Some(values) = to_f64(&d.data) else { continue };
        let components = match d.elem {
            ElementType::Scalars { num_comp, .. } | ElementType::Generic(num_comp) => num_comp as usize,
            ElementType::Vectors | ElementType::Normals => 3,
            ElementType::TCoords(n) => n as usize,
            ElementType::Tensors => 9,
            _ => continue,
        };
        if components == 0 || values.len() != components * nodes {
            let expected = components * nodes;
            return Err(MeshError::parse(
                path,
                Location::Unknown,
                format!("array {} has {} values; expected {expected}", d.name, values.len()),
            ));
        }
        arrays.push(PointArray { name: d.name.clone(), components, values });
    }
    Ok(arrays)
}

/// Restores sets from our `set_*` arrays; other arrays are ignored.
fn read_sets(path: &Path, mesh: &mut Mesh, point: &[Attribute], cell: &[Attribute], element_of: &[usize]) -> Result<(), MeshError> {
    let values = |a: &Attribute, len: usize| -> Result<Option<(String, Vec<i64>)>, MeshError> {
        let Attribute::DataArray(d) = a else { return Ok(None) };
        if !d.name.starts_with("set_") {
            return Ok(None);
        }
        let v: Vec<i64> = d.data.cast_into::<i64>().unwrap_or_default();
        if v.len() != len {
            return Err(MeshError::parse(path, Location::Unknown, format!("array {} has {} values; expected {len}", d.name, v.len())));
        }
        Ok(Some((d.name.clone(), v)))
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

/// Position of the first XML syntax error, found by quick-xml: a line, or
/// a byte offset for single-line files.
fn xml_error_location(bytes: &[u8]) -> Location {
    let mut reader = quick_xml::Reader::from_reader(bytes);
    let mut buf = Vec::new();
    loop {
        match reader.read_event_into(&mut buf) {
            Ok(quick_xml::events::Event::Eof) => return Location::Unknown,
            Ok(_) => buf.clear(),
            Err(_) => {
                let at = reader.error_position() as usize;
                // Files written as one long line (ours are) are better served by an offset.
                let multi_line = bytes.iter().filter(|&&b| b == b'\n').count() > 1;
                return if multi_line { Location::Line(line_of(bytes, at)) } else { Location::Offset(at) };
            }
        }
    }
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
