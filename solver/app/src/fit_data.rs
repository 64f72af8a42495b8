//! Test data for `olli fit`: CSV files of homogeneous tests, read into
//! [`olli_solver::fit::DataPoint`]s with every problem reported by file and
//! line.
//!
//! Layout: a header row naming the columns, then one row per point. Needed
//! columns: `mode` (uniaxial, equibiaxial, planar, simple-shear,
//! volumetric), `stretch` (or `engineering_strain`, stretch − 1) and
//! `nominal_stress`. Other columns are ignored; empty lines and lines
//! starting with `#` are skipped. Fields are separated by commas.

use std::path::Path;

use olli_solver::fit::DataPoint;
use olli_solver::material::homogeneous::Mode;
use thiserror::Error;

use crate::job::diagnostics::nearest;

/// Names of the modes, for messages.
const MODE_NAMES: &[&str] = &["uniaxial", "equibiaxial", "planar", "simple-shear", "volumetric"];

/// Bad test data: the file, the line (1-based; `None` for the whole file)
/// and what is wrong.
#[derive(Debug, Clone, PartialEq, Error)]
#[error("{file}{}: {message}", line.map(|l| format!(" line {l}")).unwrap_or_default())]
pub struct DataError {
    /// The data file as given on the command line.
    pub file: String,
    /// 1-based line of the file, when the problem is on one line.
    pub line: Option<usize>,
    /// What is wrong, in words for the user.
    pub message: String,
}

/// One measured point with where it came from.
#[derive(Debug, Clone, PartialEq)]
pub struct SourcedPoint {
    /// The measured point (test mode, stretch, nominal stress).
    pub point: DataPoint,
    /// File as given on the command line.
    pub file: String,
    /// Line in that file (1-based).
    pub line: usize,
}

/// Reads the CSV file at `path`.
pub fn read(path: &Path) -> Result<Vec<SourcedPoint>, DataError> {
    let file = path.display().to_string();
    let text =
        std::fs::read_to_string(path).map_err(|e| DataError { file: file.clone(), line: None, message: format!("cannot read: {e}") })?;
    parse(&text, &file)
}

/// Parses CSV `text`; `file` names it in messages.
pub fn parse(text: &str, file: &str) -> Result<Vec<SourcedPoint>, DataError> {
    let err = |line: Option<usize>, message: String| DataError { file: file.to_string(), line, message };
    let mut rows = text.lines().enumerate().map(|(i, l)| (i + 1, l.trim())).filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
    let Some((header_line, header)) = rows.next() else {
        return Err(err(None, "empty file (expected a header row with `mode`, `stretch` and `nominal_stress` columns)".into()));
    };
    let names: Vec<&str> = header.split(',').map(|s| s.trim().trim_matches('"')).collect();
    let column = |name: &str| names.iter().position(|n| *n == name);
    let missing = |name: &str| {
        let hint = nearest(name, names.iter().copied()).map(|n| format!("; is `{n}` meant?")).unwrap_or_default();
        err(Some(header_line), format!("no `{name}` column in the header ({}){hint}", names.join(", ")))
    };
    let mode_col = column("mode").ok_or_else(|| missing("mode"))?;
    let (stretch_col, is_strain) = match (column("stretch"), column("engineering_strain")) {
        (Some(c), _) => (c, false),
        (None, Some(c)) => (c, true),
        (None, None) => return Err(missing("stretch")),
    };
    let stress_col = column("nominal_stress").ok_or_else(|| missing("nominal_stress"))?;

    let mut out = Vec::new();
    for (line, row) in rows {
        let fields: Vec<&str> = row.split(',').map(|s| s.trim().trim_matches('"')).collect();
        if fields.len() != names.len() {
            return Err(err(Some(line), format!("{} fields, but the header has {}", fields.len(), names.len())));
        }
        let mode_name = fields[mode_col];
        let mode = Mode::from_name(mode_name).ok_or_else(|| {
            let hint = nearest(mode_name, MODE_NAMES.iter().copied()).map(|n| format!("; did you mean `{n}`?")).unwrap_or_default();
            err(Some(line), format!("unknown mode `{mode_name}` (known: {}){hint}", MODE_NAMES.join(", ")))
        })?;
        let number = |col: usize| {
            let text = fields[col];
            match text.parse::<f64>() {
                Ok(v) if v.is_finite() => Ok(v),
                _ => Err(err(Some(line), format!("`{}` is `{text}`, not a finite number", names[col]))),
            }
        };
        let raw = number(stretch_col)?;
        let stretch = if is_strain { 1.0 + raw } else { raw };
        if !(stretch > 0.0) {
            return Err(err(Some(line), format!("stretch {stretch} is not positive (a stretch is deformed over undeformed length)")));
        }
        let nominal_stress = number(stress_col)?;
        out.push(SourcedPoint { point: DataPoint { mode, stretch, nominal_stress }, file: file.to_string(), line });
    }
    if out.is_empty() {
        return Err(err(None, "no data rows after the header".into()));
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn message(text: &str) -> String {
        parse(text, "lab.csv").unwrap_err().to_string()
    }

    #[test]
    fn reads_points_with_their_lines() {
        let p = parse("# invented\nmode,stretch,nominal_stress,note\nuniaxial,1.5,0.4,a\n\nplanar,2,0.9,b\n", "lab.csv").unwrap();
        assert_eq!(p.len(), 2);
        assert_eq!((p[1].line, p[1].point.mode, p[1].point.stretch), (5, Mode::Planar, 2.0));
        let s = parse("mode,engineering_strain,nominal_stress\nequibiaxial,0.5,1.0\n", "x").unwrap();
        assert_eq!(s[0].point.stretch, 1.5);
    }

    #[test]
    fn bad_data_is_reported_by_file_and_line() {
        assert_eq!(message(""), "lab.csv: empty file (expected a header row with `mode`, `stretch` and `nominal_stress` columns)");
        assert!(message("mode,stretch\nuniaxial,1.2\n").starts_with("lab.csv line 1: no `nominal_stress` column"));
        assert!(message("mode,stretch,nominal_stress\nuniaxial,1.2,0.3\nuniaxial,-0.5,0.1\n")
            .starts_with("lab.csv line 3: stretch -0.5 is not positive"));
        assert!(message("mode,stretch,nominal_stress\nuniaxial,0,0.1\n").starts_with("lab.csv line 2: stretch 0 is not positive"));
        let m = message("mode,stretch,nominal_stress\nequibiaxal,1.2,0.3\n");
        assert!(m.starts_with("lab.csv line 2: unknown mode `equibiaxal`") && m.contains("did you mean `equibiaxial`?"), "{m}");
        assert_eq!(
            message("mode,stretch,nominal_stress\nplanar,1.2,NaN\n"),
            "lab.csv line 2: `nominal_stress` is `NaN`, not a finite number"
        );
        assert!(message("mode,stretch,nominal_stress\nplanar,1.2\n").starts_with("lab.csv line 2: 2 fields"));
        assert_eq!(message("mode,stretch,nominal_stress\n"), "lab.csv: no data rows after the header");
    }
}
