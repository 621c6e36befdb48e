//! The JSON contract, as typed serde structs: `fit --json` ([`FitJson`], one object per data
//! set, or an array with `"source"` fields and [`ErrorJson`] entries), a joint fit of several
//! series (`fit --share`, [`joint`]), `predict --json` ([`predict`]) and `two-point --json`
//! ([`two_point`]).
//!
//! SI units throughout (J/mol, J mol⁻¹ K⁻¹, K). Never NaN or Infinity: an undefined number is
//! written as null, and a warning names every such value ([`Nulls`]). A value whose own number
//! is undefined has every statistic null too (a standard error of an undefined number means
//! nothing). Parameters are written by looping over the fit's parameters, so a model with
//! another parameter appears under its key without new code here.
//!
//! The points of a fit are streamed ([`PointsJson`]), so a 10⁶-row file never holds its whole
//! document in memory.

pub mod calorimetric;
pub mod errors_in_t;
pub mod intervals;
pub mod joint;
pub mod joint_intervals;
pub mod predict;
mod stream;
pub mod two_point;

use crate::dataset::PreparedSet;
use crate::report::VERSION;
use crate::rows::RowNumber;
use isochore_fit::{Estimate, Flags, VantHoffFit};
use serde::ser::{SerializeMap, Serializer};
use serde::Serialize;
use std::io::{self, Write};

/// Turns numbers into JSON values, null when not finite, and remembers which were null.
#[derive(Debug, Default)]
pub struct Nulls {
    undefined: Vec<String>,
}

impl Nulls {
    /// Nothing undefined yet.
    pub fn new() -> Self {
        Nulls::default()
    }

    /// `v`, or null (remembered under the name `what` gives) when it is not finite.
    pub fn num(&mut self, what: impl FnOnce() -> String, v: f64) -> Option<f64> {
        if v.is_finite() {
            Some(v)
        } else {
            self.undefined.push(what());
            None
        }
    }

    /// An optional number: null when absent (not remembered) or not finite (remembered).
    pub fn opt(&mut self, what: impl FnOnce() -> String, v: Option<f64>) -> Option<f64> {
        v.and_then(|x| self.num(what, x))
    }

    /// A value with its statistics under the rule of the module: when the value is not
    /// finite, all are null and `what` is remembered once; otherwise each statistic that is
    /// not finite is null and remembered as `what.name`.
    pub fn stats<const N: usize>(
        &mut self,
        what: &str,
        value: f64,
        stats: [(&str, f64); N],
    ) -> (Option<f64>, [Option<f64>; N]) {
        if !value.is_finite() {
            self.undefined
                .push(format!("{what} (value and all its statistics)"));
            return (None, [None; N]);
        }
        let out = stats.map(|(name, v)| self.num(|| format!("{what}.{name}"), v));
        (Some(value), out)
    }

    /// An estimate under the rule of [`Nulls::stats`], made by the delta method.
    pub fn estimate(&mut self, what: &str, e: &Estimate) -> EstimateJson {
        self.estimate_with(what, e, "delta")
    }

    /// An estimate under the rule of [`Nulls::stats`], whose interval `method` made (a key
    /// of `isochore_fit::intervals::IntervalMethod`: "delta", "fieller", "monte_carlo",
    /// "bootstrap_percentile", "bootstrap_bca").
    pub fn estimate_with(
        &mut self,
        what: &str,
        e: &Estimate,
        method: &'static str,
    ) -> EstimateJson {
        let (value, [se, ci_low, ci_high]) = self.stats(
            what,
            e.value,
            [("se", e.se), ("ci_low", e.ci_low), ("ci_high", e.ci_high)],
        );
        EstimateJson {
            value,
            se,
            ci_low,
            ci_high,
            method,
        }
    }

    /// The warning naming every undefined value (the first 20, then a count), or `None`.
    pub fn warning(&self) -> Option<String> {
        if self.undefined.is_empty() {
            return None;
        }
        let shown: Vec<&str> = self.undefined.iter().take(20).map(String::as_str).collect();
        let more = self.undefined.len() - shown.len();
        Some(format!(
            "{} written as null: {}{}",
            if self.undefined.len() == 1 {
                "an undefined value"
            } else {
                "undefined values"
            },
            shown.join(", "),
            if more > 0 {
                format!(" and {more} more")
            } else {
                String::new()
            }
        ))
    }
}

