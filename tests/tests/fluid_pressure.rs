//! Fluid pressure that penetrates where contact lets it (`[[fluid]]`):
//! the hydrostatic state of a block wetted on its free faces, the wetted
//! front against a contact band (the pressure-penetration criterion of
//! Müller & Nau 1998, *Fluid Sealing Technology*; from memory), and
//! self-sealing of a confined cord.

use std::path::Path;

use olli_app::job::{load_str, Job};
use olli_solver::model::OutputSettings;
use olli_solver::{solve, Quiet, Solution};

fn job(text: &str) -> Job {
    load_str(Path::new("fluid.toml"), text).unwrap_or_else(|e| panic!("{e}"))
}

fn run(job: &Job) -> Solution {
    let mut model = job.model.clone();
    model.output = OutputSettings { point_fields: true, nodal_fields: false };
    let sol = solve(&model, &mut Quiet).expect("valid model");
    assert!(sol.completed(), "{:?}", sol.termination);
    sol
}

/// Largest deviation of every integration point's Cauchy stress from −p I.
fn worst_deviation_from_hydrostatic(sol: &Solution, p: f64) -> f64 {
    let last = sol.last().unwrap();
    let points = last.points.as_ref().unwrap();
    let mut worst: f64 = 0.0;
    for s in &points.states {
        let dev = s.cauchy + nalgebra::Matrix3::identity() * p;
        worst = worst.max(dev.abs().max());
    }
    worst
}

const MATERIAL: &str = r#"
[materials.m]
model = "neo-hookean"
shear_modulus = 1.0
bulk_modulus = 2000.0
[[region]]
elements = "all"
material = "m"
"#;

// A body held only by frictionless symmetry planes and loaded by a uniform
// pressure p on all its other faces takes the homogeneous state σ = −p I
// (equilibrium and the boundary conditions are met by a uniform
// volumetric compression of an isotropic solid; any continuum mechanics
// text, e.g. Holzapfel 2000, "Nonlinear Solid Mechanics", §6.1). The
// fluid enters at one point and must wet every free face through their
// shared corners; the state is exact for the element, so only round-off
// and the Newton tolerance remain (1e-6 of p).
#[test]
fn fluid_hydrostatic_axisymmetric_cylinder_is_exact() {
    let text = format!(
        r#"
analysis = "axisymmetric"
[mesh]
generate = "rectangle"
size = [2.0, 3.0]
divisions = [4, 5]
[[select]]
name = "wet"
sides = {{ union = [{{ set = "right" }}, {{ set = "top" }}] }}
{MATERIAL}
[[support]]
nodes = "left"
fix = ["r"]
[[support]]
nodes = "bottom"
fix = ["z"]
[[fluid]]
name = "oil"
sides = "wet"
source = [2.0, 1.3]
stage = "fill"
pressure = 8.0
[[stage]]
name = "fill"
"#
    );
    let j = job(&text);
    let sol = run(&j);
    // The follower load's stiffness is consistent: Newton converges
    // quadratically (each relative residual below 10 × the square of the one
    // before, once it is small and above round-off, 1e-11). A residual at
    // the force tolerance (1e-6) ends an equilibrium solve: what follows
    // it is the re-balance of a moved wetted front (the first equilibrium
    // of the stage is dry), a new solve.
    for r in &sol.increments {
        for w in r.residual_history.windows(2) {
            if w[0] < 1e-2 && w[0] > 1e-6 && w[1] > 1e-11 {
                assert!(w[1] < 10.0 * w[0] * w[0], "residuals {:?}", r.residual_history);
            }
        }
    }
    let dev = worst_deviation_from_hydrostatic(&sol, 8.0);
    assert!(dev < 1e-6 * 8.0, "deviation from −p I: {dev:.3e}");
    let last = sol.last().unwrap();
    let oil = &last.fluids[0];
    assert_eq!(oil.wetted_facets, 4 + 5, "every facet of the right side and the top");
    // Wetted length: the compressed outer and top edges, λ = J^(1/3) with J = exp(−p/κ)… near 1 − p/κ.
    let lambda =
        last.displacement.iter().zip(&j.model.mesh.nodes).find(|(_, x)| x[0] == 2.0 && x[1] == 3.0).map(|(u, _)| 1.0 + u[0] / 2.0).unwrap();
    assert!((oil.wetted_measure - 5.0 * lambda).abs() < 1e-9, "{} vs {}", oil.wetted_measure, 5.0 * lambda);
    let p = last.fluid_pressure.as_ref().unwrap();
    assert!(p.iter().filter(|&&v| v == 8.0).count() == 5 + 6 - 1, "wetted nodes carry the fluid pressure");
}

