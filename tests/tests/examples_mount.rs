//! The mount example (examples/mount.toml, mount.md): it checks and runs
//! both stages, and the recorded key results hold. Independent checks of the
//! same kind of part are the patch and Lamé tests; the note compares these
//! numbers with the Gent–Lindley and short-column hand estimates.

use olli_verification::jobs::*;

/// Recorded in examples/mount.md.
const SQUEEZE_FORCE: f64 = -411.6;
const SHEAR_FORCE: f64 = 125.9;
const HELD_SQUEEZE: f64 = -399.0;

#[test]
fn mount_example_forces_match_its_note() {
    let (job, report) = load_example("mount.toml");
    assert_eq!(report.stages, ["squeeze", "shear"]);
    let scratch = Scratch::new("mount");
    let (solution, summary) = run_job(&job, &scratch.0);
    assert!(solution.completed());
    let end_of_squeeze = solution.increments.iter().rfind(|r| r.stage == 0).unwrap();
    let fz = end_of_squeeze.reactions["top"][2];
    let (fx, fz_held) = (summary.reactions["top"]["x"], summary.reactions["top"]["z"]);
    eprintln!("mount: squeeze {fz:.3} N, shear {fx:.3} N, held squeeze {fz_held:.3} N");
    // 4 significant figures in the note: 0.1 % allowed.
    assert!(rel_diff(fz, SQUEEZE_FORCE) < 1e-3, "{fz}");
    assert!(rel_diff(fx, SHEAR_FORCE) < 1e-3, "{fx}");
    assert!(rel_diff(fz_held, HELD_SQUEEZE) < 1e-3, "{fz_held}");
    // Equilibrium of the whole part: base and top reactions cancel.
    for c in ["x", "y", "z"] {
        let (top, bottom) = (summary.reactions["top"][c], summary.reactions["bottom"][c]);
        assert!((top + bottom).abs() < 1e-6 * fz.abs(), "{c}: {top} + {bottom}");
    }
    // Written history: one row per converged increment, with every column.
    let history = std::fs::read_to_string(scratch.0.join("history.csv")).unwrap();
    assert_eq!(history.lines().count(), 1 + solution.increments.len());
    assert!(history.starts_with("stage,increment,load_factor,applied_top_x,applied_top_y,applied_top_z,reaction_bottom_x,"));
}
