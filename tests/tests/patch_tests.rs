//! Patch tests on distorted meshes for every element variant (hex8 3-D,
//! quad4 plane strain, quad4 axisymmetric; mixed Q1/P0 and displacement).
//!
//! A homogeneous deformation `x = F X` lies in the span of every element's
//! shape functions, so with all boundary nodes moved as `u = (F − I) X` the
//! interior nodes must follow it exactly and every integration point must
//! carry the homogeneous stress (the patch test of Irons, 1965, here at
//! large strain). For isochoric F the mixed elements' pressure vanishes and
//! the stress differences are those of the incompressible neo-Hookean solid
//! (Rivlin 1948; the closed forms of REFERENCES.md §7, derived):
//! uniaxial σ11 − σ22 = μ(λ² − 1/λ), equibiaxial σ11 − σ33 = μ(λ² − λ⁻⁴),
//! planar σ11 − σ22 = μ(λ² − λ⁻²), simple shear σ12 = μγ, σ11 − σ22 = μγ².
//!
//! Tolerances: the discrete solution is exact up to the Newton tolerance
//! (1e-6 relative force, then one more quadratic step) and rounding, so
//! displacements are checked to 1e-9 of the imposed magnitude and stresses to
//! 1e-8 relative — far below any discretisation error a broken element would show.

use nalgebra::Matrix3;
use olli_solver::*;
use olli_verification::*;

const MU: f64 = 0.5;
const KAPPA: f64 = 500.0;

