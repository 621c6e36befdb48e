//! The report of a joint fit: several series fitted together with some parameters shared
//! (`vhfit fit A.csv B.csv --share delta_cp --report …`). The same formats as a single
//! fit's report — HTML, PDF, Markdown with SVG figures, the data and results tables as
//! CSV, each figure as SVG or PNG — laid out by the same writers ([`crate::document`]),
//! from a [`JointReportInput`] the caller fills (isochore-analysis' `joint_report_input`).
//!
//! What it holds: the shared and per-series estimates with SE and CI, the differences
//! between series, the test of equality with both fits side by side and its verdict in
//! words, the van 't Hoff plot of every series with the lines the joint fit gives them,
//! residuals by series, with three or more series the compensation analysis (ΔH° against
//! ΔS° and against ΔG°(T_hm), each series' joint confidence region, β with the
//! Krug–Hunter–Grieger test and Exner's test, and the caution that compensation between
//! correlated estimates proves nothing by itself), the calorimetric comparison where
//! values were given (and, when asked, the joint fit with the calorimetric values as
//! observations of ΔH°(T) beside the fit of ln K alone), and the single report's methods,
//! assumptions and record.

mod content;
mod csv;

use crate::document::Document;
use crate::figures::{joint_figure_svg, svg_to_png, FigureKind, PNG_SCALE};
use crate::{write_atomic, Record, ReportError, ReportFormat, ReportRow};
use isochore_fit::calorimetric::CalorimetricComparison;
use isochore_fit::global::{
    CalorimetricJointFit, Compensation, CompensationPoint, EqualityTest, ExnerTest, GlobalFit,
};
use isochore_fit::{EnergyUnit, TemperatureUnit};
use std::path::{Path, PathBuf};

pub use content::build as build_joint;

/// One series of a joint fit as the report shows it.
#[derive(Debug, Clone)]
pub struct JointSeries {
    /// The series' label in the fit (its name, with its file when two share a name).
    pub label: String,
    /// The source file's name as given.
    pub source_name: String,
    /// SHA-256 of the source file's bytes, lowercase hexadecimal.
    pub source_sha256: String,
    /// The rows, in the order of the fit's points of this series.
    pub rows: Vec<ReportRow>,
    /// Unit conversions made in reading, one sentence each.
    pub conversions: Vec<String>,
    /// Calorimetric values compared with this series' ΔH°(T) from the joint fit.
    pub calorimetric: Vec<CalorimetricComparison>,
}

/// The compensation analysis of three or more series (from the separate fits).
#[derive(Debug, Clone)]
pub struct JointCompensation {
    /// Each series' ΔH° and ΔS° at θ with their covariance.
    pub points: Vec<CompensationPoint>,
    /// β and the Krug–Hunter–Grieger test, when computed.
    pub beta: Option<Compensation>,
    /// Exner's common-intersection test, when computed.
    pub exner: Option<ExnerTest>,
}

/// Everything a joint fit's report shows.
#[derive(Debug, Clone)]
pub struct JointReportInput {
    /// Title of the report.
    pub title: String,
    /// The series, in the fit's order.
    pub series: Vec<JointSeries>,
    /// The joint fit (the named parameters shared).
    pub fit: GlobalFit,
    /// The test of equality against the separate fits, when it could be made.
    pub equality: Option<EqualityTest>,
    /// The compensation analysis, with three or more series.
    pub compensation: Option<JointCompensation>,
    /// When asked for: the joint fit with the calorimetric values as observations of
    /// ΔH°(T), or why it was refused, in words.
    pub calorimetric_fit: Option<Result<CalorimetricJointFit, String>>,
    /// Cautions in words from reading and fitting.
    pub warnings: Vec<String>,
    /// Energy unit for ΔH°, ΔG° (entropies follow).
    pub energy_unit: EnergyUnit,
    /// Temperature unit for tables and axes.
    pub temperature_unit: TemperatureUnit,
    /// Version of the program that made the fit.
    pub program_version: String,
    /// When, by whom, and the analyst's note.
    pub record: Record,
    /// Further settings to record (name, value).
    pub settings: Vec<(String, String)>,
}

impl JointReportInput {
    /// Checks that the series and their rows match the fit.
    ///
    /// # Errors
    /// [`ReportError::Input`] when the series or a series' rows differ in number from the
    /// fit's.
    pub fn validate(&self) -> Result<(), ReportError> {
        if self.series.len() != self.fit.n_series() {
            return Err(ReportError::Input(format!(
                "{} series described but {} fitted; they must match one to one",
                self.series.len(),
                self.fit.n_series()
            )));
        }
        for (s, series) in self.series.iter().enumerate() {
            let n = self.fit.points(s).map_or(0, <[_]>::len);
            if series.rows.len() != n {
                return Err(ReportError::Input(format!(
                    "series '{}': {} data rows but {} fitted points; they must match one to one",
                    series.label,
                    series.rows.len(),
                    n
                )));
            }
        }
        Ok(())
    }

    /// The series' labels, in order.
    pub fn labels(&self) -> Vec<String> {
        self.series.iter().map(|s| s.label.clone()).collect()
    }

    /// The figures this report holds, in order: the van 't Hoff plot and the residuals by
    /// series, and the two compensation figures when there is a compensation analysis.
    pub fn figures(&self) -> Vec<FigureKind> {
        let n = if self.compensation.is_some() { 4 } else { 2 };
        FigureKind::JOINT[..n].to_vec()
    }
}

