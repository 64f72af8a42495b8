//! Shared helpers of the verification tests: small structured meshes
//! (rectangle and annulus sections of quad4, blocks of hex8) with named node
//! and side sets, optional fixed-seed distortion of interior nodes, and
//! material shorthands. The mesh crate's generators will replace these.

pub mod jobs;
pub mod pictures;

use std::sync::Arc;

use olli_mesh::{ElementKind, Mesh, Side};
use olli_solver::material::{registry, Material, VolumetricForm};

/// Neo-Hookean with quadratic volumetric energy U = κ/2 (J−1)².
pub fn neo_hookean(mu: f64, kappa: f64) -> Arc<Material> {
    Arc::new(registry::material("neo-hookean", &[("shear_modulus", mu), ("bulk_modulus", kappa)], VolumetricForm::Quadratic).unwrap())
}

/// Fixed-seed generator in [−1, 1) (64-bit LCG, Knuth's constants).
pub struct Lcg(u64);

impl Lcg {
    pub fn new(seed: u64) -> Self {
        Lcg(seed)
    }
    pub fn uniform(&mut self) -> f64 {
        self.0 = self.0.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        ((self.0 >> 11) as f64 / (1u64 << 53) as f64) * 2.0 - 1.0
    }
}

/// A quad4 grid of the map `(s, t) ∈ [0,1]² → place(s, t)`, `ns × nt`
/// elements, counter-clockwise if `place` preserves orientation. Interior
/// nodes are moved by `distort` times the local spacing in (s, t) (fixed seed).
/// Node sets and side sets: `s0`, `s1`, `t0`, `t1` (edges s = 0, s = 1, t = 0, t = 1).
pub fn quad_grid(ns: usize, nt: usize, distort: f64, place: impl Fn(f64, f64) -> [f64; 2]) -> Mesh {
    let mut mesh = Mesh::new(2);
    let mut rng = Lcg::new(7);
    for j in 0..=nt {
        for i in 0..=ns {
            let (mut s, mut t) = (i as f64 / ns as f64, j as f64 / nt as f64);
            if i > 0 && i < ns && j > 0 && j < nt {
                s += distort * rng.uniform() / ns as f64;
                t += distort * rng.uniform() / nt as f64;
            }
            let p = place(s, t);
            mesh.add_node([p[0], p[1], 0.0]);
        }
    }
    let id = |i: usize, j: usize| j * (ns + 1) + i;
    let mut sides: [Vec<Side>; 4] = Default::default();
    for j in 0..nt {
        for i in 0..ns {
            let e = mesh.add_element(ElementKind::Quad4, &[id(i, j), id(i + 1, j), id(i + 1, j + 1), id(i, j + 1)]);
            if j == 0 {
                sides[2].push(Side { element: e, local: 0 });
            }
            if i == ns - 1 {
                sides[1].push(Side { element: e, local: 1 });
            }
            if j == nt - 1 {
                sides[3].push(Side { element: e, local: 2 });
            }
            if i == 0 {
                sides[0].push(Side { element: e, local: 3 });
            }
        }
    }
    let names = ["s0", "s1", "t0", "t1"];
    for (k, name) in names.iter().enumerate() {
        let nodes: Vec<usize> = match k {
            0 => (0..=nt).map(|j| id(0, j)).collect(),
            1 => (0..=nt).map(|j| id(ns, j)).collect(),
            2 => (0..=ns).map(|i| id(i, 0)).collect(),
            _ => (0..=ns).map(|i| id(i, nt)).collect(),
        };
        mesh.node_sets.insert(name.to_string(), nodes);
        mesh.side_sets.insert(name.to_string(), std::mem::take(&mut sides[k]));
    }
    mesh
}

/// Rectangle [x0, x1] × [y0, y1] of quad4 (sets `s0`=left, `s1`=right, `t0`=bottom, `t1`=top).
pub fn rectangle(x0: f64, x1: f64, y0: f64, y1: f64, nx: usize, ny: usize, distort: f64) -> Mesh {
    quad_grid(nx, ny, distort, |s, t| [x0 + s * (x1 - x0), y0 + t * (y1 - y0)])
}

