//! Importers and the `.vtu` writer: round trips, hand-written Gmsh and
//! legacy VTK files, error locations, and random or truncated bytes.

mod common;

use std::path::Path;

use common::{data, tmp, XorShift};

use olli_mesh::generate::*;
use olli_mesh::import::import_bytes;
use olli_mesh::quality::element_quality;
use olli_mesh::{import, read_mesh, write_vtu, ElementKind, Location, Mesh, MeshError, Side};

/// generate → write .vtu → read gives back identical nodes, connectivity and sets.
#[test]
fn vtu_round_trip_keeps_nodes_connectivity_and_sets() {
    let section = rectangle(&RectangleParams { origin: [1.0, 0.0], divisions: [2, 2], triangles: true, ..Default::default() }).unwrap();
    let meshes = [
        cord(&CircleParams { divisions: 12, order: Order::Quadratic, ..Default::default() }).unwrap(),
        block(&BlockParams { divisions: [2, 2, 1], order: Order::QuadraticFull, ..Default::default() }).unwrap(),
        hollow_cylinder(&AnnulusParams { angle: 90.0, circumferential_divisions: 3, order: Order::Quadratic, ..Default::default() })
            .unwrap(),
        sweep(&section, 60.0, 2).unwrap(),
    ];
    for (i, mesh) in meshes.iter().enumerate() {
        let path = tmp(&format!("round_trip_{i}.vtu"));
        write_vtu(mesh, &path).unwrap();
        let back = import(&path).unwrap();
        assert!(back.notes.is_empty(), "{:?}", back.notes);
        assert_eq!(&back.mesh, mesh, "mesh {i} changed on the round trip");
    }
}

/// The hand-written ASCII file (tests/data/two_quads.msh): six nodes listed
/// out of tag order, one clockwise quad, a point, a line and a surface group.
#[test]
fn gmsh_ascii_file_imports_with_named_sets() {
    let imported = import(&data("two_quads.msh")).unwrap();
    let m = &imported.mesh;
    assert_eq!(m.dimension, 2);
    assert_eq!((m.node_count(), m.element_count()), (6, 2));
    assert!(m.kinds.iter().all(|&k| k == ElementKind::Quad4));
    assert_eq!(imported.notes.len(), 1, "{:?}", imported.notes);
    assert!(imported.notes[0].contains("1 clockwise"));
    assert_eq!(m.element_sets["rubber"], vec![0, 1]);
    let corner = &m.node_sets["corner"];
    assert_eq!(corner.len(), 1);
    assert_eq!(m.nodes[corner[0]], [0.0, 0.0, 0.0]);
    let bottom = &m.side_sets["bottom"];
    assert_eq!(bottom.len(), 2);
    for &s in bottom {
        assert_eq!(m.side_normal(s), [0.0, -1.0, 0.0]);
        assert!(m.side_nodes(s).iter().all(|&n| m.nodes[n][1] == 0.0));
    }
    assert_eq!(m.node_sets["bottom"].len(), 3);
    // Tag 5 is listed last in its block but sits at (1, 1).
    for e in 0..2 {
        assert!(element_quality(m, e).min_det > 0.0);
    }
    let total: f64 = olli_mesh::quality::measure(m);
    assert!((total - 2.0).abs() < 1e-12);
}

/// Hand-written legacy file: a square, a clockwise triangle and a vertex cell.
#[test]
fn legacy_vtk_file_imports_and_reorients() {
    let imported = import(&data("quad_and_triangle.vtk")).unwrap();
    let m = &imported.mesh;
    assert_eq!(m.dimension, 2);
    assert_eq!(m.kinds, vec![ElementKind::Quad4, ElementKind::Tri3]);
    assert_eq!(imported.notes.len(), 2, "{:?}", imported.notes);
    // 1 + 0.25 (triangle with base 1 and height 0.5).
    assert!((olli_mesh::quality::measure(m) - 1.25).abs() < 1e-12);
}

// ---- a small MSH 4.1 writer for test files (ASCII or binary) ----

struct Block {
    dim: i32,
    tag: i32,
    gmsh_type: i32,
    elements: Vec<Vec<u64>>,
}

