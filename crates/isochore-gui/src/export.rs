//! Export of reports and figures, off the UI thread: which data sets and which formats, the
//! folder suggested next to the project, and a job that writes the files through
//! isochore-report on a worker thread while the window shows its progress. The overwrite
//! guard (a file isochore did not write is never replaced) is checked before anything is
//! written, as on the command line.

use crate::doc::Project;
use crate::fitting::Fitter;
use isochore_analysis::ReportStems;
use isochore_report::{ReportFormat, ReportInput};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::mpsc::{Receiver, TryRecvError};
use std::sync::Arc;

/// One choice of the export dialog: a format, or a family of files written together.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ExportFormat {
    /// The HTML report (one self-contained page).
    Html,
    /// The PDF report.
    Pdf,
    /// The Markdown report with its SVG figures beside it.
    Markdown,
    /// The data and results tables as CSV.
    Tables,
    /// Every figure as PNG.
    Figures,
}

impl ExportFormat {
    /// Every choice, in the dialog's order.
    pub const ALL: [ExportFormat; 5] = [
        ExportFormat::Html,
        ExportFormat::Pdf,
        ExportFormat::Markdown,
        ExportFormat::Tables,
        ExportFormat::Figures,
    ];

    /// The choice in words (the dialog's checkbox).
    pub fn label(self) -> &'static str {
        match self {
            ExportFormat::Html => "HTML report",
            ExportFormat::Pdf => "PDF report",
            ExportFormat::Markdown => "Markdown report (with SVG figures)",
            ExportFormat::Tables => "CSV tables (data, results)",
            ExportFormat::Figures => "figures (PNG, 300 dpi)",
        }
    }

    fn bit(self) -> u8 {
        1 << (self as u8)
    }

    /// Whether this choice writes `format`.
    pub fn covers(self, format: ReportFormat) -> bool {
        matches!(
            (self, format),
            (ExportFormat::Html, ReportFormat::Html)
                | (ExportFormat::Pdf, ReportFormat::Pdf)
                | (ExportFormat::Markdown, ReportFormat::Markdown)
                | (
                    ExportFormat::Tables,
                    ReportFormat::DataCsv | ReportFormat::ResultsCsv
                )
                | (ExportFormat::Figures, ReportFormat::FigurePng(_))
        )
    }
}

/// A set of [`ExportFormat`]s, kept as bits (so egui can remember the last choice
/// between runs).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct FormatSet(pub u8);

impl Default for FormatSet {
    /// HTML and PDF: the reports a lab record files.
    fn default() -> Self {
        FormatSet(ExportFormat::Html.bit() | ExportFormat::Pdf.bit())
    }
}

impl FormatSet {
    /// Whether `f` is chosen.
    pub fn contains(self, f: ExportFormat) -> bool {
        self.0 & f.bit() != 0
    }

    /// Chooses or drops `f`.
    pub fn set(&mut self, f: ExportFormat, on: bool) {
        if on {
            self.0 |= f.bit();
        } else {
            self.0 &= !f.bit();
        }
    }

    /// Nothing chosen.
    pub fn is_empty(self) -> bool {
        ExportFormat::ALL.iter().all(|f| !self.contains(*f))
    }

    /// Whether some chosen format writes `format`.
    pub fn writes(self, format: ReportFormat) -> bool {
        ExportFormat::ALL
            .iter()
            .any(|f| self.contains(*f) && f.covers(format))
    }
}

/// The folder an export suggests: beside the project file (`<name> reports`), else beside
/// the first data file read from disk, else in the home folder.
pub fn default_folder(project: &Project) -> PathBuf {
    if let Some(p) = &project.path {
        let name = p.file_name().and_then(|n| n.to_str()).unwrap_or("project");
        let name = name
            .strip_suffix(crate::io::PROJECT_SUFFIX)
            .unwrap_or(name)
            .trim_end_matches('.');
        let dir = p.parent().unwrap_or_else(|| Path::new("."));
        return dir.join(format!("{name} reports"));
    }
    let data_dir = project
        .series
        .iter()
        .filter_map(|s| s.data.source.path.as_ref().map(PathBuf::from))
        .find_map(|p| p.parent().map(Path::to_path_buf));
    let base = data_dir
        .or_else(|| std::env::var_os("HOME").map(PathBuf::from))
        .unwrap_or_else(|| PathBuf::from("."));
    base.join("isochore reports")
}

/// An export running on its worker thread.
#[derive(Debug)]
pub struct ExportJob {
    done: Arc<AtomicUsize>,
    total: usize,
    rx: Receiver<Result<String, String>>,
}

