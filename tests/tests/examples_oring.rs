//! The O-ring example (examples/oring.toml, oring.md): a cord in a piston
//! gland with a 0.1 mm clearance gap, pressurised to 10 MPa through
//! `[[fluid]]` with no stabilization. A regression test: its recorded
//! figures are olli's own (issue 9: the scenario must reach full pressure).
//! Beside them, self-sealing (common practice, no source): the seal holds
//! (peak contact pressure on the bore above the fluid pressure) at every
//! increment, and that peak rises about one-for-one with the fluid pressure
//! while the cord is confined but not yet forced into the gap (to 6 MPa;
//! beyond, the corner of the gap adds its own peak).

use olli_verification::jobs::*;

/// Recorded in examples/oring.md.
const BORE_FORCE: f64 = 2712.4;
const BORE_PEAK_PRESSURE: f64 = 15.49;

#[test]
fn oring_example_reaches_10_mpa_and_its_recorded_figures() {
    let (job, _) = load_example("oring.toml");
    assert!(job.model.stages.iter().all(|s| s.controls.stabilization == 0.0), "no stabilization");
    let scratch = Scratch::new("oring");
    let (solution, summary) = run_job(&job, &scratch.0);
    assert!(solution.completed(), "{:?}", solution.termination);
    assert!((summary.fluids["system"]["pressure"] - 10.0).abs() < 1e-9, "{}", summary.fluids["system"]["pressure"]);
    let bore = &summary.rigid["bore"];
    assert!(rel_diff(bore["r"], BORE_FORCE) < 2e-3, "{}", bore["r"]);
    assert!(rel_diff(bore["peak_pressure"], BORE_PEAK_PRESSURE) < 2e-3, "{}", bore["peak_pressure"]);
    // Self-sealing at every pressurised increment, and the slope of the
    // bore's peak contact pressure against the fluid pressure.
    let squeezed = solution.increments.iter().rfind(|r| r.stage == 0).unwrap();
    let bore_peak = |r: &olli_solver::IncrementResult| r.contact.iter().find(|c| c.name == "bore").unwrap().peak_pressure;
    let peak0 = bore_peak(squeezed);
    for r in solution.increments.iter().filter(|r| r.stage == 1) {
        let p = r.fluids[0].pressure;
        assert!(bore_peak(r) > p, "leaks at {p} MPa: bore peak {}", bore_peak(r));
    }
    let at6 = solution.increments.iter().find(|r| r.stage == 1 && r.fluids[0].pressure >= 6.0 - 1e-9).unwrap();
    let slope = (bore_peak(at6) - peak0) / at6.fluids[0].pressure;
    eprintln!("O-ring: bore peak {peak0:.3} → {:.3} MPa at {} MPa, slope {slope:.3}", bore_peak(at6), at6.fluids[0].pressure);
    assert!((0.8..=1.3).contains(&slope), "peak contact pressure rises {slope:.3} per unit fluid pressure");
}
