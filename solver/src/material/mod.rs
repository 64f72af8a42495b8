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
//! [`yeoh`], [`gent`], [`eight_chain`] (Arruda–Boyce, with the inverse
//! Langevin function of [`langevin`]) and [`ogden`] (N terms in the principal
//! stretches); volumetric laws in [`volumetric`]. The
//! [`registry`] builds a [`Material`] from a model name and named constants.
//! A [`Prony`] series ([`viscoelastic`]) makes the isochoric part of any of
//! them viscoelastic, and [`Mullins`] softening ([`mullins`], Ogden–Roxburgh)
//! softens it after its first loading; such a material keeps history
//! variables per integration point ([`history`]).
//! [`homogeneous`] computes uniaxial, equibiaxial, planar, simple-shear and
//! volumetric responses through the general 3-D routine, and [`stability`]
//! checks Drucker stability along them.
//!
//! Elements and tests see a model through [`IsochoricModel`]: the isochoric
//! energy, stress and tangent at given kinematics, and the principal
//! Kirchhoff stresses of an incompressible state (for the closed-form
//! homogeneous responses used in fitting). A model written in the invariants
//! implements the smaller trait [`IsochoricEnergy`] — the energy and its first
//! and second derivatives with respect to Ī1, Ī2 — and gets everything else
//! derived once, in [`invariants`]. A model that is not a function of the
//! invariants in closed form (Ogden, in the principal stretches) implements
//! [`IsochoricModel`] directly. Adding a model touches one file plus a row
//! and a match arm in [`registry`], whose sample list drives the generated
//! finite-difference checks.

pub mod eight_chain;
pub mod error;
pub mod fd_check;
pub mod gent;
pub mod history;
pub mod homogeneous;
pub mod incompressible;
pub mod invariants;
pub mod langevin;
pub mod mooney_rivlin;
pub mod mullins;
pub mod neo_hookean;
pub mod ogden;
pub mod registry;
pub mod stability;
pub mod tensor;
pub mod viscoelastic;
pub mod volumetric;
pub mod yeoh;

pub use error::MaterialError;
pub use history::{PointHistory, TangentKind};
pub use invariants::{isochoric_response, isochoric_stress, InvariantDerivatives, Kinematics};
pub use mullins::Mullins;
pub use tensor::{Tangent, Voigt};
pub use viscoelastic::Prony;
pub use volumetric::{VolumetricForm, VolumetricLaw};

use nalgebra::Matrix3;

/// Isochoric strain energy W_iso(Ī1, Ī2) of one hyperelastic model written in
/// the invariants; [`IsochoricModel`] follows from it.
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

/// The isochoric part of a hyperelastic model as elements and homogeneous
/// tests use it. Implemented for every [`IsochoricEnergy`]; models in the
/// principal stretches implement it directly.
pub trait IsochoricModel: Send + Sync + std::fmt::Debug {
    /// Model name as written in material tables (`neo-hookean`, ...).
    fn name(&self) -> &'static str;

    /// Small-strain shear modulus μ.
    fn shear_modulus(&self) -> f64;

    /// W_iso at the given kinematics.
    fn energy(&self, kin: &Kinematics) -> Result<f64, MaterialError>;

    /// W_iso, S_iso and D_iso at the given kinematics.
    fn response(&self, kin: &Kinematics) -> Result<Response, MaterialError>;

    /// W_iso and S_iso alone, for evaluations that need no tangent (the
    /// residual of a line-search trial or a convergence check): the same
    /// bits as [`Self::response`]'s energy and stress. This default forms
    /// the whole response; a model whose tangent costs more overrides it.
    fn stress(&self, kin: &Kinematics) -> Result<Stress, MaterialError> {
        let r = self.response(kin)?;
        Ok(Stress { energy: r.energy, stress: r.stress })
    }

    /// Principal Kirchhoff stresses `τ_i = λ_i ∂W_iso/∂λ_i` of the
    /// incompressible material at principal stretches with `λ1 λ2 λ3 = 1`,
    /// up to the common hydrostatic pressure (only differences are
    /// meaningful). The closed-form homogeneous responses are built on these.
    fn principal_kirchhoff(&self, stretches: [f64; 3]) -> Result<[f64; 3], MaterialError>;
}

impl<T: IsochoricEnergy> IsochoricModel for T {
    fn name(&self) -> &'static str {
        IsochoricEnergy::name(self)
    }

    fn shear_modulus(&self) -> f64 {
        IsochoricEnergy::shear_modulus(self)
    }

    fn energy(&self, kin: &Kinematics) -> Result<f64, MaterialError> {
        Ok(self.derivatives(kin.i1_bar, kin.i2_bar)?.w)
    }

    fn response(&self, kin: &Kinematics) -> Result<Response, MaterialError> {
        isochoric_response(self, kin)
    }

    fn stress(&self, kin: &Kinematics) -> Result<Stress, MaterialError> {
        isochoric_stress(self, kin)
    }

    fn principal_kirchhoff(&self, l: [f64; 3]) -> Result<[f64; 3], MaterialError> {
        // ∂I1/∂λ_i = 2λ_i, ∂I2/∂λ_i = 2λ_i (I1 − λ_i²).
        let sq = l.map(|x| x * x);
        let i1: f64 = sq.iter().sum();
        let i2 = sq[0] * sq[1] + sq[1] * sq[2] + sq[2] * sq[0];
        let d = self.derivatives(i1, i2)?;
        Ok(sq.map(|s| 2.0 * s * (d.w1 + d.w2 * (i1 - s))))
    }
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

/// Energy and stress at one state, without the tangent.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stress {
    /// Strain energy density per unit reference volume.
    pub energy: f64,
    /// Second Piola–Kirchhoff stress S = 2 ∂W/∂C.
    pub stress: Matrix3<f64>,
}

