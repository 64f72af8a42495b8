//! The bush example (examples/bush.toml, bush.md): it checks and runs, its
//! recorded key result holds, and the axial stiffness per unit length agrees
//! with the Adkins–Gent solution for a long bonded bush,
//! F = 2π L G δ / ln(b/a) (Adkins & Gent 1954, "Load–deflexion relations of
//! rubber bush mountings", Brit. J. Appl. Phys. 5:354–358, from memory).

use std::f64::consts::PI;

use olli_verification::jobs::*;

/// Recorded in examples/bush.md: axial pin force at 2 mm.
const PIN_FORCE: f64 = 280.2;
const G: f64 = 0.55;
const A: f64 = 10.0;
const B: f64 = 25.0;

fn adkins_gent(length: f64, travel: f64) -> f64 {
    2.0 * PI * length * G * travel / (B / A).ln()
}

#[test]
fn bush_example_force_matches_its_note() {
    let (job, report) = load_example("bush.toml");
    assert_eq!(report.mesh.elements, 160);
    let scratch = Scratch::new("bush");
    let (solution, summary) = run_job(&job, &scratch.0);
    assert!(solution.completed());
    let f = summary.reactions["pin"]["z"];
    eprintln!("bush: pin force {f:.3} N, Adkins–Gent {:.3} N", adkins_gent(40.0, 2.0));
    // The note gives 4 significant figures: 0.05 % rounding, 0.1 % allowed.
    assert!(rel_diff(f, PIN_FORCE) < 1e-3, "{f}");
    // The sleeve gives back what the pin takes (full 2π).
    assert!(rel_diff(-summary.reactions["sleeve"]["z"], f) < 1e-6);
    // A short bush (L/(b − a) = 2.7): its free ends carry less shear than the
    // long-bush formula assumes, so it is softer, by less than 10 %.
    let ag = adkins_gent(40.0, 2.0);
    assert!(f < ag && f > 0.9 * ag, "{f} vs {ag}");
    // Its pictures (issue 13): each drawn at its size and not blank, the report
    // page well formed with every image present.
    let pictures = olli_verification::pictures::check_report(Some(&job), &scratch.0);
    assert_eq!(olli_verification::pictures::names(&pictures), ["force.png", "stiffness.png", "section_1.png"]);
}

#[test]
fn bush_force_per_length_matches_adkins_gent() {
    // The same section at two lengths with the same axial element size and a
    // small travel (0.1 mm, linear range): each end costs the same force, so
    // the difference of the two forces is the force of a 100 mm piece of an
    // infinitely long bush.
    let base = std::fs::read_to_string(examples_dir().join("bush.toml")).unwrap();
    let force = |length: f64, layers: usize| {
        let text = base
            .replace("size = [15.0, 40.0]", &format!("size = [15.0, {length}]"))
            .replace("divisions = [8, 20]", &format!("divisions = [8, {layers}]"))
            .replace("z = 2.0 }", "z = 0.1 }");
        let job = load_example_text("bush.toml", &text);
        let scratch = Scratch::new(&format!("bush-{layers}"));
        let (solution, summary) = run_job(&job, &scratch.0);
        assert!(solution.completed());
        summary.reactions["pin"]["z"]
    };
    let per_100 = force(200.0, 100) - force(100.0, 50);
    let want = adkins_gent(100.0, 0.1);
    eprintln!("bush: 100 mm of long bush {per_100:.4} N, Adkins–Gent {want:.4} N");
    // 8 linear elements across a wall whose displacement varies as ln r:
    // O(h²) ≈ 0.2 % here; 1 % allowed (measured 0.13 %).
    assert!(rel_diff(per_100, want) < 1e-2, "{per_100} vs {want}");
}