/// (dim, entity tag, [(node tag, coordinates)])
type NodeBlock = (i32, i32, Vec<(u64, [f64; 3])>);

struct Msh {
    names: Vec<(i32, i32, &'static str)>,
    /// (dim, entity tag, physical tags)
    entities: Vec<(i32, i32, Vec<i32>)>,
    nodes: Vec<NodeBlock>,
    blocks: Vec<Block>,
}

impl Msh {
    fn write(&self, binary: bool) -> Vec<u8> {
        let mut o: Vec<u8> = Vec::new();
        let t = |o: &mut Vec<u8>, s: &str| o.extend_from_slice(s.as_bytes());
        let size = |o: &mut Vec<u8>, v: u64| {
            if binary {
                o.extend_from_slice(&v.to_le_bytes())
            } else {
                o.extend_from_slice(format!("{v} ").as_bytes())
            }
        };
        let int = |o: &mut Vec<u8>, v: i32| {
            if binary {
                o.extend_from_slice(&v.to_le_bytes())
            } else {
                o.extend_from_slice(format!("{v} ").as_bytes())
            }
        };
        let dbl = |o: &mut Vec<u8>, v: f64| {
            if binary {
                o.extend_from_slice(&v.to_le_bytes())
            } else {
                o.extend_from_slice(format!("{v} ").as_bytes())
            }
        };
        let nl = |o: &mut Vec<u8>| {
            if !binary {
                o.push(b'\n')
            }
        };
        t(&mut o, &format!("$MeshFormat\n4.1 {} 8\n", binary as i32));
        if binary {
            o.extend_from_slice(&1i32.to_le_bytes());
            t(&mut o, "\n");
        }
        t(&mut o, "$EndMeshFormat\n$PhysicalNames\n");
        t(&mut o, &format!("{}\n", self.names.len()));
        for (d, tag, n) in &self.names {
            t(&mut o, &format!("{d} {tag} \"{n}\"\n"));
        }
        t(&mut o, "$EndPhysicalNames\n$Entities\n");
        for d in 0..4 {
            size(&mut o, self.entities.iter().filter(|e| e.0 == d).count() as u64);
        }
        nl(&mut o);
        for d in 0..4 {
            for (_, tag, phys) in self.entities.iter().filter(|e| e.0 == d) {
                int(&mut o, *tag);
                for _ in 0..if d == 0 { 3 } else { 6 } {
                    dbl(&mut o, 0.0);
                }
                size(&mut o, phys.len() as u64);
                for &p in phys {
                    int(&mut o, p);
                }
                if d > 0 {
                    size(&mut o, 0);
                }
                nl(&mut o);
            }
        }
        if binary {
            t(&mut o, "\n");
        }
        t(&mut o, "$EndEntities\n$Nodes\n");
        let all: Vec<u64> = self.nodes.iter().flat_map(|b| b.2.iter().map(|n| n.0)).collect();
        size(&mut o, self.nodes.len() as u64);
        size(&mut o, all.len() as u64);
        size(&mut o, *all.iter().min().unwrap());
        size(&mut o, *all.iter().max().unwrap());
        nl(&mut o);
        for (d, tag, ns) in &self.nodes {
            int(&mut o, *d);
            int(&mut o, *tag);
            int(&mut o, 0);
            size(&mut o, ns.len() as u64);
            nl(&mut o);
            for n in ns {
                size(&mut o, n.0);
                nl(&mut o);
            }
            for n in ns {
                for c in n.1 {
                    dbl(&mut o, c);
                }
                nl(&mut o);
            }
        }
        if binary {
            t(&mut o, "\n");
        }
        t(&mut o, "$EndNodes\n$Elements\n");
        let count: usize = self.blocks.iter().map(|b| b.elements.len()).sum();
        size(&mut o, self.blocks.len() as u64);
        size(&mut o, count as u64);
        size(&mut o, 1);
        size(&mut o, count as u64);
        nl(&mut o);
        let mut tag = 0;
        for b in &self.blocks {
            int(&mut o, b.dim);
            int(&mut o, b.tag);
            int(&mut o, b.gmsh_type);
            size(&mut o, b.elements.len() as u64);
            nl(&mut o);
            for e in &b.elements {
                tag += 1;
                size(&mut o, tag);
                for &n in e {
                    size(&mut o, n);
                }
                nl(&mut o);
            }
        }
        if binary {
            t(&mut o, "\n");
        }
        t(&mut o, "$EndElements\n");
        o
    }
}

/// Unit cube as one Gmsh hex20 (Gmsh edge order, tags = 1 + index) with a
/// quad8 physical surface `top` and a volume group `body`. Gmsh's Hex20
/// numbering (reference manual, "Node ordering", from memory): edges
/// 8:0-1 9:0-3 10:0-4 11:1-2 12:1-5 13:2-3 14:2-6 15:3-7 16:4-5 17:4-7 18:5-6 19:6-7.
fn hex20_cube() -> Msh {
    let c = [[0., 0., 0.], [1., 0., 0.], [1., 1., 0.], [0., 1., 0.], [0., 0., 1.], [1., 0., 1.], [1., 1., 1.], [0., 1., 1.]];
    let edges = [(0, 1), (0, 3), (0, 4), (1, 2), (1, 5), (2, 3), (2, 6), (3, 7), (4, 5), (4, 7), (5, 6), (6, 7)];
    let mut pts: Vec<[f64; 3]> = c.to_vec();
    for (a, b) in edges {
        pts.push([0.5 * (c[a][0] + c[b][0]), 0.5 * (c[a][1] + c[b][1]), 0.5 * (c[a][2] + c[b][2])]);
    }
    let nodes = pts.iter().enumerate().map(|(i, &p)| (i as u64 + 1, p)).collect();
    // Top face 4-5-6-7 with mid-nodes 16 (4-5), 18 (5-6), 19 (6-7), 17 (4-7) as tags.
    let top = vec![5, 6, 7, 8, 17, 19, 20, 18];
    Msh {
        names: vec![(2, 7, "top"), (3, 9, "body")],
        entities: vec![(2, 1, vec![7]), (3, 1, vec![9])],
        nodes: vec![(3, 1, nodes)],
        blocks: vec![
            Block { dim: 3, tag: 1, gmsh_type: 17, elements: vec![(1..=20).collect()] },
            Block { dim: 2, tag: 1, gmsh_type: 16, elements: vec![top] },
        ],
    }
}

/// A Gmsh hex20 read as binary and as ASCII lands in VTK order: positive
/// Jacobian, unit volume, each VTK mid-edge node halfway along its VTK edge
/// (edge list of the VTK file-format document), and `top` on face z = 1.
#[test]
fn gmsh_binary_and_ascii_hex20_import_in_vtk_order() {
    for binary in [true, false] {
        let bytes = hex20_cube().write(binary);
        let imported = import_bytes(Path::new("cube.msh"), &bytes).unwrap_or_else(|e| panic!("binary={binary}: {e}"));
        let m = &imported.mesh;
        assert_eq!(m.kinds, vec![ElementKind::Hex20]);
        assert!(element_quality(m, 0).min_det > 0.0);
        assert!((olli_mesh::quality::measure(m) - 1.0).abs() < 1e-12);
        let vtk_edges = [(0, 1), (1, 2), (2, 3), (3, 0), (4, 5), (5, 6), (6, 7), (7, 4), (0, 4), (1, 5), (2, 6), (3, 7)];
        let en = m.element_nodes(0);
        for (k, (a, b)) in vtk_edges.iter().enumerate() {
            let (pa, pb, pm) = (m.nodes[en[*a]], m.nodes[en[*b]], m.nodes[en[8 + k]]);
            for d in 0..3 {
                assert!((0.5 * (pa[d] + pb[d]) - pm[d]).abs() < 1e-12, "binary={binary}: edge {k}");
            }
        }
        assert_eq!(m.element_sets["body"], vec![0]);
        let top = &m.side_sets["top"];
        assert_eq!(top.len(), 1);
        assert_eq!(m.side_normal(top[0]), [0.0, 0.0, 1.0]);
        assert_eq!(m.node_sets["top"].len(), 8);
    }
}

/// Gmsh prisms (base facing into the element) and tet10s (mid-nodes 8 on
/// 2-3 and 9 on 1-3) arrive as positive VTK wedges and tetrahedra.
#[test]
fn gmsh_prism_and_tet10_arrive_positive() {
    let prism = [[0., 0., 0.], [1., 0., 0.], [0., 1., 0.], [0., 0., 1.], [1., 0., 1.], [0., 1., 1.]];
    let tet = [[0., 0., 0.], [1., 0., 0.], [0., 1., 0.], [0., 0., 1.]];
    let tet_edges = [(0, 1), (1, 2), (2, 0), (3, 0), (3, 2), (3, 1)];
    let mut pts: Vec<[f64; 3]> = tet.to_vec();
    for (a, b) in tet_edges {
        pts.push([0.5 * (tet[a][0] + tet[b][0]), 0.5 * (tet[a][1] + tet[b][1]), 0.5 * (tet[a][2] + tet[b][2])]);
    }
    let shifted: Vec<[f64; 3]> = prism.iter().map(|p| [p[0] + 2.0, p[1], p[2]]).collect();
    pts.extend(shifted);
    let msh = Msh {
        names: vec![],
        entities: vec![(3, 1, vec![4])],
        nodes: vec![(3, 1, pts.iter().enumerate().map(|(i, &p)| (i as u64 + 1, p)).collect())],
        blocks: vec![
            Block { dim: 3, tag: 1, gmsh_type: 11, elements: vec![(1..=10).collect()] },
            Block { dim: 3, tag: 1, gmsh_type: 6, elements: vec![(11..=16).collect()] },
        ],
    };
    let m = import_bytes(Path::new("mixed.msh"), &msh.write(false)).unwrap().mesh;
    assert_eq!(m.kinds, vec![ElementKind::Tet10, ElementKind::Wedge6]);
    for e in 0..2 {
        assert!(element_quality(&m, e).min_det > 0.0, "element {e}");
    }
    // Volumes 1/6 and 1/2 (unit right tetrahedron and half a unit cube).
    assert!((olli_mesh::quality::measure(&m) - (1.0 / 6.0 + 0.5)).abs() < 1e-12);
    assert_eq!(m.element_sets["physical_3_4"], vec![0, 1]);
    // VTK tet10: node 8 on edge 1-3, node 9 on edge 2-3.
    let en = m.element_nodes(0);
    assert_eq!(m.nodes[en[8]], [0.5, 0.0, 0.5]);
    assert_eq!(m.nodes[en[9]], [0.0, 0.5, 0.5]);
}

fn location(e: MeshError) -> (String, Location) {
    let text = e.to_string();
    match e {
        MeshError::Parse { location, .. } => (text, location),
        other => panic!("not a parse error: {other}"),
    }
}

/// Malformed files name the file and the line (text) or the offending cell.
#[test]
fn malformed_files_name_file_and_line() {
    // A node coordinate that is not a number, on line 20 of the ASCII file.
    let good = std::fs::read_to_string(data("two_quads.msh")).unwrap();
    let bad = good.replacen("0 0 0\n1 1 0 2", "0 x 0\n1 1 0 2", 1);
    let (text, loc) = location(import_bytes(Path::new("bad.msh"), bad.as_bytes()).unwrap_err());
    assert!(text.starts_with("bad.msh: line"), "{text}");
    assert!(matches!(loc, Location::Line(l) if (18..=20).contains(&l)), "{text}");

    // MSH 2.2 is not supported: the version line is named.
    let old = "$MeshFormat\n2.2 0 8\n$EndMeshFormat\n$Nodes\n1\n1 0 0 0\n$EndNodes\n";
    let (text, loc) = location(import_bytes(Path::new("old.msh"), old.as_bytes()).unwrap_err());
    assert_eq!(loc, Location::Line(2), "{text}");

    let vtk = std::fs::read_to_string(data("quad_and_triangle.vtk")).unwrap();
    let bad = vtk.replacen("1 1 0\n", "1 one 0\n", 1);
    let (text, loc) = location(import_bytes(Path::new("bad.vtk"), bad.as_bytes()).unwrap_err());
    assert_eq!(loc, Location::Line(8), "{text}");

    let bad = vtk.replacen("CELL_TYPES 3\n9\n5\n1", "CELL_TYPES 3\n9\n14\n1", 1);
    let (text, loc) = location(import_bytes(Path::new("pyramid.vtk"), bad.as_bytes()).unwrap_err());
    assert_eq!(loc, Location::Cell(1), "{text}");
    assert!(text.contains("Pyramid"), "{text}");

    let mesh = rectangle(&RectangleParams::default()).unwrap();
    let path = tmp("broken.vtu");
    write_vtu(&mesh, &path).unwrap();
    let xml = std::fs::read_to_string(&path).unwrap();
    // Our .vtu files are one line: the error gives the byte offset of the bad tag.
    let cut = xml.replacen("</Points>", "</Pointz>", 1);
    let at = xml.find("</Points>").unwrap();
    let (text, loc) = location(import_bytes(Path::new("broken.vtu"), cut.as_bytes()).unwrap_err());
    assert!(matches!(loc, Location::Offset(o) if o.abs_diff(at) < 12), "{text} (tag at {at})");
    // Split into lines, the same error names the line.
    let lines = cut.replace("><", ">\n<");
    let line = 1 + lines[..lines.find("</Pointz>").unwrap()].matches('\n').count();
    let (text, loc) = location(import_bytes(Path::new("broken.vtu"), lines.as_bytes()).unwrap_err());
    assert_eq!(loc, Location::Line(line), "{text}");

    assert!(matches!(read_mesh(Path::new("mesh.stl")), Err(MeshError::UnknownFormat { .. })));
    assert!(matches!(read_mesh(Path::new("/nonexistent/mesh.msh")), Err(MeshError::Io { .. })));
}

/// Truncated, corrupted and random bytes give an error or a mesh, never a
/// panic, for every importer.
#[test]
fn random_and_truncated_bytes_never_panic() {
    let small = rectangle(&RectangleParams { divisions: [2, 1], order: Order::Quadratic, ..Default::default() }).unwrap();
    let vtu_path = tmp("fuzz_seed.vtu");
    write_vtu(&small, &vtu_path).unwrap();
    let mut legacy = olli_mesh::export::to_vtk(&small, Default::default());
    legacy.version = vtkio::model::Version::new_legacy(4, 2);
    legacy.byte_order = vtkio::model::ByteOrder::BigEndian;
    let mut legacy_binary = Vec::new();
    legacy.write_legacy(&mut legacy_binary).unwrap();
    let seeds: Vec<(&str, Vec<u8>)> = vec![
        ("e.vtk", legacy_binary),
        ("a.msh", std::fs::read(data("two_quads.msh")).unwrap()),
        ("b.msh", hex20_cube().write(true)),
        ("c.vtk", std::fs::read(data("quad_and_triangle.vtk")).unwrap()),
        ("d.vtu", std::fs::read(&vtu_path).unwrap()),
    ];
    let mut rng = XorShift(0x9E37_79B9_7F4A_7C15);
    // OLLI_MESH_FUZZ_ROUNDS raises the number of corrupted copies per seed for a longer hunt.
    let rounds: usize = std::env::var("OLLI_MESH_FUZZ_ROUNDS").ok().and_then(|v| v.parse().ok()).unwrap_or(150);
    let mut outcomes = [0usize; 2];
    for (name, bytes) in &seeds {
        let path = Path::new(name);
        let mut try_bytes = |b: &[u8]| {
            let r = std::panic::catch_unwind(|| import_bytes(path, b).is_ok());
            match r {
                Ok(ok) => outcomes[ok as usize] += 1,
                Err(_) => panic!("{name}: importer panicked on {} bytes", b.len()),
            }
        };
        let step = (bytes.len() / 150).max(1);
        for cut in (0..bytes.len()).step_by(step) {
            try_bytes(&bytes[..cut]);
        }
        for _ in 0..rounds {
            let mut b = bytes.clone();
            for _ in 0..1 + rng.next() % 4 {
                let i = (rng.next() % b.len() as u64) as usize;
                b[i] = rng.next() as u8;
            }
            try_bytes(&b);
        }
        for _ in 0..20 {
            let n = (rng.next() % 400) as usize;
            let b: Vec<u8> = (0..n).map(|_| rng.next() as u8).collect();
            try_bytes(&b);
        }
    }
    // Both outcomes must occur: corruption is detected, yet some flips are harmless.
    assert!(outcomes[0] > 100 && outcomes[1] > 0, "{outcomes:?}");
}

/// A side set written to .vtu comes back on the same faces.
#[test]
fn vtu_side_masks_restore_the_same_faces() {
    let mut m = block(&BlockParams { divisions: [1, 1, 2], ..Default::default() }).unwrap();
    m.side_sets.insert("two".into(), vec![Side { element: 0, local: 0 }, Side { element: 0, local: 5 }]);
    let path = tmp("sides.vtu");
    write_vtu(&m, &path).unwrap();
    let back: Mesh = read_mesh(&path).unwrap();
    assert_eq!(back.side_sets["two"], m.side_sets["two"]);
}

/// Legacy `.vtk`, binary (big-endian, the legacy default) and ASCII, written
/// by vtkio from our model, reads back to the same mesh with its sets.
#[test]
fn legacy_vtk_round_trip_binary_and_ascii() {
    let mesh = hollow_cylinder(&AnnulusParams {
        angle: 120.0,
        circumferential_divisions: 4,
        axial_divisions: 2,
        order: Order::Quadratic,
        ..Default::default()
    })
    .unwrap();
    let mut vtk = olli_mesh::export::to_vtk(&mesh, Default::default());
    vtk.version = vtkio::model::Version::new_legacy(4, 2);
    vtk.byte_order = vtkio::model::ByteOrder::BigEndian; // the legacy standard
    let mut binary = Vec::new();
    vtk.clone().write_legacy(&mut binary).unwrap();
    let mut ascii = String::new();
    vtk.write_legacy_ascii(&mut ascii).unwrap();
    for (what, bytes) in [("binary", binary), ("ascii", ascii.into_bytes())] {
        let back = import_bytes(Path::new("legacy.vtk"), &bytes).unwrap_or_else(|e| panic!("{what}: {e}"));
        assert_eq!(back.mesh, mesh, "{what}");
    }
}

/// The tet10 mesh of the invented rubber spring made by
/// `examples/meshes/spring_tet10.py` (a general-purpose mesher's MSH 4.1
/// output, committed): it imports as tet10 only, with valid elements, its
/// named groups as sets, and the part's volume. Exact volume by elementary
/// geometry: (L·W − (4 − π)·r² − π·d²/4)·H for the 40 × 30 × 20 mm block
/// with 6 mm fillets on its vertical edges and a 10 mm hole; the quadratic
/// tetrahedra follow the curved walls to well within 0.1 %.
#[test]
fn gmsh_tet10_spring_from_the_example_script_imports_whole() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("../examples/meshes/spring_tet10.msh");
    let mesh = import(&path).unwrap().mesh;
    assert!(mesh.element_count() > 100);
    assert!(mesh.kinds.iter().all(|&k| k == ElementKind::Tet10));
    for e in 0..mesh.element_count() {
        assert!(element_quality(&mesh, e).min_det > 0.0, "element {e} inverted");
    }
    let pi = std::f64::consts::PI;
    let exact = (40.0 * 30.0 - (4.0 - pi) * 36.0 - pi * 25.0) * 20.0;
    let volume = olli_mesh::quality::measure(&mesh);
    assert!((volume - exact).abs() < 1e-3 * exact, "volume {volume} vs {exact}");
    assert_eq!(mesh.element_sets["rubber"].len(), mesh.element_count());
    for (name, z) in [("bottom", Some(0.0)), ("top", Some(20.0)), ("hole", None)] {
        let nodes = mesh.side_set_nodes(name).unwrap();
        assert!(!nodes.is_empty(), "{name}");
        for n in nodes {
            let x = mesh.nodes[n];
            match z {
                Some(z) => assert!((x[2] - z).abs() < 1e-9, "{name}: node {n} at {x:?}"),
                None => assert!(((x[0] - 20.0).hypot(x[1] - 15.0) - 5.0).abs() < 1e-6, "hole: node {n} at {x:?}"),
            }
        }
    }
}
