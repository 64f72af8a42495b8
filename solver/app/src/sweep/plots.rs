//! Pictures of a collected sweep: each key result against each numeric
//! parameter, `plots/<result>-vs-<parameter>.png` in the sweep folder,
//! drawn with the shared plotting module. Only converged variants are
//! drawn. Variants that share the values of the other parameters (a grid,
//! or a one-at-a-time study) are joined by a line, one line per such group;
//! otherwise (a Latin hypercube) every variant is a dot.
//!
//! Results that are the same in every variant (a prescribed travel) or that
//! are only round-off (a reaction across a symmetry plane, below 1e-8 of the
//! largest result) say nothing about the parameters and get no picture.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use super::collect::{Status, Table};
use crate::plot::{self, Axis, Corner, Format, LineChart, PlotError, Series};

/// The pictures' folder inside the sweep folder.
pub const PLOTS_FOLDER: &str = "plots";

/// Groups with more lines than this are drawn as dots: a legend of more is unreadable.
pub const MAX_LINES: usize = 8;

/// Draws every picture; returns the files written.
pub fn write_plots(table: &Table, dir: &Path) -> Result<Vec<PathBuf>, PlotError> {
    let rows: Vec<_> = table.rows.iter().filter(|r| r.outcome.status == Status::Converged).collect();
    let parameters: Vec<usize> = (0..table.parameters.len()).filter(|&p| rows.iter().all(|r| r.values[p].parse::<f64>().is_ok())).collect();
    let largest = table.results.iter().flat_map(|c| rows.iter().filter_map(|r| table.number(r, c))).fold(0.0f64, |a, v| a.max(v.abs()));
    let folder = dir.join(PLOTS_FOLDER);
    let mut written = Vec::new();
    for column in &table.results {
        let values: Vec<f64> = rows.iter().filter_map(|r| table.number(r, column)).collect();
        let (lo, hi) = values.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| (a.min(v), b.max(v)));
        let scale = lo.abs().max(hi.abs());
        if values.len() < 2 || hi - lo <= 1e-9 * scale || scale < 1e-8 * largest {
            continue;
        }
        for &p in &parameters {
            // Variants grouped by the values of the other parameters.
            let mut groups: BTreeMap<Vec<String>, Vec<(f64, f64)>> = BTreeMap::new();
            for r in &rows {
                let (Ok(x), Some(y)) = (r.values[p].parse::<f64>(), table.number(r, column)) else { continue };
                let others: Vec<String> = (0..table.parameters.len()).filter(|&q| q != p).map(|q| r.values[q].clone()).collect();
                groups.entry(others).or_default().push((x, y));
            }
            let lines = groups.len() <= MAX_LINES && groups.values().all(|g| g.len() >= 2);
            let mut chart = LineChart::new(
                format!("sweep: {column} against {}", table.parameters[p]),
                Axis::new(&table.parameters[p], ""),
                Axis::new(column, ""),
            )
            .with_legend(Corner::UpperLeft);
            if lines {
                for (others, mut points) in groups {
                    points.sort_by(|a, b| a.0.total_cmp(&b.0));
                    let name: Vec<String> = (0..table.parameters.len())
                        .filter(|&q| q != p)
                        .zip(&others)
                        .map(|(q, v)| format!("{} = {v}", table.parameters[q]))
                        .collect();
                    let mut series = Series::line(name.join(", "), points);
                    series.style = plot::SeriesStyle::LineAndPoints;
                    chart = chart.with_series(series);
                }
            } else {
                chart = chart.with_series(Series::points("variants", groups.into_values().flatten().collect()));
            }
            std::fs::create_dir_all(&folder).map_err(|source| PlotError::Write { path: folder.clone(), source })?;
            let path = folder.join(Format::Png.file_name(&format!("{column}-vs-{}", table.parameters[p])));
            plot::write(&chart, &path, Format::Png)?;
            written.push(path);
        }
    }
    Ok(written)
}
