//! The optional joint fit in which calorimetric enthalpies constrain the van 't Hoff
//! parameters (issue 12, item 3): each ΔH_cal(T) ± u of a series is one more observation of
//! that series' ΔH°(T) — a row of the model's ΔH°(T) coefficients in the block design, with
//! weight 1/u² — beside the ln K rows weighted by 1/σ(ln K)². ΔH°(θ) and ΔCp° are then
//! fitted to both kinds of measurement at once ([`fit_global_with_calorimetric`]).
//!
//! The two kinds of row are in different units (ln K, J/mol), so their weights must be
//! standard uncertainties on one footing: the fit needs σ(ln K) on every point (a weighted
//! fit). Under "σ are relative weights only" the residual scatter rescales the covariance of
//! both kinds together, which assumes u and σ(ln K) are off by the same factor; under "σ are
//! known standard uncertainties" nothing is rescaled. A calorimetric value that disagrees
//! with the ln K data (coupled equilibria, buffer protonation) pulls ΔH° towards itself:
//! compare first ([`crate::calorimetric::compare_calorimetric_series`]), and combine only
//! values that agree.

use super::design::{prepare, GlobalColumn, Layout};
use super::error::GlobalError;
use super::{SeriesInput, SharingMap};
use crate::calorimetric::CalorimetricValue;
use crate::least_squares::solve;
use crate::model::{FitOptions, Weighting};
use crate::vant_hoff::{score, Estimate, FitStatistics, WeightSums};
use nalgebra::DMatrix;

/// One calorimetric value of one series (0-based) of a joint fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CalorimetricObservation {
    /// The series it was measured on.
    pub series: usize,
    /// ΔH_cal ± u at T.
    pub value: CalorimetricValue,
}

/// A joint fit of ln K and calorimetric ΔH° together.
#[derive(Debug, Clone, PartialEq)]
pub struct CalorimetricJointFit {
    columns: Vec<GlobalColumn>,
    column_of: Vec<Vec<usize>>,
    model: crate::Model,
    estimates: Vec<Estimate>,
    covariance: Vec<Vec<f64>>,
    stats: FitStatistics,
    n_ln_k: usize,
    n_calorimetric: usize,
    dof: usize,
}

impl CalorimetricJointFit {
    /// The columns of the block design, in order (as [`super::GlobalFit::columns`]).
    pub fn columns(&self) -> &[GlobalColumn] {
        &self.columns
    }

    /// The estimate of every column, in column order (SI).
    pub fn estimates(&self) -> &[Estimate] {
        &self.estimates
    }

    /// The covariance over all columns, in column order.
    pub fn covariance(&self) -> &[Vec<f64>] {
        &self.covariance
    }

    /// Parameter `key` as it applies to series `s` (shared or its own).
    pub fn estimate(&self, key: &str, s: usize) -> Option<Estimate> {
        let k = self.model.params().iter().position(|p| p.key == key)?;
        let c = *self.column_of.get(s)?.get(k)?;
        self.estimates.get(c).copied()
    }

    /// χ² over both kinds of row, reduced χ² and the rest (k counted as a single fit does).
    pub fn statistics(&self) -> &FitStatistics {
        &self.stats
    }

    /// Used ln K points over all series.
    pub fn n_ln_k(&self) -> usize {
        self.n_ln_k
    }

    /// Calorimetric rows.
    pub fn n_calorimetric(&self) -> usize {
        self.n_calorimetric
    }

    /// Residual degrees of freedom: all rows − columns.
    pub fn dof(&self) -> usize {
        self.dof
    }
}

