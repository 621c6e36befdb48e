//! Several series in one block design: one model fitted to every series at once, each
//! parameter either shared by all series or fitted per series.
//!
//! Column j of the design is (parameter k, series s) for a per-series parameter or
//! (parameter k, shared); a shared column carries the model's column value in every
//! series' rows, a per-series column only in its own series' rows and zero elsewhere
//! (`design.rs`). The design is solved by the general Householder-QR solver of
//! [`crate::least_squares`], weighted by 1/σ² and scaled as a single fit is
//! ([`crate::SigmaConvention`]); the statistics and the per-point diagnostics are those of a
//! single fit, computed by the same functions on the block design. A single series with
//! every parameter per series is [`crate::fit`] (to rounding: that fit may take its streaming
//! path).
//!
//! [`fit_global`] fits; [`GlobalFit`] holds the result; [`test_equal_across_series`] and
//! [`EqualityTest::between`] test whether parameters fitted per series are equal across
//! the series (extra sum of squares F-test of the per-series fit against the shared one);
//! [`compensation()`] and [`exner_test`] analyse enthalpy–entropy compensation over three or
//! more series.
//!
//! ```
//! use isochore_fit::global::{fit_global, SeriesInput, Sharing, SharingMap};
//! use isochore_fit::{FitOptions, Measurement, Weighting, GAS_CONSTANT};
//! // Two exact series with their own ΔH° and one ΔS° of 50 J/(mol K).
//! let make = |dh: f64| -> Vec<Measurement> {
//!     [280.0, 290.0, 300.0, 310.0]
//!         .iter()
//!         .map(|&t| Measurement::new(t, -dh / (GAS_CONSTANT * t) + 50.0 / GAS_CONSTANT))
//!         .collect()
//! };
//! let (a, b) = (make(30e3), make(45e3));
//! let series = [SeriesInput::new("A", &a), SeriesInput::new("B", &b)];
//! let sharing = SharingMap::per_series().with("delta_s", Sharing::Shared);
//! let opts = FitOptions { weighting: Weighting::Unweighted, ..FitOptions::default() };
//! let f = fit_global(&series, &sharing, &opts).unwrap();
//! assert!((f.estimate("delta_h", 1).unwrap().value - 45e3).abs() < 1e-6);
//! assert!((f.shared("delta_s").unwrap().value - 50.0).abs() < 1e-9);
//! ```

pub mod compensation;
mod constrained;
mod contrast;
mod design;
mod equality;
mod error;
mod region;
mod result;

pub use compensation::{compensation, exner_test, Compensation, CompensationPoint, ExnerTest};
pub use constrained::{
    fit_global_with_calorimetric, CalorimetricJointFit, CalorimetricObservation,
};
pub use contrast::SeriesDifference;
pub use design::GlobalColumn;
pub use equality::{test_equal_across_series, EqualityMethod, EqualityTest};
pub use error::GlobalError;
pub use region::MAX_REGION_VERTICES;
pub use result::GlobalFit;

use crate::diagnostics::{diagnose_one, DiagnosticsSummary, PointContext};
use crate::error::Error;
use crate::least_squares::solve;
use crate::measurement::Measurement;
use crate::model::{is_plausible_temperature, FitOptions};
use crate::vant_hoff::{score, Estimate, Scored, WeightSums};
use design::{block_row, prepare, Layout};
use serde::{Deserialize, Serialize};

/// How one parameter is fitted across the series.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Sharing {
    /// One value for all series.
    Shared,
    /// One value per series.
    PerSeries,
}

/// The sharing of each parameter, by key (`"delta_h"`, `"delta_s"`, `"delta_cp"`, …).
/// Parameters not named are fitted per series; a key the model does not have is refused
/// by [`fit_global`].
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct SharingMap {
    entries: Vec<(String, Sharing)>,
}

impl SharingMap {
    /// Every parameter per series (the map with no entries).
    pub fn per_series() -> Self {
        SharingMap::default()
    }

    /// Parameter `key` fitted as `sharing` (a later entry for the same key replaces an
    /// earlier one).
    pub fn with(mut self, key: &str, sharing: Sharing) -> Self {
        self.set(key, sharing);
        self
    }

