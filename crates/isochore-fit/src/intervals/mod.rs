//! Intervals beyond the delta method (issue 13): parametric Monte Carlo after GUM
//! Supplement 1 (JCGM 101:2008) and the bootstrap (residuals with the leverage correction,
//! the wild bootstrap with Rademacher weights, and cases), with percentile and BCa intervals,
//! for every parameter and the derived quantities of [`quantities`].
//!
//! - [`monte_carlo`]: each draw replaces every used ln Kᵢ by a normal deviate about the
//!   measured value with its standard uncertainty, and (where a σ(T) is given) each Tᵢ too,
//!   then refits with the same model and weights. Under "σ are relative weights only" (the
//!   default convention) σᵢ are scaled by the fit's residual SD s, itself drawn for each
//!   draw as s·√(ν/χ²_ν), ν = n − p (GUM S1 §6.4.9's treatment of a scale estimated from
//!   the data), so that the draws of any linear quantity follow the Student t distribution
//!   the delta-method interval uses; under "σ are known standard uncertainties" σᵢ are used
//!   as stated. The interval is the probabilistically symmetric one (percentiles at
//!   (1 ∓ level)/2) and `se` is the SD of the draws.
//! - [`bootstrap`]: see [`BootstrapScheme`]; each interval is the percentile one, and
//!   BCa (Efron 1987) where it is defined, with the acceleration from the jackknife.
//!
//! Reproducible: draw i uses its own generator stream, fixed by the seed and i ([`rng`]),
//! and the draws are spread over the cores with rayon; the results do not depend on the
//! number of threads. Pure: no I/O.

mod bca;
mod bootstrap;
mod draws;
mod engine;
mod joint;
mod montecarlo;
mod montecarlo_t;
mod progress;
mod quantities;
mod request;
mod rng;

pub use bca::{acceleration, bca_interval, mean_sd, percentile_interval, percentile_sorted};
pub use bootstrap::{bootstrap, bootstrap_with};
pub use draws::{histogram, Draws, Histogram, TAIL_LEFT_OUT};
pub use joint::{joint_bootstrap, joint_monte_carlo, JointRun, JointTarget};
pub use montecarlo::{monte_carlo, monte_carlo_with};
pub use progress::{Progress, BLOCK};
pub use quantities::{quantities, Quantity, QuantityKind};
pub use request::{IntervalChoice, IntervalRequest};

use crate::error::Error;
use crate::measurement::Measurement;
use crate::vant_hoff::{Estimate, VantHoffFit};
use engine::Design;
use serde::{Deserialize, Serialize};
use std::fmt;

/// Draws when none are asked for.
pub const DEFAULT_DRAWS: usize = 10_000;
/// Most draws accepted: 10⁶ (at 12 quantities a run then holds about 100 MB of draws).
pub const MAX_DRAWS: usize = 1_000_000;
/// The seed when none is given.
pub const DEFAULT_SEED: u64 = 1;
/// Below this many used points, case resampling comes with a warning.
pub const CASES_WARN_BELOW: usize = 20;

/// What made an interval. Keys are the JSON `method` values (DEVELOPERS.md's vocabulary).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum IntervalMethod {
    /// First-order propagation of the covariance, value ± critical value × SE.
    Delta,
    /// Fieller's interval (the temperature at a target K); its SE is the delta method's.
    Fieller,
    /// Parametric Monte Carlo (GUM Supplement 1): percentiles of the draws, SE their SD.
    MonteCarlo,
    /// Bootstrap percentile interval, SE the SD of the bootstrap values.
    BootstrapPercentile,
    /// Bootstrap BCa interval, SE the SD of the bootstrap values.
    BootstrapBca,
}

impl IntervalMethod {
    /// The JSON key: "delta", "fieller", "monte_carlo", "bootstrap_percentile",
    /// "bootstrap_bca".
    pub fn key(self) -> &'static str {
        match self {
            IntervalMethod::Delta => "delta",
            IntervalMethod::Fieller => "fieller",
            IntervalMethod::MonteCarlo => "monte_carlo",
            IntervalMethod::BootstrapPercentile => "bootstrap_percentile",
            IntervalMethod::BootstrapBca => "bootstrap_bca",
        }
    }
}

/// How the bootstrap makes a new data set.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum BootstrapScheme {
    /// Residual resampling: y*ᵢ = ŷᵢ + (uⱼ − ū)/√wᵢ with uⱼ = √wⱼ eⱼ/√(1 − hⱼ), j drawn
    /// uniformly with replacement (the leverage-corrected residuals of Davison & Hinkley
    /// 1997, §6.2.3, centred). Temperatures stay fixed.
    #[default]
    Residuals,
    /// Wild bootstrap (Wu 1986; Liu 1988): y*ᵢ = ŷᵢ + vᵢ eᵢ/√(1 − hᵢ), vᵢ = ±1 with
    /// probability ½ (Rademacher weights; Davidson & Flachaire 2008). Keeps each point's own
    /// error size, so it allows for unequal scatter the weights do not describe.
    #[serde(rename = "wild_rademacher")]
    Wild,
    /// Case resampling: n points drawn with replacement and refitted. A resample with too
    /// few distinct temperatures is singular; it is drawn again and counted. Comes with a
    /// warning below [`CASES_WARN_BELOW`] points.
    Cases,
}

