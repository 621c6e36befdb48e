//! The bootstrap: new data sets made from the fit's own residuals or points, refitted with
//! the same model and weights (schemes in [`BootstrapScheme`]), with percentile and BCa
//! intervals (Efron 1987). The BCa acceleration comes from the jackknife over the used
//! points, β₍ᵢ₎ = β̂ − M₍:,ᵢ₎ eᵢ/(1 − hᵢ) (the exact leave-one-out coefficients of weighted
//! least squares; Cook & Weisberg 1982, §3.4), evaluated for every quantity.
//!
//! Draw i (its own generator stream): residuals, n indices in turn; wild, n signs in turn;
//! cases, n indices in turn, and again from the same stream while the resample is singular.
//! The bootstrap takes the size of the errors from the scatter about the fit; under "σ are
//! known standard uncertainties" it does not use the stated σ as a scale, only as weights.

use super::engine::{apply, linear_map, solve};
use super::quantities::Evaluator;
use super::rng::DrawRng;
use super::{
    check_draws, design, quantities, summarise, BootstrapScheme, Draws, IntervalError,
    IntervalMethod, IntervalOptions, IntervalRun, Progress, Resampling, RunWithDraws, BLOCK,
    CASES_WARN_BELOW,
};
use crate::measurement::Measurement;
use crate::model::SigmaConvention;
use crate::vant_hoff::VantHoffFit;
use rayon::prelude::*;

/// Most attempts at a non-singular case resample before a draw counts as undefined.
const MAX_REDRAWS: usize = 1000;

/// 1/√(1 − h), 0 where h is 1 to rounding (such a point's residual is 0 anyway).
fn leverage_factor(h: f64) -> f64 {
    if 1.0 - h > 1e-12 {
        1.0 / (1.0 - h).sqrt()
    } else {
        0.0
    }
}

/// Bootstrap intervals for every quantity of [`quantities`] of `fit`, made from `points`
/// (the same slice, excluded points included).
///
/// # Errors
/// [`IntervalError::NoDraws`], [`IntervalError::TooManyDraws`],
/// [`IntervalError::TooFewPointsForBootstrap`] (fewer than p + 2 used points),
/// [`IntervalError::PointsDoNotMatchFit`], [`IntervalError::Singular`].
pub fn bootstrap(
    points: &[Measurement],
    fit: &VantHoffFit,
    scheme: BootstrapScheme,
    options: &IntervalOptions,
) -> Result<IntervalRun, IntervalError> {
    bootstrap_with(points, fit, scheme, options, &Progress::new()).map(|r| r.run)
}

