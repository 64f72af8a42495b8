//! Every job file in `examples/` loads and checks without warnings, and
//! every one has its note (`<name>.md`) recording the key result that its
//! own test (`examples_<name>.rs`) checks. Every sweep file
//! (`<name>.sweep.toml`, never taken for a job) expands into variants that
//! all pass the job checker, and its base job's note describes it.

use olli_app::sweep::{self, SWEEP_SUFFIX};
use olli_verification::jobs::*;

#[test]
fn every_example_checks_and_has_a_note_and_a_test() {
    let mut names = Vec::new();
    for entry in std::fs::read_dir(examples_dir()).unwrap() {
        let path = entry.unwrap().path();
        let is_sweep = path.to_string_lossy().ends_with(SWEEP_SUFFIX);
        if path.extension().is_some_and(|e| e == "toml") && !is_sweep {
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
    assert_eq!(
        names,
        [
            "bush",
            "bush-3d",
            "mount",
            "mount-dynamic",
            "oring",
            "piston-seal",
            "radial-seal",
            "seal",
            "seal-relaxation",
            "seal-tri6",
            "spring-tet10"
        ]
    );
}

#[test]
fn every_sweep_example_expands_into_checked_variants() {
    let mut found = Vec::new();
    for entry in std::fs::read_dir(examples_dir()).unwrap() {
        let path = entry.unwrap().path();
        let Some(name) = sweep::plan::sweep_name(&path) else { continue };
        let plan = sweep::load(&path).unwrap_or_else(|e| panic!("{e}"));
        assert!(plan.warnings.is_empty(), "{name}: {:?}", plan.warnings);
        let base = plan.job_file_name.trim_end_matches(".toml").to_string();
        let note = std::fs::read_to_string(examples_dir().join(format!("{base}.md"))).unwrap();
        assert!(note.contains(&format!("{name}{SWEEP_SUFFIX}")), "{base}.md does not describe {name}{SWEEP_SUFFIX}");
        found.push((name, plan.parameters.len(), plan.variants.len()));
    }
    found.sort();
    // The face seal: 3 squeezes x 3 moduli; the mount: 8 Latin hypercube samples over height and modulus.
    assert_eq!(found, [("mount".to_string(), 2, 8), ("seal".to_string(), 2, 9)]);
}
