//! Parts that nothing holds: before the first iteration, each connected
//! part of the mesh is checked, stage by stage, for rigid-body motions that
//! its prescribed components (supports, motions, bonded inserts) leave free
//! — translations and rotations in 3-D and plane strain, the axial
//! translation in an axisymmetric model (its radial motion strains the
//! part, so it is not rigid). Such a part has a singular stiffness and
//! would only fail later as a generic non-convergence.
//!
//! A part may be held by what cannot be seen before solving: contact with a
//! rigid surface (with or without stabilization springs) holds it once
//! touching, so a model with rigid surfaces, or a stage with
//! stabilization, is not checked.

use nalgebra::{DMatrix, SymmetricEigen};

use super::stages::StageProgram;
use crate::assembly::Discretization;
use crate::element::Analysis;

/// A part left free in a stage.
#[derive(Debug, Clone, PartialEq)]
pub struct Unheld {
    /// Index and name of the stage.
    pub stage: usize,
    /// Name of the stage.
    pub stage_name: String,
    /// The part: its number of nodes and one node of it (0-based).
    pub nodes: usize,
    /// One node of the part (0-based).
    pub first_node: usize,
    /// Each free motion in words, e.g. "translation along y".
    pub free: Vec<String>,
}

impl From<Unheld> for crate::error::SolveError {
    fn from(u: Unheld) -> Self {
        crate::error::SolveError::Unheld { stage: u.stage_name, node: u.first_node, nodes: u.nodes, free: u.free.join(", ") }
    }
}

/// The free parts of every stage (the first stage where any part is free).
pub fn unheld(disc: &Discretization, programs: &[StageProgram]) -> Option<Unheld> {
    let model = disc.model;
    if !model.rigid.is_empty() {
        return None;
    }
    let parts = parts(disc);
    for (si, prog) in programs.iter().enumerate() {
        if model.stages[si].controls.stabilization > 0.0 {
            continue;
        }
        for nodes in &parts {
            let free = free_motions(disc, nodes, &prog.prescribed);
            if !free.is_empty() {
                return Some(Unheld {
                    stage: si,
                    stage_name: model.stages[si].name.clone(),
                    nodes: nodes.len(),
                    first_node: nodes[0],
                    free,
                });
            }
        }
    }
    None
}

/// The node lists of the mesh's connected parts (nodes of no element left out).
fn parts(disc: &Discretization) -> Vec<Vec<usize>> {
    let mesh = disc.mesh();
    let mut parent: Vec<usize> = (0..mesh.node_count()).collect();
    fn root(parent: &mut [usize], mut a: usize) -> usize {
        while parent[a] != a {
            parent[a] = parent[parent[a]];
            a = parent[a];
        }
        a
    }
    let mut used = vec![false; mesh.node_count()];
    for e in 0..mesh.element_count() {
        let nodes = mesh.element_nodes(e);
        for &n in nodes {
            used[n] = true;
            let (a, b) = (root(&mut parent, nodes[0]), root(&mut parent, n));
            parent[a.max(b)] = a.min(b);
        }
    }
    let mut by_root: std::collections::BTreeMap<usize, Vec<usize>> = Default::default();
    for n in (0..mesh.node_count()).filter(|&n| used[n]) {
        let r = root(&mut parent, n);
        by_root.entry(r).or_default().push(n);
    }
    by_root.into_values().collect()
}

