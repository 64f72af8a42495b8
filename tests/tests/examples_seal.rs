//! The face-seal example (examples/seal.toml, seal.md): it checks and runs,
//! its recorded results hold, and before the cord meets the groove walls its
//! squeeze force agrees with Lindley's O-ring relation
//! F/L = E d (1.25 c^1.5 + 50 c^6) (P. B. Lindley 1967, "Compression
//! characteristics of laterally-unrestrained rubber O-rings", J. Inst. Rubber
//! Industry 1; from memory) within the ±20 % that empirical fit is good for.

use std::f64::consts::PI;

use olli_verification::jobs::*;

/// Recorded in examples/seal.md.
const COVER_FORCE_SQUEEZED: f64 = 375.5;
const PEAK_PRESSURE_PRESSURISED: f64 = 3.015;

#[test]
fn seal_example_results_match_its_note() {
    let (job, _) = load_example("seal.toml");
    let scratch = Scratch::new("seal");
    let (solution, summary) = run_job(&job, &scratch.0);
    assert!(solution.completed());
    let squeezed = solution.increments.iter().filter(|i| i.stage == 0).next_back().unwrap();
    let cover = squeezed.contact.iter().find(|c| c.name == "cover").unwrap();
    // The note gives 4 significant figures: 0.1 % allowed.
    assert!(rel_diff(cover.force[1], COVER_FORCE_SQUEEZED) < 1e-3, "{}", cover.force[1]);
    let groove = &summary.rigid["groove"];
    assert!(rel_diff(groove["peak_pressure"], PEAK_PRESSURE_PRESSURISED) < 1e-3, "{}", groove["peak_pressure"]);
    // The seal holds: peak contact pressure above the 1 MPa system pressure.
    assert!(groove["peak_pressure"] > 1.0);
    // Groove and cover take equal and opposite axial forces.
    assert!(rel_diff(-groove["z"], summary.rigid["cover"]["z"]) < 1e-6);

    // Lindley, at the increment nearest 10 % squeeze (before wall contact).
    let (e, d, r) = (3.0 * 2.0 * (0.62 + 0.16), 3.5, 20.0);
    let near = solution
        .increments
        .iter()
        .filter(|i| i.stage == 0)
        .min_by(|a, b| (a.load_factor * 0.8 / d - 0.1).abs().total_cmp(&(b.load_factor * 0.8 / d - 0.1).abs()))
        .unwrap();
    let c = near.load_factor * 0.8 / d;
    let per_length = near.contact.iter().find(|x| x.name == "cover").unwrap().force[1] / (2.0 * PI * r);
    let lindley = e * d * (1.25 * c.powf(1.5) + 50.0 * c.powi(6));
    eprintln!("seal: c = {c:.4}: {per_length:.4} N/mm vs Lindley {lindley:.4} N/mm");
    assert!((per_length / lindley - 1.0).abs() < 0.2, "{per_length} vs {lindley}");
}
