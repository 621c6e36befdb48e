//! The JSON of a fit with errors in T: a single fit's object ([`super::FitJson`], the fit in
//! K only, whose diagnostics and comparison of models it keeps) with an `errors_in_t` object
//! beside its fields, written only when the data set has σ(T) — without σ(T) the document
//! is the same as before, byte for byte. SI units; undefined numbers are null.
//!
//! ```text
//! "errors_in_t": {"method": "york" | "orthogonal_distance", "sigma_t_k": {"min", "max"},
//!   "params": {key: {value, se, ci_low, ci_high, method}}, "cov", "chi2", "dof",
//!   "reduced_chi2", "iterations",
//!   "shifts": [{name, shift, shift_in_se, se_change_percent}], "comparison": "…",
//!   "points": [{row, t_k, sigma_t_k, t_adjusted_k, residual_ln_k, residual_t_k,
//!               effective_sigma_ln_k, chi2_contribution, used}]}
//! ```

use super::{FitJson, Nulls, ParamsJson};
use crate::dataset::PreparedSet;
use crate::rows::RowNumber;
use isochore_fit::errors_in_t::ErrorsInTFit;
use isochore_fit::VantHoffFit;
use serde::Serialize;
use std::io::{self, Write};

/// `errors_in_t.sigma_t_k`: the smallest and largest σ(T) of the used points, K.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SigmaTJson {
    /// Smallest σ(T), K.
    pub min: Option<f64>,
    /// Largest σ(T), K.
    pub max: Option<f64>,
}

/// One element of `errors_in_t.shifts`: a parameter against the fit in K only.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ShiftJson {
    /// The parameter's key.
    pub name: &'static str,
    /// With errors in T − K only, SI units.
    pub shift: Option<f64>,
    /// The shift in SEs of the K-only fit.
    pub shift_in_se: Option<f64>,
    /// How much the SE grows, % of the K-only SE.
    pub se_change_percent: Option<f64>,
}

/// One element of `errors_in_t.points`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ErrorsInTPointJson {
    /// The 1-based data row.
    pub row: RowNumber,
    /// Measured temperature, K.
    pub t_k: Option<f64>,
    /// σ(T), K.
    pub sigma_t_k: Option<f64>,
    /// Adjusted temperature T*, K.
    pub t_adjusted_k: Option<f64>,
    /// ln K − f(T*).
    pub residual_ln_k: Option<f64>,
    /// T − T*, K.
    pub residual_t_k: Option<f64>,
    /// √(σ(ln K)² + (d ln K/dT)²σ(T)²).
    pub effective_sigma_ln_k: Option<f64>,
    /// The point's term of the minimised sum (0 when excluded).
    pub chi2_contribution: Option<f64>,
    /// Whether the point took part.
    pub used: bool,
}

/// `errors_in_t`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ErrorsInTJson {
    /// "york" or "orthogonal_distance".
    pub method: &'static str,
    /// The σ(T) of the used points.
    pub sigma_t_k: SigmaTJson,
    /// The parameters with errors in T, by key.
    pub params: ParamsJson,
    /// Their covariance, in the model's order.
    pub cov: Vec<Vec<Option<f64>>>,
    /// The minimised sum S.
    pub chi2: Option<f64>,
    /// n − p.
    pub dof: usize,
    /// S/(n − p).
    pub reduced_chi2: Option<f64>,
    /// Iterations of the solver.
    pub iterations: usize,
    /// Each parameter against the fit in K only.
    pub shifts: Vec<ShiftJson>,
    /// The comparison in words.
    pub comparison: String,
    /// Per point.
    pub points: Vec<ErrorsInTPointJson>,
}

impl ErrorsInTJson {
    /// The JSON of a fit with errors in T of `set`; undefined values are named in `n`.
    pub fn new(set: &PreparedSet, f: &ErrorsInTFit, n: &mut Nulls) -> ErrorsInTJson {
        let name = |s: &'static str| move || s.to_string();
        let params = ParamsJson(
            f.params()
                .iter()
                .map(|p| {
                    (
                        p.key(),
                        n.estimate(&format!("errors_in_t.params.{}", p.key()), &p.estimate),
                    )
                })
                .collect(),
        );
        let cov = f
            .covariance()
            .iter()
            .enumerate()
            .map(|(a, row)| {
                row.iter()
                    .enumerate()
                    .map(|(b, v)| n.num(|| format!("errors_in_t.cov[{a}][{b}]"), *v))
                    .collect()
            })
            .collect();
        let shifts = f
            .shifts()
            .iter()
            .map(|s| ShiftJson {
                name: s.name,
                shift: n.num(|| format!("errors_in_t.shifts.{}.shift", s.name), s.shift),
                shift_in_se: n.num(
                    || format!("errors_in_t.shifts.{}.shift_in_se", s.name),
                    s.shift_in_se,
                ),
                se_change_percent: n.num(
                    || format!("errors_in_t.shifts.{}.se_change_percent", s.name),
                    s.se_change_percent,
                ),
            })
            .collect();
        let points = set
            .rows
            .iter()
            .zip(f.points())
            .map(|(o, p)| {
                let row = o.row;
                let at =
                    |field: &'static str| move || format!("errors_in_t.points[row {row}].{field}");
                ErrorsInTPointJson {
                    row,
                    t_k: n.num(at("t_k"), p.t_k),
                    sigma_t_k: n.num(at("sigma_t_k"), p.sigma_t_k),
                    t_adjusted_k: n.num(at("t_adjusted_k"), p.t_adjusted_k),
                    residual_ln_k: n.num(at("residual_ln_k"), p.residual_ln_k),
                    residual_t_k: n.num(at("residual_t_k"), p.residual_t_k),
                    effective_sigma_ln_k: n.opt(at("effective_sigma_ln_k"), p.effective_sigma_ln_k),
                    chi2_contribution: n.num(at("chi2_contribution"), p.chi2_contribution),
                    used: p.used,
                }
            })
            .collect();
        ErrorsInTJson {
            method: f.method().key(),
            sigma_t_k: SigmaTJson {
                min: n.num(name("errors_in_t.sigma_t_k.min"), f.sigma_t().min_k),
                max: n.num(name("errors_in_t.sigma_t_k.max"), f.sigma_t().max_k),
            },
            params,
            cov,
            chi2: n.num(name("errors_in_t.chi2"), f.chi2()),
            dof: f.dof(),
            reduced_chi2: n.num(name("errors_in_t.reduced_chi2"), f.reduced_chi2()),
            iterations: f.iterations(),
            shifts,
            comparison: f.comparison().to_string(),
            points,
        }
    }
}

