//! File names: how a project file is recognised, the usual ending of one, and the names of
//! report files. One rule each for the command line and the window.

use std::collections::HashSet;
use std::path::{Path, PathBuf};

/// File-name ending of project files.
pub const PROJECT_SUFFIX: &str = ".isochore.json";

/// File-name ending the window gives the autosaved copy of a project.
pub const AUTOSAVE_SUFFIX: &str = ".autosave";

/// Whether a path names a project file rather than a data file: a name ending in `.json`
/// (`x.isochore.json` as isochore writes them, or any JSON file, which only a project can
/// be) or in `.autosave` (the window's autosaved copy of a project), in any case. Everything
/// else is read as delimited text (CSV, TSV, …).
pub fn is_project_file(path: &Path) -> bool {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().to_lowercase())
        .unwrap_or_default();
    name.ends_with(".json") || name.ends_with(AUTOSAVE_SUFFIX)
}

/// A project path with [`PROJECT_SUFFIX`] added when it has no extension.
pub fn with_project_suffix(path: PathBuf) -> PathBuf {
    if path.extension().is_some() {
        path
    } else {
        let mut s = path.into_os_string();
        s.push(PROJECT_SUFFIX);
        PathBuf::from(s)
    }
}

/// The name of a file without its folder and its ending (`.isochore.json` as a whole, else
/// the last extension): `data/acid.csv` → `acid`, `p.isochore.json` → `p`.
pub fn base_stem(path: &str) -> String {
    let name = Path::new(path)
        .file_name()
        .and_then(|n| n.to_str())
        .unwrap_or("report");
    name.strip_suffix(PROJECT_SUFFIX)
        .or_else(|| name.rsplit_once('.').map(|(a, _)| a))
        .unwrap_or(name)
        .to_string()
}

/// A file-name stem made only of safe characters: letters, digits, `-`, `_` and `.` are
/// kept, anything else becomes `_`; leading and trailing `.` and `_` are dropped, at most 80
/// characters are kept, and an empty result is `series`.
pub fn safe_stem(s: &str) -> String {
    let t: String = s
        .chars()
        .map(|c| {
            if c.is_alphanumeric() || c == '-' || c == '_' || c == '.' {
                c
            } else {
                '_'
            }
        })
        .collect();
    let t = t.trim_matches(|c| c == '.' || c == '_');
    if t.is_empty() {
        "series".to_string()
    } else {
        t.chars().take(80).collect()
    }
}

/// Stems of report sets written into one folder in one go, each used once: a stem already
/// taken gets `-2`, `-3`, … so two data sets never write over each other's reports.
#[derive(Debug, Default, Clone)]
pub struct ReportStems {
    used: HashSet<String>,
}

impl ReportStems {
    /// No stem taken yet.
    pub fn new() -> Self {
        ReportStems::default()
    }

    /// The stem of the report set of data set `series`, read from `source` (the path as
    /// given, or the source file's name). The file names it when the file holds one data set
    /// (`acid.csv` → `acid`); with several, the data set's name is added
    /// (`buffers.csv`, `MES` → `buffers-MES`).
    pub fn next(&mut self, source: &str, series: &str, several_in_file: bool) -> String {
        let base = safe_stem(&base_stem(source));
        let mut stem = if several_in_file {
            format!("{base}-{}", safe_stem(series))
        } else {
            base
        };
        if self.used.contains(&stem) {
            let mut k = 2;
            while self.used.contains(&format!("{stem}-{k}")) {
                k += 1;
            }
            stem = format!("{stem}-{k}");
        }
        self.used.insert(stem.clone());
        stem
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn project_files_are_recognised_by_name() {
        for p in ["a.isochore.json", "A.JSON", "x/a.isochore.json.autosave"] {
            assert!(is_project_file(Path::new(p)), "{p}");
        }
        for p in ["a.csv", "a.tsv", "json", "a.json.csv"] {
            assert!(!is_project_file(Path::new(p)), "{p}");
        }
        assert_eq!(
            with_project_suffix(PathBuf::from("p")),
            PathBuf::from("p.isochore.json")
        );
        assert_eq!(
            with_project_suffix(PathBuf::from("p.json")),
            PathBuf::from("p.json")
        );
    }

    #[test]
    fn stems_are_safe_and_never_repeat() {
        assert_eq!(base_stem("d/acid.csv"), "acid");
        assert_eq!(base_stem("p.isochore.json"), "p");
        assert_eq!(safe_stem("QX-7 binding/Halo 2"), "QX-7_binding_Halo_2");
        assert_eq!(safe_stem("../"), "series");
        let mut s = ReportStems::new();
        assert_eq!(s.next("d1/x.csv", "x", false), "x");
        assert_eq!(s.next("d2/x.csv", "x", false), "x-2");
        assert_eq!(s.next("b.csv", "MES buffer", true), "b-MES_buffer");
        assert_eq!(s.next("b.csv", "MES buffer", true), "b-MES_buffer-2");
    }
}
