//! The van 't Hoff fit: estimates of (ΔH°, ΔS°[, ΔCp°]) with their covariance, fit
//! statistics, per-point diagnostics, warnings in words, and the comparison of the
//! linear and constant-ΔCp° models on the same points.
//!
//! Derived quantities (predictions, bands, the confidence ellipse, temperatures for a
//! target K) are methods on [`VantHoffFit`] in [`crate::derived`].

use crate::diagnostics::{diagnose_points, DiagnosticsSummary, PointContext, PointDiagnostics};
use crate::error::Error;
use crate::fast::FastFit;
use crate::least_squares::{solve, weighted_rss, LinearFit};
use crate::measurement::Measurement;
use crate::model::{
    is_plausible_temperature, FitOptions, Model, SigmaConvention, Weighting,
    TEMPERATURE_RESOLUTION_K,
};
use crate::stats::{chi2_upper_tail, f_upper_tail, normal_quantile, t_quantile};
use nalgebra::DMatrix;
use serde::{Deserialize, Serialize};

/// |corr(ΔH°, ΔS°)| above which a warning explains the correlation (common practice:
/// van 't Hoff fits over a narrow 1/T range are nearly always this correlated).
pub const STRONG_CORRELATION: f64 = 0.95;

/// Fewer residual degrees of freedom than this earns a "few points" warning (common practice).
pub const FEW_DOF: usize = 3;

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

/// Goodness-of-fit numbers.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct FitStatistics {
    /// χ² = Σ wᵢ eᵢ² (the plain residual sum of squares when unweighted).
    pub chi2: f64,
    /// χ² / (n − p).
    pub reduced_chi2: f64,
    /// Residual standard deviation √(χ²/(n − p)): in ln K units when unweighted, in units of
    /// σ when weighted.
    pub residual_sd: f64,
    /// Weighted coefficient of determination 1 − χ²/Σ wᵢ (yᵢ − ȳ_w)².
    pub r2: f64,
    /// Adjusted R² = 1 − (1 − R²)(n − 1)/(n − p).
    pub adj_r2: f64,
    /// Gaussian log-likelihood with the variance estimated (k = p + 1 parameters).
    pub log_likelihood: f64,
    /// Small-sample Akaike criterion; `None` when n − k − 1 ≤ 0.
    pub aicc: Option<f64>,
    /// Bayesian (Schwarz) criterion.
    pub bic: f64,
    /// Under the absolute-σ convention, P(χ²_{n−p} ≥ χ²): a tiny value says the stated
    /// uncertainties are too small for the scatter. `None` otherwise.
    pub chi2_p_value: Option<f64>,
}

/// The verdict of the model comparison.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModelComparison {
    /// F statistic for adding ΔCp° to the linear model.
    pub f_statistic: f64,
    /// Its p-value from F(1, n − 3).
    pub f_p_value: f64,
    /// AICc(ΔCp° model) − AICc(linear); negative favours ΔCp°. `None` with too few points.
    pub delta_aicc: Option<f64>,
    /// The model the evidence prefers.
    pub preferred: Model,
    /// The verdict in plain words.
    pub verdict: String,
}

/// What a warning is about, for callers that react to kinds rather than text.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum WarningKind {
    /// Few degrees of freedom: intervals are wide and diagnostics weak.
    FewPoints,
    /// ΔH° and ΔS° strongly correlated.
    StrongCorrelation,
    /// At least one point flagged as outlier, high leverage or influential.
    FlaggedPoints,
    /// The linear model is used but the data support curvature (ΔCp° ≠ 0).
    CurvatureIgnored,
    /// The ΔCp° model is used but the data do not support it.
    CurvatureUnsupported,
    /// Under absolute σ, the scatter is inconsistent with the stated uncertainties.
    ScatterVersusSigma,
    /// A requested setting was not applicable and was ignored.
    SettingIgnored,
    /// A value is undefined (reported as null).
    Undefined,
    /// A narrow temperature range.
    NarrowRange,
    /// A prediction outside the measured range.
    Extrapolation,
}

/// A caution in words, next to the numbers it qualifies.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Warning {
    /// What it is about.
    pub kind: WarningKind,
    /// The sentence shown to the chemist.
    pub message: String,
}