/// Quarter-annulus section a ≤ r ≤ b, 0 ≤ φ ≤ π/2 in the x–y plane (plane
/// strain): `s0` inner, `s1` outer, `t0` on the x axis, `t1` on the y axis.
pub fn quarter_annulus(a: f64, b: f64, nr: usize, nt: usize) -> Mesh {
    quad_grid(nr, nt, 0.0, |s, t| {
        let r = a + s * (b - a);
        let phi = t * std::f64::consts::FRAC_PI_2;
        [r * phi.cos(), r * phi.sin()]
    })
}

/// A hex8 block [0,lx]×[0,ly]×[0,lz] of nx×ny×nz elements, interior nodes
/// distorted as in [`quad_grid`]. Node and side sets `x0`, `x1`, `y0`, `y1`, `z0`, `z1`.
pub fn block(l: [f64; 3], n: [usize; 3], distort: f64) -> Mesh {
    let mut mesh = Mesh::new(3);
    let mut rng = Lcg::new(11);
    for k in 0..=n[2] {
        for j in 0..=n[1] {
            for i in 0..=n[0] {
                let idx = [i, j, k];
                let mut p = [0.0; 3];
                let interior = (0..3).all(|d| idx[d] > 0 && idx[d] < n[d]);
                for d in 0..3 {
                    let mut s = idx[d] as f64 / n[d] as f64;
                    if interior {
                        s += distort * rng.uniform() / n[d] as f64;
                    }
                    p[d] = s * l[d];
                }
                mesh.add_node(p);
            }
        }
    }
    let id = |i: usize, j: usize, k: usize| (k * (n[1] + 1) + j) * (n[0] + 1) + i;
    let mut sides: [Vec<Side>; 6] = Default::default();
    for k in 0..n[2] {
        for j in 0..n[1] {
            for i in 0..n[0] {
                let e = mesh.add_element(
                    ElementKind::Hex8,
                    &[
                        id(i, j, k),
                        id(i + 1, j, k),
                        id(i + 1, j + 1, k),
                        id(i, j + 1, k),
                        id(i, j, k + 1),
                        id(i + 1, j, k + 1),
                        id(i + 1, j + 1, k + 1),
                        id(i, j + 1, k + 1),
                    ],
                );
                // Local faces of the mesh model: 0 bottom (z−), 1 top (z+), 2 y−, 3 x+, 4 y+, 5 x−.
                if i == 0 {
                    sides[0].push(Side { element: e, local: 5 });
                }
                if i == n[0] - 1 {
                    sides[1].push(Side { element: e, local: 3 });
                }
                if j == 0 {
                    sides[2].push(Side { element: e, local: 2 });
                }
                if j == n[1] - 1 {
                    sides[3].push(Side { element: e, local: 4 });
                }
                if k == 0 {
                    sides[4].push(Side { element: e, local: 0 });
                }
                if k == n[2] - 1 {
                    sides[5].push(Side { element: e, local: 1 });
                }
            }
        }
    }
    let names = ["x0", "x1", "y0", "y1", "z0", "z1"];
    for (s, name) in names.iter().enumerate() {
        let (d, at) = (s / 2, if s % 2 == 0 { 0 } else { n[s / 2] });
        let mut nodes = Vec::new();
        for k in 0..=n[2] {
            for j in 0..=n[1] {
                for i in 0..=n[0] {
                    if [i, j, k][d] == at {
                        nodes.push(id(i, j, k));
                    }
                }
            }
        }
        nodes.sort_unstable();
        mesh.node_sets.insert(name.to_string(), nodes);
        mesh.side_sets.insert(name.to_string(), std::mem::take(&mut sides[s]));
    }
    mesh
}

/// Relative difference |a − b| / |b|.
pub fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

