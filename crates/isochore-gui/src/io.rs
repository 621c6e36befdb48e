//! Files, through the crates that own them: import of lab files and project files from
//! isochore-data, reports and figures from isochore-report. Every failure comes back as a
//! message for the chemist naming the file, line and column; nothing here touches the
//! open project until the caller applies the result as a command.

use crate::doc::{Entry, Project};
use isochore_analysis::{Overrides, PreparedSet};
use isochore_data::{ColumnMapping, DecimalMark, Import, ImportOptions};
use isochore_report::ReportInput;
use std::path::{Path, PathBuf};

/// How a project file is recognised and named: isochore-analysis' rules, the same as the
/// command line's.
pub use isochore_analysis::files::{is_project_file, with_project_suffix, PROJECT_SUFFIX};

/// A data file read but not yet accepted: what was recognised, shown for confirmation,
/// with a copy of the mapping the chemist may change.
#[derive(Debug, Clone)]
pub struct ImportPreview {
    /// File name or "pasted text".
    pub source: String,
    /// The file, when it is one.
    pub path: Option<PathBuf>,
    /// Pasted text, when it is that.
    pub text: Option<String>,
    /// The import as isochore-data made it.
    pub import: Import,
    /// The mapping being edited (starts as the recognised one).
    pub mapping: ColumnMapping,
    /// The decimal mark the file is read with: decided by the file (one convention per
    /// file), or stated by the chemist.
    pub decimal: DecimalMark,
    /// The chemist confirms temperatures outside 1–10 000 K (kept in each data set's
    /// settings, so refits accept them too).
    pub allow_extreme_temperatures: bool,
    /// The chemist asks for equal weights (every σ ignored), the way out of a σ column
    /// with some empty cells.
    pub unweighted: bool,
    /// isochore-data's message for a σ column with some empty cells (read once per
    /// reading, see [`ImportPreview::sigma_problem`]).
    missing_sigma: Option<String>,
}

/// What a refused import asks the chemist to settle.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum QuestionKind {
    /// The decimal marks break the one-convention rule: which mark does the file use?
    DecimalMark,
    /// No data set has enough rows inside 1–10 000 K: are such temperatures meant?
    ExtremeTemperatures,
}

/// An import refused for a reason the chemist can settle (the decimal mark, or extreme
/// temperatures): the message of isochore-data (line and column) and what is needed to
/// read the source again.
#[derive(Debug, Clone)]
pub struct ImportQuestion {
    /// What is asked.
    pub kind: QuestionKind,
    /// File name or "pasted text".
    pub source: String,
    /// The file, when it is one.
    pub path: Option<PathBuf>,
    /// Pasted text, when it is that.
    pub text: Option<String>,
    /// isochore-data's message, naming the line and column.
    pub message: String,
    /// The decimal mark of the refused reading.
    pub decimal: DecimalMark,
    /// Whether extreme temperatures were confirmed for the refused reading.
    pub allow_extreme_temperatures: bool,
}

impl ImportQuestion {
    /// Reads the source again with the decimal mark stated.
    ///
    /// # Errors
    /// As [`import_path`]: a new question when the stated mark is broken too.
    pub fn retry(&self, mark: DecimalMark) -> Result<ImportPreview, ImportFailure> {
        preview(
            &self.source,
            self.path.as_deref(),
            self.text.as_deref(),
            mark,
            self.allow_extreme_temperatures,
        )
    }

    /// Reads the source again with temperatures outside 1–10 000 K confirmed.
    ///
    /// # Errors
    /// As [`import_path`].
    pub fn confirm_extreme(&self) -> Result<ImportPreview, ImportFailure> {
        preview(
            &self.source,
            self.path.as_deref(),
            self.text.as_deref(),
            self.decimal,
            true,
        )
    }
}

/// Why a source could not be previewed.
#[derive(Debug, Clone)]
pub enum ImportFailure {
    /// Mixed or ambiguous decimal marks, or only extreme temperatures: the chemist can
    /// state the convention or confirm the temperatures.
    Question(Box<ImportQuestion>),
    /// Any other refusal, in words (file, line and column named).
    Message(String),
}

impl ImportFailure {
    /// The message, in words.
    pub fn message(&self) -> &str {
        match self {
            ImportFailure::Question(q) => &q.message,
            ImportFailure::Message(m) => m,
        }
    }
}

impl std::fmt::Display for ImportFailure {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.message())
    }
}

impl ImportPreview {
    /// The rejected rows, each prefixed with the source name.
    pub fn problems(&self) -> Vec<String> {
        self.import
            .rejected
            .iter()
            .map(|r| format!("{}: {}", self.source, r.message()))
            .collect()
    }

    /// Number of accepted rows.
    pub fn accepted_rows(&self) -> usize {
        self.import.series.iter().map(|s| s.len()).sum()
    }