/// `{value, se, ci_low, ci_high}`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct EstimateJson {
    /// The value.
    pub value: Option<f64>,
    /// Its standard error.
    pub se: Option<f64>,
    /// Lower confidence limit.
    pub ci_low: Option<f64>,
    /// Upper confidence limit.
    pub ci_high: Option<f64>,
    /// What made the interval: "delta", "fieller", "monte_carlo", "bootstrap_percentile",
    /// "bootstrap_bca" (with Monte Carlo and the bootstrap, `se` is the SD of the draws).
    pub method: &'static str,
}

impl EstimateJson {
    /// An estimate where nobody collects warnings (the rule of [`Nulls::stats`] still holds).
    pub fn of(e: &Estimate) -> EstimateJson {
        Nulls::new().estimate("", e)
    }
}

/// The fitted parameters, written as an object keyed by each parameter's key, in the
/// model's order.
#[derive(Debug, Clone, PartialEq)]
pub struct ParamsJson(pub Vec<(&'static str, EstimateJson)>);

impl Serialize for ParamsJson {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut m = s.serialize_map(Some(self.0.len()))?;
        for (k, v) in &self.0 {
            m.serialize_entry(k, v)?;
        }
        m.end()
    }
}

/// `model_comparison`: the first step up the ladder of nested models, the model the data
/// support, and every step the points allow.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ComparisonJson {
    /// p-value of the F-test of the first step.
    pub f_p_value: Option<f64>,
    /// ΔAICc (larger − smaller model) of the first step; null with too few points.
    pub delta_aicc: Option<f64>,
    /// Key of the model the comparison finds the data support (written `preferred` by
    /// earlier versions; see the README).
    pub supported_by_data: &'static str,
    /// Every step of the ladder, simplest first.
    pub steps: Vec<ComparisonStepJson>,
}

/// One step of `model_comparison.steps`: a model against the next larger one.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ComparisonStepJson {
    /// Key of the smaller model.
    pub smaller: &'static str,
    /// Key of the larger model.
    pub larger: &'static str,
    /// Keys of the parameters the larger model adds.
    pub added: Vec<&'static str>,
    /// F statistic (null when not finite).
    pub f_statistic: Option<f64>,
    /// Its p-value.
    pub f_p_value: Option<f64>,
    /// Numerator degrees of freedom.
    pub df_extra: usize,
    /// Denominator degrees of freedom.
    pub df_residual: usize,
    /// ΔAICc (larger − smaller); null with too few points.
    pub delta_aicc: Option<f64>,
    /// Whether the evidence supports the larger model.
    pub supported: bool,
    /// Whether the added term's interval excludes zero.
    pub resolved: bool,
    /// The verdict in words.
    pub verdict: String,
}

/// `t_at_k1`: the temperature where K = 1.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TAtK1Json {
    /// Kelvin.
    pub value: Option<f64>,
    /// Standard error, K (delta method).
    pub se: Option<f64>,
    /// Lower end of Fieller's interval, K; null where the interval is unbounded below.
    pub ci_low: Option<f64>,
    /// Upper end of Fieller's interval, K; null where the interval is unbounded above.
    pub ci_high: Option<f64>,
    /// What made the interval: "fieller" (its SE by the delta method), or the resampling
    /// method's key with `--intervals`.
    pub method: &'static str,
    /// Whether it lies outside the measured range.
    pub extrapolated: bool,
}

/// `t_delta_h_zero`: the temperature where ΔH° changes sign, written for every model with
/// ΔCp° (absent for the linear model, whose ΔH° is constant).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TDeltaHZeroJson {
    /// Kelvin; null when ΔH° keeps its sign from T_hm/3 to 3·T_hm (`words` says so).
    pub value: Option<f64>,
    /// Standard error, K (delta method).
    pub se: Option<f64>,
    /// Lower end of Fieller's interval, K; null where the interval is unbounded below.
    pub ci_low: Option<f64>,
    /// Upper end of Fieller's interval, K; null where the interval is unbounded above.
    pub ci_high: Option<f64>,
    /// What made the interval: "fieller" (its SE by the delta method), or the resampling
    /// method's key with `--intervals`.
    pub method: &'static str,
    /// Whether it lies outside the measured range.
    pub extrapolated: bool,
    /// The result in words: the interval, or why it is unbounded, or that ΔH° keeps its
    /// sign near the data.
    pub words: String,
}

