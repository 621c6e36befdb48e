//! Resampled intervals for a joint fit of several series ([`crate::global::fit_global`]):
//! parametric Monte Carlo and the bootstrap (residuals with the leverage correction, or the
//! wild bootstrap), each draw refitting the whole block design at once.
//!
//! The quantities are the columns of the block design (every shared parameter, and every
//! parameter of each series' own) in column order, then every difference between series of
//! every parameter fitted per series ([`GlobalFit::differences`]'s order). All are linear in
//! the coefficients, and the temperatures stay fixed, so each refit is β* = β̂ + M δ with M
//! = (XᵀWX)⁻¹XᵀW of the block design X, taken once by Householder QR as for a single series
//! ([`super::engine`]).
//!
//! Draw i reads its own generator stream (seed, i) as a single series' run does:
//! - Monte Carlo: under "σ are relative weights only" (or unweighted) first a χ²_ν deviate c
//!   for the scale, s* = s·√(ν/c) (ν = the joint fit's residual degrees of freedom, s² its
//!   reduced χ², pooled over every series); then for each used point, series by series in
//!   input order, a standard normal zᵢ, ln K*ᵢ = ln Kᵢ + s*σᵢzᵢ. Under "σ are known
//!   standard uncertainties" σᵢ as stated.
//! - Bootstrap, residuals: for each used point an index j over all series' used points, the
//!   whitened, leverage-corrected, centred residual uⱼ = √wⱼ eⱼ/√(1 − hⱼ) − ū put back as
//!   uⱼ/√wᵢ. The residuals are pooled over the series, as the joint fit pools one residual
//!   variance. Wild: a Rademacher sign per point on its own eᵢ/√(1 − hᵢ).
//! - Case resampling is refused for a joint fit (a resample could leave a series without
//!   the points its own parameters need).

use super::engine::{apply, linear_map_of};
use super::rng::{DrawRng, SigmaScale};
use super::{
    check_draws, summarise, BootstrapScheme, Draws, IntervalError, IntervalMethod, IntervalOptions,
    IntervalRun, Progress, Quantity, QuantityKind, Resampling, BLOCK,
};
use crate::global::{block_system, GlobalFit, SeriesInput};
use crate::model::SigmaConvention;
use rayon::prelude::*;
use serde::Serialize;

/// What a quantity of a joint run is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case", tag = "kind")]
pub enum JointTarget {
    /// A parameter shared by every series.
    Shared {
        /// The parameter's key.
        key: &'static str,
    },
    /// A parameter of one series' own.
    Series {
        /// The parameter's key.
        key: &'static str,
        /// The series (0-based).
        series: usize,
    },
    /// A parameter of series `a` minus that of series `b`.
    Difference {
        /// The parameter's key.
        key: &'static str,
        /// The first series (0-based).
        a: usize,
        /// The second series (0-based).
        b: usize,
    },
}

impl JointTarget {
    /// The parameter's key.
    pub fn key(&self) -> &'static str {
        match *self {
            JointTarget::Shared { key }
            | JointTarget::Series { key, .. }
            | JointTarget::Difference { key, .. } => key,
        }
    }
}

/// A joint fit's run: the intervals (quantities in the order of [`JointRun::targets`]),
/// what each quantity is, and every draw.
#[derive(Debug, Clone, PartialEq)]
pub struct JointRun {
    /// The run; `run.quantities[k]` is `targets[k]`, its key the column's label (or the two
    /// series' for a difference), its `delta` the joint fit's own estimate.
    pub run: IntervalRun,
    /// What each quantity is.
    pub targets: Vec<JointTarget>,
    /// Every draw of every quantity.
    pub draws: Draws,
}

impl JointRun {
    /// The result of `target`, if the run has it.
    pub fn get(&self, target: &JointTarget) -> Option<&super::QuantityResult> {
        let k = self.targets.iter().position(|t| t == target)?;
        self.run.quantities.get(k)
    }
}

