//! `olli fit`: fits material models to test curves from CSV files, reports
//! the constants, their sensitivity, the error per test and the Drucker
//! stability over and beyond the data, compares several models, writes the
//! best as a `[material]` table and draws the data with the fitted curves.
//!
//! Reading is in [`olli_app::fit_data`], the numerics in
//! [`olli_solver::fit`]; this module orchestrates and writes. Exit codes: 0
//! success, 2 bad input (data, options) or unwritable output; nothing is
//! written on bad input.

mod plots;
mod report;
mod table;

use std::path::PathBuf;
use std::process::ExitCode;

use olli_app::fit_data::{self, SourcedPoint};
use olli_solver::fit::{self, bulk_modulus_from_volumetric, DataPoint, FitModel, FitResult, Settings, Weighting};
use olli_solver::material::homogeneous::Mode;
use olli_solver::material::volumetric::VolumetricLaw;
use olli_solver::material::VolumetricForm;

#[derive(clap::Args)]
#[command(
    after_help = "Examples:\n  olli fit examples/fit/compound-a.csv --model yeoh --model ogden --model eight-chain --output a.toml --plot plots\n  \
                   olli fit uniaxial.csv biaxial.csv --model mooney-rivlin --weights absolute --poisson-ratio 0.499"
)]
pub struct Args {
    /// Test data: CSV files with `mode`, `stretch` (or `engineering_strain`) and `nominal_stress` columns.
    #[arg(required = true, value_name = "DATA.csv")]
    pub files: Vec<PathBuf>,
    /// Model to fit (repeat to compare): neo-hookean, mooney-rivlin, yeoh, eight-chain, gent,
    /// ogden (two terms) or ogden-1 … ogden-4.
    #[arg(long = "model", required = true, value_name = "NAME")]
    pub models: Vec<String>,
    /// Write the best-fitting model as a `[material]` table to this TOML file.
    #[arg(long, value_name = "MATERIAL.toml")]
    pub output: Option<PathBuf>,
    /// Draw data and fitted curves (PNG and SVG) into this folder.
    #[arg(long, value_name = "DIR")]
    pub plot: Option<PathBuf>,
    /// Error measure: relative (each point by its relative error) or absolute (stress units).
    #[arg(long, default_value = "relative", value_parser = ["relative", "absolute"])]
    pub weights: String,
    /// Bulk modulus (stress units) when the data hold no volumetric test.
    #[arg(long, value_name = "K", conflicts_with = "poisson_ratio")]
    pub bulk_modulus: Option<f64>,
    /// Poisson's ratio (from which the bulk modulus follows) when the data hold no volumetric test.
    #[arg(long, value_name = "NU")]
    pub poisson_ratio: Option<f64>,
    /// Unit of the data's stresses, for the plot axes.
    #[arg(long, default_value = "MPa")]
    pub stress_unit: String,
    /// Volumetric law: quadratic, logarithmic or simo-taylor.
    #[arg(long, default_value = "quadratic", value_parser = ["quadratic", "logarithmic", "simo-taylor"])]
    pub volumetric: String,
}

/// Where the bulk modulus comes from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Bulk {
    /// Fitted to volumetric data (κ).
    Fitted(f64),
    /// Given by `--bulk-modulus`.
    Given(f64),
    /// From `--poisson-ratio` and each model's shear modulus.
    Poisson(f64),
    /// Not given: stability is checked nearly incompressible (κ = 1000 μ).
    Unknown,
}

impl Bulk {
    /// κ for a material of shear modulus `mu`.
    pub fn kappa(self, mu: f64) -> f64 {
        match self {
            Bulk::Fitted(k) | Bulk::Given(k) => k,
            Bulk::Poisson(nu) => VolumetricLaw::bulk_modulus_from_poisson(mu, nu).unwrap_or(1000.0 * mu),
            Bulk::Unknown => 1000.0 * mu,
        }
    }
}

/// One fitted model, or why it could not be fitted.
pub struct Outcome {
    pub label: String,
    pub result: Result<FitResult, fit::FitError>,
}

fn fail(message: impl std::fmt::Display) -> ExitCode {
    eprintln!("error: {message}");
    ExitCode::from(2)
}

