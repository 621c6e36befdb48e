//! The JSON of `vhfit fit --calorimetric …`: a single fit's object ([`super::FitJson`]) with a
//! `calorimetric` array beside its fields, one element per calorimetric value compared with
//! the van 't Hoff ΔH° at its temperature; a joint fit's object with the comparisons of
//! each series and, with `--calorimetric-in-fit`, `calorimetric_fit`: the joint fit again
//! with the calorimetric values as observations of ΔH°(T) ([`CalorimetricFitJson`]), and
//! the same object beside a single fit's fields ([`write_fit_with_calorimetric_fit`]). SI
//! units; undefined numbers are null.

use super::joint::{columns_json, cov_json, ColumnJson, SeriesParamsJson};
use super::{EstimateJson, FitJson, Nulls, ParamsJson};
use crate::dataset::PreparedSet;
use isochore_fit::calorimetric::CalorimetricComparison;
use isochore_fit::global::{CalorimetricJointFit, GlobalError};
use isochore_fit::VantHoffFit;
use serde::Serialize;
use std::io::{self, Write};

/// One element of `calorimetric`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CalorimetricJson {
    /// Temperature of the calorimetric value, K.
    pub t_k: f64,
    /// ΔH_cal, J/mol.
    pub delta_h_cal: f64,
    /// Its standard uncertainty, J/mol.
    pub u_cal: f64,
    /// The van 't Hoff ΔH°(T) at that temperature (ΔCp° taken into account).
    pub delta_h_vh: EstimateJson,
    /// ΔH_vH − ΔH_cal with its SE and normal interval.
    pub difference: EstimateJson,
    /// difference / SE.
    pub z: Option<f64>,
    /// Two-sided p-value of z.
    pub p_value: Option<f64>,
    /// ΔH_vH / ΔH_cal.
    pub ratio: Option<f64>,
    /// Lower end of Fieller's interval for the ratio; null when unbounded.
    pub ratio_ci_low: Option<f64>,
    /// Upper end of Fieller's interval for the ratio; null when unbounded.
    pub ratio_ci_high: Option<f64>,
    /// Whether the temperature lies outside the fitted range.
    pub extrapolated: bool,
    /// The result in words, with the caution about coupled equilibria.
    pub verdict: String,
}

impl CalorimetricJson {
    /// The JSON of one comparison.
    pub fn new(c: &CalorimetricComparison) -> CalorimetricJson {
        let finite = |v: f64| v.is_finite().then_some(v);
        CalorimetricJson {
            t_k: c.calorimetric.t_k,
            delta_h_cal: c.calorimetric.delta_h,
            u_cal: c.calorimetric.u,
            delta_h_vh: EstimateJson::of(&c.van_t_hoff),
            difference: EstimateJson::of(&c.difference),
            z: finite(c.z),
            p_value: finite(c.p_value),
            ratio: finite(c.ratio),
            ratio_ci_low: c.ratio_ci.and_then(|r| finite(r.0)),
            ratio_ci_high: c.ratio_ci.and_then(|r| finite(r.1)),
            extrapolated: c.extrapolated,
            verdict: c.verdict.clone(),
        }
    }
}

/// A single fit's object with `calorimetric` added.
#[derive(Serialize)]
pub struct FitWithCalorimetricJson<'a> {
    /// The fit's own fields.
    #[serde(flatten)]
    pub fit: FitJson<'a>,
    /// The comparisons, in the order given.
    pub calorimetric: Vec<CalorimetricJson>,
}

/// Writes one fit with its calorimetric comparisons as a JSON object.
///
/// # Errors
/// The writer's.
pub fn write_fit_with_calorimetric(
    w: &mut impl Write,
    set: &PreparedSet,
    fit: &VantHoffFit,
    source: Option<&str>,
    with_points: bool,
    comparisons: &[CalorimetricComparison],
) -> io::Result<()> {
    let mut doc = FitWithCalorimetricJson {
        fit: FitJson::new(set, fit, source, with_points),
        calorimetric: comparisons.iter().map(CalorimetricJson::new).collect(),
    };
    super::write_with_points(w, &mut doc, |d| &mut d.fit.points)
}

