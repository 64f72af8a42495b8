//! The collected table `sweep.csv`: a row per variant with `variant`, one
//! column per parameter (named by its key path), `status`, then the results
//! read from the variant's `summary.json`, and last `reason` (why a variant
//! did not converge). Results are read generically: every number and boolean
//! in the summary except the run's bookkeeping becomes a column named by its
//! path (`reactions.pin.z`, `rigid.cover.contact_width`, `peaks.von_mises`),
//! so figures that later versions add to the summary flow into the table.
//! The same code builds the table after a local run and from a batch folder.

use std::io;
use std::path::Path;

use serde_json::Value;

use super::folder::{Manifest, ERROR_FILE};
use crate::output::{write_atomic, SUMMARY_FILE};

/// The table's file name.
pub const TABLE_FILE: &str = "sweep.csv";

/// Summary entries that describe the run rather than the part: not results.
pub const BOOKKEEPING: [&str; 16] = [
    "olli_version",
    "job",
    "title",
    "analysis",
    "status",
    "reason",
    "stopped_in_stage",
    "stages_completed",
    "last_increment",
    "stabilization_share",
    "increments",
    "newton_iterations",
    "cutbacks",
    "wall_time_s",
    "performance",
    "files",
];

/// How a variant ended.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Status {
    /// Every stage converged.
    Converged,
    /// The run stopped part-way (its summary says why).
    Stopped,
    /// The run ended without a summary (its error output says why).
    Failed,
    /// No result yet.
    NotRun,
}

impl Status {
    /// The word in the `status` column.
    pub fn name(&self) -> &'static str {
        match self {
            Status::Converged => "converged",
            Status::Stopped => "stopped",
            Status::Failed => "failed",
            Status::NotRun => "not run",
        }
    }
}

/// A variant's outcome as found in its folder.
#[derive(Debug, Clone, PartialEq)]
pub struct Outcome {
    /// How the variant ended (or that it did not run).
    pub status: Status,
    /// Why it stopped or failed (empty when it converged).
    pub reason: String,
    /// Results by column name, in the summary's order.
    pub results: Vec<(String, String)>,
}

/// Reads a variant's folder: its summary if the run finished, else its error output.
pub fn outcome(folder: &Path) -> Outcome {
    let summary = std::fs::read_to_string(folder.join(SUMMARY_FILE)).ok().and_then(|t| serde_json::from_str::<Value>(&t).ok());
    match summary {
        Some(s) => {
            let status = if s["status"] == "converged" { Status::Converged } else { Status::Stopped };
            let reason = s["reason"].as_str().unwrap_or_default().to_string();
            let mut results = Vec::new();
            if let Some(map) = s.as_object() {
                for (k, v) in map.iter().filter(|(k, _)| !BOOKKEEPING.contains(&k.as_str()) && k.as_str() != "units") {
                    flatten(k, v, &mut results);
                }
            }
            Outcome { status, reason, results }
        }
        None => {
            let errors = std::fs::read_to_string(folder.join(ERROR_FILE)).unwrap_or_default();
            match errors.lines().rev().find(|l| !l.trim().is_empty()) {
                Some(last) => Outcome { status: Status::Failed, reason: last.trim().to_string(), results: Vec::new() },
                None => Outcome { status: Status::NotRun, reason: String::new(), results: Vec::new() },
            }
        }
    }
}

/// Numbers and booleans under `path`; a `{ value, at }` peak gives its value; arrays (positions) are skipped.
fn flatten(path: &str, v: &Value, out: &mut Vec<(String, String)>) {
    match v {
        Value::Number(n) => out.push((path.to_string(), n.to_string())),
        Value::Bool(b) => out.push((path.to_string(), b.to_string())),
        Value::Object(map) if map.contains_key("value") && map["value"].is_number() => {
            out.push((path.to_string(), map["value"].to_string()))
        }
        Value::Object(map) => {
            for (k, v) in map {
                flatten(&format!("{path}.{k}"), v, out);
            }
        }
        _ => {}
    }
}

