//! The library side of `olli mesh info / convert / generate`.

mod common;

use std::path::Path;

use common::{data, tmp};

use olli_mesh::command::{convert, generate_file, generate_options, info};
use olli_mesh::read_mesh;

/// `info` prints the documented lines for the hand-written Gmsh file.
#[test]
fn info_prints_counts_sets_and_notes() {
    let text = info(&data("two_quads.msh")).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(&lines[..3], &["nodes: 6", "elements: 2", "quad4: 2"]);
    for want in ["element set rubber: 2", "node set corner: 1", "node set bottom: 3", "side set bottom: 2", "inverted elements: 0"] {
        assert!(lines.contains(&want), "missing `{want}` in\n{text}");
    }
    assert!(lines.iter().any(|l| l.starts_with("note: 1 clockwise")), "{text}");
}

/// `convert` writes a .vtu that reads back to the imported mesh.
#[test]
fn convert_writes_a_readable_vtu() {
    let out = tmp("converted.vtu");
    let notes = convert(&data("quad_and_triangle.vtk"), &out).unwrap();
    assert_eq!(notes.len(), 2);
    let back = read_mesh(&out).unwrap();
    assert_eq!(back, read_mesh(&data("quad_and_triangle.vtk")).unwrap());
}

/// A malformed file maps to exit code 2 with the file and line in the message.
#[test]
fn malformed_input_exits_with_code_2() {
    let bad = tmp("bad.msh");
    let text = std::fs::read_to_string(data("two_quads.msh")).unwrap().replace("$Nodes\n3 6 1 6", "$Nodes\n3 6 1 six");
    std::fs::write(&bad, text).unwrap();
    let err = info(&bad).unwrap_err();
    assert_eq!(err.exit_code(), 2);
    let msg = err.to_string();
    assert!(msg.contains("bad.msh") && msg.contains("line"), "{msg}");
    assert_eq!(info(Path::new("/nonexistent/x.msh")).unwrap_err().exit_code(), 1);
}

/// `generate` from a spec file and from options.
#[test]
fn generate_from_spec_file_and_options() {
    let spec = tmp("mount.toml");
    std::fs::write(&spec, "generate = \"solid-cylinder\"\nradius = 10.0\nheight = 5.0\ndivisions = 8\naxial_divisions = 2\n").unwrap();
    let out = tmp("mount.vtu");
    let text = generate_file(&spec, &out).unwrap();
    assert!(text.contains("hex8: ") && text.contains("side set top: "), "{text}");
    assert_eq!(read_mesh(&out).unwrap().element_sets["all"].len(), 2 * (4 + 4 * 2));

    let text = generate_options("annulus", &["inner_radius=5", "outer_radius=8", "order=quadratic-full"], &tmp("ring.vtu")).unwrap();
    assert!(text.contains("quad9: 32"), "{text}");
    let bad = tmp("bad.toml");
    std::fs::write(&bad, "generate = \"disc\"\nradius = -1.0\n").unwrap();
    assert_eq!(generate_file(&bad, &tmp("never.vtu")).unwrap_err().exit_code(), 2);
}
