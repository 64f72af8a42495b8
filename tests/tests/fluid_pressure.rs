//! Fluid pressure that penetrates where contact lets it (`[[fluid]]`):
//! the hydrostatic state of a block wetted on its free faces, the wetted
//! front against a contact band, and self-sealing of a confined cord.

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
