//! Atomic file writing: a temporary file in the destination folder, written, flushed and
//! synced, then renamed over the destination, so a reader never sees half a report and an
//! old report survives a failed write.
//!
//! The temporary file is created like any new file (`create_new`, default mode), so the
//! finished report gets the usual permissions under the user's umask (0644 with the common
//! umask 022), not the 0600 of a private temporary. Its name is
//! `.isochore-<pid>-<n>.part`; a write killed half-way leaves one behind, and
//! [`remove_stale_temporaries`] removes those whose process is gone (on systems with
//! `/proc`) or that are older than [`STALE_AFTER`].

use crate::ReportError;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};
use std::time::{Duration, SystemTime};

/// Prefix of every temporary file.
pub const TEMP_PREFIX: &str = ".isochore-";
/// Suffix of every temporary file.
pub const TEMP_SUFFIX: &str = ".part";
/// Age after which a temporary file is stale whatever its process (a report is written in
/// seconds): isochore-data's, the one rule for every temporary of ours.
pub const STALE_AFTER: Duration = isochore_data::atomic::STALE_AFTER;

static COUNTER: AtomicU64 = AtomicU64::new(0);

fn folder_of(path: &Path) -> &Path {
    match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    }
}

/// Creates a new temporary file in `dir`, named after this process.
fn create_temporary(dir: &Path) -> std::io::Result<(PathBuf, std::fs::File)> {
    let pid = std::process::id();
    let nanos = SystemTime::now()
        .duration_since(SystemTime::UNIX_EPOCH)
        .map_or(0, |d| d.subsec_nanos());
    loop {
        let n = COUNTER.fetch_add(1, Ordering::Relaxed);
        let p = dir.join(format!("{TEMP_PREFIX}{pid}-{n}-{nanos:x}{TEMP_SUFFIX}"));
        match std::fs::OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&p)
        {
            Ok(f) => return Ok((p, f)),
            Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists && n < 1_000_000 => {}
            Err(e) => return Err(e),
        }
    }
}

/// Writes `bytes` to `path` atomically (temporary file in the same folder, flush, sync,
/// rename). A new file gets the permissions any new file gets (the umask applies).
///
/// # Errors
/// [`ReportError::Io`] naming `path` when any step fails; the temporary file is removed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), ReportError> {
    let io = |source: std::io::Error| ReportError::Io {
        path: path.to_path_buf(),
        source,
    };
    let (tmp, mut file) = create_temporary(folder_of(path)).map_err(io)?;
    let result = file
        .write_all(bytes)
        .and_then(|()| file.flush())
        .and_then(|()| file.sync_all())
        .and_then(|()| {
            drop(file);
            std::fs::rename(&tmp, path)
        });
    if let Err(e) = result {
        let _ = std::fs::remove_file(&tmp);
        return Err(io(e));
    }
    Ok(())
}

/// Removes the temporary files (`.isochore-*.part`) that killed report writes left in
/// `dir`: those named after a process that no longer runs (where `/proc` can tell) and
/// those older than [`STALE_AFTER`]. Files of running writes are left alone. Returns the
/// paths removed; a folder that cannot be read removes nothing. The rule is isochore-data's,
/// shared with project saves.
pub fn remove_stale_temporaries(dir: &Path) -> Vec<PathBuf> {
    isochore_data::atomic::remove_stale_temporaries_named(dir, TEMP_PREFIX, TEMP_SUFFIX)
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

    #[test]
    fn stale_temporaries_go_and_live_ones_stay() {
        let dir = tempfile::tempdir().unwrap();
        let old = dir.path().join(".isochore-abc.part");
        std::fs::write(&old, b"x").unwrap();
        let f = std::fs::File::options().write(true).open(&old).unwrap();
        f.set_modified(SystemTime::now() - Duration::from_secs(3600))
            .unwrap();
        drop(f);
        // A temporary of this (running) process, just written: kept.
        let mine = dir
            .path()
            .join(format!(".isochore-{}-0-0.part", std::process::id()));
        std::fs::write(&mine, b"x").unwrap();
        // Not a temporary of ours: kept whatever its age.
        let other = dir.path().join("notes.part");
        std::fs::write(&other, b"x").unwrap();
        let removed = remove_stale_temporaries(dir.path());
        assert_eq!(removed, vec![old.clone()]);
        assert!(!old.exists() && mine.exists() && other.exists());
    }
}
