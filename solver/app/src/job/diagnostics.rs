//! Turning TOML and schema errors into messages a user can act on: the file,
//! the line and column, the offending key, and the nearest valid key when the
//! key looks misspelt.

use std::fmt;
use std::ops::Range;
use std::path::{Path, PathBuf};

/// A problem in an input file, located as precisely as the parser allows.
#[derive(Debug, Clone, PartialEq)]
pub struct InputError {
    pub file: PathBuf,
    /// 1-based line and column, when known.
    pub position: Option<(usize, usize)>,
    pub message: String,
}

impl fmt::Display for InputError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.position {
            Some((line, col)) => write!(f, "{}:{line}:{col}: {}", self.file.display(), self.message),
            None => write!(f, "{}: {}", self.file.display(), self.message),
        }
    }
}

impl std::error::Error for InputError {}

impl InputError {
    /// An error at byte range `span` of `source` (or without position).
    pub fn at(file: &Path, source: &str, span: Option<Range<usize>>, message: impl Into<String>) -> Self {
        InputError { file: file.to_path_buf(), position: span.map(|s| line_column(source, s.start)), message: message.into() }
    }

    /// Converts a `toml` deserialisation error, adding a spelling suggestion
    /// for unknown keys and unknown variant names.
    pub fn from_toml(file: &Path, source: &str, err: &toml::de::Error) -> Self {
        let message = with_suggestion(err.message().trim());
        Self::at(file, source, err.span(), message)
    }
}

/// 1-based (line, column) of byte `offset` in `source`.
pub fn line_column(source: &str, offset: usize) -> (usize, usize) {
    let offset = offset.min(source.len());
    let before = &source.as_bytes()[..offset];
    let line = before.iter().filter(|&&b| b == b'\n').count() + 1;
    let line_start = before.iter().rposition(|&b| b == b'\n').map_or(0, |p| p + 1);
    // Count characters, not bytes, so the column matches what editors show.
    let col = String::from_utf8_lossy(&before[line_start..]).chars().count() + 1;
    (line, col)
}

/// The candidate nearest to `word` by edit distance, if close enough to be a
/// plausible misspelling.
pub fn nearest<'a>(word: &str, candidates: impl IntoIterator<Item = &'a str>) -> Option<&'a str> {
    candidates
        .into_iter()
        .map(|c| (strsim::damerau_levenshtein(word, c), c))
        .filter(|&(d, c)| d <= 2.max(c.len() / 3))
        .min_by_key(|&(d, _)| d)
        .map(|(_, c)| c)
}

/// Adds "did you mean `x`?" to serde's "unknown field `a`, expected one of
/// `b`, `c`" and "unknown variant" messages.
pub fn with_suggestion(message: &str) -> String {
    let (Some(word), Some(list)) = (backticked(message).next(), message.split_once("expected")) else {
        return message.to_string();
    };
    if !(message.starts_with("unknown field") || message.starts_with("unknown variant")) {
        return message.to_string();
    }
    let choices: Vec<&str> = backticked(list.1).collect();
    match nearest(word, choices.iter().copied()) {
        Some(best) => format!("{message}; did you mean `{best}`?"),
        None => message.to_string(),
    }
}

fn backticked(s: &str) -> impl Iterator<Item = &str> {
    s.split('`').skip(1).step_by(2)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn suggests_the_nearest_field() {
        let m = with_suggestion("unknown field `shear_modulu`, expected one of `model`, `shear_modulus`, `c10`");
        assert!(m.ends_with("did you mean `shear_modulus`?"), "{m}");
        let m = with_suggestion("unknown field `zzzzzz`, expected one of `model`, `c10`");
        assert!(!m.contains("did you mean"), "{m}");
    }

    #[test]
    fn positions_are_one_based() {
        assert_eq!(line_column("ab\ncd\n", 0), (1, 1));
        assert_eq!(line_column("ab\ncd\n", 4), (2, 2));
    }
}
