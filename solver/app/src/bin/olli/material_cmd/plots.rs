//! Pictures of `olli material --plots DIR`: nominal stress against stretch
//! for the deviatoric modes in one chart, the volumetric mode in its own
//! (its stresses are a bulk modulus larger), each with the stretches where
//! Drucker stability is lost marked. Drawn through the shared plot module.

use std::path::Path;

use olli_app::plot::{self, Axis, Corner, Format, LineChart, PlotError, Series};
use olli_solver::material::homogeneous::Mode;

use super::output::ModeResult;

/// Writes the charts into `dir` (created if missing); returns the files written.
pub fn write_plots(dir: &Path, title: &str, results: &[ModeResult], format: Format) -> Result<Vec<String>, PlotError> {
    std::fs::create_dir_all(dir).map_err(|source| PlotError::Write { path: dir.to_path_buf(), source })?;
    let mut written = Vec::new();
    let groups: [(&str, &str, bool); 2] =
        [("material_modes", "nominal stress", false), ("material_volumetric", "nominal stress (volumetric)", true)];
    for (stem, quantity, volumetric) in groups {
        let mut chart = LineChart::new(format!("{title}: homogeneous responses"), Axis::new("stretch λ", ""), Axis::new(quantity, "F/L²"))
            .with_legend(Corner::UpperLeft);
        for r in results.iter().filter(|r| (r.mode == Mode::Volumetric) == volumetric) {
            chart = chart.with_series(Series::line(r.mode.name(), r.points.iter().map(|p| (p.stretch, p.nominal_stress)).collect()));
            let lost = [r.stability.lost_in_compression, r.stability.lost_in_tension];
            for l in lost.into_iter().flatten() {
                chart = chart.with_vertical(l, format!("{}: Drucker stability lost", r.mode.name()));
            }
        }
        if chart.series.iter().all(|s| s.points.is_empty()) {
            continue;
        }
        let file = format.file_name(stem);
        plot::write(&chart, &dir.join(&file), format)?;
        written.push(file);
    }
    Ok(written)
}
