//! The `[material]` table `--output` writes: the keys `olli material` and job
//! files (`[materials.<name>]`) read, Ogden's terms as `mu = [..]`,
//! `alpha = [..]`, and a comment saying where the constants came from.

use olli_solver::fit::{DataPoint, ErrorMetrics, FitResult};
use olli_solver::material::registry::LIST_CONSTANTS;
use olli_solver::material::VolumetricForm;

use super::Bulk;

/// A number that TOML reads back to the same f64.
fn toml_number(v: f64) -> String {
    let text = format!("{v:?}");
    if text.contains('.') || text.contains('e') {
        text
    } else {
        format!("{text}.0")
    }
}

/// The TOML text of the fitted material.
pub fn material_table(fit: &FitResult, bulk: Bulk, form: VolumetricForm, files: &[String], data: &[DataPoint]) -> String {
    let overall = ErrorMetrics::of(data, &fit.predicted);
    let mut out = String::new();
    out.push_str(&format!("# Fitted by olli fit: model {} to {} ({} points).\n", fit.model.label(), files.join(", "), data.len()));
    out.push_str(&format!(
        "# Overall R² {:.5}, RMS {:.4e}, relative RMS {:.2} %; small-strain shear modulus {:.6}.\n",
        overall.r_squared,
        overall.rms,
        100.0 * overall.rms_relative,
        fit.shear_modulus
    ));
    out.push_str("[material]\n");
    out.push_str(&format!("model = \"{}\"\n", fit.model.registry_name()));
    let names = fit.model.constant_names();
    for (i, name) in names.iter().enumerate() {
        if names[..i].contains(name) {
            continue;
        }
        let values: Vec<String> = names.iter().zip(&fit.constants).filter(|(n, _)| *n == name).map(|(_, v)| toml_number(*v)).collect();
        if LIST_CONSTANTS.contains(name) {
            out.push_str(&format!("{name} = [{}]\n", values.join(", ")));
        } else {
            out.push_str(&format!("{name} = {}\n", values[0]));
        }
    }
    match bulk {
        Bulk::Fitted(k) => out.push_str(&format!("bulk_modulus = {}   # fitted to the volumetric test\n", toml_number(k))),
        Bulk::Given(k) => out.push_str(&format!("bulk_modulus = {}\n", toml_number(k))),
        Bulk::Poisson(nu) => out.push_str(&format!("poisson_ratio = {}\n", toml_number(nu))),
        Bulk::Unknown => {}
    }
    out.push_str(&format!("volumetric = \"{}\"\n", form.name()));
    out
}