impl BootstrapScheme {
    /// The key: "residuals", "wild_rademacher", "cases".
    pub fn key(self) -> &'static str {
        match self {
            BootstrapScheme::Residuals => "residuals",
            BootstrapScheme::Wild => "wild_rademacher",
            BootstrapScheme::Cases => "cases",
        }
    }
}

/// Which resampling made a run.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case", tag = "kind", content = "scheme")]
pub enum Resampling {
    /// Parametric Monte Carlo.
    MonteCarlo,
    /// The bootstrap with this scheme.
    Bootstrap(BootstrapScheme),
}

/// The settings of a run.
#[derive(Debug, Clone, PartialEq)]
pub struct IntervalOptions {
    /// Number of draws, 1 ..= [`MAX_DRAWS`].
    pub draws: usize,
    /// The seed of the generator; recorded in the result.
    pub seed: u64,
    /// Temperatures (K) at which ΔG° and K are reported besides θ and T_hm.
    pub temperatures: Vec<f64>,
    /// Targets K whose temperature is reported (default: K = 1).
    pub k_targets: Vec<f64>,
}

impl Default for IntervalOptions {
    fn default() -> Self {
        IntervalOptions {
            draws: DEFAULT_DRAWS,
            seed: DEFAULT_SEED,
            temperatures: Vec::new(),
            k_targets: vec![1.0],
        }
    }
}

/// A finished run with its draws ([`monte_carlo_with`], [`bootstrap_with`]).
#[derive(Debug, Clone, PartialEq)]
pub struct RunWithDraws {
    /// The intervals.
    pub run: IntervalRun,
    /// Every draw of every quantity, for pictures of their distribution.
    pub draws: Draws,
}

/// A value with an SE and an interval made by a resampling method.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ResampledInterval {
    /// The fit's estimate (the centre of the draws is the fit's, not their mean).
    pub value: f64,
    /// SD of the draws.
    pub se: f64,
    /// Lower limit.
    pub ci_low: f64,
    /// Upper limit.
    pub ci_high: f64,
    /// What made the interval.
    pub method: IntervalMethod,
}

impl ResampledInterval {
    /// As an [`Estimate`] (without the method).
    pub fn estimate(&self) -> Estimate {
        Estimate {
            value: self.value,
            se: self.se,
            ci_low: self.ci_low,
            ci_high: self.ci_high,
        }
    }
}

/// One quantity of a run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct QuantityResult {
    /// What it is, with the fit's delta-method estimate.
    pub quantity: Quantity,
    /// Mean of the defined draws.
    pub mean: f64,
    /// Draws in which it was undefined (no root, a singular resample).
    pub undefined: usize,
    /// Monte Carlo or bootstrap-percentile interval.
    pub interval: ResampledInterval,
    /// The BCa interval (bootstrap only, where defined).
    pub bca: Option<ResampledInterval>,
}

impl QuantityResult {
    /// The interval to quote: BCa where there is one, else [`QuantityResult::interval`].
    pub fn best(&self) -> ResampledInterval {
        self.bca.unwrap_or(self.interval)
    }
}

/// The result of a Monte Carlo or bootstrap run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IntervalRun {
    /// What was resampled.
    pub resampling: Resampling,
    /// Number of draws.
    pub draws: usize,
    /// The seed.
    pub seed: u64,
    /// The level of the intervals (the fit's).
    pub level: f64,
    /// Draws that were singular and drawn again (case resampling).
    pub redrawn: usize,
    /// Every quantity, parameters first.
    pub quantities: Vec<QuantityResult>,
    /// Cautions in words.
    pub warnings: Vec<String>,
}

impl IntervalRun {
    /// The quantity with this key.
    pub fn get(&self, key: &str) -> Option<&QuantityResult> {
        self.quantities.iter().find(|q| q.quantity.key == key)
    }
}

/// Why a run was refused.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum IntervalError {
    /// Zero draws asked for.
    NoDraws,
    /// More than [`MAX_DRAWS`].
    TooManyDraws(usize),
    /// The bootstrap needs at least p + 2 used points.
    TooFewPointsForBootstrap {
        /// Used points.
        points: usize,
        /// Points needed (p + 2).
        needed: usize,
    },
    /// The points are not those the fit was made from (different count).
    PointsDoNotMatchFit {
        /// Points of the fit.
        fit: usize,
        /// Points given.
        given: usize,
    },
    /// A σ(T) that is not a positive finite number.
    BadSigmaT {
        /// 0-based index of the point.
        index: usize,
        /// The value.
        value: f64,
    },
    /// The design of the fit cannot be factorised again (rank deficient).
    Singular,
    /// The fit library refused something.
    Fit(Error),
    /// Stopped by [`Progress::cancel`] before every draw was done.
    Cancelled,
    /// A resampling a joint fit does not offer, with the reason in words.
    NotForJointFit(&'static str),
}

