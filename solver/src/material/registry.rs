//! Builds a [`Material`] from a model name and named constants, as they come
//! from a material table (the table's file format is parsed at the edge; this
//! module sees only names and numbers).
//!
//! Adding a model: write its file, then add one row to [`MODELS`] and one arm
//! to [`isochoric_model`].

use super::eight_chain::EightChain;
use super::error::MaterialError;
use super::mooney_rivlin::MooneyRivlin;
use super::neo_hookean::NeoHookean;
use super::volumetric::{VolumetricForm, VolumetricLaw};
use super::yeoh::Yeoh;
use super::{IsochoricEnergy, Material};

/// Each model olli knows, as written in material tables, with the constants
/// it takes (besides the volumetric ones). Neo-Hookean takes `shear_modulus`
/// or, equivalently, `c10 = μ/2`.
pub const MODELS: &[(&str, &[&str])] = &[
    ("neo-hookean", &["shear_modulus", "c10"]),
    ("mooney-rivlin", &["c10", "c01"]),
    ("yeoh", &["c10", "c20", "c30"]),
    ("eight-chain", &["shear_modulus", "locking_stretch"]),
];

/// Names of the models olli knows.
pub const MODEL_NAMES: &[&str] = &["neo-hookean", "mooney-rivlin", "yeoh", "eight-chain"];

/// Constants of the volumetric part common to every model (exactly one of them).
pub const VOLUMETRIC_KEYS: &[&str] = &["bulk_modulus", "poisson_ratio"];

/// Every constant name any model takes, volumetric ones included.
pub const ALL_CONSTANTS: &[&str] = &["shear_modulus", "c10", "c01", "c20", "c30", "locking_stretch", "bulk_modulus", "poisson_ratio"];

/// Named constants of one material table, in input order.
pub type Constants<'a> = &'a [(&'a str, f64)];

/// The constants `model` takes, or `None` for an unknown model.
pub fn model_constants(model: &str) -> Option<&'static [&'static str]> {
    MODELS.iter().find(|(m, _)| *m == model).map(|(_, k)| *k)
}

/// The value of `name`, if given once; an error if given twice.
fn find(model: &'static str, constants: Constants, name: &'static str) -> Result<Option<f64>, MaterialError> {
    let mut hits = constants.iter().filter(|(k, _)| *k == name);
    let first = hits.next().map(|&(_, v)| v);
    if hits.next().is_some() {
        return Err(MaterialError::DuplicateParameter { model, name });
    }
    Ok(first)
}

fn take(model: &'static str, constants: Constants, name: &'static str) -> Result<f64, MaterialError> {
    find(model, constants, name)?.ok_or(MaterialError::MissingParameter { model, name })
}

fn reject_extra(model: &'static str, constants: Constants) -> Result<(), MaterialError> {
    let allowed = model_constants(model).unwrap_or(&[]);
    for (k, _) in constants {
        if !allowed.contains(k) && !VOLUMETRIC_KEYS.contains(k) {
            return Err(MaterialError::UnexpectedParameter {
                model,
                name: k.to_string(),
                allowed: allowed.iter().chain(VOLUMETRIC_KEYS).copied().collect::<Vec<_>>().join(", "),
            });
        }
    }
    Ok(())
}

/// The isochoric model `name` with its constants (volumetric keys are ignored here).
pub fn isochoric_model(name: &str, constants: Constants) -> Result<Box<dyn IsochoricEnergy>, MaterialError> {
    let model: &'static str = MODEL_NAMES.iter().find(|m| **m == name).ok_or_else(|| MaterialError::UnknownModel(name.to_string()))?;
    reject_extra(model, constants)?;
    let take = |key| take(model, constants, key);
    Ok(match model {
        "neo-hookean" => {
            let mu = match (find(model, constants, "shear_modulus")?, find(model, constants, "c10")?) {
                (Some(mu), None) => mu,
                (None, Some(c10)) => 2.0 * c10,
                (Some(_), Some(_)) => return Err(MaterialError::ConflictingParameters { model, name: "shear_modulus", other: "c10" }),
                (None, None) => return Err(MaterialError::MissingParameter { model, name: "shear_modulus" }),
            };
            Box::new(NeoHookean::new(mu)?)
        }
        "mooney-rivlin" => Box::new(MooneyRivlin::new(take("c10")?, take("c01")?)?),
        "yeoh" => Box::new(Yeoh::new(take("c10")?, take("c20")?, take("c30")?)?),
        "eight-chain" => Box::new(EightChain::new(take("shear_modulus")?, take("locking_stretch")?)?),
        _ => return Err(MaterialError::UnknownModel(name.to_string())),
    })
}

/// A full material: the isochoric model plus the volumetric law, with κ from
/// `bulk_modulus` or from `poisson_ratio` (exactly one of them).
pub fn material(name: &str, constants: Constants, form: VolumetricForm) -> Result<Material, MaterialError> {
    let iso = isochoric_model(name, constants)?;
    let model = iso.name();
    let bulk = find(model, constants, "bulk_modulus")?;
    let poisson = find(model, constants, "poisson_ratio")?;
    let kappa = match (bulk, poisson) {
        (Some(k), None) => k,
        (None, Some(nu)) => VolumetricLaw::bulk_modulus_from_poisson(iso.shear_modulus(), nu)?,
        (Some(_), Some(_)) => return Err(MaterialError::ConflictingParameters { model, name: "bulk_modulus", other: "poisson_ratio" }),
        (None, None) => return Err(MaterialError::MissingParameter { model, name: "bulk_modulus" }),
    };
    Ok(Material::new(iso, VolumetricLaw::new(form, kappa)?))
}

#[cfg(test)]
mod tests {
    use super::*;

    // Bookkeeping: the name list, the key table and the builder agree.
    #[test]
    fn every_model_name_has_keys_and_a_builder() {
        assert_eq!(MODEL_NAMES.len(), MODELS.len());
        for (name, keys) in MODELS {
            assert!(MODEL_NAMES.contains(name));
            assert!(keys.iter().all(|k| ALL_CONSTANTS.contains(k)));
            // Unit values are admissible for every model's constants.
            let mut c: Vec<(&str, f64)> = keys.iter().map(|k| (*k, 2.0)).collect();
            if *name == "neo-hookean" {
                c.retain(|(k, _)| *k != "c10");
            }
            let built = isochoric_model(name, &c).unwrap();
            assert_eq!(built.name(), *name);
        }
    }
}
