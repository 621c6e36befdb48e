//! Unsaved work kept safe: every `autosave_secs` the document with unsaved changes is written
//! beside its project as `<name>.autosave` (or into the app's data folder for a project never
//! saved), atomically; at the next start every autosave found — in the app's data folder and
//! beside each recently used project — that is newer than its project is offered back with
//! the project's name and the autosave's time ([`Recovery`]), whichever project is opened;
//! saving, or closing without saving, removes it.

use crate::app::Workbench;
use crate::doc::Project;
use crate::io;
use std::path::{Path, PathBuf};

/// Suffix of an autosave file (after the project's own file name).
pub const AUTOSAVE_SUFFIX: &str = ".autosave";

/// Recovery offer after a crash.
#[derive(Debug, Clone)]
pub struct Recovery {
    /// The autosaved file.
    pub path: PathBuf,
    /// What it holds.
    pub project: Project,
    /// The project file it is the autosave of (`None`: a project never saved).
    pub project_path: Option<PathBuf>,
    /// When it was written (seconds since 1970, UTC), if the file system says.
    pub written: Option<i64>,
}

impl Recovery {
    /// The project's name as the offer shows it: its file name, or "untitled project".
    pub fn name(&self) -> String {
        self.project_path
            .as_ref()
            .and_then(|p| p.file_name())
            .map_or_else(
                || "untitled project".to_string(),
                |n| n.to_string_lossy().into_owned(),
            )
    }

    /// When it was written, as an RFC 3339 UTC time ("2026-12-01T21:00:00Z"), or "an
    /// unknown time".
    pub fn when(&self) -> String {
        self.written.map_or_else(
            || "an unknown time".to_string(),
            crate::command::rfc3339_utc,
        )
    }
}

/// The project file an autosave at `auto` belongs to: `<name>` beside `<name>.autosave`,
/// or `None` for the autosave of a project never saved (kept in the app's data folder).
fn project_of(auto: &Path, autosave_dir: Option<&Path>) -> Option<PathBuf> {
    let name = auto.file_name()?.to_string_lossy().into_owned();
    let stem = name.strip_suffix(AUTOSAVE_SUFFIX)?;
    let in_data_folder = autosave_dir.is_some_and(|d| auto.parent() == Some(d));
    (!in_data_folder).then(|| auto.with_file_name(stem))
}

/// Whether the autosave at `auto` is newer than its project file (always, when there is
/// no project file or a time is missing).
fn newer_than_project(auto: &Path, project: Option<&Path>) -> bool {
    let Ok(meta) = std::fs::metadata(auto) else {
        return false;
    };
    match project.and_then(|p| std::fs::metadata(p).ok()) {
        Some(pm) => match (meta.modified(), pm.modified()) {
            (Ok(a), Ok(b)) => a >= b,
            _ => true,
        },
        None => true,
    }
}

fn written_at(path: &Path) -> Option<i64> {
    let t = std::fs::metadata(path).ok()?.modified().ok()?;
    let d = t.duration_since(std::time::UNIX_EPOCH).ok()?;
    i64::try_from(d.as_secs()).ok()
}

impl Workbench {
    /// Where the autosave of the current project goes.
    pub fn autosave_path(&self) -> Option<PathBuf> {
        match &self.project.path {
            Some(p) => {
                let mut name = p.file_name()?.to_os_string();
                name.push(AUTOSAVE_SUFFIX);
                Some(p.with_file_name(name))
            }
            None => self
                .autosave_dir
                .as_ref()
                .map(|d| d.join(format!("untitled{}{AUTOSAVE_SUFFIX}", io::PROJECT_SUFFIX))),
        }
    }

    pub(crate) fn remove_autosave(&mut self) {
        if let Some(p) = self.autosave_path() {
            let _ = std::fs::remove_file(p);
        }
    }

    /// Looks for an autosave of the current project newer than the project itself, and
    /// offers it (beside any offers already made).
    pub fn check_recovery(&mut self) {
        let Some(auto) = self.autosave_path() else {
            return;
        };
        let project = self.project.path.clone();
        self.offer(auto, project);
    }

    /// At start-up: offers every autosave found that is newer than its project — those in
    /// the app's data folder (projects never saved), and those beside the current project
    /// and each recently used project file — newest first, whichever project is open.
    pub fn offer_recoveries(&mut self) {
        let mut found: Vec<PathBuf> = Vec::new();
        if let Some(dir) = &self.autosave_dir {
            if let Ok(entries) = std::fs::read_dir(dir) {
                for e in entries.flatten() {
                    let p = e.path();
                    if p.to_string_lossy().ends_with(AUTOSAVE_SUFFIX) && p.is_file() {
                        found.push(p);
                    }
                }
            }
        }
        let projects = self
            .project
            .path
            .iter()
            .chain(self.prefs.recent.iter())
            .filter(|p| io::is_project_file(p))
            .cloned()
            .collect::<Vec<_>>();
        for p in projects {
            let mut name = p.as_os_str().to_owned();
            name.push(AUTOSAVE_SUFFIX);
            found.push(PathBuf::from(name));
        }
        for auto in found {
            let project = project_of(&auto, self.autosave_dir.as_deref());
            self.offer(auto, project);
        }
        self.recoveries
            .sort_by_key(|r| std::cmp::Reverse(r.written.unwrap_or(i64::MIN)));
    }

    /// Offers the autosave at `auto` (of the project file `project`, if any) when it exists,
    /// is newer than that project, and is not offered already.
    fn offer(&mut self, auto: PathBuf, project: Option<PathBuf>) {
        if self.recoveries.iter().any(|r| r.path == auto)
            || !newer_than_project(&auto, project.as_deref())
        {
            return;
        }
        match io::read_project(&auto) {
            Ok(mut restored) => {
                restored.path = project.clone();
                self.recoveries.push(Recovery {
                    written: written_at(&auto),
                    path: auto,
                    project: restored,
                    project_path: project,
                });
            }
            Err(e) => self
                .messages
                .push(format!("An autosaved copy exists but cannot be read: {e}")),
        }
    }

    /// Restores the offered autosave at `auto` (undoably, unsaved, under its project's
    /// path) and removes the file.
    pub(crate) fn recover(&mut self, auto: &Path) {
        if let Some(i) = self.recoveries.iter().position(|r| r.path == auto) {
            let r = self.recoveries.remove(i);
            self.replace_project(r.project, true);
            let _ = std::fs::remove_file(&r.path);
        }
    }

    /// Throws the offered autosave at `auto` away (the file is removed).
    pub(crate) fn discard_recovery(&mut self, auto: &Path) {
        if let Some(i) = self.recoveries.iter().position(|r| r.path == auto) {
            let r = self.recoveries.remove(i);
            let _ = std::fs::remove_file(&r.path);
        }
    }

    /// Writes the autosave when there are unsaved changes and the interval has passed.
    /// Returns whether it wrote.
    pub fn autosave_tick(&mut self) -> bool {
        if !self.history.dirty()
            || self.history.revision == self.last_autosave_rev
            || self.now - self.last_autosave_time < self.prefs.autosave_secs
        {
            return false;
        }
        self.last_autosave_time = self.now;
        let Some(path) = self.autosave_path() else {
            return false;
        };
        match io::write_project(&self.project, &path) {
            Ok(()) => {
                self.last_autosave_rev = self.history.revision;
                true
            }
            Err(e) => {
                self.messages.push(format!("Autosave failed: {e}"));
                false
            }
        }
    }
}
