//! `vhfit fit A.csv B.csv --share KEYS`: every data set of every file fitted together with
//! the named parameters shared (isochore-analysis' [`fit_joint`]), printed as one readable
//! account — shared and per-series parameters, the joint and separate fits side by side,
//! differences between series, the test of equality in words and the points by series — or
//! as one JSON object.

use crate::cli::FitArgs;
use crate::load::{load_for_joint, Job};
use crate::output::{self, Style};
use crate::Failure;
use isochore_analysis::calorimetric::compare_joint;
use isochore_analysis::joint::fit_with_calorimetric;
use isochore_analysis::joint::{fit_joint, JointAnalysis};
use isochore_analysis::joint_intervals::run_joint_intervals;
use isochore_analysis::joint_report_input;
use isochore_analysis::json::joint::write_joint_with_intervals;
use isochore_fit::calorimetric::{CalorimetricComparison, CalorimetricValue};
use isochore_fit::global::{CalorimetricJointFit, GlobalError};
use isochore_fit::intervals::{IntervalRequest, JointRun, JointTarget};
use isochore_fit::{Estimate, ParamInfo};
use isochore_report::present::intervals::method_line;
use isochore_report::present::names::interval_method;
use isochore_report::present::{diag, fixed, flag_words, percent, plus_minus, show_t, unit_of};
use isochore_report::{OverwriteGuard, ReportFormat};
use std::io::{self, Write};
use std::path::{Path, PathBuf};

