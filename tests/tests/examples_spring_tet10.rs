//! The tet10 spring example (examples/spring-tet10.toml, spring-tet10.md): a
//! mesher's quadratic tetrahedra of an invented filleted, holed rubber spring
//! load, check and run; the recorded plate force holds (a regression value
//! of this program) and lies within 40 % of the bonded-block hand estimate
//! the note works out (a rough estimate: see the note).

use olli_verification::jobs::*;

/// Recorded in examples/spring-tet10.md (regression values of this program).
const SQUEEZE_FORCE: f64 = -302.5;
/// The note's hand estimate: Gent–Lindley apparent modulus with the
/// neo-Hookean stiffening of 10 % uniaxial compression (N, compressive).
const HAND_ESTIMATE: f64 = -246.0;

#[test]
fn spring_tet10_example_forces_match_its_note() {
    let (job, report) = load_example("spring-tet10.toml");
    assert_eq!(report.stages, ["squeeze"]);
    assert!(job.model.mesh.kinds.iter().all(|&k| k == olli_mesh::ElementKind::Tet10));
    let scratch = Scratch::new("spring-tet10");
    let (solution, summary) = run_job(&job, &scratch.0);
    assert!(solution.completed());
    // What the plate applies to the rubber is minus what the rubber exerts on the plate.
    let end_of = |stage: usize| solution.increments.iter().rfind(|r| r.stage == stage).unwrap().inserts[0].clone();
    let fz = -end_of(0).force[2];
    eprintln!("spring-tet10: squeeze {fz:.4} N");
    // 4 significant figures in the note: 0.1 % allowed.
    assert!(rel_diff(fz, SQUEEZE_FORCE) < 1e-3, "{fz}");
    assert!(rel_diff(fz, HAND_ESTIMATE) < 0.4, "{fz} vs the hand estimate {HAND_ESTIMATE}");
    // Equilibrium of the whole part: the base reaction balances the plate.
    for (i, c) in ["x", "y", "z"].iter().enumerate() {
        let (top, bottom) = (-end_of(0).force[i], summary.reactions["bottom"][*c]);
        assert!((top + bottom).abs() < 1e-6 * fz.abs(), "{c}: {top} + {bottom}");
    }
}
