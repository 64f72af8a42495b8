//! The text report of `olli fit`: per model the constants with their 95 %
//! intervals and correlations, the small-strain shear modulus, the error per
//! test and overall, Drucker stability over and beyond the data, and a
//! warning when one test is fitted well and another missed; then a
//! comparison of the models sorted by error.

use olli_app::job::check::STABILITY_SEARCH;
use olli_app::stability_text::{self, Reach};
use olli_solver::fit::{DataPoint, ErrorMetrics, FitResult, Weighting};
use olli_solver::material::homogeneous::{Mode, Settings};
use olli_solver::material::stability::{check_mode, mode_range_within};
use olli_solver::material::volumetric::VolumetricLaw;
use olli_solver::material::{Material, VolumetricForm};

use super::{Bulk, Outcome};

/// R² at or above which a test counts as fitted well, and below which as
/// missed, for the one-good-one-bad warning (our choice; common practice
/// treats R² below 0.9 on a stress–strain curve as a poor fit).
pub const GOOD_R2: f64 = 0.98;
/// See [`GOOD_R2`].
pub const POOR_R2: f64 = 0.9;
/// Correlation above which two constants are reported as not determined
/// separately by the data.
pub const HIGH_CORRELATION: f64 = 0.95;

/// The shear modes present in `data`, in report order.
pub fn modes_in(data: &[DataPoint]) -> Vec<Mode> {
    Mode::ALL.into_iter().filter(|m| data.iter().any(|p| p.mode == *m)).collect()
}

/// Metrics of one mode's points.
fn mode_metrics(data: &[DataPoint], predicted: &[f64], mode: Mode) -> ErrorMetrics {
    let (d, p): (Vec<DataPoint>, Vec<f64>) = data.iter().zip(predicted).filter(|(d, _)| d.mode == mode).map(|(d, p)| (*d, *p)).unzip();
    ErrorMetrics::of(&d, &p)
}

/// The error the comparison sorts by: the RMS of the chosen weighting.
pub fn ranking_error(data: &[DataPoint], fit: &FitResult, weighting: Weighting) -> f64 {
    let m = ErrorMetrics::of(data, &fit.predicted);
    match weighting {
        Weighting::Relative => m.rms_relative,
        Weighting::Absolute => m.rms,
    }
}

/// Largest principal stretch (or its inverse) reached by any data point.
fn data_top(data: &[DataPoint]) -> f64 {
    data.iter()
        .map(|p| {
            let l = p.stretch;
            let extremes = match p.mode {
                Mode::Equibiaxial => [l, 1.0 / (l * l)],
                Mode::Uniaxial => [l, 1.0 / l.sqrt()],
                _ => [l, 1.0 / l],
            };
            extremes.iter().map(|&x| x.max(1.0 / x)).fold(1.0, f64::max)
        })
        .fold(1.0, f64::max)
}

/// Stretches of `mode` that matter: the mode's own data range, else the
/// states within the data's principal-stretch bound.
fn data_reach(data: &[DataPoint], mode: Mode) -> (f64, f64, bool) {
    let own: Vec<f64> = data.iter().filter(|p| p.mode == mode).map(|p| p.stretch).collect();
    if own.is_empty() {
        let (lo, hi) = mode_range_within(mode, data_top(data));
        (lo, hi, false)
    } else {
        (own.iter().copied().fold(f64::INFINITY, f64::min).min(1.0), own.iter().copied().fold(0.0, f64::max).max(1.0), true)
    }
}

/// Names of the constants for the report; Ogden's numbered by term (`mu_1`, `alpha_1`, …).
fn labels(fit: &FitResult) -> Vec<String> {
    let ogden = fit.model.registry_name() == "ogden";
    fit.model.constant_names().iter().enumerate().map(|(i, n)| if ogden { format!("{n}_{}", i / 2 + 1) } else { n.to_string() }).collect()
}

