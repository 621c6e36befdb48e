//! The result types of the van 't Hoff fit: an [`Estimate`] with its interval, the named
//! [`Parameter`]s, the values re-expressed at one temperature ([`ThermoAt`]) and the finished
//! [`VantHoffFit`] with its accessors. Only data and their plain readers live here; how the
//! numbers are computed is in the sibling modules, and derived quantities (predictions,
//! bands, the ellipse) are methods in [`crate::derived`].

use super::comparison::ModelComparison;
use super::statistics::FitStatistics;
use super::warnings::Warning;
use crate::diagnostics::{PointDiagnostics, PointStore};
use crate::model::{FitOptions, Model};
use crate::models::{ParamDimension, ParamInfo};
use serde::{Deserialize, Serialize};

/// A number with its standard error and a confidence interval at the fit's level.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Estimate {
    /// Best estimate.
    pub value: f64,
    /// Standard error.
    pub se: f64,
    /// Lower confidence limit.
    pub ci_low: f64,
    /// Upper confidence limit.
    pub ci_high: f64,
}

impl Estimate {
    /// An estimate with a symmetric interval `value ± crit·se`.
    pub fn symmetric(value: f64, se: f64, crit: f64) -> Self {
        Estimate {
            value,
            se,
            ci_low: value - crit * se,
            ci_high: value + crit * se,
        }
    }

    /// The same estimate scaled by a positive factor (for unit conversion).
    pub fn scaled(self, factor: f64) -> Self {
        Estimate {
            value: self.value * factor,
            se: self.se * factor.abs(),
            ci_low: self.ci_low * factor,
            ci_high: self.ci_high * factor,
        }
    }
}

/// One fitted parameter: which one (from the model's list) and its estimate. Serialised as
/// `{"name": key, "value", "se", "ci_low", "ci_high"}`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Parameter {
    /// Which parameter (key, symbol, unit).
    pub info: &'static ParamInfo,
    /// Value, SE and confidence interval, in SI units.
    pub estimate: Estimate,
}

impl Parameter {
    /// The machine key, e.g. "delta_h".
    pub fn key(&self) -> &'static str {
        self.info.key
    }
}

impl Serialize for Parameter {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut st = s.serialize_struct("Parameter", 5)?;
        st.serialize_field("name", self.info.key)?;
        st.serialize_field("value", &self.estimate.value)?;
        st.serialize_field("se", &self.estimate.se)?;
        st.serialize_field("ci_low", &self.estimate.ci_low)?;
        st.serialize_field("ci_high", &self.estimate.ci_high)?;
        st.end()
    }
}

/// ΔH°, ΔS°, ΔG° (and ΔCp°) re-expressed at one temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ThermoAt {
    /// The temperature in kelvin.
    pub t_k: f64,
    /// ΔH°(T) in J/mol.
    pub delta_h: Estimate,
    /// ΔS°(T) in J mol⁻¹ K⁻¹.
    pub delta_s: Estimate,
    /// ΔG°(T) in J/mol.
    pub delta_g: Estimate,
    /// ΔCp°(T) in J mol⁻¹ K⁻¹ (models with a heat capacity only).
    pub delta_cp: Option<Estimate>,
}

