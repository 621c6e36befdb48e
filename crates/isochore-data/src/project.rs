//! Project files: the measurements exactly as read, the column mapping, each data set's
//! settings, exclusions with reasons and times, and notes, as versioned JSON.
//!
//! Each data set is a [`DataSet`] with its cells as typed, the single source of truth:
//! [`DataSet::points`] recomputes the converted values from them and the mapping every
//! time. [`Project::save_atomic`] never
//! leaves a half-written file (temporary file in the same folder, sync, rename; the
//! previous version is kept as `<name>.bak`). [`Project::load`] refuses newer schema
//! versions and damaged files with a message and changes nothing.

use crate::dataset::DataSet;
use crate::error::Error;
use crate::import::Import;
use serde::{Deserialize, Serialize};
use std::io::{Read, Write};
use std::path::Path;

/// The schema version this crate writes, and the newest it reads.
pub const SCHEMA_VERSION: u32 = 1;

/// Largest project file [`Project::load`] reads (1 GiB).
pub const MAX_PROJECT_BYTES: u64 = 1 << 30;

/// A project: several data sets and free-text notes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Project {
    /// Schema version of the file ([`SCHEMA_VERSION`] when written by this crate).
    pub schema_version: u32,
    /// The data sets.
    #[serde(default)]
    pub series: Vec<DataSet>,
    /// Free-text notes about the whole project.
    #[serde(default)]
    pub notes: String,
}

impl Default for Project {
    fn default() -> Self {
        Project {
            schema_version: SCHEMA_VERSION,
            series: Vec::new(),
            notes: String::new(),
        }
    }
}

impl Project {
    /// An empty project.
    pub fn new() -> Self {
        Project::default()
    }

    /// A project with one data set per series of an import, settings at their defaults
    /// (replicate handling as in the import).
    pub fn from_import(import: &Import) -> Self {
        let mut p = Project::new();
        p.add_import(import);
        p
    }

    /// Adds the data sets of an import, with their cells as typed.
    pub fn add_import(&mut self, import: &Import) {
        self.series.extend(import.data_sets_with_cells());
    }

    /// The project as pretty-printed JSON.
    pub fn to_json(&self) -> String {
        // Serialising plain data with string keys cannot fail; fall back to compact output
        // rather than panic if it ever did.
        serde_json::to_string_pretty(self).unwrap_or_else(|e| format!("{{\"error\":\"{e}\"}}"))
    }

    /// Reads a project from JSON text. `path` names the file in messages.
    ///
    /// # Errors
    /// [`Error::ProjectTooNew`] or [`Error::ProjectDamaged`].
    pub fn from_json(text: &str, path: &str) -> Result<Project, Error> {
        #[derive(Deserialize)]
        struct Version {
            schema_version: u32,
        }
        let damaged = |message: String| Error::ProjectDamaged {
            path: path.to_string(),
            message,
            backup: existing_backup(path),
        };
        // A byte-order mark, as some editors write, is accepted as it is for CSV files.
        let text = text.strip_prefix('\u{FEFF}').unwrap_or(text);
        let v: Version = serde_json::from_str(text).map_err(|e| damaged(describe_json(&e)))?;
        if v.schema_version > SCHEMA_VERSION {
            return Err(Error::ProjectTooNew {
                path: path.to_string(),
                found: v.schema_version,
                supported: SCHEMA_VERSION,
            });
        }
        if v.schema_version == 0 {
            return Err(damaged("schema_version 0 is not a valid version".into()));
        }
        let p: Project = serde_json::from_str(text).map_err(|e| damaged(describe_json(&e)))?;
        for s in &p.series {
            s.check().map_err(damaged)?;
        }
        Ok(p)
    }

