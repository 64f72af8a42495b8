//! Reading a results folder back: `history.csv` (columns found by name, so
//! columns added later are picked up and missing ones are simply absent),
//! `summary.json` (absent for a run that was killed), and the `.vtu` frames
//! listed in the `.pvd` collection.

use std::path::{Path, PathBuf};

use olli_mesh::{Mesh, PointArray};

use super::ReportError;
use crate::output::{HISTORY_FILE, SUMMARY_FILE};

/// The numeric table of `history.csv`.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Table {
    /// Column names after `stage`, in file order.
    pub columns: Vec<String>,
    /// The stage name of each row.
    pub stages: Vec<String>,
    /// Values by column (`columns` order), one per row; NaN where a cell is not a number.
    pub values: Vec<Vec<f64>>,
}

impl Table {
    /// Parses CSV text whose first column is the (possibly quoted) stage name.
    pub fn parse(path: &Path, text: &str) -> Result<Table, ReportError> {
        let mut lines = text.lines().enumerate().filter(|(_, l)| !l.trim().is_empty());
        let Some((_, header)) = lines.next() else {
            return Err(ReportError::Parse { file: path.to_path_buf(), line: 1, message: "empty file: no header row".into() });
        };
        let names = split_csv(header);
        if names.first().map(String::as_str) != Some("stage") {
            return Err(ReportError::Parse { file: path.to_path_buf(), line: 1, message: "the first column must be `stage`".into() });
        }
        let columns: Vec<String> = names[1..].to_vec();
        let mut table = Table { values: vec![Vec::new(); columns.len()], columns, stages: Vec::new() };
        for (i, line) in lines {
            let cells = split_csv(line);
            if cells.len() != table.columns.len() + 1 {
                let message = format!("{} cells; the header has {}", cells.len(), table.columns.len() + 1);
                return Err(ReportError::Parse { file: path.to_path_buf(), line: i + 1, message });
            }
            table.stages.push(cells[0].clone());
            for (k, c) in cells[1..].iter().enumerate() {
                table.values[k].push(c.trim().parse().unwrap_or(f64::NAN));
            }
        }
        Ok(table)
    }

    /// Number of rows.
    pub fn len(&self) -> usize {
        self.stages.len()
    }

    /// Whether there is no row.
    pub fn is_empty(&self) -> bool {
        self.stages.is_empty()
    }

    /// The column called `name`.
    pub fn column(&self, name: &str) -> Option<&[f64]> {
        self.columns.iter().position(|c| c == name).map(|k| self.values[k].as_slice())
    }

    /// Stage names in order of first appearance.
    pub fn stage_names(&self) -> Vec<String> {
        let mut names: Vec<String> = Vec::new();
        for s in &self.stages {
            if names.last() != Some(s) {
                names.push(s.clone());
            }
        }
        names
    }

    /// Cumulative load factor of each row: stage index + load factor (the `.pvd` time).
    pub fn cumulative_load(&self) -> Vec<f64> {
        let lf = self.column("load_factor").map(<[f64]>::to_vec).unwrap_or_else(|| vec![f64::NAN; self.len()]);
        let mut stage = 0usize;
        (0..self.len())
            .map(|i| {
                if i > 0 && self.stages[i] != self.stages[i - 1] {
                    stage += 1;
                }
                stage as f64 + lf[i]
            })
            .collect()
    }
}

/// Splits one CSV line; quotes may hold commas and doubled quotes.
fn split_csv(line: &str) -> Vec<String> {
    let mut cells = vec![String::new()];
    let mut quoted = false;
    let mut chars = line.chars().peekable();
    while let Some(c) = chars.next() {
        match (c, quoted) {
            ('"', true) if chars.peek() == Some(&'"') => {
                chars.next();
                cells.last_mut().unwrap().push('"');
            }
            ('"', _) => quoted = !quoted,
            (',', false) => cells.push(String::new()),
            _ => cells.last_mut().unwrap().push(c),
        }
    }
    cells
}

/// One saved frame: its `.pvd` time (stage index + load factor) and file.
#[derive(Debug, Clone, PartialEq)]
pub struct FrameRef {
    /// The `.pvd` time: stage index + load factor.
    pub time: f64,
    /// The `.vtu` file of the frame.
    pub file: PathBuf,
}

/// A frame read back: the reference mesh and its point arrays.
#[derive(Debug, Clone, PartialEq)]
pub struct Frame {
    /// The reference (undeformed) mesh.
    pub mesh: Mesh,
    /// Point arrays (displacement, stresses, ...).
    pub arrays: Vec<PointArray>,
}

impl Frame {
    /// Reads a `.vtu` frame.
    pub fn read(path: &Path) -> Result<Frame, ReportError> {
        let imported = olli_mesh::import(path)?;
        Ok(Frame { mesh: imported.mesh, arrays: imported.point_arrays })
    }

    /// The point array called `name`.
    pub fn array(&self, name: &str) -> Option<&PointArray> {
        self.arrays.iter().find(|a| a.name == name)
    }

