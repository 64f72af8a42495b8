//! Bonded block compression benchmark.
//!
//! A 40 × 40 × 10 mm block bonded to two rigid plates: the bottom plate is
//! fixed, the top plate moves 2 mm down (20 % compression) with its in-plane
//! motion held; the sides are free. Neo-Hookean μ = 0.5 MPa with
//! U(J) = κ/2 (J − 1)², κ = 500 MPa; 10 equal increments. Elements: hex8
//! Q1/P0 (default), or with `--element` hex20, hex27 or tet10 (six per cell)
//! with their mixed pressure (see DEVELOPERS.md), on the same divisions.
//!
//! Run from the workspace root:
//! `cargo run --release --bin block-compression -- --divisions NX,NY,NZ [--element hex8|hex20|hex27|tet10] [--ordering best|amd|nd]`
//! It prints the size, Newton iterations per increment, the time split
//! (assembly, symbolic and numeric factorization, solves), the peak memory,
//! and as its last line `plate_force_N=<value>`: the compressive force on the
//! moving plate at full compression, in newtons.

use std::time::Instant;

use olli_mesh::{ElementKind, Mesh};
use olli_solver::driver::Event;
use olli_solver::linear::Ordering;
use olli_solver::{solve, Analysis, Formulation, IncrementControls, Model, Motion, Stage, Support};
use olli_verification::{block, generated_block, neo_hookean};

const USAGE: &str =
    "usage: block-compression --divisions NX,NY,NZ [--element hex8|hex20|hex27|tet10] [--ordering best|amd|nd] [--no-extrapolation]";

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

fn parse_divisions(s: &str) -> Option<[usize; 3]> {
    let v: Vec<usize> = s.split(',').map(|t| t.trim().parse().ok()).collect::<Option<_>>()?;
    match v.as_slice() {
        [x, y, z] if *x > 0 && *y > 0 && *z > 0 => Some([*x, *y, *z]),
        _ => None,
    }
}

/// Peak resident memory of this process (Linux `VmHWM`), in MB.
fn peak_memory_mb() -> Option<f64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1024.0)
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let mut divisions = [20, 20, 5];
    let mut ordering = "best".to_string();
    let mut extrapolate = true;
    let mut element = ElementKind::Hex8;
    let mut i = 1;
    while i < args.len() {
        match args[i].as_str() {
            "--divisions" if i + 1 < args.len() => {
                divisions = parse_divisions(&args[i + 1]).unwrap_or_else(|| {
                    eprintln!("--divisions expects NX,NY,NZ (positive integers), got `{}`", args[i + 1]);
                    std::process::exit(2)
                });
                i += 2;
            }
            "--element" if i + 1 < args.len() => {
                element = match args[i + 1].as_str() {
                    "hex8" => ElementKind::Hex8,
                    "hex20" => ElementKind::Hex20,
                    "hex27" => ElementKind::Hex27,
                    "tet10" => ElementKind::Tet10,
                    other => {
                        eprintln!("--element must be hex8, hex20, hex27 or tet10, got `{other}`");
                        std::process::exit(2)
                    }
                };
                i += 2;
            }
            "--ordering" if i + 1 < args.len() => {
                ordering = args[i + 1].clone();
                i += 2;
            }
            "--no-extrapolation" => {
                extrapolate = false;
                i += 1;
            }
            other => {
                eprintln!("unknown argument `{other}`; {USAGE}");
                std::process::exit(2);
            }
        }
    }
    let t_mesh = Instant::now();
    let (mesh, bottom, top) = block_mesh(element, divisions);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(0.5, 500.0), Formulation::Mixed);
    model.output.point_fields = false;
    model.output.nodal_fields = false;
    model.stages.push(Stage {
        name: "compress".into(),
        controls: IncrementControls { first: 0.1, max: 0.1, extrapolate, ..Default::default() },
        supports: vec![Support { set: bottom.into(), components: [true, true, true] }],
        motions: vec![Motion { set: top.into(), displacement: [Some(0.0), Some(0.0), Some(-2.0)] }],
        ..Default::default()
    });
    model.linear.ordering = match ordering.as_str() {
        "amd" => Ordering::Amd,
        "nd" => Ordering::NestedDissection,
        "best" => Ordering::LeastFill,
        _ => {
            eprintln!("--ordering must be amd, nd or best");
            std::process::exit(2);
        }
    };
    let setup = t_mesh.elapsed().as_secs_f64();
    println!(
        "divisions={}x{}x{} element={element} elements={} nodes={} ordering={ordering}",
        divisions[0],
        divisions[1],
        divisions[2],
        model.mesh.element_count(),
        model.mesh.node_count()
    );
    let t = Instant::now();
    let mut per_increment = Vec::new();
    let mut observer = |e: &Event| match e {
        Event::StageStart { equations, .. } => println!("dofs={equations}"),
        Event::Converged(r) => {
            per_increment.push(r.newton_iterations);
            println!(
                "increment {:2} load_factor={:.3} newton_iterations={} residuals={:?}",
                r.increment,
                r.load_factor,
                r.newton_iterations,
                r.residual_history.iter().map(|v| format!("{v:.1e}")).collect::<Vec<_>>()
            );
        }
        Event::Cutback { load_factor, step, reason, .. } => println!("cutback at {load_factor:.3} to step {step:.4}: {reason}"),
        Event::LinearFallback { iteration, factor, .. } => {
            println!("  iteration {iteration}: tangent not positive definite, used {factor:?}")
        }
        _ => {}
    };
    let sol = match solve(&model, &mut observer) {
        Ok(s) => s,
        Err(e) => {
            eprintln!("solve failed: {e}");
            std::process::exit(1);
        }
    };
    let total = t.elapsed().as_secs_f64();
    let s = &sol.stats;
    let l = &s.linear;
    let iters = s.newton_iterations.max(1) as f64;
    let bare = l.numeric_time / l.numeric_count.max(1) as f64;
    println!("termination={:?}", sol.termination);
    println!(
        "increments={} newton_iterations={} mean_per_increment={:.2} cutbacks={}",
        s.increments,
        s.newton_iterations,
        s.newton_iterations as f64 / s.increments.max(1) as f64,
        s.cutbacks
    );
    println!("nnz_matrix_lower={} nnz_factor={} factor_flops={:.3e}", l.nnz_matrix, l.nnz_factor, l.factor_flops);
    println!("time_setup_s={setup:.3} time_pattern_s={:.3} time_total_s={total:.3}", s.pattern_time);
    println!(
        "time_assembly_s={:.3} assemblies={} time_symbolic_s={:.3} time_numeric_s={:.3} numeric_factorizations={} time_solve_s={:.3}",
        s.assembly_time, s.assemblies, l.symbolic_time, l.numeric_time, l.numeric_count, l.solve_time
    );
    println!("ldlt_fallbacks={} lu_fallbacks={}", l.ldlt_fallbacks, l.lu_fallbacks);
    println!(
        "ordering_used={} factor_entries_amd={} factor_entries_nd={}",
        l.ordering,
        l.fill_amd.map(|v| v.to_string()).unwrap_or("-".into()),
        l.fill_nested_dissection.map(|v| v.to_string()).unwrap_or("-".into())
    );
    println!("time_per_newton_iteration_s={:.3} bare_numeric_factorization_s={bare:.3} ratio={:.3}", total / iters, total / iters / bare);
    if let Some(mb) = peak_memory_mb() {
        println!("peak_memory_MB={mb:.1}");
    }
    let force = sol.last().map(|r| -r.reactions[top][2]).unwrap_or(f64::NAN);
    println!("plate_force_N={force:.6}");
}
