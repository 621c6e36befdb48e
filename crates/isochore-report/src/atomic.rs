//! Atomic file writing: a temporary file in the destination folder, written, flushed and
//! synced, then renamed over the destination, so a reader never sees half a report and an
//! old report survives a failed write.

use crate::ReportError;
use std::io::Write;
use std::path::Path;

/// Writes `bytes` to `path` atomically (temporary file in the same folder, flush, sync,
/// rename).
///
/// # Errors
/// [`ReportError::Io`] naming `path` when any step fails; the temporary file is removed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), ReportError> {
    let io = |source: std::io::Error| ReportError::Io {
        path: path.to_path_buf(),
        source,
    };
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    let mut tmp = tempfile::Builder::new()
        .prefix(".isochore-")
        .suffix(".part")
        .tempfile_in(dir)
        .map_err(io)?;
    tmp.write_all(bytes).map_err(io)?;
    tmp.flush().map_err(io)?;
    tmp.as_file().sync_all().map_err(io)?;
    tmp.persist(path).map_err(|e| io(e.error))?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn replaces_whole_file_and_leaves_no_temporary() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("r.txt");
        write_atomic(&p, b"first version, longer").unwrap();
        write_atomic(&p, b"second").unwrap();
        assert_eq!(std::fs::read(&p).unwrap(), b"second");
        let names: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
        assert_eq!(names.len(), 1);
        // A folder that does not exist is an error naming the path, not a panic.
        let bad = dir.path().join("missing/r.txt");
        let e = write_atomic(&bad, b"x").unwrap_err();
        assert!(e.to_string().contains("missing"), "{e}");
    }
}
