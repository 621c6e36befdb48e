//! Monte Carlo with σ(T), centred on the fit with errors in T (issue 13): when the
//! temperatures carry σ(T) the measurand is the fit that allows for it (York's line for the
//! linear model, the orthogonal-distance fit otherwise, [`crate::errors_in_t`]), so each
//! draw is refitted by that same method, and the values quoted are its estimates.
//!
//! Draw i (its own generator stream): under "σ are relative weights only" first a χ²_ν
//! deviate c, and the factor f = √(S/ν)·√(ν/c) (S the fit's minimised sum, ν = n − p; both
//! σ(ln K) and σ(T) are relative then, as the fit's covariance treats them); f = 1 under
//! "σ are known standard uncertainties". Then for each used point in input order a normal
//! zᵢ, ln K*ᵢ = ln Kᵢ + f·σᵢzᵢ, and for each used point a normal z′ᵢ, T*ᵢ = Tᵢ + f·σ(T)ᵢz′ᵢ;
//! then the fit with errors in T of (T*, ln K*), started from the fit's coefficients. A draw
//! whose refit does not settle is counted as undefined.
//!
//! The delta-method estimate beside each quantity is the fit with errors in T's: its
//! parameters as they are, every other quantity at its coefficients with the SE from its
//! covariance (a central-difference gradient) and a symmetric interval at its critical
//! value. For the temperatures at a target K and where ΔH° = 0 that is the delta method,
//! not Fieller's interval.

use super::quantities::{Evaluator, Quantity, QuantityKind};
use super::rng::{DrawRng, SigmaScale};
use super::{
    design, summarise, Draws, IntervalError, IntervalMethod, IntervalOptions, IntervalRun,
    Progress, Resampling, RunWithDraws, BLOCK,
};
use crate::errors_in_t::{coefficients, ErrorsInTFit};
use crate::measurement::Measurement;
use crate::model::SigmaConvention;
use crate::vant_hoff::{Estimate, VantHoffFit};
use rayon::prelude::*;

/// The run of [`super::monte_carlo_with`] when σ(T) is given and the fit with errors in T
/// `eiv` of the same points could be made. `sigma_t` is the checked σ(T) of the used
/// points, in input order; `qs` the K-only fit's quantities.
pub(super) fn run(
    points: &[Measurement],
    fit: &VantHoffFit,
    eiv: &ErrorsInTFit,
    sigma_t: &[f64],
    mut qs: Vec<Quantity>,
    options: &IntervalOptions,
    progress: &Progress,
) -> Result<RunWithDraws, IntervalError> {
    let (d, _) = design(points, fit)?;
    let centre: Vec<f64> = eiv.params().iter().map(|p| p.estimate.value).collect();
    let ev = Evaluator::new(fit);
    centre_on(&mut qs, eiv, &centre, &ev);
    let nq = qs.len();
    let prepared: Vec<_> = qs.iter().map(|q| ev.prepare(q)).collect();
    let n = d.n();
    let scaled = eiv.convention() == SigmaConvention::ScaledByFit;
    let nu = eiv.dof() as f64;
    let s = if nu > 0.0 {
        (eiv.chi2() / nu).sqrt()
    } else {
        1.0
    };
    let sigma: Vec<f64> = d.w.iter().map(|w| 1.0 / w.sqrt()).collect();
    let scale = SigmaScale::new(scaled, s, nu)?;
    let seed = options.seed;

    let mut values = vec![0.0; options.draws * nq];
    values.par_chunks_mut(nq * BLOCK).enumerate().for_each_init(
        || (vec![0.0; n], vec![0.0; n]),
        |(y_star, t_star), (block, outs)| {
            if progress.is_cancelled() {
                return;
            }
            for (j, out) in outs.chunks_mut(nq).enumerate() {
                let i = block * BLOCK + j;
                let mut rng = DrawRng::new(seed, i as u64);
                let factor = scale.draw(&mut rng);
                for k in 0..n {
                    y_star[k] = d.y[k] + factor * sigma[k] * rng.normal();
                }
                for k in 0..n {
                    t_star[k] = d.t[k] + factor * sigma_t[k] * rng.normal();
                }
                let b = coefficients(d.model, d.theta, t_star, y_star, &sigma, sigma_t, &centre);
                for ((o, q), pq) in out.iter_mut().zip(&qs).zip(&prepared) {
                    *o = match &b {
                        Some(b) => ev.value_prepared(pq, q, b),
                        None => f64::NAN,
                    };
                }
            }
            progress.add(outs.len() / nq.max(1));
        },
    );
    if progress.is_cancelled() {
        return Err(IntervalError::Cancelled);
    }
    let mut warnings = vec![format!(
        "temperatures were drawn with their σ(T) and each draw refitted by {} (the fit with errors in T); the values and the delta-method estimates beside the draws are that fit's, not the fit in K only's",
        match eiv.method() {
            crate::errors_in_t::ErrorsInTMethod::York => "York's fit",
            crate::errors_in_t::ErrorsInTMethod::OrthogonalDistance => "the orthogonal-distance fit",
        }
    )];
    if scaled {
        warnings.push(format!(
            "σ are relative weights only: each draw scaled σ(ln K) and σ(T) by the fit with errors in T's √(S/(n − p)), itself drawn from its χ² distribution with {} degrees of freedom",
            eiv.dof()
        ));
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
    Ok(RunWithDraws {
        run: IntervalRun {
            resampling: Resampling::MonteCarlo,
            draws: options.draws,
            seed,
            level,
            redrawn: 0,
            quantities,
            warnings,
        },
        draws: Draws::new(nq, values),
    })
}

/// Replaces each quantity's delta-method estimate by the fit with errors in T's.
fn centre_on(qs: &mut [Quantity], eiv: &ErrorsInTFit, centre: &[f64], ev: &Evaluator) {
    let cov = eiv.covariance();
    let crit = eiv.critical_value();
    let p = centre.len();
    for q in qs.iter_mut() {
        q.delta_method = IntervalMethod::Delta;
        if let QuantityKind::Parameter { index } = q.kind {
            q.delta = eiv.params()[index].estimate;
            continue;
        }
        let value = ev.value(q, centre);
        // Central differences, a step of 10⁻⁶ of each coefficient's SE.
        let grad: Vec<f64> = (0..p)
            .map(|j| {
                let h = 1e-6 * cov[j][j].sqrt().max(f64::MIN_POSITIVE);
                let mut up = centre.to_vec();
                let mut down = centre.to_vec();
                up[j] += h;
                down[j] -= h;
                (ev.value(q, &up) - ev.value(q, &down)) / (2.0 * h)
            })
            .collect();
        let var: f64 = (0..p)
            .flat_map(|a| (0..p).map(move |b| (a, b)))
            .map(|(a, b)| grad[a] * cov[a][b] * grad[b])
            .sum();
        q.delta = Estimate::symmetric(value, var.max(0.0).sqrt(), crit);
    }
}
