//! Pictures of a material with memory for `olli material --plots DIR`: the
//! relaxation shear modulus against time and the storage and loss moduli
//! and loss angle against frequency (a Prony series), and a uniaxial
//! load–unload–reload cycle (Mullins softening). Drawn through the shared
//! plot module; time and frequency on log₁₀ axes.

use std::f64::consts::TAU;
use std::path::Path;

use olli_app::plot::{self, Axis, Corner, Format, LineChart, PlotError, Series};
use olli_solver::material::{Kinematics, Material, Prony};

/// Points per curve.
const SAMPLES: usize = 160;

/// Writes the charts of `material`'s memory into `dir`; returns the files written (none without memory).
pub fn write_memory_plots(dir: &Path, title: &str, material: &Material, format: Format) -> Result<Vec<String>, PlotError> {
    let mut charts = Vec::new();
    if let Some(prony) = &material.viscoelastic {
        charts.extend(prony_charts(title, material.shear_modulus(), prony));
    }
    if material.mullins.is_some() {
        charts.push(("material_mullins", mullins_cycle(title, material)));
    }
    let mut written = Vec::new();
    for (stem, chart) in charts {
        let file = format.file_name(stem);
        plot::write(&chart, &dir.join(&file), format)?;
        written.push(file);
    }
    Ok(written)
}

/// log₁₀ of the times from 1/100 of the shortest to 100 × the longest relaxation time.
fn decades(prony: &Prony) -> Vec<f64> {
    let times = prony.terms().iter().map(|t| t.time);
    let lo = times.clone().fold(f64::INFINITY, f64::min).log10() - 2.0;
    let hi = times.fold(0.0, f64::max).log10() + 2.0;
    (0..SAMPLES).map(|k| lo + (hi - lo) * k as f64 / (SAMPLES - 1) as f64).collect()
}

fn prony_charts(title: &str, mu: f64, prony: &Prony) -> Vec<(&'static str, LineChart)> {
    let logs = decades(prony);
    let relaxation: Vec<(f64, f64)> = logs.iter().map(|&l| (l, mu * prony.relaxation(10f64.powf(l)))).collect();
    let relax =
        LineChart::new(format!("{title}: relaxation"), Axis::new("log₁₀ time", "time unit"), Axis::new("shear modulus G(t)", "F/L²"))
            .with_series(Series::line("G(t)", relaxation))
            .with_horizontal(mu * prony.relaxed_fraction(), "relaxed modulus");
    // Frequencies over the same decades: f = 1/(2π t).
    let moduli: Vec<(f64, f64, f64)> = logs
        .iter()
        .map(|&l| {
            let f = 10f64.powf(-l) / TAU;
            let (s, loss) = prony.complex_modulus(TAU * f);
            (f.log10(), mu * s, mu * loss)
        })
        .collect();
    let dynamic =
        LineChart::new(format!("{title}: dynamic moduli"), Axis::new("log₁₀ frequency", "1/time unit"), Axis::new("modulus", "F/L²"))
            .with_legend(Corner::UpperLeft)
            .with_series(Series::line("storage G′", moduli.iter().map(|m| (m.0, m.1)).collect()))
            .with_series(Series::line("loss G″", moduli.iter().map(|m| (m.0, m.2)).collect()));
    let angle = LineChart::new(format!("{title}: loss angle"), Axis::new("log₁₀ frequency", "1/time unit"), Axis::new("loss angle δ", "°"))
        .with_series(Series::line("δ", moduli.iter().map(|m| (m.0, m.2.atan2(m.1).to_degrees())).collect()));
    vec![("material_relaxation", relax), ("material_dynamic_moduli", dynamic), ("material_loss_angle", angle)]
}

/// Nominal stress of incompressible uniaxial tension at stretch λ, with
/// the isochoric energy: T = (τ₁ − τ₃)/λ from the principal Kirchhoff stresses.
fn uniaxial(material: &Material, l: f64) -> Option<(f64, f64)> {
    let lateral = 1.0 / l.sqrt();
    let tau = material.isochoric.principal_kirchhoff([l, lateral, lateral]).ok()?;
    let c = nalgebra::Matrix3::from_diagonal(&nalgebra::Vector3::new(l * l, 1.0 / l, 1.0 / l));
    let w = material.isochoric.energy(&Kinematics::new(&c).ok()?).ok()?;
    Some(((tau[0] - tau[2]) / l, w))
}

/// Load to λ = 1.5, unload, reload through 1.5 to 2, unload: the
/// Ogden–Roxburgh curves (`material::mullins`) of the incompressible material.
fn mullins_cycle(title: &str, material: &Material) -> LineChart {
    let m = material.mullins.expect("called with softening");
    let path = [(1.0, 1.5), (1.5, 1.0), (1.0, 2.0), (2.0, 1.0)];
    let mut chart =
        LineChart::new(format!("{title}: Mullins softening, uniaxial"), Axis::new("stretch λ", ""), Axis::new("nominal stress", "F/L²"))
            .with_legend(Corner::UpperLeft);
    let mut w_max: f64 = 0.0;
    for (k, (from, to)) in path.into_iter().enumerate() {
        let mut points = Vec::new();
        for i in 0..SAMPLES {
            let l = from + (to - from) * i as f64 / (SAMPLES - 1) as f64;
            let Some((t, w)) = uniaxial(material, l) else { continue };
            let eta = if w >= w_max { 1.0 } else { m.damage(w, w_max).0 };
            w_max = w_max.max(w);
            points.push((l, eta * t));
        }
        let name = ["first loading to 1.5", "unloading from 1.5", "reloading to 2", "unloading from 2"][k];
        chart = chart.with_series(Series::line(name, points));
    }
    chart
}
