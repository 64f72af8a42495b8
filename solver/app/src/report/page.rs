//! `index.html`: the report page of a run, readable from disk with no
//! server and no network — the pictures, a summary table and the
//! engineering caution. Everything is inline; images are referenced by
//! their file names in the same folder.

use std::fmt::Write;

use super::forces::force_columns;
use super::results::RunResults;
use super::Picture;
use crate::plot::number;

/// The report page's file name.
pub const PAGE_FILE: &str = "index.html";

/// The engineering caution shown on every report (as in the README).
pub const CAUTION: &str = "olli's results are engineering estimates from a numerical model. They depend on the material fit, \
the mesh, the boundary conditions and the assumptions of the analysis, and they must be validated by testing real parts. \
For seals and mounts whose failure affects safety, follow the applicable standards and licensed engineering practice; \
olli does not replace them.";

/// Text made safe for HTML.
pub fn escape(s: &str) -> String {
    s.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;").replace('"', "&quot;")
}

/// Rows (quantity, value, where or remark) of the summary table.
pub fn summary_rows(r: &RunResults) -> Vec<[String; 3]> {
    let mut rows: Vec<[String; 3]> = Vec::new();
    let s = r.summary.as_ref();
    let text = |v: Option<&serde_json::Value>| v.and_then(|v| v.as_str()).unwrap_or("").to_string();
    let num = |v: Option<&serde_json::Value>| v.and_then(|v| v.as_f64());
    match s {
        Some(s) => {
            rows.push(["status".into(), text(s.get("status")), text(s.get("reason"))]);
            if let Some(l) = s.get("last_increment").filter(|l| !l.is_null()) {
                let lf = num(l.get("load_factor")).map(number).unwrap_or_default();
                rows.push([
                    "last converged increment".into(),
                    format!("stage `{}`, increment {}", text(l.get("stage")), l.get("increment").and_then(|v| v.as_u64()).unwrap_or(0)),
                    format!("load factor {lf}"),
                ]);
            }
        }
        None => rows.push([
            "status".into(),
            "no summary.json".into(),
            "the run was interrupted before it ended; pictures show the increments written".into(),
        ]),
    }
    if let Some(peaks) = s.and_then(|s| s.get("peaks")).and_then(|p| p.as_object()) {
        for (name, peak) in peaks {
            let at = peak
                .get("at")
                .and_then(|a| a.as_array())
                .map(|a| a.iter().filter_map(|v| v.as_f64()).map(number).collect::<Vec<_>>().join(", "))
                .unwrap_or_default();
            rows.push([
                format!("peak {}", name.replace('_', " ")),
                num(peak.get("value")).map(number).unwrap_or_default(),
                format!("at ({at}) in the reference shape"),
            ]);
        }
    }
    let t = &r.history;
    if let Some(last) = t.len().checked_sub(1) {
        for c in force_columns(r) {
            let v = t.column(c).map(|v| v[last]).unwrap_or(f64::NAN);
            rows.push([c.to_string(), number(v), "force at the last converged increment".into()]);
        }
        for c in
            t.columns.iter().filter(|c| c.ends_with("_contact_width") || c.ends_with("_peak_pressure") || c.ends_with("_sealing_margin"))
        {
            let v = t.column(c).map(|v| v[last]).unwrap_or(f64::NAN);
            rows.push([c.clone(), number(v), "at the last converged increment".into()]);
        }
    }
    for (_, chart) in super::forces::force_charts(r).iter().filter(|(stem, _)| stem == "stiffness") {
        for series in &chart.series {
            if let Some(&(x, k)) = series.points.last() {
                rows.push([
                    format!("{}: {}", chart.y.quantity, series.name),
                    number(k),
                    format!("last increment (at {} = {})", chart.x.quantity, number(x)),
                ]);
            }
        }
    }
    if let Some(s) = s {
        for key in ["increments", "newton_iterations", "cutbacks", "wall_time_s", "stabilization_share"] {
            if let Some(v) = num(s.get(key)) {
                rows.push([key.replace('_', " "), number(v), String::new()]);
            }
        }
        if let Some(p) = s.get("performance") {
            let ordering = text(p.get("ordering"));
            for (key, remark) in [
                ("equations", String::new()),
                ("factor_entries", format!("{ordering} ordering")),
                ("assembly_s", String::new()),
                ("factorization_s", String::new()),
                ("peak_memory_mib", String::new()),
            ] {
                if let Some(v) = num(p.get(key)) {
                    rows.push([key.replace('_', " "), number(v), remark]);
                }
            }
        }
    }
    rows
}

/// The page's HTML.
pub fn html(r: &RunResults, pictures: &[Picture]) -> String {
    let title = escape(&r.title());
    let mut h = String::new();
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>{title}</title>\n<style>\n\
         body {{ font-family: sans-serif; margin: 2em auto; max-width: 1000px; color: #222; }}\n\
         table {{ border-collapse: collapse; margin: 1em 0; }}\n\
         td, th {{ border: 1px solid #bbb; padding: 0.25em 0.6em; text-align: left; }}\n\
         figure {{ margin: 1.5em 0; }} img {{ max-width: 100%; border: 1px solid #ddd; }}\n\
         .caution {{ border-left: 4px solid #a60; padding: 0.5em 1em; background: #fff6e8; }}\n\
         </style>\n</head>\n<body>\n<h1>{title}</h1>\n"
    );
    if let Some(job) = r.summary_text("job") {
        let _ = writeln!(h, "<p>Job <code>{}</code>, {} analysis.</p>", escape(job), escape(r.summary_text("analysis").unwrap_or("?")));
    }
    let _ = writeln!(h, "<p class=\"caution\"><strong>Caution.</strong> {}</p>", escape(CAUTION));
    h.push_str("<h2>Summary</h2>\n<table>\n<tr><th>quantity</th><th>value</th><th>where / remark</th></tr>\n");
    for [a, b, c] in summary_rows(r) {
        let _ = writeln!(h, "<tr><td>{}</td><td>{}</td><td>{}</td></tr>", escape(&a), escape(&b), escape(&c));
    }
    h.push_str(
        "</table>\n<p>Units: F, L and F/L² are the job's consistent force, length and stress units (for mm, N, MPa: N, mm, MPa). \
                Axisymmetric forces are totals over the full circle.</p>\n<h2>Pictures</h2>\n",
    );
    if pictures.is_empty() {
        h.push_str("<p>No picture: the run has no converged increment.</p>\n");
    }
    for p in pictures {
        let _ = writeln!(
            h,
            "<figure>\n<img src=\"{0}\" alt=\"{1}\">\n<figcaption>{1}</figcaption>\n</figure>",
            escape(&p.file),
            escape(&p.caption)
        );
    }
    h.push_str("</body>\n</html>\n");
    h
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn text_is_escaped() {
        assert_eq!(escape("a < b & \"c\""), "a &lt; b &amp; &quot;c&quot;");
    }
}
