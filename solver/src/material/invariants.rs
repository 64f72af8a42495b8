//! From invariant derivatives to stress and tangent: the one place where the
//! isochoric second Piola–Kirchhoff stress and its consistent tangent are
//! built, for every model.
//!
//! With `A1 = ∂Ī1/∂C = J^(-2/3) (I − I1/3 C⁻¹)` and
//! `A2 = ∂Ī2/∂C = J^(-4/3) (I1 I − C) − 2/3 Ī2 C⁻¹`:
//!
//! ```text
//! S_iso = 2 (W1 A1 + W2 A2)
//! D_iso = 4 [ W11 A1⊗A1 + W12 (A1⊗A2 + A2⊗A1) + W22 A2⊗A2 + W1 ∂A1/∂C + W2 ∂A2/∂C ]
//! ∂A1/∂C = −1/3 J^(-2/3) (I⊗C⁻¹ + C⁻¹⊗I) + 1/9 Ī1 C⁻¹⊗C⁻¹ + 1/3 Ī1 C⁻¹⊙C⁻¹
//! ∂A2/∂C = J^(-4/3) (I⊗I − 𝕀) − 2/3 J^(-4/3) ((I1 I − C)⊗C⁻¹ + C⁻¹⊗(I1 I − C))
//!          + 4/9 Ī2 C⁻¹⊗C⁻¹ + 2/3 Ī2 C⁻¹⊙C⁻¹
//! ```
//! (using ∂C⁻¹/∂C = −C⁻¹⊙C⁻¹). The finite-difference tests in this module and
//! in each model file check these expressions.

use nalgebra::Matrix3;

use super::error::MaterialError;
use super::tensor::{to_voigt, Tangent, VOIGT_PAIRS};
use super::{IsochoricEnergy, Response, Stress};

/// W_iso and its derivatives with respect to the isochoric invariants.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct InvariantDerivatives {
    /// Isochoric strain energy W_iso (stress units).
    pub w: f64,
    /// ∂W/∂Ī1.
    pub w1: f64,
    /// ∂W/∂Ī2.
    pub w2: f64,
    /// ∂²W/∂Ī1².
    pub w11: f64,
    /// ∂²W/∂Ī1∂Ī2.
    pub w12: f64,
    /// ∂²W/∂Ī2².
    pub w22: f64,
}

/// Invariants of C needed by the isochoric/volumetric split.
#[derive(Debug, Clone, Copy)]
pub struct Kinematics {
    /// Right Cauchy–Green tensor C = FᵀF.
    pub c: Matrix3<f64>,
    /// Its inverse C⁻¹.
    pub c_inv: Matrix3<f64>,
    /// Volume ratio J = det F.
    pub j: f64,
    /// First invariant I1 = tr C.
    pub i1: f64,
    /// Second invariant I2 = ½((tr C)² − tr C²).
    pub i2: f64,
    /// Isochoric first invariant Ī1 = J^(−2/3) I1.
    pub i1_bar: f64,
    /// Isochoric second invariant Ī2 = J^(−4/3) I2.
    pub i2_bar: f64,
    /// J^(−2/3), computed once.
    pub j23: f64,
}

impl Kinematics {
    /// Invariants of a symmetric C; fails if det C ≤ 0.
    pub fn new(c: &Matrix3<f64>) -> Result<Self, MaterialError> {
        let det = c.determinant();
        if !(det > 0.0 && det.is_finite()) {
            return Err(MaterialError::NonPositiveVolume { j: det.max(0.0).sqrt() });
        }
        let j = det.sqrt();
        let c_inv = c.try_inverse().ok_or(MaterialError::NonPositiveVolume { j })?;
        let i1 = c.trace();
        let i2 = 0.5 * (i1 * i1 - (c * c).trace());
        let j23 = j.powf(-2.0 / 3.0);
        Ok(Kinematics { c: *c, c_inv, j, i1, i2, i1_bar: j23 * i1, i2_bar: j23 * j23 * i2, j23 })
    }
}

