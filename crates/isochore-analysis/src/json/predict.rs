//! `vhfit predict --json`: K, ln K, ΔG°, ΔH° and ΔS° at each asked temperature with
//! confidence and prediction intervals, and optionally the temperature where K reaches a
//! value. One object per data set; several data sets give an array.

use super::{EstimateJson, Nulls};
use crate::dataset::PreparedSet;
use crate::report::VERSION;
use isochore_fit::intervals::{IntervalRun, QuantityKind, Resampling};
use isochore_fit::{Prediction, ValuePrediction, VantHoffFit};
use serde::Serialize;

/// `{value, se, ci_low, ci_high, pi_low, pi_high}`: a predicted value with its confidence
/// and prediction intervals.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ValueJson {
    /// The value.
    pub value: Option<f64>,
    /// Its standard error.
    pub se: Option<f64>,
    /// Confidence interval, lower end.
    pub ci_low: Option<f64>,
    /// Confidence interval, upper end.
    pub ci_high: Option<f64>,
    /// Prediction interval (a new measurement), lower end.
    pub pi_low: Option<f64>,
    /// Prediction interval, upper end.
    pub pi_high: Option<f64>,
    /// What made the confidence interval: "delta" (K's are the exponentials of ln K's), or
    /// with `--intervals` K's "monte_carlo", "bootstrap_percentile" or "bootstrap_bca" (the
    /// prediction interval stays the delta method's).
    pub method: &'static str,
}

fn value(n: &mut Nulls, what: &str, v: &ValuePrediction) -> ValueJson {
    let (value, [se, ci_low, ci_high, pi_low, pi_high]) = n.stats(
        what,
        v.value,
        [
            ("se", v.se),
            ("ci_low", v.ci.low),
            ("ci_high", v.ci.high),
            ("pi_low", v.pi.low),
            ("pi_high", v.pi.high),
        ],
    );
    ValueJson {
        value,
        se,
        ci_low,
        ci_high,
        pi_low,
        pi_high,
        method: "delta",
    }
}

/// The values at one temperature.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PredictionJson {
    /// Temperature, K.
    pub t_k: Option<f64>,
    /// ln K.
    pub ln_k: ValueJson,
    /// K.
    pub k: ValueJson,
    /// ΔG°(T), J/mol.
    pub delta_g: EstimateJson,
    /// ΔH°(T), J/mol.
    pub delta_h: EstimateJson,
    /// ΔS°(T), J mol⁻¹ K⁻¹.
    pub delta_s: EstimateJson,
    /// Whether T lies outside the measured range.
    pub extrapolated: bool,
    /// A caution in words.
    pub warning: Option<String>,
}

impl PredictionJson {
    /// One prediction; undefined values are remembered in `n`.
    pub fn new(n: &mut Nulls, p: &Prediction, at: &str) -> PredictionJson {
        PredictionJson {
            t_k: p.t_k.is_finite().then_some(p.t_k),
            ln_k: value(n, &format!("ln_k {at}"), &p.ln_k),
            k: value(n, &format!("k {at}"), &p.k),
            delta_g: n.estimate(&format!("delta_g {at}"), &p.delta_g),
            delta_h: n.estimate(&format!("delta_h {at}"), &p.delta_h),
            delta_s: n.estimate(&format!("delta_s {at}"), &p.delta_s),
            extrapolated: p.extrapolated,
            warning: p.warning.clone(),
        }
    }
}

/// `for_k`: the temperature where K reaches `k`, or why there is none.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ForKJson {
    /// The K asked for.
    pub k: f64,
    /// The temperature, K (null when there is none).
    pub t_k: Option<EstimateJson>,
    /// Whether it lies outside the measured range (absent when there is none).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub extrapolated: Option<bool>,
    /// Why there is none.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub error: Option<String>,
}

/// The predictions of one data set.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PredictJson<'a> {
    /// The input as given.
    pub source: &'a str,
    /// The data set.
    pub series: &'a str,
    /// The model's key.
    pub model: &'static str,
    /// Confidence level.
    pub level: f64,
    /// Lowest used temperature, K.
    pub t_min_k: Option<f64>,
    /// Highest used temperature, K.
    pub t_max_k: Option<f64>,
    /// One entry per asked temperature.
    pub predictions: Vec<PredictionJson>,
    /// The temperature for a target K, when asked.
    pub for_k: Option<ForKJson>,
    /// What made the resampled intervals (`--intervals monte-carlo|bootstrap`; absent for
    /// the delta method).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub intervals: Option<PredictIntervalsJson>,
    /// Cautions in words.
    pub warnings: Vec<String>,
    /// The program's version.
    pub version: &'static str,
}

