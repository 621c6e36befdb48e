//! `isochore fit`: every file in turn (a failing file leaves the others unaffected and is
//! named at the end), each data set fitted with isochore-fit, then printed as a readable
//! table or streamed as the JSON contract, and reports written atomically.

use crate::cli::FitArgs;
use crate::load::{load, Job};
use crate::{json, table, Failure};
use isochore_fit::VantHoffFit;
use isochore_report::{ReportFormat, ReportInput};
use std::collections::HashSet;
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

/// Fits one job with the library.
pub fn fit_job(job: &Job) -> Result<VantHoffFit, String> {
    isochore_fit::fit(&job.measurements(), &job.options)
        .map_err(|e| format!("{}: series '{}': {e}", job.source, job.series))
}

/// The report input for a fitted job.
pub fn report_input(job: &Job, fit: VantHoffFit) -> ReportInput {
    let mut settings = job.settings.clone();
    let args: Vec<String> = std::env::args().skip(1).collect();
    settings.push((
        "command line".to_string(),
        format!("isochore {}", args.join(" ")),
    ));
    for w in &job.warnings {
        settings.push(("reading".to_string(), w.clone()));
    }
    ReportInput {
        title: format!("Van 't Hoff analysis: {}", job.series),
        series_name: job.series.clone(),
        source_name: job.file_name.clone(),
        source_sha256: job.sha256.clone(),
        headers: job.headers.clone(),
        rows: job.rows.clone(),
        conversions: job.conversions.clone(),
        fit,
        energy_unit: job.energy,
        temperature_unit: job.temperature,
        program_version: env!("CARGO_PKG_VERSION").to_string(),
        settings,
    }
}

/// A file-name stem made only of safe characters.
fn safe_stem(s: &str) -> String {
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
    let t = t.trim_matches(|c| c == '.' || c == '_').to_string();
    if t.is_empty() {
        "series".to_string()
    } else {
        t.chars().take(80).collect()
    }
}

fn file_stem(job: &Job) -> String {
    let p = Path::new(&job.source);
    let name = p
        .file_name()
        .and_then(|n| n.to_str())
        .unwrap_or("report")
        .to_string();
    let base = name
        .strip_suffix(".isochore.json")
        .or_else(|| name.rsplit_once('.').map(|(a, _)| a))
        .unwrap_or(&name)
        .to_string();
    base
}

struct ReportPlan {
    path: PathBuf,
    single_file: Option<ReportFormat>,
    used_stems: HashSet<String>,
}

impl ReportPlan {
    fn write(
        &mut self,
        job: &Job,
        multi_series_file: bool,
        fit: &VantHoffFit,
    ) -> Result<Vec<PathBuf>, String> {
        let input = report_input(job, fit.clone());
        let fail = |e: isochore_report::ReportError| {
            format!("{}: series '{}': {e}", job.source, job.series)
        };
        if let Some(format) = self.single_file {
            return isochore_report::write_report(&input, format, &self.path).map_err(fail);
        }
        let mut stem = if multi_series_file {
            format!("{}-{}", safe_stem(&file_stem(job)), safe_stem(&job.series))
        } else {
            safe_stem(&file_stem(job))
        };
        if self.used_stems.contains(&stem) {
            let mut k = 2;
            while self.used_stems.contains(&format!("{stem}-{k}")) {
                k += 1;
            }
            stem = format!("{stem}-{k}");
        }
        self.used_stems.insert(stem.clone());
        isochore_report::write_report_set(&input, &self.path, &stem).map_err(fail)
    }
}

/// One `{"source", "error"}` element of the JSON array, after a comma when it is not the
/// first.
fn error_entry(
    out: &mut impl Write,
    entries: &mut usize,
    source: &str,
    error: &str,
) -> std::io::Result<()> {
    if *entries > 0 {
        out.write_all(b",\n")?;
    }
    json::write_error(out, source, error)?;
    *entries += 1;
    Ok(())
}