/// `A1 = ∂Ī1/∂C` and, where the energy depends on Ī2, `A2 = ∂Ī2/∂C`,
/// with S_iso = 2 (W1 A1 + W2 A2): one expression for [`isochoric_response`]
/// and [`isochoric_stress`], so both give the same bits.
#[inline(always)]
fn stress_directions(d: &InvariantDerivatives, kin: &Kinematics) -> (Matrix3<f64>, Option<Matrix3<f64>>, Matrix3<f64>) {
    let ci = &kin.c_inv;
    let j23 = kin.j23;
    let a1 = Matrix3::identity() * j23 - ci * (kin.i1_bar / 3.0);
    let stress_1 = a1 * (2.0 * d.w1);
    if d.w2 != 0.0 || d.w22 != 0.0 || d.w12 != 0.0 {
        let a2 = (Matrix3::identity() * kin.i1 - kin.c) * (j23 * j23) - ci * (2.0 / 3.0 * kin.i2_bar);
        (a1, Some(a2), stress_1 + a2 * (2.0 * d.w2))
    } else {
        (a1, None, stress_1)
    }
}

/// Isochoric energy and S_iso alone (no tangent), for residual-only
/// evaluations: the same bits as [`isochoric_response`]'s.
pub fn isochoric_stress(model: &dyn IsochoricEnergy, kin: &Kinematics) -> Result<Stress, MaterialError> {
    let d = model.derivatives(kin.i1_bar, kin.i2_bar)?;
    Ok(Stress { energy: d.w, stress: stress_directions(&d, kin).2 })
}

/// Isochoric energy, S_iso and D_iso of a model at the given kinematics.
///
/// Every term of D_iso (module docs) is an outer product of the three
/// symmetric tensors I, C⁻¹ and B = I1 I − C (A1 = J^(-2/3) I − Ī1/3 C⁻¹
/// and A2 = J^(-4/3) B − 2/3 Ī2 C⁻¹ are combinations of them) or a multiple
/// of C⁻¹⊙C⁻¹ or I⊙I, so D_iso is formed once, entry by entry, as
/// `Σ_uv M_uv u⊗v + α C⁻¹⊙C⁻¹ − β I⊙I` with the 3×3 coefficients M
/// gathered first: no 6×6 temporaries.
pub fn isochoric_response(model: &dyn IsochoricEnergy, kin: &Kinematics) -> Result<Response, MaterialError> {
    let d = model.derivatives(kin.i1_bar, kin.i2_bar)?;
    let (_, a2, stress) = stress_directions(&d, kin);
    let (j23, i1b, i2b) = (kin.j23, kin.i1_bar, kin.i2_bar);
    let j43 = j23 * j23;
    let (w1, w2, w11, w12, w22) = (4.0 * d.w1, 4.0 * d.w2, 4.0 * d.w11, 4.0 * d.w12, 4.0 * d.w22);
    // M over (I, C⁻¹, B): a diagonal entry multiplies u⊗u, an entry above
    // it u⊗v + v⊗u. A1 = x1 I + y1 C⁻¹, A2 = x2 B + y2 C⁻¹.
    let (x1, y1) = (j23, -i1b / 3.0);
    let (mut m00, mut m01, mut m11) = (0.0, -w1 * j23 / 3.0, w1 * i1b / 9.0);
    let mut alpha = w1 * i1b / 3.0;
    if d.w11 != 0.0 {
        // Zero for the neo-Hookean and Mooney–Rivlin energies, linear in Ī1.
        m00 += w11 * x1 * x1;
        m01 += w11 * x1 * y1;
        m11 += w11 * y1 * y1;
    }
    let ci: [[f64; 3]; 3] = std::array::from_fn(|i| std::array::from_fn(|j| kin.c_inv[(i, j)]));
    let vi = [1.0, 1.0, 1.0, 0.0, 0.0, 0.0];
    let vc: [f64; 6] = to_voigt(&kin.c_inv).into();
    let tangent = if a2.is_some() {
        let (x2, y2) = (j43, -2.0 / 3.0 * i2b);
        // W22 A2⊗A2, W12 (A1⊗A2 + A2⊗A1) and W2 ∂A2/∂C.
        let m22 = w22 * x2 * x2;
        let m12 = w22 * x2 * y2 + w12 * y1 * x2 - w2 * (2.0 / 3.0) * j43;
        let m02 = w12 * x1 * x2;
        m11 += w22 * y2 * y2 + 2.0 * w12 * y1 * y2 + w2 * (4.0 / 9.0) * i2b;
        m01 += w12 * x1 * y2;
        m00 += w2 * j43;
        alpha += w2 * (2.0 / 3.0) * i2b;
        let vb: [f64; 6] = to_voigt(&(Matrix3::identity() * kin.i1 - kin.c)).into();
        let m = [[m00, m01, m02], [m01, m11, m12], [m02, m12, m22]];
        assemble_tangent(&[vi, vc, vb], &m, &ci, alpha, w2 * j43)
    } else {
        assemble_tangent(&[vi, vc], &[[m00, m01], [m01, m11]], &ci, alpha, 0.0)
    };
    Ok(Response { energy: d.w, stress, tangent })
}

