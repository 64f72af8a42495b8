//! `olli mesh`: the interface scripts rely on (issue 3): `info` prints
//! `nodes: N`, `elements: N`, a count per element type and per named set;
//! `convert` writes a .vtu; a malformed file exits with 2 and a message
//! naming the file and the line.

use std::path::PathBuf;
use std::process::Command;

fn olli(args: &[&str]) -> (Option<i32>, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_olli")).args(args).output().expect("olli runs");
    (out.status.code(), format!("{}{}", String::from_utf8_lossy(&out.stdout), String::from_utf8_lossy(&out.stderr)))
}

fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("olli-cli-mesh-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

#[test]
fn generate_info_and_convert() {
    let dir = scratch("ok");
    let vtu = dir.join("block.vtu");
    // A 4 × 3 × 2 block of hex8: counts follow from the divisions.
    let (code, text) = olli(&["mesh", "generate", vtu.to_str().unwrap(), "block", "size=[4.0,3.0,2.0]", "divisions=[4,3,2]"]);
    assert_eq!(code, Some(0), "{text}");
    let (code, info) = olli(&["mesh", "info", vtu.to_str().unwrap()]);
    assert_eq!(code, Some(0), "{info}");
    let lines: Vec<&str> = info.lines().collect();
    assert!(lines.contains(&"nodes: 60"), "{info}"); // 5 × 4 × 3
    assert!(lines.contains(&"elements: 24"), "{info}");
    assert!(lines.contains(&"hex8: 24"), "{info}");
    assert!(lines.iter().any(|l| l.starts_with("side set bottom: ") && l.ends_with(": 12")), "{info}");
    let copy = dir.join("copy.vtu");
    let (code, text) = olli(&["mesh", "convert", vtu.to_str().unwrap(), copy.to_str().unwrap()]);
    assert_eq!(code, Some(0), "{text}");
    let (_, again) = olli(&["mesh", "info", copy.to_str().unwrap()]);
    assert_eq!(info.lines().take(3).collect::<Vec<_>>(), again.lines().take(3).collect::<Vec<_>>());
}

#[test]
fn malformed_mesh_file_exits_2_naming_file_and_line() {
    let dir = scratch("bad");
    let msh = dir.join("broken.msh");
    std::fs::write(&msh, "$MeshFormat\n4.1 0 8\n$EndMeshFormat\n$Nodes\n1 2 1 2\nnot numbers\n").unwrap();
    let (code, text) = olli(&["mesh", "info", msh.to_str().unwrap()]);
    assert_eq!(code, Some(2), "{text}");
    assert!(text.contains("broken.msh"), "{text}");
    assert!(text.contains("line") || text.contains("offset"), "{text}");
}
