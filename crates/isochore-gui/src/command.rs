//! Every change to the document is a [`Command`]. Panels only *propose* commands during
//! the UI pass; the app applies them afterwards. Applying a command returns its inverse,
//! which is what the undo stack keeps, so undo and redo cost as much as the edit itself
//! (no copies of large series).

use crate::doc::{Entry, Project};
use isochore_analysis::RowNumber;
use isochore_data::{Exclusion, SavedCalorimetric, SeriesSettings};
use isochore_report::present::names;

/// One change to the document.
#[derive(Debug, Clone, PartialEq)]
pub enum Command {
    /// Exclude a 0-based row with a reason and time (`Some`), or include it (`None`).
    SetExclusion {
        /// Series id.
        series: u64,
        /// 0-based row.
        row: usize,
        /// (reason, RFC 3339 time) when excluded.
        exclusion: Option<(String, String)>,
    },
    /// Replace one cell of a row with new text, as typed.
    EditCell {
        /// Series id.
        series: u64,
        /// 0-based row.
        row: usize,
        /// 0-based column.
        column: usize,
        /// The new text.
        text: String,
    },
    /// Replace the settings of a series.
    SetSettings {
        /// Series id.
        series: u64,
        /// New settings.
        settings: SeriesSettings,
    },
    /// Show or hide a series on the van 't Hoff plot.
    SetShown {
        /// Series id.
        series: u64,
        /// Drawn or not.
        shown: bool,
    },
    /// Rename a series.
    Rename {
        /// Series id.
        series: u64,
        /// New name.
        name: String,
    },
    /// Insert a series at a position.
    InsertSeries {
        /// Position.
        at: usize,
        /// The series.
        series: Box<Entry>,
    },
    /// Remove a series.
    RemoveSeries {
        /// Series id.
        series: u64,
    },
    /// Replace the whole project (open, recover, demo).
    ReplaceProject(Box<Project>),
    /// Replace the calorimetric values of a series (added, removed or loaded from a file).
    SetCalorimetric {
        /// Series id.
        series: u64,
        /// The new values, SI.
        values: Vec<SavedCalorimetric>,
    },
    /// Replace the interval method, draws and generator start value of a series.
    SetIntervals {
        /// Series id.
        series: u64,
        /// The new request.
        request: isochore_fit::intervals::IntervalRequest,
    },
}

impl Command {
    /// A short description for the Edit menu ("exclude row 7").
    pub fn describe(&self) -> String {
        match self {
            Command::SetExclusion { row, exclusion, .. } => match exclusion {
                None => names::use_row_again(RowNumber::from_index(*row).get()),
                Some(_) => names::exclude_row(RowNumber::from_index(*row).get()),
            },
            Command::EditCell { row, .. } => format!("edit row {}", RowNumber::from_index(*row)),
            Command::SetSettings { .. } => "settings change".into(),
            Command::SetShown { .. } => "show/hide series".into(),
            Command::Rename { .. } => "rename".into(),
            Command::InsertSeries { .. } => "add series".into(),
            Command::RemoveSeries { .. } => "remove series".into(),
            Command::ReplaceProject(_) => "replace project".into(),
            Command::SetCalorimetric { .. } => "calorimetric values".into(),
            Command::SetIntervals { .. } => "interval method".into(),
        }
    }
}

fn bump(s: &mut Entry) {
    s.rev = s.rev.wrapping_add(1);
}