/// A quantity as the columns of β it combines: (column, weight).
type Combo = Vec<(usize, f64)>;

/// The quantities of `fit` with the columns of β each combines.
fn joint_quantities(fit: &GlobalFit) -> (Vec<Quantity>, Vec<JointTarget>, Vec<Combo>) {
    let mut qs = Vec::new();
    let mut targets = Vec::new();
    let mut combos = Vec::new();
    let index_of = |key: &str| {
        fit.model()
            .params()
            .iter()
            .position(|p| p.key == key)
            .unwrap_or(0)
    };
    let name = |s: usize| match fit.series_label(s).unwrap_or("") {
        "" => format!("series {}", s + 1),
        l => format!("series {} (\"{l}\")", s + 1),
    };
    let column = |key: &str, s: usize| {
        fit.columns()
            .iter()
            .position(|c| c.key() == key && c.series() == Some(s))
    };
    for (j, (c, e)) in fit.columns().iter().zip(fit.estimates()).enumerate() {
        qs.push(Quantity {
            key: c.label().to_string(),
            kind: QuantityKind::Parameter {
                index: index_of(c.key()),
            },
            delta: *e,
            delta_method: IntervalMethod::Delta,
        });
        targets.push(match c.series() {
            None => JointTarget::Shared { key: c.key() },
            Some(series) => JointTarget::Series {
                key: c.key(),
                series,
            },
        });
        combos.push(vec![(j, 1.0)]);
    }
    for d in fit.differences() {
        let k = index_of(d.key);
        let (Some(ca), Some(cb)) = (column(d.key, d.a), column(d.key, d.b)) else {
            continue;
        };
        qs.push(Quantity {
            key: format!("{} [{} − {}]", d.key, name(d.a), name(d.b)),
            kind: QuantityKind::Parameter { index: k },
            delta: d.estimate,
            delta_method: IntervalMethod::Delta,
        });
        targets.push(JointTarget::Difference {
            key: d.key,
            a: d.a,
            b: d.b,
        });
        combos.push(vec![(ca, 1.0), (cb, -1.0)]);
    }
    (qs, targets, combos)
}

/// The fixed parts of a run: the map, the weights, residuals and leverages of the used rows.
struct System {
    m: Vec<f64>,
    w: Vec<f64>,
    e: Vec<f64>,
    h: Vec<f64>,
}

