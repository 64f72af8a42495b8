//! The layer rule of DEVELOPERS.md ("Architecture"), checked on the sources:
//! every module of olli-solver and olli-app imports only from its own layer
//! or the layers below it, and the modules' imports form no cycle.
//!
//! Each top-level module has a rank (the table below, bottom layer first).
//! A reference `crate::m` (in a `use` or in a path) from a module of rank r
//! to a module of a higher rank fails the test, naming the file and line;
//! so does any cycle among the top-level modules. Test code (`#[cfg(test)]`
//! modules, which may build a whole model to test a low layer) and comments
//! are not checked.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

/// olli-solver's top-level modules by layer, lowest first.
const SOLVER_LAYERS: &[(&str, u32)] = &[
    // geometry and constitutive laws: know only kinematics
    ("shape", 0),
    ("quadrature", 0),
    ("material", 0),
    // material fitting (material only)
    ("fit", 0),
    ("rigid_surface", 0),
    // elements: shape functions, quadrature, kinematics (no material)
    ("element", 1),
    // the problem description (data only)
    ("model", 2),
    // the one place element and material meet; sparse pattern, scatter
    ("assembly", 3),
    // loads and contact, evaluated through the assembly's numbering
    ("load", 4),
    ("contact", 4),
    ("insert", 4),
    // the linear-solver interface and its backends
    ("linear", 5),
    // the Newton driver and what a solve returns
    ("error", 6),
    ("results", 6),
    ("driver", 6),
];

/// olli-app's top-level modules (all above the whole of olli-solver).
const APP_LAYERS: &[(&str, u32)] = &[
    ("stability_text", 7),
    ("job", 7),
    // test curves for fitting (uses the job reader's name suggestions)
    ("fit_data", 8),
    ("output", 8),
    ("plot", 8),
    ("sweep", 9),
    // pictures of a finished run (reads output files, draws with plot)
    ("report", 9),
    ("bin", 10),
];

/// One import found in a source file.
#[derive(Debug, Clone, PartialEq)]
struct Import {
    from: String,
    to: String,
    file: PathBuf,
    line: usize,
}

/// Removes `//` comments (outside string literals) from one line.
fn strip_comment(line: &str) -> &str {
    let bytes = line.as_bytes();
    let mut in_str = false;
    let mut i = 0;
    while i + 1 < bytes.len() {
        match bytes[i] {
            b'\\' if in_str => i += 1,
            b'"' => in_str = !in_str,
            b'/' if !in_str && bytes[i + 1] == b'/' => return &line[..i],
            _ => {}
        }
        i += 1;
    }
    line
}

/// The first identifier of `text` (after leading spaces).
fn leading_ident(text: &str) -> Option<&str> {
    let t = text.trim_start();
    let end = t.find(|c: char| !(c.is_alphanumeric() || c == '_')).unwrap_or(t.len());
    (end > 0).then(|| &t[..end])
}

/// Top-level items named by a brace group `{a::b, c, d::{e, f}}` (text after the `{`).
fn group_heads(text: &str) -> Vec<String> {
    let mut heads = Vec::new();
    let mut depth = 0;
    let mut start = true;
    for (i, c) in text.char_indices() {
        match c {
            '{' => depth += 1,
            '}' if depth == 0 => break,
            '}' => depth -= 1,
            ',' if depth == 0 => start = true,
            _ if start && !c.is_whitespace() => {
                if let Some(id) = leading_ident(&text[i..]) {
                    heads.push(id.to_string());
                }
                start = false;
            }
            _ => {}
        }
    }
    heads
}

/// References to top-level modules of the crate in `source` (the text of a
/// file of module `module`, nested `depth` levels below the crate root), with
/// the crate's own name as written by a binary (`olli_app`), if any.
fn references(source: &str, module: &str, depth: usize, crate_alias: Option<&str>) -> Vec<(String, usize)> {
    // Code only: comments removed, test modules cut (they sit at the end of a file).
    let mut lines = Vec::new();
    let raw: Vec<&str> = source.lines().collect();
    let mut k = 0;
    while k < raw.len() {
        let line = strip_comment(raw[k]);
        if line.trim() == "#[cfg(test)]" && raw.get(k + 1).is_some_and(|l| l.trim_start().starts_with("mod ") && l.contains('{')) {
            break;
        }
        lines.push(line);
        k += 1;
    }
    let text = lines.join("\n");
    let line_of = |pos: usize| text[..pos].matches('\n').count() + 1;
    let mut out = Vec::new();
    let mut roots = vec!["crate".to_string()];
    roots.extend(crate_alias.map(str::to_string));
    if depth >= 1 {
        roots.push(vec!["super"; depth].join("::"));
    }
    for root in &roots {
        let pattern = format!("{root}::");
        let mut from = 0;
        while let Some(found) = text[from..].find(&pattern) {
            let at = from + found;
            from = at + pattern.len();
            // A path's own start only: not `x::crate::`, `my_crate::` or the tail of `super::super::`.
            if text[..at].chars().next_back().is_some_and(|c| c.is_alphanumeric() || c == '_' || c == ':') {
                continue;
            }
            let rest = &text[from..];
            let heads = if let Some(group) = rest.trim_start().strip_prefix('{') {
                group_heads(group)
            } else {
                leading_ident(rest).map(|h| vec![h.to_string()]).unwrap_or_default()
            };
            for head in heads {
                if head != module && head != "self" && head != "super" {
                    out.push((head, line_of(at)));
                }
            }
        }
    }
    out
}

