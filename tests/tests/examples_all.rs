//! Every job file in `examples/` loads and checks without warnings, and
//! every one has its note (`<name>.md`) recording the key result that its
//! own test (`examples_<name>.rs`) checks.

use olli_verification::jobs::*;

#[test]
fn every_example_checks_and_has_a_note_and_a_test() {
    let mut names = Vec::new();
    for entry in std::fs::read_dir(examples_dir()).unwrap() {
        let path = entry.unwrap().path();
        if path.extension().is_some_and(|e| e == "toml") {
            let name = path.file_name().unwrap().to_string_lossy().into_owned();
            load_example(&name);
            let stem = path.file_stem().unwrap().to_string_lossy().into_owned();
            let note = std::fs::read_to_string(path.with_extension("md")).unwrap_or_else(|_| panic!("{stem}.md missing"));
            assert!(note.contains("Key result"), "{stem}.md records no key result");
            let test = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join(format!("tests/examples_{}.rs", stem.replace('-', "_")));
            assert!(test.exists(), "no test for example {stem}");
            names.push(stem);
        }
    }
    names.sort();
    assert_eq!(names, ["bush", "bush-3d", "mount", "radial-seal", "seal"]);
}
