//! Fill-reducing orderings change how the sparse factor is stored, never the
//! answer: a permuted Cholesky factorization P A Pᵀ = L Lᵀ solves the same
//! system (Golub & Van Loan 2013, Matrix Computations, 4th ed., §11.1), so
//! Newton's iterates agree to rounding whatever the ordering. Case: a
//! distorted bonded hex8 block (mixed), 10 % compression in two increments,
//! solved with the approximate minimum degree ordering, with nested
//! dissection (George 1973) and with the default choice of the smaller
//! factor.

use olli_solver::linear::Ordering;
use olli_solver::*;
use olli_verification::*;

fn compress(ordering: Ordering) -> Solution {
    let mesh = block([4.0, 4.0, 1.0], [12, 12, 3], 0.2);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(0.5, 500.0), Formulation::Mixed);
    model.output.point_fields = false;
    model.output.nodal_fields = false;
    model.linear.ordering = ordering;
    model.stages.push(Stage {
        name: "compress".into(),
        controls: IncrementControls { first: 0.5, max: 0.5, ..Default::default() },
        supports: vec![Support { set: "z0".into(), components: [true, true, true] }],
        motions: vec![Motion { set: "z1".into(), displacement: [Some(0.0), Some(0.0), Some(-0.1)] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    sol
}

#[test]
fn orderings_give_the_same_solution_and_the_default_keeps_the_smaller_factor() {
    let amd = compress(Ordering::Amd);
    let nd = compress(Ordering::NestedDissection);
    let best = compress(Ordering::default());
    assert_eq!(amd.stats.linear.ordering, "amd");
    assert_eq!(nd.stats.linear.ordering, "nested-dissection");

    // Same answer: displacements to 1e-9 of the largest one (the Newton
    // tolerance leaves the iterates at the same point; only rounding in the
    // factor differs), and the same plate force.
    let umax = |s: &Solution| s.last().unwrap().displacement.iter().flatten().fold(0.0f64, |m, v| m.max(v.abs()));
    let scale = umax(&amd);
    assert!(scale > 0.09, "the plate moved 0.1: {scale}");
    for other in [&nd, &best] {
        let diff = amd
            .last()
            .unwrap()
            .displacement
            .iter()
            .flatten()
            .zip(other.last().unwrap().displacement.iter().flatten())
            .fold(0.0f64, |m, (a, b)| m.max((a - b).abs()));
        assert!(diff <= 1e-9 * scale, "displacements differ by {diff:e}");
        let force = |s: &Solution| s.last().unwrap().reactions["z1"][2];
        assert!(rel(force(&amd), force(other)) < 1e-9, "{} vs {}", force(&amd), force(other));
    }

    // The default compared both and kept the smaller factor; its counts are
    // those of the forced orderings' factors.
    let l = &best.stats.linear;
    let (fill_amd, fill_nd) = (l.fill_amd.expect("AMD measured"), l.fill_nested_dissection.expect("nested dissection measured"));
    assert_eq!(fill_amd, amd.stats.linear.nnz_factor);
    assert_eq!(fill_nd, nd.stats.linear.nnz_factor);
    assert_eq!(l.nnz_factor, fill_amd.min(fill_nd));
    assert_eq!(l.ordering, if fill_nd < fill_amd { "nested-dissection" } else { "amd" });
    eprintln!("factor entries: AMD {fill_amd}, nested dissection {fill_nd}; kept {}", l.ordering);
}