/// Prescribes `u(X)` on every listed node by giving each its own node set
/// `pin<node>` and a motion; returns the motions.
pub fn pin_nodes(mesh: &mut Mesh, nodes: &[usize], u: impl Fn([f64; 3]) -> [f64; 3]) -> Vec<olli_solver::Motion> {
    let dim = mesh.dimension;
    nodes
        .iter()
        .map(|&n| {
            let name = format!("pin{n}");
            mesh.node_sets.insert(name.clone(), vec![n]);
            let d = u(mesh.nodes[n]);
            let mut disp = [None; 3];
            for i in 0..dim {
                disp[i] = Some(d[i]);
            }
            olli_solver::Motion { set: name, displacement: disp }
        })
        .collect()
}

/// Nodes on the boundary of a structured mesh: the union of the named sets.
pub fn union_of_sets(mesh: &Mesh, names: &[&str]) -> Vec<usize> {
    let mut v: Vec<usize> = names.iter().flat_map(|n| mesh.node_sets[*n].iter().copied()).collect();
    v.sort_unstable();
    v.dedup();
    v
}

/// A single-stage model with the given controls.
pub fn one_stage(stage: olli_solver::Stage) -> Vec<olli_solver::Stage> {
    vec![stage]
}

/// Components of a set held at zero.
pub fn support(set: &str, components: [bool; 3]) -> olli_solver::Support {
    olli_solver::Support { set: set.into(), components }
}

/// Controls that take a whole stage in one increment (small-load checks).
pub fn one_increment() -> olli_solver::IncrementControls {
    olli_solver::IncrementControls { first: 1.0, ..Default::default() }
}

/// Independent implementations of textbook material formulas, kept apart from
/// the solver's own code so that a test compares two different computations.
pub mod material {
    use olli_solver::material::{registry, Material, VolumetricForm};

    /// A material from the registry with bulk modulus `kappa_over_mu` × μ.
    pub fn with_bulk_ratio(model: &str, constants: &[(&str, f64)], kappa_over_mu: f64) -> Material {
        let probe = registry::material(model, &with_bulk(constants, 1.0), VolumetricForm::Quadratic).unwrap();
        let kappa = kappa_over_mu * probe.shear_modulus();
        registry::material(model, &with_bulk(constants, kappa), VolumetricForm::Quadratic).unwrap()
    }

    fn with_bulk<'a>(constants: &[(&'a str, f64)], kappa: f64) -> Vec<(&'a str, f64)> {
        let mut c = constants.to_vec();
        c.push(("bulk_modulus", kappa));
        c
    }

    /// Langevin function `coth x − 1/x` evaluated directly (x not small).
    pub fn langevin_direct(x: f64) -> f64 {
        1.0 / x.tanh() - 1.0 / x
    }

    /// Inverse Langevin function by plain bisection on the direct formula:
    /// slow but independent of the solver's Newton/series scheme. Accurate to
    /// about 1e-12 relative for 0.01 < y < 0.99, ample for 1e-4 checks.
    pub fn inverse_langevin_bisection(y: f64) -> f64 {
        let (mut a, mut b) = (1e-6, 1.0 / (1.0 - y) + 1.0);
        for _ in 0..200 {
            let m = 0.5 * (a + b);
            if langevin_direct(m) < y {
                a = m
            } else {
                b = m
            }
        }
        0.5 * (a + b)
    }

    /// Eight-chain `∂W/∂I1` (Arruda & Boyce 1993, J. Mech. Phys. Solids
    /// 41:389–412, eq. for the eight-chain energy; from memory):
    /// `W1 = μ_r √N β / (6 λ_ch)`, `λ_ch = √(I1/3)`, `β = L⁻¹(λ_ch/√N)`,
    /// with `μ_r = 3μ / (√N L⁻¹(1/√N))` so that μ is the initial shear modulus.
    pub fn eight_chain_w1(mu: f64, locking_stretch: f64, i1: f64) -> f64 {
        let sqrt_n = locking_stretch;
        let mu_r = 3.0 * mu / (sqrt_n * inverse_langevin_bisection(1.0 / sqrt_n));
        let lam = (i1 / 3.0).sqrt();
        mu_r * sqrt_n * inverse_langevin_bisection(lam / sqrt_n) / (6.0 * lam)
    }

    /// Relative difference with a floor on the scale.
    pub fn rel(a: f64, b: f64, floor: f64) -> f64 {
        (a - b).abs() / b.abs().max(floor)
    }
}