/// Files of `src` that are compiled only for tests (`#[cfg(test)] mod name;`).
fn test_only_files(src: &Path) -> BTreeSet<PathBuf> {
    let mut out = BTreeSet::new();
    for file in rust_files(src) {
        let text = std::fs::read_to_string(&file).unwrap();
        let lines: Vec<&str> = text.lines().collect();
        for w in lines.windows(2) {
            if w[0].trim() != "#[cfg(test)]" {
                continue;
            }
            let Some(name) = w[1].trim().strip_prefix("mod ").and_then(|r| r.strip_suffix(';')) else { continue };
            let stem = file.file_stem().unwrap().to_str().unwrap();
            let dir = if stem == "mod" || stem == "lib" || stem == "main" {
                file.parent().unwrap().to_path_buf()
            } else {
                file.with_extension("")
            };
            out.insert(dir.join(format!("{name}.rs")));
            out.insert(dir.join(name).join("mod.rs"));
        }
    }
    out
}

fn rust_files(dir: &Path) -> Vec<PathBuf> {
    let mut out = Vec::new();
    for entry in std::fs::read_dir(dir).unwrap() {
        let path = entry.unwrap().path();
        if path.is_dir() {
            out.extend(rust_files(&path));
        } else if path.extension().is_some_and(|e| e == "rs") {
            out.push(path);
        }
    }
    out.sort();
    out
}

/// Every import between top-level modules of the crate rooted at `src`.
fn imports(src: &Path, crate_alias: Option<&str>) -> Vec<Import> {
    let skip = test_only_files(src);
    let reexports = root_reexports(&std::fs::read_to_string(src.join("lib.rs")).unwrap());
    let mut out = Vec::new();
    for file in rust_files(src) {
        if skip.contains(&file) {
            continue;
        }
        let rel = file.strip_prefix(src).unwrap();
        let parts: Vec<String> = rel.iter().map(|p| p.to_str().unwrap().trim_end_matches(".rs").to_string()).collect();
        if parts.len() == 1 && parts[0] == "lib" {
            continue;
        }
        let module = parts[0].clone();
        // Depth of the file's module below the crate root (`a/mod.rs` and `a.rs` are depth 1).
        let depth = parts.len() - usize::from(parts.last().is_some_and(|p| p == "mod"));
        let depth = if module == "bin" { 0 } else { depth };
        let text = std::fs::read_to_string(&file).unwrap();
        for (to, line) in references(&text, &module, depth, crate_alias) {
            // Items re-exported at the crate root count as imports of their module.
            let to = reexports.get(&to).cloned().unwrap_or(to);
            if to != module {
                out.push(Import { from: module.clone(), to, file: file.clone(), line });
            }
        }
    }
    out
}

/// Items the crate root re-exports (`pub use module::{A, B};`), by the module they come from.
fn root_reexports(lib: &str) -> BTreeMap<String, String> {
    let mut out = BTreeMap::new();
    for statement in lib.split(';') {
        let Some(path) = statement.trim().strip_prefix("pub use ") else { continue };
        let Some(module) = leading_ident(path) else { continue };
        let items = path[module.len()..].split(|c: char| !(c.is_alphanumeric() || c == '_')).filter(|t| !t.is_empty());
        for item in items {
            out.insert(item.to_string(), module.to_string());
        }
    }
    out
}

