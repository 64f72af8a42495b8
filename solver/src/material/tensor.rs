//! Symmetric second- and fourth-order tensors in Voigt form.
//!
//! Order of components: 11, 22, 33, 12, 23, 13. A fourth-order tangent `D`
//! with minor and major symmetries is stored as a 6×6 matrix such that
//! `dS = D · dE` with `dE` in Voigt form with *engineering* shear strains
//! (`2 dE12`, ...). Then `D[(a, b)] = D_ijkl` for `a = (ij)`, `b = (kl)`.

use nalgebra::{Matrix3, SMatrix, SVector};

/// Fourth-order tangent in Voigt form, see the module docs.
pub type Tangent = SMatrix<f64, 6, 6>;
/// Symmetric second-order tensor in Voigt form.
pub type Voigt = SVector<f64, 6>;

/// Index pairs of the Voigt components.
pub const VOIGT_PAIRS: [(usize, usize); 6] = [(0, 0), (1, 1), (2, 2), (0, 1), (1, 2), (0, 2)];

/// The Voigt vector of a symmetric 3×3 tensor (tensor components, no factor 2).
pub fn to_voigt(a: &Matrix3<f64>) -> Voigt {
    Voigt::from_fn(|k, _| {
        let (i, j) = VOIGT_PAIRS[k];
        a[(i, j)]
    })
}

/// The symmetric 3×3 tensor of a Voigt vector (tensor components).
pub fn from_voigt(v: &Voigt) -> Matrix3<f64> {
    Matrix3::new(v[0], v[3], v[5], v[3], v[1], v[4], v[5], v[4], v[2])
}

/// `A ⊗ B` for symmetric A and B.
pub fn outer(a: &Matrix3<f64>, b: &Matrix3<f64>) -> Tangent {
    to_voigt(a) * to_voigt(b).transpose()
}

/// `A ⊗ B + B ⊗ A`.
pub fn outer_sym(a: &Matrix3<f64>, b: &Matrix3<f64>) -> Tangent {
    let (va, vb) = (to_voigt(a), to_voigt(b));
    va * vb.transpose() + vb * va.transpose()
}

/// `(A ⊙ A)_ijkl = ½ (A_ik A_jl + A_il A_jk)` for symmetric A; with `A = I`
/// this is the symmetric fourth-order identity.
pub fn odot(a: &Matrix3<f64>) -> Tangent {
    Tangent::from_fn(|p, q| {
        let (i, j) = VOIGT_PAIRS[p];
        let (k, l) = VOIGT_PAIRS[q];
        0.5 * (a[(i, k)] * a[(j, l)] + a[(i, l)] * a[(j, k)])
    })
}