/// The rigid motions of a part: name and value at node position `x`
/// (relative to the part's centre, over its size) for component `i`.
type Mode = (&'static str, fn([f64; 3], usize) -> f64);

fn modes(analysis: Analysis) -> &'static [Mode] {
    const SOLID: [Mode; 6] = [
        ("translation along x", |_, i| f64::from(u8::from(i == 0))),
        ("translation along y", |_, i| f64::from(u8::from(i == 1))),
        ("translation along z", |_, i| f64::from(u8::from(i == 2))),
        ("rotation about x", |x, i| [0.0, -x[2], x[1]][i]),
        ("rotation about y", |x, i| [x[2], 0.0, -x[0]][i]),
        ("rotation about z", |x, i| [-x[1], x[0], 0.0][i]),
    ];
    const PLANE: [Mode; 3] = [
        ("translation along x", |_, i| f64::from(u8::from(i == 0))),
        ("translation along y", |_, i| f64::from(u8::from(i == 1))),
        ("rotation about z", |x, i| [-x[1], x[0], 0.0][i]),
    ];
    const AXISYMMETRIC: [Mode; 1] = [("translation along z", |_, i| f64::from(u8::from(i == 1)))];
    match analysis {
        Analysis::Solid3d => &SOLID,
        Analysis::PlaneStrain { .. } => &PLANE,
        Analysis::Axisymmetric => &AXISYMMETRIC,
    }
}

