//! Geometric selections, the info summary and generator specs.

use olli_mesh::generate::*;
use olli_mesh::select::*;
use olli_mesh::{generate, summary, GeneratorSpec, Mesh, Side};

fn v(x: &[f64]) -> Vec3 {
    Vec3::try_from(x.to_vec()).unwrap()
}

fn strip() -> Mesh {
    rectangle(&RectangleParams { size: [2.0, 1.0], divisions: [4, 2], ..Default::default() }).unwrap()
}

/// On a 2 × 1 strip of 4 × 2 quads: the line y = 0 holds 5 nodes and the 4
/// bottom edges; the box x ≤ 1 holds 3 × 3 nodes and 6 boundary edges (2 left,
/// 2 bottom, 2 top); the nearest node to (2.1, 1.2) is the corner (2, 1).
#[test]
fn selections_on_a_strip_pick_exact_nodes_and_sides() {
    let m = strip();
    let tol = default_tolerance(&m);
    let bottom = Selection::Plane { point: v(&[0.0, 0.0]), normal: v(&[0.0, 1.0]) };
    assert_eq!(select_nodes(&m, &bottom, tol).unwrap(), m.node_sets["bottom"]);
    assert_eq!(select_nodes(&m, &bottom, tol).unwrap().len(), 5);
    assert_eq!(select_sides(&m, &bottom, tol).unwrap(), m.side_sets["bottom"]);
    let line = Selection::Line { point: v(&[0.0, 1.0]), direction: v(&[1.0, 0.0]) };
    assert_eq!(select_sides(&m, &line, tol).unwrap(), m.side_sets["top"]);

    let left_half = Selection::Box { min: v(&[-1.0, -1.0]), max: v(&[1.0, 2.0]) };
    let nodes = select_nodes(&m, &left_half, tol).unwrap();
    assert_eq!(nodes.len(), 9);
    assert!(nodes.iter().all(|&n| m.nodes[n][0] <= 1.0));
    let sides = select_sides(&m, &left_half, tol).unwrap();
    assert_eq!(sides.len(), 6);
    assert!(sides.iter().all(|&s| m.side_nodes(s).iter().all(|&n| m.nodes[n][0] <= 1.0)));

    let near = select_nodes(&m, &Selection::Nearest(v(&[2.1, 1.2])), tol).unwrap();
    assert_eq!(near.len(), 1);
    assert_eq!(m.nodes[near[0]], [2.0, 1.0, 0.0]);
    let near_side = select_sides(&m, &Selection::Nearest(v(&[1.8, -0.3])), tol).unwrap();
    assert_eq!(near_side, vec![Side { element: 3, local: 0 }]);

    // Boundary of 4 × 2 quads: 2 (4 + 2) edges.
    assert_eq!(boundary_sides(&m).len(), 12);
}

/// Combinations: the bottom edge minus the box x ≤ 1 keeps the nodes with
/// x > 1 (x = 1.5, 2); union with the top and intersection with the left half.
#[test]
fn combined_selections_follow_set_algebra() {
    let m = strip();
    let tol = default_tolerance(&m);
    let left_half = Selection::Box { min: v(&[-1.0, -1.0]), max: v(&[1.0, 2.0]) };
    let diff = Selection::Difference(vec![Selection::Set("bottom".into()), left_half.clone()]);
    let nodes = select_nodes(&m, &diff, tol).unwrap();
    let xs: Vec<f64> = nodes.iter().map(|&n| m.nodes[n][0]).collect();
    assert_eq!(xs, vec![1.5, 2.0]);
    let both = Selection::Union(vec![Selection::Set("bottom".into()), Selection::Set("top".into())]);
    assert_eq!(select_sides(&m, &both, tol).unwrap().len(), 8);
    let inter = Selection::Intersection(vec![both, left_half]);
    assert_eq!(select_sides(&m, &inter, tol).unwrap().len(), 4);
    assert!(select_nodes(&m, &Selection::Set("nope".into()), tol).is_err());
    assert!(select_nodes(&m, &Selection::Plane { point: v(&[0.0, 0.0]), normal: v(&[0.0, 0.0]) }, tol).is_err());
}