    /// Sets parameter `key` to `sharing`.
    pub fn set(&mut self, key: &str, sharing: Sharing) {
        match self.entries.iter_mut().find(|(k, _)| k == key) {
            Some(e) => e.1 = sharing,
            None => self.entries.push((key.to_string(), sharing)),
        }
    }

    /// How `key` is fitted: as set, or per series when not named.
    pub fn sharing_of(&self, key: &str) -> Sharing {
        self.entries
            .iter()
            .find(|(k, _)| k == key)
            .map_or(Sharing::PerSeries, |e| e.1)
    }

    /// The keys named, in the order first set.
    pub fn keys(&self) -> impl Iterator<Item = &str> {
        self.entries.iter().map(|(k, _)| k.as_str())
    }
}

/// One series of a global fit: a label for messages and tables, and its points.
#[derive(Debug, Clone, Copy)]
pub struct SeriesInput<'a> {
    /// A label for people ("pH 7.4", "mutant A"); may be empty.
    pub label: &'a str,
    /// The points, on the fitting scale; excluded points get diagnostics but no weight.
    pub points: &'a [Measurement],
}

impl<'a> SeriesInput<'a> {
    /// A series with a label and its points.
    pub fn new(label: &'a str, points: &'a [Measurement]) -> Self {
        SeriesInput { label, points }
    }
}

