//! The tri6 face-seal example (examples/seal-tri6.toml, seal-tri6.md): the
//! face seal of seal.toml with its section meshed by quadratic triangles and
//! contact on their three-node sides. It checks and runs, its recorded
//! results hold (regression values of this program), and they agree with the
//! quad4 seal's, an independent discretisation of the same problem.

use olli_verification::jobs::*;

/// Recorded in examples/seal-tri6.md (regression values of this program;
/// the peak pressure moved from 2.835 MPa when contact pressure became a
/// true traction, force per deformed area). Both follow the friction path,
/// so the increment sizes: 378.8 N and 2.769 MPa while one contact
/// multiplier update kept every increment from growing (squeeze steps all
/// 0.05); the squeeze at constant steps of 0.1 and 0.025 gave 380.1 and
/// 378.1 N, 2.763 and 2.767 MPa; with the steps growing to 0.1, 378.0 N and
/// 2.763 MPa.
const COVER_FORCE_SQUEEZED: f64 = 378.0;
const PEAK_PRESSURE_PRESSURISED: f64 = 2.763;
/// Recorded in examples/seal.md for the quad4 mesh (48 elements around).
const QUAD4_COVER_FORCE_SQUEEZED: f64 = 378.2;
const QUAD4_PEAK_PRESSURE_PRESSURISED: f64 = 2.725;

#[test]
fn seal_tri6_example_results_match_its_note_and_the_quad4_seal() {
    let (job, _) = load_example("seal-tri6.toml");
    let scratch = Scratch::new("seal-tri6");
    let (solution, summary) = run_job(&job, &scratch.0);
    assert!(solution.completed());
    let squeezed = solution.increments.iter().rfind(|i| i.stage == 0).unwrap();
    let cover = squeezed.contact.iter().find(|c| c.name == "cover").unwrap().force[1];
    let peak = summary.rigid["groove"]["peak_pressure"];
    eprintln!("seal-tri6: cover force {cover:.4} N, peak groove pressure {peak:.4} MPa");
    // The note gives 4 significant figures: 0.1 % allowed.
    assert!(rel_diff(cover, COVER_FORCE_SQUEEZED) < 1e-3, "{cover}");
    assert!(rel_diff(peak, PEAK_PRESSURE_PRESSURISED) < 1e-3, "{peak}");
    // Two discretisations of one problem: the squeeze force agrees within
    // 1 % and the peak pressure, a single nodal value, within 3 %.
    assert!(rel_diff(cover, QUAD4_COVER_FORCE_SQUEEZED) < 0.01, "{cover} vs quad4 {QUAD4_COVER_FORCE_SQUEEZED}");
    assert!(rel_diff(peak, QUAD4_PEAK_PRESSURE_PRESSURISED) < 0.03, "{peak} vs quad4 {QUAD4_PEAK_PRESSURE_PRESSURISED}");
    // The mesh is what the note says: six-node triangles only.
    assert!(job.model.mesh.kinds.iter().all(|&k| k == olli_mesh::ElementKind::Tri6));
}
