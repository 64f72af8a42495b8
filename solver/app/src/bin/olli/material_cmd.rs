//! `olli material`: the homogeneous responses of one material — uniaxial,
//! equibiaxial, planar, simple shear, volumetric — over a stretch range,
//! printed as tables, optionally written as CSV, with the Drucker stability
//! of each mode.
//!
//! The material comes from the `[material]` table of a TOML file or from
//! `--model`/`--param` options (see [`spec`]). The numbers come from the
//! library ([`olli_solver::material::homogeneous`] and
//! [`olli_solver::material::stability`]); this module only reads input and
//! writes output. Exit codes: 0 success, 2 bad input or unwritable output.

mod memory_plots;
mod output;
mod plots;
mod spec;

use std::path::PathBuf;
use std::process::ExitCode;

use olli_solver::material::homogeneous::{sweep, Mode, Settings};
use olli_solver::material::stability::check_mode;
use spec::MaterialSpec;

#[derive(clap::Args)]
#[command(
    after_help = "Examples:\n  olli material examples/materials/soft-nr.toml --mode uniaxial --stretch 0.5:3:26 --csv nr.csv\n  olli material --model eight-chain --param shear_modulus=0.6 --param locking_stretch=5 --param bulk_modulus=1000"
)]
pub struct Args {
    /// TOML file holding one `[material]` table (keys: model, shear_modulus, c10, c01, c20, c30,
    /// locking_stretch, extensibility_limit, mu = [..], alpha = [..], bulk_modulus or poisson_ratio,
    /// volumetric).
    #[arg(required_unless_present = "model", conflicts_with = "model")]
    pub file: Option<PathBuf>,
    /// Model, instead of a file: neo-hookean, mooney-rivlin, yeoh, eight-chain, gent or ogden.
    #[arg(long)]
    pub model: Option<String>,
    /// A constant of the `--model`, as NAME=VALUE (repeat for each constant; Ogden's mu and
    /// alpha once per term, in term order).
    #[arg(long = "param", value_name = "NAME=VALUE", requires = "model")]
    pub params: Vec<String>,
    /// Volumetric law with `--model`: quadratic, logarithmic or simo-taylor.
    #[arg(long, default_value = "quadratic", requires = "model")]
    pub volumetric: String,
    /// Deformation mode(s) to compute.
    #[arg(long, default_value = "all",
          value_parser = ["uniaxial", "equibiaxial", "planar", "simple-shear", "volumetric", "all"])]
    pub mode: String,
    /// Stretch range MIN:MAX:N (N evenly spaced points). Simple shear uses its principal
    /// stretch λ (amount of shear γ = λ − 1/λ); volumetric uses the linear stretch J^(1/3).
    #[arg(long, default_value = "0.5:3:26", value_name = "MIN:MAX:N")]
    pub stretch: String,
    /// Write every point of every mode to this CSV file.
    #[arg(long, value_name = "OUT.csv")]
    pub csv: Option<PathBuf>,
    /// Draw the responses (nominal stress against stretch, stability limits marked) into this folder.
    #[arg(long, value_name = "DIR")]
    pub plots: Option<PathBuf>,
    /// Picture format with `--plots`.
    #[arg(long, value_enum, default_value = "png", requires = "plots")]
    pub format: olli_app::plot::Format,
}

/// Bad `--stretch` text.
#[derive(Debug, thiserror::Error)]
#[error("option --stretch `{text}`: {reason}")]
pub struct StretchError {
    text: String,
    reason: &'static str,
}

/// The stretches of `MIN:MAX:N`.
fn parse_stretch(text: &str) -> Result<Vec<f64>, StretchError> {
    let bad = |reason| StretchError { text: text.to_string(), reason };
    let parts: Vec<&str> = text.split(':').collect();
    let [min, max, n] = parts[..] else {
        return Err(bad("expected MIN:MAX:N, e.g. 0.5:3:26"));
    };
    let min: f64 = min.trim().parse().map_err(|_| bad("MIN is not a number"))?;
    let max: f64 = max.trim().parse().map_err(|_| bad("MAX is not a number"))?;
    let n: usize = n.trim().parse().map_err(|_| bad("N is not a whole number"))?;
    if !(min.is_finite() && min > 0.0) {
        return Err(bad("MIN must be a positive stretch"));
    }
    if !(max.is_finite() && max > min) {
        return Err(bad("MAX must be finite and greater than MIN"));
    }
    if !(2..=100_000).contains(&n) {
        return Err(bad("N must be between 2 and 100000"));
    }
    Ok((0..n).map(|i| min + (max - min) * i as f64 / (n - 1) as f64).collect())
}

fn fail(message: impl std::fmt::Display) -> ExitCode {
    eprintln!("error: {message}");
    ExitCode::from(2)
}

pub fn run(args: Args) -> ExitCode {
    // clap guarantees a file or --model (not both).
    let spec = match &args.file {
        Some(path) => MaterialSpec::from_file(path),
        None => MaterialSpec::from_options(args.model.as_deref().unwrap_or_default(), &args.params, &args.volumetric),
    };
    let spec = match spec {
        Ok(s) => s,
        Err(e) => return fail(e),
    };
    let material = match spec.build() {
        Ok(m) => m,
        Err(e) => return fail(e),
    };
    let stretches = match parse_stretch(&args.stretch) {
        Ok(s) => s,
        Err(e) => return fail(e),
    };
    let modes: Vec<Mode> = match Mode::from_name(&args.mode) {
        Some(m) => vec![m],
        None => Mode::ALL.to_vec(),
    };

    let settings = Settings::default();
    let mut results = Vec::new();
    for mode in modes {
        let (points, stops) = sweep(&material, mode, &stretches, &settings);
        let stability = check_mode(&material, mode, &stretches, &settings);
        results.push(output::ModeResult { mode, points, stops, stability });
    }
    output::print_report(&spec, &material, &results);
    if let Some(path) = &args.csv {
        if let Err(e) = output::write_csv(path, &material, &results) {
            return fail(format_args!("{}: cannot write CSV: {e}", path.display()));
        }
        println!("wrote {}", path.display());
    }
    if let Some(dir) = &args.plots {
        match plots::write_plots(dir, &spec.describe(), &results, args.format) {
            Ok(files) => files.iter().for_each(|f| println!("wrote {}", dir.join(f).display())),
            Err(e) => return fail(e),
        }
        match memory_plots::write_memory_plots(dir, &spec.describe(), &material, args.format) {
            Ok(files) => files.iter().for_each(|f| println!("wrote {}", dir.join(f).display())),
            Err(e) => return fail(e),
        }
    }
    ExitCode::SUCCESS
}
