//! Unsaved work kept safe: every `autosave_secs` the document with unsaved changes is written
//! beside its project as `<name>.autosave` (or into the app's data folder for a project never
//! saved), atomically; at the next start an autosave newer than its project is offered back
//! ([`Recovery`]); saving, or closing without saving, removes it.

use crate::app::Workbench;
use crate::doc::Project;
use crate::io;
use std::path::PathBuf;

/// Recovery offer after a crash.
#[derive(Debug, Clone)]
pub struct Recovery {
    /// The autosaved file.
    pub path: PathBuf,
    /// What it holds.
    pub project: Project,
}

impl Workbench {
    /// Where the autosave of the current project goes.
    pub fn autosave_path(&self) -> Option<PathBuf> {
        match &self.project.path {
            Some(p) => {
                let mut name = p.file_name()?.to_os_string();
                name.push(".autosave");
                Some(p.with_file_name(name))
            }
            None => self
                .autosave_dir
                .as_ref()
                .map(|d| d.join(format!("untitled{}.autosave", io::PROJECT_SUFFIX))),
        }
    }

    pub(crate) fn remove_autosave(&mut self) {
        if let Some(p) = self.autosave_path() {
            let _ = std::fs::remove_file(p);
        }
    }

    /// Looks for an autosave of the current project newer than the project itself, and
    /// offers it.
    pub fn check_recovery(&mut self) {
        let Some(auto) = self.autosave_path() else {
            return;
        };
        let Ok(meta) = std::fs::metadata(&auto) else {
            return;
        };
        let newer = match self
            .project
            .path
            .as_ref()
            .and_then(|p| std::fs::metadata(p).ok())
        {
            Some(pm) => match (meta.modified(), pm.modified()) {
                (Ok(a), Ok(b)) => a >= b,
                _ => true,
            },
            None => true,
        };
        if !newer {
            return;
        }
        match io::read_project(&auto) {
            Ok(project) => {
                self.recovery = Some(Recovery {
                    path: auto,
                    project,
                })
            }
            Err(e) => self
                .messages
                .push(format!("An autosaved copy exists but cannot be read: {e}")),
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
