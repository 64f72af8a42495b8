//! Generated meshes: exact geometry in the limit, positive elements, outward
//! side normals and correctly named sets.

mod common;

use std::f64::consts::PI;

use common::XorShift;

use olli_mesh::generate::*;
use olli_mesh::quality::{element_quality, measure};
use olli_mesh::{ElementKind, Mesh, Side};

const ORDERS: [Order; 3] = [Order::Linear, Order::Quadratic, Order::QuadraticFull];

fn cord_mesh(divisions: usize, order: Order, triangles: bool) -> Mesh {
    cord(&CircleParams { center: [20.0, 1.75], diameter: Some(3.5), divisions, order, triangles, ..Default::default() }).unwrap()
}

fn ring(circ: usize, order: Order) -> Mesh {
    annulus(&AnnulusParams {
        inner_radius: 1.0,
        outer_radius: 2.0,
        radial_divisions: 2,
        circumferential_divisions: circ,
        order,
        ..Default::default()
    })
    .unwrap()
}

fn tube(circ: usize, order: Order) -> Mesh {
    hollow_cylinder(&AnnulusParams {
        inner_radius: 1.0,
        outer_radius: 2.0,
        height: 3.0,
        radial_divisions: 1,
        axial_divisions: 1,
        circumferential_divisions: circ,
        order,
        ..Default::default()
    })
    .unwrap()
}

fn swept_tube(circ: usize, order: Order) -> Mesh {
    let section =
        rectangle(&RectangleParams { origin: [1.0, 0.0], size: [1.0, 3.0], divisions: [1, 1], order, ..Default::default() }).unwrap();
    sweep(&section, 360.0, circ).unwrap()
}

/// Every generator in every variant, for the checks that apply to all of them.
fn all_meshes() -> Vec<(String, Mesh)> {
    let mut out = Vec::new();
    for order in ORDERS {
        for tri in [false, true] {
            let tag = format!("{order:?}{}", if tri { "/tri" } else { "" });
            let graded = Some(Grading { toward: Face::Top, ratio: 5.0 });
            out.push((
                format!("rectangle {tag}"),
                rectangle(&RectangleParams { divisions: [3, 4], order, triangles: tri, grading: graded, ..Default::default() }).unwrap(),
            ));
            out.push((
                format!("annulus {tag}"),
                annulus(&AnnulusParams { angle: 90.0, circumferential_divisions: 5, order, triangles: tri, ..Default::default() }).unwrap(),
            ));
            out.push((format!("cord {tag}"), cord_mesh(16, order, tri)));
            out.push((format!("disc {tag}"), disc(&CircleParams { divisions: 8, order, triangles: tri, ..Default::default() }).unwrap()));
            if tri && order != Order::Linear {
                continue; // no quadratic wedge
            }
            let g = Some(Grading { toward: Face::Bottom, ratio: 3.0 });
            if !tri {
                out.push((
                    format!("tet block {tag}"),
                    block(&BlockParams { divisions: [2, 1, 2], order, tetrahedra: true, grading: g, ..Default::default() }).unwrap(),
                ));
            }
            out.push((
                format!("block {tag}"),
                block(&BlockParams { divisions: [2, 3, 3], order, triangles: tri, grading: g, ..Default::default() }).unwrap(),
            ));
            out.push((
                format!("hollow cylinder {tag}"),
                hollow_cylinder(&AnnulusParams {
                    circumferential_divisions: 8,
                    angle: 270.0,
                    axial_divisions: 2,
                    order,
                    triangles: tri,
                    ..Default::default()
                })
                .unwrap(),
            ));
            out.push((
                format!("solid cylinder {tag}"),
                solid_cylinder(&CircleParams { divisions: 8, axial_divisions: 2, order, triangles: tri, ..Default::default() }).unwrap(),
            ));
            let sec =
                rectangle(&RectangleParams { origin: [1.0, 0.0], divisions: [2, 2], order, triangles: tri, ..Default::default() }).unwrap();
            out.push((format!("sweep 120 {tag}"), sweep(&sec, 120.0, 3).unwrap()));
            out.push((format!("extrude {tag}"), extrude(&sec, 2.0, 2).unwrap()));
        }
    }
    out
}

fn convergence_rate(errors: &[f64]) -> f64 {
    (errors[errors.len() - 2] / errors[errors.len() - 1]).log2()
}

