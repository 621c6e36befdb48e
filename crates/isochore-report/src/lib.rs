//! # isochore-report
//!
//! Reports a chemist can file, and static figures, from one finished van 't Hoff fit. The
//! same [`ReportInput`] feeds every format, so the command line and the desktop window write
//! identical documents:
//!
//! - [`render`] turns a [`ReportInput`] into the bytes of one [`ReportFormat`]: a
//!   self-contained HTML page (inline SVG, no network), a PDF document, Markdown, the data
//!   or results table as CSV, or one figure alone as SVG or PNG (300 dpi at 17 cm wide).
//! - [`write_report`] writes one format to a path atomically (temporary file in the same
//!   folder, flushed and synced, then renamed); Markdown also writes its figures beside it.
//! - [`write_report_set`] writes every format into one folder under a common stem.
//!
//! This crate computes no statistics: every number comes from the
//! [`isochore_fit::VantHoffFit`] in the input. It knows nothing of file formats on the input
//! side: the caller (which has read the file) fills [`ReportInput`] with the cells as read.
//!
//! ```no_run
//! use isochore_report::{render, ReportFormat, ReportInput};
//! # fn demo(input: ReportInput) -> Result<(), isochore_report::ReportError> {
//! let html: Vec<u8> = render(&input, ReportFormat::Html)?;
//! isochore_report::write_report(&input, ReportFormat::Pdf, std::path::Path::new("fit.pdf"))?;
//! # Ok(()) }
//! ```

#![deny(missing_docs)]

mod atomic;
mod calorimetric_section;
pub mod content;
mod csv_tables;
mod document;
mod errors_in_t_section;
pub mod figures;
mod fonts;
pub mod guard;
mod html;
pub mod joint;
mod markdown;
mod pdf;
mod pdf_figures;
mod pdf_fonts;
pub mod present;
mod set;

use isochore_fit::{EnergyUnit, QuantityKind, TemperatureUnit, VantHoffFit};
use std::fmt;
use std::path::{Path, PathBuf};

pub use atomic::{remove_stale_temporaries, write_atomic, STALE_AFTER, TEMP_PREFIX, TEMP_SUFFIX};
pub use figures::FigureKind;
pub use guard::{OverwriteGuard, MANIFEST};
pub use joint::{
    joint_report_paths, joint_report_set_paths, render_joint, write_joint_report,
    write_joint_report_set, JointCompensation, JointReportInput, JointSeries,
};

/// One measured row as the caller read it, with its values on the fitting scale.
///
/// `rows[i]` of a [`ReportInput`] belongs to `fit.points[i]`: same order, same count.
#[derive(Debug, Clone, PartialEq)]
pub struct ReportRow {
    /// 1-based data row in the source file (file order, whatever the sort).
    pub row: usize,
    /// 1-based line in the source file.
    pub line: usize,
    /// The cells of the row exactly as read (text), in the order of [`ReportInput::headers`].
    pub cells: Vec<String>,
    /// Temperature in kelvin after conversion.
    pub t_k: f64,
    /// ln K after conversion.
    pub ln_k: f64,
    /// σ(ln K) after conversion, if the file gives an uncertainty.
    pub sigma_ln_k: Option<f64>,
    /// Whether the point took part in the fit.
    pub included: bool,
    /// Why the point was excluded, in the chemist's words (`None` for included points, or
    /// when no reason was recorded).
    pub exclusion_reason: Option<String>,
}

/// The lab record of an analysis: when it was made, by whom, and the analyst's note.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Record {
    /// When the analysis was made, as the report writes it ("2026-12-02 18:50 UTC");
    /// empty when unknown.
    pub analysed_at: String,
    /// The analyst's name, when given.
    pub analyst: Option<String>,
    /// A free-text note, when given (shown under the record line).
    pub note: Option<String>,
}

