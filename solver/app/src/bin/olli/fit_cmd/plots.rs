//! Pictures of a fit, drawn with the shared [`olli_app::plot`] line charts:
//! for each model the data of every test with its fitted curve
//! (`fit-<model>.png|svg`), for each test the data with every model's curve
//! (`compare-<test>.png|svg`, when several models were fitted), and the
//! volumetric test with its bulk-modulus fit (`volumetric.png|svg`).

use std::path::{Path, PathBuf};

use olli_app::plot::{self, Axis, Corner, Format, LineChart, PlotError, Series};
use olli_solver::fit::{DataPoint, FitResult};
use olli_solver::material::homogeneous::Mode;
use olli_solver::material::incompressible::nominal_stress;

use super::report::modes_in;
use super::Outcome;

/// Points of each fitted curve.
const CURVE_POINTS: usize = 120;

fn x_axis(modes: &[Mode]) -> Axis {
    if modes == [Mode::SimpleShear] {
        Axis::new("principal stretch (simple shear)", "")
    } else {
        Axis::new("stretch", "")
    }
}

fn y_axis(unit: &str) -> Axis {
    Axis::new("nominal stress", unit)
}

fn data_series(data: &[DataPoint], mode: Mode, group: usize) -> Series {
    let pts = data.iter().filter(|p| p.mode == mode).map(|p| (p.stretch, p.nominal_stress)).collect();
    Series::points(format!("{} data", mode.name()), pts).in_group(group)
}

/// The model's curve over the mode's data range (and through λ = 1).
fn curve(fit: &FitResult, data: &[DataPoint], mode: Mode) -> Vec<(f64, f64)> {
    let Ok(model) = fit.model.build(&fit.constants) else { return Vec::new() };
    let s = data.iter().filter(|p| p.mode == mode).map(|p| p.stretch);
    let lo = s.clone().fold(1.0f64, f64::min);
    let hi = s.fold(1.0f64, f64::max);
    (0..CURVE_POINTS)
        .map(|i| lo + (hi - lo) * i as f64 / (CURVE_POINTS - 1) as f64)
        .map(|l| (l, nominal_stress(model.as_ref(), mode, l).unwrap_or(f64::NAN)))
        .collect()
}

fn write_both(chart: &LineChart, dir: &Path, stem: &str, written: &mut Vec<PathBuf>) -> Result<(), PlotError> {
    for format in [Format::Png, Format::Svg] {
        let path = dir.join(format.file_name(stem));
        plot::write(chart, &path, format)?;
        written.push(path);
    }
    Ok(())
}

/// Draws every picture into `dir` (created if missing); returns the files written.
pub fn write_all(
    dir: &Path,
    data: &[DataPoint],
    volumetric: Option<&(Vec<DataPoint>, Vec<f64>)>,
    outcomes: &[Outcome],
    ranked: &[usize],
    stress_unit: &str,
) -> Result<Vec<PathBuf>, PlotError> {
    std::fs::create_dir_all(dir).map_err(|source| PlotError::Write { path: dir.to_path_buf(), source })?;
    let modes = modes_in(data);
    let mut written = Vec::new();
    for &i in ranked {
        let Ok(fit) = &outcomes[i].result else { continue };
        let label = &outcomes[i].label;
        let mut chart = LineChart::new(format!("{label} fitted to {} tests", modes.len()), x_axis(&modes), y_axis(stress_unit));
        chart.legend = Corner::UpperLeft;
        for (g, &mode) in modes.iter().enumerate() {
            chart = chart
                .with_series(data_series(data, mode, g))
                .with_series(Series::line(format!("{} {label}", mode.name()), curve(fit, data, mode)).in_group(g));
        }
        write_both(&chart, dir, &format!("fit-{label}"), &mut written)?;
    }
    if ranked.len() > 1 {
        for &mode in &modes {
            let mut chart = LineChart::new(format!("{}: models compared", mode.name()), x_axis(&[mode]), y_axis(stress_unit));
            chart = chart.with_series(data_series(data, mode, 0));
            for (g, &i) in ranked.iter().enumerate() {
                if let Ok(fit) = &outcomes[i].result {
                    chart = chart.with_series(Series::line(outcomes[i].label.clone(), curve(fit, data, mode)).in_group(g + 1));
                }
            }
            write_both(&chart, dir, &format!("compare-{}", mode.name()), &mut written)?;
        }
    }
    if let Some((d, predicted)) = volumetric {
        let mut fitted: Vec<(f64, f64)> = d.iter().map(|p| p.stretch).zip(predicted.iter().copied()).collect();
        fitted.sort_by(|a, b| a.0.total_cmp(&b.0));
        let chart = LineChart::new("volumetric test and bulk modulus fit", Axis::new("linear stretch J^(1/3)", ""), y_axis(stress_unit))
            .with_series(data_series(d, Mode::Volumetric, 0))
            .with_series(Series::line("volumetric fit", fitted).in_group(0));
        write_both(&chart, dir, "volumetric", &mut written)?;
    }
    Ok(written)
}