    /// Reads the source again with the edited mapping.
    ///
    /// # Errors
    /// isochore-data's message (file, line, column); the preview is then unchanged.
    pub fn reimport(&mut self) -> Result<(), String> {
        let opts = ImportOptions {
            mapping: Some(self.mapping.clone()),
            decimal: self.decimal,
            allow_extreme_temperatures: self.allow_extreme_temperatures,
            ..ImportOptions::default()
        };
        let import = read(
            &self.source,
            self.path.as_deref(),
            self.text.as_deref(),
            &opts,
        )
        .map_err(|e| e.to_string())?;
        self.mapping = import.mapping.clone();
        self.missing_sigma = import.check_sigma().err().map(|e| e.to_string());
        self.import = import;
        Ok(())
    }

    /// The empty-σ rule of isochore-data for a weighted fit: σ in some rows and an empty
    /// σ cell in another is refused, naming the line and column. `None` when the data
    /// sets will be fitted unweighted or every σ is given (or none is).
    pub fn sigma_problem(&self) -> Option<&str> {
        if self.unweighted {
            return None;
        }
        self.missing_sigma.as_deref()
    }

    /// The series this import adds to a project. Each starts with the weighting
    /// isochore-analysis' rule gives it (a data set with no uncertainties — no σ column, or
    /// one with every cell empty — is fitted with equal weights, as on the command line);
    /// the chemist can change it in the settings. The confirmation of extreme temperatures
    /// and the choice to fit unweighted are kept in each data set's settings.
    pub fn series(&self) -> Vec<Entry> {
        isochore_data::Project::from_import(&self.import)
            .series
            .into_iter()
            .map(|mut d| {
                d.settings.fit.allow_extreme_temperatures = self.allow_extreme_temperatures;
                if self.unweighted {
                    d.settings.fit.weighting = isochore_fit::Weighting::Unweighted;
                } else if let Ok(w) = isochore_analysis::weighting::for_data_set(&d, d.settings.fit)
                {
                    d.settings.fit.weighting = w.options.weighting;
                }
                Entry::new(d)
            })
            .collect()
    }
}

fn read(
    source: &str,
    path: Option<&Path>,
    text: Option<&str>,
    opts: &ImportOptions,
) -> Result<Import, isochore_data::Error> {
    match (path, text) {
        (Some(p), _) => isochore_data::import_path(p, opts),
        (None, Some(t)) => isochore_data::import_text(source, t, opts),
        (None, None) => Err(isochore_data::Error::Io {
            path: source.to_string(),
            message: "nothing to read".to_string(),
        }),
    }
}

/// Reads a file or pasted text for preview with the decimal mark and the confirmation of
/// extreme temperatures given.
///
/// # Errors
/// [`ImportFailure::Decimal`] when the decimal marks break the one-convention rule (the
/// chemist may state the mark), else isochore-data's message naming file, line and column.
pub fn preview(
    source: &str,
    path: Option<&Path>,
    text: Option<&str>,
    decimal: DecimalMark,
    allow_extreme_temperatures: bool,
) -> Result<ImportPreview, ImportFailure> {
    let opts = ImportOptions {
        decimal,
        allow_extreme_temperatures,
        ..ImportOptions::default()
    };
    match read(source, path, text, &opts) {
        Ok(import) => Ok(ImportPreview {
            missing_sigma: import.check_sigma().err().map(|e| e.to_string()),
            source: source.to_string(),
            path: path.map(Path::to_path_buf),
            text: text.map(str::to_string),
            mapping: import.mapping.clone(),
            import,
            decimal,
            allow_extreme_temperatures,
            unweighted: false,
        }),
        Err(e) => {
            let kind = match &e {
                isochore_data::Error::DecimalMark { .. } => Some(QuestionKind::DecimalMark),
                isochore_data::Error::TooFewPoints { rejected, .. }
                    if !allow_extreme_temperatures
                        && rejected.iter().any(|r| {
                            matches!(
                                r.problem,
                                isochore_data::RowProblem::ImplausibleTemperature { .. }
                            )
                        }) =>
                {
                    Some(QuestionKind::ExtremeTemperatures)
                }
                _ => None,
            };
            Err(match kind {
                Some(kind) => ImportFailure::Question(Box::new(ImportQuestion {
                    kind,
                    source: source.to_string(),
                    path: path.map(Path::to_path_buf),
                    text: text.map(str::to_string),
                    message: e.to_string(),
                    decimal,
                    allow_extreme_temperatures,
                })),
                None => ImportFailure::Message(e.to_string()),
            })
        }
    }
}

const DEMO: [(&str, &str, &str); 2] = [
    (
        "binding_qx7_halo2.csv",
        include_str!("../../../assets/demo/binding_qx7_halo2.csv"),
        "QX-7 binding Halo-2",
    ),
    (
        "acid_pka.csv",
        include_str!("../../../assets/demo/acid_pka.csv"),
        "quillonic acid pKa",
    ),
];

