//! Parametric Monte Carlo after GUM Supplement 1 (JCGM 101:2008): propagate the stated
//! distributions of the inputs through the fit by drawing them and refitting.
//!
//! Draw i (its own generator stream): under "σ are relative weights only" first a χ²_ν
//! deviate c for the scale, s* = s·√(ν/c) (ν = n − p; s² the fit's reduced χ²); then for
//! each used point in input order a standard normal zᵢ, ln K*ᵢ = ln Kᵢ + s*σᵢzᵢ (σᵢ = 1
//! unweighted); then, where σ(T) is given, for each used point a normal z′ᵢ,
//! T*ᵢ = Tᵢ + σ(T)ᵢz′ᵢ. With the temperatures fixed the refit is β* = β̂ + M(ln K* − ln K)
//! ([`super::engine`]). With σ(T) the draws are centred on the fit with errors in T and
//! refitted by it ([`super::montecarlo_t`]); only where that fit cannot be made, a QR refit
//! in K only of the new design.

use super::engine::{apply, linear_map, solve};
use super::quantities::Evaluator;
use super::rng::{DrawRng, SigmaScale};
use super::{
    check_draws, design, quantities, summarise, Draws, IntervalError, IntervalMethod,
    IntervalOptions, IntervalRun, Progress, Resampling, RunWithDraws, BLOCK,
};
use crate::measurement::Measurement;
use crate::model::SigmaConvention;
use crate::vant_hoff::VantHoffFit;
use rayon::prelude::*;

/// Monte Carlo intervals for every quantity of [`quantities`] of `fit`, made from `points`
/// (the same slice, excluded points included). `sigma_t`, when given, holds σ(T) in kelvin
/// for every point of `points` (used for the used ones) and makes each draw draw its
/// temperatures too; the draws are then centred on the fit with errors in T and refitted by
/// it (York's line or the orthogonal-distance fit, [`crate::errors_in_t`]), whose estimates
/// are the values quoted — unless that fit cannot be made (an unweighted fit), when each
/// draw is refitted in K only about the fit that takes T as exact, and a warning says so.
///
/// # Errors
/// [`IntervalError::NoDraws`], [`IntervalError::TooManyDraws`],
/// [`IntervalError::PointsDoNotMatchFit`] (also for a `sigma_t` of another length),
/// [`IntervalError::BadSigmaT`], [`IntervalError::Singular`].
pub fn monte_carlo(
    points: &[Measurement],
    fit: &VantHoffFit,
    sigma_t: Option<&[f64]>,
    options: &IntervalOptions,
) -> Result<IntervalRun, IntervalError> {
    monte_carlo_with(points, fit, sigma_t, options, &Progress::new()).map(|r| r.run)
}