/// Everything a report shows. Build it once and hand it to [`render`] for each format.
#[derive(Debug, Clone)]
pub struct ReportInput {
    /// Title of the report (shown as the heading).
    pub title: String,
    /// Name of the series fitted.
    pub series_name: String,
    /// Name of the source file as given by the user.
    pub source_name: String,
    /// SHA-256 of the source file's bytes, lowercase hexadecimal.
    pub source_sha256: String,
    /// Column headers as read, in file order.
    pub headers: Vec<String>,
    /// The rows, in the same order as `fit.points`.
    pub rows: Vec<ReportRow>,
    /// The unit conversions made, one sentence each (for example
    /// "temperature: °C → K, T/K = t/°C + 273.15").
    pub conversions: Vec<String>,
    /// The finished fit.
    pub fit: VantHoffFit,
    /// Energy unit for ΔH°, ΔG° (entropies follow: J or cal per mol and kelvin).
    pub energy_unit: EnergyUnit,
    /// Temperature unit for tables and the figures' temperature axes.
    pub temperature_unit: TemperatureUnit,
    /// The quantity the file gave and its name as the header wrote it ("pKa", "K_d"):
    /// the results add the constant at θ and at T_hm in it. `None` shows K.
    pub quantity: Option<(QuantityKind, String)>,
    /// Version of the program that made the fit.
    pub program_version: String,
    /// When the analysis was made, by whom, and the analyst's note.
    pub record: Record,
    /// Further settings worth recording so the fit can be repeated (name, value), beyond the
    /// fit options, which are always listed.
    pub settings: Vec<(String, String)>,
    /// Intervals also made by resampling (Monte Carlo, the bootstrap), shown in a methods
    /// paragraph and a table beside the delta method's; empty for the delta method alone.
    pub intervals: Vec<isochore_fit::intervals::IntervalRun>,
    /// The fit with errors in T when the data set has σ(T) (or why it could not be made),
    /// shown in its own section beside the fit in K only; `None` without σ(T).
    pub errors_in_t: Option<Result<isochore_fit::errors_in_t::ErrorsInTFit, String>>,
    /// Calorimetric enthalpies compared with the fit's ΔH°(T), shown in a section of their
    /// own ("Calorimetric ΔH°"); empty when none were given.
    pub calorimetric: Vec<isochore_fit::calorimetric::CalorimetricComparison>,
    /// When asked for (`vhfit fit --calorimetric-in-fit`): the series fitted again with its
    /// calorimetric values as observations of ΔH°(T) — the fit of ln K alone (as a
    /// one-series [`GlobalFit`](isochore_fit::global::GlobalFit)) and the fit with the
    /// values (isochore-analysis' `calorimetric::fit_single_with_calorimetric`) — or why it
    /// could not be made. Shown in the "Calorimetric ΔH°" section, each parameter "with
    /// ΔH_cal" beside "ln K alone", and as rows of the results CSV; `None` leaves it out.
    pub calorimetric_fit: Option<Result<SingleConstrainedFit, String>>,
}

/// One series' fit of ln K alone and its fit with the calorimetric values as observations
/// of ΔH°(T), in that order ([`ReportInput::calorimetric_fit`]).
pub type SingleConstrainedFit = (
    isochore_fit::global::GlobalFit,
    isochore_fit::global::CalorimetricJointFit,
);

/// The output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum ReportFormat {
    /// One self-contained HTML page with inline SVG figures.
    Html,
    /// A PDF document (A4, embedded DejaVu Sans, figures at 300 dpi, numbered pages).
    Pdf,
    /// Markdown; its figures are separate SVG files named `<stem>-<figure>.svg`.
    Markdown,
    /// The data table (as read, converted, and per-point diagnostics) as CSV.
    DataCsv,
    /// The results table (estimates, SE, CI, fit statistics) as CSV.
    ResultsCsv,
    /// One figure as SVG.
    FigureSvg(FigureKind),
    /// One figure as PNG at publication resolution.
    FigurePng(FigureKind),
}

impl ReportFormat {
    /// The usual file extension, without the dot.
    pub fn extension(self) -> &'static str {
        match self {
            ReportFormat::Html => "html",
            ReportFormat::Pdf => "pdf",
            ReportFormat::Markdown => "md",
            ReportFormat::DataCsv | ReportFormat::ResultsCsv => "csv",
            ReportFormat::FigureSvg(_) => "svg",
            ReportFormat::FigurePng(_) => "png",
        }
    }

    /// The format a path's extension asks for: `.html`/`.htm`, `.pdf`, `.md`, `.csv`, `.svg`
    /// and `.png` (the van 't Hoff figure). `None` for anything else. A `.csv` name is the
    /// results table, as a report's CSV is read first for its results, unless the name ends
    /// in `-data.csv` or `_data.csv` (the name a report set gives the data table), which is
    /// the data table.
    pub fn from_path(path: &Path) -> Option<ReportFormat> {
        let ext = path.extension()?.to_str()?.to_ascii_lowercase();
        Some(match ext.as_str() {
            "html" | "htm" => ReportFormat::Html,
            "pdf" => ReportFormat::Pdf,
            "md" | "markdown" => ReportFormat::Markdown,
            "csv" => {
                let stem = path
                    .file_stem()
                    .and_then(|s| s.to_str())
                    .unwrap_or("")
                    .to_ascii_lowercase();
                if stem.ends_with("-data") || stem.ends_with("_data") {
                    ReportFormat::DataCsv
                } else {
                    ReportFormat::ResultsCsv
                }
            }
            "svg" => ReportFormat::FigureSvg(FigureKind::VantHoff),
            "png" => ReportFormat::FigurePng(FigureKind::VantHoff),
            _ => return None,
        })
    }
}

