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