// The same hydrostatic state in 3-D: a block on three symmetry planes,
// wetted through its three other faces (sharing edges) from one point.
#[test]
fn fluid_hydrostatic_block_3d_is_exact() {
    let text = format!(
        r#"
analysis = "3d"
[mesh]
generate = "block"
size = [1.0, 1.5, 2.0]
divisions = [2, 3, 3]
[[select]]
name = "wet"
sides = {{ union = [{{ set = "right" }}, {{ set = "back" }}, {{ set = "top" }}] }}
{MATERIAL}
[[support]]
nodes = "left"
fix = ["x"]
[[support]]
nodes = "front"
fix = ["y"]
[[support]]
nodes = "bottom"
fix = ["z"]
[[fluid]]
name = "oil"
sides = "wet"
source = [1.0, 0.2, 0.3]
pressure = 5.0
[[stage]]
name = "fill"
"#
    );
    let j = job(&text);
    let sol = run(&j);
    let dev = worst_deviation_from_hydrostatic(&sol, 5.0);
    assert!(dev < 1e-6 * 5.0, "deviation from −p I: {dev:.3e}");
    assert_eq!(sol.last().unwrap().fluids[0].wetted_facets, 2 * 3 + 2 * 3 + 3 * 3);
}

/// Axisymmetric face seal: a 4 mm cord (section centre at r = 20) squeezed
/// 20 % between two frictionless plates, the fluid entering at the inside
/// diameter; the outer groove wall 0.2 mm away stops the ring when the
/// fluid pushes it outward. The mid-plane is held axially (the load is
/// symmetric about it). A third stage, if asked, lifts both plates back to
/// a 5 % squeeze.
fn face_seal(pressure: f64, release: bool) -> String {
    let release_stage = if release { "[[stage]]\nname = \"release\"\nfirst_increment = 0.1\nmax_increment = 0.1\n" } else { "" };
    let (lower, upper) = if release {
        ("squeeze = [0.0, 0.4], release = [0.0, 0.1]", "squeeze = [0.0, -0.4], release = [0.0, -0.1]")
    } else {
        ("squeeze = [0.0, 0.4]", "squeeze = [0.0, -0.4]")
    };
    format!(
        r#"
analysis = "axisymmetric"
[mesh]
generate = "cord"
center = [20.0, 0.0]
diameter = 4.0
divisions = 32
[[select]]
name = "mid_plane"
nodes = {{ line = {{ point = [20.0, 0.0], direction = [1.0, 0.0] }} }}
[materials.m]
model = "neo-hookean"
shear_modulus = 1.0
bulk_modulus = 2000.0
[[region]]
elements = "all"
material = "m"
[[support]]
nodes = "mid_plane"
fix = ["z"]
[[rigid]]
name = "lower"
touches = "surface"
line = {{ point = [20.0, -2.0], direction = [1.0, 0.0] }}
move = {{ {lower} }}
[[rigid]]
name = "upper"
touches = "surface"
line = {{ point = [20.0, 2.0], direction = [1.0, 0.0] }}
move = {{ {upper} }}
[[rigid]]
name = "wall"
touches = "surface"
line = {{ point = [22.2, -3.0], direction = [0.0, 1.0] }}
[[fluid]]
name = "system"
sides = "surface"
source = [18.0, 0.0]
stage = "pressurise"
pressure = {pressure}
[[stage]]
name = "squeeze"
first_increment = 0.1
max_increment = 0.2
[[stage]]
name = "pressurise"
first_increment = 0.1
max_increment = 0.1
{release_stage}"#
    )
}