/// What the chemist chose in the export dialog beside the data sets and the folder.
#[derive(Debug, Clone, Copy)]
pub struct Choices<'a> {
    /// The formats to write.
    pub formats: FormatSet,
    /// The analyst's name for the report (blank: none).
    pub analyst: &'a str,
    /// A note for the report (blank: none).
    pub note: &'a str,
    /// The "Calorimetric ΔH°" window's "Use the calorimetric values in the fit": the
    /// reports of series with calorimetric values carry that fit too.
    pub calorimetric_in_fit: bool,
}

impl Choices<'_> {
    /// The `formats`, with no analyst, note or calorimetric fit.
    pub fn formats(formats: FormatSet) -> Choices<'static> {
        Choices {
            formats,
            analyst: "",
            note: "",
            calorimetric_in_fit: false,
        }
    }
}

impl ExportJob {
    /// Checks the request and starts writing on a worker thread: the report input of each
    /// chosen series with a fit (read as the command line reads it) with the analyst's
    /// name and note when given, named as the command line names reports, only the chosen
    /// formats; with [`Choices::calorimetric_in_fit`], each series with calorimetric values also
    /// fitted with them (the "Calorimetric ΔH°" window's choice), as the command line's
    /// `--calorimetric-in-fit` adds it to the report.
    ///
    /// # Errors
    /// A sentence when nothing is chosen, a chosen series has no fit, or the overwrite
    /// guard refuses a file (nothing is written then).
    pub fn start(
        project: &Project,
        fitter: &Fitter,
        series: &[u64],
        folder: &Path,
        choices: Choices<'_>,
    ) -> Result<ExportJob, String> {
        let Choices {
            formats,
            analyst,
            note,
            calorimetric_in_fit,
        } = choices;
        if formats.is_empty() {
            return Err("Choose at least one format.".into());
        }
        if series.is_empty() {
            return Err("Choose at least one data set.".into());
        }
        // The project file and every series' source file are inputs: a report never
        // replaces them, nor any file isochore did not write (the command line's guard).
        let inputs: Vec<PathBuf> = project
            .path
            .iter()
            .cloned()
            .chain(
                project
                    .series
                    .iter()
                    .filter_map(|s| s.data.source.path.as_ref().map(PathBuf::from)),
            )
            .collect();
        let guard = isochore_report::OverwriteGuard::new(&inputs);
        let mut jobs: Vec<(ReportInput, String, Option<Additions>)> = Vec::new();
        let mut stems = ReportStems::new();
        for s in project.series.iter().filter(|s| series.contains(&s.id)) {
            let Some(a) = fitter.get(s.id) else {
                return Err(format!(
                    "{}: not fitted yet; try again in a moment.",
                    s.name()
                ));
            };
            if fitter.comparison_pending(s.id) {
                return Err(format!(
                    "{}: the model comparison is still being worked out; try again in a moment.",
                    s.name()
                ));
            }
            let file = &s.data.source.name;
            let several = project
                .series
                .iter()
                .filter(|t| &t.data.source.name == file)
                .count()
                > 1;
            let mut input = crate::io::report_input(s, &a)?;
            let given = |t: &str| Some(t.trim().to_string()).filter(|t| !t.is_empty());
            input.record.analyst = given(analyst);
            input.record.note = given(note);
            // A resampling setting: the report compares the delta method, Monte Carlo and
            // the bootstrap, as `vhfit fit --intervals … --report` does; run on the worker.
            let resample = s.data.settings.intervals.choice
                != isochore_analysis::intervals::IntervalChoice::Delta;
            // "Use the calorimetric values in the fit" on: the report carries that fit
            // beside ln K alone, as `vhfit fit --calorimetric-in-fit --report` does.
            let constrained = (calorimetric_in_fit && !s.data.calorimetric.is_empty())
                .then(|| s.name().to_string());
            let additions = (resample || constrained.is_some()).then(|| Additions {
                data: s.data.clone(),
                resample,
                constrained,
            });
            jobs.push((input, stems.next(file, s.name(), several), additions));
        }
        let plan = |stem: &str| -> Vec<(ReportFormat, String)> {
            isochore_report::report_set_plan(stem)
                .into_iter()
                .filter(|(f, _)| formats.writes(*f))
                .collect()
        };
        let refusals: Vec<String> = jobs
            .iter()
            .flat_map(|(_, stem, _)| plan(stem))
            .flat_map(|(f, name)| isochore_report::report_paths(f, &folder.join(name)))
            .filter_map(|p| guard.refusal(&p))
            .collect();
        if !refusals.is_empty() {
            return Err(format!("No report was written:\n{}", refusals.join("\n")));
        }
        let work: Vec<Work> = jobs
            .into_iter()
            .map(|(input, stem, resample)| {
                let p = plan(&stem);
                (input, stem, p, resample)
            })
            .collect();
        let total = work.iter().map(|w| w.2.len()).sum();
        let done = Arc::new(AtomicUsize::new(0));
        let (tx, rx) = std::sync::mpsc::channel();
        let folder = folder.to_path_buf();
        let counter = Arc::clone(&done);
        std::thread::Builder::new()
            .name("isochore-export".into())
            .spawn(move || {
                let _ = tx.send(write_all(&work, &folder, &guard, &counter));
            })
            .map_err(|e| format!("could not start the export: {e}"))?;
        Ok(ExportJob { done, total, rx })
    }

