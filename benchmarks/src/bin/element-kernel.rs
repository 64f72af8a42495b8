//! Element kernel benchmark: one distorted hex8 Q1/P0 element of a given
//! material evaluated many times on one thread, with its tangent and for its
//! residual alone, through the assembler's entry point (the spatial form
//! from the reference geometry computed once, as the discretization keeps it). Meant to be run under an instruction counter
//! (`valgrind --tool=callgrind`), which a shared machine does not disturb;
//! it also prints the wall time per call.
//!
//! `cargo run --release --bin element-kernel -- [--material neo-hookean|eight-chain|...] [--calls N]`

use std::hint::black_box;
use std::time::Instant;

use olli_solver::assembly::{element_cached_into, ElementContext, ReferenceGeometry};
use olli_solver::element::solid::reference_geometry_into;
use olli_solver::element::{Analysis, Formulation, MixedState, Shape};
use olli_solver::material::{registry, VolumetricForm};

const USAGE: &str = "usage: element-kernel [--material NAME] [--calls N]";

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let (mut name, mut calls) = ("neo-hookean".to_string(), 20_000usize);
    let mut i = 1;
    while i < args.len() {
        match (args[i].as_str(), args.get(i + 1)) {
            ("--material", Some(v)) => name = v.clone(),
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
    let ctx = ElementContext { shape: Shape::Hex8, analysis: Analysis::Solid3d, formulation: Formulation::Mixed, material: &material };
    // A unit cube with its nodes moved off the corners, squeezed 10 % along z.
    let corners = [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0], [0, 0, 1], [1, 0, 1], [1, 1, 1], [0, 1, 1]];
    let x: Vec<[f64; 3]> = corners
        .iter()
        .enumerate()
        .map(|(a, c)| std::array::from_fn(|k| c[k] as f64 + 0.04 * (((a * 3 + k * 5) % 7) as f64 - 3.0) / 3.0))
        .collect();
    let u: Vec<[f64; 3]> = x.iter().map(|p| [0.03 * p[0], 0.03 * p[1], -0.1 * p[2]]).collect();
    let (mut grads, mut dv) = (vec![[0.0; 3]; 64], vec![0.0; 8]);
    reference_geometry_into(Shape::Hex8, &x, &mut grads, &mut dv).expect("a valid hex8");
    let geo = ReferenceGeometry { grads: &grads, dv: &dv };
    let (mut force, mut tangent) = (vec![0.0; 24], vec![0.0; 576]);
    let mut state = MixedState { pressure: -0.2, dilatation: 0.999, ..MixedState::default() };
    let clock = Instant::now();
    with_tangent(&ctx, geo, &u, &mut force, &mut tangent, &mut state, calls);
    println!("material={name} evaluation=tangent calls={calls} us_per_call={:.3}", clock.elapsed().as_secs_f64() / calls as f64 * 1e6);
    let clock = Instant::now();
    residual_only(&ctx, geo, &u, &mut force, &mut state, calls);
    println!("material={name} evaluation=residual calls={calls} us_per_call={:.3}", clock.elapsed().as_secs_f64() / calls as f64 * 1e6);
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
