//! The document the workbench edits: a list of [`isochore_data::DataSet`]s, the one
//! data-set type, as project files keep them (the cells exactly as typed, the column
//! mapping, settings, every exclusion with its reason and time, and whether the series is
//! drawn), each in an [`Entry`] with what only the window needs (an id and a revision
//! counter, never saved). Every change goes through
//! [`crate::command::Command`] so that it can be undone. Reading cells and converting
//! units is done by isochore-data; nothing here parses or computes a statistic.

use isochore_analysis::RowNumber;
use isochore_data::{DataSet, Exclusion};
use isochore_fit::{FitOptions, Measurement};
use std::path::PathBuf;
use std::sync::atomic::{AtomicU64, Ordering};

static NEXT_ID: AtomicU64 = AtomicU64::new(1);

/// A fresh identifier for a series (stable while the window is open; never saved).
pub fn next_id() -> u64 {
    NEXT_ID.fetch_add(1, Ordering::Relaxed)
}

/// One series in the window: the data set (everything saved, whether it is drawn
/// included) and the window's bookkeeping. The accessors index rows and columns from 0,
/// as the window does.
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// Identifier while the window is open.
    pub id: u64,
    /// Revision, bumped by every change (drives refits).
    pub rev: u64,
    /// Bumped by every change to a cell (not by exclusions or settings): while it stays
    /// the same, the cells convert as before, so a refit after an exclusion reuses the
    /// converted points ([`crate::fitting`]).
    pub cells_rev: u64,
    /// The data set as saved in project files.
    pub data: DataSet,
}

/// The points of a series for the fit, and which rows each stands for.
#[derive(Debug, Clone, Default)]
pub struct Points {
    /// One measurement per point (one row, or averaged replicates).
    pub measurements: Vec<Measurement>,
    /// 0-based rows of each point.
    pub rows: Vec<Vec<usize>>,
    /// For each 0-based row, its point.
    pub point_of_row: Vec<Option<usize>>,
}

impl Entry {
    /// Wraps a data set with a fresh id.
    pub fn new(data: DataSet) -> Self {
        Entry {
            id: next_id(),
            rev: 0,
            cells_rev: 0,
            data,
        }
    }

    /// Its name.
    pub fn name(&self) -> &str {
        &self.data.name
    }

    /// Number of data rows.
    pub fn n_rows(&self) -> usize {
        self.data.len()
    }

    /// The fit options.
    pub fn options(&self) -> &FitOptions {
        &self.data.settings.fit
    }

    /// The exclusion of 0-based row `row`, if it is excluded.
    pub fn exclusion(&self, row: usize) -> Option<&Exclusion> {
        let number = RowNumber::from_index(row).get();
        self.data.exclusions.iter().find(|e| e.row == number)
    }

    /// Whether 0-based row `row` takes part in the fit.
    pub fn is_included(&self, row: usize) -> bool {
        self.exclusion(row).is_none()
    }

    /// The cell of 0-based row `row` in 0-based column `col`, as typed.
    pub fn cell(&self, row: usize, col: usize) -> &str {
        self.data
            .raw_rows()
            .get(row)
            .and_then(|r| r.cells.get(col))
            .map_or("", String::as_str)
    }

    /// The header of 0-based column `col`.
    pub fn header(&self, col: usize) -> &str {
        self.data.headers.get(col).map_or("", String::as_str)
    }

    /// The columns shown in the table: temperature, value, uncertainty (when mapped).
    pub fn value_columns(&self) -> Vec<usize> {
        let m = &self.data.mapping;
        let mut v = vec![m.temperature.column, m.quantity.column];
        if let Some(u) = m.uncertainty {
            v.push(u.column);
        }
        v
    }

    /// The note column, when mapped.
    pub fn note_column(&self) -> Option<usize> {
        self.data.mapping.note
    }

    /// The physical line of 0-based row `row` in its file.
    pub fn line(&self, row: usize) -> Option<usize> {
        self.data.line(RowNumber::from_index(row).get())
    }

    /// Checks that 0-based row `row` still converts with `text` in 0-based column `column`,
    /// and that a typed number follows the data set's decimal convention (isochore-data's
    /// rule: "65,000" in a data set of decimal points is refused, not read as 65), without
    /// changing anything.
    ///
    /// # Errors
    /// isochore-data's message for the cell or row (line and column named).
    pub fn check_edit(&self, row: usize, column: usize, text: &str) -> Result<(), String> {
        self.data
            .check_cell_edit(row, column, text)
            .map_err(|e| e.to_string())
    }

    /// The points for the fit, through isochore-data (cells → T, ln K, σ; replicates).
    ///
    /// # Errors
    /// isochore-data's message naming the row, line and column of a cell that does not
    /// convert.
    pub fn points(&self) -> Result<Points, String> {
        let pts = self.data.points().map_err(|e| e.to_string())?;
        let mut point_of_row = vec![None; self.n_rows()];
        let mut rows = Vec::with_capacity(pts.len());
        let mut measurements = Vec::with_capacity(pts.len());
        for (k, p) in pts.into_iter().enumerate() {
            // isochore-data numbers rows from 1; the window indexes them from 0.
            let r: Vec<usize> = p
                .rows
                .iter()
                .map(|&r| RowNumber::new(r).map_or(0, RowNumber::index))
                .collect();
            for &i in &r {
                if let Some(slot) = point_of_row.get_mut(i) {
                    *slot = Some(k);
                }
            }
            rows.push(r);
            measurements.push(p.measurement);
        }
        Ok(Points {
            measurements,
            rows,
            point_of_row,
        })
    }
}

/// The open project: its series, notes and where it is saved.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Project {
    /// The series, in display order.
    pub series: Vec<Entry>,
    /// Free-text notes.
    pub notes: String,
    /// Where the project file lives, once saved or opened.
    pub path: Option<PathBuf>,
}

impl Project {
    /// Wraps an isochore-data project.
    pub fn from_data(p: isochore_data::Project, path: Option<PathBuf>) -> Self {
        Project {
            series: p.series.into_iter().map(Entry::new).collect(),
            notes: p.notes,
            path,
        }
    }

    /// The isochore-data project to save.
    pub fn to_data(&self) -> isochore_data::Project {
        isochore_data::Project {
            series: self.series.iter().map(|s| s.data.clone()).collect(),
            notes: self.notes.clone(),
            ..isochore_data::Project::default()
        }
    }

    /// The index of the series with this id.
    pub fn index_of(&self, id: u64) -> Option<usize> {
        self.series.iter().position(|s| s.id == id)
    }

    /// The series with this id.
    pub fn get(&self, id: u64) -> Option<&Entry> {
        self.series.iter().find(|s| s.id == id)
    }

    /// The series with this id, mutable.
    pub fn get_mut(&mut self, id: u64) -> Option<&mut Entry> {
        self.series.iter_mut().find(|s| s.id == id)
    }

    /// Whether two projects hold the same data (ids and revisions aside).
    pub fn same_content(&self, other: &Project) -> bool {
        self.notes == other.notes
            && self.series.len() == other.series.len()
            && self
                .series
                .iter()
                .zip(&other.series)
                .all(|(a, b)| a.data == b.data)
    }
}
