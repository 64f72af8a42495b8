//! Gmsh MSH 4.1 reader (ASCII and binary), parsed by mshio, with physical
//! groups turned into named sets:
//! - groups of the mesh dimension become element sets (material regions);
//! - groups one dimension lower (lines in 2-D, surfaces in 3-D) become side
//!   sets, each boundary element matched to an element side by its sorted
//!   corner nodes, and node sets of the same name;
//! - lower groups (points, and lines in 3-D) become node sets.
//!
//! Named groups keep their `$PhysicalNames` name (mshio skips that section, so
//! it is read here); unnamed ones are called `physical_<dim>_<tag>`.
//! mshio also drops node tags when they are contiguous, so this module reads
//! the tag lists itself rather than assume file order equals tag order.

use std::collections::HashMap;
use std::path::Path;

use mshio::ElementType as G;

use super::{line_of, Imported};
use crate::element::ElementKind;
use crate::error::{Location, MeshError};
use crate::model::{Mesh, Side};

/// Our kind and the Gmsh → VTK node permutation (`vtk[i] = gmsh[perm[i]]`)
/// for a volume/area element type; the orders come from the Gmsh reference
/// manual's node-ordering figures and the VTK file-format document (from memory).
fn volume_kind(t: G) -> Option<(ElementKind, &'static [usize])> {
    const ID: [usize; 27] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23, 24, 25, 26];
    const TET10: [usize; 10] = [0, 1, 2, 3, 4, 5, 6, 7, 9, 8];
    // Gmsh's prism base faces into the element, VTK's wedge base faces out.
    const PRI6: [usize; 6] = [0, 2, 1, 3, 5, 4];
    const HEX27: [usize; 27] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 11, 13, 9, 16, 18, 19, 17, 10, 12, 14, 15, 22, 23, 21, 24, 20, 25, 26];
    Some(match t {
        G::Tri3 => (ElementKind::Tri3, &ID[..3]),
        G::Tri6 => (ElementKind::Tri6, &ID[..6]),
        G::Qua4 => (ElementKind::Quad4, &ID[..4]),
        G::Qua8 => (ElementKind::Quad8, &ID[..8]),
        G::Qua9 => (ElementKind::Quad9, &ID[..9]),
        G::Tet4 => (ElementKind::Tet4, &ID[..4]),
        G::Tet10 => (ElementKind::Tet10, &TET10),
        G::Pri6 => (ElementKind::Wedge6, &PRI6),
        G::Hex8 => (ElementKind::Hex8, &ID[..8]),
        G::Hex20 => (ElementKind::Hex20, &HEX27[..20]),
        G::Hex27 => (ElementKind::Hex27, &HEX27),
        _ => return None,
    })
}

/// Number of corner nodes of a boundary element type, and its dimension.
fn boundary_corners(t: G) -> Option<(usize, usize)> {
    Some(match t {
        G::Pnt => (1, 0),
        G::Lin2 | G::Lin3 => (2, 1),
        G::Tri3 | G::Tri6 => (3, 2),
        G::Qua4 | G::Qua8 | G::Qua9 => (4, 2),
        _ => return None,
    })
}

/// Dimension of an element type we can read.
fn type_dimension(t: G) -> Option<usize> {
    volume_kind(t).map(|(k, _)| k.dimension()).or_else(|| boundary_corners(t).map(|c| c.1))
}

type Msh = mshio::MshFile<u64, i32, f64>;