/// Applies `cmd` to `project` and returns the command that undoes it, or `None` when the
/// command does not apply (unknown series, row or column): the project is then unchanged.
pub fn apply(project: &mut Project, cmd: Command) -> Option<Command> {
    match cmd {
        Command::SetExclusion {
            series,
            row,
            exclusion,
        } => {
            let s = project.get_mut(series)?;
            if row >= s.n_rows() {
                return None;
            }
            let old = s
                .exclusion(row)
                .map(|e: &Exclusion| (e.reason.clone(), e.at.clone()));
            match &exclusion {
                Some((reason, at)) => s
                    .data
                    .exclude(RowNumber::from_index(row).get(), reason, at)
                    .ok()?,
                None => {
                    s.data.include(RowNumber::from_index(row).get());
                }
            }
            bump(s);
            Some(Command::SetExclusion {
                series,
                row,
                exclusion: old,
            })
        }
        Command::EditCell {
            series,
            row,
            column,
            text,
        } => {
            let s = project.get_mut(series)?;
            let cell = s.data.raw_rows_mut().get_mut(row)?.cells.get_mut(column)?;
            let old = std::mem::replace(cell, text);
            s.cells_rev = s.cells_rev.wrapping_add(1);
            bump(s);
            Some(Command::EditCell {
                series,
                row,
                column,
                text: old,
            })
        }
        Command::SetSettings { series, settings } => {
            let s = project.get_mut(series)?;
            let old = std::mem::replace(&mut s.data.settings, settings);
            bump(s);
            Some(Command::SetSettings {
                series,
                settings: old,
            })
        }
        Command::SetShown { series, shown } => {
            let s = project.get_mut(series)?;
            let old = std::mem::replace(&mut s.data.shown, shown);
            Some(Command::SetShown { series, shown: old })
        }
        Command::Rename { series, name } => {
            let s = project.get_mut(series)?;
            let old = std::mem::replace(&mut s.data.name, name);
            Some(Command::Rename { series, name: old })
        }
        Command::InsertSeries { at, series } => {
            let id = series.id;
            let at = at.min(project.series.len());
            project.series.insert(at, *series);
            Some(Command::RemoveSeries { series: id })
        }
        Command::RemoveSeries { series } => {
            let at = project.index_of(series)?;
            let mut s = project.series.remove(at);
            bump(&mut s);
            Some(Command::InsertSeries {
                at,
                series: Box::new(s),
            })
        }
        Command::ReplaceProject(new) => {
            let old = std::mem::replace(project, *new);
            Some(Command::ReplaceProject(Box::new(old)))
        }
        Command::SetCalorimetric { series, values } => {
            // No refit: the values are compared with the fit, not part of it.
            let s = project.get_mut(series)?;
            let old = std::mem::replace(&mut s.data.calorimetric, values);
            Some(Command::SetCalorimetric {
                series,
                values: old,
            })
        }
        Command::SetIntervals { series, request } => {
            // No refit: the fit is the same whatever makes its intervals; the interval run
            // follows the request (`crate::intervals_run`).
            let s = project.get_mut(series)?;
            let old = std::mem::replace(&mut s.data.settings.intervals, request);
            Some(Command::SetIntervals {
                series,
                request: old,
            })
        }
    }
}

/// The undo and redo stacks.
#[derive(Debug, Default)]
pub struct History {
    undo: Vec<(Command, String)>,
    redo: Vec<(Command, String)>,
    /// Number of applied changes since the last save (negative after undoing past it).
    changes_since_save: i64,
    /// The save point was lost (undone past and then branched off): always dirty.
    save_point_lost: bool,
    /// Bumped by every apply, undo or redo.
    pub revision: u64,
}

/// How many steps are kept.
pub const MAX_UNDO: usize = 500;

impl History {
    /// Applies a new command; clears the redo stack. Returns whether it applied.
    pub fn apply(&mut self, project: &mut Project, cmd: Command) -> bool {
        let mut label = cmd.describe();
        let excludes = matches!(
            cmd,
            Command::SetExclusion {
                exclusion: Some(_),
                ..
            }
        );
        match apply(project, cmd) {
            Some(inverse) => {
                // Excluding a row that was already excluded changes only its reason, and
                // undoing it takes only the reason back: the label says so.
                if let (
                    true,
                    Command::SetExclusion {
                        row,
                        exclusion: Some(_),
                        ..
                    },
                ) = (excludes, &inverse)
                {
                    label = names::exclusion_reason_of_row(RowNumber::from_index(*row).get());
                }
                self.undo.push((inverse, label));
                if self.undo.len() > MAX_UNDO {
                    self.undo.remove(0);
                }
                if self.changes_since_save < 0 {
                    self.save_point_lost = true;
                }
                self.redo.clear();
                self.changes_since_save += 1;
                self.revision += 1;
                true
            }
            None => false,
        }
    }

    /// Undoes the last change. Returns whether there was one.
    pub fn undo(&mut self, project: &mut Project) -> bool {
        let Some((cmd, label)) = self.undo.pop() else {
            return false;
        };
        if let Some(inverse) = apply(project, cmd) {
            self.redo.push((inverse, label));
            self.changes_since_save -= 1;
            self.revision += 1;
        }
        true
    }

    /// Redoes the last undone change. Returns whether there was one.
    pub fn redo(&mut self, project: &mut Project) -> bool {
        let Some((cmd, label)) = self.redo.pop() else {
            return false;
        };
        if let Some(inverse) = apply(project, cmd) {
            self.undo.push((inverse, label));
            self.changes_since_save += 1;
            self.revision += 1;
        }
        true
    }

    /// What Undo would undo.
    pub fn undo_label(&self) -> Option<&str> {
        self.undo.last().map(|(_, l)| l.as_str())
    }

    /// What Redo would redo.
    pub fn redo_label(&self) -> Option<&str> {
        self.redo.last().map(|(_, l)| l.as_str())
    }

    /// Whether there are changes not yet saved.
    pub fn dirty(&self) -> bool {
        self.save_point_lost || self.changes_since_save != 0
    }

    /// Marks the current state as saved.
    pub fn mark_saved(&mut self) {
        self.changes_since_save = 0;
        self.save_point_lost = false;
    }

