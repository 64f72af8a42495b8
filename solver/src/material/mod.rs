//! # Constitutive library
//!
//! Hyperelastic models for rubber, written against the right Cauchy–Green
//! tensor `C = FᵀF` alone: this module knows nothing of elements, meshes or
//! files.
//!
//! Every model uses the isochoric/volumetric split
//!
//! ```text
//! W(C) = W_iso(Ī1, Ī2) + U(J),   Ī1 = J^(-2/3) I1,  Ī2 = J^(-4/3) I2,  J = sqrt(det C)
//! ```
//!
//! Models: [`neo_hookean`], [`mooney_rivlin`] (the Ī2-dependent one),
//! [`yeoh`] and [`eight_chain`] (Arruda–Boyce, with the inverse Langevin
//! function of [`langevin`]); volumetric laws in [`volumetric`]. The
//! [`registry`] builds a [`Material`] from a model name and named constants.
//! [`homogeneous`] computes uniaxial, equibiaxial, planar, simple-shear and
//! volumetric responses through the general 3-D routine, and [`stability`]
//! checks Drucker stability along them.
//!
//! A model implements one trait, [`IsochoricEnergy`]: the energy and its first
//! and second derivatives with respect to the isochoric invariants. Everything
//! else — the second Piola–Kirchhoff stress, the consistent material tangent,
//! and the separate pieces a mixed u–p element needs — is derived here once, in
//! [`Material`], so adding a model touches one file (plus a row and a match arm in
//! [`registry`]).

pub mod eight_chain;
pub mod error;
pub mod fd_check;
pub mod homogeneous;
pub mod invariants;
pub mod langevin;
pub mod mooney_rivlin;
pub mod neo_hookean;
pub mod registry;
pub mod stability;
pub mod tensor;
pub mod volumetric;
pub mod yeoh;

pub use error::MaterialError;
pub use invariants::{isochoric_response, InvariantDerivatives, Kinematics};
pub use tensor::{Tangent, Voigt};
pub use volumetric::{VolumetricForm, VolumetricLaw};

use nalgebra::Matrix3;

/// Isochoric strain energy W_iso(Ī1, Ī2) of one hyperelastic model.
pub trait IsochoricEnergy: Send + Sync + std::fmt::Debug {
    /// Model name as written in material tables (`neo-hookean`, ...).
    fn name(&self) -> &'static str;

    /// W_iso and its derivatives with respect to Ī1 and Ī2 at the given
    /// invariants. Fails (rather than returning NaN) where the model is not
    /// defined, e.g. at the eight-chain locking stretch.
    fn derivatives(&self, i1b: f64, i2b: f64) -> Result<InvariantDerivatives, MaterialError>;

    /// Small-strain shear modulus μ = 2 (∂W/∂Ī1 + ∂W/∂Ī2) at Ī1 = Ī2 = 3.
    fn shear_modulus(&self) -> f64;
}

/// Stress and tangent at one state.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Response {
    /// Strain energy density per unit reference volume.
    pub energy: f64,
    /// Second Piola–Kirchhoff stress S = 2 ∂W/∂C.
    pub stress: Matrix3<f64>,
    /// Material tangent 4 ∂²W/∂C∂C in Voigt form (see [`tensor`]).
    pub tangent: Tangent,
}

/// One rubber compound: an isochoric model plus a volumetric law.
#[derive(Debug)]
pub struct Material {
    pub isochoric: Box<dyn IsochoricEnergy>,
    pub volumetric: VolumetricLaw,
}

impl Material {
    pub fn new(isochoric: Box<dyn IsochoricEnergy>, volumetric: VolumetricLaw) -> Self {
        Material { isochoric, volumetric }
    }

    /// Small-strain shear modulus μ.
    pub fn shear_modulus(&self) -> f64 {
        self.isochoric.shear_modulus()
    }

    /// Small-strain bulk modulus κ.
    pub fn bulk_modulus(&self) -> f64 {
        self.volumetric.bulk_modulus
    }

    /// Small-strain Poisson's ratio ν = (3κ − 2μ) / (6κ + 2μ).
    pub fn poisson_ratio(&self) -> f64 {
        let (mu, k) = (self.shear_modulus(), self.bulk_modulus());
        (3.0 * k - 2.0 * mu) / (6.0 * k + 2.0 * mu)
    }

    /// The isochoric part alone: W_iso, S_iso and its tangent. This is what a
    /// mixed u–p element calls; it adds the pressure terms itself from
    /// [`VolumetricLaw::pressure`] and [`VolumetricLaw::pressure_derivative`].
    pub fn isochoric_response(&self, c: &Matrix3<f64>) -> Result<Response, MaterialError> {
        let kin = Kinematics::new(c)?;
        isochoric_response(self.isochoric.as_ref(), &kin)
    }

    /// The full response W, S = S_iso + J U'(J) C⁻¹ and its tangent, for
    /// displacement-only elements and homogeneous tests.
    pub fn response(&self, c: &Matrix3<f64>) -> Result<Response, MaterialError> {
        let kin = Kinematics::new(c)?;
        let mut r = isochoric_response(self.isochoric.as_ref(), &kin)?;
        let (j, ci) = (kin.j, &kin.c_inv);
        let p = self.volumetric.pressure(j)?;
        let dp = self.volumetric.pressure_derivative(j)?;
        r.energy += self.volumetric.energy(j)?;
        r.stress += ci * (j * p);
        // D_vol = J (p + J p') C⁻¹⊗C⁻¹ − 2 J p C⁻¹⊙C⁻¹
        r.tangent += tensor::outer(ci, ci) * (j * (p + j * dp)) - tensor::odot(ci) * (2.0 * j * p);
        Ok(r)
    }

    /// Strain energy density W(C).
    pub fn energy(&self, c: &Matrix3<f64>) -> Result<f64, MaterialError> {
        let kin = Kinematics::new(c)?;
        let d = self.isochoric.derivatives(kin.i1_bar, kin.i2_bar)?;
        Ok(d.w + self.volumetric.energy(kin.j)?)
    }
}
