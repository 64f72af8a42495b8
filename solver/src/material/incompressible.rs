//! Closed-form homogeneous responses of the incompressible material, from
//! the principal Kirchhoff stresses of [`IsochoricModel::principal_kirchhoff`]:
//! the formulas fitting uses (fast, no lateral solve, exact incompressibility).
//!
//! With `τ_i = λ_i ∂W/∂λ_i` and the lateral stresses zero (Rivlin 1948,
//! Phil. Trans. R. Soc. A 241:379–397; Ogden 1972, Proc. R. Soc. A
//! 326:565–584):
//!
//! ```text
//! uniaxial     (λ, λ^-½, λ^-½):  P = (τ1 − τ2)/λ
//! equibiaxial  (λ, λ, λ^-2):     P = (τ1 − τ3)/λ
//! planar       (λ, 1, 1/λ):      P = (τ1 − τ3)/λ
//! simple shear (λ, 1/λ, 1), γ = λ − 1/λ:  P12 = σ12 = γ (τ1 − τ2)/(λ² − λ⁻²)
//! ```
//!
//! The last is the universal relation σ11 − σ22 = γ σ12 of simple shear
//! written in principal stresses. At λ = 1 in simple shear the quotient is
//! the shear modulus-like limit; it is evaluated at a stretch 1e-7 away.

use super::error::MaterialError;
use super::homogeneous::Mode;
use super::IsochoricModel;

/// Nominal stress of the incompressible isochoric model in a shear `mode`
/// at `stretch` (volumetric: 0, the isochoric part carries no stress under
/// pure dilatation) (simple shear: the larger principal
/// stretch, as in [`super::homogeneous`]).
pub fn nominal_stress(model: &dyn IsochoricModel, mode: Mode, stretch: f64) -> Result<f64, MaterialError> {
    let l = stretch;
    match mode {
        Mode::Uniaxial => {
            let t = model.principal_kirchhoff([l, 1.0 / l.sqrt(), 1.0 / l.sqrt()])?;
            Ok((t[0] - t[1]) / l)
        }
        Mode::Equibiaxial => {
            let t = model.principal_kirchhoff([l, l, 1.0 / (l * l)])?;
            Ok((t[0] - t[2]) / l)
        }
        Mode::Planar => {
            let t = model.principal_kirchhoff([l, 1.0, 1.0 / l])?;
            Ok((t[0] - t[2]) / l)
        }
        Mode::SimpleShear => {
            // Symmetric in λ ↔ 1/λ up to the sign of γ; keep away from the 0/0 at λ = 1.
            let l = if (l - 1.0).abs() < 1e-7 { 1.0 + 1e-7 } else { l };
            let gamma = l - 1.0 / l;
            let t = model.principal_kirchhoff([l, 1.0 / l, 1.0])?;
            let ratio = (t[0] - t[1]) / (l * l - 1.0 / (l * l));
            Ok(if (stretch - 1.0).abs() < 1e-7 { ratio * (stretch - 1.0 / stretch) } else { gamma * ratio })
        }
        Mode::Volumetric => Ok(0.0),
    }
}