/// `Σ_vw M_vw u_v⊗u_w + α C⁻¹⊙C⁻¹ − β I⊙I` (Voigt) from `K` Voigt vectors
/// `u`, their symmetric coefficients `m` and C⁻¹ `ci`: the upper triangle,
/// mirrored.
#[inline(always)]
fn assemble_tangent<const K: usize>(u: &[[f64; 6]; K], m: &[[f64; K]; K], ci: &[[f64; 3]; 3], alpha: f64, beta: f64) -> Tangent {
    // Row p of Σ M u⊗u is Σ_w r_w u_w with r_w = Σ_v M_vw u_v[p].
    let mut r = [[0.0; K]; 6];
    for (p, rp) in r.iter_mut().enumerate() {
        for (w, rw) in rp.iter_mut().enumerate() {
            for v in 0..K {
                *rw += m[v][w] * u[v][p];
            }
        }
    }
    let mut t = Tangent::zeros();
    // Both loops over constant ranges, so they unroll and the index pairs
    // fold; the upper triangle is formed and mirrored.
    for (p, &(i, j)) in VOIGT_PAIRS.iter().enumerate() {
        for (q, &(k, l)) in VOIGT_PAIRS.iter().enumerate() {
            if q < p {
                continue;
            }
            let mut v = alpha * (0.5 * (ci[i][k] * ci[j][l] + ci[i][l] * ci[j][k]));
            for w in 0..K {
                v += r[p][w] * u[w][q];
            }
            if p == q {
                v -= beta * if p < 3 { 1.0 } else { 0.5 };
            }
            t[(p, q)] = v;
            t[(q, p)] = v;
        }
    }
    t
}

#[cfg(test)]
mod tests {
    use crate::material::fd_check::random_deformation;
    use crate::material::{registry, VolumetricForm};

    /// The residual-only path ([`crate::material::Material::stress`],
    /// `isochoric_stress`) gives the energy and stress of the full response
    /// to 1e-13 of the largest stress component, for every model of the
    /// registry at random finite deformations (an independent evaluation
    /// would be the finite differences of `fd_check`; this checks that the
    /// two code paths compute the same thing, so a term lost from one of
    /// them, e.g. the Ī2 direction of Mooney–Rivlin, fails).
    #[test]
    fn stress_alone_equals_the_stress_of_the_full_response() {
        for (name, constants) in registry::SAMPLES {
            let mut all = constants.to_vec();
            all.push(("bulk_modulus", 80.0));
            let mat = registry::material(name, &all, VolumetricForm::Logarithmic).unwrap();
            for seed in 1..6 {
                let f = random_deformation(seed, 0.25);
                let c = f.transpose() * f;
                let pairs = [
                    (mat.stress(&c).unwrap(), mat.response(&c).unwrap()),
                    (mat.isochoric_stress(&c).unwrap(), mat.isochoric_response(&c).unwrap()),
                ];
                for (alone, full) in pairs {
                    let scale = full.stress.amax();
                    assert!(scale > 0.0, "{name}: a stressed state");
                    assert!((alone.energy - full.energy).abs() <= 1e-13 * full.energy.abs(), "{name} seed {seed}: energy");
                    assert!(
                        (alone.stress - full.stress).amax() <= 1e-13 * scale,
                        "{name} seed {seed}: {} vs {}",
                        alone.stress,
                        full.stress
                    );
                }
            }
        }
    }
}