/// Area of the O-grid cord section tends to πr² (exact circle area). With
/// straight-sided linear elements the error of an inscribed polygon falls as
/// h² (rate 2); quadratic isoparametric edges through three points of the
/// circle give h⁴ (general interpolation theory, e.g. Strang & Fix 1973,
/// "An Analysis of the Finite Element Method", ch. 4, from memory). Rates
/// are checked with 10 % slack because the meshes are still coarse.
#[test]
fn cord_area_converges_to_pi_r_squared() {
    let exact = PI * 1.75 * 1.75;
    for order in ORDERS {
        let errs: Vec<f64> = [8, 16, 32, 64].iter().map(|&n| (measure(&cord_mesh(n, order, false)) - exact).abs() / exact).collect();
        let rate = convergence_rate(&errs);
        let want = if order == Order::Linear { 2.0 } else { 4.0 };
        assert!(rate > 0.9 * want, "{order:?}: errors {errs:?}, rate {rate}");
        if order != Order::Linear {
            assert!(errs[3] < 1e-6, "{order:?}: {errs:?}");
        }
    }
}

/// Annulus area π(ro² − ri²), hollow-cylinder volume π(ro² − ri²)h both from
/// the annulus and from a swept rectangle: same rates as above.
#[test]
fn annulus_and_hollow_cylinder_converge_to_exact_measure() {
    let area = PI * (4.0 - 1.0);
    let volume = area * 3.0;
    for order in ORDERS {
        let want = if order == Order::Linear { 2.0 } else { 4.0 };
        for (name, exact, make) in [
            ("annulus", area, ring as fn(usize, Order) -> Mesh),
            ("hollow cylinder", volume, tube),
            ("swept rectangle", volume, swept_tube),
        ] {
            let errs: Vec<f64> = [8, 16, 32].iter().map(|&n| (measure(&make(n, order)) - exact).abs() / exact).collect();
            let rate = convergence_rate(&errs);
            assert!(rate > 0.9 * want, "{name} {order:?}: errors {errs:?}, rate {rate}");
            let lin: f64 = (measure(&make(32, Order::Linear)) - exact).abs();
            if order != Order::Linear {
                assert!(errs[2] * exact < 0.01 * lin, "{name}: quadratic not faster");
            }
        }
    }
}

/// Straight-sided generators reproduce their measure exactly (isoparametric
/// elements represent affine maps exactly).
#[test]
fn block_and_rectangle_measures_are_exact() {
    for order in ORDERS {
        let r = rectangle(&RectangleParams {
            size: [2.0, 3.0],
            divisions: [3, 5],
            order,
            grading: Some(Grading { toward: Face::Left, ratio: 4.0 }),
            ..Default::default()
        })
        .unwrap();
        assert!((measure(&r) - 6.0).abs() < 1e-12);
        let b = block(&BlockParams {
            size: [2.0, 3.0, 0.5],
            divisions: [2, 3, 4],
            order,
            grading: Some(Grading { toward: Face::Top, ratio: 4.0 }),
            ..Default::default()
        })
        .unwrap();
        assert!((measure(&b) - 3.0).abs() < 1e-12);
    }
}

/// Every generated element has a positive Jacobian at every corner and Gauss point.
#[test]
fn generated_elements_have_positive_jacobians() {
    for (name, mesh) in all_meshes() {
        assert!(mesh.element_count() > 0, "{name}");
        for e in 0..mesh.element_count() {
            let q = element_quality(&mesh, e);
            assert!(q.min_det > 0.0, "{name}: element {e} ({}) det {}", mesh.kinds[e], q.min_det);
        }
    }
}

/// The O-grid's worst Jacobian ratio stays bounded under refinement: it
/// must not drift toward zero as divisions grow from 8 to 128.
#[test]
fn cord_jacobian_ratio_stays_bounded_under_refinement() {
    let mut worst = Vec::new();
    for n in [8, 16, 32, 64, 128] {
        let m = cord_mesh(n, Order::Linear, false);
        let w = (0..m.element_count()).map(|e| element_quality(&m, e).jacobian_ratio).fold(1.0, f64::min);
        worst.push(w);
    }
    assert!(worst.iter().all(|&w| w > 0.35), "{worst:?}");
    assert!(worst[4] > 0.9 * worst[1], "ratio keeps falling: {worst:?}");
}

