//! The temporary files of atomic project saves. Each is created with the permissions any
//! new file gets (on Unix 0666 less the umask, as `File::create` does), not the private
//! 0600 of a temporary file, so that the saved project — the temporary renamed — is as
//! readable as any file the user makes (colleagues on a shared drive can open it). Each is
//! named after the saving process (`.isochore-save-<pid>-<random>.tmp`), so that the ones
//! a killed save left behind are recognised and removed by the next save in that folder.

use std::path::{Path, PathBuf};
use std::time::{Duration, SystemTime};

/// Prefix of every temporary file of a project save.
pub const SAVE_TEMP_PREFIX: &str = ".isochore-save-";
/// Suffix of every temporary file of a project save.
pub const SAVE_TEMP_SUFFIX: &str = ".tmp";
/// Age after which a save's temporary file is stale whatever its process (a save takes
/// seconds at most).
pub const STALE_AFTER: Duration = Duration::from_secs(10 * 60);

/// A new temporary file in `dir` for a save, with the permissions of a new file.
pub(crate) fn temporary_in(dir: &Path) -> std::io::Result<tempfile::NamedTempFile> {
    let prefix = format!("{SAVE_TEMP_PREFIX}{}-", std::process::id());
    let mut b = tempfile::Builder::new();
    b.prefix(&prefix).suffix(SAVE_TEMP_SUFFIX);
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        // Opened with mode 0666: the kernel takes the umask off, as for any new file.
        b.permissions(std::fs::Permissions::from_mode(0o666));
    }
    b.tempfile_in(dir)
}

/// The process id in a temporary's name `<prefix><pid>-…<suffix>`, if it carries one.
fn pid_of(name: &str, prefix: &str, suffix: &str) -> Option<u32> {
    let rest = name.strip_prefix(prefix)?.strip_suffix(suffix)?;
    rest.split('-').next()?.parse().ok()
}

/// Whether process `pid` is known to be gone (only where `/proc` shows processes).
fn process_gone(pid: u32) -> bool {
    let proc_root = Path::new("/proc");
    proc_root.join("self").exists() && !proc_root.join(pid.to_string()).exists()
}

/// Removes the temporary files (`.isochore-save-*.tmp`) that killed saves left in `dir`:
/// those named after a process that no longer runs (where `/proc` can tell) and those
/// older than [`STALE_AFTER`]. The files of saves still running are left alone, and no
/// other file is touched. Returns the paths removed; a folder that cannot be read removes
/// nothing.
pub fn remove_stale_save_temporaries(dir: &Path) -> Vec<PathBuf> {
    remove_stale_temporaries_named(dir, SAVE_TEMP_PREFIX, SAVE_TEMP_SUFFIX)
}