fn print_fit(fit: &FitResult, data: &[DataPoint], bulk: Bulk, form: VolumetricForm) {
    let names = labels(fit);
    println!("  constants (± half-width of the approximate 95 % interval):");
    for (i, (term, value)) in names.iter().zip(&fit.constants).enumerate() {
        match &fit.statistics {
            Some(s) => println!("    {term:<20} {value:>14.6e} ± {:.3e}", s.half_width_95(i)),
            None => println!("    {term:<20} {value:>14.6e}"),
        }
    }
    println!("  small-strain shear modulus {:.6}", fit.shear_modulus);
    match &fit.statistics {
        Some(s) if names.len() > 1 => {
            println!("  correlation of the constants ({} degrees of freedom):", s.degrees_of_freedom);
            for a in 0..names.len() {
                let row: Vec<String> = (0..names.len()).map(|b| format!("{:>7.3}", s.correlation[(a, b)])).collect();
                println!("    {:<20} {}", names[a], row.join(" "));
            }
            for a in 0..names.len() {
                for b in a + 1..names.len() {
                    if s.correlation[(a, b)].abs() > HIGH_CORRELATION {
                        println!(
                            "  note: {} and {} are correlated {:.3}: the data do not determine them separately",
                            names[a],
                            names[b],
                            s.correlation[(a, b)]
                        );
                    }
                }
            }
        }
        Some(_) => {}
        None => println!("  (no intervals: as many constants as points, or the constants are not determined by the data)"),
    }
    println!("  starts: {} tried, {} converged", fit.starts.0, fit.starts.1);
    println!("  {:<13} {:>6} {:>10} {:>12} {:>13}", "error", "points", "R²", "RMS", "relative RMS");
    let mut per_mode = Vec::new();
    for mode in modes_in(data) {
        let m = mode_metrics(data, &fit.predicted, mode);
        println!("  {:<13} {:>6} {:>10.5} {:>12.4e} {:>12.2} %", mode.name(), m.points, m.r_squared, m.rms, 100.0 * m.rms_relative);
        per_mode.push((mode, m));
    }
    let all = ErrorMetrics::of(data, &fit.predicted);
    println!("  {:<13} {:>6} {:>10.5} {:>12.4e} {:>12.2} %", "overall", all.points, all.r_squared, all.rms, 100.0 * all.rms_relative);
    let good = per_mode.iter().filter(|(_, m)| m.r_squared >= GOOD_R2).map(|(mode, _)| mode.name()).collect::<Vec<_>>();
    for (mode, m) in &per_mode {
        if m.r_squared < POOR_R2 && !good.is_empty() {
            let mut text = format!(
                "  warning: {} fits {} well but misses {} (R² {:.3})",
                fit.model.label(),
                good.join(" and "),
                mode.name(),
                m.r_squared
            );
            if fit.model.depends_on_i1_only() && *mode == Mode::Equibiaxial {
                text.push_str(
                    ": a model in Ī1 alone cannot follow uniaxial and equibiaxial data that differ as these do; try mooney-rivlin or ogden",
                );
            }
            println!("{text}");
        }
    }
    let Ok(iso) = fit.model.build(&fit.constants) else { return };
    let kappa = bulk.kappa(fit.shear_modulus);
    let Ok(law) = VolumetricLaw::new(form, kappa) else { return };
    let material = Material::new(iso, law);
    let kappa_note = if bulk == Bulk::Unknown { " with κ = 1000 μ (no bulk modulus given)" } else { "" };
    println!("  Drucker stability{kappa_note}, searched to principal stretch {STABILITY_SEARCH}:");
    for mode in [Mode::Uniaxial, Mode::Equibiaxial, Mode::Planar] {
        let (lo, hi) = mode_range_within(mode, STABILITY_SEARCH);
        let n = 60;
        let stretches: Vec<f64> = (0..=n).map(|i| lo * (hi / lo).powf(i as f64 / n as f64)).collect();
        let s = check_mode(&material, mode, &stretches, &Settings::default());
        let (a, b, own) = data_reach(data, mode);
        let what = if own { "the data" } else { "the states of the data's largest principal stretch" };
        println!("    {:<12} {}", mode.name(), stability_text::verdict(&s, Some(Reach { what, range: (a, b) })));
    }
}

