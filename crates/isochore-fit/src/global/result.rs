//! [`GlobalFit`]: the result of a fit of several series in one block design, with private
//! fields and accessors — per-series and shared estimates, the full covariance over every
//! column, fit statistics and per-point diagnostics labelled by series.

use super::design::GlobalColumn;
use super::Sharing;
use crate::diagnostics::PointDiagnostics;
use crate::model::{FitOptions, Model};
use crate::vant_hoff::{Estimate, FitStatistics};
use serde::Serialize;

/// A fit of several series in one block design (see [`super::fit_global`]).
///
/// Columns are in parameter-major order (the model's parameters in turn; a shared one has
/// one column, a per-series one a column per series in series order); [`GlobalFit::columns`]
/// labels them. All values are SI: J/mol, J mol⁻¹ K⁻¹, J mol⁻¹ K⁻².
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GlobalFit {
    pub(super) options: FitOptions,
    pub(super) labels: Vec<String>,
    pub(super) sharing: Vec<Sharing>,
    pub(super) columns: Vec<GlobalColumn>,
    /// `column_of[s][k]`: the column of model parameter k for series s.
    pub(super) column_of: Vec<Vec<usize>>,
    pub(super) estimates: Vec<Estimate>,
    pub(super) covariance: Vec<Vec<f64>>,
    pub(super) stats: FitStatistics,
    pub(super) n_used: usize,
    pub(super) dof: usize,
    pub(super) weighted: bool,
    pub(super) critical_value: f64,
    pub(super) variance_scale: f64,
    pub(super) points: Vec<Vec<PointDiagnostics>>,
    pub(super) warnings: Vec<String>,
}

impl GlobalFit {
    /// The model fitted to every series.
    pub fn model(&self) -> Model {
        self.options.model
    }

    /// The options of the fit.
    pub fn options(&self) -> &FitOptions {
        &self.options
    }

    /// Number of series.
    pub fn n_series(&self) -> usize {
        self.labels.len()
    }

    /// The label of series `s` (0-based); `None` past the last series.
    pub fn series_label(&self, s: usize) -> Option<&str> {
        self.labels.get(s).map(String::as_str)
    }

    /// How parameter `key` was fitted; `None` for a key the model does not have.
    pub fn sharing_of(&self, key: &str) -> Option<Sharing> {
        let k = self.param_index(key)?;
        self.sharing.get(k).copied()
    }

    /// The columns of the block design, in order.
    pub fn columns(&self) -> &[GlobalColumn] {
        &self.columns
    }

    /// The estimate of every column, in column order.
    pub fn estimates(&self) -> &[Estimate] {
        &self.estimates
    }

    /// The coefficient of every column, in column order.
    pub fn coefficients(&self) -> Vec<f64> {
        self.estimates.iter().map(|e| e.value).collect()
    }

    /// The full covariance over all columns (scaled by the reduced χ² under the scaled
    /// convention), rows and columns in column order.
    pub fn covariance(&self) -> &[Vec<f64>] {
        &self.covariance
    }

    /// Parameter `key` as it applies to series `s`: its own estimate when fitted per
    /// series, the shared one when shared. `None` for an unknown key or series.
    pub fn estimate(&self, key: &str, s: usize) -> Option<Estimate> {
        let k = self.param_index(key)?;
        let c = *self.column_of.get(s)?.get(k)?;
        self.estimates.get(c).copied()
    }

    /// The shared estimate of `key`; `None` when it is fitted per series or unknown.
    pub fn shared(&self, key: &str) -> Option<Estimate> {
        match self.sharing_of(key)? {
            Sharing::Shared => self.estimate(key, 0),
            Sharing::PerSeries => None,
        }
    }

    /// Every shared parameter with its estimate, in the model's order.
    pub fn shared_estimates(&self) -> Vec<(&'static str, Estimate)> {
        self.columns
            .iter()
            .zip(&self.estimates)
            .filter(|(c, _)| c.series().is_none())
            .map(|(c, e)| (c.key(), *e))
            .collect()
    }

    /// The parameters of series `s` in the model's order (shared ones included, so that
    /// they are what a single fit of that series would report); `None` past the last series.
    pub fn series_estimates(&self, s: usize) -> Option<Vec<(&'static str, Estimate)>> {
        let cols = self.column_of.get(s)?;
        Some(
            cols.iter()
                .map(|&c| (self.columns[c].key(), self.estimates[c]))
                .collect(),
        )
    }

    /// The covariance of parameters `a` and `b` as they apply to series `s` (the same
    /// entry for every series when both are shared).
    pub fn series_covariance(&self, s: usize, a: &str, b: &str) -> Option<f64> {
        let cols = self.column_of.get(s)?;
        let ca = cols.get(self.param_index(a)?)?;
        let cb = cols.get(self.param_index(b)?)?;
        self.covariance.get(*ca)?.get(*cb).copied()
    }

    /// Goodness of fit over all series: χ², reduced χ², R², log-likelihood, AICc and BIC
    /// with k = columns + 1 (as a single fit counts k = p + 1).
    pub fn statistics(&self) -> &FitStatistics {
        &self.stats
    }

    /// Used points over all series.
    pub fn n_used(&self) -> usize {
        self.n_used
    }

    /// Columns of the block design (fitted coefficients).
    pub fn n_params(&self) -> usize {
        self.columns.len()
    }

    /// Residual degrees of freedom: used points − columns.
    pub fn dof(&self) -> usize {
        self.dof
    }

    /// Whether weights 1/σ² were applied.
    pub fn weighted(&self) -> bool {
        self.weighted
    }

    /// Critical value of the two-sided intervals: Student's t with the residual degrees of
    /// freedom, or the normal under absolute σ.
    pub fn critical_value(&self) -> f64 {
        self.critical_value
    }

    /// Covariance multiplier: the reduced χ² under the scaled convention, 1 under
    /// absolute σ.
    pub fn variance_scale(&self) -> f64 {
        self.variance_scale
    }

    /// Diagnostics of every point of series `s`, in its input order (`index` is 0-based
    /// within the series); `None` past the last series.
    pub fn points(&self, s: usize) -> Option<&[PointDiagnostics]> {
        self.points.get(s).map(Vec::as_slice)
    }

    /// Every point's diagnostics with its series, series by series.
    pub fn all_points(&self) -> impl Iterator<Item = (usize, &PointDiagnostics)> {
        self.points
            .iter()
            .enumerate()
            .flat_map(|(s, pts)| pts.iter().map(move |d| (s, d)))
    }

    /// Cautions in words about the fit as a whole (series over temperature ranges that do
    /// not overlap).
    pub fn warnings(&self) -> &[String] {
        &self.warnings
    }

    /// The position of `key` among the model's parameters.
    fn param_index(&self, key: &str) -> Option<usize> {
        self.options
            .model
            .params()
            .iter()
            .position(|p| p.key == key)
    }
}
