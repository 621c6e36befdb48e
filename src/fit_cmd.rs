//! `vhfit fit`: every file in turn (a failing file leaves the others unaffected and is
//! named at the end), each data set fitted with isochore-fit, then printed as a readable
//! table or streamed as the JSON contract, and reports written atomically.

use crate::cli::FitArgs;
use crate::load::{hint, load, Job};
use crate::output::{self, Style};
use crate::{table, Failure};
use isochore_analysis::json;
use isochore_analysis::ReportStems;
use isochore_fit::VantHoffFit;
use isochore_report::{OverwriteGuard, ReportFormat, ReportInput};
use std::io::Write;
use std::path::{Path, PathBuf};

/// Fits one data set with the library; a refusal names the flag that settles it.
pub fn fit_job(job: &Job) -> Result<VantHoffFit, String> {
    job.fit().map_err(|e| format!("{e}{}", hint(e.remedy())))
}

/// [`fit_job`] for a line of the summary table, which shows the cautions but none of the
/// model comparison's numbers: the comparison is made only as far as its verdict
/// ([`Job::fit_for_summary`]).
fn fit_job_for_summary(job: &Job) -> Result<VantHoffFit, String> {
    job.fit_for_summary()
        .map_err(|e| format!("{e}{}", hint(e.remedy())))
}

/// The report input for a fitted data set: isochore-analysis' with this command line
/// recorded among the settings.
pub fn report_input(job: &Job, fit: VantHoffFit) -> ReportInput {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let command = (
        "command line".to_string(),
        format!("vhfit {}", args.join(" ")),
    );
    isochore_analysis::report_input(job, fit, &[command])
}

/// Where the reports of this run go.
struct ReportPlan {
    path: PathBuf,
    single_file: Option<ReportFormat>,
    stems: ReportStems,
    /// `--analyst`, recorded in each report.
    analyst: Option<String>,
    /// `--note`, recorded in each report.
    note: Option<String>,
}

impl ReportPlan {
    /// The files a job's report will be written to (a fresh stem for each job in folder
    /// mode). Called once per job, in output order.
    fn targets(&mut self, job: &Job, multi_series_file: bool) -> Vec<PathBuf> {
        if let Some(format) = self.single_file {
            return isochore_report::report_paths(format, &self.path);
        }
        let stem = self.stems.next(&job.source, &job.series, multi_series_file);
        isochore_report::report_set_paths(&self.path, &stem)
    }
}

/// A series fitted with its calorimetric values as observations of ΔH°(T), beside its fit
/// of ln K alone (isochore-analysis' `fit_single_with_calorimetric`), or the refusal.
type Constrained = Result<
    (
        isochore_fit::global::GlobalFit,
        isochore_fit::global::CalorimetricJointFit,
    ),
    isochore_fit::global::GlobalError,
>;

/// Writes the report of one job to `targets` (from [`ReportPlan::targets`]).
fn write_report(
    plan: &ReportPlan,
    job: &Job,
    fit: &VantHoffFit,
    targets: &[PathBuf],
    intervals: &isochore_analysis::intervals::IntervalRequest,
    calorimetric: &[isochore_fit::calorimetric::CalorimetricComparison],
    constrained: Option<&Constrained>,
) -> Result<Vec<PathBuf>, String> {
    let mut input = report_input(job, fit.clone());
    input.calorimetric = calorimetric.to_vec();
    // --calorimetric-in-fit: the fit with the values in it, beside ln K alone, in the
    // report's "Calorimetric ΔH°" section (or its refusal in words).
    input.calorimetric_fit = constrained.map(|c| c.clone().map_err(|e| e.to_string()));
    // With --intervals monte-carlo or bootstrap the report compares both with the delta
    // method (issue 13).
    input.intervals = isochore_analysis::intervals::report_runs(job, fit, intervals)
        .map_err(|e| format!("{}: series '{}': {e}", job.source, job.series))?;
    let given = |s: &Option<String>| {
        s.as_ref()
            .map(|s| s.trim().to_string())
            .filter(|s| !s.is_empty())
    };
    input.record.analyst = given(&plan.analyst);
    input.record.note = given(&plan.note);
    let fail =
        |e: isochore_report::ReportError| format!("{}: series '{}': {e}", job.source, job.series);
    if let Some(format) = plan.single_file {
        return isochore_report::write_report(&input, format, &plan.path).map_err(fail);
    }
    // The set's stem is the name of its Markdown file.
    let stem = targets
        .iter()
        .find(|p| p.extension().is_some_and(|e| e == "md"))
        .and_then(|p| p.file_stem())
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "report".to_string());
    isochore_report::write_report_set(&input, &plan.path, &stem).map_err(fail)
}