/// A single fit's document (with whatever else the command line added:
/// [`super::errors_in_t::FitWithAdditionsJson`]) and, with `--calorimetric-in-fit` and no
/// `--share`, `calorimetric_fit`: the data set fitted again with its calorimetric values as
/// observations of ΔH°(T) ([`crate::calorimetric::fit_single_with_calorimetric`]), in the
/// joint fit's form ([`CalorimetricFitJson`]: every parameter is the series' own, so
/// `params` is empty and `series_params` has the one series); null when refused (a warning
/// says why).
#[derive(Serialize)]
pub struct FitWithCalorimetricFitJson<'a> {
    /// The fit's document.
    #[serde(flatten)]
    pub fit: super::errors_in_t::FitWithAdditionsJson<'a>,
    /// The fit with the calorimetric values, or null.
    pub calorimetric_fit: Option<CalorimetricFitJson<'a>>,
}

/// Writes one fit with its calorimetric comparisons (and a Monte Carlo or bootstrap `run`,
/// the `errors_in_t` block, as [`super::errors_in_t::write_fit_with_additions`] does) and
/// `calorimetric_fit` from `constrained`, the result of
/// [`crate::calorimetric::fit_single_with_calorimetric`] for this data set, its series
/// labelled with the data set's name.
///
/// # Errors
/// The writer's.
#[allow(clippy::too_many_arguments)]
pub fn write_fit_with_calorimetric_fit(
    w: &mut impl Write,
    set: &PreparedSet,
    fit: &VantHoffFit,
    source: Option<&str>,
    with_points: bool,
    run: Option<&isochore_fit::intervals::IntervalRun>,
    calorimetric: Option<&[CalorimetricComparison]>,
    errors_in_t: Option<&isochore_fit::errors_in_t::ErrorsInTFit>,
    constrained: &Result<(isochore_fit::GlobalFit, CalorimetricJointFit), GlobalError>,
) -> io::Result<()> {
    let labels = [set.series.clone()];
    let mut doc = super::errors_in_t::FitWithAdditionsJson::new(
        set,
        fit,
        source,
        with_points,
        run,
        calorimetric,
        errors_in_t,
    );
    let mut n = Nulls::new();
    let calorimetric_fit = match constrained {
        Ok((_, with)) => Some(CalorimetricFitJson::new(&mut n, with, &labels)),
        Err(e) => {
            doc.fit.warnings.push(format!(
                "no fit with the calorimetric values as observations of ΔH°(T): {e}"
            ));
            None
        }
    };
    doc.fit.warnings.extend(n.warning());
    let mut doc = FitWithCalorimetricFitJson {
        fit: doc,
        calorimetric_fit,
    };
    super::write_with_points(w, &mut doc, |d| &mut d.fit.fit.points)
}

/// One element of a joint fit's `calorimetric`: the series it was compared with, then the
/// comparison's fields (against that series' ΔH°(T) in the joint fit).
#[derive(Serialize)]
pub struct SeriesCalorimetricJson<'a> {
    /// The series' label.
    pub series: &'a str,
    /// The comparison.
    #[serde(flatten)]
    pub comparison: CalorimetricJson,
}

/// A joint fit's object with `calorimetric` added.
#[derive(Serialize)]
pub struct JointWithCalorimetricJson<'a> {
    /// The joint fit's own fields.
    #[serde(flatten)]
    pub joint: super::joint::JointJson<'a>,
    /// The comparisons, series by series.
    pub calorimetric: Vec<SeriesCalorimetricJson<'a>>,
    /// With `--calorimetric-in-fit`: the joint fit with the calorimetric values as
    /// observations of ΔH°(T), or null when it was refused (a warning says why); left out
    /// otherwise.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub calorimetric_fit: Option<Option<CalorimetricFitJson<'a>>>,
}

/// `calorimetric_fit`: the joint fit of ln K and the calorimetric values together (each
/// ΔH_cal ± u one more observation of its series' ΔH°(T), weight 1/u²), with the same
/// series, model, options and sharing as the joint fit of ln K alone, whose numbers
/// (`params`, `series_params`) stand beside it in the same object.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CalorimetricFitJson<'a> {
    /// The shared parameters, by key, `{value, se, ci_low, ci_high}`.
    pub params: ParamsJson,
    /// Per series, its own parameters.
    pub series_params: Vec<SeriesParamsJson<'a>>,
    /// What the rows and columns of `cov` hold.
    pub columns: Vec<ColumnJson<'a>>,
    /// The full covariance of this fit.
    pub cov: Vec<Vec<Option<f64>>>,
    /// Used ln K points over all series.
    pub n_ln_k: usize,
    /// Calorimetric values in the fit.
    pub n_calorimetric: usize,
    /// Residual degrees of freedom: ln K points + calorimetric values − columns.
    pub dof: usize,
    /// χ² over both kinds of observation.
    pub chi2: Option<f64>,
    /// χ²/dof.
    pub reduced_chi2: Option<f64>,
}

