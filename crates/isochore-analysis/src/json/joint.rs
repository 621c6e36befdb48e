//! The JSON contract of a joint fit (`vhfit fit A.csv B.csv --share delta_cp --json`):
//! one object, [`JointJson`], for all the series together. SI units; undefined numbers are
//! null and named in a warning, as in a single fit ([`super::Nulls`]).

use super::{EstimateJson, Nulls, ParamsJson, PointJson};
use crate::dataset::PreparedSet;
use crate::joint::JointAnalysis;
use crate::report::VERSION;
use isochore_fit::global::{
    Compensation, CompensationPoint, EqualityTest, ExnerTest, GlobalColumn,
};
use serde::Serialize;
use std::io::{self, Write};

/// One element of `series`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SeriesJson<'a> {
    /// The series' label (its name, with its file when two share a name).
    pub name: &'a str,
    /// The input it was read from.
    pub source: &'a str,
    /// Points used.
    pub n_used: usize,
    /// Lowest used temperature, K.
    pub t_min_k: Option<f64>,
    /// Highest used temperature, K.
    pub t_max_k: Option<f64>,
    /// Weighted harmonic-mean temperature Σw/Σ(w/T) of the used points, K.
    pub t_hm_k: Option<f64>,
}

/// One element of `series_params`: the parameters a series has of its own.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SeriesParamsJson<'a> {
    /// The series' label.
    pub series: &'a str,
    /// Its own parameters, by key, `{value, se, ci_low, ci_high}`.
    pub params: ParamsJson,
}

/// One element of `differences`: a parameter of one series minus that of another, with
/// the interval from the joint covariance.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DifferenceJson<'a> {
    /// The parameter's key.
    pub key: &'static str,
    /// The first series.
    pub series_a: &'a str,
    /// The second series.
    pub series_b: &'a str,
    /// First − second.
    #[serde(flatten)]
    pub estimate: EstimateJson,
}

/// One element of `columns`: what a row and column of `cov` hold.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ColumnJson<'a> {
    /// The parameter's key.
    pub key: &'static str,
    /// The series, or null for a shared parameter.
    pub series: Option<&'a str>,
}

/// `compensation`: enthalpy–entropy compensation over three or more series.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CompensationJson<'a> {
    /// Each series' ΔH° and ΔS° at θ (separate fits) with SEs and covariance.
    pub points: &'a [CompensationPoint],
    /// β, its interval, T_hm and the Krug–Hunter–Grieger verdict; null when not computable.
    pub beta: Option<&'a Compensation>,
    /// Exner's common-intersection test; null when it cannot be made.
    pub exner: Option<&'a ExnerTest>,
}

/// Fit statistics of one fit, for `fit_statistics` (the joint fit and the separate fits
/// side by side).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StatisticsJson {
    /// Columns of the block design.
    pub n_params: usize,
    /// Residual degrees of freedom.
    pub dof: usize,
    /// χ².
    pub chi2: Option<f64>,
    /// χ²/dof.
    pub reduced_chi2: Option<f64>,
    /// AICc (null with too few points).
    pub aicc: Option<f64>,
    /// BIC.
    pub bic: Option<f64>,
}

/// `fit_statistics`: both fits' numbers side by side.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BothFitsJson {
    /// The joint fit (the named parameters shared).
    pub joint: StatisticsJson,
    /// The separate fits (every parameter per series, one pooled residual variance); null
    /// when they cannot be made.
    pub separate: Option<StatisticsJson>,
}

/// `equality_test`: are the shared parameters equal across the series?
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EqualityJson {
    /// "F" when the fit scales σ, "chi2" when σ are known (absolute σ, weighted).
    pub method: &'static str,
    /// The parameters tested.
    pub keys: Vec<&'static str>,
    /// F, or Δχ² = χ²_joint − χ²_separate.
    pub statistic: Option<f64>,
    /// Numerator degrees of freedom (columns the sharing removes).
    pub df_num: usize,
    /// Denominator degrees of freedom of F; null for Δχ².
    pub df_den: Option<usize>,
    /// Its p-value.
    pub p_value: Option<f64>,
    /// AICc(joint) − AICc(separate); negative favours sharing.
    pub delta_aicc: Option<f64>,
    /// Whether equality is rejected at 1 − level.
    pub rejected: bool,
    /// The verdict in words.
    pub verdict: String,
}

/// The separate fits' own parameters for each series, for the side-by-side table.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SeparateParamsJson<'a> {
    /// The series' label.
    pub series: &'a str,
    /// Every parameter of the series in the separate fits, by key.
    pub params: ParamsJson,
}

