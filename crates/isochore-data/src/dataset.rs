//! The one data-set type: [`DataSet`], what the importer returns, what a project file
//! saves and what the window edits.
//!
//! A data set is its name, its source, the headers and [`ColumnMapping`] of that file, the
//! decimal convention, its accepted rows, its [`SeriesSettings`], [`Exclusion`]s, notes and
//! whether it is shown. The rows exist in one of two forms:
//!
//! - **cells as typed** ([`DataSet::raw_rows`], [`RawRow`]): what a project file saves and
//!   the window edits. They are the single source of truth; [`DataSet::converted`] converts
//!   them again on every call, so an edited cell, mapping or setting is never stale.
//! - **the reader's converted rows** ([`Row`], 40 bytes each, not saved): what
//!   [`crate::import_path`] fills, without copying every cell into a `String`, so a
//!   10⁶-row file stays compact. [`crate::Import::data_sets_with_cells`] (and
//!   [`crate::Project::from_import`]) give the same data sets with their cells.
//!
//! Every query ([`DataSet::points`], [`DataSet::measurements`], [`DataSet::check_sigma`],
//! [`DataSet::note`], [`DataSet::export_csv`]) reads whichever form the data set holds, with
//! the same result (tested: a project built from an import gives the import's measurements).

use crate::error::{Error, RejectedRow};
use crate::import::{make_points, Point, Replicates, Row, SourceInfo};
use crate::mapping::{convert_cells, convert_sigma_t, ColumnMapping};
use isochore_fit::intervals::IntervalRequest;
use isochore_fit::{EnergyUnit, FitOptions, Measurement, QuantityKind, TemperatureUnit};
use serde::{Deserialize, Serialize};
use std::borrow::Cow;

/// One data row as read: its physical line and its cells exactly as typed.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct RawRow {
    /// Physical 1-based line in the source file.
    pub line: usize,
    /// The cells as typed.
    pub cells: Vec<String>,
}

/// The settings of one data set.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct SeriesSettings {
    /// Model, reference temperature θ, weighting, convention, confidence level, thresholds.
    pub fit: FitOptions,
    /// Energy unit for showing results.
    pub energy_unit: EnergyUnit,
    /// Temperature unit for showing results.
    pub temperature_unit: TemperatureUnit,
    /// Replicate handling.
    pub replicates: Replicates,
    /// Replicate temperature tolerance in K.
    pub replicate_tolerance_k: f64,
    /// One thermometer uncertainty σ(T) for every point, K (the window's "thermometer
    /// uncertainty"): the fit then allows for errors in T as well as in K. `None` (the
    /// default) fits errors in K only; not written when `None`, so older projects save back
    /// the same.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub thermometer_uncertainty_k: Option<f64>,
    /// How the window makes the intervals: the delta method (the default), Monte Carlo or
    /// the bootstrap, with the number of draws and the generator's seed, so that reopening
    /// the project gives the same intervals. Not written when it is the default, so older
    /// projects save back the same.
    #[serde(skip_serializing_if = "IntervalRequest::is_default")]
    pub intervals: IntervalRequest,
}

impl Default for SeriesSettings {
    fn default() -> Self {
        SeriesSettings {
            fit: FitOptions::default(),
            energy_unit: EnergyUnit::KilojoulePerMole,
            temperature_unit: TemperatureUnit::Celsius,
            replicates: Replicates::Keep,
            replicate_tolerance_k: 0.05,
            thermometer_uncertainty_k: None,
            intervals: IntervalRequest::default(),
        }
    }
}

/// A row left out of the fit, with why and when.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Exclusion {
    /// 1-based data row.
    pub row: usize,
    /// The chemist's reason.
    pub reason: String,
    /// When, as an RFC 3339 UTC time (e.g. "2026-12-01T21:00:00Z").
    pub at: String,
}

