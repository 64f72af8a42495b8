//! Bonded block compression benchmark.
//!
//! A 40 × 40 × 10 mm block bonded to two rigid plates: the bottom plate is
//! fixed, the top plate moves 2 mm down (20 % compression) with its in-plane
//! motion held; the sides are free. Neo-Hookean μ = 0.5 MPa with
//! U(J) = κ/2 (J − 1)², κ = 500 MPa; hex8 Q1/P0 (or `--element`); 10 equal
//! increments.
//!
//! Run from the workspace root:
//! `cargo run --release --bin block-compression -- --divisions NX,NY,NZ [--ordering best|amd|nd] [--force-tolerance TOL] [--threads auto|N] [--reuse on|off] [--krylov-iterations N]`
//! (`--force-tolerance`: the relative out-of-balance force at convergence,
//! default the job files' 1e-6; the Python reference's 1e-8 for a side-by-side run)
//! It prints the size, Newton iterations per increment, the time split
//! (assembly, symbolic and numeric factorization, solves), the peak memory,
//! and as its last line `plate_force_N=<value>`: the compressive force on the
//! moving plate at full compression, in newtons.

use std::time::Instant;

use olli_benchmarks::{linear_flag, parse_counts, parse_ordering, run_and_report, usage, LINEAR_FLAGS};
use olli_mesh::{ElementKind, Mesh};
use olli_solver::linear::{LinearSettings, Ordering};
use olli_solver::{Analysis, Formulation, IncrementControls, Model, Motion, Stage, Support};
use olli_verification::{block, generated_block, neo_hookean};

const USAGE: &str =
    "usage: block-compression --divisions NX,NY,NZ [--element hex8|hex20|hex27|tet10] [--pressure own|element] [--ordering best|amd|nd] [--no-extrapolation] [--force-tolerance TOL]";

/// The 40 × 40 × 10 block of `kind` elements and the names of its bottom and
/// top node sets. Hex8 keeps the verification crate's block (as before the
/// flag existed, so its timings compare); the others come from the mesh
/// crate's generator.
fn block_mesh(kind: ElementKind, divisions: [usize; 3]) -> (Mesh, &'static str, &'static str) {
    const SIZE: [f64; 3] = [40.0, 40.0, 10.0];
    if kind == ElementKind::Hex8 {
        return (block(SIZE, divisions, 0.0), "z0", "z1");
    }
    (generated_block(kind, divisions, |x| std::array::from_fn(|c| SIZE[c] * x[c])), "bottom", "top")
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let mut divisions = [20, 20, 5];
    let mut ordering = Ordering::LeastFill;
    let mut linear = LinearSettings::default();
    let mut extrapolate = true;
    let mut force_tolerance = IncrementControls::default().force_tolerance;
    let mut element = ElementKind::Hex8;
    let mut formulation = Formulation::Mixed;
    let mut i = 1;
    while i < args.len() {
        match (args[i].as_str(), args.get(i + 1)) {
            ("--divisions", Some(v)) => {
                divisions =
                    parse_counts(v).unwrap_or_else(|| usage(&format!("--divisions expects NX,NY,NZ (positive integers), got `{v}`")));
                i += 2;
            }
            ("--element", Some(v)) => {
                element = match v.as_str() {
                    "hex8" => ElementKind::Hex8,
                    "hex20" => ElementKind::Hex20,
                    "hex27" => ElementKind::Hex27,
                    "tet10" => ElementKind::Tet10,
                    other => usage(&format!("--element must be hex8, hex20, hex27 or tet10, got `{other}`")),
                };
                i += 2;
            }
            ("--pressure", Some(v)) => {
                formulation = match v.as_str() {
                    "own" => Formulation::Mixed,
                    "element" => Formulation::ElementPressure,
                    other => usage(&format!("--pressure must be own or element, got `{other}`")),
                };
                i += 2;
            }
            ("--ordering", Some(v)) => {
                ordering = parse_ordering(v).unwrap_or_else(|| usage("--ordering must be amd, nd or best"));
                i += 2;
            }
            ("--force-tolerance", Some(v)) => {
                force_tolerance = v
                    .parse()
                    .ok()
                    .filter(|t: &f64| *t > 0.0 && t.is_finite())
                    .unwrap_or_else(|| usage(&format!("--force-tolerance expects a positive number, got `{v}`")));
                i += 2;
            }
            ("--no-extrapolation", _) => {
                extrapolate = false;
                i += 1;
            }
            (flag, value) if linear_flag(flag, value, &mut linear) => i += 2,
            (other, _) => usage(&format!("unknown argument `{other}`; {USAGE} {LINEAR_FLAGS}")),
        }
    }
    let t_mesh = Instant::now();
    let (mesh, bottom, top) = block_mesh(element, divisions);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(0.5, 500.0), formulation);
    model.output.point_fields = false;
    model.output.nodal_fields = false;
    model.stages.push(Stage {
        name: "compress".into(),
        controls: IncrementControls { first: 0.1, max: 0.1, extrapolate, force_tolerance, ..Default::default() },
        supports: vec![Support { set: bottom.into(), components: [true, true, true] }],
        motions: vec![Motion { set: top.into(), displacement: [Some(0.0), Some(0.0), Some(-2.0)] }],
        ..Default::default()
    });
    model.linear = LinearSettings { ordering, ..linear };
    let setup = t_mesh.elapsed().as_secs_f64();
    println!(
        "divisions={}x{}x{} element={element} formulation={formulation:?} elements={} nodes={}",
        divisions[0],
        divisions[1],
        divisions[2],
        model.mesh.element_count(),
        model.mesh.node_count()
    );
    let sol = run_and_report(&model, setup);
    let force = sol.last().map(|r| -r.reactions[top][2]).unwrap_or(f64::NAN);
    println!("plate_force_N={force:.6}");
}