/// Circle and cylinder selections recover the generators' curved sets.
#[test]
fn curved_selections_match_generated_sets() {
    let c = cord(&CircleParams { center: [20.0, 1.75], diameter: Some(3.5), divisions: 24, order: Order::Quadratic, ..Default::default() })
        .unwrap();
    let tol = default_tolerance(&c);
    let circle = Selection::Circle { center: v(&[20.0, 1.75]), radius: 1.75 };
    assert_eq!(select_nodes(&c, &circle, tol).unwrap(), c.node_sets["surface"]);
    assert_eq!(select_sides(&c, &circle, tol).unwrap(), c.side_sets["surface"]);
    // The upper half of the surface: 12 of 24 arcs.
    let upper = Selection::Intersection(vec![circle, Selection::Box { min: v(&[0.0, 1.75]), max: v(&[40.0, 9.0]) }]);
    assert_eq!(select_sides(&c, &upper, tol).unwrap().len(), 12);

    let t = hollow_cylinder(&AnnulusParams { circumferential_divisions: 12, axial_divisions: 3, ..Default::default() }).unwrap();
    let tol = default_tolerance(&t);
    let inner = Selection::Cylinder { point: v(&[0.0, 0.0, 0.0]), axis: v(&[0.0, 0.0, 1.0]), radius: 0.5 };
    assert_eq!(select_sides(&t, &inner, tol).unwrap(), t.side_sets["inner"]);
    let base = Selection::Plane { point: v(&[0.0, 0.0, 0.0]), normal: v(&[0.0, 0.0, 1.0]) };
    assert_eq!(select_sides(&t, &base, tol).unwrap(), t.side_sets["bottom"]);
    assert_eq!(select_nodes(&t, &base, tol).unwrap(), t.node_sets["bottom"]);
}

/// Selections read from TOML in the form a job file uses.
#[test]
fn selections_read_from_toml() {
    #[derive(serde::Deserialize)]
    struct Doc {
        sides: Selection,
    }
    let doc: Doc = toml::from_str(r#"sides = { difference = [{ set = "bottom" }, { box = { min = [-1, -1], max = [1, 2] } }] }"#).unwrap();
    let m = strip();
    assert_eq!(select_sides(&m, &doc.sides, 1e-9).unwrap().len(), 2);
    assert!(toml::from_str::<Doc>(r#"sides = { plane = { point = [0], normal = [0, 1] } }"#).is_err());
}

/// `info` lines: counts per kind and per set, as scripts expect them.
#[test]
fn summary_prints_counts_per_kind_and_set() {
    let m = strip();
    let text = summary(&m).to_string();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(lines[0], "nodes: 15");
    assert_eq!(lines[1], "elements: 8");
    for want in
        ["quad4: 8", "element set all: 8", "node set bottom: 5", "side set left: 2", "inverted elements: 0", "min jacobian ratio: 1.0000"]
    {
        assert!(lines.contains(&want), "missing `{want}` in\n{text}");
    }
}

/// A TOML spec builds the same mesh as the direct call; nested sections work;
/// an unknown key is reported with its line.
#[test]
fn generator_specs_from_toml() {
    let spec =
        GeneratorSpec::from_toml("generate = \"cord\"\ncenter = [20.0, 1.75]\ndiameter = 3.5\ndivisions = 16\norder = \"quadratic\"\n")
            .unwrap();
    let direct =
        cord(&CircleParams { center: [20.0, 1.75], diameter: Some(3.5), divisions: 16, order: Order::Quadratic, ..Default::default() })
            .unwrap();
    assert_eq!(generate(&spec).unwrap(), direct);

    let spec = GeneratorSpec::from_toml(
        "generate = \"sweep\"\nangle = 90.0\ndivisions = 3\n[section]\ngenerate = \"rectangle\"\norigin = [10.0, 0.0]\nsize = [5.0, 20.0]\ndivisions = [2, 4]\ngrading = { toward = \"bottom\", ratio = 2.0 }\n",
    )
    .unwrap();
    let m = generate(&spec).unwrap();
    assert_eq!(m.element_count(), 2 * 4 * 3);
    assert!(m.side_sets.contains_key("start") && m.side_sets.contains_key("bottom"));

    let err = GeneratorSpec::from_toml("generate = \"block\"\nsise = [1, 2, 3]\n").unwrap_err().to_string();
    assert!(err.contains("sise") && err.contains("line 2"), "{err}");
    assert!(GeneratorSpec::from_toml("generate = \"teapot\"\n").is_err());
}

/// Command-line style options build the same spec as the TOML table.
#[test]
fn generator_specs_from_options() {
    let a = GeneratorSpec::from_options("cord", &["center=[20.0, 1.75]", "diameter=3.5", "divisions=16", "order=quadratic"]).unwrap();
    let b = GeneratorSpec::from_toml("generate = \"cord\"\ncenter = [20.0, 1.75]\ndiameter = 3.5\ndivisions = 16\norder = \"quadratic\"\n")
        .unwrap();
    assert_eq!(a, b);
    let g = GeneratorSpec::from_options("rectangle", &["grading={ toward = \"top\", ratio = 3 }", "divisions=[2, 6]"]).unwrap();
    assert_eq!(generate(&g).unwrap().element_count(), 12);
    assert!(GeneratorSpec::from_options("cord", &["diameter"]).is_err());
    assert!(GeneratorSpec::from_options("cord", &["diameter=big"]).is_err());
}
