//! Pictures of a run (issue 13) beyond the examples, whose own tests check
//! theirs: a run that stopped part-way still gets its pictures, up to its
//! last converged increment.

use olli_verification::jobs::*;
use olli_verification::pictures::{check_report, names};

/// The bush example with its pin driven 20 mm outward through the 15 mm
/// wall: the rubber inverts before the end, so the run stops part-way.
#[test]
fn a_stopped_run_gets_its_pictures_up_to_the_last_converged_increment() {
    let base = std::fs::read_to_string(examples_dir().join("bush.toml")).unwrap();
    let text = base
        .replace("displacement = { r = 0.0, z = 2.0 }", "displacement = { r = 20.0, z = 0.0 }")
        .replace("name = \"push\"\n", "name = \"push\"\nmin_increment = 1e-3\n");
    assert_ne!(text, base);
    let job = load_example_text("bush.toml", &text);
    let scratch = Scratch::new("stopped-pictures");
    let mut writer = olli_app::output::ResultWriter::new(&job, &scratch.0).unwrap();
    let solution = olli_solver::solve(&job.model, &mut writer).unwrap();
    assert!(!solution.completed(), "the wall must collapse");
    let last = solution.last().expect("some increments converge").load_factor;
    writer.finish(&solution).unwrap();
    let pictures = check_report(Some(&job), &scratch.0);
    assert_eq!(names(&pictures), ["force.png", "stiffness.png", "section_1.png"]);
    let section = pictures.iter().find(|p| p.file == "section_1.png").unwrap();
    assert!(section.caption.contains(&format!("load factor {}", olli_app::plot::number(last))), "{}", section.caption);
    let html = std::fs::read_to_string(scratch.0.join("index.html")).unwrap();
    assert!(html.contains("stopped"), "the summary table says the run stopped");
}