impl TDeltaHZeroJson {
    /// The JSON of `fit`'s temperature where ΔH° = 0; `None` for a model without ΔCp°.
    pub fn new(fit: &VantHoffFit) -> Option<TDeltaHZeroJson> {
        let words = fit.delta_h_zero_words()?;
        let finite = |v: f64| v.is_finite().then_some(v);
        Some(match fit.temperature_where_delta_h_is_zero() {
            // An infinite end is an unbounded interval, said in `words`.
            Some(z) => TDeltaHZeroJson {
                value: finite(z.estimate.value),
                se: finite(z.estimate.se),
                ci_low: finite(z.estimate.ci_low),
                ci_high: finite(z.estimate.ci_high),
                method: "fieller",
                extrapolated: z.extrapolated,
                words,
            },
            None => TDeltaHZeroJson {
                value: None,
                se: None,
                ci_low: None,
                ci_high: None,
                method: "fieller",
                extrapolated: false,
                words,
            },
        })
    }
}

/// One element of `points`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PointJson<'a> {
    /// The 1-based data row (the first of averaged replicates).
    pub row: RowNumber,
    /// The data set's name.
    pub series: &'a str,
    /// Temperature, K.
    pub t_k: Option<f64>,
    /// ln K.
    pub ln_k: Option<f64>,
    /// σ(ln K); null for an unweighted fit.
    pub sigma_ln_k: Option<f64>,
    /// Whether the point took part in the fit.
    pub used: bool,
    /// Fitted ln K.
    pub fitted: Option<f64>,
    /// Residual.
    pub residual: Option<f64>,
    /// Internally studentized residual (null for excluded points).
    pub student_int: Option<f64>,
    /// Externally studentized residual.
    pub student_ext: Option<f64>,
    /// Leverage.
    pub leverage: Option<f64>,
    /// Cook's distance.
    pub cooks_d: Option<f64>,
    /// DFFITS.
    pub dffits: Option<f64>,
    /// Zero or more of "outlier", "high_leverage", "influential".
    pub flags: &'a Flags,
}

/// The points of a fit, streamed: each element is built as it is written.
#[derive(Clone, Copy)]
pub struct PointsJson<'a> {
    set: &'a PreparedSet,
    fit: &'a VantHoffFit,
    /// Written as `[]`: marks where [`stream`] writes the elements itself.
    empty: bool,
}

impl PointsJson<'_> {
    /// The elements, each point's diagnostics made as it is reached (none kept: a fit on
    /// the streaming path computes them on demand).
    fn each<'n>(&'n self, n: &'n mut Nulls) -> impl Iterator<Item = PointJson<'n>> + 'n {
        let set = self.set;
        let points = self.fit.points_iter();
        set.rows.iter().zip(points).map(move |(o, d)| {
            let row = o.row;
            let at = |field: &'static str| move || format!("points[row {row}].{field}");
            PointJson {
                row,
                series: &set.series,
                t_k: n.num(at("t_k"), d.t_k),
                ln_k: n.num(at("ln_k"), d.ln_k),
                sigma_ln_k: n.opt(at("sigma_ln_k"), d.sigma_ln_k),
                used: d.used,
                fitted: n.num(at("fitted"), d.fitted),
                residual: n.num(at("residual"), d.residual),
                student_int: n.opt(at("student_int"), d.student_int),
                student_ext: n.opt(at("student_ext"), d.student_ext),
                leverage: n.num(at("leverage"), d.leverage),
                cooks_d: n.opt(at("cooks_d"), d.cooks_d),
                dffits: n.opt(at("dffits"), d.dffits),
                flags: stream::flag_set(d.flags),
            }
        })
    }
}

impl Serialize for PointsJson<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        // The undefined values were counted when the document was built; this pass only
        // writes.
        let mut scratch = Nulls::new();
        if self.empty {
            return s.collect_seq(std::iter::empty::<PointJson<'_>>());
        }
        s.collect_seq(self.each(&mut scratch))
    }
}