/// Prints the report and returns the indices of the fitted outcomes, best first.
pub fn print(
    files: &[String],
    data: &[DataPoint],
    volumetric: Option<&(Vec<DataPoint>, Vec<f64>)>,
    bulk: Bulk,
    form: VolumetricForm,
    weighting: Weighting,
    outcomes: &[Outcome],
) -> Vec<usize> {
    println!("data: {} ({} points in shear tests)", files.join(", "), data.len());
    for mode in modes_in(data) {
        let s: Vec<f64> = data.iter().filter(|p| p.mode == mode).map(|p| p.stretch).collect();
        let (lo, hi) = s.iter().fold((f64::INFINITY, 0.0f64), |(a, b), &x| (a.min(x), b.max(x)));
        println!("  {:<13} {:>4} points, stretch {lo:.4} to {hi:.4}", mode.name(), s.len());
    }
    let weights = match weighting {
        Weighting::Relative => "relative (each point by its relative error)",
        Weighting::Absolute => "absolute (stress units)",
    };
    println!("weights: {weights}");
    match bulk {
        Bulk::Fitted(k) => {
            let (d, p) = volumetric.expect("a fitted bulk modulus comes with its data");
            let m = ErrorMetrics::of(d, p);
            println!(
                "bulk modulus {k:.6e} fitted to {} volumetric points ({} law): R² {:.5}, RMS {:.4e}, relative RMS {:.2} %",
                m.points,
                form.name(),
                m.r_squared,
                m.rms,
                100.0 * m.rms_relative
            );
        }
        Bulk::Given(k) => println!("bulk modulus {k} (given)"),
        Bulk::Poisson(nu) => println!("Poisson's ratio {nu} (given; bulk modulus from each model's shear modulus)"),
        Bulk::Unknown => println!("no bulk modulus (no volumetric data, --bulk-modulus or --poisson-ratio)"),
    }
    for o in outcomes {
        println!();
        println!("model {}:", o.label);
        match &o.result {
            Ok(fit) => print_fit(fit, data, bulk, form),
            Err(e) => println!("  not fitted: {e}"),
        }
    }
    let mut ranked: Vec<usize> = (0..outcomes.len()).filter(|&i| outcomes[i].result.is_ok()).collect();
    let error = |i: usize| outcomes[i].result.as_ref().map(|f| ranking_error(data, f, weighting)).unwrap_or(f64::INFINITY);
    ranked.sort_by(|&a, &b| error(a).total_cmp(&error(b)));
    if outcomes.len() > 1 {
        println!();
        println!("comparison (sorted by {} RMS error):", if weighting == Weighting::Relative { "relative" } else { "absolute" });
        println!(
            "  {:<4} {:<14} {:>9} {:>10} {:>12} {:>13} {:>14}",
            "rank", "model", "constants", "R²", "RMS", "relative RMS", "shear modulus"
        );
        for (rank, &i) in ranked.iter().enumerate() {
            let Ok(fit) = &outcomes[i].result else { continue };
            let m = ErrorMetrics::of(data, &fit.predicted);
            println!(
                "  {:<4} {:<14} {:>9} {:>10.5} {:>12.4e} {:>11.2} % {:>14.6}",
                rank + 1,
                outcomes[i].label,
                fit.constants.len(),
                m.r_squared,
                m.rms,
                100.0 * m.rms_relative,
                fit.shear_modulus
            );
        }
        for o in outcomes.iter().filter(|o| o.result.is_err()) {
            println!("  -    {:<14} not fitted", o.label);
        }
    }
    ranked
}