/// The demo project: the invented binding and acid data sets of `assets/demo/`, read by
/// isochore-data exactly as a user's files are.
///
/// # Errors
/// isochore-data's message if a bundled file is refused (a build fault).
pub fn demo_project() -> Result<Project, String> {
    let mut data = isochore_data::Project::new();
    for (file, text, title) in DEMO {
        let imp = isochore_data::import_text(file, text, &ImportOptions::default())
            .map_err(|e| e.to_string())?;
        let first = data.series.len();
        data.add_import(&imp);
        for s in &mut data.series[first..] {
            s.name = title.to_string();
        }
    }
    let mut p = Project::from_data(data, None);
    // The two scenarios lie far apart in ln K: draw the first, tick the other to compare.
    for s in p.series.iter_mut().skip(1) {
        s.data.shown = false;
    }
    Ok(p)
}

/// The ligand demo: four invented ligands (PX-11 … PX-14) binding the invented protein
/// Orrin-3, one file with a `sample` column (`assets/demo/ligands_px_orrin3.csv`), fitted
/// with the constant-ΔCp° model, each with its invented calorimetric values
/// (`ligands_px_orrin3_itc.csv`, the rows naming it): the set the "fit together" view, the
/// compensation analysis and the calorimetric comparison are shown on. Read by
/// isochore-data as a user's files are.
///
/// # Errors
/// isochore-data's message if a bundled file is refused (a build fault).
pub fn ligand_demo_project() -> Result<Project, String> {
    let file = "ligands_px_orrin3.csv";
    let text = include_str!("../../../assets/demo/ligands_px_orrin3.csv");
    let itc_file = "ligands_px_orrin3_itc.csv";
    let itc = include_str!("../../../assets/demo/ligands_px_orrin3_itc.csv");
    let imp = isochore_data::import_text(file, text, &ImportOptions::default())
        .map_err(|e| e.to_string())?;
    let rows = isochore_data::calorimetric::parse_calorimetric(itc_file, itc)
        .map_err(|e| e.to_string())?;
    let mut data = isochore_data::Project::new();
    data.add_import(&imp);
    for s in &mut data.series {
        s.settings.fit.model = isochore_fit::Model::CONSTANT_CP;
        s.calorimetric = isochore_analysis::calorimetric::rows_for_series(&rows, &s.name);
    }
    Ok(Project::from_data(data, None))
}

/// Reads a data file for preview (the decimal mark decided by the file).
///
/// # Errors
/// As [`preview`].
pub fn import_path(path: &Path) -> Result<ImportPreview, ImportFailure> {
    let source = path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    );
    preview(&source, Some(path), None, DecimalMark::Auto, false)
}

/// Reads pasted text for preview (the decimal mark decided by the text).
///
/// # Errors
/// As [`preview`].
pub fn import_text(text: &str, source: &str) -> Result<ImportPreview, ImportFailure> {
    preview(source, None, Some(text), DecimalMark::Auto, false)
}

/// Reads a project file.
///
/// # Errors
/// isochore-data's message naming the file and what is wrong.
pub fn read_project(path: &Path) -> Result<Project, String> {
    let p = isochore_data::Project::load(path).map_err(|e| e.to_string())?;
    Ok(Project::from_data(p, Some(path.to_path_buf())))
}

/// Writes a project file atomically (temporary file, sync, rename).
///
/// # Errors
/// isochore-data's message naming the file.
pub fn write_project(project: &Project, path: &Path) -> Result<(), String> {
    project
        .to_data()
        .save_atomic(path)
        .map_err(|e| e.to_string())
}

/// The report input for one series and its latest analysis: the series read as a data set
/// by isochore-analysis (cells as typed, rows numbered from 1), exactly as the command line
/// reads a project's series, and the window's fit.
///
/// # Errors
/// A sentence when the series has no fit to report.
pub fn report_input(s: &Entry, a: &crate::fitting::Analysis) -> Result<ReportInput, String> {
    let fit = a
        .fit
        .as_deref()
        .map_err(|e| format!("{}: no fit to report: {e}", s.name()))?;
    let with_cells = Overrides {
        with_cells: true,
        ..Overrides::default()
    };
    let set = PreparedSet::from_data_set(&s.data, &s.data.source.name, &with_cells)
        .map_err(|e| format!("{}: no fit to report: {e}", s.name()))?;
    let mut input = isochore_analysis::report_input(&set, fit.clone(), &[]);
    // The series' calorimetric values, compared as the "Calorimetric ΔH°" window shows them.
    if !s.data.calorimetric.is_empty() {
        input.calorimetric = isochore_analysis::calorimetric::compare_single(fit, &s.data)
            .map_err(|e| format!("{}: calorimetric values: {e}", s.name()))?;
    }
    Ok(input)
}
