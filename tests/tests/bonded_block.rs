//! The bonded block of the block-compression benchmark (benchmarks/): a
//! 40 × 40 × 10 mm block bonded to two rigid plates, the top plate moved
//! 2 mm down (20 % compression) with its in-plane motion held, sides free;
//! neo-Hookean μ = 0.5 MPa, U = κ/2 (J − 1)², κ = 500 MPa. Here a quarter
//! (symmetry planes x = 0 and y = 0) meshed with tet10, six tetrahedra per
//! cell, as a general-purpose mesher's quadratic tetrahedra would fill it.
//!
//! No closed form gives this force: the free edges of the bonded faces are
//! stress singularities, so every element family converges slowly (the
//! hex8 sequence below shows an observed order of 1.4 in h). The reference
//! is a mesh-convergence study of this program with the hexahedral
//! families (a regression of our own numbers, not a published value),
//! plate force of the whole block, divisions of the whole block:
//!
//! | element | coarse | medium | fine | extrapolated |
//! | --- | --- | --- | --- | --- |
//! | hex8 (Q1/P0) | 16×16×4: 2447.07 N | 32×32×8: 2349.16 N | 64×64×16: 2311.99 N | 2289 N (Richardson, order 1.40) |
//! | hex27 (Q2/P1) | 8×8×2: 2302.86 N | 16×16×4: 2266.75 N | 24×24×6: 2250.62 N | |
//! | tet10 (P2/P1, Taylor–Hood) | 8×8×2: 2433.97 N | 16×16×4: 2316.67 N | 24×24×6: 2286.21 N | 2247 N (Richardson, order 1.43) |
//! | tet10 (P2/P0, `element-pressure`) | 8×8×2: 2210.40 N | 16×16×4: 2236.97 N | 24×24×6: 2238.97 N | |
//!
//! The families do not agree to better than about 2 % on these meshes.
//! hex8 (Q1/P0) and the Taylor–Hood tet10 converge from above with the
//! same observed order (1.4, set by the singular edges); hex27, the
//! textbook-stable pair, is still coming down (no clean order yet). The
//! element-condensed P2/P0 tet10, whose inf-sup constant decays
//! (`inf_sup.rs`), levels off 2.2 % below the hex8 extrapolate. The issue
//! asks the tet10 block for the hex8 plate force within 2 % (common
//! practice for a mesh-independence check, not a published bound): the
//! Taylor–Hood tet10 meets it on the 16×16×4 mesh of the test (+1.2 %) and
//! on 24×24×6 (−0.1 %).

use olli_mesh::ElementKind;
use olli_solver::*;
use olli_verification::*;

/// The hex8 Richardson extrapolate of the table above (N, whole block).
const HEX8_EXTRAPOLATED: f64 = 2289.0;
/// hex27 on 24 × 24 × 6 cells of the whole block, its finest run (N).
const HEX27_FINEST: f64 = 2250.62;

/// Plate force (N, whole block) of the quarter block meshed with `kind` on
/// `n` cells (x, y, z) of the quarter.
fn plate_force(kind: ElementKind, n: [usize; 3]) -> f64 {
    let mesh = generated_block(kind, n, |x| [20.0 * x[0], 20.0 * x[1], 10.0 * x[2]]);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(0.5, 500.0), Formulation::Mixed);
    model.output.point_fields = false;
    model.output.nodal_fields = false;
    model.stages.push(Stage {
        name: "compress".into(),
        controls: IncrementControls { first: 0.1, max: 0.1, ..Default::default() },
        supports: vec![
            support("bottom", [true, true, true]),
            support("left", [true, false, false]),
            support("front", [false, true, false]),
        ],
        motions: vec![Motion { set: "top".into(), displacement: [Some(0.0), Some(0.0), Some(-2.0)] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{kind}: {:?}", sol.termination);
    -4.0 * sol.last().unwrap().reactions["top"][2]
}

/// Taylor–Hood tet10 on 8 × 8 × 4 cells of the quarter (16 × 16 × 4 of the
/// whole block, 5 831 displacement equations and 405 pressures): within 2 %
/// of the hex8 extrapolate (measured +1.21 %; the P2/P0 tet10 gave −2.3 %),
/// and above the finest hex27, as the hex8 meshes are (measured +2.9 %).
#[test]
fn bonded_block_tet10_plate_force_against_the_hexahedral_references() {
    let force = plate_force(ElementKind::Tet10, [8, 8, 4]);
    let percent = |reference: f64| 100.0 * (force / reference - 1.0);
    eprintln!(
        "tet10 bonded block: {force:.2} N; hex27 finest {HEX27_FINEST} N ({:+.2} %), hex8 extrapolated {HEX8_EXTRAPOLATED} N ({:+.2} %)",
        percent(HEX27_FINEST),
        percent(HEX8_EXTRAPOLATED)
    );
    assert!(rel(force, HEX8_EXTRAPOLATED) < 0.02, "{force} vs hex8 {HEX8_EXTRAPOLATED}");
    assert!(force > HEX27_FINEST && rel(force, HEX27_FINEST) < 0.04, "{force} vs hex27 {HEX27_FINEST}");
}