impl<'a> PredictJson<'a> {
    /// The predictions of `fit` at `temps_k` (kelvin; a temperature the fit cannot predict
    /// at is left out), and the temperature for `for_k`. `at_label` names a temperature in
    /// warnings about undefined values.
    pub fn new(
        set: &'a PreparedSet,
        fit: &VantHoffFit,
        temps_k: &[f64],
        for_k: Option<f64>,
        at_label: impl Fn(f64) -> String,
    ) -> PredictJson<'a> {
        let mut n = Nulls::new();
        let predictions = temps_k
            .iter()
            .filter_map(|&t| fit.predict(t).ok())
            .map(|p| PredictionJson::new(&mut n, &p, &at_label(p.t_k)))
            .collect();
        let for_k = for_k.map(|k| match fit.temperature_for_k(k) {
            Ok(e) => ForKJson {
                k,
                t_k: Some(n.estimate_with("for_k.t_k", &e, "fieller")),
                extrapolated: Some(fit.is_extrapolation(e.value)),
                error: None,
            },
            Err(err) => ForKJson {
                k,
                t_k: None,
                extrapolated: None,
                error: Some(err.to_string()),
            },
        });
        let mut warnings = set.warnings.clone();
        warnings.extend(fit.warnings().iter().map(|w| w.message.clone()));
        warnings.extend(n.warning());
        PredictJson {
            source: &set.source,
            series: &set.series,
            model: fit.model().key(),
            level: fit.options().level,
            t_min_k: fit.t_min_k().is_finite().then_some(fit.t_min_k()),
            t_max_k: fit.t_max_k().is_finite().then_some(fit.t_max_k()),
            predictions,
            for_k,
            intervals: None,
            warnings,
            version: VERSION,
        }
    }

    /// Puts a Monte Carlo or bootstrap `run` (made with these temperatures and this target K,
    /// `isochore_analysis::intervals::run_intervals_at`) into the document: K and ΔG° at
    /// each temperature and the temperature for the target K take the run's value, SE (the
    /// SD of the draws) and interval with its `method`; ln K, ΔH°, ΔS° and every prediction
    /// interval (`pi_low`, `pi_high`: a new measurement, not resampled) stay the delta
    /// method's. Adds `intervals` and the run's warnings.
    pub fn apply_run(&mut self, run: &IntervalRun) {
        let mut n = Nulls::new();
        let find = |want: &dyn Fn(&QuantityKind) -> bool| {
            run.quantities
                .iter()
                .find(|q| want(&q.quantity.kind))
                .map(|q| q.best())
        };
        for p in &mut self.predictions {
            let Some(t) = p.t_k else { continue };
            if let Some(b) = find(&|k| matches!(*k, QuantityKind::K { t_k } if t_k == t)) {
                let finite = |v: f64| v.is_finite().then_some(v);
                p.k.value = finite(b.value);
                p.k.se = finite(b.se);
                p.k.ci_low = finite(b.ci_low);
                p.k.ci_high = finite(b.ci_high);
                p.k.method = b.method.key();
            }
            if let Some(b) = find(&|k| matches!(*k, QuantityKind::DeltaG { t_k } if t_k == t)) {
                p.delta_g =
                    n.estimate_with(&format!("delta_g at {t} K"), &b.estimate(), b.method.key());
            }
        }
        if let Some(f) = self.for_k.as_mut().filter(|f| f.t_k.is_some()) {
            let k = f.k;
            if let Some(b) =
                find(&|q| matches!(*q, QuantityKind::TemperatureForK { k_target } if k_target == k))
            {
                f.t_k = Some(n.estimate_with("for_k.t_k", &b.estimate(), b.method.key()));
            }
        }
        let (method, scheme) = match run.resampling {
            Resampling::MonteCarlo => ("monte_carlo", None),
            Resampling::Bootstrap(s) => ("bootstrap", Some(s.key())),
        };
        self.intervals = Some(PredictIntervalsJson {
            method,
            scheme,
            draws: run.draws,
            seed: run.seed,
        });
        self.warnings.extend(run.warnings.iter().cloned());
        self.warnings.extend(n.warning());
    }
}

/// `intervals` of a prediction made with `--intervals monte-carlo|bootstrap`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PredictIntervalsJson {
    /// "monte_carlo" or "bootstrap".
    pub method: &'static str,
    /// The bootstrap's scheme ("residuals", "wild_rademacher", "cases"); null for Monte
    /// Carlo.
    pub scheme: Option<&'static str>,
    /// Number of draws.
    pub draws: usize,
    /// The seed of the generator.
    pub seed: u64,
}