/// [`bootstrap`] watched by `progress` (draws done; stops when cancelled), with every draw
/// kept. The intervals are [`bootstrap`]'s, to the last bit.
///
/// # Errors
/// As [`bootstrap`], and [`IntervalError::Cancelled`].
pub fn bootstrap_with(
    points: &[Measurement],
    fit: &VantHoffFit,
    scheme: BootstrapScheme,
    options: &IntervalOptions,
    progress: &Progress,
) -> Result<RunWithDraws, IntervalError> {
    check_draws(options.draws)?;
    let (d, _) = design(points, fit)?;
    let (n, p) = (d.n(), d.p());
    if n < p + 2 {
        return Err(IntervalError::TooFewPointsForBootstrap {
            points: n,
            needed: p + 2,
        });
    }
    let m = linear_map(&d).ok_or(IntervalError::Singular)?;
    let beta = fit.coefficients();
    let qs = quantities(fit, &options.temperatures, &options.k_targets);
    let nq = qs.len();
    let ev = Evaluator::new(fit);
    let prepared: Vec<_> = qs.iter().map(|q| ev.prepare(q)).collect();
    let seed = options.seed;
    let sqrt_w: Vec<f64> = d.w.iter().map(|w| w.sqrt()).collect();
    let lev: Vec<f64> = d.h.iter().map(|&h| leverage_factor(h)).collect();
    // Leverage-corrected, whitened residuals, centred.
    let mut u: Vec<f64> = (0..n).map(|i| sqrt_w[i] * d.e[i] * lev[i]).collect();
    let u_mean = u.iter().sum::<f64>() / n as f64;
    u.iter_mut().for_each(|x| *x -= u_mean);

    let mut values = vec![0.0; options.draws * nq];
    // Blocks of BLOCK draws: a look at the cancel flag before each, the counter after it.
    let redrawn: usize = values
        .par_chunks_mut(nq * BLOCK)
        .enumerate()
        .map_init(
            || {
                (
                    vec![0.0; n],
                    vec![0.0; n],
                    vec![0.0; n],
                    vec![0.0; n],
                    vec![0.0; p],
                )
            },
            |(delta, t, y, w, b), (block, outs)| {
                if progress.is_cancelled() {
                    return 0;
                }
                let mut redraws = 0usize;
                for (j, out) in outs.chunks_mut(nq).enumerate() {
                    let i = block * BLOCK + j;
                    let mut rng = DrawRng::new(seed, i as u64);
                    let mut tries = 0usize;
                    let ok = match scheme {
                        BootstrapScheme::Residuals => {
                            for k in 0..n {
                                delta[k] = u[rng.index(n)] / sqrt_w[k];
                            }
                            apply(&m, &beta, delta, b);
                            true
                        }
                        BootstrapScheme::Wild => {
                            for k in 0..n {
                                delta[k] = rng.sign() * d.e[k] * lev[k];
                            }
                            apply(&m, &beta, delta, b);
                            true
                        }
                        BootstrapScheme::Cases => loop {
                            for k in 0..n {
                                let j = rng.index(n);
                                t[k] = d.t[j];
                                y[k] = d.y[j];
                                w[k] = d.w[j];
                            }
                            if let Some(sol) = solve(d.model, d.theta, t, y, w) {
                                b.copy_from_slice(&sol);
                                break true;
                            }
                            tries += 1;
                            if tries >= MAX_REDRAWS {
                                break false;
                            }
                        },
                    };
                    redraws += tries;
                    for ((o, q), pq) in out.iter_mut().zip(&qs).zip(&prepared) {
                        *o = if ok {
                            ev.value_prepared(pq, q, b)
                        } else {
                            f64::NAN
                        };
                    }
                }
                progress.add(outs.len() / nq.max(1));
                redraws
            },
        )
        .sum();
    if progress.is_cancelled() {
        return Err(IntervalError::Cancelled);
    }

    // The jackknife, for the BCa acceleration.
    let mut jack = vec![0.0; n * nq];
    let mut b = vec![0.0; p];
    let mut one = vec![0.0; n];
    for i in 0..n {
        one.iter_mut().for_each(|x| *x = 0.0);
        let h = d.h[i];
        one[i] = if 1.0 - h > 1e-12 {
            -d.e[i] / (1.0 - h)
        } else {
            f64::NAN
        };
        apply(&m, &beta, &one, &mut b);
        for (k, q) in qs.iter().enumerate() {
            jack[i * nq + k] = if b.iter().all(|v| v.is_finite()) {
                ev.value(q, &b)
            } else {
                f64::NAN
            };
        }
    }

    let mut warnings = Vec::new();
    if scheme == BootstrapScheme::Cases && n < CASES_WARN_BELOW {
        warnings.push(format!(
            "case resampling with only {n} points draws designs with few distinct temperatures, which spread the estimates more than the data do; prefer resampling residuals or the wild bootstrap"
        ));
    }
    if redrawn > 0 {
        warnings.push(format!(
            "{redrawn} case resamples were singular (too few distinct temperatures) and were drawn again"
        ));
    }
    if fit.weighted() && fit.options().convention == SigmaConvention::Absolute {
        warnings.push(
            "the bootstrap takes the size of the errors from the scatter about the fit, not from the stated σ (which serve as relative weights only here)".into(),
        );
    }
    let level = fit.options().level;
    let quantities = summarise(
        qs,
        &values,
        Some(&jack),
        level,
        IntervalMethod::BootstrapPercentile,
        &mut warnings,
    );
    let run = IntervalRun {
        resampling: Resampling::Bootstrap(scheme),
        draws: options.draws,
        seed,
        level,
        redrawn,
        quantities,
        warnings,
    };
    Ok(RunWithDraws {
        run,
        draws: Draws::new(nq, values),
    })
}