/// One fit in the JSON contract of `vhfit fit --json`.
#[derive(Serialize)]
pub struct FitJson<'a> {
    /// The input as given (in arrays only).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub source: Option<&'a str>,
    /// The model's key.
    pub model: &'static str,
    /// θ, K.
    pub t_ref_k: Option<f64>,
    /// Confidence level.
    pub level: Option<f64>,
    /// The weighting the fit used: "inverse_variance" or "unweighted".
    pub weighting: &'static str,
    /// What the stated σ mean: "relative_weights" or "known_uncertainties" (the value of
    /// `--sigma`, with `_` for `-`).
    pub sigma_convention: &'static str,
    /// Points used.
    pub n_used: usize,
    /// Residual degrees of freedom.
    pub dof: usize,
    /// The parameters, by key.
    pub params: ParamsJson,
    /// Covariance of the parameters, in the model's order.
    pub cov: Vec<Vec<Option<f64>>>,
    /// Correlation of ΔH° and ΔS°.
    pub corr_h_s: Option<f64>,
    /// Residual standard deviation.
    pub residual_sd: Option<f64>,
    /// R².
    pub r2: Option<f64>,
    /// χ².
    pub chi2: Option<f64>,
    /// χ²/(n − p).
    pub reduced_chi2: Option<f64>,
    /// AICc (null with too few points).
    pub aicc: Option<f64>,
    /// BIC.
    pub bic: Option<f64>,
    /// The comparison of nested models (null with too few points).
    pub model_comparison: Option<ComparisonJson>,
    /// Per-point values (left out by `--summary`).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub points: Option<PointsJson<'a>>,
    /// The temperature where K = 1.
    pub t_at_k1: Option<TAtK1Json>,
    /// The temperature where ΔH° = 0 (models with ΔCp° only).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub t_delta_h_zero: Option<TDeltaHZeroJson>,
    /// The Monte Carlo or bootstrap run that made the intervals (absent for the delta
    /// method).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub intervals: Option<intervals::IntervalsJson>,
    /// Cautions in words: from reading, from the fit, and undefined values.
    pub warnings: Vec<String>,
    /// The program's version.
    pub version: &'static str,
}