fn centroid(mesh: &Mesh, nodes: &[usize]) -> [f64; 3] {
    let mut c = [0.0; 3];
    for &n in nodes {
        for k in 0..3 {
            c[k] += mesh.nodes[n][k] / nodes.len() as f64;
        }
    }
    c
}

/// Each side of every element (all kinds, including the wedge) has a normal
/// pointing away from the element: for a convex element the vector from the
/// element centroid to the side centroid has a positive component along it.
#[test]
fn side_normals_point_outward() {
    let mut kinds = std::collections::BTreeSet::new();
    for (name, mesh) in all_meshes() {
        for e in 0..mesh.element_count() {
            kinds.insert(mesh.kinds[e]);
            let kind = mesh.kinds[e];
            let ce = centroid(&mesh, &mesh.element_nodes(e)[..kind.corner_count()]);
            for local in 0..kind.sides().len() {
                let s = Side { element: e, local: local as u8 };
                let sn = mesh.side_nodes(s);
                let corners = if kind.dimension() == 2 {
                    2
                } else if matches!(sn.len(), 3 | 6) {
                    3
                } else {
                    4
                };
                let cs = centroid(&mesh, &sn[..corners]);
                let n = mesh.side_normal(s);
                let dot: f64 = (0..3).map(|k| n[k] * (cs[k] - ce[k])).sum();
                assert!(dot > 0.0, "{name}: {kind} side {local} normal {n:?} points inward");
            }
        }
    }
    for k in [
        ElementKind::Quad4,
        ElementKind::Quad8,
        ElementKind::Quad9,
        ElementKind::Tri3,
        ElementKind::Tri6,
        ElementKind::Hex8,
        ElementKind::Hex20,
        ElementKind::Hex27,
        ElementKind::Wedge6,
        ElementKind::Tet4,
        ElementKind::Tet10,
    ] {
        assert!(kinds.contains(&k), "{k} not covered");
    }
}

/// Side sets cover exactly the named boundary, with outward normals along the
/// expected direction, and the node set of the same name has the right count.
#[test]
fn natural_sets_sit_on_their_boundaries() {
    let r = rectangle(&RectangleParams { size: [2.0, 1.0], divisions: [4, 3], order: Order::Quadratic, ..Default::default() }).unwrap();
    for (name, count, normal) in [("bottom", 4, [0.0, -1.0]), ("right", 3, [1.0, 0.0]), ("top", 4, [0.0, 1.0]), ("left", 3, [-1.0, 0.0])] {
        let sides = &r.side_sets[name];
        assert_eq!(sides.len(), count, "{name}");
        assert_eq!(r.node_sets[name].len(), 2 * count + 1, "{name}");
        for &s in sides {
            let n = r.side_normal(s);
            assert!((n[0] - normal[0]).abs() < 1e-12 && (n[1] - normal[1]).abs() < 1e-12, "{name}: {n:?}");
        }
    }
    let c = cord_mesh(16, Order::Linear, false);
    assert_eq!(c.side_sets["surface"].len(), 16);
    for q in ["outer", "top", "inner", "bottom"] {
        assert_eq!(c.side_sets[q].len(), 4, "{q}");
    }
    for &n in &c.node_sets["surface"] {
        let x = c.nodes[n];
        assert!((((x[0] - 20.0).powi(2) + (x[1] - 1.75).powi(2)).sqrt() - 1.75).abs() < 1e-12);
    }
    // `outer` quarter faces +r: every node has r ≥ centre + radius·cos 45°.
    for &n in &c.node_sets["outer"] {
        assert!(c.nodes[n][0] >= 20.0 + 1.75 * (PI / 4.0).cos() - 1e-12);
    }
    let b = block(&BlockParams { divisions: [2, 3, 4], ..Default::default() }).unwrap();
    for (name, count, axis, value) in
        [("left", 12, 0, 0.0), ("right", 12, 0, 1.0), ("front", 8, 1, 0.0), ("back", 8, 1, 1.0), ("bottom", 6, 2, 0.0), ("top", 6, 2, 1.0)]
    {
        assert_eq!(b.side_sets[name].len(), count, "{name}");
        for &s in &b.side_sets[name] {
            assert!(b.side_nodes(s).iter().all(|&n| (b.nodes[n][axis] - value).abs() < 1e-12), "{name}");
            assert!((b.side_normal(s)[axis] - if value == 0.0 { -1.0 } else { 1.0 }).abs() < 1e-12);
        }
    }
    let t = hollow_cylinder(&AnnulusParams { circumferential_divisions: 12, axial_divisions: 3, ..Default::default() }).unwrap();
    assert_eq!(t.side_sets["inner"].len(), 12 * 3);
    assert_eq!(t.side_sets["top"].len(), 12 * 2);
    assert!(!t.side_sets.contains_key("start"));
    assert_eq!(t.element_sets["all"].len(), t.element_count());
    // Closed ring: nodes = radial lines × circumferential positions × layers.
    assert_eq!(t.node_count(), 3 * 12 * 4);
}

