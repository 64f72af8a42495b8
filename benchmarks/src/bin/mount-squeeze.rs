//! Bonded cylindrical mount squeeze benchmark (3-D).
//!
//! The solid rubber cylinder of `examples/mount.toml` (40 mm across, 20 mm
//! high, the invented compound `mount-nr60`: eight-chain, shear modulus
//! 0.62 MPa, locking stretch 5.5, bulk modulus 1200 MPa), meshed by the mesh
//! crate's solid-cylinder generator in hex8 Q1/P0, bonded to two plates: the
//! base is held, the top plate moves 4 mm down (20 % squeeze) with its
//! in-plane motion held, in 10 equal increments.
//!
//! Run from the workspace root:
//! `cargo run --release --bin mount-squeeze -- --divisions AROUND,AXIAL [--ordering best|amd|nd] [--threads auto|N] [--reuse on|off] [--krylov-iterations N]`
//! (AROUND a multiple of 4: elements around the circumference). It prints
//! what `block-compression` prints, and as its last line
//! `plate_force_N=<value>`: the force on the top plate at full squeeze.

use std::time::Instant;

use olli_benchmarks::{linear_flag, parse_counts, parse_ordering, run_and_report, usage, LINEAR_FLAGS};
use olli_mesh::generate::{solid_cylinder, CircleParams};
use olli_solver::linear::{LinearSettings, Ordering};
use olli_solver::material::{registry, VolumetricForm};
use olli_solver::{Analysis, Formulation, IncrementControls, Model, Motion, Stage, Support};

const USAGE: &str = "usage: mount-squeeze --divisions AROUND,AXIAL [--ordering best|amd|nd]";

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let mut divisions = [32, 8];
    let mut ordering = Ordering::LeastFill;
    let mut linear = LinearSettings::default();
    let mut i = 1;
    while i < args.len() {
        match (args[i].as_str(), args.get(i + 1)) {
            ("--divisions", Some(v)) => {
                divisions = parse_counts(v)
                    .filter(|[around, _]| around % 4 == 0)
                    .unwrap_or_else(|| usage(&format!("--divisions expects AROUND,AXIAL (AROUND a multiple of 4), got `{v}`")));
                i += 2;
            }
            ("--ordering", Some(v)) => {
                ordering = parse_ordering(v).unwrap_or_else(|| usage("--ordering must be amd, nd or best"));
                i += 2;
            }
            (flag, value) if linear_flag(flag, value, &mut linear) => i += 2,
            (other, _) => usage(&format!("unknown argument `{other}`; {USAGE} {LINEAR_FLAGS}")),
        }
    }
    let t_mesh = Instant::now();
    let params =
        CircleParams { diameter: Some(40.0), height: 20.0, divisions: divisions[0], axial_divisions: divisions[1], ..Default::default() };
    let mesh = solid_cylinder(&params).unwrap_or_else(|e| usage(&format!("mesh: {e}")));
    let material = registry::material(
        "eight-chain",
        &[("shear_modulus", 0.62), ("locking_stretch", 5.5), ("bulk_modulus", 1200.0)],
        VolumetricForm::Quadratic,
    )
    .expect("valid constants");
    let mut model = Model::single_region(mesh, Analysis::Solid3d, std::sync::Arc::new(material), Formulation::Mixed);
    model.output.point_fields = false;
    model.output.nodal_fields = false;
    model.stages.push(Stage {
        name: "squeeze".into(),
        controls: IncrementControls { first: 0.1, max: 0.1, ..Default::default() },
        supports: vec![Support { set: "bottom".into(), components: [true, true, true] }],
        motions: vec![Motion { set: "top".into(), displacement: [Some(0.0), Some(0.0), Some(-4.0)] }],
        ..Default::default()
    });
    model.linear = LinearSettings { ordering, ..linear };
    let setup = t_mesh.elapsed().as_secs_f64();
    println!("divisions={}x{} elements={} nodes={}", divisions[0], divisions[1], model.mesh.element_count(), model.mesh.node_count());
    let sol = run_and_report(&model, setup);
    let force = sol.last().map(|r| -r.reactions["top"][2]).unwrap_or(f64::NAN);
    println!("plate_force_N={force:.6}");
}
