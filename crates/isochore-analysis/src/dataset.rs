//! Data sets prepared for a fit: a file on disk (delimited text or a project file) or one
//! [`isochore_data::DataSet`] of the window's document becomes a [`PreparedSet`] — derived,
//! never saved: the fit's measurements, where each point came from (row, line, cells as
//! typed, why it is excluded), the fit options after the [weighting rule](crate::weighting)
//! and the caller's [`Overrides`], the units to show, and the cautions from reading. The
//! command line and the window both build theirs here.

use crate::files::is_project_file;
use crate::origins::Origins;
use crate::rows::RowNumber;
use crate::weighting;
use isochore_data::{
    ColumnChoice, DecimalMark, Import, ImportOptions, Project, RejectedRow, Replicates, Row,
};
use isochore_fit::{
    EnergyUnit, FitOptions, Measurement, Model, QuantityKind, SigmaConvention, TemperatureUnit,
    Weighting,
};
use std::borrow::Cow;
use std::collections::BTreeMap;
use std::fmt;
use std::path::Path;
use std::sync::Arc;

/// The note given when replicates were averaged.
pub const REPLICATES_NOTE: &str =
    "replicates were averaged as the project asks; each point is named by its first row";

/// One data set prepared for a fit, derived from an [`isochore_data::DataSet`] (the data
/// set itself, as read and saved) and the caller's [`Overrides`].
#[derive(Debug, Clone)]
pub struct PreparedSet {
    /// The input as the user named it (the path as given), for messages and JSON.
    pub source: String,
    /// Name of the file the data were read from.
    pub file_name: String,
    /// SHA-256 of that file's bytes.
    pub sha256: String,
    /// Name of the data set.
    pub series: String,
    /// Header cells as read.
    pub headers: Vec<String>,
    /// The unit conversions made, in words.
    pub conversions: Vec<String>,
    /// The points for the fit, in row order, shared with the fits made of them
    /// ([`isochore_fit::fit_shared`]: a large data set's points are held once).
    pub measurements: Arc<Vec<Measurement>>,
    /// Where each point came from (same order and count as `measurements`), kept compact:
    /// [`Origins::iter`] and [`Origins::get`] give each point's [`PointOrigin`].
    pub rows: Origins,
    /// The fit options: the file's settings, the caller's overrides and the weighting rule.
    pub options: FitOptions,
    /// Energy unit for people.
    pub energy: EnergyUnit,
    /// Temperature unit for people.
    pub temperature: TemperatureUnit,
    /// What the measured column held (K, K_d in nM, pK, …): predictions are also shown in
    /// it.
    pub quantity: QuantityKind,
    /// The measured column's header as typed ("pKa", "Kd (nM)").
    pub quantity_header: String,
    /// Cautions from reading (skipped rows, replicates averaged, weighting adapted).
    pub warnings: Vec<String>,
    /// Settings worth recording in reports (name, value), beyond the fit options.
    pub settings: Vec<(String, String)>,
    /// The temperature uncertainty σ(T) of each point in kelvin (same order as
    /// `measurements`), when the file has a σ(T) column or the caller gave one thermometer
    /// uncertainty for all points ([`Overrides::sigma_t_k`]); `None` fits errors in K only.
    /// See [`crate::errors_in_t`].
    pub sigma_t_k: Option<Vec<f64>>,
    /// How the intervals of this data set are to be made as recorded with it (a project's
    /// `SeriesSettings::intervals`, chosen in the window; the delta method for a data
    /// file): the command line's `vhfit fit` runs it when no `--intervals` is given.
    pub intervals: isochore_fit::intervals::IntervalRequest,
}

/// Rows to leave out of every data set read, with the reason and time recorded.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Exclusions {
    /// The rows, 1-based.
    pub rows: Vec<RowNumber>,
    /// The reason recorded with each.
    pub reason: String,
    /// When (recorded in a project's exclusions).
    pub at: String,
}

