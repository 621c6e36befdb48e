//! `vhfit fit|predict --intervals delta|monte-carlo|bootstrap --draws N --seed S
//! [--bootstrap-scheme residuals|wild|cases]`: the request from the flags, the run on each
//! fitted data set (isochore-analysis' `run_intervals`, `run_intervals_at` for predict's
//! temperatures and target K), and its block of readable text
//! (the method line and each quantity's resampled interval beside the delta method's).
//! Without `--intervals`, `vhfit fit` and `vhfit predict` run the method a project records
//! for each data set ([`for_set`], [`for_job`]).

use crate::cli::{FitArgs, IntervalsArg, PredictArgs, SchemeArg};
use crate::load::Job;
use isochore_analysis::intervals::{run_intervals, IntervalChoice, IntervalRequest};
use isochore_fit::intervals::{
    BootstrapScheme, IntervalError, IntervalMethod, IntervalRun, DEFAULT_DRAWS, DEFAULT_SEED,
};
use isochore_fit::VantHoffFit;
use isochore_report::present::intervals::{interval_rows, method_line};
use isochore_report::present::names::interval_method;
use std::io::{self, Write};

/// The interval flags of `vhfit fit` or `vhfit predict`: `--intervals`, `--draws`,
/// `--seed` and `--bootstrap-scheme`.
#[derive(Debug, Clone, Copy)]
pub struct Flags {
    /// `--intervals`, if given.
    pub intervals: Option<IntervalsArg>,
    /// `--draws`.
    pub draws: Option<usize>,
    /// `--seed`.
    pub seed: Option<u64>,
    /// `--bootstrap-scheme`.
    pub scheme: Option<SchemeArg>,
}

impl Flags {
    /// The flags of `vhfit fit`.
    pub fn of_fit(a: &FitArgs) -> Flags {
        Flags {
            intervals: a.intervals,
            draws: a.draws,
            seed: a.seed,
            scheme: a.bootstrap_scheme,
        }
    }

    /// The flags of `vhfit predict`.
    pub fn of_predict(a: &PredictArgs) -> Flags {
        Flags {
            intervals: a.intervals,
            draws: a.draws,
            seed: a.seed,
            scheme: a.bootstrap_scheme,
        }
    }
}

/// The request the flags of `vhfit fit` make (see [`request_from`]); without `--intervals`,
/// the delta method's. When no `--intervals` is given and an input is a project file (and
/// no joint fit is asked for), `--draws`, `--seed` and `--bootstrap-scheme` are checked
/// against each data set's recorded method instead, by [`for_set`].
pub fn request(a: &FitArgs) -> Result<IntervalRequest, String> {
    request_for(Flags::of_fit(a), &a.files)
}

/// [`request`] for any command's `flags` and its input `files`. Without `--intervals`, an
/// input that is a project file leaves the request to each data set ([`for_job`]; a joint
/// fit's to [`for_joint`]).
pub fn request_for(flags: Flags, files: &[std::path::PathBuf]) -> Result<IntervalRequest, String> {
    if flags.intervals.is_none() && files.iter().any(|p| isochore_analysis::is_project_file(p)) {
        return Ok(IntervalRequest::default());
    }
    request_from(
        flags.intervals.unwrap_or(IntervalsArg::Delta),
        flags.draws,
        flags.seed,
        flags.scheme,
    )
}

/// The request for one data set of `vhfit fit`: `given` ([`request`]'s) when `--intervals`
/// is given — an explicit option wins — else the one recorded with the data set (a
/// project's `SeriesSettings::intervals`, chosen in the window; the delta method for a data
/// file), with `--draws`, `--seed` and `--bootstrap-scheme` replacing its draws, generator
/// start value and scheme. Such a flag that the recorded method would not use is refused in
/// [`request_from`]'s words, the data set named.
pub fn for_set(a: &FitArgs, given: &IntervalRequest, job: &Job) -> Result<IntervalRequest, String> {
    for_job(Flags::of_fit(a), a.share.is_some(), given, job)
}

/// The request of a joint fit (`--share`) of `sets`: `given` when `--intervals` is given or
/// no input is a project file, else the one every data set records (as [`for_job`] makes
/// it, the flags replacing draws, start value and scheme). Data sets that record different
/// requests are refused, each named with its method: one run covers them all, so the
/// chemist chooses it with `--intervals`.
pub fn for_joint(
    flags: Flags,
    files: &[std::path::PathBuf],
    given: &IntervalRequest,
    sets: &[Job],
) -> Result<IntervalRequest, String> {
    if flags.intervals.is_some() || !files.iter().any(|p| isochore_analysis::is_project_file(p)) {
        return Ok(*given);
    }
    let each: Vec<IntervalRequest> = sets
        .iter()
        .map(|job| for_job(flags, false, given, job))
        .collect::<Result<_, _>>()?;
    match each.first() {
        Some(first) if each.iter().all(|r| r == first) => Ok(*first),
        Some(_) => Err(format!(
            "the data sets record different interval settings ({}); a joint fit makes one run for all of them: choose it with --intervals",
            sets.iter()
                .zip(&each)
                .map(|(job, r)| format!(
                    "'{}': {}",
                    job.series,
                    isochore_report::present::names::interval_choice(r.choice)
                ))
                .collect::<Vec<_>>()
                .join(", ")
        )),
        None => Ok(*given),
    }
}