    /// Forgets everything (after opening a different project).
    pub fn clear(&mut self) {
        self.undo.clear();
        self.redo.clear();
        self.changes_since_save = 0;
        self.save_point_lost = false;
        self.revision += 1;
    }
}

/// Formats seconds since 1970-01-01 UTC as RFC 3339 ("2026-12-01T21:00:00Z"), the form
/// project files record exclusion times in.
pub fn rfc3339_utc(unix_seconds: i64) -> String {
    // Civil date from days since the epoch (H. Hinnant's public-domain algorithm).
    let days = unix_seconds.div_euclid(86_400);
    let secs = unix_seconds.rem_euclid(86_400);
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = if m <= 2 { y + 1 } else { y };
    format!(
        "{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}Z",
        secs / 3600,
        secs % 3600 / 60,
        secs % 60
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn project() -> (Project, u64) {
        let imp = isochore_data::import_text(
            "t.csv",
            "T (°C),K,u(K)\n20,1.0,0.1\n25,2.0,0.1\n30,3.0,0.1\n",
            &isochore_data::ImportOptions::default(),
        )
        .unwrap();
        let p = Project::from_data(isochore_data::Project::from_import(&imp), None);
        let id = p.series[0].id;
        (p, id)
    }

    #[test]
    fn every_command_round_trips_through_undo_and_redo() {
        let (mut p, id) = project();
        let original = p.clone();
        let mut h = History::default();
        let cmds = vec![
            Command::SetExclusion {
                series: id,
                row: 1,
                exclusion: Some(("bubble".into(), rfc3339_utc(0))),
            },
            Command::EditCell {
                series: id,
                row: 2,
                column: 1,
                text: "3.5".into(),
            },
            Command::SetExclusion {
                series: id,
                row: 1,
                exclusion: Some(("air bubble".into(), rfc3339_utc(60))),
            },
            Command::SetShown {
                series: id,
                shown: false,
            },
            Command::Rename {
                series: id,
                name: "b".into(),
            },
            Command::RemoveSeries { series: id },
        ];
        for c in cmds {
            assert!(h.apply(&mut p, c));
        }
        assert!(p.series.is_empty());
        assert!(h.dirty());
        while h.undo(&mut p) {}
        assert!(p.same_content(&original));
        assert!(!h.dirty());
        while h.redo(&mut p) {}
        assert!(p.series.is_empty());
    }

    #[test]
    fn undo_labels_say_what_undoing_does() {
        let (mut p, id) = project();
        let mut h = History::default();
        let set = |exclusion: Option<(&str, i64)>| Command::SetExclusion {
            series: id,
            row: 2,
            exclusion: exclusion.map(|(r, t)| (r.to_string(), rfc3339_utc(t))),
        };
        h.apply(&mut p, set(Some(("", 0))));
        assert_eq!(h.undo_label(), Some("exclude row 3"));
        // A reason typed for a row already excluded: undoing takes back only the reason.
        h.apply(&mut p, set(Some(("air bubble", 60))));
        assert_eq!(h.undo_label(), Some("reason for excluding row 3"));
        h.undo(&mut p);
        assert_eq!(h.redo_label(), Some("reason for excluding row 3"));
        assert_eq!(h.undo_label(), Some("exclude row 3"));
        h.apply(&mut p, set(None));
        assert_eq!(h.undo_label(), Some("use row 3 again"));
        // Excluding a used row with a reason at once is an exclusion.
        h.apply(&mut p, set(Some(("bubble", 120))));
        assert_eq!(h.undo_label(), Some("exclude row 3"));
    }

    #[test]
    fn a_command_on_a_missing_row_changes_nothing() {
        let (mut p, id) = project();
        let before = p.clone();
        let mut h = History::default();
        assert!(!h.apply(
            &mut p,
            Command::SetExclusion {
                series: id,
                row: 99,
                exclusion: None,
            }
        ));
        assert!(!h.apply(
            &mut p,
            Command::EditCell {
                series: id,
                row: 0,
                column: 42,
                text: "1".into(),
            }
        ));
        assert_eq!(p, before);
        assert!(!h.dirty());
    }

    #[test]
    fn undoing_past_a_save_and_branching_stays_dirty() {
        let (mut p, id) = project();
        let mut h = History::default();
        let hide = |shown| Command::SetShown { series: id, shown };
        h.apply(&mut p, hide(false));
        h.mark_saved();
        h.undo(&mut p);
        h.apply(&mut p, hide(true));
        h.apply(&mut p, hide(false));
        assert!(h.dirty());
    }

    #[test]
    fn times_are_written_as_rfc3339() {
        // 0 is the epoch; 1 796 158 800 s is 2026-12-01T21:00:00Z (20 788 days plus 21 h,
        // checked with Python's datetime module).
        assert_eq!(rfc3339_utc(0), "1970-01-01T00:00:00Z");
        assert_eq!(rfc3339_utc(1_796_158_800), "2026-12-01T21:00:00Z");
    }
}