/// A finished van 't Hoff fit. Made only by [`crate::fit`]; read through its methods (the
/// fields are private, so no hand-built value can break the invariants the methods rely on:
/// one estimate per model parameter, a p×p covariance, finite estimates).
#[derive(Debug, Clone, Serialize)]
pub struct VantHoffFit {
    /// The options the fit was made with.
    pub(crate) options: FitOptions,
    /// Points used.
    pub(crate) n_used: usize,
    /// Points given (used and excluded).
    pub(crate) n_total: usize,
    /// Residual degrees of freedom n − p.
    pub(crate) dof: usize,
    /// Whether weights 1/σ² were applied.
    pub(crate) weighted: bool,
    /// The fitted parameters in the model's order (ΔH°, ΔS°, …), SI units.
    pub(crate) params: Vec<Parameter>,
    /// Full covariance of the parameters, same order, SI units.
    pub(crate) covariance: Vec<Vec<f64>>,
    /// Correlation coefficient of ΔH° and ΔS° (at θ).
    pub(crate) corr_h_s: f64,
    /// Goodness of fit.
    pub(crate) stats: FitStatistics,
    /// Critical value for two-sided intervals at the level (Student's t, or normal under
    /// absolute σ).
    pub(crate) critical_value: f64,
    /// Variance of a new measurement of ln K with typical precision, used by prediction
    /// intervals and bands.
    pub(crate) new_observation_variance: f64,
    /// Covariance multiplier: s² = χ²/(n − p) under the scaled convention, 1 under absolute σ.
    pub(crate) variance_scale: f64,
    /// Lowest used temperature, K.
    pub(crate) t_min_k: f64,
    /// Highest used temperature, K.
    pub(crate) t_max_k: f64,
    /// Weighted harmonic-mean temperature of the used points, 1/T_h = Σwᵢ(1/Tᵢ)/Σwᵢ. There
    /// ΔG°(T_h) is uncorrelated with ΔH° (exactly for the linear model, where 1/T − 1/T_h is
    /// the centred column), so (ΔH°, ΔG°(T_h)) is the pair to quote; ΔH° and ΔS° themselves
    /// stay strongly correlated at any temperature, because ΔS° = (ΔH° − ΔG°)/T.
    pub(crate) t_harmonic_k: f64,
    /// The parameters at the reference temperature θ (the linear model's θ is 298.15 K by
    /// default; there ΔH° and ΔS° are the same at any T).
    pub(crate) at_reference: ThermoAt,
    /// The parameters at the harmonic-mean temperature.
    pub(crate) at_harmonic: ThermoAt,
    /// The temperature where K = 1 (ΔG° = 0), when there is one near the data.
    pub(crate) t_at_k1: Option<Estimate>,
    /// Per-point diagnostics, in the order of the input slice: kept, or (streaming path)
    /// computed on demand from a compact copy of the points.
    pub(crate) points: PointStore,
    /// Whether every number of every point's diagnostics is finite (absent ones aside),
    /// as seen when the fit checked them.
    pub(crate) points_finite: bool,
    /// Comparison along the ladder of nested models on the same points, when enough points.
    pub(crate) comparison: Option<ModelComparison>,
    /// Cautions in words.
    pub(crate) warnings: Vec<Warning>,
    /// How many of `warnings`, at the end, are the fit's own (the rest were put in front by
    /// the caller), so a comparison completed later can write them again.
    #[serde(skip)]
    pub(crate) own_warnings: usize,
    /// The comparison is still to be made ([`super::fit_estimates_first`]).
    #[serde(skip)]
    pub(crate) comparison_pending: bool,
}

impl ThermoAt {
    /// Zeros at `t_k`, filled in once the fit exists.
    pub(super) fn placeholder(t_k: f64) -> Self {
        let z = Estimate {
            value: 0.0,
            se: 0.0,
            ci_low: 0.0,
            ci_high: 0.0,
        };
        ThermoAt {
            t_k,
            delta_h: z,
            delta_s: z,
            delta_g: z,
            delta_cp: None,
        }
    }
}

impl VantHoffFit {
    /// Whether every estimate, the covariance and the values at θ and at the harmonic-mean
    /// temperature are finite numbers.
    pub(super) fn all_estimates_finite(&self) -> bool {
        let est = |e: &Estimate| {
            e.value.is_finite() && e.se.is_finite() && e.ci_low.is_finite() && e.ci_high.is_finite()
        };
        self.params.iter().all(|p| est(&p.estimate))
            && self.covariance.iter().flatten().all(|v| v.is_finite())
            && [&self.at_reference, &self.at_harmonic]
                .iter()
                .all(|t| est(&t.delta_h) && est(&t.delta_s) && est(&t.delta_g))
            && self.t_harmonic_k.is_finite()
            && self.new_observation_variance.is_finite()
    }

    // Readers of every field, so that callers need not touch the fields themselves.
    /// The options the fit was made with.
    pub fn options(&self) -> FitOptions {
        self.options
    }

    /// Points used.
    pub fn n_used(&self) -> usize {
        self.n_used
    }

    /// Points given (used and excluded).
    pub fn n_total(&self) -> usize {
        self.n_total
    }

    /// Residual degrees of freedom n − p.
    pub fn dof(&self) -> usize {
        self.dof
    }

    /// Whether weights 1/σ² were applied.
    pub fn weighted(&self) -> bool {
        self.weighted
    }

    /// The fitted parameters in the model's order, SI units.
    pub fn params(&self) -> &[Parameter] {
        &self.params
    }

    /// Full covariance of the parameters, same order, SI units.
    pub fn covariance(&self) -> &[Vec<f64>] {
        &self.covariance
    }

    /// Correlation coefficient of ΔH° and ΔS° (at θ).
    pub fn corr_h_s(&self) -> f64 {
        self.corr_h_s
    }

    /// Goodness of fit.
    pub fn stats(&self) -> &FitStatistics {
        &self.stats
    }

    /// Critical value for two-sided intervals at the level.
    pub fn critical_value(&self) -> f64 {
        self.critical_value
    }

    /// Variance of a new measurement of ln K with typical precision.
    pub fn new_observation_variance(&self) -> f64 {
        self.new_observation_variance
    }