/// [`for_set`] for any command's `flags` and whether the fit is `joint`.
pub fn for_job(
    flags: Flags,
    joint: bool,
    given: &IntervalRequest,
    job: &Job,
) -> Result<IntervalRequest, String> {
    if flags.intervals.is_some() || joint {
        return Ok(*given);
    }
    let recorded = job.intervals;
    let method = match recorded.choice {
        IntervalChoice::Delta => IntervalsArg::Delta,
        IntervalChoice::MonteCarlo => IntervalsArg::MonteCarlo,
        IntervalChoice::Bootstrap(_) => IntervalsArg::Bootstrap,
    };
    let mut r = request_from(method, flags.draws, flags.seed, flags.scheme).map_err(|e| {
        format!(
            "{}: series '{}' records the intervals by {}: {e}",
            job.source,
            job.series,
            isochore_report::present::names::interval_choice(recorded.choice)
        )
    })?;
    if flags.draws.is_none() {
        r.draws = recorded.draws;
    }
    if flags.seed.is_none() {
        r.seed = recorded.seed;
    }
    if flags.scheme.is_none() {
        r.choice = recorded.choice;
    }
    Ok(r)
}

/// The request `--intervals`, `--draws`, `--seed` and `--bootstrap-scheme` make (`vhfit
/// fit` and `vhfit predict`). `--draws`, `--seed` or `--bootstrap-scheme` with the delta
/// method, or `--bootstrap-scheme` with Monte Carlo, is a usage error (nothing would use it).
pub fn request_from(
    intervals: IntervalsArg,
    draws: Option<usize>,
    seed: Option<u64>,
    bootstrap_scheme: Option<SchemeArg>,
) -> Result<IntervalRequest, String> {
    let scheme = match bootstrap_scheme {
        None | Some(SchemeArg::Residuals) => BootstrapScheme::Residuals,
        Some(SchemeArg::Wild) => BootstrapScheme::Wild,
        Some(SchemeArg::Cases) => BootstrapScheme::Cases,
    };
    let choice = match intervals {
        IntervalsArg::Delta => IntervalChoice::Delta,
        IntervalsArg::MonteCarlo => IntervalChoice::MonteCarlo,
        IntervalsArg::Bootstrap => IntervalChoice::Bootstrap(scheme),
    };
    if choice == IntervalChoice::Delta && (draws.is_some() || seed.is_some()) {
        return Err(
            "--draws and --seed apply to --intervals monte-carlo or bootstrap; the delta method draws nothing"
                .into(),
        );
    }
    if bootstrap_scheme.is_some() && !matches!(choice, IntervalChoice::Bootstrap(_)) {
        return Err("--bootstrap-scheme applies to --intervals bootstrap only".into());
    }
    Ok(IntervalRequest {
        choice,
        draws: draws.unwrap_or(DEFAULT_DRAWS),
        seed: seed.unwrap_or(DEFAULT_SEED),
    })
}

/// Runs the request on one fitted data set with the quantities of `vhfit predict`: ΔG° and K
/// at each of `temperatures` (K) and the temperature at each of `k_targets`, besides the
/// usual ones; `Ok(None)` for the delta method. A refusal is named with the data set.
pub fn run_at(
    job: &Job,
    fit: &VantHoffFit,
    req: &IntervalRequest,
    temperatures: &[f64],
    k_targets: &[f64],
) -> Result<Option<IntervalRun>, String> {
    isochore_analysis::intervals::run_intervals_at(job, fit, req, temperatures, k_targets)
        .map_err(|e: IntervalError| format!("{}: series '{}': {e}", job.source, job.series))
}

/// Runs the request on one fitted data set; `Ok(None)` for the delta method. A refusal is
/// named with the data set, and is a usage error (another method or setting settles it).
pub fn run(
    job: &Job,
    fit: &VantHoffFit,
    req: &IntervalRequest,
) -> Result<Option<IntervalRun>, String> {
    run_intervals(job, fit, req)
        .map_err(|e: IntervalError| format!("{}: series '{}': {e}", job.source, job.series))
}

fn pad(s: &str, w: usize) -> String {
    let n = s.chars().count();
    format!("{s}{}", " ".repeat(w.saturating_sub(n)))
}

/// The readable block of a run: the method line, then one row per quantity.
pub fn text(w: &mut impl Write, job: &Job, fit: &VantHoffFit, run: &IntervalRun) -> io::Result<()> {
    writeln!(w)?;
    writeln!(
        w,
        "{} (the table above is the delta method's):",
        method_line(run)
    )?;
    let rows = interval_rows(fit, run, job.energy, job.temperature);
    let header = [
        "quantity",
        "value",
        "± SE (SD of draws)",
        "interval",
        "method",
        if rows
            .iter()
            .any(|r| r.delta_method != interval_method(IntervalMethod::Delta))
        {
            "delta method (Fieller for T)"
        } else {
            "delta method"
        },
        "unit",
    ]
    .map(String::from);
    let cells: Vec<[String; 7]> = rows
        .iter()
        .map(|r| {
            [
                r.quantity.clone(),
                r.value.clone(),
                format!("± {}", r.se),
                r.interval.clone(),
                r.method.to_string(),
                r.delta.clone(),
                r.unit.clone(),
            ]
        })
        .collect();
    let mut widths = header.clone().map(|h| h.chars().count());
    for c in &cells {
        for (i, s) in c.iter().enumerate() {
            widths[i] = widths[i].max(s.chars().count());
        }
    }
    for c in std::iter::once(&header).chain(&cells) {
        let line: Vec<String> = c.iter().zip(widths).map(|(s, w)| pad(s, w)).collect();
        writeln!(w, "  {}", line.join("  ").trim_end())?;
    }
    // Each quantity named as in the rows, not by its JSON key.
    for warning in isochore_report::present::intervals::run_warnings(fit, run, job.temperature) {
        writeln!(w, "  note: {warning}")?;
    }
    Ok(())
}