/// One rubber compound: an isochoric model plus a volumetric law, and
/// optionally a Prony series that makes the isochoric part viscoelastic
/// ([`viscoelastic`]; the isochoric constants are then the instantaneous ones).
#[derive(Debug)]
pub struct Material {
    /// The isochoric (shape-changing) strain energy.
    pub isochoric: Box<dyn IsochoricModel>,
    /// The volumetric strain energy U(J).
    pub volumetric: VolumetricLaw,
    /// Prony series of the isochoric part's relaxation (`None`: elastic).
    pub viscoelastic: Option<Prony>,
    /// Mullins softening of the isochoric part (`None`: none). Applied to
    /// the elastic response before any relaxation.
    pub mullins: Option<Mullins>,
}

impl Material {
    /// An elastic material (no history).
    pub fn new(isochoric: Box<dyn IsochoricModel>, volumetric: VolumetricLaw) -> Self {
        Material { isochoric, volumetric, viscoelastic: None, mullins: None }
    }

    /// The same material with its isochoric part relaxing by `prony`.
    pub fn with_prony(mut self, prony: Prony) -> Self {
        self.viscoelastic = Some(prony);
        self
    }

    /// The same material softened after its first loading by `mullins`.
    pub fn with_mullins(mut self, mullins: Mullins) -> Self {
        self.mullins = Some(mullins);
        self
    }

    /// History values per integration point (see [`history`]); 0 for an
    /// elastic material, which is then evaluated without any. Mullins
    /// softening keeps its value first, then the Prony series its own.
    pub fn history_len(&self) -> usize {
        self.mullins_len() + self.viscoelastic.as_ref().map_or(0, Prony::history_len)
    }

    fn mullins_len(&self) -> usize {
        if self.mullins.is_some() {
            mullins::HISTORY_LEN
        } else {
            0
        }
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
        self.isochoric.response(&kin)
    }

    /// The full response W, S = S_iso + J U'(J) C⁻¹ and its tangent, for
    /// displacement-only elements and homogeneous tests. A viscoelastic
    /// material answers with its instantaneous (elastic) response.
    pub fn response(&self, c: &Matrix3<f64>) -> Result<Response, MaterialError> {
        let kin = Kinematics::new(c)?;
        let r = self.isochoric.response(&kin)?;
        self.add_volumetric(&kin, r)
    }

    /// W_iso and S_iso alone ([`IsochoricModel::stress`]): the residual-only
    /// counterpart of [`Self::isochoric_response`], the same bits.
    pub fn isochoric_stress(&self, c: &Matrix3<f64>) -> Result<Stress, MaterialError> {
        let kin = Kinematics::new(c)?;
        self.isochoric.stress(&kin)
    }

    /// W and S alone: the residual-only counterpart of [`Self::response`],
    /// the same bits.
    pub fn stress(&self, c: &Matrix3<f64>) -> Result<Stress, MaterialError> {
        let kin = Kinematics::new(c)?;
        let mut r = self.isochoric.stress(&kin)?;
        self.add_volumetric_stress(&kin, &mut r.energy, &mut r.stress)?;
        Ok(r)
    }

    /// As [`Self::isochoric_response`] (`full = false`) or
    /// [`Self::response`] (`full = true`), with the history of the point: a
    /// viscoelastic material relaxes its isochoric stress over
    /// `history.time_step` and writes its trial history.
    pub fn response_with_history(&self, c: &Matrix3<f64>, full: bool, history: &mut PointHistory) -> Result<Response, MaterialError> {
        let kin = Kinematics::new(c)?;
        let mut r = self.isochoric.response(&kin)?;
        let skip = self.mullins_len();
        if let Some(m) = &self.mullins {
            let (softened, w_max) = m.respond(r, history.previous[0]);
            history.current[0] = w_max;
            r = softened;
        }
        if let Some(prony) = &self.viscoelastic {
            let mut rest = PointHistory {
                previous: &history.previous[skip..],
                current: &mut history.current[skip..],
                time_step: history.time_step,
                tangent: history.tangent,
            };
            r = prony.respond(r, &mut rest);
        }
        if full {
            self.add_volumetric(&kin, r)
        } else {
            Ok(r)
        }
    }

    /// `r` (an isochoric response) plus the volumetric law's energy, stress and tangent.
    fn add_volumetric(&self, kin: &Kinematics, mut r: Response) -> Result<Response, MaterialError> {
        let (j, ci) = (kin.j, &kin.c_inv);
        let p = self.add_volumetric_stress(kin, &mut r.energy, &mut r.stress)?;
        let dp = self.volumetric.pressure_derivative(j)?;
        // D_vol = J (p + J p') C⁻¹⊗C⁻¹ − 2 J p C⁻¹⊙C⁻¹
        r.tangent += tensor::outer(ci, ci) * (j * (p + j * dp)) - tensor::odot(ci) * (2.0 * j * p);
        Ok(r)
    }

    /// Adds U(J) to `energy` and J U'(J) C⁻¹ to `stress`; returns U'(J).
    fn add_volumetric_stress(&self, kin: &Kinematics, energy: &mut f64, stress: &mut Matrix3<f64>) -> Result<f64, MaterialError> {
        let (j, ci) = (kin.j, &kin.c_inv);
        let p = self.volumetric.pressure(j)?;
        *energy += self.volumetric.energy(j)?;
        *stress += ci * (j * p);
        Ok(p)
    }

    /// Strain energy density W(C).
    pub fn energy(&self, c: &Matrix3<f64>) -> Result<f64, MaterialError> {
        let kin = Kinematics::new(c)?;
        Ok(self.isochoric.energy(&kin)? + self.volumetric.energy(kin.j)?)
    }
}
