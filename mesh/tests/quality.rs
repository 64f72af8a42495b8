//! Quality checks and repairs on small hand-built meshes with known answers.

mod common;

use olli_mesh::cleanup::{merge_duplicate_nodes, remove_unreferenced_nodes, reorient_clockwise_2d};
use olli_mesh::quality::{check, element_quality, QualitySettings};
use olli_mesh::{ElementKind, Mesh, Side};

fn quad(points: [[f64; 2]; 4]) -> Mesh {
    let mut m = Mesh::new(2);
    let ids: Vec<usize> = points.iter().map(|p| m.add_node([p[0], p[1], 0.0])).collect();
    m.add_element(ElementKind::Quad4, &ids);
    m
}

/// For the bilinear quad (0,0) (1,0) (1,1) (0,t), det J is bilinear in (ξ, η)
/// and equals a quarter of the corner cross products: t/4 at corners 0 and 3,
/// 1/4 at corners 1 and 2 (general mathematics). So the Jacobian ratio is
/// exactly t and, with the 0.05 threshold, t = 0.02 is degenerate.
#[test]
fn jacobian_ratio_of_a_trapezoid_equals_its_taper() {
    for t in [0.5, 0.02] {
        let m = quad([[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, t]]);
        let q = element_quality(&m, 0);
        assert!((q.min_det - t / 4.0).abs() < 1e-14 && (q.max_det - 0.25).abs() < 1e-14, "{q:?}");
        assert!((q.jacobian_ratio - t).abs() < 1e-12);
        let report = check(&m, &QualitySettings::default());
        assert_eq!(report.degenerate.len(), (t < 0.05) as usize);
        assert!(report.inverted.is_empty());
    }
}

/// A clockwise quad has det J < 0 everywhere; a bow-tie (crossed) quad
/// changes sign inside. Both count as inverted.
#[test]
fn inverted_and_crossed_elements_are_reported() {
    let cw = quad([[0.0, 0.0], [0.0, 1.0], [1.0, 1.0], [1.0, 0.0]]);
    assert_eq!(check(&cw, &QualitySettings::default()).inverted, vec![0]);
    let bow = quad([[0.0, 0.0], [1.0, 0.0], [0.0, 1.0], [1.0, 1.0]]);
    let q = element_quality(&bow, 0);
    assert!(q.min_det < 0.0 && q.max_det > 0.0, "{q:?}");
    assert_eq!(check(&bow, &QualitySettings::default()).inverted, vec![0]);
}

/// A 4 × 1 rectangle element has aspect ratio 4.
#[test]
fn aspect_ratio_is_longest_over_shortest_edge() {
    let m = quad([[0.0, 0.0], [4.0, 0.0], [4.0, 1.0], [0.0, 1.0]]);
    assert!((element_quality(&m, 0).aspect_ratio - 4.0).abs() < 1e-14);
}

/// Two quads sharing an edge through duplicated nodes, plus a stray node:
/// two duplicates merge, the stray node is dropped, sets follow.
#[test]
fn duplicate_and_unreferenced_nodes_are_found_and_repaired() {
    let mut m = Mesh::new(2);
    let p = |m: &mut Mesh, x: f64, y: f64| m.add_node([x, y, 0.0]);
    let a = [p(&mut m, 0.0, 0.0), p(&mut m, 1.0, 0.0), p(&mut m, 1.0, 1.0), p(&mut m, 0.0, 1.0)];
    let b = [p(&mut m, 1.0 + 1e-13, 0.0), p(&mut m, 2.0, 0.0), p(&mut m, 2.0, 1.0), p(&mut m, 1.0, 1.0)];
    let stray = p(&mut m, 5.0, 5.0);
    m.add_element(ElementKind::Quad4, &a);
    m.add_element(ElementKind::Quad4, &b);
    m.node_sets.insert("seam".into(), vec![b[0], b[3]]);
    let report = check(&m, &QualitySettings::default());
    assert_eq!((report.duplicate_nodes, report.unreferenced_nodes), (2, 1));
    let _ = stray;
    assert_eq!(merge_duplicate_nodes(&mut m, 1e-9), 2);
    assert_eq!(remove_unreferenced_nodes(&mut m), 1);
    assert_eq!(m.node_count(), 6);
    assert_eq!(m.element_nodes(1)[0], m.element_nodes(0)[1]);
    assert_eq!(m.node_sets["seam"], vec![1, 2]);
}

/// Reorienting a clockwise quad keeps its side set on the same physical edge.
#[test]
fn reorientation_keeps_side_sets_on_the_same_edge() {
    // Clockwise: (0,0) -> (0,1) -> (1,1) -> (1,0). Local side 3 joins (1,0) and (0,0): the bottom.
    let mut m = quad([[0.0, 0.0], [0.0, 1.0], [1.0, 1.0], [1.0, 0.0]]);
    m.side_sets.insert("bottom".into(), vec![Side { element: 0, local: 3 }]);
    assert_eq!(reorient_clockwise_2d(&mut m), vec![0]);
    assert!(element_quality(&m, 0).min_det > 0.0);
    let s = m.side_sets["bottom"][0];
    let mut nodes: Vec<[f64; 3]> = m.side_nodes(s).iter().map(|&n| m.nodes[n]).collect();
    nodes.sort_by(|a, b| a[0].total_cmp(&b[0]));
    assert_eq!(nodes, vec![[0.0, 0.0, 0.0], [1.0, 0.0, 0.0]]);
    assert_eq!(m.side_normal(s), [0.0, -1.0, 0.0]);
}

/// The hash-grid duplicate search agrees with the brute-force definition
/// (node i duplicates the first earlier representative within tol) on random
/// clusters placed across grid-cell faces.
#[test]
fn duplicate_search_matches_brute_force() {
    let mut rng = common::XorShift(0xD1B5_4A32_D192_ED03);
    let tol = 1e-3;
    let mut m = Mesh::new(3);
    for _ in 0..400 {
        // Centres on a coarse lattice (cell faces of the grid), jittered copies.
        let c = [rng.int(0, 5) as f64 * 4e-3, rng.int(0, 5) as f64 * 4e-3, rng.range(-0.01, 0.01)];
        let copies = rng.int(1, 3);
        for _ in 0..copies {
            m.add_node([c[0] + rng.range(-3e-4, 3e-4), c[1] + rng.range(-3e-4, 3e-4), c[2]]);
        }
    }
    let fast = olli_mesh::cleanup::duplicate_representatives(&m, tol);
    let mut slow: Vec<usize> = (0..m.node_count()).collect();
    for i in 0..m.node_count() {
        for j in 0..i {
            let d2: f64 = (0..3).map(|k| (m.nodes[i][k] - m.nodes[j][k]).powi(2)).sum();
            if slow[j] == j && d2 <= tol * tol {
                slow[i] = j;
                break;
            }
        }
    }
    assert_eq!(fast, slow);
    assert!(fast.iter().enumerate().filter(|&(i, &r)| r != i).count() > 100);
}