impl Warning {
    /// Builds a warning.
    pub fn new(kind: WarningKind, message: impl Into<String>) -> Self {
        Warning {
            kind,
            message: message.into(),
        }
    }
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

/// Internal: how a fit was computed, and what its diagnostics pass reads.
enum Engine {
    /// The streaming path of [`crate::fast`].
    Fast(FastFit),
    /// The general solver, with the used ln K.
    General { solved: Solved, y: Vec<f64> },
}

/// Internal: a solved model on the used points.
pub(crate) struct Solved {
    pub(crate) lin: LinearFit,
    pub(crate) weights: Option<Vec<f64>>,
    pub(crate) used: Vec<usize>,
}

/// Internal: validated points ready for a model: which are used, their weights and ln K.
pub(crate) struct Prepared {
    pub(crate) used: Vec<usize>,
    pub(crate) weights: Option<Vec<f64>>,
    pub(crate) y: Vec<f64>,
}

/// Checks points and options for `model` in one pass, before any arithmetic: every value
/// valid ([`Measurement::validate`]); every temperature plausible unless
/// [`FitOptions::allow_extreme_temperatures`]; enough used points; enough distinct
/// temperatures at [`TEMPERATURE_RESOLUTION_K`] — p for a model with p parameters and p + 1
/// for an error estimate from the scatter (p under absolute σ, whose errors come from σ);
/// and, for a weighted fit, a σ on every used point whose weight 1/σ² is a normal number.
///
/// # Errors
/// In this order: the first invalid or implausible point, [`Error::TooFewPoints`],
/// [`Error::SingleTemperature`], [`Error::TooFewTemperatures`], then the first used point
/// with [`Error::MissingSigma`] or [`Error::SigmaOutOfRange`].
pub(crate) fn check_inputs(
    points: &[Measurement],
    options: &FitOptions,
    model: Model,
) -> Result<(), Error> {
    options.validate()?;
    let p = model.n_params();
    let weighted = options.weighting == Weighting::InverseVariance;
    let needed = if weighted && options.convention == SigmaConvention::Absolute {
        p
    } else {
        p + 1
    };
    let mut used = 0usize;
    let mut seen: Vec<f64> = Vec::with_capacity(needed);
    let mut sigma_fault: Option<Error> = None;
    for (i, pt) in points.iter().enumerate() {
        pt.validate(i)?;
        if !options.allow_extreme_temperatures && !is_plausible_temperature(pt.t_k) {
            return Err(Error::ImplausibleTemperature {
                index: Some(i),
                kelvin: pt.t_k,
            });
        }
        if !pt.included {
            continue;
        }
        used += 1;
        if seen.len() < needed
            && seen
                .iter()
                .all(|s| (pt.t_k - s).abs() >= TEMPERATURE_RESOLUTION_K)
        {
            seen.push(pt.t_k);
        }
        if weighted && sigma_fault.is_none() {
            match pt.sigma_ln_k {
                None => sigma_fault = Some(Error::MissingSigma { index: i }),
                Some(s) if !(1.0 / (s * s)).is_normal() => {
                    sigma_fault = Some(Error::SigmaOutOfRange {
                        index: Some(i),
                        value: s,
                    })
                }
                Some(_) => {}
            }
        }
    }
    if used < needed {
        return Err(Error::TooFewPoints {
            available: used,
            needed,
        });
    }
    if seen.len() == 1 {
        return Err(Error::SingleTemperature);
    }
    if seen.len() < needed {
        return Err(Error::TooFewTemperatures {
            distinct: seen.len(),
            needed,
            parameters: p,
            points: used,
        });
    }
    match sigma_fault {
        Some(e) => Err(e),
        None => Ok(()),
    }
}

/// Validates points and options for `model` and collects the used points and weights.
pub(crate) fn prepare(
    points: &[Measurement],
    options: &FitOptions,
    model: Model,
) -> Result<Prepared, Error> {
    check_inputs(points, options, model)?;
    let used: Vec<usize> = (0..points.len()).filter(|&i| points[i].included).collect();
    let weights = match options.weighting {
        Weighting::Unweighted => None,
        Weighting::InverseVariance => {
            let mut w = Vec::with_capacity(used.len());
            for &i in &used {
                match points[i].sigma_ln_k {
                    Some(s) => w.push(1.0 / (s * s)),
                    None => return Err(Error::MissingSigma { index: i }),
                }
            }
            Some(w)
        }
    };
    let y: Vec<f64> = used.iter().map(|&i| points[i].ln_k).collect();
    Ok(Prepared { used, weights, y })
}

/// The design matrix of `model` on the used points (each row computed once).
pub(crate) fn design(
    points: &[Measurement],
    used: &[usize],
    model: Model,
    theta: f64,
) -> DMatrix<f64> {
    let n = used.len();
    let p = model.n_params();
    let mut x = DMatrix::zeros(n, p);
    for (r, &i) in used.iter().enumerate() {
        let row = model.row(points[i].t_k, theta);
        for (c, v) in row.iter().take(p).enumerate() {
            x[(r, c)] = *v;
        }
    }
    x
}

/// Validates points and options, and solves one model on the included points.
pub(crate) fn solve_model(
    points: &[Measurement],
    options: &FitOptions,
    model: Model,
) -> Result<Solved, Error> {
    let prepared = prepare(points, options, model)?;
    let x = design(points, &prepared.used, model, options.t_ref_k);
    let lin = solve(&x, &prepared.y, prepared.weights.as_deref())?;
    Ok(Solved {
        lin,
        weights: prepared.weights,
        used: prepared.used,
    })
}

/// Sums over the used points that every model's statistics share.
pub(crate) struct WeightSums {
    n: usize,
    weighted: bool,
    /// Σ wᵢ (yᵢ − ȳ_w)².
    tss: f64,
    /// Σ ln wᵢ.
    sum_ln_w: f64,
}

impl WeightSums {
    pub(crate) fn new(weights: Option<&[f64]>, y: &[f64]) -> Self {
        let (sum_w, sum_wy, sum_ln_w) = match weights {
            Some(w) => w.iter().zip(y).fold((0.0, 0.0, 0.0), |(a, b, c), (w, y)| {
                (a + w, b + w * y, c + w.ln())
            }),
            None => (y.len() as f64, y.iter().sum(), 0.0),
        };
        let mean = sum_wy / sum_w;
        let tss = match weights {
            Some(w) => w.iter().zip(y).map(|(w, y)| w * (y - mean).powi(2)).sum(),
            None => y.iter().map(|y| (y - mean).powi(2)).sum(),
        };
        WeightSums {
            n: y.len(),
            weighted: weights.is_some(),
            tss,
            sum_ln_w,
        }
    }
}

/// Fit statistics for a model with `p` coefficients and weighted residual sum of squares
/// `chi2` on the used points summarised by `sums`.
pub(crate) fn statistics(
    chi2: f64,
    p: usize,
    sums: &WeightSums,
    convention: SigmaConvention,
) -> FitStatistics {
    let n = sums.n as f64;
    let dof = n - p as f64;
    let p = p as f64;
    let tss = sums.tss;
    let sum_ln_w = sums.sum_ln_w;
    let reduced = chi2 / dof;
    let r2 = if tss > 0.0 {
        1.0 - chi2 / tss
    } else {
        f64::NAN
    };
    let adj_r2 = 1.0 - (1.0 - r2) * (n - 1.0) / dof;
    // Gaussian likelihood, σᵢ² = σ²/wᵢ with σ² estimated by RSS/n (floored so exact data
    // give a large finite value rather than infinity).
    let sigma2 = (chi2 / n).max(f64::MIN_POSITIVE);
    let log_likelihood =
        -0.5 * n * ((2.0 * std::f64::consts::PI * sigma2).ln() + 1.0) + 0.5 * sum_ln_w;
    let k = p + 1.0;
    let aic = 2.0 * k - 2.0 * log_likelihood;
    let aicc = if n - k - 1.0 > 0.0 {
        Some(aic + 2.0 * k * (k + 1.0) / (n - k - 1.0))
    } else {
        None
    };
    let bic = k * n.ln() - 2.0 * log_likelihood;
    let chi2_p_value = match (convention, sums.weighted) {
        (SigmaConvention::Absolute, true) if dof > 0.0 => chi2_upper_tail(chi2, dof),
        _ => None,
    };
    FitStatistics {
        chi2,
        reduced_chi2: reduced,
        residual_sd: reduced.sqrt(),
        r2,
        adj_r2,
        log_likelihood,
        aicc,
        bic,
        chi2_p_value,
    }
}

/// Fits a van 't Hoff model by weighted least squares and computes every diagnostic.
///
/// # Formula
/// ```text
/// ln Kᵢ = xᵢ(Tᵢ)·β + εᵢ,   Var εᵢ = s² σᵢ²  (scaled)  or  σᵢ² (absolute)
/// Cov β̂ = s² (XᵀWX)⁻¹ with s² = χ²/(n − p)  (scaled),   (XᵀWX)⁻¹  (absolute)
/// ```
/// where xᵢ is [`Model::row`], W = diag(1/σᵢ²) (identity when unweighted), χ² = Σ wᵢ eᵢ².
/// Intervals: β̂ⱼ ± t_{(1+level)/2, n−p} SEⱼ (scaled) or ± z_{(1+level)/2} SEⱼ (absolute).
///
/// Excluded points (`included == false`) take no part in the estimates but are returned
/// with a predicted value and a prediction-standardised residual.
///
/// # Errors
/// Any invalid point or option ([`Error::NonFinite`], [`Error::NonPositiveTemperature`],
/// [`Error::NonPositiveSigma`], [`Error::InvalidLevel`], …); [`Error::MissingSigma`] for a
/// weighted fit with a used point lacking σ; [`Error::TooFewPoints`] when fewer than p + 1
/// points are used (p under absolute σ); [`Error::SingleTemperature`]; [`Error::RankDeficient`];
/// [`Error::NoSolution`] when the numbers overflow (absurd units or reference temperature).
///
/// # Examples
/// ```
/// use isochore_fit::{fit, FitOptions, Measurement, Weighting, GAS_CONSTANT};
/// // Exact data with ΔH° = 40 kJ/mol, ΔS° = 100 J/(mol K).
/// let pts: Vec<Measurement> = [280.0, 290.0, 300.0, 310.0]
///     .iter()
///     .map(|&t| Measurement::new(t, -40e3 / (GAS_CONSTANT * t) + 100.0 / GAS_CONSTANT))
///     .collect();
/// let opts = FitOptions { weighting: Weighting::Unweighted, ..FitOptions::default() };
/// let f = fit(&pts, &opts).unwrap();
/// assert!((f.delta_h().value - 40e3).abs() < 1e-6);
/// ```
pub fn fit(points: &[Measurement], options: &FitOptions) -> Result<VantHoffFit, Error> {
    fit_with(points, options, true)
}

/// [`fit`], with the streaming path allowed or not (tests compare the two).
pub(crate) fn fit_with(
    points: &[Measurement],
    options: &FitOptions,
    allow_streaming: bool,
) -> Result<VantHoffFit, Error> {
    let model = options.model;
    // Well-behaved data take the streaming path (one QR for both models, no n×p matrix);
    // everything else, errors included, the general one.
    // The rules of identifiability and plausibility hold on both paths (one pass, which
    // stops counting temperatures once enough are found).
    check_inputs(points, options, model)?;
    let fast = if allow_streaming {
        FastFit::try_new(points, options)
    } else {
        None
    };
    let engine = match fast {
        Some(fast) => Engine::Fast(fast),
        None => {
            let solved = solve_model(points, options, model)?;
            let y: Vec<f64> = solved.used.iter().map(|&i| points[i].ln_k).collect();
            Engine::General { solved, y }
        }
    };
    let fast_lin;
    let (lin, weighted, sums) = match &engine {
        Engine::Fast(f) => {
            fast_lin = LinearFit {
                coefficients: f.coefficients(),
                unscaled_covariance: f.unscaled_covariance(),
                fitted: Vec::new(),
                residuals: Vec::new(),
                leverages: Vec::new(),
                rss: f.rss,
                n: f.n(),
                p: model.n_params(),
            };
            let weighted = options.weighting == Weighting::InverseVariance;
            let sums = WeightSums {
                n: f.n(),
                weighted,
                tss: f.tss,
                sum_ln_w: f.sum_ln_w,
            };
            (&fast_lin, weighted, sums)
        }
        Engine::General { solved, y } => (
            &solved.lin,
            solved.weights.is_some(),
            WeightSums::new(solved.weights.as_deref(), y),
        ),
    };
    let p = lin.p;
    let dof = lin.dof();
    let stats = statistics(lin.rss, p, &sums, options.convention);
    let mut warnings = Vec::new();

    let absolute = options.convention == SigmaConvention::Absolute && weighted;
    if options.convention == SigmaConvention::Absolute && !weighted {
        warnings.push(Warning::new(
            WarningKind::SettingIgnored,
            "absolute σ was asked for but the fit is unweighted; the covariance is scaled by the residual variance instead",
        ));
    }
    let s2 = stats.reduced_chi2;
    let variance_scale = if absolute { 1.0 } else { s2 };
    let critical_value = if absolute {
        normal_quantile(0.5 + options.level / 2.0)
    } else {
        t_quantile(0.5 + options.level / 2.0, dof as f64)
    };
    let cov = &lin.unscaled_covariance * variance_scale;
    let covariance: Vec<Vec<f64>> = (0..p)
        .map(|a| (0..p).map(|b| cov[(a, b)]).collect())
        .collect();
    let names = [
        ParameterName::DeltaH,
        ParameterName::DeltaS,
        ParameterName::DeltaCp,
    ];
    let params: Vec<Parameter> = (0..p)
        .map(|j| Parameter {
            name: names[j],
            estimate: Estimate::symmetric(lin.coefficients[j], cov[(j, j)].sqrt(), critical_value),
        })
        .collect();
    // The scale s² cancels in a correlation; taking it from (XᵀWX)⁻¹ keeps it defined
    // when the data are exact (s² = 0).
    let uc = &lin.unscaled_covariance;
    let corr_h_s = uc[(0, 1)] / (uc[(0, 0)] * uc[(1, 1)]).sqrt();

    // Temperature range and weighted harmonic mean.
    let (t_min_k, t_max_k, sum_w, sum_w_inv_t) = match &engine {
        Engine::Fast(f) => (f.t_min, f.t_max, f.sum_w, f.sum_w_inv_t),
        Engine::General { solved, .. } => {
            let mut t_min_k = f64::INFINITY;
            let mut t_max_k = f64::NEG_INFINITY;
            let mut sum_w = 0.0;
            let mut sum_w_inv_t = 0.0;
            for (r, &i) in solved.used.iter().enumerate() {
                let t = points[i].t_k;
                t_min_k = t_min_k.min(t);
                t_max_k = t_max_k.max(t);
                let w = solved.weights.as_ref().map_or(1.0, |w| w[r]);
                sum_w += w;
                sum_w_inv_t += w / t;
            }
            (t_min_k, t_max_k, sum_w, sum_w_inv_t)
        }
    };
    let t_harmonic_k = sum_w / sum_w_inv_t;

    // New-observation variance: s² × (typical σ² = n/Σw) weighted, s² unweighted.
    let typical_sigma2 = if weighted { lin.n as f64 / sum_w } else { 1.0 };
    let new_observation_variance = variance_scale * typical_sigma2;

    let (points_diag, summary) = match &engine {
        Engine::Fast(f) => {
            let ctx = PointContext::new(
                lin.n,
                &lin.coefficients,
                &cov,
                &lin.unscaled_covariance,
                s2,
                variance_scale,
                weighted,
                if weighted { sum_w / lin.n as f64 } else { 1.0 },
                options.thresholds,
            );
            f.diagnose(points, options, &ctx)
        }
        Engine::General { solved, .. } => {
            let d = diagnose_points(points, solved, options, &cov, variance_scale, s2);
            let mut summary = DiagnosticsSummary::default();
            for p in &d {
                summary.note(p);
            }
            (d, summary)
        }
    };
    if let Some((index, t_k)) = summary.first_bad {
        // An ordinary temperature that cannot be evaluated points at the design, not at the
        // temperature.
        if is_plausible_temperature(t_k) {
            return Err(Error::IllConditioned { index, kelvin: t_k });
        }
        return Err(Error::NoSolution(format!(
            "point {}: the model cannot be evaluated at {} K (far outside the plausible range {} to {} K); correct or remove the point",
            index + 1,
            crate::error::short(t_k),
            crate::model::MIN_PLAUSIBLE_K,
            crate::model::MAX_PLAUSIBLE_K
        )));
    }

    let mut out = VantHoffFit {
        options: *options,
        n_used: lin.n,
        n_total: points.len(),
        dof,
        weighted,
        params,
        covariance,
        corr_h_s,
        stats,
        critical_value,
        new_observation_variance,
        variance_scale,
        t_min_k,
        t_max_k,
        t_harmonic_k,
        at_reference: ThermoAt::placeholder(options.t_ref_k),
        at_harmonic: ThermoAt::placeholder(t_harmonic_k),
        t_at_k1: None,
        points: points_diag,
        comparison: None,
        warnings: Vec::new(),
    };
    out.at_reference = out.thermo_at(options.t_ref_k);
    out.at_harmonic = out.thermo_at(t_harmonic_k);
    if !out.all_estimates_finite() {
        return Err(Error::NoSolution(
            "the numbers are too large or too small to compute with; check the units (temperatures in kelvin, ln K rather than K, σ of ln K) and the reference temperature".into(),
        ));
    }
    out.t_at_k1 = out.temperature_for_k(1.0).ok();
    // The comparison needs only the other model's χ² on the same points and weights.
    out.comparison = if lin.n >= 4 {
        let other = match model {
            Model::Linear => Model::ConstantCp,
            Model::ConstantCp => Model::Linear,
        };
        let chi2_other = match &engine {
            Engine::Fast(f) => f.rss_other.ok_or(Error::TooFewPoints {
                available: lin.n,
                needed: 4,
            }),
            Engine::General { solved, y } => {
                let x = design(points, &solved.used, other, options.t_ref_k);
                weighted_rss(&x, y, solved.weights.as_deref())
            }
        };
        match chi2_other {
            Ok(chi2_other) => {
                let (chi2_lin, chi2_cp) = match model {
                    Model::Linear => (lin.rss, chi2_other),
                    Model::ConstantCp => (chi2_other, lin.rss),
                };
                Some(comparison_from(
                    chi2_lin,
                    chi2_cp,
                    &sums,
                    options.convention,
                ))
            }
            Err(_) => None,
        }
    } else {
        None
    };

    // Cautions in words.
    if dof < FEW_DOF {
        warnings.push(Warning::new(
            WarningKind::FewPoints,
            format!(
                "only {} point(s) used for {} parameters ({} degree(s) of freedom): intervals are wide and point diagnostics are weak",
                lin.n, p, dof
            ),
        ));
    }
    if corr_h_s.abs() > STRONG_CORRELATION {
        warnings.push(Warning::new(
            WarningKind::StrongCorrelation,
            format!(
                "ΔH° and ΔS° are strongly correlated (r = {corr_h_s:.4}); their separate intervals overstate what is known jointly — quote the covariance, or ΔH° with ΔG° at the mean temperature {:.1} K, where the two are nearly uncorrelated",
                t_harmonic_k
            ),
        ));
    }
    let flagged = summary.flagged;
    if flagged > 0 {
        warnings.push(Warning::new(
            WarningKind::FlaggedPoints,
            format!("{flagged} point(s) flagged as outlier, high leverage or influential; inspect them before trusting the result"),
        ));
    }
    if t_max_k - t_min_k < 10.0 {
        warnings.push(Warning::new(
            WarningKind::NarrowRange,
            format!(
                "the measured range is only {:.1} K wide; ΔH° from so narrow a range is poorly determined",
                t_max_k - t_min_k
            ),
        ));
    }
    if let Some(c) = &out.comparison {
        match (model, c.preferred) {
            (Model::Linear, Model::ConstantCp) => warnings.push(Warning::new(
                WarningKind::CurvatureIgnored,
                format!("the van 't Hoff plot curves ({}); the linear model ignores this — consider the ΔCp° model", c.verdict),
            )),
            (Model::ConstantCp, Model::Linear) => warnings.push(Warning::new(
                WarningKind::CurvatureUnsupported,
                format!("the data do not support a non-zero ΔCp° ({}); the linear model is simpler and its ΔH° more precise", c.verdict),
            )),
            _ => {}
        }
    }
    if let Some(pv) = out.stats.chi2_p_value {
        if pv < 0.001 {
            warnings.push(Warning::new(
                WarningKind::ScatterVersusSigma,
                format!(
                    "the scatter is larger than the stated σ allow (χ²/dof = {:.2}, p = {pv:.2e}); absolute-σ intervals are too narrow — use the scaled convention or revisit σ",
                    out.stats.reduced_chi2
                ),
            ));
        } else if pv > 0.999 {
            warnings.push(Warning::new(
                WarningKind::ScatterVersusSigma,
                format!(
                    "the scatter is much smaller than the stated σ imply (χ²/dof = {:.2}); the σ may be overestimated",
                    out.stats.reduced_chi2
                ),
            ));
        }
    }
    if out.stats.r2.is_nan() {
        warnings.push(Warning::new(
            WarningKind::Undefined,
            "every used ln K is the same, so R² is undefined (reported as null)",
        ));
    }
    if dof == 0 {
        warnings.push(Warning::new(
            WarningKind::Undefined,
            "no residual degree of freedom: the reduced χ², residual SD and adjusted R² are undefined (reported as null) and the point diagnostics are empty",
        ));
    }
    if summary.leverage_one {
        warnings.push(Warning::new(
            WarningKind::Undefined,
            "a point has leverage 1 (the fit passes through it); its studentized residual and Cook's distance are undefined",
        ));
    }
    out.warnings = warnings;
    Ok(out)
}

/// Compares the linear and constant-ΔCp° models on the same included points with the same
/// weights: an F-test for the extra parameter and the difference in AICc.
///
/// Returns `Ok(None)` when there are too few points for the ΔCp° model to leave a residual
/// degree of freedom (fewer than 4 used points).
///
/// # Formula
/// ```text
/// F = (χ²_lin − χ²_cp) / (χ²_cp / (n − 3)),   p = P(F(1, n − 3) ≥ F)
/// ΔAICc = AICc_cp − AICc_lin
/// ```
/// The ΔCp° model is preferred when p < 0.05 and ΔAICc < 0 (or ΔAICc is unavailable); the
/// linear model otherwise. Both numbers are reported so the chemist can judge.
///
/// # Errors
/// As [`fit`].
pub fn compare_models(
    points: &[Measurement],
    options: &FitOptions,
) -> Result<Option<ModelComparison>, Error> {
    let n_used = points.iter().filter(|p| p.included).count();
    if n_used < 4 {
        return Ok(None);
    }
    let prepared = prepare(points, options, Model::Linear)?;
    let w = prepared.weights.as_deref();
    let theta = options.t_ref_k;
    let x_lin = design(points, &prepared.used, Model::Linear, theta);
    let chi2_lin = weighted_rss(&x_lin, &prepared.y, w)?;
    let x_cp = design(points, &prepared.used, Model::ConstantCp, theta);
    let chi2_cp = match weighted_rss(&x_cp, &prepared.y, w) {
        Ok(c) => c,
        Err(Error::RankDeficient { .. }) | Err(Error::TooFewPoints { .. }) => return Ok(None),
        Err(e) => return Err(e),
    };
    let sums = WeightSums::new(w, &prepared.y);
    Ok(Some(comparison_from(
        chi2_lin,
        chi2_cp,
        &sums,
        options.convention,
    )))
}

/// The comparison of the linear and ΔCp° models from their χ² on the same points.
fn comparison_from(
    chi2_lin: f64,
    chi2_cp: f64,
    sums: &WeightSums,
    convention: SigmaConvention,
) -> ModelComparison {
    let s_lin = statistics(chi2_lin, 2, sums, convention);
    let s_cp = statistics(chi2_cp, 3, sums, convention);
    let dof_cp = sums.n as f64 - 3.0;
    let drop = (s_lin.chi2 - s_cp.chi2).max(0.0);
    // With χ²_cp = 0 the ΔCp° model is exact: any drop is infinitely significant, and no
    // drop at all (both models exact) is no evidence.
    let f_statistic = if s_cp.chi2 > 0.0 {
        drop / (s_cp.chi2 / dof_cp)
    } else if drop > 0.0 {
        f64::INFINITY
    } else {
        0.0
    };
    let f_p_value = f_upper_tail(f_statistic, 1.0, dof_cp).unwrap_or(1.0);
    let delta_aicc = match (s_cp.aicc, s_lin.aicc) {
        (Some(a), Some(b)) => Some(a - b),
        _ => None,
    };
    let supports = f_p_value < 0.05 && delta_aicc.is_none_or(|d| d < 0.0);
    let preferred = if supports {
        Model::ConstantCp
    } else {
        Model::Linear
    };
    let aicc_text = match delta_aicc {
        Some(d) => format!("ΔAICc = {d:+.2}"),
        None => "ΔAICc unavailable with so few points".to_string(),
    };
    let verdict = if supports {
        format!(
            "curvature is supported: adding ΔCp° improves the fit (F-test {}, {aicc_text})",
            format_p(f_p_value)
        )
    } else if f_p_value < 0.05 {
        format!("evidence for curvature is mixed: the F-test says yes ({}) but {aicc_text} favours the linear model", format_p(f_p_value))
    } else {
        format!(
            "no evidence of curvature: ΔCp° does not improve the fit (F-test {}, {aicc_text})",
            format_p(f_p_value)
        )
    };
    ModelComparison {
        f_statistic,
        f_p_value,
        delta_aicc,
        preferred,
        verdict,
    }
}

/// Formats a p-value for people: "p = 0.123", or "p < 0.001".
pub fn format_p(p: f64) -> String {
    if p < 0.001 {
        "p < 0.001".to_string()
    } else {
        format!("p = {p:.3}")
    }
}

impl ThermoAt {
    fn placeholder(t_k: f64) -> Self {
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
    fn all_estimates_finite(&self) -> bool {
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::GAS_CONSTANT;

    fn exact(dh: f64, ds: f64, temps: &[f64]) -> Vec<Measurement> {
        temps
            .iter()
            .map(|&t| {
                Measurement::new(t, -dh / (GAS_CONSTANT * t) + ds / GAS_CONSTANT).with_sigma(0.05)
            })
            .collect()
    }

    #[test]
    fn too_few_and_single_temperature() {
        let opts = FitOptions::default();
        let pts = exact(1e4, 10.0, &[290.0, 300.0]);
        assert!(matches!(fit(&pts, &opts), Err(Error::TooFewPoints { .. })));
        let pts = exact(1e4, 10.0, &[300.0, 300.0, 300.0, 300.0]);
        assert_eq!(fit(&pts, &opts).unwrap_err(), Error::SingleTemperature);
        let mut pts = exact(1e4, 10.0, &[290.0, 300.0, 310.0]);
        pts[1].sigma_ln_k = None;
        assert_eq!(
            fit(&pts, &opts).unwrap_err(),
            Error::MissingSigma { index: 1 }
        );
    }

    #[test]
    fn cp_model_recovers_curved_exact_data() {
        // Exact ΔCp° data: ΔH°(θ) = −20 kJ/mol, ΔS°(θ) = −30 J/(mol K), ΔCp° = −800 J/(mol K).
        let theta = 298.15;
        let temps = [278.0, 283.0, 288.0, 293.0, 298.0, 303.0, 308.0, 313.0];
        let pts: Vec<Measurement> = temps
            .iter()
            .map(|&t| {
                let x = Model::ConstantCp.row(t, theta);
                Measurement::new(t, x[0] * -20e3 + x[1] * -30.0 + x[2] * -800.0).with_sigma(0.02)
            })
            .collect();
        let opts = FitOptions {
            model: Model::ConstantCp,
            ..FitOptions::default()
        };
        let f = fit(&pts, &opts).unwrap();
        assert!((f.delta_h().value + 20e3).abs() < 1e-6 * 20e3);
        assert!((f.delta_cp().unwrap().value + 800.0).abs() < 1e-6 * 800.0);
    }
}