    /// Files (or Markdown sets) written so far, and how many in all.
    pub fn progress(&self) -> (usize, usize) {
        (self.done.load(Ordering::Relaxed), self.total)
    }

    /// The outcome once the worker is done: what was written, in words, or the first
    /// failure (naming the file).
    pub fn poll(&self) -> Option<Result<String, String>> {
        match self.rx.try_recv() {
            Ok(r) => Some(r),
            Err(TryRecvError::Empty) => None,
            Err(TryRecvError::Disconnected) => Some(Err("the export stopped unexpectedly".into())),
        }
    }

    /// Waits for the worker and gives its outcome (as [`ExportJob::poll`] does once done):
    /// for callers with no frames to draw meanwhile.
    pub fn wait(self) -> Result<String, String> {
        self.rx
            .recv()
            .unwrap_or_else(|_| Err("the export stopped unexpectedly".into()))
    }
}

/// A report to write: its input, file stem, files (formats and names in the folder), and
/// what the worker adds to the input first.
type Work = (
    ReportInput,
    String,
    Vec<(ReportFormat, String)>,
    Option<Additions>,
);

/// What the export's worker adds to a report's input before writing it, from the series'
/// data set: the runs of its interval setting (`resample`, when it is Monte Carlo or the
/// bootstrap) for the comparison of interval methods, and its fit with its calorimetric
/// values as observations of ΔH°(T) (`constrained`, the series' name, when the
/// "Calorimetric ΔH°" window's "Use the calorimetric values in the fit" is on).
struct Additions {
    data: isochore_data::DataSet,
    resample: bool,
    constrained: Option<String>,
}

impl Additions {
    /// `input` with the additions.
    fn apply(&self, input: &ReportInput) -> Result<ReportInput, String> {
        let mut i = input.clone();
        if self.resample {
            i.intervals = resampled_runs(&self.data, &input.fit)?;
        }
        if let Some(name) = &self.constrained {
            // As the window's panel fits it (isochore-analysis' rule, the command line's).
            let fitted =
                isochore_analysis::calorimetric::fit_data_set_with_calorimetric(&self.data, name)
                    .map_err(|e| e.to_string());
            i.calorimetric_fit = Some(fitted);
        }
        Ok(i)
    }
}

/// The runs the report compares with the delta method (isochore-analysis' `report_runs`,
/// the command line's), for the data set's own interval setting.
fn resampled_runs(
    data: &isochore_data::DataSet,
    fit: &isochore_fit::VantHoffFit,
) -> Result<Vec<isochore_fit::intervals::IntervalRun>, String> {
    let set = isochore_analysis::PreparedSet::from_data_set(
        data,
        &data.source.name,
        &isochore_analysis::Overrides::default(),
    )
    .map_err(|e| e.to_string())?;
    isochore_analysis::intervals::report_runs(&set, fit, &data.settings.intervals)
        .map_err(|e| format!("{}: {e}", data.name))
}

fn write_all(
    work: &[Work],
    folder: &Path,
    guard: &isochore_report::OverwriteGuard,
    done: &AtomicUsize,
) -> Result<String, String> {
    std::fs::create_dir_all(folder)
        .map_err(|e| format!("{}: could not create the folder: {e}", folder.display()))?;
    let mut written = 0usize;
    let mut stems = Vec::new();
    for (input, stem, plan, additions) in work {
        let added;
        let input = match additions {
            Some(a) => {
                added = a.apply(input)?;
                &added
            }
            None => input,
        };
        // The report's files side by side, each figure rasterised once for the PNG files
        // and the PDF (isochore-report's `write_reports`); each format counted as it is
        // written, and recorded so a later export may replace it (one at a time: the
        // folder's manifest is read and written again).
        let recording = std::sync::Mutex::new(Ok(()));
        let result = isochore_report::write_reports(input, folder, plan.clone(), &|paths| {
            if let Ok(mut r) = recording.lock() {
                if r.is_ok() {
                    *r = guard.record(paths);
                }
            }
            done.fetch_add(1, Ordering::Relaxed);
        });
        let paths = result.map_err(|e| e.to_string())?;
        recording.into_inner().unwrap_or_else(|e| e.into_inner())?;
        written += paths.len();
        stems.push(stem.clone());
    }
    Ok(format!(
        "{} written to {} ({}).",
        isochore_fit::error::counted(written, "file", "files"),
        folder.display(),
        stems.join(", ")
    ))
}
