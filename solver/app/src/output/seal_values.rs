//! The seal figures of an increment as `history.csv` values and
//! `summary.json` entries: contact bands per rigid surface, gland fill and
//! squeeze, extrusion past a gap's edge.

use std::collections::BTreeMap;

use serde::Serialize;

use crate::job::Job;
use olli_solver::contact::bands::ContactBand;
use olli_solver::results::IncrementResult;

/// The band columns of one rigid surface asking for `count` bands: the
/// number of bands found, then width and peak pressure of bands 1 to
/// `count` (0 where fewer bands touch).
pub fn band_values(bands: &[ContactBand], count: usize) -> Vec<f64> {
    if count == 0 {
        return Vec::new();
    }
    let mut v = vec![bands.len() as f64];
    for k in 0..count {
        let b = bands.get(k);
        v.push(b.map_or(0.0, |b| b.contact_width));
        v.push(b.map_or(0.0, |b| b.peak_pressure));
    }
    v
}

/// Every band found, as `summary.json` keys of its surface: `bands` and
/// `band<k>_contact_width`, `band<k>_peak_pressure` (k from 1).
pub fn band_entries(bands: &[ContactBand], into: &mut BTreeMap<String, f64>) {
    into.insert("bands".into(), bands.len() as f64);
    for (k, b) in bands.iter().enumerate() {
        into.insert(format!("band{}_contact_width", k + 1), b.contact_width);
        into.insert(format!("band{}_peak_pressure", k + 1), b.peak_pressure);
    }
}

/// The gland and extrusion columns of increment `r` (see [`Job::seal_columns`]).
pub fn seal_values(job: &Job, r: &IncrementResult) -> Vec<f64> {
    let mut v = Vec::new();
    for g in &job.model.glands {
        let s = r.glands.iter().find(|s| s.name == g.name);
        v.push(s.map_or(0.0, |s| s.fill));
        v.push(s.map_or(0.0, |s| s.squeeze));
    }
    for x in &job.model.extrusion_gaps {
        v.push(r.extrusions.iter().find(|s| s.name == x.name).map_or(0.0, |s| s.depth));
    }
    v
}

/// A gland in `summary.json`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GlandEntry {
    /// Rubber section area over the gland's free area (percent).
    pub fill: f64,
    /// Squeeze across the gland (percent).
    pub squeeze: f64,
    /// Section area of the rubber (length²).
    pub rubber_area: f64,
    /// Free area of the gland (length²).
    pub free_area: f64,
    /// Depth of the gland (length).
    pub depth: f64,
}

/// An extrusion gap in `summary.json`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ExtrusionEntry {
    /// The rubber's largest intrusion past the edge (length).
    pub depth: f64,
    /// The node that reaches furthest (0-based).
    pub node: usize,
    /// Its current position.
    pub at: Vec<f64>,
    /// The gap's stop (`max_depth`), if it has one.
    pub max_depth: Option<f64>,
}

/// The glands of increment `r` by name.
pub fn gland_entries(r: &IncrementResult) -> BTreeMap<String, GlandEntry> {
    r.glands
        .iter()
        .map(|g| {
            let e = GlandEntry { fill: g.fill, squeeze: g.squeeze, rubber_area: g.rubber_area, free_area: g.free_area, depth: g.depth };
            (g.name.clone(), e)
        })
        .collect()
}

/// The extrusion gaps of increment `r` by name (`dim` coordinates of the position).
pub fn extrusion_entries(job: &Job, r: &IncrementResult, dim: usize) -> BTreeMap<String, ExtrusionEntry> {
    r.extrusions
        .iter()
        .map(|x| {
            let max_depth = job.model.extrusion_gaps.iter().find(|g| g.name == x.name).and_then(|g| g.max_depth);
            (x.name.clone(), ExtrusionEntry { depth: x.depth, node: x.node, at: x.at[..dim].to_vec(), max_depth })
        })
        .collect()
}