/// What the caller lays over a file's own settings (the command line's options; the
/// window passes none).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Overrides {
    /// Model.
    pub model: Option<Model>,
    /// Reference temperature θ in kelvin.
    pub t_ref_k: Option<f64>,
    /// Confidence level.
    pub level: Option<f64>,
    /// What the stated σ mean (the command line's `--sigma`), over the file's or project's.
    pub sigma: Option<SigmaConvention>,
    /// Unweighted: every point counts the same, every σ ignored.
    pub unweighted: bool,
    /// Accept temperatures (and θ) outside 1–10 000 K.
    pub allow_extreme_temperatures: bool,
    /// Energy unit for people.
    pub energy_unit: Option<EnergyUnit>,
    /// Decimal mark of delimited text.
    pub decimal: DecimalMark,
    /// Rows to leave out.
    pub exclude: Exclusions,
    /// Fit the good rows of a file with bad rows (otherwise the file is refused).
    pub skip_bad_rows: bool,
    /// Keep the cells as typed (for reports).
    pub with_cells: bool,
    /// Column choices laid over a data file's headers (`temperature=T_degC`, `K=3`); a
    /// project keeps the mapping it was saved with and refuses them.
    pub columns: Vec<ColumnChoice>,
    /// The scale of a data file's temperature header that carries no unit.
    pub data_temperature_unit: Option<TemperatureUnit>,
    /// One thermometer uncertainty σ(T) for every point, in kelvin (the command line's
    /// `--sigma-t`): the fit then allows for errors in T as well as in K. It takes the place
    /// of a σ(T) column of the file.
    pub sigma_t_k: Option<f64>,
    /// Fewest usable points a data set of a data file needs (`None`: 3, what a fit of one
    /// series needs for an error estimate). A joint fit reads with 2: whether a series
    /// has enough points is then decided by the sharing (isochore-fit's block design).
    pub min_points: Option<usize>,
}

impl Overrides {
    /// `base` with these overrides applied.
    pub fn apply(&self, base: FitOptions) -> FitOptions {
        let mut o = base;
        if let Some(m) = self.model {
            o.model = m;
        }
        if let Some(t) = self.t_ref_k {
            o.t_ref_k = t;
        }
        if let Some(l) = self.level {
            o.level = l;
        }
        if let Some(c) = self.sigma {
            o.convention = c;
        }
        if self.unweighted {
            o.weighting = Weighting::Unweighted;
        }
        if self.allow_extreme_temperatures {
            o.allow_extreme_temperatures = true;
        }
        o
    }

    fn import_options(&self) -> ImportOptions {
        ImportOptions {
            decimal: self.decimal,
            allow_extreme_temperatures: self.allow_extreme_temperatures,
            columns: self.columns.clone(),
            temperature_unit: self.data_temperature_unit,
            min_points: self
                .min_points
                .unwrap_or(ImportOptions::default().min_points),
            ..ImportOptions::default()
        }
    }
}

/// A setting that settles a refusal: the command line names its flag, the window offers a
/// control.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Remedy {
    /// State the decimal mark of the file.
    StateDecimalMark,
    /// Fit unweighted (every σ ignored).
    FitUnweighted,
    /// Confirm temperatures (or θ) outside 1–10 000 K.
    ConfirmExtremeTemperatures,
    /// Fit the good rows and list the bad ones.
    SkipBadRows,
}

impl Remedy {
    /// The remedy for a refusal by isochore-data, if a setting settles it.
    pub fn for_data(e: &isochore_data::Error) -> Option<Remedy> {
        match e {
            isochore_data::Error::DecimalMark { .. } => Some(Remedy::StateDecimalMark),
            isochore_data::Error::MissingSigma { .. } => Some(Remedy::FitUnweighted),
            isochore_data::Error::ProjectRow { rejected, .. } => Remedy::for_row(rejected),
            _ => None,
        }
    }