impl<'a> FitJson<'a> {
    /// The document of one fitted data set. `source` adds the "source" field (in arrays);
    /// `with_points` adds "points".
    pub fn new(
        set: &'a PreparedSet,
        fit: &'a VantHoffFit,
        source: Option<&'a str>,
        with_points: bool,
    ) -> FitJson<'a> {
        let mut n = Nulls::new();
        let name = |s: &'static str| move || s.to_string();
        let t_ref_k = n.num(name("t_ref_k"), fit.options().t_ref_k);
        let level = n.num(name("level"), fit.options().level);
        let params = ParamsJson(
            fit.params()
                .iter()
                .map(|p| (p.key(), n.estimate(p.key(), &p.estimate)))
                .collect(),
        );
        let cov = fit
            .covariance()
            .iter()
            .enumerate()
            .map(|(a, row)| {
                row.iter()
                    .enumerate()
                    .map(|(b, v)| n.num(|| format!("cov[{a}][{b}]"), *v))
                    .collect()
            })
            .collect();
        let s = fit.stats();
        let corr_h_s = n.num(name("corr_h_s"), fit.corr_h_s());
        let residual_sd = n.num(name("residual_sd"), s.residual_sd);
        let r2 = n.num(name("r2"), s.r2);
        let chi2 = n.num(name("chi2"), s.chi2);
        let reduced_chi2 = n.num(name("reduced_chi2"), s.reduced_chi2);
        let aicc = n.opt(name("aicc"), s.aicc);
        let bic = n.num(name("bic"), s.bic);
        let model_comparison = fit.comparison().map(|c| ComparisonJson {
            f_p_value: n.num(name("model_comparison.f_p_value"), c.f_p_value),
            delta_aicc: n.opt(name("model_comparison.delta_aicc"), c.delta_aicc),
            supported_by_data: c.preferred.key(),
            steps: c
                .steps
                .iter()
                .enumerate()
                .map(|(i, st)| ComparisonStepJson {
                    smaller: st.smaller.key(),
                    larger: st.larger.key(),
                    added: st.added.clone(),
                    f_statistic: n.num(
                        || format!("model_comparison.steps[{i}].f_statistic"),
                        st.f_statistic,
                    ),
                    f_p_value: n.num(
                        || format!("model_comparison.steps[{i}].f_p_value"),
                        st.f_p_value,
                    ),
                    df_extra: st.df_extra,
                    df_residual: st.df_residual,
                    delta_aicc: n.opt(
                        || format!("model_comparison.steps[{i}].delta_aicc"),
                        st.delta_aicc,
                    ),
                    supported: st.supported,
                    resolved: st.resolved,
                    verdict: st.verdict.clone(),
                })
                .collect(),
        });
        let points = with_points.then_some(PointsJson {
            set,
            fit,
            empty: false,
        });
        if let Some(p) = &points {
            // Counts the undefined values of the points, in row order: none when the fit
            // found every number of every point finite (then the pass, which would make each
            // point's diagnostics once more, is skipped).
            if !fit.points_finite() {
                p.each(&mut n).for_each(drop);
            }
        }
        let t_at_k1 = fit.t_at_k1().map(|e| TAtK1Json {
            value: n.num(name("t_at_k1.value"), e.value),
            se: n.num(name("t_at_k1.se"), e.se),
            // An infinite end is an unbounded interval, which the fit's warnings say in
            // words; it is null here without a second "undefined" warning.
            ci_low: e.ci_low.is_finite().then_some(e.ci_low),
            ci_high: e.ci_high.is_finite().then_some(e.ci_high),
            method: "fieller",
            extrapolated: fit.is_extrapolation(e.value),
        });
        let mut warnings = set.warnings.clone();
        warnings.extend(fit.warnings().iter().map(|w| w.message.clone()));
        warnings.extend(n.warning());
        FitJson {
            source,
            model: fit.model().key(),
            t_ref_k,
            level,
            weighting: if fit.weighted() {
                "inverse_variance"
            } else {
                "unweighted"
            },
            sigma_convention: fit.options().convention.key(),
            n_used: fit.n_used(),
            dof: fit.dof(),
            params,
            cov,
            corr_h_s,
            residual_sd,
            r2,
            chi2,
            reduced_chi2,
            aicc,
            bic,
            model_comparison,
            points,
            t_at_k1,
            t_delta_h_zero: TDeltaHZeroJson::new(fit),
            intervals: None,
            warnings,
            version: VERSION,
        }
    }
}

/// An input that could not be used, as an element of a batch array.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ErrorJson<'a> {
    /// The input as given.
    pub source: &'a str,
    /// Why, in words.
    pub error: &'a str,
}

/// Writes one fit as a JSON object (see [`FitJson::new`]).
///
/// # Errors
/// The writer's.
pub fn write_fit(
    w: &mut impl Write,
    set: &PreparedSet,
    fit: &VantHoffFit,
    source: Option<&str>,
    with_points: bool,
) -> io::Result<()> {
    let mut doc = FitJson::new(set, fit, source, with_points);
    write_with_points(w, &mut doc, |d| &mut d.points)
}

/// Writes `doc`, whose points (`points` reaches them) are written by the fast writer of
/// [`stream`]: the same bytes as `serde_json::to_writer(w, doc)`, several times faster.
///
/// # Errors
/// The writer's.
pub(crate) fn write_with_points<'a, T: Serialize>(
    w: &mut impl Write,
    doc: &mut T,
    points: fn(&mut T) -> &mut Option<PointsJson<'a>>,
) -> io::Result<()> {
    let Some(p) = points(doc).take() else {
        return serde_json::to_writer(w, doc).map_err(io::Error::from);
    };
    let without = stream::to_vec(doc)?;
    *points(doc) = Some(PointsJson { empty: true, ..p });
    let with_empty = stream::to_vec(doc)?;
    stream::write_streamed(
        w,
        &with_empty,
        &without,
        |out| stream::write_points(out, &p),
        |out| {
            *points(doc) = Some(p);
            serde_json::to_writer(out, doc).map_err(io::Error::from)
        },
    )
}

/// Writes an error element of a batch: `{"source": …, "error": …}`.
///
/// # Errors
/// The writer's.
pub fn write_error(w: &mut impl Write, source: &str, error: &str) -> io::Result<()> {
    serde_json::to_writer(w, &ErrorJson { source, error }).map_err(io::Error::from)
}
