//! The mount example (examples/mount.toml, mount.md): it checks and runs
//! both stages, and the recorded key results hold. Independent checks of the
//! same kind of part are the patch and Lamé tests; the note compares these
//! numbers with the Gent–Lindley and short-column hand estimates.

use olli_verification::jobs::*;

/// Recorded in examples/mount.md.
const SQUEEZE_FORCE: f64 = -411.6;
const SHEAR_FORCE: f64 = 125.9;
const HELD_SQUEEZE: f64 = -399.0;
/// Recorded in examples/mount.md (regression values of this program).
const MASS_HEIGHT: f64 = -2.039;
const MASS_TILT_DEG: f64 = 4.585;
const MASS_SHEAR: f64 = -87.44;

#[test]
fn mount_example_forces_match_its_note() {
    let (job, report) = load_example("mount.toml");
    assert_eq!(report.stages, ["squeeze", "shear", "mass"]);
    let scratch = Scratch::new("mount");
    let (solution, summary) = run_job(&job, &scratch.0);
    assert!(solution.completed());
    // What the plate applies to the rubber is minus what the rubber exerts on the plate.
    let end_of = |stage: usize| solution.increments.iter().rfind(|r| r.stage == stage).unwrap().inserts[0].clone();
    let fz = -end_of(0).force[2];
    let (fx, fz_held) = (-end_of(1).force[0], -end_of(1).force[2]);
    eprintln!("mount: squeeze {fz:.3} N, shear {fx:.3} N, held squeeze {fz_held:.3} N");
    // 4 significant figures in the note: 0.1 % allowed.
    assert!(rel_diff(fz, SQUEEZE_FORCE) < 1e-3, "{fz}");
    assert!(rel_diff(fx, SHEAR_FORCE) < 1e-3, "{fx}");
    assert!(rel_diff(fz_held, HELD_SQUEEZE) < 1e-3, "{fz_held}");
    // The mass stage: the plate carries exactly the 392 N with no moment, and
    // finds its height and tilt (3 significant figures in the note).
    let plate = &summary.inserts["plate"];
    eprintln!("mass: z {:.4} mm, ry {:.4}°, force x {:.3} N", plate["z"], plate["ry"], plate["force_x"]);
    assert!((plate["force_z"] - 392.0).abs() < 1e-6 * 392.0);
    assert!(plate["moment_x"].abs() < 1e-6 && plate["moment_y"].abs() < 1e-6);
    assert!(rel_diff(plate["z"], MASS_HEIGHT) < 1e-3);
    assert!(rel_diff(plate["ry"], MASS_TILT_DEG) < 1e-3);
    assert!(rel_diff(plate["force_x"], MASS_SHEAR) < 1e-3);
    // Equilibrium of the whole part: the base reaction balances the rubber's force on the plate.
    for (i, c) in ["x", "y", "z"].iter().enumerate() {
        let (top, bottom) = (-end_of(2).force[i], summary.reactions["bottom"][*c]);
        assert!((top + bottom).abs() < 1e-6 * fz.abs(), "{c}: {top} + {bottom}");
    }
    // Written history: one row per converged increment, with every column.
    let history = std::fs::read_to_string(scratch.0.join("history.csv")).unwrap();
    assert_eq!(history.lines().count(), 1 + solution.increments.len());
    assert!(history.starts_with("stage,increment,load_factor,time,reaction_bottom_x,"));
    // Its pictures (issue 13): each drawn at its size and not blank, the report
    // page well formed with every image present.
    let pictures = olli_verification::pictures::check_report(Some(&job), &scratch.0);
    assert_eq!(
        olli_verification::pictures::names(&pictures),
        ["force.png", "stiffness.png", "section_1.png", "section_2.png", "section_3.png"]
    );
}