    /// The remedy for one rejected row, if a setting settles it.
    pub fn for_row(r: &RejectedRow) -> Option<Remedy> {
        matches!(
            r.problem,
            isochore_data::RowProblem::ImplausibleTemperature { .. }
        )
        .then_some(Remedy::ConfirmExtremeTemperatures)
    }

    /// The remedy for a refusal by isochore-fit, if a setting settles it.
    pub fn for_fit(e: &isochore_fit::Error) -> Option<Remedy> {
        match e {
            isochore_fit::Error::ImplausibleTemperature { .. }
            | isochore_fit::Error::ImplausibleReferenceTemperature(_) => {
                Some(Remedy::ConfirmExtremeTemperatures)
            }
            isochore_fit::Error::MissingSigma { .. } => Some(Remedy::FitUnweighted),
            _ => None,
        }
    }
}

/// Why an input could not be turned into data sets. Each message names the input by the
/// path as given.
#[derive(Debug, Clone)]
pub enum LoadError {
    /// isochore-data refused the file or one of its data sets.
    Data {
        /// The input as given.
        source: String,
        /// isochore-data's error (line and column where there is one).
        error: Box<isochore_data::Error>,
    },
    /// Rows that could not be read (the file is refused unless bad rows may be skipped).
    BadRows {
        /// The input as given.
        source: String,
        /// Every rejected row, in file order (at least one).
        rejected: Vec<RejectedRow>,
    },
    /// A row to exclude that the data set does not have.
    NoSuchRow {
        /// The input as given.
        source: String,
        /// The data set.
        series: String,
        /// The row asked for.
        row: RowNumber,
        /// How many rows the data set has.
        rows: usize,
    },
    /// Nothing to fit.
    Empty {
        /// The input as given.
        source: String,
        /// Whether the input is a project file.
        project: bool,
    },
}

impl LoadError {
    /// The setting that settles this refusal, if there is one.
    pub fn remedy(&self) -> Option<Remedy> {
        match self {
            LoadError::Data { error, .. } => Remedy::for_data(error),
            LoadError::BadRows { .. } => Some(Remedy::SkipBadRows),
            _ => None,
        }
    }
}

/// A message from isochore-data, which names the file by its base name, named instead by the
/// path as given, so `d1/x.csv` and `d2/x.csv` are told apart.
pub fn named_by_path(message: &str, shown: &str) -> String {
    let base = Path::new(shown)
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    match message.strip_prefix(&format!("{base}:")) {
        Some(rest) if !base.is_empty() && !message.starts_with(&format!("{shown}:")) => {
            format!("{shown}:{rest}")
        }
        _ if message.contains(shown) => message.to_string(),
        _ => format!("{shown}: {message}"),
    }
}

impl fmt::Display for LoadError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            LoadError::Data { source, error } => {
                f.write_str(&named_by_path(&error.to_string(), source))
            }
            LoadError::BadRows { source, rejected } => {
                let first = rejected.first().map(RejectedRow::message).unwrap_or_default();
                write!(f, "{source}: {first}")?;
                if rejected.len() > 1 {
                    write!(f, " ({} bad rows in all)", rejected.len())?;
                }
                Ok(())
            }
            LoadError::NoSuchRow {
                source,
                series,
                row,
                rows,
            } => write!(
                f,
                "{source}: series '{series}': row {row} is to be excluded, but the series has {rows} data rows"
            ),
            LoadError::Empty { source, project } => {
                if *project {
                    write!(f, "{source}: the project holds no data sets")
                } else {
                    write!(f, "{source}: no data rows to fit")
                }
            }
        }
    }
}

impl std::error::Error for LoadError {}

