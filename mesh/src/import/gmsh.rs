//! Gmsh MSH 4.1 reader (ASCII and binary), parsed by [`super::msh_format`],
//! with physical groups turned into named sets:
//! - groups of the mesh dimension become element sets (material regions);
//! - groups one dimension lower (lines in 2-D, surfaces in 3-D) become side
//!   sets, each boundary element matched to an element side by its sorted
//!   corner nodes, and node sets of the same name;
//! - lower groups (points, and lines in 3-D) become node sets.
//!
//! Named groups keep their `$PhysicalNames` name; unnamed ones are called
//! `physical_<dim>_<tag>`.

use std::collections::HashMap;
use std::path::Path;

use super::msh_format::{self, element_type_info, MshData};
use super::{line_of, Imported};
use crate::element::ElementKind;
use crate::error::{Location, MeshError};
use crate::model::{Mesh, Side};

/// Our kind and the Gmsh → VTK node permutation (`vtk[i] = gmsh[perm[i]]`)
/// for a volume/area element type; the orders come from the Gmsh reference
/// manual's node-ordering figures and the VTK file-format document (from memory).
fn volume_kind(t: i32) -> Option<(ElementKind, &'static [usize])> {
    const ID: [usize; 27] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23, 24, 25, 26];
    const TET10: [usize; 10] = [0, 1, 2, 3, 4, 5, 6, 7, 9, 8];
    // Gmsh's prism base faces into the element, VTK's wedge base faces out.
    const PRI6: [usize; 6] = [0, 2, 1, 3, 5, 4];
    const HEX27: [usize; 27] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 11, 13, 9, 16, 18, 19, 17, 10, 12, 14, 15, 22, 23, 21, 24, 20, 25, 26];
    // Gmsh element type numbers (reference manual, "MSH file format").
    Some(match t {
        2 => (ElementKind::Tri3, &ID[..3]),
        9 => (ElementKind::Tri6, &ID[..6]),
        3 => (ElementKind::Quad4, &ID[..4]),
        16 => (ElementKind::Quad8, &ID[..8]),
        10 => (ElementKind::Quad9, &ID[..9]),
        4 => (ElementKind::Tet4, &ID[..4]),
        11 => (ElementKind::Tet10, &TET10),
        6 => (ElementKind::Wedge6, &PRI6),
        5 => (ElementKind::Hex8, &ID[..8]),
        17 => (ElementKind::Hex20, &HEX27[..20]),
        12 => (ElementKind::Hex27, &HEX27),
        _ => return None,
    })
}

/// Number of corner nodes of a boundary element type, and its dimension.
fn boundary_corners(t: i32) -> Option<(usize, usize)> {
    Some(match t {
        15 => (1, 0),
        1 | 8 => (2, 1),
        2 | 9 => (3, 2),
        3 | 16 | 10 => (4, 2),
        _ => return None,
    })
}

/// Dimension of an element type we can read.
fn type_dimension(t: i32) -> Option<usize> {
    volume_kind(t).map(|(k, _)| k.dimension()).or_else(|| boundary_corners(t).map(|c| c.1))
}

pub(crate) fn read(path: &Path, bytes: &[u8]) -> Result<Imported, MeshError> {
    let msh = parse(path, bytes)?;
    let at = |offset: usize| if msh.ascii { Location::Line(line_of(bytes, offset)) } else { Location::Offset(offset) };
    let err = |msg: String| MeshError::parse(path, Location::Unknown, msg);
    if !msh.has_nodes || !msh.has_elements {
        return Err(err("no $Nodes or $Elements section".into()));
    }
    let mut dimension = 0;
    for b in &msh.element_blocks {
        match type_dimension(b.element_type) {
            Some(d) => dimension = dimension.max(d),
            None => {
                let name = element_type_info(b.element_type).map_or("unknown", |i| i.0);
                return Err(MeshError::parse(path, at(b.offset), format!("unsupported Gmsh element type {name} ({})", b.element_type)));
            }
        }
    }
    if dimension < 2 {
        return Err(err("no 2-D or 3-D elements".into()));
    }
    let (coords, node_of) = read_nodes(path, &msh)?;
    let groups = Groups { by_entity: &msh.physical_tags, names: &msh.physical_names };
    let lookup =
        |tag: u64, element: u64| node_of.get(&tag).copied().ok_or_else(|| err(format!("element {element} refers to missing node {tag}")));
    let mut mesh = Mesh::new(dimension);
    mesh.nodes = coords;

    let mut conn = Vec::with_capacity(27);
    for b in &msh.element_blocks {
        let Some((kind, perm)) = volume_kind(b.element_type).filter(|(k, _)| k.dimension() == dimension) else { continue };
        let names = groups.names_of(b.entity_dim, b.entity_tag);
        for (&tag, nodes) in b.tags.iter().zip(b.nodes.chunks_exact(b.nodes_per_element)) {
            conn.clear();
            for &p in perm {
                conn.push(lookup(nodes[p], tag)?);
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
    for b in &msh.element_blocks {
        let Some((corners, dim)) = boundary_corners(b.element_type).filter(|&(_, d)| d < dimension) else { continue };
        let names = groups.names_of(b.entity_dim, b.entity_tag);
        if names.is_empty() {
            continue;
        }
        for (&tag, nodes) in b.tags.iter().zip(b.nodes.chunks_exact(b.nodes_per_element)) {
            let ns = nodes.iter().map(|&t| lookup(t, tag)).collect::<Result<Vec<_>, _>>()?;
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

/// Parses the file, turning a format error into one with a line (ASCII) or byte offset.
fn parse(path: &Path, bytes: &[u8]) -> Result<MshData, MeshError> {
    msh_format::parse(bytes).map_err(|e| {
        let ascii = is_ascii_format(bytes);
        let location = if ascii { Location::Line(line_of(bytes, e.offset)) } else { Location::Offset(e.offset) };
        MeshError::parse(path, location, e.message)
    })
}

/// Node coordinates in file order, and the index of each node tag.
type NodeTable = (Vec<[f64; 3]>, HashMap<u64, usize>);

/// Reads the node blocks into a [`NodeTable`].
fn read_nodes(path: &Path, msh: &MshData) -> Result<NodeTable, MeshError> {
    let err = |msg: String| MeshError::parse(path, Location::Unknown, msg);
    let total: usize = msh.node_blocks.iter().map(|b| b.coords.len()).sum();
    let mut node_of: HashMap<u64, usize> = HashMap::with_capacity(total);
    let mut coords = Vec::with_capacity(total);
    for b in &msh.node_blocks {
        for (&x, &tag) in b.coords.iter().zip(&b.tags) {
            if !x.iter().all(|c| c.is_finite()) {
                return Err(err(format!("node {tag} has a non-finite coordinate")));
            }
            if node_of.insert(tag, coords.len()).is_some() {
                return Err(err(format!("node tag {tag} appears twice")));
            }
            coords.push(x);
        }
    }
    Ok((coords, node_of))
}

/// Physical groups of each entity, with their names.
struct Groups<'a> {
    by_entity: &'a HashMap<(i32, i32), Vec<i32>>,
    names: &'a HashMap<(i32, i32), String>,
}

impl Groups<'_> {
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
