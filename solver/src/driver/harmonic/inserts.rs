//! Inserts in a harmonic stage. Each component of an insert is, during the
//! vibration, driven (a `move` or `turn` of the stage: its amplitude),
//! loaded (a `force` or `moment` of the stage: a force amplitude, the
//! component free to move), free with no force amplitude (a component the
//! static stages left loaded or free), or held (every other one).
//!
//! Linearised about the preload, an insert's bonded nodes move by
//! `Σ_k J_k q_k` (the node directions `J_k = ∂u/∂q_k` at the preloaded
//! rotation) and the force the insert applies to the rubber in component j
//! changes by `W_jᵀ F + Σ_k H_jk q_k` (equation weights `W_j`, node forces
//! `F = K* v`, and the arm term H of the preloaded node forces, as in the
//! static Newton equations of [`crate::insert`]). Driven components enter
//! the prescribed amplitude; every free component is one more load case of
//! the complex system (its unit motion), and the free amplitudes follow from
//! the free components' equations, a small dense complex solve.

use crate::insert::Inserts;
use crate::model::{InsertDrive, Stage};

/// What one insert component does in the vibration.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Role {
    /// Prescribed amplitude (length, or radians).
    Driven(f64),
    /// Free, with this force (or moment) amplitude.
    Free(f64),
}

/// One vibrating insert component.
#[derive(Debug, Clone)]
pub struct Component {
    /// Index of the insert.
    pub body: usize,
    /// Component (0..6: x, y, z, rx, ry, rz).
    pub k: usize,
    /// Its role.
    pub role: Role,
}

/// The vibrating components of every insert in harmonic stage `stage`
/// (held ones are left out).
pub fn components(stage: &Stage, inserts: &Inserts) -> Vec<Component> {
    let mut out = Vec::new();
    for (body, b) in inserts.bodies.iter().enumerate() {
        for k in (0..6).filter(|&k| inserts.is_active(k)) {
            let drive = stage.inserts.iter().filter(|d| d.insert == b.name).find_map(|d| d.components[k]);
            let role = match drive {
                Some(InsertDrive::Move(a)) => Role::Driven(a),
                Some(InsertDrive::Load(f)) => Role::Free(f),
                None if inserts.is_loaded(body, k) => Role::Free(0.0),
                None => continue,
            };
            out.push(Component { body, k, role });
        }
    }
    out
}

/// A complex number as (real, imaginary).
pub type Complex = (f64, f64);

/// The generalized force `W_jᵀ F + Σ_k H_jk q_k` of `row` for the complex
/// node forces `force` (real parts, then imaginary parts, each `ndof`) and
/// the insert coordinates `q` of the same load case (one per component of
/// `list`), with the preloaded node forces `preload`.
pub fn generalized_force(inserts: &Inserts, list: &[Component], row: &Component, force: &[f64], q: &[Complex], preload: &[f64]) -> Complex {
    let ndof = preload.len();
    let mut j = vec![0.0; ndof];
    let mut w = vec![0.0; ndof];
    inserts.add_component_vectors(row.body, row.k, 1.0, &mut j, &mut w);
    let mut re: f64 = w.iter().zip(&force[..ndof]).map(|(a, b)| a * b).sum();
    let mut im: f64 = w.iter().zip(&force[ndof..]).map(|(a, b)| a * b).sum();
    for (c, qc) in list.iter().zip(q).filter(|(c, _)| c.body == row.body) {
        let h = inserts.arm_term(row.body, row.k, c.k, preload);
        re += h * qc.0;
        im += h * qc.1;
    }
    (re, im)
}

/// Solves the dense complex system `A c = b` (row-major n × n) by its real
/// form of twice the size; `None` when it is singular.
pub fn solve_complex(a: &[Complex], b: &[Complex]) -> Option<Vec<Complex>> {
    use faer::linalg::solvers::Solve;
    let n = b.len();
    let mut m = faer::Mat::<f64>::zeros(2 * n, 2 * n);
    let mut r = faer::Mat::<f64>::zeros(2 * n, 1);
    for i in 0..n {
        for j in 0..n {
            let (x, y) = a[i * n + j];
            m[(i, j)] = x;
            m[(i, n + j)] = -y;
            m[(n + i, j)] = y;
            m[(n + i, n + j)] = x;
        }
        r[(i, 0)] = b[i].0;
        r[(n + i, 0)] = b[i].1;
    }
    let x = m.partial_piv_lu().solve(&r);
    let c: Vec<Complex> = (0..n).map(|i| (x[(i, 0)], x[(n + i, 0)])).collect();
    c.iter().all(|v| v.0.is_finite() && v.1.is_finite()).then_some(c)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn complex_solve_matches_a_hand_worked_system() {
        // A 2 × 2 complex system whose right-hand side is made from a chosen solution.
        let a = [(1.0, 1.0), (2.0, 0.0), (0.0, 1.0), (1.0, -1.0)];
        let x = (1.0, 0.0);
        let y = (1.0, -1.0);
        let mul = |p: Complex, q: Complex| (p.0 * q.0 - p.1 * q.1, p.0 * q.1 + p.1 * q.0);
        let add = |p: Complex, q: Complex| (p.0 + q.0, p.1 + q.1);
        let b = [add(mul(a[0], x), mul(a[1], y)), add(mul(a[2], x), mul(a[3], y))];
        let c = solve_complex(&a, &b).unwrap();
        for (got, want) in c.iter().zip([x, y]) {
            assert!((got.0 - want.0).abs() < 1e-14 && (got.1 - want.1).abs() < 1e-14, "{got:?} vs {want:?}");
        }
        assert!(solve_complex(&[(0.0, 0.0)], &[(1.0, 0.0)]).is_none());
    }
}
