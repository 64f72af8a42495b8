//! Element kernel benchmark: one distorted hex8 Q1/P0 element (or, with
//! `--element quad4-axisymmetric|quad4-plane-strain`, a quad4 Q1/P0 one) of
//! a given material evaluated many times on one thread, with its tangent and for its
//! residual alone, through the assembler's entry point (the spatial form
//! from the reference geometry computed once, as the discretization keeps it). Meant to be run under an instruction counter
//! (`valgrind --tool=callgrind`), which a shared machine does not disturb;
//! it also prints the wall time per call.
//!
//! `cargo run --release --bin element-kernel -- [--element hex8|quad4-axisymmetric|quad4-plane-strain] [--material neo-hookean|eight-chain|...] [--calls N]`

use std::hint::black_box;
use std::time::Instant;

use olli_solver::assembly::{element_cached_into, ElementContext, ReferenceGeometry};
use olli_solver::element::{reference_geometry_into, Analysis, Formulation, MixedState, Shape};
use olli_solver::material::{registry, VolumetricForm};

const USAGE: &str = "usage: element-kernel [--element hex8|quad4-axisymmetric|quad4-plane-strain] [--material NAME] [--calls N]";

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let (mut name, mut calls, mut element) = ("neo-hookean".to_string(), 20_000usize, "hex8".to_string());
    let mut i = 1;
    while i < args.len() {
        match (args[i].as_str(), args.get(i + 1)) {
            ("--material", Some(v)) => name = v.clone(),
            ("--element", Some(v)) => element = v.clone(),
            ("--calls", Some(v)) => calls = v.parse().unwrap_or_else(|_| olli_benchmarks::usage(USAGE)),
            _ => olli_benchmarks::usage(USAGE),
        }
        i += 2;
    }
    let Some((_, constants)) = registry::SAMPLES.iter().find(|(n, _)| *n == name) else {
        olli_benchmarks::usage(&format!("unknown material `{name}`; {USAGE}"))
    };
    let mut all = constants.to_vec();
    all.push(("bulk_modulus", 500.0));
    let material = registry::material(&name, &all, VolumetricForm::Quadratic).unwrap_or_else(|e| olli_benchmarks::usage(&e.to_string()));
    let (shape, analysis) = match element.as_str() {
        "hex8" => (Shape::Hex8, Analysis::Solid3d),
        "quad4-axisymmetric" => (Shape::Quad4, Analysis::Axisymmetric),
        "quad4-plane-strain" => (Shape::Quad4, Analysis::PlaneStrain { thickness: 1.0 }),
        _ => olli_benchmarks::usage(&format!("unknown element `{element}`; {USAGE}")),
    };
    let ctx = ElementContext { shape, analysis, formulation: Formulation::Mixed, material: &material };
    // A unit cube (a unit square at r = 2..3 in 2-D) with its nodes moved
    // off the corners, squeezed 10 % along z (y in 2-D).
    let corners = [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0], [0, 0, 1], [1, 0, 1], [1, 1, 1], [0, 1, 1]];
    let planar = shape.dimension() == 2;
    let x: Vec<[f64; 3]> = corners[..shape.nodes()]
        .iter()
        .enumerate()
        .map(|(a, c)| std::array::from_fn(|k| c[k] as f64 + 0.04 * (((a * 3 + k * 5) % 7) as f64 - 3.0) / 3.0))
        .map(|p: [f64; 3]| if planar { [p[0] + 2.0, p[1], 0.0] } else { p })
        .collect();
    let squeezed = if planar { 1 } else { 2 };
    let u: Vec<[f64; 3]> = x
        .iter()
        .map(|p| {
            std::array::from_fn(|k| {
                if k == squeezed {
                    -0.1 * p[k]
                } else if k < shape.dimension() {
                    0.03 * p[k]
                } else {
                    0.0
                }
            })
        })
        .collect();
    let (mut grads, mut dv) = (vec![[0.0; 3]; shape.nodes() * shape.points()], vec![0.0; shape.points()]);
    reference_geometry_into(shape, analysis, &x, &mut grads, &mut dv).expect("a valid element");
    let geo = ReferenceGeometry { grads: &grads, dv: &dv };
    let nd = shape.dofs();
    let (mut force, mut tangent) = (vec![0.0; nd], vec![0.0; nd * nd]);
    let mut state = MixedState { pressure: -0.2, dilatation: 0.999, ..MixedState::default() };
    let clock = Instant::now();
    with_tangent(&ctx, geo, &u, &mut force, &mut tangent, &mut state, calls);
    println!(
        "element={element} material={name} evaluation=tangent calls={calls} us_per_call={:.3}",
        clock.elapsed().as_secs_f64() / calls as f64 * 1e6
    );
    let clock = Instant::now();
    residual_only(&ctx, geo, &u, &mut force, &mut state, calls);
    println!(
        "element={element} material={name} evaluation=residual calls={calls} us_per_call={:.3}",
        clock.elapsed().as_secs_f64() / calls as f64 * 1e6
    );
    println!("check_force_0={:.6e} check_tangent_0={:.6e}", force[0], tangent[0]);
}

/// `calls` evaluations with the tangent (its own function, so an
/// instruction counter reports it apart).
#[inline(never)]
fn with_tangent(
    ctx: &ElementContext,
    geo: ReferenceGeometry,
    u: &[[f64; 3]],
    f: &mut [f64],
    k: &mut [f64],
    s: &mut MixedState,
    calls: usize,
) {
    for _ in 0..calls {
        let w = element_cached_into(ctx, black_box(geo), black_box(u), f, Some(&mut *k), Some(&mut *s), None);
        black_box(w.expect("the element evaluates"));
    }
}

/// `calls` evaluations of the residual alone.
#[inline(never)]
fn residual_only(ctx: &ElementContext, geo: ReferenceGeometry, u: &[[f64; 3]], f: &mut [f64], s: &mut MixedState, calls: usize) {
    for _ in 0..calls {
        let w = element_cached_into(ctx, black_box(geo), black_box(u), f, None, Some(&mut *s), None);
        black_box(w.expect("the element evaluates"));
    }
}