/// Runs a joint fit of every data set in `a.files`, sharing `keys`, with the intervals
/// `intervals` asks for (the delta method's, or a Monte Carlo or bootstrap run over the
/// whole block design).
pub fn run(a: &FitArgs, keys: &[String], intervals: &IntervalRequest) -> Result<(), Failure> {
    crate::load::reference_temperature(&a.fit).map_err(Failure::usage)?;
    let calorimetric = crate::calorimetric_cmd::tagged(a).map_err(Failure::usage)?;
    if a.calorimetric_in_fit && calorimetric.is_none() {
        return Err(Failure::usage(
            "--calorimetric-in-fit needs calorimetric values: --calorimetric or --calorimetric-file",
        ));
    }
    let report_format = match &a.report {
        Some(p) => {
            let format = ReportFormat::from_path(p);
            if format.is_none() && p.is_file() {
                return Err(Failure::usage(format!(
                    "--report {}: an existing file without a report extension; give a folder or a name ending in .html, .pdf, .md, .csv, .svg or .png",
                    p.display()
                )));
            }
            Some(format)
        }
        None => None,
    };
    let keys: Vec<String> = keys
        .iter()
        .map(|k| k.trim().to_string())
        .filter(|k| !k.is_empty())
        .collect();
    if keys.is_empty() {
        return Err(Failure::usage(
            "--share needs one or more parameter keys, e.g. --share delta_cp or --share delta_h,delta_cp",
        ));
    }
    let mut sets: Vec<Job> = Vec::new();
    for path in &a.files {
        sets.extend(load_for_joint(path, &a.fit, a.report.is_some()).map_err(Failure::input)?);
    }
    // Without --intervals, the setting the data sets of a project record (one for all).
    let intervals = &crate::intervals_cmd::for_joint(
        crate::intervals_cmd::Flags::of_fit(a),
        &a.files,
        intervals,
        &sets,
    )
    .map_err(|e| Failure::usage(format!("--share: {e}")))?;
    let joint = fit_joint(&sets, &keys).map_err(|e| Failure::input(format!("--share: {e}")))?;
    // A refusal of the run is a usage error: another method or setting settles it.
    let resampled = run_joint_intervals(&sets, &joint, intervals)
        .map_err(|e| Failure::usage(format!("--intervals with --share: {e}")))?;
    if let Some(items) = &calorimetric {
        for name in items.iter().filter_map(|(s, _)| s.as_deref()) {
            if !sets
                .iter()
                .zip(&joint.labels)
                .any(|(set, l)| l == name || set.series == name)
            {
                return Err(Failure::usage(format!(
                    "--calorimetric names series '{name}', which is not among the series fitted: {}",
                    joint.labels.join(", ")
                )));
            }
        }
    }
    // Each series' values: those naming it and those naming no series.
    let values: Option<Vec<Vec<CalorimetricValue>>> = calorimetric.as_ref().map(|items| {
        (0..sets.len())
            .map(|s| crate::calorimetric_cmd::values_for(items, &joint.labels[s], &sets[s].series))
            .collect()
    });
    let comparisons: Vec<Vec<CalorimetricComparison>> = match &values {
        Some(v) => {
            compare_joint(&joint, v).map_err(|e| Failure::input(format!("--calorimetric: {e}")))?
        }
        None => Vec::new(),
    };
    let constrained = match (&values, a.calorimetric_in_fit) {
        (Some(v), true) => Some(fit_with_calorimetric(&sets, &joint, v)),
        _ => None,
    };
    if let (Some(_), Some(run)) = (&a.report, &resampled) {
        output::note(&format!(
            "the joint report shows the delta method's intervals; the run ({}) is in the text and JSON output only",
            method_line(&run.run)
        ));
    }
    if let (Some(format), Some(path)) = (report_format, &a.report) {
        write_reports(
            a,
            path,
            format,
            &sets,
            &joint,
            &comparisons,
            constrained.as_ref(),
            resampled.as_ref(),
        )?;
    }
    let style = if a.json { Style::Json } else { Style::Text };
    let mut out = output::stdout(style);
    let io_fail = output::stdout_failure;
    if a.json {
        if calorimetric.is_some() {
            isochore_analysis::json::calorimetric::write_joint_with_calorimetric_and_intervals(
                &mut out,
                &sets,
                &joint,
                !a.summary,
                &comparisons,
                constrained.as_ref(),
                resampled.as_ref(),
            )
            .map_err(io_fail)?;
        } else {
            write_joint_with_intervals(&mut out, &sets, &joint, !a.summary, resampled.as_ref())
                .map_err(io_fail)?;
        }
        out.write_all(b"\n").map_err(io_fail)?;
    } else {
        text(&mut out, &sets, &joint, !a.summary).map_err(io_fail)?;
        if let Some(run) = &resampled {
            intervals_text(&mut out, &sets, &joint, run).map_err(io_fail)?;
        }
        calorimetric_text(&mut out, &sets, &joint, &comparisons).map_err(io_fail)?;
        if let Some(c) = &constrained {
            constrained_text(&mut out, &sets, &joint, c).map_err(io_fail)?;
        }
    }
    out.flush().map_err(io_fail)
}