/// The joint fit of several series, in the JSON contract.
#[derive(Serialize)]
pub struct JointJson<'a> {
    /// Always "joint_fit": tells this object from a single fit's.
    pub kind: &'static str,
    /// The model's key.
    pub model: &'static str,
    /// θ, K.
    pub t_ref_k: Option<f64>,
    /// Confidence level.
    pub level: Option<f64>,
    /// The series, in order.
    pub series: Vec<SeriesJson<'a>>,
    /// Keys of the shared parameters.
    pub shared: Vec<&'static str>,
    /// The shared parameters, by key.
    pub params: ParamsJson,
    /// Per series, its own parameters.
    pub series_params: Vec<SeriesParamsJson<'a>>,
    /// Every per-series parameter of every pair of series: first − second.
    pub differences: Vec<DifferenceJson<'a>>,
    /// What the rows and columns of `cov` hold.
    pub columns: Vec<ColumnJson<'a>>,
    /// The full covariance of the joint fit.
    pub cov: Vec<Vec<Option<f64>>>,
    /// Points used over all series.
    pub n_used: usize,
    /// The joint fit and the separate fits side by side.
    pub fit_statistics: BothFitsJson,
    /// The test of equality (null when the separate fits cannot be made; a warning says why).
    pub equality_test: Option<EqualityJson>,
    /// The separate fits' parameters of each series (null with the test).
    pub separate_params: Option<Vec<SeparateParamsJson<'a>>>,
    /// With three or more series: the compensation analysis of the separate fits (null
    /// otherwise).
    pub compensation: Option<CompensationJson<'a>>,
    /// Per-point values of every series, series by series (left out by `--summary`).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub points: Option<Vec<PointJson<'a>>>,
    /// The Monte Carlo or bootstrap run that made the intervals (absent for the delta
    /// method; [`super::joint_intervals`]).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub intervals: Option<super::joint_intervals::JointIntervalsJson<'a>>,
    /// Cautions in words.
    pub warnings: Vec<String>,
    /// The program's version.
    pub version: &'static str,
}

fn statistics(n: &mut Nulls, what: &str, f: &isochore_fit::GlobalFit) -> StatisticsJson {
    let s = f.statistics();
    StatisticsJson {
        n_params: f.n_params(),
        dof: f.dof(),
        chi2: n.num(|| format!("{what}.chi2"), s.chi2),
        reduced_chi2: n.num(|| format!("{what}.reduced_chi2"), s.reduced_chi2),
        aicc: n.opt(|| format!("{what}.aicc"), s.aicc),
        bic: n.num(|| format!("{what}.bic"), s.bic),
    }
}

fn equality(n: &mut Nulls, t: &EqualityTest) -> EqualityJson {
    let chi2 = t.method() == isochore_fit::EqualityMethod::Chi2;
    EqualityJson {
        method: t.method().key(),
        keys: t.keys().to_vec(),
        statistic: n.num(|| "equality_test.statistic".into(), t.statistic()),
        df_num: t.df_num(),
        df_den: (!chi2).then_some(t.df_den()),
        p_value: n.num(|| "equality_test.p_value".into(), t.decisive_p_value()),
        delta_aicc: n.opt(|| "equality_test.delta_aicc".into(), t.delta_aicc()),
        rejected: t.rejects_equality(),
        verdict: t.verdict(),
    }
}