/// Removes the temporary files named `<prefix><pid>-…<suffix>` in `dir` that a killed
/// writer left: those of a process that no longer runs (where `/proc` can tell) and those
/// older than [`STALE_AFTER`]. The one rule for project saves and report writes (the
/// report crate names its own prefix and suffix). Returns the paths removed, sorted; a
/// folder that cannot be read removes nothing.
pub fn remove_stale_temporaries_named(dir: &Path, prefix: &str, suffix: &str) -> Vec<PathBuf> {
    let mut removed = Vec::new();
    let Ok(entries) = std::fs::read_dir(dir) else {
        return removed;
    };
    let me = std::process::id();
    for entry in entries.flatten() {
        let name = entry.file_name().to_string_lossy().into_owned();
        if !(name.starts_with(prefix) && name.ends_with(suffix)) {
            continue;
        }
        let Ok(meta) = entry.metadata() else { continue };
        if !meta.is_file() {
            continue;
        }
        let old = meta
            .modified()
            .ok()
            .and_then(|t| SystemTime::now().duration_since(t).ok())
            .is_some_and(|age| age > STALE_AFTER);
        let orphan = pid_of(&name, prefix, suffix).is_some_and(|p| p != me && process_gone(p));
        if (old || orphan) && std::fs::remove_file(entry.path()).is_ok() {
            removed.push(entry.path());
        }
    }
    removed.sort();
    removed
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{import_text, ImportOptions, Project};

    fn project() -> Project {
        let imp = import_text(
            "lab.csv",
            "T (°C),K\n20,1.5\n25,2.5\n30,3.5\n",
            &ImportOptions::default(),
        )
        .unwrap();
        Project::from_import(&imp)
    }

    /// Runs the test `name` of this binary again in a child process under `umask 027`
    /// (so that the expected mode, 0640, differs from both the 0600 of a private temporary
    /// and the 0644 of the common umask 022), with `ISOCHORE_UMASK_CHILD` set.
    #[cfg(unix)]
    fn run_under_umask_027(name: &str) {
        let exe = std::env::current_exe().unwrap();
        let status = std::process::Command::new("sh")
            .arg("-c")
            .arg("umask 027 && exec \"$0\" --exact \"$1\" --test-threads=1")
            .arg(&exe)
            .arg(name)
            .env("ISOCHORE_UMASK_CHILD", "1")
            .status()
            .unwrap();
        assert!(status.success(), "{name} failed under umask 027");
    }

    #[cfg(unix)]
    #[test]
    fn a_saved_project_has_the_permissions_of_a_new_file() {
        use std::os::unix::fs::PermissionsExt;
        if std::env::var_os("ISOCHORE_UMASK_CHILD").is_none() {
            run_under_umask_027("atomic::tests::a_saved_project_has_the_permissions_of_a_new_file");
        }
        let dir = tempfile::tempdir().unwrap();
        let mode = |p: &Path| std::fs::metadata(p).unwrap().permissions().mode() & 0o777;
        // What any program gets for a new file here (0666 less the umask).
        let reference = dir.path().join("reference.txt");
        std::fs::File::create(&reference).unwrap();
        let path = dir.path().join("p.isochore.json");
        project().save_atomic(&path).unwrap();
        assert_eq!(mode(&path), mode(&reference));
        // Saved again over itself (the old file becomes the .bak): the same.
        project().save_atomic(&path).unwrap();
        assert_eq!(mode(&path), mode(&reference));
        if std::env::var_os("ISOCHORE_UMASK_CHILD").is_some() {
            // umask 027 takes write from the group and everything from others.
            assert_eq!(mode(&path), 0o640);
            assert_eq!(mode(&reference), 0o640);
        }
    }

    #[test]
    fn process_ids_are_read_from_both_kinds_of_name() {
        assert_eq!(
            pid_of(".isochore-123-4-ff.part", ".isochore-", ".part"),
            Some(123)
        );
        assert_eq!(pid_of(".isochore-abc.part", ".isochore-", ".part"), None);
        let save = format!("{SAVE_TEMP_PREFIX}77-x1{SAVE_TEMP_SUFFIX}");
        assert_eq!(pid_of(&save, SAVE_TEMP_PREFIX, SAVE_TEMP_SUFFIX), Some(77));
    }

    #[test]
    fn a_killed_saves_leftovers_are_removed_by_the_next_save() {
        let dir = tempfile::tempdir().unwrap();
        // A process id no system hands out (above Linux's pid_max limit of 2²²).
        let dead = dir.path().join(".isochore-save-4294967295-abc123.tmp");
        std::fs::write(&dead, b"{").unwrap();
        // A save of this very process, still running: kept.
        let live = dir
            .path()
            .join(format!(".isochore-save-{}-xyz.tmp", std::process::id()));
        std::fs::write(&live, b"{").unwrap();
        // Not ours: kept whatever its age.
        let other = dir.path().join("notes.tmp");
        std::fs::write(&other, b"x").unwrap();
        let path = dir.path().join("p.isochore.json");
        project().save_atomic(&path).unwrap();
        if Path::new("/proc/self").exists() {
            assert!(!dead.exists());
        }
        assert!(live.exists());
        assert!(other.exists());
        assert!(path.exists());
    }
}