/// One input file after reading and fitting: its jobs with their fits, or why it could not
/// be read.
type Loaded = Result<Vec<(Job, Result<VantHoffFit, String>)>, String>;

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

/// Runs `vhfit fit`.
///
/// Every input is read and fitted before anything is written, and the report files are
/// checked (no input, nothing isochore did not write) before the first one is written.
pub fn run(a: &FitArgs) -> Result<(), Failure> {
    let intervals = crate::intervals_cmd::request(a).map_err(Failure::usage)?;
    // A joint fit runs the request on the whole block design (joint_cmd).
    if let Some(keys) = &a.share {
        return crate::joint_cmd::run(a, keys, &intervals);
    }
    let calorimetric = crate::calorimetric_cmd::values(a).map_err(Failure::usage)?;
    if a.calorimetric_in_fit && calorimetric.is_none() {
        return Err(Failure::usage(
            "--calorimetric-in-fit needs calorimetric values: --calorimetric or --calorimetric-file",
        ));
    }
    // Data sets whose resampled intervals were refused (a usage error: another method or
    // setting settles it).
    let mut interval_refusals: Vec<String> = Vec::new();
    // Calorimetric blocks of fits shown as summary rows, printed after the summary table.
    let mut calorimetric_after: Vec<u8> = Vec::new();
    crate::load::reference_temperature(&a.fit).map_err(Failure::usage)?;
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
                stems: ReportStems::new(),
                analyst: a.analyst.clone(),
                note: a.note.clone(),
            })
        }
    };
    // Read and fit everything first. When every fit will be a line of the summary table
    // (no JSON, no report, the table asked for or several files), the model comparison is
    // made only as far as its verdict, which is all the table shows of it (its cautions).
    let table_only = !a.json && plan.is_none() && (a.summary || a.files.len() > 1);
    let loaded: Vec<(String, Loaded)> = a
        .files
        .iter()
        .map(|path| {
            let source = path.display().to_string();
            let jobs = load(path, &a.fit, plan.is_some()).map(|jobs| {
                jobs.into_iter()
                    .map(|job| {
                        let fit = if table_only {
                            fit_job_for_summary(&job)
                        } else {
                            fit_job(&job)
                        };
                        (job, fit)
                    })
                    .collect()
            });
            (source, jobs)
        })
        .collect();
    // Plan every report file and check it before writing any.
    let mut targets: Vec<Vec<Vec<PathBuf>>> = Vec::new();
    let guard = OverwriteGuard::new(&a.files);
    if let Some(p) = plan.as_mut() {
        let mut refusals = Vec::new();
        for (_, l) in &loaded {
            let mut per_file = Vec::new();
            if let Ok(jobs) = l {
                let multi = jobs.len() > 1;
                for (job, fit) in jobs {
                    let t = if fit.is_ok() && !(multi && p.single_file.is_some()) {
                        p.targets(job, multi)
                    } else {
                        Vec::new()
                    };
                    refusals.extend(t.iter().filter_map(|f| guard.refusal(f)));
                    per_file.push(t);
                }
            }
            targets.push(per_file);
        }
        if !refusals.is_empty() {
            refusals.dedup();
            return Err(Failure::usage(format!(
                "no report was written:\n  {}",
                refusals.join("\n  ")
            )));
        }
        let folder = match p.single_file {
            Some(_) => p
                .path
                .parent()
                .filter(|d| !d.as_os_str().is_empty())
                .map_or_else(|| PathBuf::from("."), Path::to_path_buf),
            None => p.path.clone(),
        };
        let stale = isochore_report::remove_stale_temporaries(&folder);
        if !stale.is_empty() {
            let names: Vec<String> = stale.iter().map(|s| s.display().to_string()).collect();
            output::note(&format!(
                "removed {} left by an interrupted report write: {}",
                output::count(stale.len(), "stale temporary file", "stale temporary files"),
                names.join(", ")
            ));
        }
    }
    let style = if a.json { Style::Json } else { Style::Text };
    let mut out = output::stdout(style);
    let mut failures: Vec<String> = Vec::new();
    let mut summary_rows: Vec<table::SummaryRow> = Vec::new();
    let array = a.files.len() > 1;
    let mut array_open = false;
    let mut entries = 0usize;
    let mut successes = 0usize;
    let io_fail = output::stdout_failure;
    let detailed_text = !a.json && !a.summary && a.files.len() == 1;

    for (fi, (source, l)) in loaded.into_iter().enumerate() {
        // A closed reader with no reports to write: nothing left to do but say failures.
        if out.closed() && plan.is_none() {
            match l {
                Err(e) => failures.push(e),
                Ok(jobs) => failures.extend(jobs.into_iter().filter_map(|(_, f)| f.err())),
            }
            continue;
        }
        let jobs = match l {
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
        for (ji, (job, fit)) in jobs.iter().enumerate() {
            let fit = match fit {
                Ok(f) => f,
                Err(e) => {
                    if a.json && this_array {
                        error_entry(&mut out, &mut entries, &source, e).map_err(io_fail)?;
                    }
                    failures.push(e.clone());
                    continue;
                }
            };
            // Without --intervals, the method the data set records (a project's).
            let intervals = match crate::intervals_cmd::for_set(a, &intervals, job) {
                Ok(r) => r,
                Err(e) => {
                    interval_refusals.push(e);
                    continue;
                }
            };
            let run = match crate::intervals_cmd::run(job, fit, &intervals) {
                Ok(r) => r,
                Err(e) => {
                    interval_refusals.push(e);
                    continue;
                }
            };
            successes += 1;
            let errors_in_t = crate::errors_in_t_cmd::fit(job, &mut failures);
            let comparisons = match calorimetric
                .as_deref()
                .map(|v| crate::calorimetric_cmd::compare(job, fit, v))
            {
                Some(Ok(c)) => Some(c),
                Some(Err(e)) => {
                    failures.push(e);
                    None
                }
                None => None,
            };
            // --calorimetric-in-fit: the data set fitted again with its values as
            // observations of ΔH°(T), beside its fit of ln K alone (the window's rule).
            let constrained = calorimetric
                .as_deref()
                .filter(|_| a.calorimetric_in_fit)
                .map(|v| {
                    isochore_analysis::calorimetric::fit_single_with_calorimetric(
                        job,
                        &job.series,
                        v,
                    )
                });
            if a.json {
                if this_array && entries > 0 {
                    out.write_all(b",\n").map_err(io_fail)?;
                }
                let src = this_array.then_some(source.as_str());
                // The errors_in_t block goes with the intervals and the calorimetric
                // comparisons alike (issue 13).
                if let Some(c) = &constrained {
                    json::calorimetric::write_fit_with_calorimetric_fit(
                        &mut out,
                        job,
                        fit,
                        src,
                        !a.summary,
                        run.as_ref(),
                        comparisons.as_deref(),
                        errors_in_t.as_ref(),
                        c,
                    )
                } else {
                    crate::errors_in_t_cmd::write_json(
                        &mut out,
                        job,
                        fit,
                        errors_in_t.as_ref(),
                        run.as_ref(),
                        comparisons.as_deref(),
                        src,
                        !a.summary,
                    )
                }
                .map_err(io_fail)?;
                entries += 1;
            } else if detailed_text && !multi {
                table::detailed(&mut out, job, fit).map_err(io_fail)?;
                if let Some(f) = &errors_in_t {
                    crate::errors_in_t_cmd::text(&mut out, job, f, true).map_err(io_fail)?;
                }
                if let Some(r) = &run {
                    crate::intervals_cmd::text(&mut out, job, fit, r).map_err(io_fail)?;
                }
                if let Some(c) = &comparisons {
                    crate::calorimetric_cmd::text(&mut out, job, c).map_err(io_fail)?;
                }
                if let Some(c) = &constrained {
                    crate::calorimetric_cmd::single_fit_text(&mut out, job, c).map_err(io_fail)?;
                }
            } else {
                summary_rows.push(table::SummaryRow::new(job, fit));
                if let Some(f) = &errors_in_t {
                    writeln!(
                        calorimetric_after,
                        "\n{} — series “{}”:",
                        job.source, job.series
                    )
                    .map_err(io_fail)?;
                    crate::errors_in_t_cmd::text(&mut calorimetric_after, job, f, false)
                        .map_err(io_fail)?;
                }
                if let Some(r) = &run {
                    writeln!(
                        calorimetric_after,
                        "\n{} — series “{}”",
                        job.source, job.series
                    )
                    .map_err(io_fail)?;
                    crate::intervals_cmd::text(&mut calorimetric_after, job, fit, r)
                        .map_err(io_fail)?;
                }
                if let Some(c) = &comparisons {
                    crate::calorimetric_cmd::text(&mut calorimetric_after, job, c)
                        .map_err(io_fail)?;
                }
                if let Some(c) = &constrained {
                    crate::calorimetric_cmd::single_fit_text(&mut calorimetric_after, job, c)
                        .map_err(io_fail)?;
                }
            }
            let Some(p) = plan.as_ref() else { continue };
            let t = targets
                .get(fi)
                .and_then(|f| f.get(ji))
                .cloned()
                .unwrap_or_default();
            if t.is_empty() {
                continue;
            }
            match write_report(
                p,
                job,
                fit,
                &t,
                &intervals,
                comparisons.as_deref().unwrap_or_default(),
                constrained.as_ref(),
            ) {
                Ok(paths) => {
                    if let Err(e) = guard.record(&paths) {
                        failures.push(e);
                    }
                    for w in paths {
                        output::note(&format!("wrote {}", w.display()));
                    }
                }
                Err(e) => failures.push(e),
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
    out.write_all(&calorimetric_after).map_err(io_fail)?;
    out.flush().map_err(io_fail)?;
    drop(out);
    if !interval_refusals.is_empty() {
        for f in failures.iter().chain(&interval_refusals) {
            output::note(f);
        }
        return Err(Failure::usage(format!(
            "no resampled intervals for {}",
            output::count(interval_refusals.len(), "data set", "data sets")
        )));
    }
    if failures.is_empty() {
        return Ok(());
    }
    for f in &failures {
        output::note(f);
    }
    Err(Failure::input(batch_summary(failures.len(), successes)))
}

/// The closing line of a run where some input failed, in the right number.
fn batch_summary(failed: usize, ok: usize) -> String {
    let head = if failed == 1 {
        "1 input could not be used".to_string()
    } else {
        format!("{failed} inputs could not be used")
    };
    match ok {
        0 => head,
        1 => format!("{head}; the 1 result that could be computed is above"),
        n => format!("{head}; the {n} results that could be computed are above"),
    }
}

#[cfg(test)]
mod tests {
    use super::batch_summary;

    #[test]
    fn batch_summary_counts_in_words() {
        assert_eq!(batch_summary(1, 0), "1 input could not be used");
        assert_eq!(
            batch_summary(1, 1),
            "1 input could not be used; the 1 result that could be computed is above"
        );
        assert_eq!(
            batch_summary(2, 3),
            "2 inputs could not be used; the 3 results that could be computed are above"
        );
    }
}
