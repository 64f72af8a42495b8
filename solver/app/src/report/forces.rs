//! Force–travel and tangent-stiffness charts from `history.csv`: every force
//! column (reactions, rigid surfaces, inserts) that is not zero throughout,
//! against the applied travel when the history has an `applied_*` travel
//! column, else against the cumulative load factor; stage ends are marked.

use super::results::{RunResults, Table};
use crate::plot::{Axis, LineChart, Series};

/// Component names that end a force column.
const COMPONENTS: [&str; 4] = ["x", "y", "z", "r"];

/// The force columns of the history: `reaction_*`, `rigid_*` and `insert_*`
/// columns ending in a component.
pub fn force_columns(table: &Table) -> Vec<&str> {
    table
        .columns
        .iter()
        .filter(|c| ["reaction_", "rigid_", "insert_"].iter().any(|p| c.starts_with(p)))
        .filter(|c| c.rsplit_once('_').is_some_and(|(_, comp)| COMPONENTS.contains(&comp)))
        .map(String::as_str)
        .collect()
}

/// The horizontal axis: the `applied_*` column with the largest range whose
/// dimension is a length (or unknown), else the cumulative load factor.
fn abscissa(r: &RunResults) -> (Axis, Vec<f64>, bool) {
    let t = &r.history;
    let travel = t
        .columns
        .iter()
        .filter(|c| c.starts_with("applied_") && r.dimension(c).is_none_or(|d| d == "length"))
        .filter_map(|c| {
            let v = t.column(c)?;
            let (lo, hi) = v.iter().filter(|x| x.is_finite()).fold((0.0f64, 0.0f64), |(a, b), &x| (a.min(x), b.max(x)));
            (hi - lo > 0.0).then_some((c, hi - lo, v))
        })
        .max_by(|a, b| a.1.total_cmp(&b.1));
    match travel {
        Some((name, _, v)) => {
            let what = name.trim_start_matches("applied_").replace('_', " ");
            (Axis::new(format!("applied travel, {what}"), "L"), v.to_vec(), true)
        }
        None => (Axis::new("load factor (stage number − 1 + fraction of the stage)", ""), t.cumulative_load(), false),
    }
}

/// Readable series name of a force column: `reaction_top_y` → `reaction top, y`.
fn series_name(column: &str) -> String {
    match column.rsplit_once('_') {
        Some((head, comp)) => format!("{}, {comp}", head.replacen('_', " ", 1)),
        None => column.to_string(),
    }
}

/// The force–travel chart and the tangent-stiffness chart (none without a force column).
pub fn force_charts(r: &RunResults) -> Vec<(String, LineChart)> {
    let t = &r.history;
    let forces: Vec<&str> =
        force_columns(t).into_iter().filter(|c| t.column(c).is_some_and(|v| v.iter().any(|x| x.is_finite() && x.abs() > 0.0))).collect();
    if forces.is_empty() || t.is_empty() {
        return Vec::new();
    }
    let (x_axis, x, is_travel) = abscissa(r);
    let title = r.title();
    let mut force = LineChart::new(
        format!("{title}: force against {}", if is_travel { "travel" } else { "load" }),
        x_axis.clone(),
        Axis::new("force", "F"),
    );
    let stiffness_axis =
        if is_travel { Axis::new("tangent stiffness dF/dx", "F/L") } else { Axis::new("force rate dF/d(load factor)", "F") };
    let mut stiffness =
        LineChart::new(format!("{title}: tangent {}", if is_travel { "stiffness" } else { "force rate" }), x_axis, stiffness_axis);
    for c in &forces {
        let f = t.column(c).unwrap_or_default();
        // The run starts unloaded at zero travel.
        let points: Vec<(f64, f64)> = std::iter::once((0.0, 0.0)).chain(x.iter().copied().zip(f.iter().copied())).collect();
        let slopes: Vec<(f64, f64)> = points
            .windows(2)
            .filter(|w| (w[1].0 - w[0].0).abs() > 1e-12 * (w[0].0.abs() + w[1].0.abs()).max(1e-300))
            .map(|w| (0.5 * (w[0].0 + w[1].0), (w[1].1 - w[0].1) / (w[1].0 - w[0].0)))
            .collect();
        force.series.push(Series::line(series_name(c), points));
        stiffness.series.push(Series::line(series_name(c), slopes));
    }
    // A stage's end is the last row of that stage.
    for i in 0..t.len().saturating_sub(1) {
        if t.stages[i] != t.stages[i + 1] {
            force = force.with_vertical(x[i], format!("end of `{}`", t.stages[i]));
            stiffness = stiffness.with_vertical(x[i], format!("end of `{}`", t.stages[i]));
        }
    }
    let mut charts = vec![("force".to_string(), force)];
    if stiffness.series.iter().any(|s| !s.points.is_empty()) {
        charts.push(("stiffness".to_string(), stiffness));
    }
    charts
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::path::Path;

    fn results(text: &str) -> RunResults {
        RunResults { folder: "r".into(), history: Table::parse(Path::new("h"), text).unwrap(), summary: None, frames: Vec::new() }
    }

    /// F = 3 x²: the chart's slopes between rows are the exact secant
    /// slopes 3 (x₁ + x₂), i.e. the tangent at the midpoint.
    #[test]
    fn stiffness_is_the_slope_against_the_applied_travel() {
        let text = "stage,increment,load_factor,applied_top_y,reaction_top_y,rigid_cover_contact_width,newton_iterations\n\
                    press,1,0.5,1.0,3.0,0.1,2\npress,2,1.0,2.0,12.0,0.2,2\nhold,1,1.0,2.0,11.0,0.2,2\n";
        let charts = force_charts(&results(text));
        assert_eq!(charts.len(), 2);
        let (_, force) = &charts[0];
        assert_eq!(force.series.len(), 1, "only force columns");
        assert_eq!(force.series[0].points, [(0.0, 0.0), (1.0, 3.0), (2.0, 12.0), (2.0, 11.0)]);
        assert_eq!(force.vertical.len(), 1);
        assert!(force.x.quantity.contains("travel"));
        let (_, k) = &charts[1];
        assert_eq!(k.series[0].points, [(0.5, 3.0), (1.5, 9.0)], "the hold stage (no travel) has no slope");
    }

    #[test]
    fn without_a_travel_column_the_load_factor_is_the_abscissa() {
        let text = "stage,increment,load_factor,reaction_top_x,reaction_top_y,newton_iterations\na,1,1.0,0.0,2.0,1\nb,1,0.5,0.0,3.0,1\n";
        let charts = force_charts(&results(text));
        let (_, force) = &charts[0];
        assert_eq!(force.series.len(), 1, "the all-zero x component is left out");
        assert_eq!(force.series[0].points, [(0.0, 0.0), (1.0, 2.0), (1.5, 3.0)]);
        assert!(force.x.quantity.starts_with("load factor"));
    }
}