/// Runs `isochore fit`.
pub fn run(a: &FitArgs) -> Result<(), Failure> {
    let mut plan = match &a.report {
        None => None,
        Some(p) => {
            let format = ReportFormat::from_path(p);
            if format.is_some() && a.files.len() > 1 {
                return Err(Failure::usage(format!(
                    "--report {} names one file, but {} input files were given; name a folder to get one report per series",
                    p.display(),
                    a.files.len()
                )));
            }
            if format.is_none() && p.is_file() {
                return Err(Failure::usage(format!(
                    "--report {}: an existing file without a report extension; give a folder or a name ending in .html, .pdf, .md, .csv, .svg or .png",
                    p.display()
                )));
            }
            Some(ReportPlan {
                path: p.clone(),
                single_file: format,
                used_stems: HashSet::new(),
            })
        }
    };
    let stdout = std::io::stdout();
    let mut out = BufWriter::with_capacity(1 << 16, stdout.lock());
    let mut failures: Vec<String> = Vec::new();
    let mut summary_rows: Vec<table::SummaryRow> = Vec::new();
    let array = a.files.len() > 1;
    let mut array_open = false;
    let mut entries = 0usize;
    let mut successes = 0usize;
    let io_fail = |e: std::io::Error| Failure::input(format!("writing the output failed: {e}"));
    let detailed_text = !a.json && !a.summary && a.files.len() == 1;

    for path in &a.files {
        let source = path.display().to_string();
        let jobs = match load(path, &a.fit, plan.is_some()) {
            Ok(j) => j,
            Err(e) => {
                if a.json && array {
                    if !array_open {
                        out.write_all(b"[").map_err(io_fail)?;
                        array_open = true;
                    }
                    error_entry(&mut out, &mut entries, &source, &e).map_err(io_fail)?;
                }
                failures.push(e);
                continue;
            }
        };
        let multi = jobs.len() > 1;
        let this_array = array || multi;
        if a.json && this_array && !array_open {
            out.write_all(b"[").map_err(io_fail)?;
            array_open = true;
        }
        if let (Some(p), true) = (&plan, multi) {
            if p.single_file.is_some() {
                failures.push(format!(
                    "{source}: holds {} series; --report needs a folder to write one report per series",
                    jobs.len()
                ));
            }
        }
        for job in &jobs {
            let fit = match fit_job(job) {
                Ok(f) => f,
                Err(e) => {
                    if a.json && this_array {
                        error_entry(&mut out, &mut entries, &source, &e).map_err(io_fail)?;
                    }
                    failures.push(e);
                    continue;
                }
            };
            successes += 1;
            if a.json {
                if this_array && entries > 0 {
                    out.write_all(b",\n").map_err(io_fail)?;
                }
                let src = this_array.then_some(source.as_str());
                json::write_fit(&mut out, job, &fit, src, !a.summary).map_err(io_fail)?;
                entries += 1;
            } else if detailed_text && !multi {
                table::detailed(&mut out, job, &fit).map_err(io_fail)?;
            } else {
                summary_rows.push(table::SummaryRow::new(job, &fit));
            }
            if let Some(p) = plan.as_mut() {
                if p.single_file.is_some() && multi {
                    continue;
                }
                match p.write(job, multi, &fit) {
                    Ok(paths) => {
                        for w in paths {
                            eprintln!("isochore: wrote {}", w.display());
                        }
                    }
                    Err(e) => failures.push(e),
                }
            }
        }
    }
    if array_open {
        out.write_all(b"]").map_err(io_fail)?;
    }
    if a.json && (entries > 0 || array_open) {
        out.write_all(b"\n").map_err(io_fail)?;
    }
    if !summary_rows.is_empty() {
        table::summary(&mut out, &summary_rows).map_err(io_fail)?;
    }
    out.flush().map_err(io_fail)?;
    drop(out);
    if failures.is_empty() {
        return Ok(());
    }
    for f in &failures {
        eprintln!("isochore: {f}");
    }
    let ok = successes;
    Err(Failure::input(format!(
        "{} of the input(s) could not be used{}",
        failures.len(),
        if ok > 0 {
            format!("; the other {ok} result(s) are above")
        } else {
            String::new()
        }
    )))
}