impl<'a> CalorimetricFitJson<'a> {
    /// The object of `fit`, its series labelled `labels`; undefined numbers go to `n`.
    pub fn new(
        n: &mut Nulls,
        fit: &CalorimetricJointFit,
        labels: &'a [String],
    ) -> CalorimetricFitJson<'a> {
        let label = |s: usize| labels.get(s).map_or("", String::as_str);
        let mut params = Vec::new();
        let mut series_params: Vec<SeriesParamsJson<'a>> = (0..labels.len())
            .map(|s| SeriesParamsJson {
                series: label(s),
                params: ParamsJson(Vec::new()),
            })
            .collect();
        for (c, e) in fit.columns().iter().zip(fit.estimates()) {
            match c.series() {
                None => params.push((
                    c.key(),
                    n.estimate(&format!("calorimetric_fit.params.{}", c.key()), e),
                )),
                Some(s) => {
                    if let Some(sp) = series_params.get_mut(s) {
                        let what = format!("calorimetric_fit.series_params[{s}].{}", c.key());
                        sp.params.0.push((c.key(), n.estimate(&what, e)));
                    }
                }
            }
        }
        let columns = columns_json(fit.columns(), labels);
        let cov = cov_json(n, "calorimetric_fit.cov", fit.covariance());
        let s = fit.statistics();
        CalorimetricFitJson {
            params: ParamsJson(params),
            series_params,
            columns,
            cov,
            n_ln_k: fit.n_ln_k(),
            n_calorimetric: fit.n_calorimetric(),
            dof: fit.dof(),
            chi2: n.num(|| "calorimetric_fit.chi2".into(), s.chi2),
            reduced_chi2: n.num(|| "calorimetric_fit.reduced_chi2".into(), s.reduced_chi2),
        }
    }
}

/// Writes a joint fit with the calorimetric comparisons of each series (`comparisons[s]`
/// for series s) as one JSON object; `constrained` (with `--calorimetric-in-fit`) adds
/// `calorimetric_fit`, null with a warning when the fit was refused.
///
/// # Errors
/// The writer's.
pub fn write_joint_with_calorimetric(
    w: &mut impl Write,
    sets: &[PreparedSet],
    a: &crate::joint::JointAnalysis,
    with_points: bool,
    comparisons: &[Vec<CalorimetricComparison>],
    constrained: Option<&Result<CalorimetricJointFit, GlobalError>>,
) -> io::Result<()> {
    write_joint_with_calorimetric_and_intervals(
        w,
        sets,
        a,
        with_points,
        comparisons,
        constrained,
        None,
    )
}

/// [`write_joint_with_calorimetric`] with the joint fit's estimates and `intervals` from a
/// Monte Carlo or bootstrap `run` (see [`super::joint_intervals::apply`]); the comparisons
/// and `calorimetric_fit` stay the delta method's.
///
/// # Errors
/// The writer's.
pub fn write_joint_with_calorimetric_and_intervals(
    w: &mut impl Write,
    sets: &[PreparedSet],
    a: &crate::joint::JointAnalysis,
    with_points: bool,
    comparisons: &[Vec<CalorimetricComparison>],
    constrained: Option<&Result<CalorimetricJointFit, GlobalError>>,
    run: Option<&isochore_fit::intervals::JointRun>,
) -> io::Result<()> {
    let calorimetric = comparisons
        .iter()
        .enumerate()
        .flat_map(|(s, cs)| {
            let series = a.labels.get(s).map_or("", String::as_str);
            cs.iter().map(move |c| SeriesCalorimetricJson {
                series,
                comparison: CalorimetricJson::new(c),
            })
        })
        .collect();
    let mut joint = super::joint::JointJson::new(sets, a, with_points);
    if let Some(r) = run {
        super::joint_intervals::apply(&mut joint, r, &a.labels);
    }
    let mut n = Nulls::new();
    let calorimetric_fit = constrained.map(|r| match r {
        Ok(fit) => Some(CalorimetricFitJson::new(&mut n, fit, &a.labels)),
        Err(e) => {
            joint.warnings.push(format!(
                "no joint fit with the calorimetric values as observations of ΔH°(T): {e}"
            ));
            None
        }
    });
    joint.warnings.extend(n.warning());
    let doc = JointWithCalorimetricJson {
        joint,
        calorimetric,
        calorimetric_fit,
    };
    serde_json::to_writer(w, &doc).map_err(io::Error::from)
}