/// Writes the joint report to `path` (one file in `format`, or every format into a folder
/// when `format` is `None`), after checking that no target is an input or a file isochore
/// did not write.
#[allow(clippy::too_many_arguments)]
fn write_reports(
    a: &FitArgs,
    path: &Path,
    format: Option<ReportFormat>,
    sets: &[Job],
    joint: &JointAnalysis,
    comparisons: &[Vec<CalorimetricComparison>],
    constrained: Option<&Result<CalorimetricJointFit, GlobalError>>,
    resampled: Option<&JointRun>,
) -> Result<(), Failure> {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let mut settings = vec![(
        "command line".to_string(),
        format!("vhfit {}", args.join(" ")),
    )];
    // The report's tables stay the delta method's; the record names the run asked for.
    if let Some(run) = resampled {
        settings.push((
            "interval method".to_string(),
            format!(
                "{} asked for; this report's intervals are the delta method's, the resampled ones are in the text and JSON output",
                method_line(&run.run)
            ),
        ));
    }
    let mut input = joint_report_input(sets, joint, comparisons, constrained, &settings);
    let given = |v: &Option<String>| v.as_ref().filter(|t| !t.trim().is_empty()).cloned();
    input.record.analyst = given(&a.analyst);
    input.record.note = given(&a.note);
    let stem = "joint-fit";
    let targets = match format {
        Some(f) => isochore_report::joint_report_paths(&input, f, path),
        None => isochore_report::joint_report_set_paths(&input, path, stem),
    };
    let guard = OverwriteGuard::new(&a.files);
    let mut refusals: Vec<String> = targets.iter().filter_map(|t| guard.refusal(t)).collect();
    if !refusals.is_empty() {
        refusals.dedup();
        return Err(Failure::usage(format!(
            "no report was written:\n  {}",
            refusals.join("\n  ")
        )));
    }
    let folder = match format {
        Some(_) => path
            .parent()
            .filter(|d| !d.as_os_str().is_empty())
            .map_or_else(|| PathBuf::from("."), Path::to_path_buf),
        None => path.to_path_buf(),
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
    let written = match format {
        Some(f) => isochore_report::write_joint_report(&input, f, path),
        None => isochore_report::write_joint_report_set(&input, path, stem),
    }
    .map_err(|e| Failure::input(format!("joint report: {e}")))?;
    guard.record(&written).map_err(Failure::input)?;
    for w in written {
        output::note(&format!("wrote {}", w.display()));
    }
    Ok(())
}

/// The joint fit again with the calorimetric values as observations of ΔH°(T)
/// (isochore-analysis' `fit_with_calorimetric`), each parameter as fitted and beside it
/// the joint fit of ln K alone; a refusal is printed in words.
fn constrained_text(
    w: &mut impl Write,
    sets: &[Job],
    j: &JointAnalysis,
    constrained: &Result<CalorimetricJointFit, GlobalError>,
) -> io::Result<()> {
    crate::calorimetric_cmd::constrained_lines(
        w,
        &sets[0],
        "joint fit with the calorimetric values as observations of ΔH°(T) (weight 1/u²) | ln K alone:",
        &j.labels,
        &j.fit,
        constrained.as_ref(),
    )
}

/// The calorimetric comparisons of each series against its ΔH°(T) in the joint fit.
fn calorimetric_text(
    w: &mut impl Write,
    sets: &[Job],
    j: &JointAnalysis,
    comparisons: &[Vec<CalorimetricComparison>],
) -> io::Result<()> {
    for (s, c) in comparisons.iter().enumerate() {
        if c.is_empty() {
            continue;
        }
        let heading = format!(
            "calorimetric ΔH° compared with the van 't Hoff ΔH° of the joint fit — series “{}”:",
            j.labels[s]
        );
        crate::calorimetric_cmd::lines(w, &sets[s], &heading, c)?;
    }
    Ok(())
}

/// The parameter's symbol, with (θ) where its value depends on the temperature.
pub(crate) fn symbol(model: isochore_fit::Model, info: &ParamInfo) -> String {
    if isochore_report::present::varies_with_t(model, info) {
        format!("{}(θ)", info.symbol)
    } else {
        info.symbol.to_string()
    }
}

/// "value ± SE  [low, high]" in the parameter's display unit.
pub(crate) fn shown(info: &ParamInfo, job: &Job, e: Estimate) -> String {
    let u = unit_of(info.dimension, job.energy);
    let e = u.estimate(e);
    let d = isochore_report::present::decimals_for(e.se);
    format!(
        "{}  [{}, {}] {}",
        plus_minus(e.value, e.se),
        fixed(e.ci_low, d),
        fixed(e.ci_high, d),
        u.symbol
    )
}

/// The joint fit's Monte Carlo or bootstrap run: the method line, then each parameter
/// (shared, each series' own) and each difference between series with its resampled
/// interval and the joint fit's delta-method one beside it.
fn intervals_text(
    w: &mut impl Write,
    sets: &[Job],
    j: &JointAnalysis,
    run: &JointRun,
) -> io::Result<()> {
    let first = &sets[0];
    let model = j.fit.model();
    writeln!(w)?;
    writeln!(
        w,
        "{} over the joint fit (every draw refits all series together; the tables above are the delta method's):",
        method_line(&run.run)
    )?;
    writeln!(
        w,
        "  {:<10} {:<22} {:<44} {:<20} | delta method",
        "quantity", "series", "value ± SE (SD of draws)  [interval]", "method"
    )?;
    // Each quantity's name as the table writes it, for the notes below.
    let mut names: Vec<(&str, String)> = Vec::new();
    for (t, q) in run.targets.iter().zip(&run.run.quantities) {
        let Some(info) = model.params().iter().find(|p| p.key == t.key()) else {
            continue;
        };
        let who = match *t {
            JointTarget::Shared { .. } => "(shared)".to_string(),
            JointTarget::Series { series, .. } => j.labels[series].clone(),
            JointTarget::Difference { a, b, .. } => {
                format!("{} − {}", j.labels[a], j.labels[b])
            }
        };
        let best = q.best();
        writeln!(
            w,
            "  {:<10} {:<22} {:<44} {:<20} | {}",
            symbol(model, info),
            who,
            shown(info, first, best.estimate()),
            interval_method(best.method),
            shown(info, first, q.quantity.delta)
        )?;
        names.push((
            q.quantity.key.as_str(),
            format!("{} {who}", symbol(model, info)),
        ));
    }
    for warning in &run.run.warnings {
        // The library's notes begin with the quantity's key; say its name instead.
        let named = names
            .iter()
            .find_map(|(key, name)| {
                warning
                    .strip_prefix(key)
                    .and_then(|rest| rest.strip_prefix(": "))
                    .map(|rest| format!("{name}: {rest}"))
            })
            .unwrap_or_else(|| warning.clone());
        writeln!(w, "  note: {named}")?;
    }
    Ok(())
}

/// The readable account of a joint fit.
fn text(w: &mut impl Write, sets: &[Job], j: &JointAnalysis, points: bool) -> io::Result<()> {
    let fit = &j.fit;
    let first = &sets[0];
    let tu = first.temperature;
    let params = fit.model().params();
    let shared: Vec<String> = params
        .iter()
        .filter(|p| j.shared.contains(&p.key))
        .map(|p| symbol(fit.model(), p))
        .collect();
    writeln!(
        w,
        "joint fit of {} series — model: {}; shared: {}; θ = {}; {}% intervals",
        sets.len(),
        fit.model().describe(),
        shared.join(", "),
        show_t(fit.options().t_ref_k, tu),
        percent(fit.options().level)
    )?;
    for (s, set) in sets.iter().enumerate() {
        let (lo, hi) = fit.t_range_k(s).unwrap_or((f64::NAN, f64::NAN));
        writeln!(
            w,
            "  series {} “{}” ({}): {} used, {} to {}, T_hm = {}",
            s + 1,
            j.labels[s],
            set.source,
            fit.points(s)
                .map_or(0, |p| p.iter().filter(|d| d.used).count()),
            show_t(lo, tu),
            show_t(hi, tu),
            show_t(fit.t_harmonic_k(s).unwrap_or(f64::NAN), tu)
        )?;
    }
    writeln!(w)?;
    writeln!(w, "shared parameters (joint fit):")?;
    for info in params.iter().filter(|p| j.shared.contains(&p.key)) {
        if let Some(e) = fit.shared(info.key) {
            writeln!(
                w,
                "  {:<10} {}",
                symbol(fit.model(), info),
                shown(info, first, e)
            )?;
        }
    }
    writeln!(w)?;
    writeln!(
        w,
        "per-series parameters: joint fit | separate fits (every parameter per series)"
    )?;
    for (s, label) in j.labels.iter().enumerate() {
        for info in params {
            let joint = if j.shared.contains(&info.key) {
                "(shared)".to_string()
            } else {
                fit.estimate(info.key, s)
                    .map_or_else(String::new, |e| shown(info, first, e))
            };
            let separate = j
                .equality
                .as_ref()
                .and_then(|t| t.full().estimate(info.key, s))
                .map_or_else(|| "—".to_string(), |e| shown(info, first, e));
            writeln!(
                w,
                "  {:<10} {:<16} {:<44} | {}",
                symbol(fit.model(), info),
                label,
                joint,
                separate
            )?;
        }
    }
    let diffs = fit.differences();
    if !diffs.is_empty() {
        writeln!(w)?;
        writeln!(
            w,
            "differences between series (joint fit, interval from the joint covariance):"
        )?;
        for d in diffs {
            let Some(info) = params.iter().find(|p| p.key == d.key) else {
                continue;
            };
            writeln!(
                w,
                "  {:<10} {} − {}: {}",
                symbol(fit.model(), info),
                j.labels[d.a],
                j.labels[d.b],
                shown(info, first, d.estimate)
            )?;
        }
    }
    writeln!(w)?;
    writeln!(w, "fit statistics       joint fit        separate fits")?;
    let sep = j.equality.as_ref().map(|t| t.full());
    let row = |name: &str, a: String, b: Option<String>| {
        format!(
            "  {:<18} {:<16} {}",
            name,
            a,
            b.unwrap_or_else(|| "—".into())
        )
    };
    writeln!(
        w,
        "{}",
        row(
            "parameters",
            fit.n_params().to_string(),
            sep.map(|f| f.n_params().to_string())
        )
    )?;
    writeln!(
        w,
        "{}",
        row(
            "degrees of freedom",
            fit.dof().to_string(),
            sep.map(|f| f.dof().to_string())
        )
    )?;
    writeln!(
        w,
        "{}",
        row(
            "χ²",
            fixed(fit.statistics().chi2, 4),
            sep.map(|f| fixed(f.statistics().chi2, 4))
        )
    )?;
    let aicc =
        |f: &isochore_fit::GlobalFit| f.statistics().aicc.map_or("—".into(), |v| fixed(v, 2));
    writeln!(w, "{}", row("AICc", aicc(fit), sep.map(aicc)))?;
    writeln!(w)?;
    match &j.equality {
        Some(t) => writeln!(w, "test of equality: {}", t.verdict())?,
        None => writeln!(w, "test of equality: not possible (see the warnings)")?,
    }
    if let Some(c) = &j.compensation {
        writeln!(w)?;
        writeln!(
            w,
            "enthalpy–entropy compensation (separate fits, ΔH° and ΔS° at θ):"
        )?;
        if let Some(b) = &c.beta {
            writeln!(w, "  {}", b.verdict)?;
        }
        if let Some(e) = &c.exner {
            writeln!(w, "  {}", e.verdict)?;
        }
    }
    if points {
        writeln!(w)?;
        writeln!(
            w,
            "points by series (externally studentized residual t, leverage h, Cook's D):"
        )?;
        for (s, set) in sets.iter().enumerate() {
            let Some(diags) = fit.points(s) else { continue };
            writeln!(w, "  series {} “{}”", s + 1, j.labels[s])?;
            for (o, d) in set.rows.iter().zip(diags) {
                writeln!(
                    w,
                    "    row {:>4}  {}  ln K {:>10}  residual {:>9}  t {:>7}  h {:>6}  D {:>6}{}{}",
                    o.row.to_string(),
                    show_t(d.t_k, tu),
                    fixed(d.ln_k, 4),
                    fixed(d.residual, 4),
                    d.student_ext.map_or("—".into(), |v| fixed(v, 2)),
                    diag(d.leverage),
                    d.cooks_d.map_or("—".into(), diag),
                    if d.used { "" } else { "  (excluded)" },
                    if d.flags.any() {
                        format!("  {}", flag_words(d.flags))
                    } else {
                        String::new()
                    }
                )?;
            }
        }
    }
    if !j.warnings.is_empty() {
        writeln!(w)?;
        writeln!(w, "warnings:")?;
        for x in &j.warnings {
            writeln!(w, "  - {x}")?;
        }
    }
    Ok(())
}
