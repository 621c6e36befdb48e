//! The interval method both front ends offer (issue 13): the delta method (the fit's own),
//! parametric Monte Carlo or the bootstrap, with the number of draws and the seed, run on a
//! prepared data set and its fit by `isochore_fit::intervals`. The command line's
//! `--intervals delta|monte-carlo|bootstrap`, `--draws`, `--seed` and `--bootstrap-scheme`
//! name the same choices as the JSON's `method` values.

use crate::dataset::PreparedSet;
use isochore_fit::intervals::{
    bootstrap, monte_carlo, BootstrapScheme, IntervalError, IntervalOptions, IntervalRun,
    DEFAULT_DRAWS, DEFAULT_SEED,
};
use isochore_fit::VantHoffFit;

/// Which intervals to give.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum IntervalChoice {
    /// The fit's own: the delta method (Fieller's for a temperature at a target K).
    #[default]
    Delta,
    /// Parametric Monte Carlo (GUM Supplement 1).
    MonteCarlo,
    /// The bootstrap with this scheme.
    Bootstrap(BootstrapScheme),
}

impl IntervalChoice {
    /// The command-line value: "delta", "monte-carlo", "bootstrap".
    pub fn cli_name(self) -> &'static str {
        match self {
            IntervalChoice::Delta => "delta",
            IntervalChoice::MonteCarlo => "monte-carlo",
            IntervalChoice::Bootstrap(_) => "bootstrap",
        }
    }
}

/// The method with its draws and seed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct IntervalRequest {
    /// Which method.
    pub choice: IntervalChoice,
    /// Number of draws (ignored by the delta method).
    pub draws: usize,
    /// The seed (ignored by the delta method).
    pub seed: u64,
}

impl Default for IntervalRequest {
    fn default() -> Self {
        IntervalRequest {
            choice: IntervalChoice::Delta,
            draws: DEFAULT_DRAWS,
            seed: DEFAULT_SEED,
        }
    }
}

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
/// σ(T) ([`PreparedSet::sigma_t_k`]); the bootstrap resamples the fit in K only.
///
/// # Errors
/// The run's refusal in words ([`IntervalError`]: draws out of range, too few points for the
/// bootstrap, …).
pub fn run_intervals(
    set: &PreparedSet,
    fit: &VantHoffFit,
    request: &IntervalRequest,
) -> Result<Option<IntervalRun>, IntervalError> {
    let options = IntervalOptions {
        draws: request.draws,
        seed: request.seed,
        ..IntervalOptions::default()
    };
    match request.choice {
        IntervalChoice::Delta => Ok(None),
        // With a σ(T) (a column, or one thermometer uncertainty), each draw draws the
        // temperatures too.
        IntervalChoice::MonteCarlo => {
            monte_carlo(&set.measurements, fit, set.sigma_t_k.as_deref(), &options).map(Some)
        }
        IntervalChoice::Bootstrap(s) => bootstrap(&set.measurements, fit, s, &options).map(Some),
    }
}