/// Bad generator input is a typed error, not a panic.
#[test]
fn bad_generator_input_is_an_error() {
    assert!(cord(&CircleParams { divisions: 10, ..Default::default() }).is_err());
    assert!(rectangle(&RectangleParams { size: [0.0, 1.0], ..Default::default() }).is_err());
    assert!(annulus(&AnnulusParams { inner_radius: 2.0, outer_radius: 1.0, ..Default::default() }).is_err());
    let on_axis = rectangle(&RectangleParams::default()).unwrap();
    assert!(sweep(&on_axis, 90.0, 4).is_err());
    let tri6 = rectangle(&RectangleParams { order: Order::Quadratic, triangles: true, ..Default::default() }).unwrap();
    assert!(extrude(&tri6, 1.0, 2).is_err());
    assert!(rectangle(&RectangleParams { grading: Some(Grading { toward: Face::Top, ratio: f64::NAN }), ..Default::default() }).is_err());
}

/// Six tetrahedra per hex along a common diagonal give a conforming mesh:
/// its boundary is exactly twice as many triangles as the hex block has
/// boundary quads (2 (nx ny + ny nz + nz nx)), the volume is exact, and every
/// named face is split into two triangles per quad.
#[test]
fn tetrahedral_block_is_conforming() {
    for order in ORDERS {
        let p = BlockParams { size: [1.0, 2.0, 3.0], divisions: [2, 3, 4], order, tetrahedra: true, ..Default::default() };
        let m = block(&p).unwrap();
        let want = if order == Order::Linear { ElementKind::Tet4 } else { ElementKind::Tet10 };
        assert!(m.kinds.iter().all(|&k| k == want));
        assert_eq!(m.element_count(), 6 * 24);
        assert_eq!(olli_mesh::select::boundary_sides(&m).len(), 2 * 2 * (6 + 12 + 8));
        assert!((measure(&m) - 6.0).abs() < 1e-12);
        assert_eq!(m.side_sets["top"].len(), 2 * 6);
        for &s in &m.side_sets["top"] {
            assert_eq!(m.side_normal(s), [0.0, 0.0, 1.0]);
        }
        // Every node of a tet10 is used: no stray hex27 nodes.
        assert_eq!(olli_mesh::cleanup::unreferenced_nodes(&m).len(), 0);
    }
}