/// The joint figure a format names: a single fit's figure kind is read as its joint
/// counterpart (a `.svg` or `.png` name asks for the van 't Hoff plot by series).
fn joint_kind(kind: FigureKind) -> FigureKind {
    match kind {
        FigureKind::VantHoff => FigureKind::SeriesVantHoff,
        FigureKind::Residuals | FigureKind::Influence => FigureKind::SeriesResiduals,
        FigureKind::Ellipse => FigureKind::CompensationEntropy,
        other => other,
    }
}

fn document(input: &JointReportInput) -> Document<'_> {
    Document {
        title: &input.title,
        program_version: &input.program_version,
        footer: format!("Isochore joint report · {} series", input.series.len()),
        blocks: content::build(input),
        figure_svg: Box::new(move |kind| joint_figure_svg(input, kind)),
    }
}

/// Renders one format of a joint fit's report to bytes (Markdown refers to its figures
/// as `figure-<kind>.svg`).
///
/// # Errors
/// [`ReportError::Input`] for inconsistent input, [`ReportError::Figure`] or
/// [`ReportError::Pdf`] when drawing fails.
pub fn render_joint(
    input: &JointReportInput,
    format: ReportFormat,
) -> Result<Vec<u8>, ReportError> {
    input.validate()?;
    match format {
        ReportFormat::Html => {
            crate::html::render_document(&document(input)).map(String::into_bytes)
        }
        ReportFormat::Pdf => crate::pdf::render_document(&document(input)),
        ReportFormat::Markdown => {
            Ok(crate::markdown::render_blocks(&content::build(input), "figure").into_bytes())
        }
        ReportFormat::DataCsv => csv::data_csv(input),
        ReportFormat::ResultsCsv => csv::results_csv(input),
        ReportFormat::FigureSvg(kind) => {
            joint_figure_svg(input, joint_kind(kind)).map(String::into_bytes)
        }
        ReportFormat::FigurePng(kind) => {
            svg_to_png(&joint_figure_svg(input, joint_kind(kind))?, PNG_SCALE)
        }
    }
}

/// The files [`write_joint_report`] writes for `format` at `path`, in writing order: for
/// Markdown its figures `<file stem>-<kind>.svg` beside it, then the file itself.
pub fn joint_report_paths(
    input: &JointReportInput,
    format: ReportFormat,
    path: &Path,
) -> Vec<PathBuf> {
    crate::paths_with_figures(format, path, &input.figures())
}

/// Writes one format of a joint fit's report to `path` atomically (Markdown with its SVG
/// figures beside it). Returns every path written, as [`joint_report_paths`].
///
/// # Errors
/// As [`render_joint`], and [`ReportError::Io`] when a file cannot be written.
pub fn write_joint_report(
    input: &JointReportInput,
    format: ReportFormat,
    path: &Path,
) -> Result<Vec<PathBuf>, ReportError> {
    input.validate()?;
    if format == ReportFormat::Markdown {
        let stem = crate::markdown_stem(path);
        let paths = joint_report_paths(input, format, path);
        let mut written = Vec::new();
        for (kind, p) in input.figures().into_iter().zip(&paths) {
            write_atomic(p, joint_figure_svg(input, kind)?.as_bytes())?;
            written.push(p.clone());
        }
        let md = crate::markdown::render_blocks(&content::build(input), &stem);
        write_atomic(path, md.as_bytes())?;
        written.push(path.to_path_buf());
        return Ok(written);
    }
    let bytes = render_joint(input, format)?;
    write_atomic(path, &bytes)?;
    Ok(vec![path.to_path_buf()])
}

/// The formats of a joint report set and their file names under `stem`, in writing order.
pub fn joint_report_set_plan(input: &JointReportInput, stem: &str) -> Vec<(ReportFormat, String)> {
    crate::plan_with_figures(stem, &input.figures())
}

/// Every file [`write_joint_report_set`] writes into `dir` under `stem`.
pub fn joint_report_set_paths(input: &JointReportInput, dir: &Path, stem: &str) -> Vec<PathBuf> {
    joint_report_set_plan(input, stem)
        .into_iter()
        .flat_map(|(format, name)| joint_report_paths(input, format, &dir.join(name)))
        .collect()
}

/// Writes every format of a joint fit's report into `dir` (created if missing) under
/// `stem`. Returns every path written, as [`joint_report_set_paths`].
///
/// # Errors
/// As [`write_joint_report`].
pub fn write_joint_report_set(
    input: &JointReportInput,
    dir: &Path,
    stem: &str,
) -> Result<Vec<PathBuf>, ReportError> {
    input.validate()?;
    std::fs::create_dir_all(dir).map_err(|source| ReportError::Io {
        path: dir.to_path_buf(),
        source,
    })?;
    // Each figure drawn and rasterised once for every format, the files written side by
    // side, as a single fit's set (`crate::set`); each file is what write_joint_report
    // writes for its format.
    let source = crate::set::SetSource {
        figures: input.figures(),
        figure_svg: &|kind| joint_figure_svg(input, kind),
        document: &|| document(input),
        markdown: &|stem| crate::markdown::render_blocks(&content::build(input), stem),
        csv: &|format| match format {
            ReportFormat::DataCsv => csv::data_csv(input),
            _ => csv::results_csv(input),
        },
    };
    crate::set::write(&source, dir, joint_report_set_plan(input, stem), &|_| {})
}