pub(crate) fn read(path: &Path, bytes: &[u8]) -> Result<Imported, MeshError> {
    let msh = parse(path, bytes)?;
    let err = |msg: String| MeshError::parse(path, Location::Unknown, msg);
    let (Some(nodes), Some(elements)) = (msh.data.nodes.as_ref(), msh.data.elements.as_ref()) else {
        return Err(err("no $Nodes or $Elements section".into()));
    };
    let mut dimension = 0;
    for b in &elements.element_blocks {
        match type_dimension(b.element_type) {
            Some(d) => dimension = dimension.max(d),
            None => return Err(err(format!("unsupported Gmsh element type {:?} ({})", b.element_type, b.element_type as i32))),
        }
    }
    if dimension < 2 {
        return Err(err("no 2-D or 3-D elements".into()));
    }
    let (coords, node_of) = read_nodes(path, bytes, nodes)?;
    let groups = Groups::new(&msh, bytes);
    let lookup =
        |tag: u64, element: u64| node_of.get(&tag).copied().ok_or_else(|| err(format!("element {element} refers to missing node {tag}")));
    let mut mesh = Mesh::new(dimension);
    mesh.nodes = coords;

    let mut conn = Vec::with_capacity(27);
    for b in &elements.element_blocks {
        let Some((kind, perm)) = volume_kind(b.element_type).filter(|(k, _)| k.dimension() == dimension) else { continue };
        let names = groups.names_of(b.entity_dim, b.entity_tag);
        for el in &b.elements {
            if el.nodes.len() != kind.node_count() {
                return Err(err(format!("element {} has {} nodes; {kind} needs {}", el.element_tag, el.nodes.len(), kind.node_count())));
            }
            conn.clear();
            for &p in perm {
                conn.push(lookup(el.nodes[p], el.element_tag)?);
            }
            let e = mesh.add_element(kind, &conn);
            for name in &names {
                mesh.element_sets.entry(name.clone()).or_default().push(e);
            }
        }
    }

    // Boundary elements in physical groups: node sets, and side sets when
    // one dimension below the mesh, matched to element sides by corner nodes.
    let mut side_of: HashMap<Vec<usize>, Side> = HashMap::new();
    for e in 0..mesh.kinds.len() {
        for k in 0..mesh.kinds[e].sides().len() {
            let side = Side { element: e, local: k as u8 };
            side_of.entry(mesh.side_key(side)).or_insert(side);
        }
    }
    let mut unmatched = 0usize;
    for b in &elements.element_blocks {
        let Some((corners, dim)) = boundary_corners(b.element_type).filter(|&(_, d)| d < dimension) else { continue };
        let names = groups.names_of(b.entity_dim, b.entity_tag);
        if names.is_empty() {
            continue;
        }
        for el in &b.elements {
            let ns = el.nodes.iter().map(|&t| lookup(t, el.element_tag)).collect::<Result<Vec<_>, _>>()?;
            for name in &names {
                mesh.node_sets.entry(name.clone()).or_default().extend(&ns);
            }
            if dim + 1 == dimension {
                let mut key = ns.get(..corners).map(<[usize]>::to_vec).unwrap_or_default();
                key.sort_unstable();
                match side_of.get(&key) {
                    Some(&s) => names.iter().for_each(|n| mesh.side_sets.entry(n.clone()).or_default().push(s)),
                    None => unmatched += 1,
                }
            }
        }
    }
    for set in mesh.node_sets.values_mut() {
        set.sort_unstable();
        set.dedup();
    }
    let mut notes = Vec::new();
    if unmatched > 0 {
        notes.push(format!("{unmatched} boundary elements in physical groups match no element side and were left out"));
    }
    Ok(Imported { mesh, notes, point_arrays: Vec::new() })
}

/// Runs mshio, turning its error into one with a line (ASCII) or byte offset.
fn parse(path: &Path, bytes: &[u8]) -> Result<Msh, MeshError> {
    let ascii = is_ascii_format(bytes);
    let parsed = super::guard(path, || {
        mshio::parse_msh_bytes(bytes).map_err(|e| {
            // The innermost MSH-level error is where the reader stopped.
            let offset =
                e.begin_msh_errors().next().or(e.backtrace.first()).map(|(rest, _)| bytes.len().saturating_sub(rest.len())).unwrap_or(0);
            // The version sits on the line after `$MeshFormat`.
            let offset = match e.first_msh_error() {
                Some(mshio::error::MshParserErrorKind::UnsupportedMshVersion) => find(bytes, b"\n").map_or(0, |i| i + 1),
                _ => offset,
            };
            let what = e.first_msh_error().map(|k| k.to_string()).unwrap_or_else(|| "malformed MSH data".into());
            let context: Vec<String> = e.filter_msh_errors().filter_map(|(_, k)| k.context().map(str::to_string)).collect();
            (offset, if context.is_empty() { what } else { format!("{what} (in {})", context.join(", in ")) })
        })
    })?;
    parsed.map_err(|(offset, msg)| {
        let location = if ascii { Location::Line(line_of(bytes, offset)) } else { Location::Offset(offset) };
        MeshError::parse(path, location, msg)
    })
}

/// Node coordinates in file order, and the index of each node tag.
type NodeTable = (Vec<[f64; 3]>, HashMap<u64, usize>);

/// Reads the node blocks into a [`NodeTable`].
fn read_nodes(path: &Path, bytes: &[u8], nodes: &mshio::Nodes<u64, i32, f64>) -> Result<NodeTable, MeshError> {
    let err = |msg: String| MeshError::parse(path, Location::Unknown, msg);
    let total: usize = nodes.node_blocks.iter().map(|b| b.nodes.len()).sum();
    let file_tags = scan_node_tags(bytes, is_ascii_format(bytes)).filter(|t| t.len() == total);
    let mut node_of: HashMap<u64, usize> = HashMap::with_capacity(total);
    let mut coords = Vec::with_capacity(total);
    let mut running = 0usize;
    for b in &nodes.node_blocks {
        let tags: Vec<u64> = match (&b.node_tags, &file_tags) {
            (Some(map), _) => {
                let mut t = vec![0u64; b.nodes.len()];
                for (&tag, &i) in map {
                    if let Some(slot) = t.get_mut(i) {
                        *slot = tag;
                    }
                }
                t
            }
            (None, Some(all)) => all[running..running + b.nodes.len()].to_vec(),
            (None, None) => (0..b.nodes.len()).map(|i| nodes.min_node_tag.wrapping_add((running + i) as u64)).collect(),
        };
        for (n, tag) in b.nodes.iter().zip(tags) {
            if ![n.x, n.y, n.z].iter().all(|c| c.is_finite()) {
                return Err(err(format!("node {tag} has a non-finite coordinate")));
            }
            if node_of.insert(tag, coords.len()).is_some() {
                return Err(err(format!("node tag {tag} appears twice")));
            }
            coords.push([n.x, n.y, n.z]);
        }
        running += b.nodes.len();
    }
    Ok((coords, node_of))
}