    /// Covariance multiplier s² (scaled convention) or 1 (absolute σ).
    pub fn variance_scale(&self) -> f64 {
        self.variance_scale
    }

    /// Lowest used temperature, K.
    pub fn t_min_k(&self) -> f64 {
        self.t_min_k
    }

    /// Highest used temperature, K.
    pub fn t_max_k(&self) -> f64 {
        self.t_max_k
    }

    /// Weighted harmonic-mean temperature of the used points, K.
    pub fn t_harmonic_k(&self) -> f64 {
        self.t_harmonic_k
    }

    /// The parameters at the reference temperature θ.
    pub fn at_reference(&self) -> &ThermoAt {
        &self.at_reference
    }

    /// The parameters at the harmonic-mean temperature.
    pub fn at_harmonic(&self) -> &ThermoAt {
        &self.at_harmonic
    }

    /// The temperature where K = 1, when there is one near the data.
    pub fn t_at_k1(&self) -> Option<Estimate> {
        self.t_at_k1
    }

    /// Per-point diagnostics, in the order of the input slice.
    ///
    /// A fit on the streaming path keeps no records: the first call makes them all (168
    /// bytes a point) and keeps them. Callers that only read the points once, or one at a
    /// time, use [`VantHoffFit::points_iter`] or [`VantHoffFit::point`], which keep none.
    pub fn points(&self) -> &[PointDiagnostics] {
        self.points.slice()
    }

    /// Whether every number in every point's diagnostics is finite (an absent one, such as
    /// a studentized residual with no degrees of freedom left, aside), as found when the
    /// fit checked each point: a writer that must name every undefined number can skip its
    /// pass over the points when this is true.
    pub fn points_finite(&self) -> bool {
        self.points_finite
    }

    /// The diagnostics of point `i` (0-based, in the order of the input slice), the same
    /// numbers as `points()[i]`, computed without making the other records.
    pub fn point(&self, i: usize) -> Option<PointDiagnostics> {
        self.points.get(i)
    }

    /// The diagnostics of every point in order, the same numbers as
    /// [`VantHoffFit::points`], each made as it is reached and none kept: for a pass over a
    /// large fit (the JSON's points, a count of flags).
    pub fn points_iter(&self) -> crate::diagnostics::PointIter<'_> {
        crate::diagnostics::PointIter::new(&self.points)
    }

    /// The comparison along the ladder of nested models, when enough points.
    pub fn comparison(&self) -> Option<&ModelComparison> {
        self.comparison.as_ref()
    }

    /// Whether the model comparison is still to be made: a fit from
    /// [`super::fit_estimates_first`] before its [`super::PendingComparison`] has been run
    /// and given to [`VantHoffFit::complete_comparison`] (until then `comparison()` is
    /// `None` and the cautions that depend on it are missing).
    pub fn comparison_pending(&self) -> bool {
        self.comparison_pending
    }

    /// Cautions in words.
    pub fn warnings(&self) -> &[Warning] {
        &self.warnings
    }

    /// Puts a caution of the caller's in front of the fit's own (e.g. that a setting was
    /// not applicable and was changed before fitting).
    pub fn prepend_warning(&mut self, warning: Warning) {
        self.warnings.insert(0, warning);
    }

    /// The model fitted.
    pub fn model(&self) -> Model {
        self.options.model
    }

    /// The coefficient vector β in the model's parameter order, SI units.
    pub fn coefficients(&self) -> Vec<f64> {
        self.params.iter().map(|p| p.estimate.value).collect()
    }

    /// ΔH° (at θ for the ΔCp° model), J/mol.
    pub fn delta_h(&self) -> Estimate {
        self.params[0].estimate
    }

    /// ΔS° (at θ for the ΔCp° model), J mol⁻¹ K⁻¹.
    pub fn delta_s(&self) -> Estimate {
        self.params[1].estimate
    }

    /// ΔCp° (at θ where it varies), J mol⁻¹ K⁻¹, for a model with a heat capacity.
    pub fn delta_cp(&self) -> Option<Estimate> {
        self.params
            .iter()
            .find(|p| p.info.dimension == ParamDimension::HeatCapacity)
            .map(|p| p.estimate)
    }

    /// The estimate of the parameter with this key ("delta_cp_slope", …), if the model has it.
    pub fn param(&self, key: &str) -> Option<Estimate> {
        self.params
            .iter()
            .find(|p| p.info.key == key)
            .map(|p| p.estimate)
    }

    /// Indices (into the input slice) of points carrying any flag.
    pub fn flagged_points(&self) -> Vec<usize> {
        self.points.flagged()
    }
}
