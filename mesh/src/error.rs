//! Typed errors of the mesh crate. File errors carry the path and where in
//! the file the problem was found, so a user can open the file at that spot.

use std::fmt;
use std::path::PathBuf;

/// Where in a file a problem was found.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Location {
    /// 1-based line of a text file.
    Line(usize),
    /// Byte offset from the start of the file.
    Offset(usize),
    /// 0-based cell (element) index in the file.
    Cell(usize),
    /// The reader could not say where.
    Unknown,
}

impl Location {
    /// `"line 12: "` and the like, or nothing when the position is unknown.
    pub fn prefix(&self) -> String {
        match self {
            Location::Unknown => String::new(),
            known => format!("{known}: "),
        }
    }
}

impl fmt::Display for Location {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Location::Line(l) => write!(f, "line {l}"),
            Location::Offset(o) => write!(f, "byte offset {o}"),
            Location::Cell(c) => write!(f, "cell {c}"),
            Location::Unknown => f.write_str("unknown position"),
        }
    }
}

/// Everything that can go wrong when building, reading or writing a mesh.
#[derive(Debug, thiserror::Error)]
pub enum MeshError {
    /// The file could not be opened or read.
    #[error("{path}: cannot read: {source}")]
    Io {
        /// The file as given by the user.
        path: PathBuf,
        /// What the operating system reported.
        #[source]
        source: std::io::Error,
    },
    /// A malformed or unsupported file.
    #[error("{}: {}{message}", .path.display(), .location.prefix())]
    Parse {
        /// The file being read.
        path: PathBuf,
        /// Line, byte offset or cell where reading stopped.
        location: Location,
        /// What is wrong there, in words for the user.
        message: String,
    },
    /// The file's extension is none of `.vtu`, `.vtk`, `.msh`.
    #[error("{path}: unknown mesh file type (expected .vtu, .vtk or .msh)")]
    UnknownFormat {
        /// The file whose extension was not recognised.
        path: PathBuf,
    },
    /// Writing an output file failed.
    #[error("{path}: cannot write: {message}")]
    Write {
        /// The file that could not be written.
        path: PathBuf,
        /// The underlying I/O or encoder error, in words.
        message: String,
    },
    /// A generator spec that does not parse (the message names line and key).
    #[error("mesh spec: {message}")]
    Spec {
        /// The TOML parser's message, with line and key.
        message: String,
    },
    /// A generator or operation was given an impossible value.
    #[error("invalid `{key}`: {message}")]
    InvalidParameter {
        /// The parameter's name as spelt in the spec (e.g. `divisions[1]`).
        key: String,
        /// Why the value is refused.
        message: String,
    },
}

impl MeshError {
    pub(crate) fn parse(path: &std::path::Path, location: Location, message: impl Into<String>) -> Self {
        MeshError::Parse { path: path.to_path_buf(), location, message: message.into() }
    }

    pub(crate) fn param(key: &str, message: impl Into<String>) -> Self {
        MeshError::InvalidParameter { key: key.to_string(), message: message.into() }
    }
}