impl fmt::Display for IntervalError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            IntervalError::NoDraws => write!(f, "the number of draws must be at least 1"),
            IntervalError::TooManyDraws(n) => write!(
                f,
                "{n} draws asked for; at most {MAX_DRAWS} are allowed (10 000 are usually plenty)"
            ),
            IntervalError::TooFewPointsForBootstrap { points, needed } => write!(
                f,
                "the bootstrap needs at least {needed} used points (the model's parameters + 2); this fit has {points}. Use the delta method or Monte Carlo"
            ),
            IntervalError::PointsDoNotMatchFit { fit, given } => write!(
                f,
                "{given} points were given but the fit was made from {fit}"
            ),
            IntervalError::BadSigmaT { index, value } => write!(
                f,
                "point {}: σ(T) = {value} is not a positive number of kelvin",
                index + 1
            ),
            IntervalError::Singular => write!(
                f,
                "the design of the fit could not be factorised again; no resampled intervals"
            ),
            IntervalError::Fit(e) => write!(f, "{e}"),
            IntervalError::Cancelled => write!(f, "stopped before every draw was done"),
            IntervalError::NotForJointFit(why) => write!(f, "{why}"),
        }
    }
}

impl std::error::Error for IntervalError {}

/// Checks the number of draws.
///
/// # Errors
/// [`IntervalError::NoDraws`], [`IntervalError::TooManyDraws`].
pub fn check_draws(draws: usize) -> Result<(), IntervalError> {
    match draws {
        0 => Err(IntervalError::NoDraws),
        n if n > MAX_DRAWS => Err(IntervalError::TooManyDraws(n)),
        _ => Ok(()),
    }
}

/// The used points of `fit` (made from `points`) as the refits see them.
fn design(
    points: &[Measurement],
    fit: &VantHoffFit,
) -> Result<(Design, Vec<usize>), IntervalError> {
    if points.len() != fit.points().len() {
        return Err(IntervalError::PointsDoNotMatchFit {
            fit: fit.points().len(),
            given: points.len(),
        });
    }
    let mut d = Design {
        t: Vec::new(),
        y: Vec::new(),
        w: Vec::new(),
        e: Vec::new(),
        h: Vec::new(),
        model: fit.model(),
        theta: fit.options().t_ref_k,
    };
    let mut used = Vec::new();
    for (i, (pt, diag)) in points.iter().zip(fit.points()).enumerate() {
        if !diag.used {
            continue;
        }
        used.push(i);
        d.t.push(pt.t_k);
        d.y.push(pt.ln_k);
        d.w.push(match (fit.weighted(), pt.sigma_ln_k) {
            (true, Some(s)) => 1.0 / (s * s),
            _ => 1.0,
        });
        d.e.push(diag.residual);
        d.h.push(diag.leverage);
    }
    Ok((d, used))
}

/// Turns the draws (draw-major, `nq` values each) into one result per quantity.
fn summarise(
    qs: Vec<Quantity>,
    values: &[f64],
    jackknife: Option<&[f64]>,
    level: f64,
    method: IntervalMethod,
    warnings: &mut Vec<String>,
) -> Vec<QuantityResult> {
    let nq = qs.len();
    let draws = values.len().checked_div(nq).unwrap_or(0);
    let tail = 0.5 * (1.0 - level);
    qs.into_iter()
        .enumerate()
        .map(|(k, quantity)| {
            let mut v: Vec<f64> = (0..draws)
                .map(|d| values[d * nq + k])
                .filter(|x| x.is_finite())
                .collect();
            let undefined = draws - v.len();
            v.sort_by(f64::total_cmp);
            let (mean, sd) = mean_sd(&v);
            let value = quantity.delta.value;
            let (mut lo, mut hi) = percentile_interval(&v, level);
            let mut se = sd;
            if undefined > 0 {
                let share = undefined as f64 / draws as f64;
                if share > tail {
                    warnings.push(format!(
                        "{}: undefined in {undefined} of {draws} draws, more than the {:.1} % an interval end may leave out; no interval is given (the quantity may not exist for data like these)",
                        quantity.key,
                        100.0 * tail
                    ));
                    lo = f64::NAN;
                    hi = f64::NAN;
                    se = f64::NAN;
                } else {
                    warnings.push(format!(
                        "{}: undefined in {undefined} of {draws} draws; its interval is taken over the others and may be too narrow",
                        quantity.key
                    ));
                }
            }
            let interval = ResampledInterval {
                value,
                se,
                ci_low: lo,
                ci_high: hi,
                method,
            };
            let bca = jackknife.and_then(|jk| {
                if undefined > 0 {
                    return None;
                }
                let jv: Vec<f64> = jk.chunks(nq).map(|c| c[k]).collect();
                if !jv.iter().all(|x| x.is_finite()) {
                    return None;
                }
                bca_interval(&v, value, &jv, level).map(|(l, h)| ResampledInterval {
                    value,
                    se,
                    ci_low: l,
                    ci_high: h,
                    method: IntervalMethod::BootstrapBca,
                })
            });
            QuantityResult {
                quantity,
                mean,
                undefined,
                interval,
                bca,
            }
        })
        .collect()
}
