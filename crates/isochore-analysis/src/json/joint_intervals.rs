//! The JSON of a joint fit whose intervals were made by Monte Carlo or the bootstrap
//! (`vhfit fit A.csv B.csv --share KEYS --intervals monte-carlo|bootstrap --json`): the same
//! object as the delta method's, with every estimate in `params`, `series_params` and
//! `differences` taken from the run (`se` the SD of the draws; the interval BCa where
//! defined, else percentile or Monte Carlo, as `method` says), and an `intervals` object
//! recording the method, scheme, draws and seed and every quantity of the run with the
//! joint fit's delta-method estimate beside it. `cov`, `fit_statistics`, the test of
//! equality and the compensation analysis stay the joint fit's own.

use super::joint::JointJson;
use super::{EstimateJson, Nulls};
use isochore_fit::intervals::{JointRun, JointTarget, QuantityResult, Resampling};
use serde::Serialize;

/// One quantity of a joint fit's `intervals.quantities`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct JointQuantityJson<'a> {
    /// The parameter's key.
    pub key: &'static str,
    /// "shared", "series" (a series' own parameter) or "difference" (first − second).
    pub kind: &'static str,
    /// The series of a series' own parameter, the first of a difference; null when shared.
    pub series: Option<&'a str>,
    /// The second series of a difference; null otherwise.
    pub series_b: Option<&'a str>,
    /// The interval quoted (BCa where defined for the bootstrap).
    pub estimate: EstimateJson,
    /// The percentile interval of the bootstrap, beside its BCa (null for Monte Carlo).
    pub percentile: Option<EstimateJson>,
    /// Mean of the draws.
    pub mean_of_draws: Option<f64>,
    /// Draws in which the quantity was undefined.
    pub undefined_draws: usize,
    /// The joint fit's delta-method estimate.
    pub delta: EstimateJson,
}

/// `intervals` of a joint fit: what made the intervals and every quantity of the run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct JointIntervalsJson<'a> {
    /// "monte_carlo" or "bootstrap".
    pub method: &'static str,
    /// The bootstrap's scheme: "residuals" or "wild_rademacher"; null for Monte Carlo.
    pub scheme: Option<&'static str>,
    /// Number of draws.
    pub draws: usize,
    /// The seed of the generator (ChaCha8, one stream per draw).
    pub seed: u64,
    /// Resamples drawn again (always 0: a joint fit has no case resampling).
    pub redrawn: usize,
    /// Every quantity: the columns of the block design, then the differences.
    pub quantities: Vec<JointQuantityJson<'a>>,
}

fn best(n: &mut Nulls, what: &str, q: &QuantityResult) -> EstimateJson {
    let b = q.best();
    n.estimate_with(what, &b.estimate(), b.method.key())
}

/// Puts the run's intervals into `doc` (the delta-method object of the same joint fit,
/// series labelled `labels`).
pub fn apply<'a>(doc: &mut JointJson<'a>, run: &JointRun, labels: &'a [String]) {
    let mut n = Nulls::new();
    let label = |s: usize| labels.get(s).map_or("", String::as_str);
    let mut quantities = Vec::with_capacity(run.targets.len());
    for (t, q) in run.targets.iter().zip(&run.run.quantities) {
        let (kind, series, series_b) = match *t {
            JointTarget::Shared { key } => {
                if let Some(e) = doc.params.0.iter_mut().find(|(k, _)| *k == key) {
                    e.1 = best(&mut n, key, q);
                }
                ("shared", None, None)
            }
            JointTarget::Series { key, series } => {
                if let Some(sp) = doc.series_params.get_mut(series) {
                    if let Some(e) = sp.params.0.iter_mut().find(|(k, _)| *k == key) {
                        e.1 = best(&mut n, &format!("series_params[{series}].{key}"), q);
                    }
                }
                ("series", Some(label(series)), None)
            }
            JointTarget::Difference { key, a, b } => {
                let (la, lb) = (label(a), label(b));
                if let Some(d) = doc
                    .differences
                    .iter_mut()
                    .find(|d| d.key == key && d.series_a == la && d.series_b == lb)
                {
                    d.estimate = best(
                        &mut n,
                        &format!("differences[{key} {}−{}]", a + 1, b + 1),
                        q,
                    );
                }
                ("difference", Some(la), Some(lb))
            }
        };
        let what = &q.quantity.key;
        quantities.push(JointQuantityJson {
            key: t.key(),
            kind,
            series,
            series_b,
            estimate: best(&mut n, what, q),
            percentile: q.bca.map(|_| {
                n.estimate_with(
                    &format!("{what}.percentile"),
                    &q.interval.estimate(),
                    q.interval.method.key(),
                )
            }),
            mean_of_draws: q.mean.is_finite().then_some(q.mean),
            undefined_draws: q.undefined,
            delta: n.estimate_with(
                &format!("{what}.delta"),
                &q.quantity.delta,
                q.quantity.delta_method.key(),
            ),
        });
    }
    let (method, scheme) = match run.run.resampling {
        Resampling::MonteCarlo => ("monte_carlo", None),
        Resampling::Bootstrap(s) => ("bootstrap", Some(s.key())),
    };
    doc.intervals = Some(JointIntervalsJson {
        method,
        scheme,
        draws: run.run.draws,
        seed: run.run.seed,
        redrawn: run.run.redrawn,
        quantities,
    });
    doc.warnings.extend(run.run.warnings.iter().cloned());
    doc.warnings.extend(n.warning());
}
