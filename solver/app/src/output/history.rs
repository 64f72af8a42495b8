//! `history.csv`: one row per converged increment.
//!
//! Columns: `stage`, `increment`, `load_factor`, `time` (since the start of
//! the run, in the job's time unit: stages with a `duration` advance it),
//! then one column per named
//! force quantity (`reaction_<set>_<component>`, and later rigid-surface
//! totals), then `newton_iterations`. The header row holds the column names
//! alone so scripts can address them; units are listed in `summary.json` and
//! described in the README.

use std::fmt::Write;

/// A growing table of increments, rewritten atomically after each one.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct History {
    /// Names of the value columns between `time` and `newton_iterations`.
    pub columns: Vec<String>,
    rows: Vec<Row>,
}

#[derive(Debug, Clone, PartialEq)]
struct Row {
    stage: String,
    increment: usize,
    load_factor: f64,
    time: f64,
    values: Vec<f64>,
    iterations: usize,
}

impl History {
    /// An empty history with these value columns.
    pub fn new(columns: Vec<String>) -> Self {
        History { columns, rows: Vec::new() }
    }

    /// Appends a row: the increment's stage, number within it, load factor
    /// and time (`at`), then `values` following `columns`.
    pub fn push(&mut self, stage: &str, at: (usize, f64, f64), values: Vec<f64>, iterations: usize) {
        debug_assert_eq!(values.len(), self.columns.len());
        let (increment, load_factor, time) = at;
        self.rows.push(Row { stage: stage.to_string(), increment, load_factor, time, values, iterations });
    }

    /// Number of rows (converged increments) recorded.
    pub fn len(&self) -> usize {
        self.rows.len()
    }

    /// Whether no row has been recorded yet.
    pub fn is_empty(&self) -> bool {
        self.rows.is_empty()
    }

    /// The CSV text.
    pub fn to_csv(&self) -> String {
        let mut s = String::from("stage,increment,load_factor,time");
        for c in &self.columns {
            s.push(',');
            s.push_str(&csv_text(c));
        }
        s.push_str(",newton_iterations\n");
        for r in &self.rows {
            let _ = write!(s, "{},{},{:.10e},{:.10e}", csv_text(&r.stage), r.increment, r.load_factor, r.time);
            for v in &r.values {
                let _ = write!(s, ",{v:.10e}");
            }
            let _ = writeln!(s, ",{}", r.iterations);
        }
        s
    }
}

/// A field quoted as RFC 4180 ("Common Format and MIME Type for CSV Files",
/// Shafranovich 2005) requires: fields holding a comma, quote or line break
/// are enclosed in quotes, with inner quotes doubled.
fn csv_text(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Regression: set names holding a comma, quote or line break broke the header row.
    #[test]
    fn column_names_with_commas_quotes_and_newlines_are_quoted() {
        let mut h = History::new(vec!["reaction_a,b_x".into(), "reaction_say \"hi\"_y".into(), "reaction_two\nlines_z".into()]);
        h.push("squeeze, then hold", (1, 0.5, 2.0), vec![1.0, 2.0, 3.0], 4);
        let csv = h.to_csv();
        let header =
            "stage,increment,load_factor,time,\"reaction_a,b_x\",\"reaction_say \"\"hi\"\"_y\",\"reaction_two\nlines_z\",newton_iterations\n";
        assert!(csv.starts_with(header), "{csv}");
        assert!(
            csv.ends_with("\"squeeze, then hold\",1,5.0000000000e-1,2.0000000000e0,1.0000000000e0,2.0000000000e0,3.0000000000e0,4\n"),
            "{csv}"
        );
    }
}