/// Imports that go up a layer, and the cycles among modules, as messages.
fn violations(imports: &[Import], layers: &[(&str, u32)]) -> Vec<String> {
    let rank: BTreeMap<&str, u32> = layers.iter().copied().collect();
    let mut out = Vec::new();
    let mut graph: BTreeMap<&str, BTreeSet<&str>> = BTreeMap::new();
    for i in imports {
        let (Some(&a), Some(&b)) = (rank.get(i.from.as_str()), rank.get(i.to.as_str())) else {
            if !rank.contains_key(i.from.as_str()) {
                out.push(format!("{}:{}: module `{}` has no layer in the table", i.file.display(), i.line, i.from));
            }
            continue;
        };
        if b > a {
            out.push(format!("{}:{}: `{}` (layer {a}) imports `{}` (layer {b}) from above", i.file.display(), i.line, i.from, i.to));
        }
        graph.entry(i.from.as_str()).or_default().insert(i.to.as_str());
    }
    // Cycles: depth-first search for a back edge.
    fn visit<'a>(
        n: &'a str,
        g: &BTreeMap<&'a str, BTreeSet<&'a str>>,
        state: &mut BTreeMap<&'a str, u8>,
        path: &mut Vec<&'a str>,
        out: &mut Vec<String>,
    ) {
        state.insert(n, 1);
        path.push(n);
        for &m in g.get(n).into_iter().flatten() {
            match state.get(m) {
                Some(1) => {
                    let start = path.iter().position(|p| *p == m).unwrap();
                    out.push(format!("cycle: {} → {m}", path[start..].join(" → ")));
                }
                None => visit(m, g, state, path, out),
                _ => {}
            }
        }
        path.pop();
        state.insert(n, 2);
    }
    let mut state = BTreeMap::new();
    for &n in graph.keys() {
        if !state.contains_key(n) {
            visit(n, &graph, &mut state, &mut Vec::new(), &mut out);
        }
    }
    out
}

fn manifest_dir() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

#[test]
fn solver_modules_import_only_downward() {
    let found = imports(&manifest_dir().join("src"), None);
    assert!(found.iter().any(|i| i.from == "driver" && i.to == "linear"), "the scan finds the driver's imports");
    let bad = violations(&found, SOLVER_LAYERS);
    assert!(bad.is_empty(), "layer violations:\n{}", bad.join("\n"));
}

#[test]
fn app_modules_import_only_downward() {
    let found = imports(&manifest_dir().join("app/src"), Some("olli_app"));
    assert!(found.iter().any(|i| i.from == "bin" && i.to == "job"), "the scan finds the command's imports");
    let bad = violations(&found, APP_LAYERS);
    assert!(bad.is_empty(), "layer violations:\n{}", bad.join("\n"));
}

/// A library user who only solves a model compiles no command-line, progress
/// or file-format crate: olli-solver depends on none of them.
#[test]
fn solver_depends_on_no_edge_crate() {
    let manifest = std::fs::read_to_string(manifest_dir().join("Cargo.toml")).unwrap();
    let deps = manifest.split("[dependencies]").nth(1).unwrap().split("\n[").next().unwrap();
    for edge in ["clap", "indicatif", "anyhow", "toml", "serde", "vtkio", "olli-app"] {
        assert!(!deps.lines().any(|l| l.trim_start().starts_with(edge)), "olli-solver depends on {edge}");
    }
}

/// The checker itself finds an upward import, a grouped one, one through
/// `super::super`, and a cycle, and ignores comments and test modules.
#[test]
fn checker_catches_upward_imports_and_cycles() {
    let layers: &[(&str, u32)] = &[("low", 0), ("mid", 1), ("high", 2)];
    let low = "use crate::{high::Thing, low::x};\n// use crate::mid::Commented;\nfn f() { crate::mid::g(); }\n#[cfg(test)]\nmod tests {\n use crate::high::T;\n}\n";
    let mut found: Vec<Import> = references(low, "low", 0, None)
        .into_iter()
        .map(|(to, line)| Import { from: "low".into(), to, file: "low.rs".into(), line })
        .collect();
    assert_eq!(found.iter().map(|i| (i.to.as_str(), i.line)).collect::<Vec<_>>(), [("high", 1), ("mid", 3)]);
    let deep = "use super::super::high::Y;\nuse super::sibling;\n";
    assert_eq!(references(deep, "mid", 2, None), [("high".to_string(), 1)]);
    let reexports = root_reexports("pub mod high;\npub use high::{Top, Other as Renamed};\n");
    assert_eq!(reexports.get("Top").map(String::as_str), Some("high"));
    found.push(Import { from: "high".into(), to: "low".into(), file: "high.rs".into(), line: 1 });
    let bad = violations(&found, layers);
    assert_eq!(bad.iter().filter(|m| m.contains("from above")).count(), 2, "{bad:?}");
    assert!(bad.iter().any(|m| m.starts_with("cycle")), "{bad:?}");
}