/// The generator options that make elements of `kind`: order, and whether
/// quads are split into triangles (2-D) or hexes into tetrahedra (3-D).
fn generator_options(kind: ElementKind) -> (olli_mesh::generate::Order, bool) {
    use olli_mesh::generate::Order;
    match kind {
        ElementKind::Quad4 | ElementKind::Hex8 => (Order::Linear, false),
        ElementKind::Tri3 | ElementKind::Tet4 => (Order::Linear, true),
        ElementKind::Quad8 | ElementKind::Hex20 => (Order::Quadratic, false),
        ElementKind::Tri6 | ElementKind::Tet10 => (Order::Quadratic, true),
        _ => (Order::QuadraticFull, false),
    }
}

/// A 2-D section of `kind` elements (tri3, tri6, quad4, quad8, quad9) from the
/// mesh crate's rectangle generator on the unit square, `ns × nt` cells
/// (two triangles per cell), every node then moved to `place(s, t)` —
/// mid-side nodes too, so a curved map gives curved elements. Sets of the
/// generator: `bottom` (t = 0), `right` (s = 1), `top` (t = 1), `left` (s = 0).
pub fn generated_section(kind: ElementKind, ns: usize, nt: usize, place: impl Fn(f64, f64) -> [f64; 2]) -> Mesh {
    use olli_mesh::generate::{rectangle, RectangleParams};
    let (order, triangles) = generator_options(kind);
    let mut mesh = rectangle(&RectangleParams { divisions: [ns, nt], order, triangles, ..Default::default() }).unwrap();
    assert!(mesh.kinds.iter().all(|&k| k == kind), "the generator made {:?}, not {kind}", mesh.kinds[0]);
    for x in &mut mesh.nodes {
        let p = place(x[0], x[1]);
        *x = [p[0], p[1], 0.0];
    }
    mesh
}

/// A 3-D block of `kind` elements (tet4, tet10, hex8, hex20, hex27) from the
/// mesh crate's block generator on the unit cube, `n` cells (six tetrahedra
/// per cell), every node then moved to `place(X)`. Sets: `left`, `right`
/// (x = 0, 1), `front`, `back` (y = 0, 1), `bottom`, `top` (z = 0, 1).
pub fn generated_block(kind: ElementKind, n: [usize; 3], place: impl Fn([f64; 3]) -> [f64; 3]) -> Mesh {
    use olli_mesh::generate::{block, BlockParams};
    let (order, tetrahedra) = generator_options(kind);
    let mut mesh = block(&BlockParams { divisions: n, order, tetrahedra, ..Default::default() }).unwrap();
    assert!(mesh.kinds.iter().all(|&k| k == kind), "the generator made {:?}, not {kind}", mesh.kinds[0]);
    for x in &mut mesh.nodes {
        *x = place(*x);
    }
    mesh
}

/// Cumulative positions of `n` cells growing geometrically from `first` to fill `total`.
pub fn geometric(n: usize, total: f64, first: f64) -> Vec<f64> {
    let sum = |q: f64| if (q - 1.0).abs() < 1e-12 { first * n as f64 } else { first * (q.powi(n as i32) - 1.0) / (q - 1.0) };
    let (mut lo, mut hi) = (1.0, 2.0);
    for _ in 0..200 {
        let m = 0.5 * (lo + hi);
        if sum(m) < total {
            lo = m
        } else {
            hi = m
        }
    }
    let q = 0.5 * (lo + hi);
    let mut x = vec![0.0];
    let mut h = first;
    for _ in 0..n {
        let next = x.last().unwrap() + h;
        x.push(next);
        h *= q;
    }
    let scale = total / x[n];
    x.iter().map(|v| v * scale).collect()
}