/// The rigid motions of the part `nodes` that its prescribed dofs leave
/// free, in words: the null space of Σ m mᵀ over its prescribed dofs, m
/// the rigid modes' values there (rotations scaled by the part's size).
fn free_motions(disc: &Discretization, nodes: &[usize], prescribed: &[bool]) -> Vec<String> {
    let (dim, mesh) = (disc.dim, disc.mesh());
    let modes = modes(disc.model.analysis);
    let k = modes.len();
    let mut centre = [0.0; 3];
    for &n in nodes {
        (0..3).for_each(|j| centre[j] += mesh.nodes[n][j] / nodes.len() as f64);
    }
    let size = nodes
        .iter()
        .map(|&n| (0..3).map(|j| (mesh.nodes[n][j] - centre[j]).powi(2)).sum::<f64>().sqrt())
        .fold(0.0, f64::max)
        .max(f64::MIN_POSITIVE);
    let mut g = DMatrix::<f64>::zeros(k, k);
    let mut held = 0usize;
    for &n in nodes {
        let x = [0, 1, 2].map(|j| (mesh.nodes[n][j] - centre[j]) / size);
        for i in (0..dim).filter(|&i| prescribed[n * dim + i]) {
            held += 1;
            let m: Vec<f64> = modes.iter().map(|(_, f)| f(x, i)).collect();
            for a in 0..k {
                for b in 0..k {
                    g[(a, b)] += m[a] * m[b];
                }
            }
        }
    }
    if held == 0 {
        return modes.iter().map(|(name, _)| name.to_string()).collect();
    }
    let eig = SymmetricEigen::new(g);
    let largest = eig.eigenvalues.iter().copied().fold(0.0, f64::max);
    let mut free = Vec::new();
    for (j, &value) in eig.eigenvalues.iter().enumerate() {
        if value > 1e-9 * largest {
            continue;
        }
        let v = eig.eigenvectors.column(j);
        // Name the mode by its largest components (a combination reads "a + b").
        let top = v.iter().map(|c| c.abs()).fold(0.0, f64::max);
        let names: Vec<&str> = modes.iter().zip(v.iter()).filter(|(_, c)| c.abs() > 0.3 * top).map(|((name, _), _)| *name).collect();
        free.push(names.join(" + "));
    }
    free
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::material::{registry, VolumetricForm};
    use crate::model::{Formulation, Model, Stage, Support};
    use olli_mesh::generate;

    fn block(supports: Vec<Support>) -> Model {
        let mesh = generate::rectangle(&generate::RectangleParams { size: [2.0, 1.0], divisions: [2, 1], ..Default::default() }).unwrap();
        let material =
            registry::material("neo-hookean", &[("shear_modulus", 1.0), ("bulk_modulus", 100.0)], VolumetricForm::Quadratic).unwrap();
        let mut model =
            Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, std::sync::Arc::new(material), Formulation::Mixed);
        model.stages.push(Stage { name: "s".into(), supports, ..Default::default() });
        model
    }

    fn free_of(model: &Model) -> Vec<String> {
        let disc = Discretization::new(model).unwrap();
        let (programs, _) = super::super::stages::resolve(&disc).unwrap();
        unheld(&disc, &programs).map(|u| u.free).unwrap_or_default()
    }

    /// Rigid-body kinematics of a plane body (any mechanics text): a body
    /// held in x and y along one edge is fixed; held in y only along an edge
    /// it can still slide along x; held at one edge in x only it can slide
    /// along y; held nowhere, both translations and the rotation are free.
    #[test]
    fn free_motions_of_a_plane_block() {
        let both = Support { set: "bottom".into(), components: [true, true, false] };
        assert!(free_of(&block(vec![both])).is_empty());
        let roller = Support { set: "bottom".into(), components: [false, true, false] };
        assert_eq!(free_of(&block(vec![roller])), ["translation along x"]);
        let wall = Support { set: "left".into(), components: [true, false, false] };
        assert_eq!(free_of(&block(vec![wall])), ["translation along y"]);
        assert_eq!(free_of(&block(vec![])).len(), 3);
    }

    /// Two unit squares of different materials, the left one held along its
    /// bottom: `joined` says whether the right square uses the left one's
    /// nodes where they meet (`corner`: they meet at one corner, else along
    /// the edge x = 1) or has nodes of its own there.
    fn two_squares(joined: bool, corner: bool) -> Model {
        let mut mesh = olli_mesh::Mesh::new(2);
        for p in [[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]] {
            mesh.add_node([p[0], p[1], 0.0]);
        }
        let (y0, y1) = if corner { (1.0, 2.0) } else { (0.0, 1.0) };
        let own = |mesh: &mut olli_mesh::Mesh, x: f64, y: f64| mesh.add_node([x, y, 0.0]);
        let a = if joined && !corner { 1 } else { own(&mut mesh, 1.0, y0) };
        let b = own(&mut mesh, 2.0, y0);
        let c = own(&mut mesh, 2.0, y1);
        let d = if joined { 2 } else { own(&mut mesh, 1.0, y1) };
        mesh.add_element(olli_mesh::ElementKind::Quad4, &[0, 1, 2, 3]);
        mesh.add_element(olli_mesh::ElementKind::Quad4, &[a, b, c, d]);
        mesh.node_sets.insert("base".into(), vec![0, 1]);
        let law = |mu: f64| {
            std::sync::Arc::new(
                registry::material("neo-hookean", &[("shear_modulus", mu), ("bulk_modulus", 100.0 * mu)], VolumetricForm::Quadratic)
                    .unwrap(),
            )
        };
        let mut model = Model::single_region(mesh, Analysis::PlaneStrain { thickness: 1.0 }, law(1.0), Formulation::Mixed);
        model.regions[0].elements = vec![0];
        let mut stiff = model.regions[0].clone();
        (stiff.name, stiff.elements, stiff.material) = ("stiff".into(), vec![1], law(10.0));
        model.regions.push(stiff);
        let base = Support { set: "base".into(), components: [true, true, false] };
        model.stages.push(Stage { name: "s".into(), supports: vec![base], ..Default::default() });
        model
    }

    /// Regions meet through shared nodes only (no element holds nodes of
    /// both): sharing the edge's nodes, or a single corner node, makes one
    /// part, held through its left square; with nodes of its own at the
    /// interface the right square is a part of its own and free in every
    /// rigid motion of a plane body.
    #[test]
    fn parts_joined_only_through_shared_nodes_count_as_one() {
        assert!(free_of(&two_squares(true, false)).is_empty());
        assert!(free_of(&two_squares(true, true)).is_empty());
        let split = two_squares(false, false);
        let disc = Discretization::new(&split).unwrap();
        let (programs, _) = super::super::stages::resolve(&disc).unwrap();
        let free = unheld(&disc, &programs).expect("the right square is free");
        assert_eq!((free.nodes, free.first_node), (4, 4));
        assert_eq!(free.free, ["translation along x", "translation along y", "rotation about z"]);
    }
}
