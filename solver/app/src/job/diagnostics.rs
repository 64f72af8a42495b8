//! Turning TOML and schema errors into messages a user can act on: the file,
//! the line and column, the offending key, and the nearest valid key when the
//! key looks misspelt.

use std::fmt;
use std::ops::Range;
use std::path::{Path, PathBuf};

/// A problem in an input file, located as precisely as the parser allows.
#[derive(Debug, Clone, PartialEq)]
pub struct InputError {
    /// The file the problem is in.
    pub file: PathBuf,
    /// 1-based line and column, when known.
    pub position: Option<(usize, usize)>,
    /// What is wrong, in words for the user.
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
        let mut message = with_suggestion(err.message().trim());
        // serde's type errors do not say whose value is wrong: name the key.
        if message.starts_with("invalid type") || message.starts_with("invalid value") {
            if let Some(key) = err.span().and_then(|s| key_before(source, s.start)) {
                message = format!("`{key}`: {message}");
            }
        }
        Self::at(file, source, err.span(), message)
    }

    /// Reads a text input file of at most `limit` bytes: a device or a link to
    /// one is refused, and invalid UTF-8 is reported at its line and column.
    pub fn read_text(file: &Path, what: &str, limit: u64) -> Result<String, InputError> {
        let bytes = olli_mesh::memory::read_bounded(file, limit).map_err(|e| InputError {
            file: file.to_path_buf(),
            position: None,
            message: format!("cannot read the {what}: {e}"),
        })?;
        String::from_utf8(bytes).map_err(|e| {
            let at = e.utf8_error().valid_up_to();
            let text = String::from_utf8_lossy(e.as_bytes());
            let lossy_offset = String::from_utf8_lossy(&e.as_bytes()[..at]).len();
            Self::at(file, &text, Some(lossy_offset..lossy_offset), format!("the {what} is not valid UTF-8 text (byte {at})"))
        })
    }
}

/// The key whose value starts at byte `offset` (`key = value`), if any.
fn key_before(source: &str, offset: usize) -> Option<&str> {
    let before = source.get(..offset)?.trim_end();
    let before = before.strip_suffix('=')?.trim_end();
    let start = before.rfind(|c: char| !(c.is_alphanumeric() || matches!(c, '_' | '-' | '.' | '"'))).map_or(0, |i| i + 1);
    Some(&before[start..]).filter(|k| !k.is_empty())
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

    /// Regression: type errors did not name their key.
    #[test]
    fn type_errors_name_their_key() {
        #[derive(serde::Deserialize, Debug)]
        #[allow(dead_code)]
        struct T {
            material: M,
        }
        #[derive(serde::Deserialize, Debug)]
        #[allow(dead_code)]
        struct M {
            shear_modulus: f64,
        }
        let source = "[material]\nshear_modulus = \"0.55\"\n";
        let err = toml::from_str::<T>(source).unwrap_err();
        let e = InputError::from_toml(Path::new("job.toml"), source, &err);
        assert_eq!(e.to_string(), "job.toml:2:17: `shear_modulus`: invalid type: string \"0.55\", expected f64");
    }

    /// Regression: invalid UTF-8 was reported without its line.
    #[test]
    fn invalid_utf8_names_its_line() {
        let path = std::env::temp_dir().join(format!("olli_utf8_{}.toml", std::process::id()));
        std::fs::write(&path, b"[mesh]\nfile = \"a.msh\"\nname = \"caf\xe9\"\n").unwrap();
        let e = InputError::read_text(&path, "job file", 1 << 20).unwrap_err();
        std::fs::remove_file(&path).unwrap();
        assert_eq!(e.position, Some((3, 12)), "{e}");
        assert!(e.message.contains("not valid UTF-8"), "{e}");
    }

    #[test]
    fn positions_are_one_based() {
        assert_eq!(line_column("ab\ncd\n", 0), (1, 1));
        assert_eq!(line_column("ab\ncd\n", 4), (2, 2));
    }
}
