//! Guards against allocations the machine cannot hold: a size read from a
//! file or a job is checked here before anything is allocated for it, so an
//! impossible request becomes a message instead of an abort.

use std::fmt;
use std::io::Read;
use std::path::Path;

/// A request for more memory than the machine has free.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TooLarge {
    /// What the memory was for.
    pub what: String,
    /// Bytes asked for.
    pub requested: u64,
    /// Bytes available when asked.
    pub available: u64,
}

impl fmt::Display for TooLarge {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} needs about {} but only {} of memory is available", self.what, human(self.requested), human(self.available))
    }
}

impl std::error::Error for TooLarge {}

/// Bytes as `"12.3 GB"`.
pub fn human(bytes: u64) -> String {
    let b = bytes as f64;
    match b {
        b if b >= 1e12 => format!("{:.1} TB", b / 1e12),
        b if b >= 1e9 => format!("{:.1} GB", b / 1e9),
        b if b >= 1e6 => format!("{:.1} MB", b / 1e6),
        b if b >= 1e3 => format!("{:.1} kB", b / 1e3),
        _ => format!("{bytes} bytes"),
    }
}

/// Memory the operating system reports as available (`MemAvailable` in
/// `/proc/meminfo` on Linux), or `None` where that is not known.
pub fn available_bytes() -> Option<u64> {
    let text = std::fs::read_to_string("/proc/meminfo").ok()?;
    let line = text.lines().find(|l| l.starts_with("MemAvailable:"))?;
    let kib: u64 = line.split_whitespace().nth(1)?.parse().ok()?;
    kib.checked_mul(1024)
}

/// Fails when `bytes` exceeds the available memory (when that is known).
pub fn check_allocation(what: &str, bytes: u64) -> Result<(), TooLarge> {
    match available_bytes() {
        Some(available) if bytes > available => Err(TooLarge { what: what.to_string(), requested: bytes, available }),
        _ => Ok(()),
    }
}

/// Reads a whole regular file of at most `limit` bytes. A device, a pipe or
/// a link to one (`/dev/zero`) is refused, and reading stops past `limit`, so
/// no file makes the reader run out of memory.
pub fn read_bounded(path: &Path, limit: u64) -> std::io::Result<Vec<u8>> {
    let file = std::fs::File::open(path)?;
    let meta = file.metadata()?;
    if !meta.is_file() {
        return Err(std::io::Error::new(std::io::ErrorKind::InvalidInput, "not a regular file (a device, pipe or folder)"));
    }
    if meta.len() > limit {
        return Err(too_big(meta.len(), limit));
    }
    let mut bytes = Vec::with_capacity(meta.len() as usize);
    file.take(limit + 1).read_to_end(&mut bytes)?;
    if bytes.len() as u64 > limit {
        return Err(too_big(bytes.len() as u64, limit));
    }
    Ok(bytes)
}

fn too_big(size: u64, limit: u64) -> std::io::Error {
    std::io::Error::new(
        std::io::ErrorKind::InvalidInput,
        format!("the file holds {} or more; at most {} can be read", human(size), human(limit)),
    )
}

/// The most a mesh file may hold: a quarter of the available memory (the
/// mesh built from it needs several times its size), or 4 GB when unknown.
pub fn mesh_file_limit() -> u64 {
    available_bytes().map_or(4_000_000_000, |a| a / 4)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    #[cfg(target_os = "linux")]
    fn an_impossible_request_names_what_and_how_much() {
        let e = check_allocation("ten exabytes", u64::MAX).unwrap_err();
        assert_eq!(e.requested, u64::MAX);
        assert!(e.to_string().starts_with("ten exabytes needs about 18446744.1 TB but only"), "{e}");
        assert!(check_allocation("a byte", 1).is_ok());
    }

    /// Regression: a mesh or job file that is a link to an endless device was read until memory ran out.
    #[test]
    #[cfg(unix)]
    fn a_link_to_an_endless_device_is_refused_not_read() {
        let link = std::env::temp_dir().join(format!("olli_endless_{}.msh", std::process::id()));
        let _ = std::fs::remove_file(&link);
        std::os::unix::fs::symlink("/dev/zero", &link).unwrap();
        let e = read_bounded(&link, 1 << 20).unwrap_err();
        std::fs::remove_file(&link).unwrap();
        assert!(e.to_string().contains("not a regular file"), "{e}");
    }

    #[test]
    fn a_file_over_the_limit_is_refused() {
        let path = std::env::temp_dir().join(format!("olli_big_{}.txt", std::process::id()));
        std::fs::write(&path, [b'x'; 100]).unwrap();
        let e = read_bounded(&path, 99).unwrap_err();
        assert_eq!(read_bounded(&path, 100).unwrap().len(), 100);
        std::fs::remove_file(&path).unwrap();
        assert!(e.to_string().contains("at most 99 bytes"), "{e}");
    }
}
