//! Checks every registered shape: nodal interpolation, derivatives, agreement
//! with the mesh crate's independent implementation, side and edge tables.

use olli_mesh::shape as mesh_shape;

use super::*;

/// A few reference points inside every domain (valid for the unit simplex
/// and for [−1, 1]ⁿ alike).
const POINTS: [[f64; 3]; 4] = [[0.2, 0.3, 0.1], [0.61, 0.13, 0.05], [0.05, 0.07, 0.71], [0.33, 0.33, 0.2]];

fn eval(kind: ShapeKind, xi: [f64; 3]) -> (Vec<f64>, Vec<[f64; 3]>) {
    let mut n = vec![0.0; kind.nodes()];
    let mut dn = vec![[0.0; 3]; kind.nodes()];
    (kind.def().eval)(xi, &mut n, &mut dn);
    (n, dn)
}

fn clip(kind: ShapeKind, xi: [f64; 3]) -> [f64; 3] {
    let dim = kind.dimension();
    std::array::from_fn(|c| if c < dim { xi[c] } else { 0.0 })
}

/// Nodal interpolation: N_a(ξ_b) = δ_ab, and the functions sum to one with
/// gradients summing to zero (any Lagrange basis containing the constants).
#[test]
fn shapes_are_nodal_and_sum_to_one() {
    for kind in ShapeKind::ALL {
        let def = kind.def();
        for (b, &xb) in def.reference_nodes.iter().enumerate() {
            let (n, _) = eval(kind, xb);
            for (a, &na) in n.iter().enumerate() {
                let want = if a == b { 1.0 } else { 0.0 };
                assert!((na - want).abs() < 1e-14, "{kind}: N{a} at node {b} = {na}");
            }
        }
        for &xi in &POINTS {
            let (n, dn) = eval(kind, clip(kind, xi));
            assert!((n.iter().sum::<f64>() - 1.0).abs() < 1e-14, "{kind}");
            for c in 0..3 {
                assert!(dn.iter().map(|g| g[c]).sum::<f64>().abs() < 1e-13, "{kind}");
            }
        }
    }
}

/// Each shape reproduces the polynomials it is built to contain: linear ones
/// for all shapes, the complete quadratics for the quadratic ones (the
/// serendipity quad8 and hex20 contain them too).
#[test]
fn shapes_reproduce_linear_and_quadratic_fields() {
    for kind in ShapeKind::ALL {
        let def = kind.def();
        let dim = kind.dimension();
        let mut fields: Vec<Box<dyn Fn([f64; 3]) -> f64>> = vec![Box::new(|_| 1.0)];
        for c in 0..dim {
            fields.push(Box::new(move |x: [f64; 3]| x[c]));
            if kind.is_quadratic() {
                for d in c..dim {
                    fields.push(Box::new(move |x: [f64; 3]| x[c] * x[d]));
                }
            }
        }
        for &xi in &POINTS {
            let xi = clip(kind, xi);
            let (n, _) = eval(kind, xi);
            for f in &fields {
                let interpolated: f64 = def.reference_nodes.iter().zip(&n).map(|(&x, &na)| na * f(x)).sum();
                assert!((interpolated - f(xi)).abs() < 1e-13, "{kind}");
            }
        }
    }
}

#[test]
fn derivatives_match_central_differences() {
    let h = 1e-6;
    for kind in ShapeKind::ALL {
        for &xi in &POINTS {
            let xi = clip(kind, xi);
            let (_, dn) = eval(kind, xi);
            for c in 0..kind.dimension() {
                let (mut plus, mut minus) = (xi, xi);
                plus[c] += h;
                minus[c] -= h;
                let (np, nm) = (eval(kind, plus).0, eval(kind, minus).0);
                for a in 0..kind.nodes() {
                    let fd = (np[a] - nm[a]) / (2.0 * h);
                    assert!((fd - dn[a][c]).abs() < 1e-8, "{kind}: dN{a}/dξ{c} = {} vs {fd}", dn[a][c]);
                }
            }
        }
    }
}

/// The mesh crate evaluates the same functions with dual numbers, written
/// independently; values and derivatives must agree.
#[test]
fn shapes_agree_with_the_mesh_crate() {
    for kind in ShapeKind::ALL {
        let Some(element) = kind.element_kind() else { continue };
        assert_eq!(kind.def().corners, element.corner_count());
        for &xi in &POINTS {
            let xi = clip(kind, xi);
            let (n, dn) = eval(kind, xi);
            let mut mn = [0.0; mesh_shape::MAX_NODES];
            let mut mdn = [[0.0; 3]; mesh_shape::MAX_NODES];
            mesh_shape::shape_into(element, xi, &mut mn, &mut mdn);
            for a in 0..kind.nodes() {
                assert!((n[a] - mn[a]).abs() < 1e-14, "{kind} N{a}");
                for c in 0..3 {
                    assert!((dn[a][c] - mdn[a][c]).abs() < 1e-13, "{kind} dN{a}/dξ{c}");
                }
            }
        }
    }
}