pub fn run(args: Args) -> ExitCode {
    let mut models = Vec::new();
    for name in &args.models {
        match FitModel::from_name(name) {
            Some(m) if !models.contains(&m) => models.push(m),
            Some(_) => {}
            None => {
                let hint = olli_app::job::diagnostics::nearest(
                    name,
                    fit::models::FIT_MODEL_NAMES.split(", ").map(|s| s.split(' ').next().unwrap_or(s)),
                )
                .map(|n| format!("; did you mean `{n}`?"))
                .unwrap_or_default();
                return fail(format_args!("option --model: unknown model `{name}` (known: {}){hint}", fit::models::FIT_MODEL_NAMES));
            }
        }
    }
    let mut points: Vec<SourcedPoint> = Vec::new();
    for file in &args.files {
        match fit_data::read(file) {
            Ok(p) => points.extend(p),
            Err(e) => return fail(e),
        }
    }
    let data: Vec<DataPoint> = points.iter().map(|p| p.point).collect();
    let weighting = if args.weights == "absolute" { Weighting::Absolute } else { Weighting::Relative };
    let form = VolumetricForm::from_name(&args.volumetric).unwrap_or(VolumetricForm::Quadratic);
    let volumetric: Vec<DataPoint> = data.iter().copied().filter(|p| p.mode == Mode::Volumetric).collect();
    let shear: Vec<DataPoint> = data.iter().copied().filter(|p| p.mode != Mode::Volumetric).collect();
    if shear.is_empty() {
        return fail(format_args!("{}: no uniaxial, equibiaxial, planar or simple-shear rows to fit", args.files[0].display()));
    }
    let (bulk, volumetric_fit) = if !volumetric.is_empty() {
        if args.bulk_modulus.is_some() || args.poisson_ratio.is_some() {
            return fail("the data hold a volumetric test: the bulk modulus is fitted to it; drop --bulk-modulus / --poisson-ratio");
        }
        match bulk_modulus_from_volumetric(&volumetric, form, weighting) {
            Ok((k, predicted)) if k.is_finite() && k > 0.0 => (Bulk::Fitted(k), Some((volumetric.clone(), predicted))),
            Ok((k, _)) => return fail(format_args!("the volumetric data give a bulk modulus of {k}, which is not positive")),
            Err(e) => return fail(e),
        }
    } else if let Some(k) = args.bulk_modulus {
        if !(k.is_finite() && k > 0.0) {
            return fail(format_args!("option --bulk-modulus {k}: must be positive"));
        }
        (Bulk::Given(k), None)
    } else if let Some(nu) = args.poisson_ratio {
        if !(nu.is_finite() && nu > -1.0 && nu < 0.5) {
            return fail(format_args!("option --poisson-ratio {nu}: must lie in (-1, 0.5)"));
        }
        (Bulk::Poisson(nu), None)
    } else {
        (Bulk::Unknown, None)
    };
    if args.output.is_some() && bulk == Bulk::Unknown {
        return fail("--output needs a bulk modulus: give volumetric data, --bulk-modulus or --poisson-ratio");
    }

    let settings = Settings { weighting, ..Settings::default() };
    let outcomes: Vec<Outcome> = models.iter().map(|&m| Outcome { label: m.label(), result: fit::fit(m, &shear, &settings) }).collect();
    let files: Vec<String> = args.files.iter().map(|f| f.display().to_string()).collect();
    let ranked = report::print(&files, &shear, volumetric_fit.as_ref(), bulk, form, weighting, &outcomes);

    let best = ranked.first().and_then(|&i| outcomes[i].result.as_ref().ok());
    if let Some(path) = &args.output {
        let Some(best) = best else {
            return fail("no model could be fitted: nothing written");
        };
        let text = table::material_table(best, bulk, form, &files, &shear);
        if let Err(e) = olli_app::output::write_atomic(path, text.as_bytes()) {
            return fail(format_args!("{}: cannot write: {e}", path.display()));
        }
        println!("wrote {} (model {})", path.display(), best.model.label());
    }
    if let Some(dir) = &args.plot {
        match plots::write_all(dir, &shear, volumetric_fit.as_ref(), &outcomes, &ranked, &args.stress_unit) {
            Ok(written) => {
                for p in written {
                    println!("wrote {}", p.display());
                }
            }
            Err(e) => return fail(e),
        }
    }
    ExitCode::SUCCESS
}