/// Reads one input into data sets (one per data set of the file): a project file (see
/// [`is_project_file`]) with its series, exclusions and settings, or delimited text.
///
/// # Errors
/// [`LoadError`], naming the input by the path as given.
pub fn load(path: &Path, o: &Overrides) -> Result<Vec<PreparedSet>, LoadError> {
    if is_project_file(path) {
        load_project(path, o)
    } else {
        load_text(path, o)
    }
}

fn load_text(path: &Path, o: &Overrides) -> Result<Vec<PreparedSet>, LoadError> {
    let source = path.display().to_string();
    let data_error = |error| LoadError::Data {
        source: source.clone(),
        error: Box::new(error),
    };
    // Without the cells as typed, a large file is read in pieces and its text never held
    // whole beside its rows (isochore-data's `import_path_rows`; the same import).
    let read = if o.with_cells {
        isochore_data::import_path
    } else {
        isochore_data::import_path_rows
    };
    let mut imp: Import = read(path, &o.import_options()).map_err(data_error)?;
    let mut notes = Vec::new();
    if !imp.rejected.is_empty() {
        if !o.skip_bad_rows {
            return Err(LoadError::BadRows {
                source,
                rejected: imp.rejected.clone(),
            });
        }
        notes.extend(
            imp.rejected
                .iter()
                .map(|r| format!("skipped {}", r.message())),
        );
    }
    let requested = o.apply(FitOptions::default());
    let weighed = (0..imp.series.len())
        .map(|i| weighting::for_import(&imp, i, requested))
        .collect::<Result<Vec<_>, _>>()
        .map_err(data_error)?;
    // The cells as typed only when asked for: they cost memory on huge files. A σ(T)
    // column is read from the cells.
    let series = if o.with_cells || imp.mapping.temperature_uncertainty.is_some() {
        imp.data_sets_with_cells()
    } else {
        std::mem::take(&mut imp.series)
    };
    // The file's text is not needed from here on: freed before the points are prepared
    // (21 MB of a 10⁶-row file).
    let temperature_unit = imp.mapping.temperature.unit;
    drop(imp);
    let mut sets = Vec::with_capacity(series.len());
    for (mut s, weighed) in series.into_iter().zip(weighed) {
        if let Some(&row) = o.exclude.rows.iter().find(|r| r.get() > s.len()) {
            return Err(LoadError::NoSuchRow {
                source,
                series: s.name.clone(),
                row,
                rows: s.len(),
            });
        }
        for r in &o.exclude.rows {
            s.exclude(r.get(), &o.exclude.reason, &o.exclude.at)
                .map_err(data_error)?;
        }
        // The reader's rows become the points in place (see `PreparedSet::prepare`): the
        // data set is not needed afterwards.
        let taken = (s.settings.replicates == Replicates::Keep && !s.has_cells())
            .then(|| s.take_read_rows());
        let mut set = PreparedSet::prepare(&s, &source, o, weighed, taken)?;
        // A file states its temperature unit; show results in it.
        set.temperature = temperature_unit;
        // Skipped rows first, then what every data set says (unused columns, replicates,
        // weighting), as a project's prepared set says it.
        set.warnings.splice(0..0, notes.iter().cloned());
        sets.push(set);
    }
    if sets.is_empty() {
        return Err(LoadError::Empty {
            source,
            project: false,
        });
    }
    Ok(sets)
}

fn load_project(path: &Path, o: &Overrides) -> Result<Vec<PreparedSet>, LoadError> {
    let source = path.display().to_string();
    let data_error = |error| LoadError::Data {
        source: source.clone(),
        error: Box::new(error),
    };
    let mut project = Project::load(path).map_err(data_error)?;
    if !o.columns.is_empty() || o.data_temperature_unit.is_some() {
        return Err(data_error(isochore_data::Error::InvalidMapping {
            file: source.clone(),
            message: "a project keeps the columns it was saved with; column choices and the temperature unit of the file apply to data files only".to_string(),
        }));
    }
    let mut sets = Vec::with_capacity(project.series.len());
    for s in &mut project.series {
        for r in &o.exclude.rows {
            s.exclude(r.get(), &o.exclude.reason, &o.exclude.at)
                .map_err(data_error)?;
        }
        if o.allow_extreme_temperatures {
            s.settings.fit.allow_extreme_temperatures = true;
        }
        let mut set = PreparedSet::from_data_set(s, &source, o)?;
        set.settings
            .insert(0, ("project file".to_string(), source.clone()));
        sets.push(set);
    }
    if sets.is_empty() {
        return Err(LoadError::Empty {
            source,
            project: true,
        });
    }
    Ok(sets)
}

