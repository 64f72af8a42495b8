//! Builds a [`Material`] from a model name and named constants, as they come
//! from a material table (the table's file format is parsed at the edge; this
//! module sees only names and numbers).

use super::error::MaterialError;
use super::neo_hookean::NeoHookean;
use super::volumetric::{VolumetricForm, VolumetricLaw};
use super::{IsochoricEnergy, Material};

/// Names of the models olli knows, as written in material tables.
pub const MODEL_NAMES: &[&str] = &["neo-hookean"];

/// Constants of the volumetric part common to every model.
pub const VOLUMETRIC_KEYS: &[&str] = &["bulk_modulus", "poisson_ratio"];

/// Named constants of one material table, in input order.
pub type Constants<'a> = &'a [(&'a str, f64)];

fn take(model: &'static str, constants: Constants, name: &'static str) -> Result<f64, MaterialError> {
    constants
        .iter()
        .find(|(k, _)| *k == name)
        .map(|&(_, v)| v)
        .ok_or(MaterialError::MissingParameter { model, name })
}

fn reject_extra(model: &'static str, constants: Constants, allowed: &[&str]) -> Result<(), MaterialError> {
    for (k, _) in constants {
        if !allowed.contains(k) && !VOLUMETRIC_KEYS.contains(k) {
            return Err(MaterialError::UnexpectedParameter {
                model,
                name: k.to_string(),
                allowed: allowed.join(", "),
            });
        }
    }
    Ok(())
}

/// The isochoric model `name` with its constants (volumetric keys are ignored here).
pub fn isochoric_model(name: &str, constants: Constants) -> Result<Box<dyn IsochoricEnergy>, MaterialError> {
    match name {
        "neo-hookean" => {
            const M: &str = "neo-hookean";
            reject_extra(M, constants, &["shear_modulus"])?;
            Ok(Box::new(NeoHookean::new(take(M, constants, "shear_modulus")?)?))
        }
        other => Err(MaterialError::UnknownModel(other.to_string())),
    }
}

/// A full material: the isochoric model plus the volumetric law, with κ from
/// `bulk_modulus` or from `poisson_ratio` (exactly one of them).
pub fn material(name: &str, constants: Constants, form: VolumetricForm) -> Result<Material, MaterialError> {
    let iso = isochoric_model(name, constants)?;
    let bulk = constants.iter().find(|(k, _)| *k == "bulk_modulus").map(|p| p.1);
    let poisson = constants.iter().find(|(k, _)| *k == "poisson_ratio").map(|p| p.1);
    let kappa = match (bulk, poisson) {
        (Some(k), None) => k,
        (None, Some(nu)) => VolumetricLaw::bulk_modulus_from_poisson(iso.shear_modulus(), nu)?,
        (Some(_), Some(_)) => {
            return Err(MaterialError::UnexpectedParameter {
                model: iso.name(),
                name: "poisson_ratio".into(),
                allowed: "bulk_modulus or poisson_ratio, not both".into(),
            })
        }
        (None, None) => {
            return Err(MaterialError::MissingParameter {
                model: iso.name(),
                name: "bulk_modulus",
            })
        }
    };
    Ok(Material::new(iso, VolumetricLaw::new(form, kappa)?))
}
