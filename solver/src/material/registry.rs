//! Builds a [`Material`] from a model name and named constants, as they come
//! from a material table (the table's file format is parsed at the edge; this
//! module sees only names and numbers).
//!
//! Adding a model: write its file, then add one row to [`MODELS`], one arm
//! to [`isochoric_model`] and its sample constants to [`SAMPLES`] (the
//! finite-difference and fitting checks run over that list, and a test fails
//! if a model is missing from it).
//!
//! List-valued constants ([`LIST_CONSTANTS`]: Ogden's `mu` and `alpha`) appear
//! once per term, in term order; every other constant at most once.

use super::eight_chain::EightChain;
use super::error::MaterialError;
use super::gent::Gent;
use super::mooney_rivlin::MooneyRivlin;
use super::neo_hookean::NeoHookean;
use super::ogden::Ogden;
use super::volumetric::{VolumetricForm, VolumetricLaw};
use super::yeoh::Yeoh;
use super::{IsochoricModel, Material};

/// Each model olli knows, as written in material tables, with the constants
/// it takes (besides the volumetric ones). Neo-Hookean takes `shear_modulus`
/// or, equivalently, `c10 = μ/2`.
pub const MODELS: &[(&str, &[&str])] = &[
    ("neo-hookean", &["shear_modulus", "c10"]),
    ("mooney-rivlin", &["c10", "c01"]),
    ("yeoh", &["c10", "c20", "c30"]),
    ("eight-chain", &["shear_modulus", "locking_stretch"]),
    ("gent", &["shear_modulus", "extensibility_limit"]),
    ("ogden", &["mu", "alpha"]),
];

/// Names of the models olli knows.
pub const MODEL_NAMES: &[&str] = &["neo-hookean", "mooney-rivlin", "yeoh", "eight-chain", "gent", "ogden"];

/// Constants that take one value per term (a TOML array), in term order.
pub const LIST_CONSTANTS: &[&str] = &["mu", "alpha"];

/// Sample constants of every model (admissible, typical of a filled rubber
/// in MPa, and exercising every term: a negative `c20`, a negative-exponent
/// Ogden term). The generated checks — stress and tangent against finite
/// differences, fits of noise-free data back to the constants — run over
/// this list, and a test fails when a model in [`MODELS`] has no entry.
pub const SAMPLES: &[(&str, &[(&str, f64)])] = &[
    ("neo-hookean", &[("shear_modulus", 0.8)]),
    ("mooney-rivlin", &[("c10", 0.3), ("c01", 0.15)]),
    ("yeoh", &[("c10", 0.5), ("c20", -0.05), ("c30", 0.004)]),
    ("eight-chain", &[("shear_modulus", 0.7), ("locking_stretch", 2.2)]),
    ("gent", &[("shear_modulus", 0.6), ("extensibility_limit", 12.0)]),
    ("ogden", &[("mu", 0.63), ("alpha", 1.3), ("mu", 0.0012), ("alpha", 5.0), ("mu", -0.01), ("alpha", -2.0)]),
];

/// Constants of the volumetric part common to every model (exactly one of them).
pub const VOLUMETRIC_KEYS: &[&str] = &["bulk_modulus", "poisson_ratio"];

/// Every constant name any model takes, volumetric ones included.
pub const ALL_CONSTANTS: &[&str] = &[
    "shear_modulus",
    "c10",
    "c01",
    "c20",
    "c30",
    "locking_stretch",
    "extensibility_limit",
    "mu",
    "alpha",
    "bulk_modulus",
    "poisson_ratio",
];

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

/// Every value of a list constant, in order (empty if not given).
fn list(constants: Constants, name: &str) -> Vec<f64> {
    constants.iter().filter(|(k, _)| *k == name).map(|&(_, v)| v).collect()
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
pub fn isochoric_model(name: &str, constants: Constants) -> Result<Box<dyn IsochoricModel>, MaterialError> {
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
        "gent" => Box::new(Gent::new(take("shear_modulus")?, take("extensibility_limit")?)?),
        "ogden" => {
            let (mu, alpha) = (list(constants, "mu"), list(constants, "alpha"));
            if mu.is_empty() {
                return Err(MaterialError::MissingParameter { model, name: "mu" });
            }
            if alpha.is_empty() {
                return Err(MaterialError::MissingParameter { model, name: "alpha" });
            }
            Box::new(Ogden::new(mu, alpha)?)
        }
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

    // Bookkeeping: the name list, the key table, the samples and the builder agree.
    #[test]
    fn every_model_name_has_keys_samples_and_a_builder() {
        assert_eq!(MODEL_NAMES.len(), MODELS.len());
        assert_eq!(SAMPLES.len(), MODELS.len());
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
            let (_, sample) = SAMPLES.iter().find(|(m, _)| m == name).expect("every model has sample constants");
            assert_eq!(isochoric_model(name, sample).unwrap().name(), *name);
        }
    }

    #[test]
    fn ogden_needs_as_many_mu_as_alpha() {
        let e = isochoric_model("ogden", &[("mu", 1.0), ("alpha", 2.0), ("mu", 0.1)]).unwrap_err();
        assert!(matches!(e, MaterialError::InvalidCombination { model: "ogden", .. }), "{e}");
        let e = isochoric_model("ogden", &[("mu", 1.0)]).unwrap_err();
        assert!(matches!(e, MaterialError::MissingParameter { name: "alpha", .. }), "{e}");
    }
}