/// Pairs of neighbouring nodes along the side set `surface`.
fn surface_edges(job: &Job) -> Vec<[usize; 2]> {
    let mesh = &job.model.mesh;
    mesh.side_sets["surface"]
        .iter()
        .map(|&s| {
            let n = mesh.side_nodes(s);
            [n[0], n[1]]
        })
        .collect()
}

// Self-sealing (common practice, no source): a confined elastomer seal
// transmits the fluid pressure almost like a liquid, so its peak contact
// pressure rises about one-for-one with the fluid pressure and stays above
// it. Checked on the plates between 0 and 3 μ of fluid pressure: the slope
// of peak contact pressure against fluid pressure within 0.8–1.3 and a
// positive sealing margin at every increment.
#[test]
fn fluid_self_sealing_of_a_confined_cord() {
    let j = job(&face_seal(3.0, false));
    let sol = run(&j);
    let squeezed = sol.increments.iter().rfind(|r| r.stage == 0).unwrap();
    let peak0 = squeezed.contact.iter().find(|c| c.name == "lower").unwrap().peak_pressure;
    let mut last = (0.0, peak0);
    for r in sol.increments.iter().filter(|r| r.stage == 1) {
        let p = r.fluids[0].pressure;
        let peak = r.contact.iter().find(|c| c.name == "lower").unwrap().peak_pressure;
        assert!(peak > p, "the seal leaks at fluid pressure {p}: peak contact pressure {peak}");
        last = (p, peak);
    }
    let slope = (last.1 - peak0) / last.0;
    assert!((0.8..=1.3).contains(&slope), "peak contact pressure rises {slope:.3} per unit fluid pressure");
}

// The criterion checked here is the pressure-penetration criterion of seal
// engineering: a facet is wetted when its contact pressure falls below the
// fluid pressure, the interface stays tight where the contact pressure
// exceeds the pressure of the fluid to be sealed. Source: H. K. Müller and
// B. S. Nau, *Fluid Sealing Technology: Principles and Applications*,
// Marcel Dekker, New York 1998, the chapters on static seals (from memory).
//
// The wetted front follows the contact within each increment: at every
// converged increment (pressure rising, then the plates lifted), (1) a
// node pressed against a plate at least as hard as the fluid is never
// wetted, and (2) the fluid has passed every facet next to the wetted
// region whose corners are pressed less than the fluid (so a face that
// loses contact is wetted in the same increment), and lifting the plates
// lets the fluid further in.
#[test]
fn fluid_front_follows_opening_contact_within_the_increment() {
    let j = job(&face_seal(1.0, true));
    let sol = run(&j);
    let edges = surface_edges(&j);
    let mut wetted_while_lifting = false;
    for r in sol.increments.iter().filter(|r| r.stage >= 1) {
        let pf = r.fluids[0].pressure;
        let contact = &r.contact_fields.as_ref().unwrap().pressure;
        let fluid = r.fluid_pressure.as_ref().unwrap();
        for (n, &pc) in contact.iter().enumerate() {
            assert!(
                !(pc >= pf && fluid[n] > 0.0),
                "node {n} pressed at {pc} ≥ {pf} but wetted (stage {} increment {})",
                r.stage,
                r.increment
            );
        }
        for &[a, b] in &edges {
            for (x, y) in [(a, b), (b, a)] {
                if fluid[x] > 0.0 && contact[y] < pf {
                    assert!(fluid[y] > 0.0, "facet {x}–{y} open to the fluid but dry (stage {} increment {})", r.stage, r.increment);
                }
            }
        }
        if r.stage == 2 && r.fluids[0].wetted_facets > sol.increments.iter().rfind(|q| q.stage == 1).unwrap().fluids[0].wetted_facets {
            wetted_while_lifting = true;
        }
    }
    assert!(wetted_while_lifting, "lifting the plates lets the fluid further in");
}