/// Why a report could not be made or written.
#[derive(Debug)]
#[non_exhaustive]
pub enum ReportError {
    /// The input is inconsistent (for example, rows and fitted points differ in number).
    Input(String),
    /// Drawing a figure failed.
    Figure(String),
    /// Building the PDF failed.
    Pdf(String),
    /// Writing a file failed.
    Io {
        /// The path being written.
        path: PathBuf,
        /// The underlying error.
        source: std::io::Error,
    },
}

impl fmt::Display for ReportError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ReportError::Input(m) => write!(f, "report input: {m}"),
            ReportError::Figure(m) => write!(f, "drawing a figure failed: {m}"),
            ReportError::Pdf(m) => write!(f, "building the PDF failed: {m}"),
            ReportError::Io { path, source } => {
                write!(
                    f,
                    "{}: could not write the report: {source}",
                    path.display()
                )?;
                // A missing folder is the usual cause of "not found" here: say which one.
                match path.parent() {
                    Some(dir)
                        if source.kind() == std::io::ErrorKind::NotFound
                            && !dir.as_os_str().is_empty()
                            && !dir.is_dir() =>
                    {
                        write!(
                            f,
                            " (the folder {} does not exist; create it first)",
                            dir.display()
                        )
                    }
                    _ => Ok(()),
                }
            }
        }
    }
}

impl std::error::Error for ReportError {
    fn source(&self) -> Option<&(dyn std::error::Error + 'static)> {
        match self {
            ReportError::Io { source, .. } => Some(source),
            _ => None,
        }
    }
}

impl ReportInput {
    /// Checks that rows and fitted points match.
    ///
    /// # Errors
    /// [`ReportError::Input`] when `rows` and `fit.points` differ in number.
    pub fn validate(&self) -> Result<(), ReportError> {
        if self.rows.len() != self.fit.points().len() {
            return Err(ReportError::Input(format!(
                "{} data rows but {} fitted points; they must match one to one",
                self.rows.len(),
                self.fit.points().len()
            )));
        }
        Ok(())
    }
}

/// Renders one format to bytes. Markdown refers to its figures as `figure-<kind>.svg`; use
/// [`render_markdown`] to choose the names, or [`write_report`] to write them too.
///
/// # Errors
/// [`ReportError::Input`] for inconsistent input, [`ReportError::Figure`] or
/// [`ReportError::Pdf`] when drawing fails.
pub fn render(input: &ReportInput, format: ReportFormat) -> Result<Vec<u8>, ReportError> {
    input.validate()?;
    match format {
        ReportFormat::Html => html::render(input).map(String::into_bytes),
        ReportFormat::Pdf => pdf::render(input),
        ReportFormat::Markdown => Ok(render_markdown(input, "figure")?.into_bytes()),
        ReportFormat::DataCsv => csv_tables::data_csv(input),
        ReportFormat::ResultsCsv => csv_tables::results_csv(input),
        ReportFormat::FigureSvg(kind) => figures::figure_svg(input, kind).map(String::into_bytes),
        ReportFormat::FigurePng(kind) => figures::figure_png(input, kind),
    }
}

/// Renders Markdown whose figures are referenced as `<figure_stem>-<kind>.svg` (relative
/// links, to be written beside the Markdown file).
///
/// # Errors
/// [`ReportError::Input`] for inconsistent input.
pub fn render_markdown(input: &ReportInput, figure_stem: &str) -> Result<String, ReportError> {
    input.validate()?;
    Ok(markdown::render(input, figure_stem))
}

/// The files [`write_report`] writes for `format` at `path`, in the order it writes them:
/// for Markdown its figures `<file stem>-<kind>.svg` beside it, then the file itself.
pub fn report_paths(format: ReportFormat, path: &Path) -> Vec<PathBuf> {
    paths_with_figures(format, path, &FigureKind::ALL)
}

/// The files one format writes at `path` when the report holds the figures `kinds`: for
/// Markdown each figure as `<file stem>-<kind>.svg` beside it, then the file itself (a
/// single fit's report and a joint fit's alike).
pub(crate) fn paths_with_figures(
    format: ReportFormat,
    path: &Path,
    kinds: &[FigureKind],
) -> Vec<PathBuf> {
    let mut paths = Vec::new();
    if format == ReportFormat::Markdown {
        let stem = markdown_stem(path);
        let dir = path.parent().unwrap_or_else(|| Path::new(""));
        for kind in kinds {
            paths.push(dir.join(format!("{stem}-{}.svg", kind.key())));
        }
    }
    paths.push(path.to_path_buf());
    paths
}

/// The stem a Markdown report names its figures by: the file's name without extension.
pub(crate) fn markdown_stem(path: &Path) -> String {
    path.file_stem()
        .and_then(|s| s.to_str())
        .unwrap_or("report")
        .to_string()
}

