//! The JSON of `vhfit fit --calorimetric …`: a single fit's object ([`super::FitJson`]) with a
//! `calorimetric` array beside its fields, one element per calorimetric value compared with
//! the van 't Hoff ΔH° at its temperature. SI units; undefined numbers are null.

use super::{EstimateJson, FitJson};
use crate::dataset::PreparedSet;
use isochore_fit::calorimetric::CalorimetricComparison;
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
}

/// Writes a joint fit with the calorimetric comparisons of each series (`comparisons[s]`
/// for series s) as one JSON object.
///
/// # Errors
/// The writer's.
pub fn write_joint_with_calorimetric(
    w: &mut impl Write,
    sets: &[PreparedSet],
    a: &crate::joint::JointAnalysis,
    with_points: bool,
    comparisons: &[Vec<CalorimetricComparison>],
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
    let doc = JointWithCalorimetricJson {
        joint: super::joint::JointJson::new(sets, a, with_points),
        calorimetric,
    };
    serde_json::to_writer(w, &doc).map_err(io::Error::from)
}