/// The collected table.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    /// Parameter key paths.
    pub parameters: Vec<String>,
    /// Result columns, in order of first appearance.
    pub results: Vec<String>,
    /// One row per variant, in plan order.
    pub rows: Vec<Row>,
}

/// One variant's row.
#[derive(Debug, Clone, PartialEq)]
pub struct Row {
    /// Variant name (also its folder).
    pub variant: String,
    /// Parameter values as written in the job.
    pub values: Vec<String>,
    /// How it ended and its results.
    pub outcome: Outcome,
}

impl Table {
    /// Builds the table from the folders under `dir` that the manifest names.
    pub fn collect(dir: &Path, manifest: &Manifest) -> Self {
        let mut results: Vec<String> = Vec::new();
        let rows: Vec<Row> = manifest
            .variants
            .iter()
            .map(|v| {
                let outcome = outcome(&dir.join(&v.name));
                for (k, _) in &outcome.results {
                    if !results.contains(k) {
                        results.push(k.clone());
                    }
                }
                let values = v.values.iter().map(|x| x.as_str().map(str::to_string).unwrap_or_else(|| x.to_string())).collect();
                Row { variant: v.name.clone(), values, outcome }
            })
            .collect();
        Table { parameters: manifest.parameters.clone(), results, rows }
    }

    /// Whether every variant converged.
    pub fn all_converged(&self) -> bool {
        self.rows.iter().all(|r| r.outcome.status == Status::Converged)
    }

    /// Number of rows with each status.
    pub fn count(&self, status: Status) -> usize {
        self.rows.iter().filter(|r| r.outcome.status == status).count()
    }

    /// A result of a row as a number.
    pub fn number(&self, row: &Row, column: &str) -> Option<f64> {
        row.outcome.results.iter().find(|(k, _)| k == column).and_then(|(_, v)| v.parse().ok())
    }

    /// The CSV text.
    pub fn to_csv(&self) -> String {
        let mut header: Vec<&str> = vec!["variant"];
        header.extend(self.parameters.iter().map(String::as_str));
        header.push("status");
        header.extend(self.results.iter().map(String::as_str));
        header.push("reason");
        let mut out = header.iter().map(|h| field(h)).collect::<Vec<_>>().join(",") + "\n";
        for r in &self.rows {
            let mut cells: Vec<String> = vec![field(&r.variant)];
            cells.extend(r.values.iter().map(|v| field(v)));
            cells.push(r.outcome.status.name().to_string());
            for c in &self.results {
                cells.push(r.outcome.results.iter().find(|(k, _)| k == c).map(|(_, v)| field(v)).unwrap_or_default());
            }
            cells.push(field(&r.outcome.reason));
            out += &(cells.join(",") + "\n");
        }
        out
    }

    /// Writes `DIR/sweep.csv`.
    pub fn write(&self, dir: &Path) -> io::Result<()> {
        write_atomic(&dir.join(TABLE_FILE), self.to_csv().as_bytes())
    }
}

/// A CSV field, quoted when it holds a comma, quote or line break (RFC 4180).
fn field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn summaries_flatten_to_named_columns_without_bookkeeping() {
        let s: Value = serde_json::from_str(
            r#"{"status":"converged","increments":4,"reactions":{"pin":{"r":0.1,"z":2.5}},"performance":{"assembly_s":0.5},
                "peaks":{"von_mises":{"value":1.5,"at":[1,2,3]}},"sealing":{"margin":0.3,"sealed":true}}"#,
        )
        .unwrap();
        let mut out = Vec::new();
        for (k, v) in s.as_object().unwrap().iter().filter(|(k, _)| !BOOKKEEPING.contains(&k.as_str())) {
            flatten(k, v, &mut out);
        }
        let names: Vec<&str> = out.iter().map(|(k, _)| k.as_str()).collect();
        assert_eq!(names, ["peaks.von_mises", "reactions.pin.r", "reactions.pin.z", "sealing.margin", "sealing.sealed"]);
        assert_eq!(out[0].1, "1.5");
    }

    #[test]
    fn fields_are_quoted_only_when_needed() {
        assert_eq!(field("a b"), "a b");
        assert_eq!(field("a, \"b\""), "\"a, \"\"b\"\"\"");
    }
}