    /// Current position of each node: reference plus `displacement` (the
    /// reference alone when the frame has no displacement array).
    pub fn deformed(&self) -> Vec<[f64; 3]> {
        let u = self.array("displacement").filter(|a| a.components == 3);
        self.mesh
            .nodes
            .iter()
            .enumerate()
            .map(|(n, x)| u.map_or(*x, |u| [x[0] + u.values[3 * n], x[1] + u.values[3 * n + 1], x[2] + u.values[3 * n + 2]]))
            .collect()
    }
}

/// Everything read from a results folder.
#[derive(Debug, Clone, PartialEq)]
pub struct RunResults {
    /// The results folder.
    pub folder: PathBuf,
    /// `history.csv`, one row per converged increment.
    pub history: Table,
    /// `summary.json`, absent when the run was killed before writing it.
    pub summary: Option<serde_json::Value>,
    /// Saved frames in `.pvd` order.
    pub frames: Vec<FrameRef>,
}

impl RunResults {
    /// Reads `folder`; `history.csv` is required, the rest is optional.
    pub fn read(folder: &Path) -> Result<RunResults, ReportError> {
        let history_path = folder.join(HISTORY_FILE);
        let text = std::fs::read_to_string(&history_path).map_err(|source| ReportError::Read { file: history_path.clone(), source })?;
        let history = Table::parse(&history_path, &text)?;
        let summary_path = folder.join(SUMMARY_FILE);
        let summary = match std::fs::read_to_string(&summary_path) {
            Ok(text) => Some(serde_json::from_str(&text).map_err(|e| ReportError::Parse {
                file: summary_path.clone(),
                line: e.line(),
                message: e.to_string(),
            })?),
            Err(_) => None,
        };
        let frames = read_collection(folder)?;
        Ok(RunResults { folder: folder.to_path_buf(), history, summary, frames })
    }

    /// A text entry of the summary (`title`, `status`, `analysis`, ...).
    pub fn summary_text(&self, key: &str) -> Option<&str> {
        self.summary.as_ref()?.get(key)?.as_str()
    }

    /// The physical dimension of a `history.csv` column from the summary's `units`.
    pub fn dimension(&self, column: &str) -> Option<&str> {
        self.summary.as_ref()?.get("units")?.get(column)?.as_str()
    }

    /// The job's title, else the folder name.
    pub fn title(&self) -> String {
        match self.summary_text("title") {
            Some(t) if !t.is_empty() => t.to_string(),
            _ => self.folder.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_else(|| "olli run".into()),
        }
    }
}

/// The frames of the folder's `.pvd` collection (none when there is no collection).
fn read_collection(folder: &Path) -> Result<Vec<FrameRef>, ReportError> {
    let entries = std::fs::read_dir(folder).map_err(|source| ReportError::Read { file: folder.to_path_buf(), source })?;
    let mut pvd: Vec<PathBuf> =
        entries.filter_map(|e| e.ok()).map(|e| e.path()).filter(|p| p.extension().is_some_and(|x| x == "pvd")).collect();
    pvd.sort();
    let Some(path) = pvd.first() else { return Ok(Vec::new()) };
    let text = std::fs::read_to_string(path).map_err(|source| ReportError::Read { file: path.clone(), source })?;
    let attribute = |tag: &str, name: &str| -> Option<String> {
        let start = tag.find(&format!("{name}=\""))? + name.len() + 2;
        let end = start + tag[start..].find('"')?;
        Some(tag[start..end].replace("&quot;", "\"").replace("&lt;", "<").replace("&gt;", ">").replace("&amp;", "&"))
    };
    let mut frames = Vec::new();
    for (i, tag) in text.split("<DataSet").skip(1).enumerate() {
        let (Some(time), Some(file)) = (attribute(tag, "timestep"), attribute(tag, "file")) else {
            return Err(ReportError::Parse { file: path.clone(), line: i + 4, message: "a DataSet without timestep or file".into() });
        };
        let time = time.parse().map_err(|_| ReportError::Parse {
            file: path.clone(),
            line: i + 4,
            message: format!("timestep `{time}` is not a number"),
        })?;
        frames.push(FrameRef { time, file: folder.join(file) });
    }
    Ok(frames)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn history_columns_are_found_by_name_and_quoted_stages_survive() {
        let text = "stage,increment,load_factor,reaction_top_y,newton_iterations\n\"a, b\",1,5.0e-1,-2.5e0,3\n\"a, b\",2,1.0e0,-5.0e0,2\nhold,1,1.0e0,-4.0e0,2\n";
        let t = Table::parse(Path::new("history.csv"), text).unwrap();
        assert_eq!(t.len(), 3);
        assert_eq!(t.stage_names(), ["a, b", "hold"]);
        assert_eq!(t.column("reaction_top_y").unwrap(), [-2.5, -5.0, -4.0]);
        assert_eq!(t.cumulative_load(), [0.5, 1.0, 2.0]);
        assert!(t.column("applied_top_y").is_none());
    }

    #[test]
    fn a_short_row_names_its_line() {
        let text = "stage,increment,load_factor\nload,1\n";
        let e = Table::parse(Path::new("h.csv"), text).unwrap_err();
        assert!(e.to_string().contains("h.csv") && e.to_string().contains("line 2"), "{e}");
    }
}
