//! The face-seal example (examples/seal.toml, seal.md): it checks and runs,
//! its recorded results hold, and its stabilization does not steer them. The
//! comparison with Lindley's O-ring relation for frictionless plates lives in
//! `lindley_oring.rs`; the note compares this frictional seal with it.

use olli_verification::jobs::*;

/// Recorded in examples/seal.md (regression values: olli's own results;
/// the cover force moved from 378.2 N when the friction law's stick–slip
/// transition was rounded; the peak pressure from 2.781 MPa when contact
/// pressure became a true traction, force per deformed area; the peak at the
/// end is the one at 10 MPa through `[[fluid]]` since the example is
/// pressurised that way, 2.725 MPa under the old 1 MPa side pressure).
/// Both follow the friction path, so the increment sizes: 379.4 N and
/// 11.780 MPa while every increment stayed at 0.05 (step growth counted the
/// contact multiplier update's re-balance); the squeeze run at constant
/// steps of 0.1, 0.05, 0.025 and 0.0125 gave 381.1, 379.5, 378.6 and
/// 378.7 N, and 11.764, 11.769, 11.770 and 11.772 MPa. Since one update's
/// re-balance no longer stops growth, the steps grow from 0.05 to 0.1:
/// 378.3 N, 11.766 MPa.
const COVER_FORCE_SQUEEZED: f64 = 378.3;
const PEAK_PRESSURE_PRESSURISED: f64 = 11.766;

#[test]
fn seal_example_results_match_its_note() {
    let (job, _) = load_example("seal.toml");
    let scratch = Scratch::new("seal");
    let (solution, summary) = run_job(&job, &scratch.0);
    assert!(solution.completed());
    // Regression of the Newton effort (our own counts, not verification):
    // 407 iterations while a damped retry left damping switched on in later
    // plain increments and the equilibrium was confirmed by one more
    // correction; 313 since; 328–331 with inexact Newton systems on a kept
    // factor (the count moves with the Krylov solves' stopping points);
    // 245 in 25 increments once one contact re-balance no longer stopped
    // step growth; 207 once the contact multipliers were predicted from the
    // last two increments and updated early near each frictional
    // equilibrium; 164 once a node whose slip reverses takes the stick
    // tangent for its next step (the first pressurised increment: 51 -> 20);
    // 159 once the predictor extrapolates the carried element pressures too;
    // 113 once the contact multipliers are unknowns of each Newton step;
    // 96 in 24 increments once the fluid's front is found again at any
    // iterate within a relative residual of 0.1 and, with contact, the
    // systems solved on a kept factor are solved ten times tighter far
    // from equilibrium.
    // A bound, not a timing.
    assert!(solution.stats.newton_iterations <= 110, "{} Newton iterations", solution.stats.newton_iterations);
    let squeezed = solution.increments.iter().rfind(|i| i.stage == 0).unwrap();
    let cover = squeezed.contact.iter().find(|c| c.name == "cover").unwrap();
    // The note gives 4 significant figures: 0.1 % allowed.
    assert!(rel_diff(cover.force[1], COVER_FORCE_SQUEEZED) < 1e-3, "{}", cover.force[1]);
    let groove = &summary.rigid["groove"];
    assert!(rel_diff(groove["peak_pressure"], PEAK_PRESSURE_PRESSURISED) < 1e-3, "{}", groove["peak_pressure"]);
    // The seal holds at every pressurised increment (self-sealing, common
    // practice): peak contact pressure on the groove above the fluid's.
    assert!((summary.fluids["system"]["pressure"] - 10.0).abs() < 1e-9);
    for r in solution.increments.iter().filter(|r| r.stage == 1) {
        let peak = r.contact.iter().find(|c| c.name == "groove").unwrap().peak_pressure;
        assert!(peak > r.fluids[0].pressure, "leaks at {} MPa: groove peak {peak}", r.fluids[0].pressure);
    }
    // At the end of the squeeze, groove and cover take equal and opposite
    // axial forces, up to the stabilization springs' share (a few 0.1 %).
    let groove_squeezed = squeezed.contact.iter().find(|c| c.name == "groove").unwrap();
    assert!(rel_diff(-groove_squeezed.force[1], cover.force[1]) < 5e-3);
    // Its pictures (issue 13): each drawn at its size and not blank, the report
    // page well formed with every image present.
    let pictures = olli_verification::pictures::check_report(Some(&job), &scratch.0);
    assert_eq!(
        olli_verification::pictures::names(&pictures),
        [
            "force.png",
            "stiffness.png",
            "section_1.png",
            "contact_groove_1.png",
            "contact_cover_1.png",
            "section_2.png",
            "contact_groove_2.png",
            "contact_cover_2.png"
        ]
    );
}