/// One data set (see the module documentation). Serialised as a project file's data set;
/// the reader's converted rows are not saved.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DataSet {
    /// Its name: the series cell, or the file name without extension.
    pub name: String,
    /// The file it came from.
    pub source: SourceInfo,
    /// The header cells of that file.
    pub headers: Vec<String>,
    /// Physical line of the header.
    #[serde(default = "one")]
    pub header_line: usize,
    /// What each column means.
    pub mapping: ColumnMapping,
    /// Whether commas inside number cells are decimal marks.
    #[serde(default)]
    pub decimal_comma: bool,
    /// The accepted rows with their cells as typed, in file order. Empty for a data set
    /// straight from the importer, which holds its converted rows instead (see
    /// [`DataSet::has_cells`]); private to the crate so that no caller mistakes that for no
    /// rows.
    pub(crate) rows: Vec<RawRow>,
    /// Settings.
    #[serde(default)]
    pub settings: SeriesSettings,
    /// Excluded rows.
    #[serde(default)]
    pub exclusions: Vec<Exclusion>,
    /// Free-text notes.
    #[serde(default)]
    pub notes: String,
    /// Whether the data set is drawn (hiding one is an undoable change, so it is saved).
    #[serde(default = "yes")]
    pub shown: bool,
    /// Calorimetric enthalpies measured on this data set, to compare with its van 't Hoff
    /// ΔH°(T). Not written when empty, so older projects load and save back the same.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub calorimetric: Vec<crate::calorimetric::SavedCalorimetric>,
    /// The reader's converted rows (when the cells were not kept).
    #[serde(skip)]
    pub(crate) read: Vec<Row>,
    /// The reader's non-empty note cells: (1-based row, note), in row order.
    #[serde(skip)]
    pub(crate) read_notes: Vec<(u32, String)>,
}

fn one() -> usize {
    1
}

fn yes() -> bool {
    true
}

impl DataSet {
    /// A data set with no rows, settings at their defaults and no exclusions.
    pub fn new(
        name: String,
        source: SourceInfo,
        headers: Vec<String>,
        mapping: ColumnMapping,
    ) -> DataSet {
        DataSet {
            name,
            source,
            headers,
            header_line: 1,
            mapping,
            decimal_comma: false,
            rows: Vec::new(),
            settings: SeriesSettings::default(),
            exclusions: Vec::new(),
            notes: String::new(),
            shown: true,
            calorimetric: Vec::new(),
            read: Vec::new(),
            read_notes: Vec::new(),
        }
    }

    /// The rows with their cells as typed (empty when [`DataSet::has_cells`] is false; use
    /// [`DataSet::len`] and [`DataSet::converted`] for what every data set has).
    pub fn raw_rows(&self) -> &[RawRow] {
        &self.rows
    }

    /// The rows with their cells as typed, to edit a cell in place.
    pub fn raw_rows_mut(&mut self) -> &mut [RawRow] {
        &mut self.rows
    }

    /// Replaces the rows by these cells as typed (dropping the reader's converted rows).
    pub fn set_raw_rows(&mut self, rows: Vec<RawRow>) {
        self.rows = rows;
        self.read = Vec::new();
        self.read_notes = Vec::new();
    }

    /// Takes the reader's converted rows out of the data set, leaving it with no rows at all
    /// (its notes go too); empty for a data set that holds its cells. For a caller that
    /// turns the rows into something else in their own memory and needs the data set no
    /// more (isochore-analysis' prepared set: a 10⁶-row file's 40 MB of rows are then not
    /// held beside its points).
    pub fn take_read_rows(&mut self) -> Vec<Row> {
        self.read_notes = Vec::new();
        std::mem::take(&mut self.read)
    }

    /// Whether the data set holds its cells as typed (a project's or the window's), rather
    /// than only the reader's converted rows (a fresh import's).
    pub fn has_cells(&self) -> bool {
        self.read.is_empty()
    }

    /// Number of accepted rows.
    pub fn len(&self) -> usize {
        if self.has_cells() {
            self.rows.len()
        } else {
            self.read.len()
        }
    }

    /// The physical line in its file of 1-based row `row`, in either form.
    pub fn line(&self, row: usize) -> Option<usize> {
        let i = row.checked_sub(1)?;
        if self.has_cells() {
            self.rows.get(i).map(|r| r.line)
        } else {
            self.read.get(i).map(Row::line)
        }
    }