/// Fits `options.model` to every series at once, each parameter shared or per series as
/// `sharing` says.
///
/// # Formula
/// ```text
/// ln K_{s,i} = Σ_k x_k(T_{s,i}) β_{k,c(k,s)} + ε_{s,i},   c(k,s) = shared column of k, or k's column for s
/// Cov β̂ = s² (XᵀWX)⁻¹, s² = χ²/(n − p)  (scaled)   or   (XᵀWX)⁻¹  (absolute σ)
/// ```
/// with X the block design, n the used points over all series, p its columns; intervals
/// β̂ ± t_{(1+level)/2, n−p} SE (scaled) or ± z SE (absolute σ), as in [`crate::fit`].
///
/// # Errors
/// [`GlobalError::NoSeries`], [`GlobalError::UnknownParameter`], [`GlobalError::Options`],
/// [`GlobalError::Point`] (the point's index within its series), [`GlobalError::EmptySeries`],
/// [`GlobalError::SingularSharing`], [`GlobalError::SingularDesign`],
/// [`GlobalError::TooFewDegreesOfFreedom`], [`GlobalError::NoSolution`].
pub fn fit_global(
    series: &[SeriesInput<'_>],
    sharing: &SharingMap,
    options: &FitOptions,
) -> Result<GlobalFit, GlobalError> {
    let layout = Layout::new(options.model, sharing, series)?;
    let prepared = prepare(series, &layout, options)?;
    let weights = prepared.weights.as_deref();
    let lin = solve(&prepared.design, &prepared.y, weights).map_err(|e| match e {
        Error::RankDeficient { column } => GlobalError::SingularDesign {
            column: layout
                .columns
                .get(column)
                .map_or_else(|| format!("{}", column + 1), |c| c.label().to_string()),
        },
        other => GlobalError::NoSolution(other.to_string()),
    })?;
    let p = lin.p;
    let dof = lin.dof();
    let weighted = weights.is_some();
    let sums = WeightSums::new(weights, &prepared.y);
    let Scored {
        stats,
        s2,
        variance_scale,
        critical_value,
        cov,
    } = score(&lin, &sums, options);
    let estimates: Vec<Estimate> = (0..p)
        .map(|j| Estimate::symmetric(lin.coefficients[j], cov[(j, j)].sqrt(), critical_value))
        .collect();
    let covariance: Vec<Vec<f64>> = (0..p)
        .map(|a| (0..p).map(|b| cov[(a, b)]).collect())
        .collect();

    // Per-point diagnostics: those of a single fit, on the block rows.
    let typical_w = weights.map_or(1.0, |w| w.iter().sum::<f64>() / lin.n as f64);
    let ctx = PointContext::new(
        &lin,
        &cov,
        s2,
        variance_scale,
        weighted,
        typical_w,
        options.thresholds,
    );
    let mut row_of: Vec<Vec<usize>> = series
        .iter()
        .map(|s| vec![usize::MAX; s.points.len()])
        .collect();
    for (r, &(s, i)) in prepared.rows.iter().enumerate() {
        row_of[s][i] = r;
    }
    let theta = options.t_ref_k;
    let mut scratch = vec![0.0; options.model.n_params()];
    let mut x = vec![0.0; p];
    let mut points = Vec::with_capacity(series.len());
    for (s, input) in series.iter().enumerate() {
        let mut summary = DiagnosticsSummary::default();
        let mut diag = Vec::with_capacity(input.points.len());
        for (i, m) in input.points.iter().enumerate() {
            block_row(&layout, s, m.t_k, theta, &mut scratch, &mut x);
            let r = row_of[s][i];
            let used = (r != usize::MAX).then(|| {
                let sw = weights.map_or(1.0, |w| w[r].sqrt());
                (lin.leverages[r], lin.residuals[r], lin.fitted[r], sw)
            });
            let d = diagnose_one(&ctx, i, m, &x, used);
            summary.note(&d);
            diag.push(d);
        }
        if let Some((index, kelvin)) = summary.first_bad {
            let error = if is_plausible_temperature(kelvin) {
                Error::IllConditioned { index, kelvin }
            } else {
                Error::NoSolution(format!(
                    "point {}: the model cannot be evaluated at {} K (far outside the plausible range {} to {} K); correct or remove the point",
                    index + 1,
                    crate::error::short(kelvin),
                    crate::model::MIN_PLAUSIBLE_K,
                    crate::model::MAX_PLAUSIBLE_K
                ))
            };
            return Err(GlobalError::Point {
                series: s,
                label: input.label.to_string(),
                error,
            });
        }
        points.push(diag);
    }

    let finite = |e: &Estimate| {
        e.value.is_finite() && e.se.is_finite() && e.ci_low.is_finite() && e.ci_high.is_finite()
    };
    if !(estimates.iter().all(finite) && covariance.iter().flatten().all(|v| v.is_finite())) {
        return Err(GlobalError::NoSolution(
            "the numbers are too large or too small to compute with; check the units (temperatures in kelvin, ln K rather than K, σ of ln K) and the reference temperature".into(),
        ));
    }
    let ranges: Vec<(String, f64, f64)> = series
        .iter()
        .map(|input| {
            let (lo, hi) = input
                .points
                .iter()
                .filter(|m| m.included)
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), m| {
                    (lo.min(m.t_k), hi.max(m.t_k))
                });
            (input.label.to_string(), lo, hi)
        })
        .collect();
    let warnings = contrast::disjoint_ranges_warning(&ranges)
        .into_iter()
        .collect();
    Ok(GlobalFit {
        options: *options,
        labels: series.iter().map(|s| s.label.to_string()).collect(),
        sharing: layout.sharing,
        columns: layout.columns,
        column_of: layout.column_of,
        estimates,
        covariance,
        stats,
        n_used: lin.n,
        dof,
        weighted,
        critical_value,
        variance_scale,
        points,
        warnings,
    })
}

/// The used rows of `fit`'s block design made again from `series` (the inputs `fit` was
/// made from), for the interval runs of a joint fit: (series, index) of each row, ln K,
/// the weights (`None` unweighted) and the design, rows in the fit's order.
///
/// # Errors
/// As [`fit_global`]'s checks (none when `series` are the fit's inputs).
#[allow(clippy::type_complexity)]
pub(crate) fn block_system(
    series: &[SeriesInput<'_>],
    fit: &GlobalFit,
) -> Result<
    (
        Vec<(usize, usize)>,
        Vec<f64>,
        Option<Vec<f64>>,
        nalgebra::DMatrix<f64>,
    ),
    GlobalError,
> {
    let mut sharing = SharingMap::per_series();
    for (info, s) in fit.model().params().iter().zip(&fit.sharing) {
        sharing.set(info.key, *s);
    }
    let layout = Layout::new(fit.model(), &sharing, series)?;
    let p = prepare(series, &layout, fit.options())?;
    Ok((p.rows, p.y, p.weights, p.design))
}