/// [`monte_carlo`] watched by `progress` (draws done; stops when cancelled), with every
/// draw kept. The intervals are [`monte_carlo`]'s, to the last bit.
///
/// # Errors
/// As [`monte_carlo`], and [`IntervalError::Cancelled`].
pub fn monte_carlo_with(
    points: &[Measurement],
    fit: &VantHoffFit,
    sigma_t: Option<&[f64]>,
    options: &IntervalOptions,
    progress: &Progress,
) -> Result<RunWithDraws, IntervalError> {
    check_draws(options.draws)?;
    let (d, used) = design(points, fit)?;
    let sigma_t_all = sigma_t;
    let sigma_t: Option<Vec<f64>> = match sigma_t {
        None => None,
        Some(s) => {
            if s.len() != points.len() {
                return Err(IntervalError::PointsDoNotMatchFit {
                    fit: points.len(),
                    given: s.len(),
                });
            }
            for &i in &used {
                if !(s[i].is_finite() && s[i] > 0.0) {
                    return Err(IntervalError::BadSigmaT {
                        index: i,
                        value: s[i],
                    });
                }
            }
            Some(used.iter().map(|&i| s[i]).collect())
        }
    };
    let qs = quantities(fit, &options.temperatures, &options.k_targets);
    // With σ(T) the draws are centred on the fit with errors in T and refitted by it
    // ([`super::montecarlo_t`]); only when that fit cannot be made (an unweighted fit) are
    // they refitted in K only about the fit that takes T as exact, as below.
    if let (Some(st), Some(all)) = (&sigma_t, sigma_t_all) {
        if fit.weighted() {
            if let Ok(eiv) = crate::errors_in_t::fit_errors_in_t(points, all, &fit.options()) {
                return super::montecarlo_t::run(points, fit, &eiv, st, qs, options, progress);
            }
        }
    }
    let m = linear_map(&d).ok_or(IntervalError::Singular)?;
    let beta = fit.coefficients();
    let p = beta.len();
    let n = d.n();
    let nq = qs.len();
    let ev = Evaluator::new(fit);
    let prepared: Vec<_> = qs.iter().map(|q| ev.prepare(q)).collect();
    let scaled = fit.options().convention == SigmaConvention::ScaledByFit || !fit.weighted();
    let s = fit.variance_scale().sqrt();
    let nu = fit.dof() as f64;
    let sigma: Vec<f64> = d.w.iter().map(|w| 1.0 / w.sqrt()).collect();
    let scale = SigmaScale::new(scaled, s, nu)?;
    let seed = options.seed;

    let mut values = vec![0.0; options.draws * nq];
    // Blocks of BLOCK draws: a look at the cancel flag before each, the counter after it.
    values.par_chunks_mut(nq * BLOCK).enumerate().for_each_init(
        || (vec![0.0; n], vec![0.0; n], vec![0.0; p]),
        |(delta, t_star, b), (block, outs)| {
            if progress.is_cancelled() {
                return;
            }
            for (j, out) in outs.chunks_mut(nq).enumerate() {
                let i = block * BLOCK + j;
                let mut rng = DrawRng::new(seed, i as u64);
                let factor = scale.draw(&mut rng);
                for (dl, sg) in delta.iter_mut().zip(&sigma) {
                    *dl = factor * sg * rng.normal();
                }
                let ok = match &sigma_t {
                    None => {
                        apply(&m, &beta, delta, b);
                        true
                    }
                    Some(st) => {
                        for k in 0..n {
                            t_star[k] = d.t[k] + st[k] * rng.normal();
                        }
                        let y: Vec<f64> =
                            d.y.iter().zip(delta.iter()).map(|(y, e)| y + e).collect();
                        match solve(d.model, d.theta, t_star, &y, &d.w) {
                            Some(sol) => {
                                b.copy_from_slice(&sol);
                                true
                            }
                            None => false,
                        }
                    }
                };
                for ((o, q), pq) in out.iter_mut().zip(&qs).zip(&prepared) {
                    *o = if ok {
                        ev.value_prepared(pq, q, b)
                    } else {
                        f64::NAN
                    };
                }
            }
            progress.add(outs.len() / nq.max(1));
        },
    );
    if progress.is_cancelled() {
        return Err(IntervalError::Cancelled);
    }

    let mut warnings = Vec::new();
    if scaled {
        warnings.push(format!(
            "σ are relative weights only: each draw scaled the σ by the fit's residual SD, itself drawn from its χ² distribution with {} degrees of freedom",
            fit.dof()
        ));
    }
    if sigma_t.is_some() {
        warnings.push(
            "temperatures were drawn with their σ(T) and each draw refitted in K only, since the fit with errors in T could not be made (it needs σ(ln K) on every point); the central values are those of the fit that takes T as exact".into(),
        );
    }
    let level = fit.options().level;
    let quantities = summarise(
        qs,
        &values,
        None,
        level,
        IntervalMethod::MonteCarlo,
        &mut warnings,
    );
    let run = IntervalRun {
        resampling: Resampling::MonteCarlo,
        draws: options.draws,
        seed,
        level,
        redrawn: 0,
        quantities,
        warnings,
    };
    Ok(RunWithDraws {
        run,
        draws: Draws::new(nq, values),
    })
}
