//! Files, through the crates that own them: import of lab files and project files from
//! isochore-data, reports and figures from isochore-report. Every failure comes back as a
//! message for the chemist naming the file, line and column; nothing here touches the
//! open project until the caller applies the result as a command.

use crate::doc::{Project, Series};
use isochore_data::{ColumnMapping, Import, ImportOptions};
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

    /// The series this import adds to a project.
    pub fn series(&self) -> Vec<Series> {
        isochore_data::Project::from_import(&self.import)
            .series
            .into_iter()
            .map(Series::new)
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

/// Writes the report and figures of every series into `folder`.
///
/// # Errors
/// A message naming the file that could not be written.
pub fn export(
    _project: &Project,
    _fitter: &crate::fitting::Fitter,
    folder: &Path,
) -> Result<String, String> {
    Err(format!(
        "{}: reports arrive with isochore-report",
        folder.display()
    ))
}
