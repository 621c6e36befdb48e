//! The result types of the van 't Hoff fit: an [`Estimate`] with its interval, the named
//! [`Parameter`]s, the values re-expressed at one temperature ([`ThermoAt`]) and the finished
//! [`VantHoffFit`] with its accessors. Only data and their plain readers live here; how the
//! numbers are computed is in the sibling modules, and derived quantities (predictions,
//! bands, the ellipse) are methods in [`crate::derived`].

use super::comparison::ModelComparison;
use super::statistics::FitStatistics;
use super::warnings::Warning;
use crate::diagnostics::PointDiagnostics;
use crate::model::{FitOptions, Model};
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

/// Names of the fitted parameters, in design-column order.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ParameterName {
    /// ΔH° in J/mol (at θ for the ΔCp° model).
    DeltaH,
    /// ΔS° in J mol⁻¹ K⁻¹ (at θ for the ΔCp° model).
    DeltaS,
    /// ΔCp° in J mol⁻¹ K⁻¹.
    DeltaCp,
}

impl ParameterName {
    /// The machine key: "delta_h", "delta_s", "delta_cp".
    pub fn key(self) -> &'static str {
        match self {
            ParameterName::DeltaH => "delta_h",
            ParameterName::DeltaS => "delta_s",
            ParameterName::DeltaCp => "delta_cp",
        }
    }

    /// The symbol: "ΔH°", "ΔS°", "ΔCp°".
    pub fn symbol(self) -> &'static str {
        match self {
            ParameterName::DeltaH => "ΔH°",
            ParameterName::DeltaS => "ΔS°",
            ParameterName::DeltaCp => "ΔCp°",
        }
    }
}

/// One fitted parameter.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Parameter {
    /// Which parameter.
    pub name: ParameterName,
    /// Value, SE and confidence interval, in SI units.
    #[serde(flatten)]
    pub estimate: Estimate,
}

/// ΔH°, ΔS°, ΔG° (and ΔCp°) re-expressed at one temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ThermoAt {
    /// The temperature in kelvin.
    pub t_k: f64,
    /// ΔH°(T) in J/mol.
    pub delta_h: Estimate,
    /// ΔS°(T) in J mol⁻¹ K⁻¹.
    pub delta_s: Estimate,
    /// ΔG°(T) in J/mol.
    pub delta_g: Estimate,
    /// ΔCp° in J mol⁻¹ K⁻¹ (ΔCp° model only).
    pub delta_cp: Option<Estimate>,
}

/// A finished van 't Hoff fit.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct VantHoffFit {
    /// The options the fit was made with.
    pub options: FitOptions,
    /// Points used.
    pub n_used: usize,
    /// Points given (used and excluded).
    pub n_total: usize,
    /// Residual degrees of freedom n − p.
    pub dof: usize,
    /// Whether weights 1/σ² were applied.
    pub weighted: bool,
    /// The fitted parameters in order ΔH°, ΔS°[, ΔCp°], SI units.
    pub params: Vec<Parameter>,
    /// Full covariance of the parameters, same order, SI units.
    pub covariance: Vec<Vec<f64>>,
    /// Correlation coefficient of ΔH° and ΔS° (at θ).
    pub corr_h_s: f64,
    /// Goodness of fit.
    pub stats: FitStatistics,
    /// Critical value for two-sided intervals at the level (Student's t, or normal under
    /// absolute σ).
    pub critical_value: f64,
    /// Variance of a new measurement of ln K with typical precision, used by prediction
    /// intervals and bands.
    pub new_observation_variance: f64,
    /// Covariance multiplier: s² = χ²/(n − p) under the scaled convention, 1 under absolute σ.
    pub variance_scale: f64,
    /// Lowest used temperature, K.
    pub t_min_k: f64,
    /// Highest used temperature, K.
    pub t_max_k: f64,
    /// Weighted harmonic-mean temperature of the used points, 1/T_h = Σwᵢ(1/Tᵢ)/Σwᵢ. There
    /// ΔG°(T_h) is uncorrelated with ΔH° (exactly for the linear model, where 1/T − 1/T_h is
    /// the centred column), so (ΔH°, ΔG°(T_h)) is the pair to quote; ΔH° and ΔS° themselves
    /// stay strongly correlated at any temperature, because ΔS° = (ΔH° − ΔG°)/T.
    pub t_harmonic_k: f64,
    /// The parameters at the reference temperature θ (the linear model's θ is 298.15 K by
    /// default; there ΔH° and ΔS° are the same at any T).
    pub at_reference: ThermoAt,
    /// The parameters at the harmonic-mean temperature.
    pub at_harmonic: ThermoAt,
    /// The temperature where K = 1 (ΔG° = 0), when there is one near the data.
    pub t_at_k1: Option<Estimate>,
    /// Per-point diagnostics, in the order of the input slice.
    pub points: Vec<PointDiagnostics>,
    /// Comparison of the linear and ΔCp° models on the same points, when enough points.
    pub comparison: Option<ModelComparison>,
    /// Cautions in words.
    pub warnings: Vec<Warning>,
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

    /// The model fitted.
    pub fn model(&self) -> Model {
        self.options.model
    }

    /// The coefficient vector β = (ΔH°, ΔS°[, ΔCp°]) in SI units.
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

    /// ΔCp°, J mol⁻¹ K⁻¹, for the ΔCp° model.
    pub fn delta_cp(&self) -> Option<Estimate> {
        self.params.get(2).map(|p| p.estimate)
    }

    /// Indices (into the input slice) of points carrying any flag.
    pub fn flagged_points(&self) -> Vec<usize> {
        self.points
            .iter()
            .filter(|d| d.flags.any())
            .map(|d| d.index)
            .collect()
    }
}