/// The value of the piecewise-linear map through `positions` (as from
/// [`geometric`], `n + 1` values) at `s ∈ [0, 1]`: a graded coordinate that
/// also places mid-side nodes of quadratic meshes halfway along their cell.
pub fn graded_at(positions: &[f64], s: f64) -> f64 {
    let n = positions.len() - 1;
    let t = (s * n as f64).clamp(0.0, n as f64);
    let i = (t.floor() as usize).min(n - 1);
    let f = t - i as f64;
    positions[i] * (1.0 - f) + positions[i + 1] * f
}

/// E* = E / (1 − ν²) of the rubber against a rigid body, from μ and κ
/// (isotropic elasticity: E = 9κμ/(3κ+μ), ν = (3κ−2μ)/(2(3κ+μ))).
pub fn contact_modulus(mu: f64, kappa: f64) -> f64 {
    let e = 9.0 * kappa * mu / (3.0 * kappa + mu);
    let nu = (3.0 * kappa - 2.0 * mu) / (2.0 * (3.0 * kappa + mu));
    e / (1.0 - nu * nu)
}

/// The checkerboard share of a pressure field (Sani, Gresho, Lee & Griffiths
/// 1981, the leaky cavity, from memory): the volume-averaged pressure of the
/// elements whose centres fall in each cell of an `n × n` grid over the unit
/// square in x and y, then |Σ P_ij (−1)^(i+j)| / Σ |P_ij|. Near 0 for a
/// smooth field, near 1 for a pure checkerboard.
pub fn checkerboard_share(mesh: &Mesh, points: &olli_solver::PointFields, n: usize) -> f64 {
    let (mut pv, mut vol) = (vec![0.0; n * n], vec![0.0; n * n]);
    for e in 0..mesh.element_count() {
        let nodes = mesh.element_nodes(e);
        let centre: [f64; 2] = std::array::from_fn(|c| nodes.iter().map(|&k| mesh.nodes[k][c]).sum::<f64>() / nodes.len() as f64);
        let cell = |x: f64| ((x * n as f64) as usize).min(n - 1);
        let at = cell(centre[1]) * n + cell(centre[0]);
        for p in points.element(e) {
            pv[at] += p.pressure * p.volume;
            vol[at] += p.volume;
        }
    }
    let cells: Vec<f64> = pv.iter().zip(&vol).map(|(p, v)| p / v).collect();
    let alternating: f64 = cells.iter().enumerate().map(|(k, p)| if (k / n + k % n).is_multiple_of(2) { *p } else { -p }).sum();
    alternating.abs() / cells.iter().map(|p| p.abs()).sum::<f64>()
}

/// Newton–Raphson with the consistent tangent converges quadratically near
/// the solution (Dennis & Schnabel 1983, Numerical Methods for Unconstrained
/// Optimization and Nonlinear Equations, Thm. 5.2.1): in the asymptotic
/// range (r_k < 1e-2 and r_{k+1} above the rounding `floor`) the order
/// log r_{k+1} / log r_k of the relative residual history `h` must exceed
/// 1.75 (a wrong tangent gives about 1), at least one step must be in that
/// range, and the last residual must be below 1e-11.
pub fn assert_quadratic_order(h: &[f64], floor: f64) {
    eprintln!("relative residual history: {h:?}");
    let mut checked = 0;
    for k in 0..h.len() - 1 {
        if h[k] < 1e-2 && h[k + 1] > floor {
            let order = h[k + 1].ln() / h[k].ln();
            eprintln!("r{k} = {:.2e} → {:.2e}: order {order:.2}", h[k], h[k + 1]);
            assert!(order > 1.75, "order {order} at iteration {k}");
            checked += 1;
        }
    }
    assert!(checked >= 1, "no iteration in the asymptotic range: {h:?}");
    assert!(*h.last().unwrap() < 1e-11);
}
