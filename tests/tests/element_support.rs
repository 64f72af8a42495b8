//! Which elements the solver runs: linear triangles and tetrahedra are
//! refused with a message naming the quadratic element to use (they lock for
//! nearly incompressible rubber — common practice, e.g. Zienkiewicz &
//! Taylor, The Finite Element Method, vol. 1, the incompressibility
//! chapter), and a mesh mixing quadratic kinds runs.

use olli_mesh::ElementKind;
use olli_solver::*;
use olli_verification::*;

fn refusal(kind: ElementKind) -> String {
    let (mesh, analysis) = if kind.dimension() == 2 {
        (generated_section(kind, 2, 2, |s, t| [s, t]), Analysis::PlaneStrain { thickness: 1.0 })
    } else {
        (generated_block(kind, [1, 1, 1], |x| x), Analysis::Solid3d)
    };
    let mut model = Model::single_region(mesh, analysis, neo_hookean(0.5, 500.0), Formulation::Mixed);
    model.stages.push(Stage { name: "s".into(), ..Default::default() });
    solve(&model, &mut Quiet).expect_err("refused").to_string()
}

#[test]
fn tri3_and_tet4_are_refused_naming_tri6_and_tet10() {
    let m = refusal(ElementKind::Tri3);
    assert!(m.contains("tri3") && m.contains("use tri6"), "{m}");
    let m = refusal(ElementKind::Tet4);
    assert!(m.contains("tet4") && m.contains("use tet10"), "{m}");
}

/// A section of quad8 and tri6 elements side by side (shared mid-side
/// nodes), pulled uniformly: the homogeneous state is exact in both, so the
/// force is the closed form of the test in `patch_tests.rs` for the whole.
#[test]
fn mixed_quad8_and_tri6_mesh_runs_a_homogeneous_stretch() {
    let mut mesh = generated_section(ElementKind::Quad8, 2, 1, |s, t| [s, t]);
    // Replace the right cell by two tri6 sharing its nodes (corners 1, 2, 3 /
    // 0, 1, 3 of the quad; mid-side nodes of the quad's edges and a new
    // diagonal node).
    let e = 1;
    let q: Vec<usize> = mesh.element_nodes(e).to_vec();
    let c: [f64; 3] = std::array::from_fn(|k| 0.5 * (mesh.nodes[q[1]][k] + mesh.nodes[q[3]][k]));
    let diag = mesh.add_node(c);
    let tri_a = [q[0], q[1], q[3], q[4], diag, q[7]];
    let tri_b = [q[1], q[2], q[3], q[5], q[6], diag];
    let mut rebuilt = olli_mesh::Mesh::new(2);
    rebuilt.nodes = mesh.nodes.clone();
    rebuilt.add_element(ElementKind::Quad8, mesh.element_nodes(0));
    rebuilt.add_element(ElementKind::Tri6, &tri_a);
    rebuilt.add_element(ElementKind::Tri6, &tri_b);
    rebuilt.node_sets = std::mem::take(&mut mesh.node_sets);
    rebuilt.element_sets.insert("all".into(), vec![0, 1, 2]);
    let mut model = Model::single_region(rebuilt, Analysis::PlaneStrain { thickness: 1.0 }, neo_hookean(0.5, 5000.0), Formulation::Mixed);
    model.stages.push(Stage {
        name: "pull".into(),
        supports: vec![support("left", [true, false, false]), support("bottom", [false, true, false])],
        motions: vec![Motion { set: "right".into(), displacement: [Some(0.5), None, None] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed(), "{:?}", sol.termination);
    // Plane-strain uniaxial tension of an incompressible neo-Hookean strip,
    // λ = 1.5 in x, free in y, held in z: nominal stress μ(λ − λ⁻³) (Rivlin
    // 1948; derived), on a reference section of height 1 and thickness 1.
    let l: f64 = 1.5;
    let want = 0.5 * (l - l.powi(-3));
    let got = sol.last().unwrap().reactions["right"][0];
    assert!(rel(got, want) < 2e-3, "force {got} vs {want}");
}