fn replicates_setting(r: isochore_data::Replicates) -> (String, String) {
    ("replicates".to_string(), format!("{r:?}").to_lowercase())
}

impl PreparedSet {
    /// One data set of a project (or of the window's document), its settings overlaid by
    /// `o` (exclusions in `o` are not applied here: they belong in the data set's own list).
    /// `source` names the input in messages.
    ///
    /// # Errors
    /// [`LoadError::Data`]: a cell that no longer converts, or σ in some rows only under
    /// inverse-variance weights (line and column named).
    pub fn from_data_set(
        s: &isochore_data::DataSet,
        source: &str,
        o: &Overrides,
    ) -> Result<PreparedSet, LoadError> {
        let data_error = |error| LoadError::Data {
            source: source.to_string(),
            error: Box::new(error),
        };
        let weighed = weighting::for_data_set(s, o.apply(s.settings.fit)).map_err(data_error)?;
        PreparedSet::prepare(s, source, o, weighed, None)
    }

    /// The prepared set of a data set whose weighting is decided. `taken`: the data set's
    /// converted rows, taken out of it by the caller (then turned into the points in the
    /// same memory; with replicates kept only).
    fn prepare(
        s: &isochore_data::DataSet,
        source: &str,
        o: &Overrides,
        weighed: weighting::Weighed,
        taken: Option<Vec<Row>>,
    ) -> Result<PreparedSet, LoadError> {
        let data_error = |error| LoadError::Data {
            source: source.to_string(),
            error: Box::new(error),
        };
        let reasons: BTreeMap<usize, &str> = s
            .exclusions
            .iter()
            .map(|e| (e.row, e.reason.as_str()))
            .collect();
        let mut origins = Origins::new();
        let mut origin = |first_row: usize, line: usize, rows: &[usize], included: bool| {
            let row = RowNumber::from_index(first_row.saturating_sub(1));
            origins.push(
                row,
                line,
                match (o.with_cells, s.raw_rows().get(row.index())) {
                    (true, Some(r)) => r.cells.clone(),
                    _ => Vec::new(),
                },
                if included {
                    None
                } else {
                    rows.iter()
                        .find_map(|r| reasons.get(r).copied())
                        .filter(|r| !r.is_empty())
                        .map(str::to_string)
                },
            );
        };
        let mut averaged = false;
        let measurements = if s.settings.replicates == Replicates::Keep {
            // One point per row, as `DataSet::points` makes them, built straight from the
            // converted rows: no list of rows per point (a 10⁶-row file made a million small
            // allocations here), and rows the data set no longer needs become the points in
            // their own memory (a row and a measurement both take 40 bytes, and std's
            // `collect` of a mapped `Vec::into_iter` reuses the buffer), so a 10⁶-row file's
            // rows are not held beside its points.
            let rows = match taken {
                Some(rows) => Cow::Owned(rows),
                None => s.converted().map_err(data_error)?,
            };
            let excluded = s.excluded_rows();
            let mut point = |r: &Row| {
                let included = excluded.binary_search(&r.row()).is_err();
                origin(r.row(), r.line(), &[r.row()], included);
                Measurement {
                    t_k: r.t_k,
                    ln_k: r.ln_k,
                    sigma_ln_k: r.sigma_ln_k(),
                    included,
                }
            };
            match rows {
                Cow::Owned(rows) => rows.into_iter().map(|r| point(&r)).collect(),
                Cow::Borrowed(rows) => rows.iter().map(point).collect(),
            }
        } else {
            let points = s.points().map_err(data_error)?;
            let mut measurements = Vec::with_capacity(points.len());
            for p in &points {
                averaged |= p.rows.len() > 1;
                measurements.push(p.measurement);
                let first = p.rows.first().copied().unwrap_or(0);
                let line = s
                    .line(RowNumber::from_index(first.saturating_sub(1)).get())
                    .unwrap_or(0);
                origin(first, line, &p.rows, p.measurement.included);
            }
            measurements
        };
        let mut set = PreparedSet {
            source: source.to_string(),
            file_name: s.source.name.clone(),
            sha256: s.source.sha256.clone(),
            series: s.name.clone(),
            headers: s.headers.clone(),
            conversions: s.mapping.describe(&s.headers),
            measurements: Arc::new(measurements),
            rows: origins,
            options: weighed.options,
            energy: o.energy_unit.unwrap_or(s.settings.energy_unit),
            temperature: s.settings.temperature_unit,
            quantity: s.mapping.quantity.kind,
            quantity_header: s
                .headers
                .get(s.mapping.quantity.column)
                .cloned()
                .unwrap_or_default(),
            warnings: crate::columns::unused_columns_note(&s.mapping, &s.headers)
                .into_iter()
                .collect(),
            settings: vec![replicates_setting(s.settings.replicates)],
            sigma_t_k: None,
            intervals: s.settings.intervals,
        };
        crate::errors_in_t::attach(&mut set, s, o).map_err(data_error)?;
        set.finish(averaged, weighed.note);
        Ok(set)
    }