// The stabilization springs must not steer the answer: with half the factor
// the squeeze force and the peak pressure move by far less than the 1 %
// engineering tolerance (common practice for such numerical aids).
#[test]
fn seal_example_is_insensitive_to_its_stabilization() {
    let base = std::fs::read_to_string(examples_dir().join("seal.toml")).unwrap();
    let half = base.replace("stabilization = 1e-3", "stabilization = 5e-4");
    assert_ne!(base, half);
    let job = load_example_text("seal.toml", &half);
    let scratch = Scratch::new("seal-half");
    let (solution, summary) = run_job(&job, &scratch.0);
    assert!(solution.completed());
    let squeezed = solution.increments.iter().rfind(|i| i.stage == 0).unwrap();
    let cover = squeezed.contact.iter().find(|c| c.name == "cover").unwrap().force[1];
    // Half the factor: 378.4 N against 379.4 N (0.3 %; the frictional path
    // differs a little where an increment is solved with damped steps).
    assert!(rel_diff(cover, COVER_FORCE_SQUEEZED) < 5e-3, "{cover}");
    let peak = summary.rigid["groove"]["peak_pressure"];
    assert!(rel_diff(peak, PEAK_PRESSURE_PRESSURISED) < 5e-3, "{peak}");
}

/// The face seal at 10 MPa with the pressurisation taken in steps of
/// `step` (first and largest increment; the squeeze as in the example).
fn pressurised_with_steps(step: f64) -> (f64, f64) {
    let base = std::fs::read_to_string(examples_dir().join("seal.toml")).unwrap();
    let at = base.find("name = \"pressurise\"").expect("a pressurise stage");
    let (squeeze, pressurise) = base.split_at(at);
    let pressurise = pressurise
        .replace("first_increment = 0.05", &format!("first_increment = {step}"))
        .replace("max_increment = 0.1", &format!("max_increment = {step}"));
    let job = load_example_text("seal.toml", &format!("{squeeze}{pressurise}"));
    let solution = olli_solver::solve(&job.model, &mut olli_solver::Quiet).expect("valid model");
    assert!(solution.completed(), "{:?}", solution.termination);
    let last = solution.last().unwrap();
    assert!((last.fluids[0].pressure - 10.0).abs() < 1e-9);
    let cover = last.contact.iter().find(|c| c.name == "cover").unwrap().force[1];
    (cover, last.fluids[0].wetted_measure)
}

// The wetted front is a fixed point of the pressure-penetration rule at
// each load, reached from the last converged front, so the answer does
// not hang on the increment size: four times finer steps through the
// pressurisation give the same cover force and wetted length. Measured:
// 3869 N and 3.424 mm with 0.1 steps, 3890 N and 3.417 mm with 0.025. The
// old rule (a flood of the last increment's contact pressures at the new
// fluid pressure, whose facets once wetted stayed open) gave, with both
// stages in steps of 0.1 against 0.025, 3601 N and 3.874 mm against
// 3887 N and 3.417 mm: 7 % and 13 %. What remains is
// the path dependence of friction and of the stabilization springs
// (pulling toward the last increment), which the squeeze alone shows:
// 381.0 N with 0.1 steps, 378.5 N with 0.025, 378.1 N with 0.0125
// (0.7 % from 0.1 to 0.025). Tolerance 1 %, above that physical spread
// and far below the old rule's error. Regression of a property of the
// method, not verification against an outside value.
#[test]
fn seal_example_front_does_not_depend_on_the_increment_size() {
    let (coarse_cover, coarse_wetted) = pressurised_with_steps(0.1);
    let (fine_cover, fine_wetted) = pressurised_with_steps(0.025);
    assert!(rel_diff(coarse_cover, fine_cover) < 1e-2, "cover force {coarse_cover} (0.1) against {fine_cover} (0.025)");
    assert!(rel_diff(coarse_wetted, fine_wetted) < 1e-2, "wetted length {coarse_wetted} (0.1) against {fine_wetted} (0.025)");
}
