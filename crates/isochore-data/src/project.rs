//! Project files: the measurements exactly as read, the column mapping, each data set's
//! settings, exclusions with reasons and times, and notes, as versioned JSON.
//!
//! The raw cells are the single source of truth: [`ProjectSeries::points`] recomputes the
//! converted values from them and the mapping every time. [`Project::save_atomic`] never
//! leaves a half-written file (temporary file in the same folder, sync, rename; the
//! previous version is kept as `<name>.bak`). [`Project::load`] refuses newer schema
//! versions and damaged files with a message and changes nothing.

use crate::error::{Error, RejectedRow};
use crate::import::{make_points, ConvertedRow, Import, Point, Replicates, SourceInfo};
use crate::mapping::{convert_cells, ColumnMapping};
use isochore_fit::{EnergyUnit, FitOptions, Measurement, TemperatureUnit};
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
    pub series: Vec<ProjectSeries>,
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
}

impl Default for SeriesSettings {
    fn default() -> Self {
        SeriesSettings {
            fit: FitOptions::default(),
            energy_unit: EnergyUnit::KilojoulePerMole,
            temperature_unit: TemperatureUnit::Celsius,
            replicates: Replicates::Keep,
            replicate_tolerance_k: 0.05,
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

/// One data set of a project.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ProjectSeries {
    /// Its name.
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
    /// The accepted rows of this data set, as read.
    pub rows: Vec<RawRow>,
    /// Settings.
    #[serde(default)]
    pub settings: SeriesSettings,
    /// Excluded rows.
    #[serde(default)]
    pub exclusions: Vec<Exclusion>,
    /// Free-text notes.
    #[serde(default)]
    pub notes: String,
}

fn one() -> usize {
    1
}

impl ProjectSeries {
    /// Converts every row again from its cells.
    ///
    /// # Errors
    /// [`Error::ProjectRow`] when a cell no longer converts (the file was edited by hand).
    pub fn converted(&self) -> Result<Vec<ConvertedRow>, Error> {
        let mut out = Vec::with_capacity(self.rows.len());
        for (i, r) in self.rows.iter().enumerate() {
            let cell = |c: usize| r.cells.get(c).map(String::as_str).unwrap_or("");
            match convert_cells(
                &self.mapping,
                self.decimal_comma,
                self.settings.fit.allow_extreme_temperatures,
                cell,
            ) {
                Ok(c) => out.push(ConvertedRow {
                    row: i + 1,
                    t_k: c.t_k,
                    ln_k: c.ln_k,
                    sigma_ln_k: c.sigma_ln_k,
                }),
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
        Ok(out)
    }

    /// The points for the fit, exclusions applied (excluded rows stay, with
    /// `included = false`), replicates handled as the settings say.
    ///
    /// # Errors
    /// As [`ProjectSeries::converted`].
    pub fn points(&self) -> Result<Vec<Point>, Error> {
        let rows = self.converted()?;
        Ok(make_points(
            &rows,
            &self.excluded_rows(),
            self.settings.replicates,
            self.settings.replicate_tolerance_k,
        ))
    }

    /// The measurements for the fit (see [`ProjectSeries::points`]).
    ///
    /// # Errors
    /// As [`ProjectSeries::converted`].
    pub fn measurements(&self) -> Result<Vec<Measurement>, Error> {
        Ok(self.points()?.into_iter().map(|p| p.measurement).collect())
    }

    /// The rule for empty uncertainty cells (as [`Import::check_sigma`]): σ in some rows and
    /// an empty σ cell in another is refused for a weighted fit, naming the line (in the
    /// original file) and column of the first empty cell; an entirely empty σ column means
    /// no uncertainties.
    ///
    /// # Errors
    /// [`Error::MissingSigma`], or as [`ProjectSeries::converted`].
    pub fn check_sigma(&self) -> Result<(), Error> {
        let Some(u) = self.mapping.uncertainty else {
            return Ok(());
        };
        let rows = self.converted()?;
        let Some(missing) = rows.iter().position(|r| r.sigma_ln_k.is_none()) else {
            return Ok(());
        };
        if rows.iter().all(|r| r.sigma_ln_k.is_none()) {
            return Ok(());
        }
        Err(Error::MissingSigma {
            file: self.source.name.clone(),
            series: self.name.clone(),
            line: self.rows.get(missing).map_or(0, |r| r.line),
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

    /// Whether a row is excluded.
    pub fn is_excluded(&self, row: usize) -> bool {
        self.exclusions.iter().any(|e| e.row == row)
    }

    /// Excludes a 1-based row with a reason at time `at` (RFC 3339 UTC, given by the caller
    /// so that results are reproducible). Excluding an excluded row updates reason and time.
    ///
    /// # Errors
    /// [`Error::NoSuchRow`].
    pub fn exclude(&mut self, row: usize, reason: &str, at: &str) -> Result<(), Error> {
        if row == 0 || row > self.rows.len() {
            return Err(Error::NoSuchRow {
                series: self.name.clone(),
                row,
                rows: self.rows.len(),
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

    /// The data set as CSV with a units-bearing header (see [`crate::export_csv`]).
    ///
    /// # Errors
    /// As [`ProjectSeries::converted`].
    pub fn export_csv(&self) -> Result<String, Error> {
        let rows = self.converted()?;
        let notes: Vec<Option<String>> = self
            .rows
            .iter()
            .map(|r| {
                self.mapping
                    .note
                    .and_then(|n| r.cells.get(n))
                    .map(|s| s.trim().to_string())
                    .filter(|s| !s.is_empty())
            })
            .collect();
        Ok(crate::export::write_csv(
            &self.name,
            &self.source.name,
            self.mapping.quantity.kind,
            &rows,
            &notes,
            &self.exclusions,
        ))
    }

    fn check(&self) -> Result<(), String> {
        self.mapping
            .check(self.headers.len())
            .map_err(|m| format!("data set '{}': {m}", self.name))?;
        for e in &self.exclusions {
            if e.row == 0 || e.row > self.rows.len() {
                return Err(format!(
                    "data set '{}': exclusion of row {} but it has {} rows",
                    self.name,
                    e.row,
                    self.rows.len()
                ));
            }
        }
        Ok(())
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

    /// Adds the data sets of an import.
    pub fn add_import(&mut self, import: &Import) {
        for s in &import.series {
            let rows = s
                .rows
                .iter()
                .map(|r| RawRow {
                    line: r.line(),
                    cells: import.cells(r),
                })
                .collect();
            self.series.push(ProjectSeries {
                name: s.name.clone(),
                source: import.source.clone(),
                headers: import.headers.clone(),
                header_line: import.header_line,
                mapping: import.mapping.clone(),
                decimal_comma: import.comma_is_decimal(),
                rows,
                settings: SeriesSettings {
                    replicates: s.replicates,
                    replicate_tolerance_k: s.replicate_tolerance_k,
                    ..SeriesSettings::default()
                },
                exclusions: Vec::new(),
                notes: String::new(),
            });
        }
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