/// A single fit's object with `errors_in_t` added.
#[derive(Serialize)]
pub struct FitWithErrorsInTJson<'a> {
    /// The fit's own fields (the fit in K only).
    #[serde(flatten)]
    pub fit: FitJson<'a>,
    /// The fit with errors in T.
    pub errors_in_t: ErrorsInTJson,
}

/// Writes one fit with its errors-in-T fit as a JSON object. The undefined values of the
/// `errors_in_t` block are named in one more warning.
///
/// # Errors
/// The writer's.
pub fn write_fit_with_errors_in_t(
    w: &mut impl Write,
    set: &PreparedSet,
    fit: &VantHoffFit,
    errors_in_t: &ErrorsInTFit,
    source: Option<&str>,
    with_points: bool,
) -> io::Result<()> {
    let mut n = Nulls::new();
    let block = ErrorsInTJson::new(set, errors_in_t, &mut n);
    let mut doc = FitWithErrorsInTJson {
        fit: FitJson::new(set, fit, source, with_points),
        errors_in_t: block,
    };
    doc.fit.warnings.extend(n.warning());
    serde_json::to_writer(w, &doc).map_err(io::Error::from)
}

/// A single fit's object with any of the additions of the command line: the resampled
/// intervals (inside the fit's fields, [`super::intervals::apply`]), `calorimetric`, and
/// `errors_in_t`, in that order.
#[derive(Serialize)]
pub struct FitWithAdditionsJson<'a> {
    /// The fit's own fields (the fit in K only), with the run's intervals when there is one.
    #[serde(flatten)]
    pub fit: FitJson<'a>,
    /// The calorimetric comparisons, in the order given.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub calorimetric: Option<Vec<super::calorimetric::CalorimetricJson>>,
    /// The fit with errors in T.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub errors_in_t: Option<ErrorsInTJson>,
}

/// Writes one fit with any of a Monte Carlo or bootstrap run (`run`), calorimetric
/// comparisons (`calorimetric`, which stay the delta method's) and the `errors_in_t` block:
/// the document of [`super::intervals::write_fit_with_intervals`] or
/// [`super::calorimetric::write_fit_with_calorimetric`] with the other additions, and
/// `errors_in_t` last, as [`write_fit_with_errors_in_t`] adds it to the plain document. The
/// run's warnings, then the undefined values of the `errors_in_t` block, follow the fit's.
///
/// # Errors
/// The writer's.
#[allow(clippy::too_many_arguments)]
pub fn write_fit_with_additions(
    w: &mut impl Write,
    set: &PreparedSet,
    fit: &VantHoffFit,
    source: Option<&str>,
    with_points: bool,
    run: Option<&isochore_fit::intervals::IntervalRun>,
    calorimetric: Option<&[isochore_fit::calorimetric::CalorimetricComparison]>,
    errors_in_t: Option<&ErrorsInTFit>,
) -> io::Result<()> {
    let mut doc = FitWithAdditionsJson::new(
        set,
        fit,
        source,
        with_points,
        run,
        calorimetric,
        errors_in_t,
    );
    super::write_with_points(w, &mut doc, |d| &mut d.fit.points)
}

impl<'a> FitWithAdditionsJson<'a> {
    /// The document [`write_fit_with_additions`] writes (also the base of
    /// [`super::calorimetric::write_fit_with_calorimetric_fit`]).
    #[allow(clippy::too_many_arguments)]
    pub fn new(
        set: &'a PreparedSet,
        fit: &'a VantHoffFit,
        source: Option<&'a str>,
        with_points: bool,
        run: Option<&isochore_fit::intervals::IntervalRun>,
        calorimetric: Option<&[isochore_fit::calorimetric::CalorimetricComparison]>,
        errors_in_t: Option<&ErrorsInTFit>,
    ) -> FitWithAdditionsJson<'a> {
        let mut fit_doc = FitJson::new(set, fit, source, with_points);
        if let Some(r) = run {
            super::intervals::apply(&mut fit_doc, r);
        }
        let mut n = Nulls::new();
        let block = errors_in_t.map(|f| ErrorsInTJson::new(set, f, &mut n));
        fit_doc.warnings.extend(n.warning());
        FitWithAdditionsJson {
            fit: fit_doc,
            calorimetric: calorimetric.map(|c| {
                c.iter()
                    .map(super::calorimetric::CalorimetricJson::new)
                    .collect()
            }),
            errors_in_t: block,
        }
    }
}
