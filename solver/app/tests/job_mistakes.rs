//! Mistakes in job files that were accepted, each now a located error:
//! regression tests named after what broke, their inputs derived from the
//! committed examples by one change each.

use std::path::{Path, PathBuf};

use olli_app::job::load_str;

fn example(name: &str) -> (PathBuf, String) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../examples").join(name);
    let text = std::fs::read_to_string(&path).unwrap();
    (path, text)
}

/// The message of loading `text` (which must fail), as `line:column: message` after the file name.
fn error(path: &Path, text: &str) -> String {
    let e = load_str(path, text).expect_err("the job must be refused");
    assert_eq!(e.file, path);
    e.to_string()
}

/// Regression: NaN in `rubber_point` ran.
#[test]
fn nan_rubber_point_is_refused() {
    let (path, seal) = example("seal.toml");
    let bad = seal.replacen("fillet = 0.2\n", "fillet = 0.2\nrubber_point = [nan, 1.0]\n", 1);
    let e = error(&path, &bad);
    assert!(e.ends_with("seal.toml:24:1: rigid `groove`: `rubber_point` must be finite numbers, got [NaN, 1.0]"), "{e}");
}

/// Regression: NaN in a generator's origin ran, then stopped on a NaN Jacobian.
#[test]
fn nan_generator_origin_is_refused() {
    let (path, bush) = example("bush.toml");
    let bad = bush.replacen("origin = [10.0, 0.0]", "origin = [10.0, nan]", 1);
    let e = error(&path, &bad);
    assert!(e.contains("origin"), "{e}");
    assert!(e.contains("finite"), "{e}");
}

/// Regression: type errors did not name their key.
#[test]
fn a_string_where_a_number_belongs_names_the_key() {
    let (path, seal) = example("seal.toml");
    let bad = seal.replacen("c10 = 0.62", "c10 = \"0.62\"", 1);
    let e = error(&path, &bad);
    assert!(e.contains(":16:7: `c10`: invalid type: string \"0.62\", expected"), "{e}");
}