fn system(series: &[SeriesInput<'_>], fit: &GlobalFit) -> Result<System, IntervalError> {
    if series.len() != fit.n_series() {
        return Err(IntervalError::PointsDoNotMatchFit {
            fit: fit.n_series(),
            given: series.len(),
        });
    }
    for (s, input) in series.iter().enumerate() {
        let n_fit = fit.points(s).map_or(0, <[_]>::len);
        if input.points.len() != n_fit {
            return Err(IntervalError::PointsDoNotMatchFit {
                fit: n_fit,
                given: input.points.len(),
            });
        }
    }
    let (rows, _y, weights, x) = block_system(series, fit).map_err(|_| IntervalError::Singular)?;
    let w = weights.unwrap_or_else(|| vec![1.0; rows.len()]);
    let m = linear_map_of(&x, &w).ok_or(IntervalError::Singular)?;
    let mut e = Vec::with_capacity(rows.len());
    let mut h = Vec::with_capacity(rows.len());
    for &(s, i) in &rows {
        let d = fit
            .points(s)
            .and_then(|p| p.get(i))
            .ok_or(IntervalError::Singular)?;
        e.push(d.residual);
        h.push(d.leverage);
    }
    Ok(System { m, w, e, h })
}

/// Runs the draws: `fill(rng, delta)` writes draw i's perturbation of ln K into `delta`.
fn run_draws(
    sys: &System,
    beta: &[f64],
    combos: &[Combo],
    options: &IntervalOptions,
    progress: &Progress,
    fill: impl Fn(&mut DrawRng, &mut [f64]) + Sync,
) -> Result<Vec<f64>, IntervalError> {
    let (n, p, nq) = (sys.w.len(), beta.len(), combos.len());
    let seed = options.seed;
    let mut values = vec![0.0; options.draws * nq];
    values.par_chunks_mut(nq * BLOCK).enumerate().for_each_init(
        || (vec![0.0; n], vec![0.0; p]),
        |(delta, b), (block, outs)| {
            if progress.is_cancelled() {
                return;
            }
            for (j, out) in outs.chunks_mut(nq).enumerate() {
                let i = block * BLOCK + j;
                let mut rng = DrawRng::new(seed, i as u64);
                fill(&mut rng, delta);
                apply(&sys.m, beta, delta, b);
                for (o, c) in out.iter_mut().zip(combos) {
                    *o = c.iter().map(|&(col, wt)| wt * b[col]).sum();
                }
            }
            progress.add(outs.len() / nq.max(1));
        },
    );
    if progress.is_cancelled() {
        return Err(IntervalError::Cancelled);
    }
    Ok(values)
}

/// Monte Carlo intervals for every parameter of the joint fit `fit` and every difference
/// between series, made from `series` (the inputs of the fit, excluded points included).
///
/// # Errors
/// [`IntervalError::NoDraws`], [`IntervalError::TooManyDraws`],
/// [`IntervalError::PointsDoNotMatchFit`] (other series or points than the fit's),
/// [`IntervalError::Singular`], [`IntervalError::Cancelled`].
pub fn joint_monte_carlo(
    series: &[SeriesInput<'_>],
    fit: &GlobalFit,
    options: &IntervalOptions,
    progress: &Progress,
) -> Result<JointRun, IntervalError> {
    check_draws(options.draws)?;
    let sys = system(series, fit)?;
    let (qs, targets, combos) = joint_quantities(fit);
    let scaled = fit.options().convention == SigmaConvention::ScaledByFit || !fit.weighted();
    let s = fit.variance_scale().sqrt();
    let nu = fit.dof() as f64;
    let sigma: Vec<f64> = sys.w.iter().map(|w| 1.0 / w.sqrt()).collect();
    let scale = SigmaScale::new(scaled, s, nu)?;
    let beta = fit.coefficients();
    let values = run_draws(&sys, &beta, &combos, options, progress, |rng, delta| {
        let factor = scale.draw(rng);
        for (dl, sg) in delta.iter_mut().zip(&sigma) {
            *dl = factor * sg * rng.normal();
        }
    })?;
    let mut warnings = Vec::new();
    if scaled {
        warnings.push(format!(
            "σ are relative weights only: each draw scaled the σ by the joint fit's residual SD (pooled over the series), itself drawn from its χ² distribution with {} degrees of freedom",
            fit.dof()
        ));
    }
    Ok(finish(
        fit,
        qs,
        targets,
        values,
        None,
        Resampling::MonteCarlo,
        IntervalMethod::MonteCarlo,
        options,
        warnings,
    ))
}

/// 1/√(1 − h), 0 where h is 1 to rounding (such a point's residual is 0 anyway).
fn leverage_factor(h: f64) -> f64 {
    if 1.0 - h > 1e-12 {
        1.0 / (1.0 - h).sqrt()
    } else {
        0.0
    }
}

/// Bootstrap intervals (percentile, and BCa where defined) for every parameter of the joint
/// fit `fit` and every difference between series, made from `series` (the inputs of the
/// fit). Schemes: residuals and wild; cases are refused.
///
/// # Errors
/// As [`joint_monte_carlo`]; [`IntervalError::TooFewPointsForBootstrap`] below columns + 2
/// used points; [`IntervalError::NotForJointFit`] for case resampling.
pub fn joint_bootstrap(
    series: &[SeriesInput<'_>],
    fit: &GlobalFit,
    scheme: BootstrapScheme,
    options: &IntervalOptions,
    progress: &Progress,
) -> Result<JointRun, IntervalError> {
    check_draws(options.draws)?;
    if scheme == BootstrapScheme::Cases {
        return Err(IntervalError::NotForJointFit(
            "case resampling of a joint fit could leave a series without the points its own parameters need; use the residual or wild bootstrap, or Monte Carlo",
        ));
    }
    let sys = system(series, fit)?;
    let (n, p) = (sys.w.len(), fit.n_params());
    if n < p + 2 {
        return Err(IntervalError::TooFewPointsForBootstrap {
            points: n,
            needed: p + 2,
        });
    }
    let (qs, targets, combos) = joint_quantities(fit);
    let beta = fit.coefficients();
    let sqrt_w: Vec<f64> = sys.w.iter().map(|w| w.sqrt()).collect();
    let lev: Vec<f64> = sys.h.iter().map(|&h| leverage_factor(h)).collect();
    let mut u: Vec<f64> = (0..n).map(|i| sqrt_w[i] * sys.e[i] * lev[i]).collect();
    let u_mean = u.iter().sum::<f64>() / n as f64;
    u.iter_mut().for_each(|x| *x -= u_mean);
    let values = run_draws(
        &sys,
        &beta,
        &combos,
        options,
        progress,
        |rng, delta| match scheme {
            BootstrapScheme::Wild => {
                for k in 0..n {
                    delta[k] = rng.sign() * sys.e[k] * lev[k];
                }
            }
            _ => {
                for k in 0..n {
                    delta[k] = u[rng.index(n)] / sqrt_w[k];
                }
            }
        },
    )?;
    // The jackknife for the BCa acceleration: the exact leave-one-out coefficients
    // β₍ᵢ₎ = β̂ − M₍:,ᵢ₎ eᵢ/(1 − hᵢ) over every used point of every series.
    let nq = combos.len();
    let mut jack = vec![0.0; n * nq];
    let mut b = vec![0.0; p];
    let mut one = vec![0.0; n];
    for i in 0..n {
        one.iter_mut().for_each(|x| *x = 0.0);
        let h = sys.h[i];
        one[i] = if 1.0 - h > 1e-12 {
            -sys.e[i] / (1.0 - h)
        } else {
            f64::NAN
        };
        apply(&sys.m, &beta, &one, &mut b);
        for (k, c) in combos.iter().enumerate() {
            jack[i * nq + k] = c.iter().map(|&(col, wt)| wt * b[col]).sum();
        }
    }
    let mut warnings = vec![
        "the bootstrap resampled the residuals of every series together, as the joint fit pools one residual variance".to_string(),
    ];
    if fit.weighted() && fit.options().convention == SigmaConvention::Absolute {
        warnings.push(
            "the bootstrap takes the size of the errors from the scatter about the fit, not from the stated σ (which serve as relative weights only here)".into(),
        );
    }
    Ok(finish(
        fit,
        qs,
        targets,
        values,
        Some(&jack),
        Resampling::Bootstrap(scheme),
        IntervalMethod::BootstrapPercentile,
        options,
        warnings,
    ))
}

#[allow(clippy::too_many_arguments)]
fn finish(
    fit: &GlobalFit,
    qs: Vec<Quantity>,
    targets: Vec<JointTarget>,
    values: Vec<f64>,
    jackknife: Option<&[f64]>,
    resampling: Resampling,
    method: IntervalMethod,
    options: &IntervalOptions,
    mut warnings: Vec<String>,
) -> JointRun {
    let nq = qs.len();
    let level = fit.options().level;
    let quantities = summarise(qs, &values, jackknife, level, method, &mut warnings);
    JointRun {
        run: IntervalRun {
            resampling,
            draws: options.draws,
            seed: options.seed,
            level,
            redrawn: 0,
            quantities,
            warnings,
        },
        targets,
        draws: Draws::new(nq, values),
    }
}