/// Side tables (the mesh crate's side numbering): each side's node list is in its side shape's own order (the element's functions restricted to
/// the side are the side shape's functions, and the element's other
/// functions vanish there), and sides face outward.
#[test]
fn side_tables_match_the_mesh_crate_and_the_side_shapes() {
    for kind in ShapeKind::ALL {
        let def = kind.def();
        let Some(side_kind) = def.side_kind else { continue };
        let centroid: [f64; 3] =
            std::array::from_fn(|c| def.reference_nodes.iter().map(|x| x[c]).sum::<f64>() / def.reference_nodes.len() as f64);
        for (s, side) in def.sides.iter().enumerate() {
            assert_eq!(side.len(), side_kind.nodes(), "{kind} side {s}");
            for &eta in &POINTS {
                let eta = clip(side_kind, eta);
                let (m, dm) = eval(side_kind, eta);
                // The point of the element's reference domain at side coordinates η.
                let xi: [f64; 3] = std::array::from_fn(|c| side.iter().zip(&m).map(|(&a, &ma)| ma * def.reference_nodes[a][c]).sum());
                let (n, _) = eval(kind, xi);
                for a in 0..kind.nodes() {
                    let want = side.iter().position(|&b| b == a).map_or(0.0, |i| m[i]);
                    assert!((n[a] - want).abs() < 1e-13, "{kind} side {s}: N{a} = {} vs {want}", n[a]);
                }
                // Tangents of the side and the direction to its point from the centroid.
                let tangent = |d: usize| -> [f64; 3] {
                    std::array::from_fn(|c| side.iter().zip(&dm).map(|(&a, g)| g[d] * def.reference_nodes[a][c]).sum())
                };
                let out: [f64; 3] = std::array::from_fn(|c| xi[c] - centroid[c]);
                let facing = match kind.dimension() {
                    3 => {
                        let (t1, t2) = (tangent(0), tangent(1));
                        let normal = [t1[1] * t2[2] - t1[2] * t2[1], t1[2] * t2[0] - t1[0] * t2[2], t1[0] * t2[1] - t1[1] * t2[0]];
                        (0..3).map(|c| normal[c] * out[c]).sum::<f64>()
                    }
                    _ => {
                        // Counter-clockwise boundary: the outward normal is the tangent turned clockwise.
                        let t = tangent(0);
                        t[1] * out[0] - t[0] * out[1]
                    }
                };
                assert!(facing > 0.0, "{kind} side {s} faces inward");
            }
        }
    }
}

/// Edge tables: each mid-edge node sits halfway between its end corners, and
/// the corner pairs of every side's edges are edges of the shape.
#[test]
fn edge_tables_are_consistent() {
    for kind in ShapeKind::ALL {
        let def = kind.def();
        let x = def.reference_nodes;
        for edge in def.edges {
            assert!(edge[0] < def.corners && edge[1] < def.corners, "{kind}");
            assert_eq!(edge.len(), if kind.is_quadratic() { 3 } else { 2 }, "{kind}");
            if let Some(&mid) = edge.get(2) {
                for c in 0..3 {
                    assert!((x[mid][c] - 0.5 * (x[edge[0]][c] + x[edge[1]][c])).abs() < 1e-15, "{kind} edge {edge:?}");
                }
            }
        }
        let has_edge = |a: usize, b: usize| def.edges.iter().any(|e| (e[0], e[1]) == (a, b) || (e[0], e[1]) == (b, a));
        for side in def.sides.iter().filter(|s| s.len() > 1) {
            let corners = def.side_kind.map_or(1, |k| k.def().corners);
            for i in 0..corners {
                let j = (i + 1) % corners;
                if corners > 2 || i == 0 {
                    assert!(has_edge(side[i], side[j]), "{kind}: side {side:?} edge {i}-{j}");
                }
            }
        }
    }
}

#[test]
fn tables_hold_the_rule_points_values() {
    for kind in ShapeKind::ALL {
        let table = kind.table();
        assert!((table.weights.iter().sum::<f64>() - kind.def().domain.measure()).abs() < 1e-14, "{kind}");
        for p in 0..table.len() {
            let (n, dn) = eval(kind, table.points[p]);
            assert_eq!(table.values(p), &n[..]);
            assert_eq!(table.derivatives(p), &dn[..]);
        }
        assert_eq!(
            ShapeKind::of_element(kind.element_kind().unwrap_or(olli_mesh::ElementKind::Wedge6)).is_some(),
            kind.element_kind().is_some()
        );
    }
}
