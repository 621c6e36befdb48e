//! Files, through the crates that own them: import of lab files and project files from
//! isochore-data, reports and figures from isochore-report. Every failure comes back as a
//! message for the chemist naming the file, line and column; nothing here touches the
//! open project until the caller applies the result as a command.

use crate::doc::{Project, Series};
use isochore_data::{ColumnMapping, Import, ImportOptions};
use isochore_report::{ReportInput, ReportRow};
use std::path::{Path, PathBuf};

/// File-name ending of project files.
pub const PROJECT_SUFFIX: &str = ".isochore.json";

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
        self.import.series.iter().map(|s| s.rows.len()).sum()
    }

    /// Reads the source again with the edited mapping.
    ///
    /// # Errors
    /// isochore-data's message (file, line, column); the preview is then unchanged.
    pub fn reimport(&mut self) -> Result<(), String> {
        let opts = ImportOptions {
            mapping: Some(self.mapping.clone()),
            ..ImportOptions::default()
        };
        let import = read(
            &self.source,
            self.path.as_deref(),
            self.text.as_deref(),
            &opts,
        )?;
        self.mapping = import.mapping.clone();
        self.import = import;
        Ok(())
    }

    /// The series this import adds to a project. A data set with no uncertainty column
    /// starts with equal weights (inverse-variance weights need σ), as the command line
    /// does; the chemist can change it in the settings.
    pub fn series(&self) -> Vec<Series> {
        isochore_data::Project::from_import(&self.import)
            .series
            .into_iter()
            .map(|mut d| {
                if d.mapping.uncertainty.is_none() {
                    d.settings.fit.weighting = isochore_fit::Weighting::Unweighted;
                }
                Series::new(d)
            })
            .collect()
    }
}

fn read(
    source: &str,
    path: Option<&Path>,
    text: Option<&str>,
    opts: &ImportOptions,
) -> Result<Import, String> {
    let r = match (path, text) {
        (Some(p), _) => isochore_data::import_path(p, opts),
        (None, Some(t)) => isochore_data::import_text(source, t, opts),
        (None, None) => return Err(format!("{source}: nothing to read")),
    };
    r.map_err(|e| e.to_string())
}

/// Whether a path names a project file (or its autosave).
pub fn is_project_file(path: &Path) -> bool {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().to_lowercase())
        .unwrap_or_default();
    name.ends_with(".json") || name.ends_with(".autosave")
}

/// A project path with the usual ending added when it has none.
pub fn with_project_suffix(path: PathBuf) -> PathBuf {
    if path.extension().is_some() {
        path
    } else {
        let mut s = path.into_os_string();
        s.push(PROJECT_SUFFIX);
        PathBuf::from(s)
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
        s.shown = false;
    }
    Ok(p)
}

/// Reads a data file for preview.
///
/// # Errors
/// isochore-data's message naming the file, line and column.
pub fn import_path(path: &Path) -> Result<ImportPreview, String> {
    let source = path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    );
    let import = read(&source, Some(path), None, &ImportOptions::default())?;
    Ok(ImportPreview {
        source,
        path: Some(path.to_path_buf()),
        text: None,
        mapping: import.mapping.clone(),
        import,
    })
}

/// Reads pasted text for preview.
///
/// # Errors
/// isochore-data's message naming the line and column.
pub fn import_text(text: &str, source: &str) -> Result<ImportPreview, String> {
    let import = read(source, None, Some(text), &ImportOptions::default())?;
    Ok(ImportPreview {
        source: source.to_string(),
        path: None,
        text: Some(text.to_string()),
        mapping: import.mapping.clone(),
        import,
    })
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

/// The report input for one series and its latest analysis (rows in the order of the fit's
/// points, cells as typed).
///
/// # Errors
/// A sentence when the series has no fit to report.
pub fn report_input(s: &Series, a: &crate::fitting::Analysis) -> Result<ReportInput, String> {
    let fit = a
        .fit
        .as_ref()
        .map_err(|e| format!("{}: no fit to report: {e}", s.name()))?;
    let rows = a
        .measurements
        .iter()
        .enumerate()
        .map(|(k, m)| {
            let row = a
                .point_rows
                .get(k)
                .and_then(|r| r.first().copied())
                .unwrap_or(k);
            ReportRow {
                row: row + 1,
                line: s.line(row).unwrap_or(0),
                cells: s
                    .data
                    .rows
                    .get(row)
                    .map(|r| r.cells.clone())
                    .unwrap_or_default(),
                t_k: m.t_k,
                ln_k: m.ln_k,
                sigma_ln_k: m.sigma_ln_k,
                included: m.included,
                exclusion_reason: s
                    .exclusion(row)
                    .map(|e| e.reason.clone())
                    .filter(|r| !r.is_empty()),
            }
        })
        .collect();
    Ok(ReportInput {
        title: format!("Van 't Hoff analysis — {}", s.name()),
        series_name: s.name().to_string(),
        source_name: s.data.source.name.clone(),
        source_sha256: s.data.source.sha256.clone(),
        headers: s.data.headers.clone(),
        rows,
        conversions: s.data.mapping.describe(&s.data.headers),
        fit: fit.clone(),
        energy_unit: s.data.settings.energy_unit,
        temperature_unit: s.data.settings.temperature_unit,
        program_version: format!("isochore {}", env!("CARGO_PKG_VERSION")),
        settings: vec![(
            "replicates".to_string(),
            format!("{:?}", s.data.settings.replicates).to_lowercase(),
        )],
    })
}

/// Writes the report (HTML, PDF, Markdown, CSV) and figures (PNG) of every series with a
/// fit into `folder`, one file stem per series, atomically through isochore-report.
///
/// # Errors
/// A message naming the file that could not be written, or the series with no fit.
pub fn export(
    project: &Project,
    fitter: &crate::fitting::Fitter,
    folder: &Path,
) -> Result<String, String> {
    let mut written = 0usize;
    let mut stems = Vec::new();
    for s in &project.series {
        let Some(a) = fitter.get(s.id) else {
            continue;
        };
        let input = report_input(s, &a)?;
        let stem = file_stem(s.name());
        let paths =
            isochore_report::write_report_set(&input, folder, &stem).map_err(|e| e.to_string())?;
        written += paths.len();
        stems.push(stem);
    }
    if written == 0 {
        return Err("There is no fitted series to export.".into());
    }
    Ok(format!(
        "{written} files written to {} ({}).",
        folder.display(),
        stems.join(", ")
    ))
}

/// A file-name stem from a series name: letters, digits and '-' only.
pub fn file_stem(name: &str) -> String {
    let s: String = name
        .chars()
        .map(|c| {
            if c.is_alphanumeric() {
                c.to_ascii_lowercase()
            } else {
                '-'
            }
        })
        .collect();
    let s = s.trim_matches('-').to_string();
    if s.is_empty() {
        "series".into()
    } else {
        s
    }
}