/// Property test: random (fixed-seed) parameters, including impossible ones,
/// give either a typed error or a mesh whose every element is positive and
/// whose measure matches the exact shape within the coarse-mesh error.
#[test]
fn random_generator_parameters_give_positive_meshes_or_errors() {
    let mut rng = XorShift(0x2545_F491_4F6C_DD1D);
    let mut built = 0;
    for case in 0..200 {
        let order = ORDERS[rng.int(0, 2)];
        let tri = rng.int(0, 3) == 0;
        let toward = [Face::Left, Face::Right, Face::Bottom, Face::Top, Face::Front, Face::Back][rng.int(0, 5)];
        let grading = Some(Grading { toward, ratio: rng.range(0.5, 20.0) });
        // `exact` is None where the mesh is too coarse for a 10 % comparison
        // (arcs of more than 30° per element, or fewer than 12 around a circle).
        let (result, exact): (Result<Mesh, _>, Option<f64>) = match case % 5 {
            0 => {
                let size = [rng.range(-0.5, 5.0), rng.range(0.01, 5.0)];
                let p = RectangleParams {
                    size,
                    divisions: [rng.int(0, 6), rng.int(1, 6)],
                    order,
                    triangles: tri,
                    grading,
                    ..Default::default()
                };
                (rectangle(&p), Some(size[0] * size[1]))
            }
            1 => {
                let size = [rng.range(0.1, 3.0), rng.range(0.1, 3.0), rng.range(0.1, 3.0)];
                let p = BlockParams {
                    size,
                    divisions: [rng.int(1, 3), rng.int(1, 3), rng.int(1, 3)],
                    order,
                    triangles: tri,
                    tetrahedra: rng.int(0, 2) == 0,
                    grading,
                    ..Default::default()
                };
                (block(&p), Some(size[0] * size[1] * size[2]))
            }
            2 => {
                let (ri, ro, angle) = (rng.range(0.05, 2.0), rng.range(0.05, 3.0), rng.range(-10.0, 370.0));
                let p = AnnulusParams {
                    inner_radius: ri,
                    outer_radius: ro,
                    angle,
                    start_angle: rng.range(-180.0, 180.0),
                    radial_divisions: rng.int(1, 3),
                    circumferential_divisions: rng.int(1, 24),
                    order,
                    triangles: tri,
                    ..Default::default()
                };
                let fine = angle / p.circumferential_divisions as f64 <= 30.0;
                (annulus(&p), fine.then(|| 0.5 * (ro * ro - ri * ri) * angle.to_radians()))
            }
            3 => {
                let r = rng.range(0.01, 10.0);
                let p = CircleParams {
                    center: [rng.range(-5.0, 5.0), rng.range(-5.0, 5.0)],
                    radius: r,
                    divisions: 4 * rng.int(1, 8) + rng.int(0, 4) / 4,
                    radial_divisions: Some(rng.int(1, 4)),
                    order,
                    triangles: tri,
                    ..Default::default()
                };
                (cord(&p), (p.divisions >= 12).then_some(std::f64::consts::PI * r * r))
            }
            _ => {
                let (x0, w, h, angle) = (rng.range(-0.5, 3.0), rng.range(0.1, 2.0), rng.range(0.1, 2.0), rng.range(1.0, 360.0));
                let sec = rectangle(&RectangleParams {
                    origin: [x0, 0.0],
                    size: [w, h],
                    divisions: [rng.int(1, 2), rng.int(1, 2)],
                    order,
                    triangles: tri && order == Order::Linear,
                    ..Default::default()
                })
                .unwrap();
                let v = std::f64::consts::PI * ((x0 + w).powi(2) - x0 * x0) * h * angle / 360.0;
                let n = rng.int(1, 12);
                (sweep(&sec, angle, n), (angle / n as f64 <= 30.0).then_some(v))
            }
        };
        let Ok(mesh) = result else { continue };
        built += 1;
        for e in 0..mesh.element_count() {
            assert!(element_quality(&mesh, e).min_det > 0.0, "case {case}: element {e} not positive");
        }
        if let Some(exact) = exact {
            let m = measure(&mesh);
            assert!((m - exact).abs() <= 0.1 * exact, "case {case}: measure {m} vs {exact}");
        }
    }
    assert!(built > 100, "only {built} of 200 random cases built a mesh");
}

/// End caps of extrusions and partial sweeps sit where they should, with
/// outward normals: extrude `start` at z = 0 (normal −z), `end` at z = L;
/// a 90° sweep's `start` in the plane y = 0 (normal −y) and `end` in x = 0
/// (normal −x). Checked for hexes and wedges, linear and quadratic.
#[test]
fn caps_of_extrusions_and_sweeps_face_outward() {
    for (order, tri) in [(Order::Linear, false), (Order::Linear, true), (Order::Quadratic, false), (Order::QuadraticFull, false)] {
        let sec =
            rectangle(&RectangleParams { origin: [1.0, 0.0], divisions: [2, 3], order, triangles: tri, ..Default::default() }).unwrap();
        let n = sec.element_count();
        let e = extrude(&sec, 2.0, 3).unwrap();
        let s = sweep(&sec, 90.0, 4).unwrap();
        for (mesh, name, axis, value, normal) in [
            (&e, "start", 2, 0.0, [0.0, 0.0, -1.0]),
            (&e, "end", 2, 2.0, [0.0, 0.0, 1.0]),
            (&s, "start", 1, 0.0, [0.0, -1.0, 0.0]),
            (&s, "end", 0, 0.0, [-1.0, 0.0, 0.0]),
        ] {
            let sides = &mesh.side_sets[name];
            assert_eq!(sides.len(), n, "{order:?} {tri} {name}");
            for &side in sides {
                assert!(mesh.side_nodes(side).iter().all(|&i| (mesh.nodes[i][axis] - value).abs() < 1e-12), "{name}");
                let got = mesh.side_normal(side);
                assert!((0..3).all(|k| (got[k] - normal[k]).abs() < 1e-12), "{order:?} {tri} {name}: {got:?}");
            }
        }
        // The section's `left` edge (r = 1) becomes the inner cylinder of the sweep.
        for &side in &s.side_sets["left"] {
            let got = s.side_normal(side);
            let c = s.side_nodes(side)[0];
            let p = s.nodes[c];
            let r = (p[0] * p[0] + p[1] * p[1]).sqrt();
            assert!((r - 1.0).abs() < 1e-12);
            assert!(got[0] * p[0] + got[1] * p[1] < 0.0, "inner face must point toward the axis");
        }
    }
}