/// Fits `options.model` to every series' ln K and to the calorimetric values `cal` at
/// once, each parameter shared or per series as `sharing` says.
///
/// # Formula
/// ```text
/// ln K_{s,i} = x(T_{s,i})ᵀ β_s + ε,          weight 1/σ(ln K)²
/// ΔH_cal,j   = h(T_j)ᵀ β_{s(j)} + η,          weight 1/u_j²      (h: the model's ΔH°(T) row)
/// ```
/// solved by weighted least squares on the stacked design; covariance, intervals and
/// statistics as in [`super::fit_global`].
///
/// # Errors
/// As [`super::fit_global`]; [`GlobalError::NoSolution`] for an unweighted fit, no
/// calorimetric value, a value naming a series not given, or a value whose T is not
/// above 0 K, whose ΔH is not finite or whose u is not positive.
pub fn fit_global_with_calorimetric(
    series: &[SeriesInput<'_>],
    sharing: &SharingMap,
    options: &FitOptions,
    cal: &[CalorimetricObservation],
) -> Result<CalorimetricJointFit, GlobalError> {
    if options.weighting != Weighting::InverseVariance {
        return Err(GlobalError::NoSolution(
            "calorimetric values can constrain the fit only when every ln K has its σ (a weighted fit): the two kinds of measurement are combined by their standard uncertainties".into(),
        ));
    }
    if cal.is_empty() {
        return Err(GlobalError::NoSolution(
            "no calorimetric value was given to constrain the fit".into(),
        ));
    }
    let layout = Layout::new(options.model, sharing, series)?;
    let prepared = prepare(series, &layout, options)?;
    let n_ln_k = prepared.y.len();
    let p = layout.p();
    let theta = options.t_ref_k;
    let mut rows: Vec<Vec<f64>> = Vec::with_capacity(cal.len());
    let mut y = prepared.y.clone();
    let mut w = prepared.weights.clone().unwrap_or_default();
    for (j, c) in cal.iter().enumerate() {
        let v = c.value;
        let Some(cols) = layout.column_of.get(c.series) else {
            return Err(GlobalError::NoSolution(format!(
                "calorimetric value {}: series {} is not among the {} series fitted",
                j + 1,
                c.series + 1,
                series.len()
            )));
        };
        let usable = v.t_k.is_finite() && v.t_k > 0.0 && v.delta_h.is_finite();
        if !(usable && v.u.is_finite() && v.u > 0.0) {
            return Err(GlobalError::NoSolution(format!(
                "calorimetric value {}: the temperature must be above 0 K, ΔH_cal a number and its uncertainty above 0 (an exact value cannot be weighted)",
                j + 1
            )));
        }
        let h = options.model.delta_h_row(v.t_k, theta);
        let mut row = vec![0.0; p];
        for (k, &col) in cols.iter().enumerate() {
            row[col] += h[k];
        }
        rows.push(row);
        y.push(v.delta_h);
        w.push(1.0 / (v.u * v.u));
    }
    let n = y.len();
    let mut design = DMatrix::zeros(n, p);
    design
        .view_mut((0, 0), (n_ln_k, p))
        .copy_from(&prepared.design);
    for (r, row) in rows.iter().enumerate() {
        for (c, v) in row.iter().enumerate() {
            design[(n_ln_k + r, c)] = *v;
        }
    }
    let lin = solve(&design, &y, Some(&w)).map_err(|e| match e {
        crate::Error::RankDeficient { column } => GlobalError::SingularDesign {
            column: layout
                .columns
                .get(column)
                .map_or_else(|| format!("{}", column + 1), |c| c.label().to_string()),
        },
        other => GlobalError::NoSolution(other.to_string()),
    })?;
    let sums = WeightSums::new(Some(&w), &y);
    let scored = score(&lin, &sums, options);
    let estimates: Vec<Estimate> = (0..p)
        .map(|j| {
            Estimate::symmetric(
                lin.coefficients[j],
                scored.cov[(j, j)].sqrt(),
                scored.critical_value,
            )
        })
        .collect();
    let covariance = (0..p)
        .map(|a| (0..p).map(|b| scored.cov[(a, b)]).collect())
        .collect();
    Ok(CalorimetricJointFit {
        columns: layout.columns,
        column_of: layout.column_of,
        model: options.model,
        estimates,
        covariance,
        stats: scored.stats,
        n_ln_k,
        n_calorimetric: cal.len(),
        dof: lin.dof(),
    })
}