/// Physical groups of each entity, with their names.
struct Groups {
    by_entity: HashMap<(i32, i32), Vec<i32>>,
    names: HashMap<(i32, i32), String>,
}

impl Groups {
    fn new(msh: &Msh, bytes: &[u8]) -> Self {
        let mut by_entity = HashMap::new();
        if let Some(ent) = msh.data.entities.as_ref() {
            by_entity.extend(ent.points.iter().map(|p| ((0, p.tag), p.physical_tags.clone())));
            by_entity.extend(ent.curves.iter().map(|c| ((1, c.tag), c.physical_tags.clone())));
            by_entity.extend(ent.surfaces.iter().map(|s| ((2, s.tag), s.physical_tags.clone())));
            by_entity.extend(ent.volumes.iter().map(|v| ((3, v.tag), v.physical_tags.clone())));
        }
        Groups { by_entity, names: physical_names(bytes) }
    }

    /// Set names of the groups an entity belongs to.
    fn names_of(&self, dim: i32, entity: i32) -> Vec<String> {
        let tags = self.by_entity.get(&(dim, entity)).map(Vec::as_slice).unwrap_or(&[]);
        tags.iter()
            .map(|&t| self.names.get(&(dim, t.saturating_abs())).cloned().unwrap_or_else(|| format!("physical_{dim}_{}", t.unsigned_abs())))
            .collect()
    }
}

/// True when the `$MeshFormat` line says ASCII (file type 0).
fn is_ascii_format(bytes: &[u8]) -> bool {
    let head = String::from_utf8_lossy(&bytes[..bytes.len().min(64)]);
    head.lines().nth(1).and_then(|l| l.split_whitespace().nth(1)).is_none_or(|t| t == "0")
}

/// `$PhysicalNames` entries: (dimension, tag) → name. The section is text
/// even in binary files; malformed entries are skipped.
fn physical_names(bytes: &[u8]) -> HashMap<(i32, i32), String> {
    let mut out = HashMap::new();
    let Some(start) = find(bytes, b"$PhysicalNames") else { return out };
    let end = find(&bytes[start..], b"$EndPhysicalNames").map_or(bytes.len(), |e| start + e);
    let text = String::from_utf8_lossy(&bytes[start..end]);
    for line in text.lines().skip(2) {
        let mut f = line.trim().splitn(3, char::is_whitespace);
        let (Some(d), Some(t), Some(name)) = (f.next(), f.next(), f.next()) else { continue };
        if let (Ok(d), Ok(t)) = (d.parse(), t.parse()) {
            out.insert((d, t), name.trim().trim_matches('"').to_string());
        }
    }
    out
}

fn find(hay: &[u8], needle: &[u8]) -> Option<usize> {
    hay.windows(needle.len()).position(|w| w == needle)
}

/// Node tags of the `$Nodes` section in file order (ASCII or little-endian
/// binary with 8-byte size_t), or `None` if the section does not scan.
fn scan_node_tags(bytes: &[u8], ascii: bool) -> Option<Vec<u64>> {
    let start = find(bytes, b"$Nodes")? + b"$Nodes".len();
    let body = &bytes[start..];
    let mut tags = Vec::new();
    if ascii {
        let end = find(body, b"$EndNodes")?;
        let text = std::str::from_utf8(&body[..end]).ok()?;
        let mut tok = text.split_ascii_whitespace();
        let mut next = || tok.next()?.parse::<u64>().ok();
        let blocks = next()?;
        for _ in 0..3 {
            next()?;
        }
        for _ in 0..blocks {
            next()?;
            next()?;
            let parametric = next()?;
            let n = next()?;
            if parametric != 0 || n > bytes.len() as u64 {
                return None;
            }
            for _ in 0..n {
                tags.push(next()?);
            }
            // Coordinates are consumed even when they do not parse as integers.
            for _ in 0..3 * n {
                let _ = next();
            }
        }
        Some(tags)
    } else {
        let mut at = 1usize; // skip the newline after $Nodes
        let mut read = |k: usize| -> Option<&[u8]> {
            let s = body.get(at..at + k)?;
            at += k;
            Some(s)
        };
        let size_t = |s: &[u8]| u64::from_le_bytes(s.try_into().unwrap_or([0; 8]));
        let blocks = size_t(read(8)?);
        read(24)?;
        for _ in 0..blocks {
            read(12)?;
            let n = size_t(read(8)?);
            if n > bytes.len() as u64 {
                return None;
            }
            for _ in 0..n {
                tags.push(size_t(read(8)?));
            }
            read(24 * n as usize)?;
        }
        Some(tags)
    }
}