    fn finish(&mut self, averaged: bool, weighting_note: Option<&str>) {
        if averaged {
            self.warnings.push(REPLICATES_NOTE.to_string());
        }
        self.warnings.extend(weighting_note.map(str::to_string));
    }

    /// Fits the data set with isochore-fit.
    ///
    /// # Errors
    /// isochore-fit's refusal, with the data set named.
    pub fn fit(&self) -> Result<isochore_fit::VantHoffFit, FitFailure> {
        isochore_fit::fit_shared(&self.measurements, &self.options).map_err(|e| self.failure(e))
    }

    /// [`PreparedSet::fit`] for an output that shows the estimates, the statistics, the
    /// flagged points and the cautions but none of the model comparison's numbers (the
    /// command line's summary table): the comparison is made only as far as its verdict
    /// ([`isochore_fit::fit_to_verdict`]), so a large linear fit of data that show no
    /// curvature solves no Clarke–Glew model. Everything such an output shows is `fit`'s;
    /// the fit's `comparison()` is `None` on a large data set.
    ///
    /// # Errors
    /// As [`PreparedSet::fit`].
    pub fn fit_for_summary(&self) -> Result<isochore_fit::VantHoffFit, FitFailure> {
        isochore_fit::fit_to_verdict(&self.measurements, &self.options).map_err(|e| self.failure(e))
    }

    fn failure(&self, error: isochore_fit::Error) -> FitFailure {
        FitFailure {
            source: self.source.clone(),
            series: self.series.clone(),
            error,
        }
    }
}

/// A data set isochore-fit refused.
#[derive(Debug, Clone)]
pub struct FitFailure {
    /// The input as given.
    pub source: String,
    /// The data set.
    pub series: String,
    /// isochore-fit's reason.
    pub error: isochore_fit::Error,
}

impl FitFailure {
    /// The setting that settles this refusal, if there is one.
    pub fn remedy(&self) -> Option<Remedy> {
        Remedy::for_fit(&self.error)
    }
}

impl fmt::Display for FitFailure {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{}: series '{}': {}",
            self.source, self.series, self.error
        )
    }
}

impl std::error::Error for FitFailure {}