    /// Loads a project file. Changes nothing on disk.
    ///
    /// # Errors
    /// [`Error::Io`], [`Error::ProjectTooNew`] or [`Error::ProjectDamaged`].
    pub fn load(path: impl AsRef<Path>) -> Result<Project, Error> {
        let path = path.as_ref();
        let shown = path.display().to_string();
        let io = |e: std::io::Error| Error::Io {
            path: shown.clone(),
            message: e.to_string(),
        };
        let file = std::fs::File::open(path).map_err(io)?;
        let mut bytes = Vec::new();
        file.take(MAX_PROJECT_BYTES + 1)
            .read_to_end(&mut bytes)
            .map_err(io)?;
        if bytes.len() as u64 > MAX_PROJECT_BYTES {
            return Err(Error::ProjectDamaged {
                backup: existing_backup(&shown),
                path: shown,
                message: format!("larger than {MAX_PROJECT_BYTES} bytes"),
            });
        }
        let text = String::from_utf8(bytes).map_err(|e| Error::ProjectDamaged {
            path: shown.clone(),
            message: format!("not UTF-8 text (byte {})", e.utf8_error().valid_up_to()),
            backup: existing_backup(&shown),
        })?;
        Project::from_json(&text, &shown)
    }

    /// Saves atomically: writes a temporary file in the same folder, syncs it to disk,
    /// replaces `<name>.bak` with a copy of the previous file (if any) the same way (a
    /// temporary copy, synced, renamed), then renames the temporary file over the target and
    /// syncs the folder. A crash at any moment leaves the old or the new file complete, and
    /// a complete `.bak`; a killed save may leave `.isochore-save-*.tmp` files behind, which
    /// are never read as projects and which the next save in that folder removes (see
    /// [`crate::atomic`]). The project gets the permissions of any new file (the umask
    /// applies), not a temporary file's private ones.
    ///
    /// # Errors
    /// [`Error::Io`].
    pub fn save_atomic(&self, path: impl AsRef<Path>) -> Result<(), Error> {
        let path = path.as_ref();
        let shown = path.display().to_string();
        let io = |e: std::io::Error| Error::Io {
            path: shown.clone(),
            message: e.to_string(),
        };
        let dir = match path.parent() {
            Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
            _ => std::path::PathBuf::from("."),
        };
        let json = self.to_json();
        // What killed saves left here goes first (never a file of a save still running).
        crate::atomic::remove_stale_save_temporaries(&dir);
        // Created with a new file's permissions, so the project gets them when renamed.
        let mut tmp = crate::atomic::temporary_in(&dir).map_err(io)?;
        tmp.write_all(json.as_bytes()).map_err(io)?;
        tmp.write_all(b"\n").map_err(io)?;
        tmp.as_file().sync_all().map_err(io)?;
        if path.exists() {
            // The backup is replaced the same way: copied into a temporary file of its own,
            // synced, then renamed, so that a crash never leaves a half-copied `.bak`.
            let mut bak = path.as_os_str().to_owned();
            bak.push(".bak");
            let old = crate::atomic::temporary_in(&dir).map_err(io)?;
            std::fs::copy(path, old.path()).map_err(io)?;
            old.as_file().sync_all().map_err(io)?;
            old.persist(&bak).map_err(|e| io(e.error))?;
        }
        tmp.persist(path).map_err(|e| io(e.error))?;
        // Make the rename itself durable where the platform allows it.
        if let Ok(d) = std::fs::File::open(&dir) {
            let _ = d.sync_all();
        }
        Ok(())
    }
}

/// `<path>.bak` when such a file exists (a previous save kept by [`Project::save_atomic`]).
fn existing_backup(path: &str) -> Option<String> {
    if path.is_empty() {
        return None;
    }
    let bak = format!("{path}.bak");
    Path::new(&bak).is_file().then_some(bak)
}

/// serde_json's message with the location said once, in front: serde_json ends its own
/// text with " at line L column C", which is cut off here.
fn describe_json(e: &serde_json::Error) -> String {
    let text = e.to_string();
    if e.line() > 0 {
        let suffix = format!(" at line {} column {}", e.line(), e.column());
        let inner = text.strip_suffix(&suffix).unwrap_or(&text);
        format!("line {}, column {}: {inner}", e.line(), e.column())
    } else {
        text
    }
}