impl<'a> JointJson<'a> {
    /// The document of a joint fit of `sets` (in the order fitted); `with_points` adds
    /// "points".
    pub fn new(sets: &'a [PreparedSet], a: &'a JointAnalysis, with_points: bool) -> JointJson<'a> {
        let mut n = Nulls::new();
        let fit = &a.fit;
        let label = |s: usize| a.labels.get(s).map_or("", String::as_str);
        let series = sets
            .iter()
            .enumerate()
            .map(|(s, set)| {
                let (lo, hi) = fit.t_range_k(s).unwrap_or((f64::NAN, f64::NAN));
                SeriesJson {
                    name: label(s),
                    source: &set.source,
                    n_used: fit
                        .points(s)
                        .map_or(0, |p| p.iter().filter(|d| d.used).count()),
                    t_min_k: n.num(|| format!("series[{s}].t_min_k"), lo),
                    t_max_k: n.num(|| format!("series[{s}].t_max_k"), hi),
                    t_hm_k: n.opt(|| format!("series[{s}].t_hm_k"), fit.t_harmonic_k(s)),
                }
            })
            .collect();
        let params = ParamsJson(
            fit.shared_estimates()
                .iter()
                .map(|(k, e)| (*k, n.estimate(k, e)))
                .collect(),
        );
        let series_params = (0..fit.n_series())
            .map(|s| SeriesParamsJson {
                series: label(s),
                params: ParamsJson(
                    fit.series_estimates(s)
                        .unwrap_or_default()
                        .iter()
                        .filter(|(k, _)| !a.shared.contains(k))
                        .map(|(k, e)| (*k, n.estimate(&format!("series_params[{s}].{k}"), e)))
                        .collect(),
                ),
            })
            .collect();
        let differences = fit
            .differences()
            .iter()
            .map(|d| DifferenceJson {
                key: d.key,
                series_a: label(d.a),
                series_b: label(d.b),
                estimate: n.estimate(
                    &format!("differences[{} {}−{}]", d.key, d.a + 1, d.b + 1),
                    &d.estimate,
                ),
            })
            .collect();
        let columns = columns_json(fit.columns(), &a.labels);
        let cov = cov_json(&mut n, "cov", fit.covariance());
        let fit_statistics = BothFitsJson {
            joint: statistics(&mut n, "fit_statistics.joint", fit),
            separate: a
                .equality
                .as_ref()
                .map(|t| statistics(&mut n, "fit_statistics.separate", t.full())),
        };
        let equality_test = a.equality.as_ref().map(|t| equality(&mut n, t));
        let separate_params = a.equality.as_ref().map(|t| {
            (0..t.full().n_series())
                .map(|s| SeparateParamsJson {
                    series: label(s),
                    params: ParamsJson(
                        t.full()
                            .series_estimates(s)
                            .unwrap_or_default()
                            .iter()
                            .map(|(k, e)| (*k, n.estimate(&format!("separate_params[{s}].{k}"), e)))
                            .collect(),
                    ),
                })
                .collect()
        });
        let compensation = a.compensation.as_ref().map(|c| CompensationJson {
            points: &c.points,
            beta: c.beta.as_ref(),
            exner: c.exner.as_ref(),
        });
        let points = with_points.then(|| points(&mut n, sets, a));
        let mut warnings = a.warnings.clone();
        warnings.extend(n.warning());
        JointJson {
            kind: "joint_fit",
            model: fit.model().key(),
            t_ref_k: n_free(fit.options().t_ref_k),
            level: n_free(fit.options().level),
            series,
            shared: a.shared.clone(),
            params,
            series_params,
            differences,
            columns,
            cov,
            n_used: fit.n_used(),
            fit_statistics,
            equality_test,
            separate_params,
            compensation,
            points,
            intervals: None,
            warnings,
            version: VERSION,
        }
    }
}

/// What the rows and columns of a block design's covariance hold, each column's series
/// named by `labels` (the joint fit's `columns`, and the fit with calorimetric values').
pub(crate) fn columns_json<'a>(
    columns: &[GlobalColumn],
    labels: &'a [String],
) -> Vec<ColumnJson<'a>> {
    columns
        .iter()
        .map(|c| ColumnJson {
            key: c.key(),
            series: c.series().map(|s| labels.get(s).map_or("", String::as_str)),
        })
        .collect()
}

/// A covariance matrix with undefined entries null and named `{what}[i][j]`.
pub(crate) fn cov_json(n: &mut Nulls, what: &str, cov: &[Vec<f64>]) -> Vec<Vec<Option<f64>>> {
    cov.iter()
        .enumerate()
        .map(|(i, row)| {
            row.iter()
                .enumerate()
                .map(|(j, v)| n.num(|| format!("{what}[{i}][{j}]"), *v))
                .collect()
        })
        .collect()
}

/// Options are validated finite before any fit.
fn n_free(v: f64) -> Option<f64> {
    v.is_finite().then_some(v)
}

/// Every point of every series, with its series' label and its data row.
fn points<'a>(n: &mut Nulls, sets: &'a [PreparedSet], a: &'a JointAnalysis) -> Vec<PointJson<'a>> {
    let mut out = Vec::new();
    for (s, set) in sets.iter().enumerate() {
        let Some(diag) = a.fit.points(s) else {
            continue;
        };
        let name = a.labels.get(s).map_or("", String::as_str);
        for (o, d) in set.rows.iter().zip(diag) {
            let row = o.row;
            let at = |field: &'static str| move || format!("points[{name} row {row}].{field}");
            out.push(PointJson {
                row,
                series: name,
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
                flags: &d.flags,
            });
        }
    }
    out
}

/// Writes a joint fit as one JSON object (see [`JointJson::new`]).
///
/// # Errors
/// The writer's.
pub fn write_joint(
    w: &mut impl Write,
    sets: &[PreparedSet],
    a: &JointAnalysis,
    with_points: bool,
) -> io::Result<()> {
    serde_json::to_writer(w, &JointJson::new(sets, a, with_points)).map_err(io::Error::from)
}

/// Writes a joint fit as one JSON object with the intervals of `run` (see
/// [`super::joint_intervals::apply`]); without a run, [`write_joint`]'s object.
///
/// # Errors
/// The writer's.
pub fn write_joint_with_intervals(
    w: &mut impl Write,
    sets: &[PreparedSet],
    a: &JointAnalysis,
    with_points: bool,
    run: Option<&isochore_fit::intervals::JointRun>,
) -> io::Result<()> {
    let mut doc = JointJson::new(sets, a, with_points);
    if let Some(r) = run {
        super::joint_intervals::apply(&mut doc, r, &a.labels);
    }
    serde_json::to_writer(w, &doc).map_err(io::Error::from)
}
