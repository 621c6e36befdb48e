//! The interval method both front ends offer (issue 13): the delta method (the fit's own),
//! parametric Monte Carlo or the bootstrap, with the number of draws and the seed, run on a
//! prepared data set and its fit by `isochore_fit::intervals`. The command line's
//! `--intervals delta|monte-carlo|bootstrap`, `--draws`, `--seed` and `--bootstrap-scheme`
//! name the same choices as the JSON's `method` values.

use crate::dataset::PreparedSet;
use isochore_fit::intervals::{
    bootstrap_with, monte_carlo_with, BootstrapScheme, IntervalError, IntervalOptions, IntervalRun,
    Progress, RunWithDraws,
};
use isochore_fit::VantHoffFit;

/// The request types live with the runs in isochore-fit (the project file records them
/// too); re-exported here, where the front ends take them from.
pub use isochore_fit::intervals::{IntervalChoice, IntervalRequest};

/// The runs a report compares with the delta method: for a resampling request, Monte Carlo
/// and the bootstrap (the requested scheme, else residuals), both with the request's draws
/// and seed; empty for the delta method.
///
/// # Errors
/// As [`run_intervals`]; the bootstrap's refusal of too few points leaves Monte Carlo alone.
pub fn report_runs(
    set: &PreparedSet,
    fit: &VantHoffFit,
    request: &IntervalRequest,
) -> Result<Vec<IntervalRun>, IntervalError> {
    let scheme = match request.choice {
        IntervalChoice::Delta => return Ok(Vec::new()),
        IntervalChoice::MonteCarlo => BootstrapScheme::Residuals,
        IntervalChoice::Bootstrap(s) => s,
    };
    let mc = run_intervals(
        set,
        fit,
        &IntervalRequest {
            choice: IntervalChoice::MonteCarlo,
            ..*request
        },
    )?;
    let boot = run_intervals(
        set,
        fit,
        &IntervalRequest {
            choice: IntervalChoice::Bootstrap(scheme),
            ..*request
        },
    );
    let mut runs: Vec<IntervalRun> = mc.into_iter().collect();
    match boot {
        Ok(b) => runs.extend(b),
        Err(IntervalError::TooFewPointsForBootstrap { .. }) => {}
        Err(e) => return Err(e),
    }
    Ok(runs)
}

/// Runs the requested method on `set` and its `fit`; `None` for the delta method, whose
/// intervals are the fit's own. Monte Carlo draws the temperatures as well when the set has
/// σ(T) ([`PreparedSet::sigma_t_k`]), and is then centred on the fit with errors in T and
/// refits each draw by it (isochore-fit's `monte_carlo`); the bootstrap resamples the fit in
/// K only.
///
/// # Errors
/// The run's refusal in words ([`IntervalError`]: draws out of range, too few points for the
/// bootstrap, …).
pub fn run_intervals(
    set: &PreparedSet,
    fit: &VantHoffFit,
    request: &IntervalRequest,
) -> Result<Option<IntervalRun>, IntervalError> {
    run_intervals_with(set, fit, request, &Progress::new()).map(|r| r.map(|r| r.run))
}

/// [`run_intervals`] with further quantities, as `vhfit predict` asks for them: ΔG° and K
/// at each of `temperatures` (K), and the temperature where K reaches each of `k_targets`
/// (K = 1 is always among them).
///
/// # Errors
/// As [`run_intervals`].
pub fn run_intervals_at(
    set: &PreparedSet,
    fit: &VantHoffFit,
    request: &IntervalRequest,
    temperatures: &[f64],
    k_targets: &[f64],
) -> Result<Option<IntervalRun>, IntervalError> {
    let mut targets = vec![1.0];
    targets.extend(k_targets.iter().copied().filter(|&k| k != 1.0));
    let options = IntervalOptions {
        draws: request.draws,
        seed: request.seed,
        temperatures: temperatures.to_vec(),
        k_targets: targets,
    };
    let progress = Progress::new();
    match request.choice {
        IntervalChoice::Delta => Ok(None),
        IntervalChoice::MonteCarlo => monte_carlo_with(
            &set.measurements,
            fit,
            set.sigma_t_k.as_deref(),
            &options,
            &progress,
        )
        .map(|r| Some(r.run)),
        IntervalChoice::Bootstrap(s) => {
            bootstrap_with(&set.measurements, fit, s, &options, &progress).map(|r| Some(r.run))
        }
    }
}

/// [`run_intervals`] watched by `progress` (draws done; stops when cancelled), with every
/// draw kept: what the window runs on its worker thread. Its intervals are
/// [`run_intervals`]'s, to the last bit.
///
/// # Errors
/// As [`run_intervals`], and `IntervalError::Cancelled`.
pub fn run_intervals_with(
    set: &PreparedSet,
    fit: &VantHoffFit,
    request: &IntervalRequest,
    progress: &Progress,
) -> Result<Option<RunWithDraws>, IntervalError> {
    let options = IntervalOptions {
        draws: request.draws,
        seed: request.seed,
        ..IntervalOptions::default()
    };
    match request.choice {
        IntervalChoice::Delta => Ok(None),
        // With a σ(T) (a column, or one thermometer uncertainty), each draw draws the
        // temperatures too.
        IntervalChoice::MonteCarlo => monte_carlo_with(
            &set.measurements,
            fit,
            set.sigma_t_k.as_deref(),
            &options,
            progress,
        )
        .map(Some),
        IntervalChoice::Bootstrap(s) => {
            bootstrap_with(&set.measurements, fit, s, &options, progress).map(Some)
        }
    }
}