/// Solves the Dirichlet patch for deformation gradient `f` and returns the
/// worst interior-node displacement error and the Cauchy stresses of all points.
fn dirichlet_patch(
    mut mesh: olli_mesh::Mesh,
    boundary: &[&str],
    analysis: Analysis,
    formulation: Formulation,
    f: Matrix3<f64>,
) -> (f64, Vec<Matrix3<f64>>) {
    let bnd = union_of_sets(&mesh, boundary);
    let dim = mesh.dimension;
    let map = move |x: [f64; 3]| {
        let xv = nalgebra::Vector3::from(x);
        let u = (f - Matrix3::identity()) * xv;
        [u[0], u[1], u[2]]
    };
    let motions = pin_nodes(&mut mesh, &bnd, map);
    let mut model = Model::single_region(mesh, analysis, neo_hookean(MU, KAPPA), formulation);
    model.stages.push(Stage {
        name: "patch".into(),
        motions,
        controls: IncrementControls { first: 0.25, ..Default::default() },
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    let last = sol.last().unwrap();
    let mut err: f64 = 0.0;
    for (n, x) in model.mesh.nodes.iter().enumerate() {
        let exact = map(*x);
        for i in 0..dim {
            err = err.max((last.displacement[n][i] - exact[i]).abs());
        }
    }
    let stresses = last.points.as_ref().unwrap().states.iter().map(|s| s.cauchy).collect();
    (err, stresses)
}

fn check_all(stresses: &[Matrix3<f64>], expect: impl Fn(&Matrix3<f64>) -> (f64, f64), what: &str) {
    for s in stresses {
        let (got, want) = expect(s);
        assert!((got - want).abs() <= 1e-8 * want.abs().max(MU), "{what}: {got} vs {want}");
    }
}

fn uniaxial(l: f64) -> Matrix3<f64> {
    Matrix3::from_diagonal(&nalgebra::Vector3::new(l, l.powf(-0.5), l.powf(-0.5)))
}

fn shear(g: f64) -> Matrix3<f64> {
    let mut f = Matrix3::identity();
    f[(0, 1)] = g;
    f
}

const HEX_BOUNDARY: [&str; 6] = ["x0", "x1", "y0", "y1", "z0", "z1"];
const QUAD_BOUNDARY: [&str; 4] = ["s0", "s1", "t0", "t1"];

#[test]
fn patch_test_hex8_large_homogeneous_deformations() {
    for form in [Formulation::Mixed, Formulation::Displacement] {
        let mesh = || block([1.0, 1.2, 0.8], [3, 3, 3], 0.35);
        let (e, s) = dirichlet_patch(mesh(), &HEX_BOUNDARY, Analysis::Solid3d, form, uniaxial(1.8));
        assert!(e < 1e-9, "{form:?} uniaxial displacement error {e}");
        check_all(&s, |s| (s[(0, 0)] - s[(1, 1)], MU * (1.8f64.powi(2) - 1.0 / 1.8)), "uniaxial");
        let l: f64 = 1.4;
        let eqb = Matrix3::from_diagonal(&nalgebra::Vector3::new(l, l, 1.0 / (l * l)));
        let (e, s) = dirichlet_patch(mesh(), &HEX_BOUNDARY, Analysis::Solid3d, form, eqb);
        assert!(e < 1e-9, "{form:?} equibiaxial displacement error {e}");
        check_all(&s, |s| (s[(0, 0)] - s[(2, 2)], MU * (l.powi(2) - l.powi(-4))), "equibiaxial");
        let (e, s) = dirichlet_patch(mesh(), &HEX_BOUNDARY, Analysis::Solid3d, form, shear(1.0));
        assert!(e < 1e-9, "{form:?} shear displacement error {e}");
        check_all(&s, |s| (s[(0, 1)], MU), "simple shear σ12");
        check_all(&s, |s| (s[(0, 0)] - s[(1, 1)], MU), "simple shear normal difference");
    }
}

#[test]
fn patch_test_hex8_constant_small_strain_with_volume_change() {
    // A general small strain with dilatation: stresses must equal the
    // material's own response at that F (checked against the constitutive
    // module directly) at every point of the distorted patch.
    let f = Matrix3::new(1.001, 0.0004, -0.0002, 0.0003, 0.9993, 0.0005, 0.0001, -0.0004, 1.0006);
    let mat = neo_hookean(MU, KAPPA);
    let c = f.transpose() * f;
    let s_ref = f * mat.response(&c).unwrap().stress * f.transpose() / f.determinant();
    for form in [Formulation::Mixed, Formulation::Displacement] {
        let (e, s) = dirichlet_patch(block([1.0, 1.0, 1.0], [3, 3, 3], 0.35), &HEX_BOUNDARY, Analysis::Solid3d, form, f);
        assert!(e < 1e-12, "{form:?} displacement error {e}");
        for st in &s {
            assert!((st - s_ref).norm() <= 1e-8 * s_ref.norm(), "{form:?}: {st} vs {s_ref}");
        }
    }
}

#[test]
fn patch_test_quad4_plane_strain_large_homogeneous_deformations() {
    for form in [Formulation::Mixed, Formulation::Displacement] {
        let mesh = || rectangle(0.0, 1.0, 0.0, 0.7, 4, 3, 0.35);
        let ps = Analysis::PlaneStrain { thickness: 2.0 };
        let l: f64 = 1.6;
        let planar = Matrix3::from_diagonal(&nalgebra::Vector3::new(l, 1.0 / l, 1.0));
        let (e, s) = dirichlet_patch(mesh(), &QUAD_BOUNDARY, ps, form, planar);
        assert!(e < 1e-9, "{form:?} planar displacement error {e}");
        check_all(&s, |s| (s[(0, 0)] - s[(1, 1)], MU * (l * l - 1.0 / (l * l))), "planar");
        let (e, s) = dirichlet_patch(mesh(), &QUAD_BOUNDARY, ps, form, shear(0.8));
        assert!(e < 1e-9, "{form:?} shear displacement error {e}");
        check_all(&s, |s| (s[(0, 1)], MU * 0.8), "simple shear σ12");
        check_all(&s, |s| (s[(0, 0)] - s[(1, 1)], MU * 0.64), "simple shear normal difference");
    }
}

#[test]
fn patch_test_quad4_axisymmetric_large_homogeneous_deformations() {
    for form in [Formulation::Mixed, Formulation::Displacement] {
        // Section away from the axis: r ∈ [0.5, 1.5].
        let mesh = || rectangle(0.5, 1.5, 0.0, 0.8, 4, 3, 0.35);
        // Equibiaxial in r and θ: F = diag(λ, λ⁻², λ) in (r, z, θ).
        let l: f64 = 1.3;
        let f = Matrix3::from_diagonal(&nalgebra::Vector3::new(l, 1.0 / (l * l), l));
        let (e, s) = dirichlet_patch(mesh(), &QUAD_BOUNDARY, Analysis::Axisymmetric, form, f);
        assert!(e < 1e-9, "{form:?} equibiaxial displacement error {e}");
        check_all(&s, |s| (s[(0, 0)] - s[(1, 1)], MU * (l.powi(2) - l.powi(-4))), "equibiaxial rr − zz");
        check_all(&s, |s| (s[(2, 2)] - s[(1, 1)], MU * (l.powi(2) - l.powi(-4))), "equibiaxial θθ − zz");
        // Uniaxial along the axis: F = diag(λ^-½, λ, λ^-½). (A constant axial
        // shear is not an axisymmetric equilibrium state — σrz/r is unbalanced —
        // so it is no patch test here.)
        let l: f64 = 1.7;
        let f = Matrix3::from_diagonal(&nalgebra::Vector3::new(l.powf(-0.5), l, l.powf(-0.5)));
        let (e, s) = dirichlet_patch(mesh(), &QUAD_BOUNDARY, Analysis::Axisymmetric, form, f);
        assert!(e < 1e-9, "{form:?} uniaxial displacement error {e}");
        check_all(&s, |s| (s[(1, 1)] - s[(0, 0)], MU * (l * l - 1.0 / l)), "uniaxial zz − rr");
        check_all(&s, |s| (s[(0, 1)], 0.0), "uniaxial rz");
    }
}

#[test]
fn patch_test_hex8_uniaxial_tension_with_free_sides() {
    // Natural boundary conditions: symmetry planes x0, y0, z0, the z1 face
    // moved to λ = 1.5, sides traction-free. The state is homogeneous; the
    // force on z1 must match the incompressible closed form
    // P = μ(λ − λ⁻²) (REFERENCES.md §7) to O(μ/κ) = 1e-3 (near-incompressible
    // κ/μ = 1000 lets the volume change by about that much).
    for form in [Formulation::Mixed, Formulation::Displacement] {
        let mesh = block([1.0, 1.0, 2.0], [2, 2, 4], 0.3);
        let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(MU, KAPPA), form);
        model.stages.push(Stage {
            name: "pull".into(),
            supports: vec![
                Support { set: "x0".into(), components: [true, false, false] },
                Support { set: "y0".into(), components: [false, true, false] },
                Support { set: "z0".into(), components: [false, false, true] },
            ],
            motions: vec![Motion { set: "z1".into(), displacement: [None, None, Some(1.0)] }],
            ..Default::default()
        });
        let sol = solve(&model, &mut Quiet).unwrap();
        assert!(sol.completed());
        let fz = sol.last().unwrap().reactions["z1"][2];
        let l = 1.5f64;
        let want = MU * (l - l.powi(-2)) * 1.0; // nominal stress × reference area 1×1
        assert!(rel(fz, want) < 2e-3, "{form:?}: force {fz} vs {want}");
    }
}

// ---- Quadratic elements and triangles/tetrahedra --------------------------
//
// The same patch tests on generated meshes that a smooth map has distorted:
// every node (mid-side nodes included) is moved, so the elements are curved.
// An isoparametric element still interpolates x = F X exactly
// (Σ N_a X_a = X for any node positions), so the patch test applies
// unchanged (Irons 1965; Zienkiewicz & Taylor, The Finite Element Method,
// vol. 1, the patch test chapter).

use olli_mesh::ElementKind;

const SECTION_BOUNDARY: [&str; 4] = ["bottom", "right", "top", "left"];
const BLOCK_BOUNDARY: [&str; 6] = ["left", "right", "front", "back", "bottom", "top"];

/// A smooth map of the unit square onto a curved, non-affine patch.
fn wavy(s: f64, t: f64, origin: f64) -> [f64; 2] {
    let pi = std::f64::consts::PI;
    [origin + s + 0.06 * (pi * s).sin() * (2.0 * pi * t).sin() + 0.1 * t * s, 0.8 * t + 0.05 * (2.0 * pi * s).sin() * (pi * t).sin()]
}

fn quadratic_section_patches(kind: ElementKind) {
    let ps = Analysis::PlaneStrain { thickness: 2.0 };
    for form in [Formulation::Mixed, Formulation::Displacement] {
        let mesh = || generated_section(kind, 3, 2, |s, t| wavy(s, t, 0.0));
        let l: f64 = 1.6;
        let planar = Matrix3::from_diagonal(&nalgebra::Vector3::new(l, 1.0 / l, 1.0));
        let (e, s) = dirichlet_patch(mesh(), &SECTION_BOUNDARY, ps, form, planar);
        assert!(e < 1e-9, "{kind} {form:?} planar displacement error {e}");
        check_all(&s, |s| (s[(0, 0)] - s[(1, 1)], MU * (l * l - 1.0 / (l * l))), "planar");
        let (e, s) = dirichlet_patch(mesh(), &SECTION_BOUNDARY, ps, form, shear(0.8));
        assert!(e < 1e-9, "{kind} {form:?} shear displacement error {e}");
        check_all(&s, |s| (s[(0, 1)], MU * 0.8), "simple shear σ12");
        // Axisymmetric, section r ∈ [0.5, 1.6]: equibiaxial in r and θ.
        let l: f64 = 1.3;
        let f = Matrix3::from_diagonal(&nalgebra::Vector3::new(l, 1.0 / (l * l), l));
        let axi = generated_section(kind, 3, 2, |s, t| wavy(s, t, 0.5));
        let (e, s) = dirichlet_patch(axi, &SECTION_BOUNDARY, Analysis::Axisymmetric, form, f);
        assert!(e < 1e-9, "{kind} {form:?} axisymmetric displacement error {e}");
        check_all(&s, |s| (s[(0, 0)] - s[(1, 1)], MU * (l.powi(2) - l.powi(-4))), "equibiaxial rr − zz");
        check_all(&s, |s| (s[(2, 2)] - s[(1, 1)], MU * (l.powi(2) - l.powi(-4))), "equibiaxial θθ − zz");
    }
}

fn quadratic_block_patches(kind: ElementKind) {
    let pi = std::f64::consts::PI;
    let place = |x: [f64; 3]| {
        let bump = 0.05 * (pi * x[0]).sin() * (pi * x[1]).sin() * (pi * x[2]).sin();
        [x[0] + bump + 0.1 * x[2], 1.2 * x[1] - bump, 0.8 * x[2] + 0.5 * bump]
    };
    for form in [Formulation::Mixed, Formulation::Displacement] {
        let mesh = || generated_block(kind, [2, 2, 2], place);
        let (e, s) = dirichlet_patch(mesh(), &BLOCK_BOUNDARY, Analysis::Solid3d, form, uniaxial(1.8));
        assert!(e < 1e-9, "{kind} {form:?} uniaxial displacement error {e}");
        check_all(&s, |s| (s[(0, 0)] - s[(1, 1)], MU * (1.8f64.powi(2) - 1.0 / 1.8)), "uniaxial");
        let (e, s) = dirichlet_patch(mesh(), &BLOCK_BOUNDARY, Analysis::Solid3d, form, shear(1.0));
        assert!(e < 1e-9, "{kind} {form:?} shear displacement error {e}");
        check_all(&s, |s| (s[(0, 1)], MU), "simple shear σ12");
        check_all(&s, |s| (s[(0, 0)] - s[(1, 1)], MU), "simple shear normal difference");
    }
}

#[test]
fn patch_test_tri6_plane_strain_and_axisymmetric_on_curved_meshes() {
    quadratic_section_patches(ElementKind::Tri6);
}

#[test]
fn patch_test_quad8_plane_strain_and_axisymmetric_on_curved_meshes() {
    quadratic_section_patches(ElementKind::Quad8);
}

#[test]
fn patch_test_quad9_plane_strain_and_axisymmetric_on_curved_meshes() {
    quadratic_section_patches(ElementKind::Quad9);
}

#[test]
fn patch_test_tet10_large_homogeneous_deformations_on_curved_meshes() {
    quadratic_block_patches(ElementKind::Tet10);
}

#[test]
fn patch_test_hex20_large_homogeneous_deformations_on_curved_meshes() {
    quadratic_block_patches(ElementKind::Hex20);
}

#[test]
fn patch_test_hex27_large_homogeneous_deformations_on_curved_meshes() {
    quadratic_block_patches(ElementKind::Hex27);
}