    /// Whether the data set has no rows.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The rows converted to the fitting scale (T in K, ln K, σ), numbered 1, 2, … with
    /// their physical lines: the reader's rows as they are, or the cells converted again.
    ///
    /// # Errors
    /// [`Error::ProjectRow`] when a cell no longer converts (edited by hand or in the
    /// window), naming the row, line and column.
    pub fn converted(&self) -> Result<Cow<'_, [Row]>, Error> {
        if !self.has_cells() {
            return Ok(Cow::Borrowed(&self.read));
        }
        let mut out = Vec::with_capacity(self.rows.len());
        for (i, r) in self.rows.iter().enumerate() {
            let cell = |c: usize| r.cells.get(c).map(String::as_str).unwrap_or("");
            match convert_cells(
                &self.mapping,
                self.decimal_comma,
                self.settings.fit.allow_extreme_temperatures,
                cell,
            ) {
                Ok(c) => out.push(Row::new(c.t_k, c.ln_k, c.sigma_ln_k, r.line, i + 1)),
                Err((col, problem)) => {
                    return Err(Error::ProjectRow {
                        series: self.name.clone(),
                        row: i + 1,
                        rejected: Box::new(RejectedRow {
                            line: r.line,
                            column: Some(col + 1),
                            header: self.headers.get(col).cloned(),
                            cell: Some(cell(col).trim().to_string()),
                            problem,
                        }),
                    })
                }
            }
        }
        Ok(Cow::Owned(out))
    }

    /// The temperature uncertainty σ(T) of every row in kelvin, in row order, when the
    /// mapping has a σ(T) column ([`ColumnMapping::temperature_uncertainty`]); `None`
    /// without one. Read from the cells as typed, in the temperature column's unit (°C and
    /// K alike, °F × 5/9).
    ///
    /// # Errors
    /// [`Error::ProjectRow`] naming the row, line and column of the first σ(T) cell that is
    /// empty, not a finite number, or ≤ 0; [`Error::InvalidMapping`] for a data set that holds
    /// the reader's rows without their cells (read it with its cells:
    /// [`crate::Import::data_sets_with_cells`]).
    pub fn sigma_t_k(&self) -> Result<Option<Vec<f64>>, Error> {
        if self.mapping.temperature_uncertainty.is_none() {
            return Ok(None);
        }
        if !self.has_cells() && !self.read.is_empty() {
            return Err(Error::InvalidMapping {
                file: self.source.name.clone(),
                message: "the temperature uncertainty σ(T) is read from the cells as typed; read the file with its cells".to_string(),
            });
        }
        let mut out = Vec::with_capacity(self.rows.len());
        for (i, r) in self.rows.iter().enumerate() {
            let cell = |c: usize| r.cells.get(c).map(String::as_str).unwrap_or("");
            match convert_sigma_t(&self.mapping, self.decimal_comma, cell) {
                Ok(v) => out.push(v.unwrap_or(f64::NAN)),
                Err((col, problem)) => {
                    return Err(Error::ProjectRow {
                        series: self.name.clone(),
                        row: i + 1,
                        rejected: Box::new(RejectedRow {
                            line: r.line,
                            column: Some(col + 1),
                            header: self.headers.get(col).cloned(),
                            cell: Some(cell(col).trim().to_string()),
                            problem,
                        }),
                    })
                }
            }
        }
        Ok(Some(out))
    }

    /// The note cell of a row (trimmed), when the file has a note column and the cell is
    /// not empty.
    pub fn note(&self, row: &Row) -> Option<&str> {
        if self.has_cells() {
            let cells = &self.rows.get(row.row().checked_sub(1)?)?.cells;
            let note = cells.get(self.mapping.note?)?.trim();
            return (!note.is_empty()).then_some(note);
        }
        self.read_notes
            .binary_search_by_key(&(row.row() as u32), |(r, _)| *r)
            .ok()
            .map(|i| self.read_notes[i].1.as_str())
    }

    /// The points for the fit, exclusions applied (excluded rows stay, one point each, with
    /// `included = false`), replicates handled as the settings say: with
    /// [`Replicates::Average`] the included rows at one temperature become one point.
    ///
    /// # Errors
    /// As [`DataSet::converted`].
    pub fn points(&self) -> Result<Vec<Point>, Error> {
        let rows = self.converted()?;
        Ok(make_points(
            &rows,
            &self.excluded_rows(),
            self.settings.replicates,
            self.settings.replicate_tolerance_k,
        ))
    }

    /// The measurements for the fit (see [`DataSet::points`]).
    ///
    /// # Errors
    /// As [`DataSet::converted`].
    pub fn measurements(&self) -> Result<Vec<Measurement>, Error> {
        Ok(self.points()?.into_iter().map(|p| p.measurement).collect())
    }

    /// The rule for empty uncertainty cells, for a weighted fit: σ in some rows and an
    /// empty σ cell in another is refused, naming the line (in the original file) and
    /// column of the first empty cell; an entirely empty σ column means no uncertainties
    /// (fitted unweighted). Fitting unweighted ignores σ, so a caller that fits unweighted
    /// need not call this.
    ///
    /// # Errors
    /// [`Error::MissingSigma`], or as [`DataSet::converted`].
    pub fn check_sigma(&self) -> Result<(), Error> {
        let Some(u) = self.mapping.uncertainty else {
            return Ok(());
        };
        let rows = self.converted()?;
        let Some(missing) = rows.iter().find(|r| r.sigma_ln_k().is_none()) else {
            return Ok(());
        };
        if rows.iter().all(|r| r.sigma_ln_k().is_none()) {
            return Ok(());
        }
        Err(Error::MissingSigma {
            file: self.source.name.clone(),
            series: self.name.clone(),
            line: missing.line(),
            column: u.column + 1,
            header: self.headers.get(u.column).cloned().unwrap_or_default(),
        })
    }

    /// The 1-based rows currently excluded, ascending.
    pub fn excluded_rows(&self) -> Vec<usize> {
        let mut v: Vec<usize> = self.exclusions.iter().map(|e| e.row).collect();
        v.sort_unstable();
        v.dedup();
        v
    }

    /// Whether a 1-based row is excluded.
    pub fn is_excluded(&self, row: usize) -> bool {
        self.exclusions.iter().any(|e| e.row == row)
    }

    /// Excludes a 1-based row with a reason at time `at` (RFC 3339 UTC, given by the caller
    /// so that results are reproducible). Excluding an excluded row updates reason and time.
    ///
    /// # Errors
    /// [`Error::NoSuchRow`].
    pub fn exclude(&mut self, row: usize, reason: &str, at: &str) -> Result<(), Error> {
        if row == 0 || row > self.len() {
            return Err(Error::NoSuchRow {
                series: self.name.clone(),
                row,
                rows: self.len(),
            });
        }
        if let Some(e) = self.exclusions.iter_mut().find(|e| e.row == row) {
            e.reason = reason.to_string();
            e.at = at.to_string();
        } else {
            self.exclusions.push(Exclusion {
                row,
                reason: reason.to_string(),
                at: at.to_string(),
            });
        }
        Ok(())
    }

    /// Puts an excluded row back. Returns whether it was excluded.
    pub fn include(&mut self, row: usize) -> bool {
        let before = self.exclusions.len();
        self.exclusions.retain(|e| e.row != row);
        before != self.exclusions.len()
    }

    /// The data set as CSV with a units-bearing header, the quantity written as `kind`
    /// (see [`crate::export_csv`]).
    ///
    /// # Errors
    /// As [`DataSet::converted`].
    pub fn export_csv_as(&self, kind: QuantityKind) -> Result<String, Error> {
        let rows = self.converted()?;
        let notes: Vec<Option<String>> = rows
            .iter()
            .map(|r| self.note(r).map(str::to_string))
            .collect();
        Ok(crate::export::write_csv(
            &self.name,
            &self.source.name,
            kind,
            &rows,
            &notes,
            &self.exclusions,
        ))
    }

    /// The data set as CSV in the quantity of its own file (see [`crate::export_csv`]).
    ///
    /// # Errors
    /// As [`DataSet::converted`].
    pub fn export_csv(&self) -> Result<String, Error> {
        self.export_csv_as(self.mapping.quantity.kind)
    }

    /// A copy of everything but the rows, in either form.
    pub(crate) fn without_rows(&self) -> DataSet {
        DataSet {
            name: self.name.clone(),
            source: self.source.clone(),
            headers: self.headers.clone(),
            header_line: self.header_line,
            mapping: self.mapping.clone(),
            decimal_comma: self.decimal_comma,
            rows: Vec::new(),
            settings: self.settings,
            exclusions: self.exclusions.clone(),
            notes: self.notes.clone(),
            shown: self.shown,
            calorimetric: self.calorimetric.clone(),
            read: Vec::new(),
            read_notes: Vec::new(),
        }
    }

    /// The checks a loaded project's data set must pass: the mapping fits the headers,
    /// every exclusion names a row the data set has, every calorimetric value is usable.
    pub(crate) fn check(&self) -> Result<(), String> {
        self.mapping
            .check(self.headers.len())
            .map_err(|m| format!("data set '{}': {m}", self.name))?;
        for e in &self.exclusions {
            if e.row == 0 || e.row > self.len() {
                return Err(format!(
                    "data set '{}': exclusion of row {} but it has {} rows",
                    self.name,
                    e.row,
                    self.len()
                ));
            }
        }
        for (i, c) in self.calorimetric.iter().enumerate() {
            if let Some(why) = c.problem() {
                return Err(format!(
                    "data set '{}': calorimetric value {}: {why}",
                    self.name,
                    i + 1
                ));
            }
        }
        Ok(())
    }
}