/// Linear meshes of circles are exact polygons: the O-grid's surface nodes
/// are equally spaced in angle, so a linear cord of N divisions has the area
/// of the inscribed regular N-gon, (N/2) r² sin(2π/N), and a linear ring the
/// difference of two such polygons (elementary geometry). Tolerance: round-off.
#[test]
fn linear_circles_have_exact_polygon_areas() {
    for n in [4usize, 8, 12, 40] {
        let polygon = |r: f64| 0.5 * n as f64 * r * r * (2.0 * PI / n as f64).sin();
        let c = cord_mesh(n, Order::Linear, false);
        assert!((measure(&c) - polygon(1.75)).abs() < 1e-12, "cord {n}");
        let tri = cord_mesh(n, Order::Linear, true);
        assert!((measure(&tri) - polygon(1.75)).abs() < 1e-12, "tri cord {n}");
        let r = ring(n, Order::Linear);
        assert!((measure(&r) - (polygon(2.0) - polygon(1.0))).abs() < 1e-12, "ring {n}");
    }
}

/// Regression: divisions whose product is 10^10 elements aborted on an 80 GB
/// allocation, and a solid cylinder with 4000 × 4000 divisions asked for
/// 96 GB; both now refuse before building, saying what was asked and what is free.
#[test]
fn divisions_beyond_memory_are_refused_before_allocating() {
    if olli_mesh::memory::available_bytes().is_none_or(|a| a > 1 << 45) {
        return; // No memory figure (or > 35 TB free): the check cannot fail here.
    }
    let e = block(&BlockParams { divisions: [100_000, 100_000, 1], ..Default::default() }).unwrap_err().to_string();
    assert!(e.starts_with("invalid `divisions`: divisions 100000 × 100000 × 1 (10000000000 elements) needs about"), "{e}");
    assert!(e.contains("of memory is available"), "{e}");
    let e = solid_cylinder(&CircleParams { divisions: 4000, axial_divisions: 4000, ..Default::default() }).unwrap_err().to_string();
    assert!(e.starts_with("invalid `axial_divisions`: divisions 4000 with 500 radial and 4000 axial"), "{e}");
}

/// Regression: a NaN in a generator's origin ran, then stopped on a NaN Jacobian.
#[test]
fn nan_or_infinite_origins_are_refused() {
    let e = block(&BlockParams { origin: [0.0, f64::NAN, 0.0], ..Default::default() }).unwrap_err().to_string();
    assert_eq!(e, "invalid `origin`: must be finite numbers, got [0.0, NaN, 0.0]");
    let e = rectangle(&RectangleParams { origin: [f64::INFINITY, 0.0], ..Default::default() }).unwrap_err().to_string();
    assert!(e.starts_with("invalid `origin`"), "{e}");
    let e = hollow_cylinder(&AnnulusParams { center: [f64::NAN, 0.0], ..Default::default() }).unwrap_err().to_string();
    assert!(e.starts_with("invalid `center`"), "{e}");
    let e = cord(&CircleParams { center: [0.0, f64::NEG_INFINITY], ..Default::default() }).unwrap_err().to_string();
    assert!(e.starts_with("invalid `center`"), "{e}");
}
