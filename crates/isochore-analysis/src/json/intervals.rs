//! The JSON of a fit whose intervals were made by Monte Carlo or the bootstrap (`vhfit fit
//! --intervals monte-carlo|bootstrap --json`): the same document as the delta method's, with
//! every parameter's `{value, se, ci_low, ci_high, method}`, `t_at_k1` and `t_delta_h_zero`
//! taken from the run (`se` the SD of the draws; the interval BCa where defined, else
//! percentile or Monte Carlo, as `method` says; `t_delta_h_zero.words` stay Fieller's), and an `intervals` object recording the method, draws, seed and
//! every quantity of the run with the delta method's estimate beside it.

use super::{EstimateJson, FitJson, Nulls};
use crate::dataset::PreparedSet;
use isochore_fit::intervals::{IntervalRun, Resampling};
use isochore_fit::VantHoffFit;
use serde::Serialize;
use std::io::{self, Write};

/// One quantity of `intervals.quantities`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct QuantityJson {
    /// The key: a parameter's key, `delta_g_at_reference`, `k_at_t_hm`, `t_at_k1`,
    /// `t_delta_h_zero`, …
    pub key: String,
    /// Temperature (K) the quantity is taken at, where it has one.
    pub t_k: Option<f64>,
    /// The interval quoted (BCa where defined for the bootstrap).
    pub estimate: EstimateJson,
    /// The percentile interval of the bootstrap, beside its BCa (null for Monte Carlo).
    pub percentile: Option<EstimateJson>,
    /// Mean of the draws.
    pub mean_of_draws: Option<f64>,
    /// Draws in which the quantity was undefined.
    pub undefined_draws: usize,
    /// The delta method's estimate (Fieller's interval for `t_at_k…` and `t_delta_h_zero`).
    pub delta: EstimateJson,
}

/// `intervals`: what made the intervals and every quantity of the run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IntervalsJson {
    /// "monte_carlo" or "bootstrap".
    pub method: &'static str,
    /// The bootstrap's scheme: "residuals", "wild_rademacher", "cases"; null for Monte
    /// Carlo.
    pub scheme: Option<&'static str>,
    /// Number of draws.
    pub draws: usize,
    /// The seed of the generator (ChaCha8, one stream per draw).
    pub seed: u64,
    /// Case resamples that were singular and drawn again.
    pub redrawn: usize,
    /// Every quantity.
    pub quantities: Vec<QuantityJson>,
}

fn t_of(kind: &isochore_fit::intervals::QuantityKind) -> Option<f64> {
    use isochore_fit::intervals::QuantityKind::*;
    match *kind {
        DeltaG { t_k } | DeltaH { t_k } | DeltaS { t_k } | K { t_k } => Some(t_k),
        _ => None,
    }
}

/// Puts the run's intervals into `doc` (the delta-method document of the same fit).
pub fn apply(doc: &mut FitJson<'_>, run: &IntervalRun) {
    let mut n = Nulls::new();
    for (key, e) in doc.params.0.iter_mut() {
        if let Some(q) = run.get(key) {
            let best = q.best();
            *e = n.estimate_with(key, &best.estimate(), best.method.key());
        }
    }
    // The value too: the fit's own without σ(T) (the same number), the fit with errors in
    // T's when Monte Carlo was centred on it.
    if let (Some(t), Some(q)) = (doc.t_at_k1.as_mut(), run.get("t_at_k1")) {
        let best = q.best();
        t.value = best.value.is_finite().then_some(best.value);
        t.se = best.se.is_finite().then_some(best.se);
        t.ci_low = best.ci_low.is_finite().then_some(best.ci_low);
        t.ci_high = best.ci_high.is_finite().then_some(best.ci_high);
        t.method = best.method.key();
    }
    if let (Some(t), Some(q)) = (doc.t_delta_h_zero.as_mut(), run.get("t_delta_h_zero")) {
        let best = q.best();
        t.value = best.value.is_finite().then_some(best.value);
        t.se = best.se.is_finite().then_some(best.se);
        t.ci_low = best.ci_low.is_finite().then_some(best.ci_low);
        t.ci_high = best.ci_high.is_finite().then_some(best.ci_high);
        t.method = best.method.key();
    }
    let quantities = run
        .quantities
        .iter()
        .map(|q| {
            let best = q.best();
            QuantityJson {
                key: q.quantity.key.clone(),
                t_k: t_of(&q.quantity.kind),
                estimate: n.estimate_with(&q.quantity.key, &best.estimate(), best.method.key()),
                percentile: q.bca.map(|_| {
                    n.estimate_with(
                        &format!("{}.percentile", q.quantity.key),
                        &q.interval.estimate(),
                        q.interval.method.key(),
                    )
                }),
                mean_of_draws: q.mean.is_finite().then_some(q.mean),
                undefined_draws: q.undefined,
                delta: n.estimate_with(
                    &format!("{}.delta", q.quantity.key),
                    &q.quantity.delta,
                    q.quantity.delta_method.key(),
                ),
            }
        })
        .collect();
    let (method, scheme) = match run.resampling {
        Resampling::MonteCarlo => ("monte_carlo", None),
        Resampling::Bootstrap(s) => ("bootstrap", Some(s.key())),
    };
    doc.intervals = Some(IntervalsJson {
        method,
        scheme,
        draws: run.draws,
        seed: run.seed,
        redrawn: run.redrawn,
        quantities,
    });
    // The run's cautions, then any value written as null, after the fit's own.
    doc.warnings.extend(run.warnings.iter().cloned());
    doc.warnings.extend(n.warning());
}

/// Writes one fit with the run's intervals as a JSON object (see [`apply`]).
///
/// # Errors
/// The writer's.
pub fn write_fit_with_intervals(
    w: &mut impl Write,
    set: &PreparedSet,
    fit: &VantHoffFit,
    source: Option<&str>,
    with_points: bool,
    run: &IntervalRun,
) -> io::Result<()> {
    let mut doc = FitJson::new(set, fit, source, with_points);
    apply(&mut doc, run);
    serde_json::to_writer(w, &doc).map_err(io::Error::from)
}