/// The formats of a report set and their file names under `stem`, in writing order (what
/// [`write_report_set`] writes; a caller writing only some of them picks from this list
/// and writes each with [`write_report`], so the names stay the same).
pub fn report_set_plan(stem: &str) -> Vec<(ReportFormat, String)> {
    set_plan(stem)
}

fn set_plan(stem: &str) -> Vec<(ReportFormat, String)> {
    plan_with_figures(stem, &FigureKind::ALL)
}

/// The formats of a report set holding the figures `kinds` and their file names under
/// `stem`, in writing order (a single fit's set and a joint fit's alike).
pub(crate) fn plan_with_figures(stem: &str, kinds: &[FigureKind]) -> Vec<(ReportFormat, String)> {
    let mut plan = vec![
        (ReportFormat::Markdown, format!("{stem}.md")),
        (ReportFormat::Html, format!("{stem}.html")),
        (ReportFormat::Pdf, format!("{stem}.pdf")),
        (ReportFormat::DataCsv, format!("{stem}-data.csv")),
        (ReportFormat::ResultsCsv, format!("{stem}-results.csv")),
    ];
    for &kind in kinds {
        plan.push((
            ReportFormat::FigurePng(kind),
            format!("{stem}-{}.png", kind.key()),
        ));
    }
    plan
}

/// Every file [`write_report_set`] writes into `dir` under `stem`, so a caller can check
/// them before anything is written.
pub fn report_set_paths(dir: &Path, stem: &str) -> Vec<PathBuf> {
    set_plan(stem)
        .into_iter()
        .flat_map(|(format, name)| report_paths(format, &dir.join(name)))
        .collect()
}

/// Writes one format to `path` atomically. For [`ReportFormat::Markdown`] the figures are
/// written beside it as `<file stem>-<kind>.svg`. Returns every path written (the same
/// as [`report_paths`]).
///
/// # Errors
/// As [`render`], and [`ReportError::Io`] when a file cannot be written (nothing is left
/// half-written: the old file, if any, stays until the new one is complete).
pub fn write_report(
    input: &ReportInput,
    format: ReportFormat,
    path: &Path,
) -> Result<Vec<PathBuf>, ReportError> {
    input.validate()?;
    if format == ReportFormat::Markdown {
        let stem = markdown_stem(path);
        let mut written = Vec::new();
        let paths = report_paths(format, path);
        for (kind, p) in FigureKind::ALL.into_iter().zip(&paths) {
            write_atomic(p, figures::figure_svg(input, kind)?.as_bytes())?;
            written.push(p.clone());
        }
        write_atomic(path, render_markdown(input, &stem)?.as_bytes())?;
        written.push(path.to_path_buf());
        return Ok(written);
    }
    let bytes = render(input, format)?;
    write_atomic(path, &bytes)?;
    Ok(vec![path.to_path_buf()])
}

/// Writes the full set into `dir` (created if missing): `<stem>.md` with its SVG figures,
/// `<stem>.html`, `<stem>.pdf`, `<stem>-data.csv`, `<stem>-results.csv`, and every figure
/// as `<stem>-<kind>.png`. Returns every path written (the same as
/// [`report_set_paths`]).
///
/// # Errors
/// As [`write_report`].
pub fn write_report_set(
    input: &ReportInput,
    dir: &Path,
    stem: &str,
) -> Result<Vec<PathBuf>, ReportError> {
    input.validate()?;
    std::fs::create_dir_all(dir).map_err(|source| ReportError::Io {
        path: dir.to_path_buf(),
        source,
    })?;
    // Each figure drawn and rasterised once for every format, then the files written side
    // by side on the machine's cores; the list of paths keeps the plan's order, and each
    // file is the same bytes write_report writes for its format.
    set::SetSource::write_single(input, dir, set_plan(stem), &|_| {})
}

/// Writes the files of `plan` (formats with file names, as [`report_set_plan`] gives them,
/// any subset) into `dir` (which must exist) as [`write_report_set`] does: each figure
/// drawn and rasterised once for every format that holds it (none when only the tables
/// are asked for), the files written side by side. `on_written` is called with the paths
/// of each format as soon as they are written (once per format, from the writing threads,
/// possibly several at once), for progress. Returns every path written, in the plan's order; each
/// file is the same bytes [`write_report`] writes for its format.
///
/// # Errors
/// As [`write_report`]; the files written before an error stay, and were passed to
/// `on_written`.
pub fn write_reports(
    input: &ReportInput,
    dir: &Path,
    plan: Vec<(ReportFormat, String)>,
    on_written: &(dyn Fn(&[PathBuf]) + Sync),
) -> Result<Vec<PathBuf>, ReportError> {
    input.validate()?;
    set::SetSource::write_single(input, dir, plan, on_written)
}
