//! What the workbench does for an [`Action`]: something a panel asks for that is not an edit
//! of the document — switching the active series, undo and redo, opening a project or a data
//! file, importing pasted text, saving, a new or demo project, the answers to the recovery
//! offer and to the close question. Panels only propose actions; the app performs them after
//! the UI pass.

use crate::app::Workbench;
use crate::doc::Project;
use crate::io;
use std::path::{Path, PathBuf};

/// Something a panel asks the app to do that is not an edit of the document.
#[derive(Debug, Clone, PartialEq)]
pub enum Action {
    /// Make this series the one shown in the table and results.
    SetActive(u64),
    /// Undo the last change.
    Undo,
    /// Redo.
    Redo,
    /// Open a file (project or data), chosen by extension.
    Open(PathBuf),
    /// Import data from pasted text.
    ImportText(String),
    /// Save the project to its path, or ask for one.
    Save,
    /// Save the project to this path.
    SaveAs(PathBuf),
    /// Start a new empty project.
    New,
    /// Reload the demo project.
    Demo,
    /// Restore the offered autosave at this path.
    Recover(PathBuf),
    /// Throw the offered autosave at this path away.
    DiscardRecovery(PathBuf),
    /// Close the window without saving.
    QuitDiscarding,
    /// Save, then close.
    SaveAndQuit,
    /// Stop the Monte Carlo or bootstrap run of this series.
    CancelIntervals(u64),
    /// Start the run of this series again (after a Cancel).
    RunIntervalsAgain(u64),
}

impl Workbench {
    /// Does what `action` asks (after the UI pass, see [`Workbench::apply_pending`]).
    pub(crate) fn perform(&mut self, action: Action) {
        match action {
            Action::SetActive(id) => self.active = Some(id),
            Action::Undo => {
                self.history.undo(&mut self.project);
            }
            Action::Redo => {
                self.history.redo(&mut self.project);
            }
            Action::Open(path) => self.open_path(&path),
            Action::ImportText(text) => match io::import_text(&text, "pasted text") {
                Ok(preview) => self.files.start_preview(preview),
                Err(io::ImportFailure::Question(q)) => self.files.ask(*q),
                Err(io::ImportFailure::Message(e)) => self.messages.push(e),
            },
            Action::Save => match self.project.path.clone() {
                Some(p) => self.save_to(&p),
                None => self.files.ask_save_as(),
            },
            Action::SaveAs(p) => self.save_to(&p),
            Action::New => {
                self.replace_project(Project::default(), true);
            }
            Action::Demo => {
                if let Ok(p) = io::demo_project() {
                    self.replace_project(p, true);
                }
            }
            Action::Recover(auto) => self.recover(&auto),
            Action::DiscardRecovery(auto) => self.discard_recovery(&auto),
            Action::QuitDiscarding => {
                self.remove_autosave();
                self.may_close = true;
                self.close_now = true;
                self.asking_to_close = false;
            }
            Action::CancelIntervals(id) => self.interval_runs.cancel(id),
            Action::RunIntervalsAgain(id) => self.interval_runs.run_again(id),
            Action::SaveAndQuit => {
                match self.project.path.clone() {
                    Some(p) => {
                        self.save_to(&p);
                        if !self.history.dirty() {
                            self.may_close = true;
                            self.close_now = true;
                        }
                    }
                    None => self.files.ask_save_as(),
                }
                self.asking_to_close = false;
            }
        }
    }

    /// Opens a project or imports a data file, by extension. Errors go to the message
    /// list and leave the project untouched.
    pub fn open_path(&mut self, path: &Path) {
        if io::is_project_file(path) {
            match io::read_project(path) {
                Ok(mut p) => {
                    p.path = Some(path.to_path_buf());
                    self.prefs.remember(path);
                    if self.project.series.is_empty() && !self.history.dirty() {
                        self.replace_project(p, false);
                    } else {
                        self.replace_project(p, true);
                    }
                    self.history.mark_saved();
                    self.check_recovery();
                }
                Err(e) => self.messages.push(e),
            }
        } else {
            match io::import_path(path) {
                Ok(preview) => {
                    self.prefs.remember(path);
                    self.files.start_preview(preview);
                }
                Err(io::ImportFailure::Question(q)) => {
                    self.prefs.remember(path);
                    self.files.ask(*q);
                }
                Err(io::ImportFailure::Message(e)) => self.messages.push(e),
            }
        }
    }

    /// Saves atomically to `path`; on success the project is clean and the autosave gone.
    pub fn save_to(&mut self, path: &Path) {
        match io::write_project(&self.project, path) {
            Ok(()) => {
                self.remove_autosave();
                self.project.path = Some(path.to_path_buf());
                self.history.mark_saved();
                self.prefs.remember(path);
            }
            Err(e) => self.messages.push(e),
        }
    }
}
