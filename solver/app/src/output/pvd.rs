//! The `.pvd` collection: one entry per saved increment, keyed by a time
//! value (olli uses the cumulative load factor: stage index + load factor),
//! so VTK viewers animate the loading.

use std::fmt::Write;

/// One entry of the collection.
#[derive(Debug, Clone, PartialEq)]
pub struct PvdEntry {
    /// Pseudo-time of the frame: stage index + load factor.
    pub time: f64,
    /// File name relative to the `.pvd` file.
    pub file: String,
}

/// The XML text of a collection over `entries`.
pub fn pvd_text(entries: &[PvdEntry]) -> String {
    let mut s = String::from(
        "<?xml version=\"1.0\"?>\n<VTKFile type=\"Collection\" version=\"0.1\" byte_order=\"LittleEndian\">\n  <Collection>\n",
    );
    for e in entries {
        let _ = writeln!(s, "    <DataSet timestep=\"{}\" group=\"\" part=\"0\" file=\"{}\"/>", e.time, xml_escape(&e.file));
    }
    s.push_str("  </Collection>\n</VTKFile>\n");
    s
}

fn xml_escape(s: &str) -> String {
    s.replace('&', "&amp;").replace('"', "&quot;").replace('<', "&lt;").replace('>', "&gt;")
}
