//! Fits with errors in T as well as in K: each point's temperature has a standard
//! uncertainty σ(T) (a thermometer's ±0.1 K), and the fit weighs it against σ(ln K).
//!
//! - The linear model: York's straight line ([`york`]) in x = 1/T, y = ln K with
//!   σx = σT/T² and uncorrelated errors (r = 0), its exact standard errors (York et al.
//!   2004), then ΔH° = −R·slope, ΔS° = R·intercept.
//! - Every other model (and any [`crate::ModelSpec`]): orthogonal-distance least squares
//!   ([`odr`]) minimising Σ[(yᵢ − f(Tᵢ*))²/σyᵢ² + (Tᵢ − Tᵢ*)²/σTᵢ²] over the parameters
//!   and the true temperatures Tᵢ*, by Gauss–Newton on the full problem; standard errors
//!   from the full Jacobian.
//!
//! The σ convention is the fit's: under "σ are relative weights only" both σ(ln K) and σ(T)
//! are relative, and the covariance is scaled by S/(n − p) (ODRPACK's `sd_beta`); under
//! "σ are known standard uncertainties" it is not (`cov_beta`). A fit with errors in T
//! needs σ(ln K) on every used point, since the two uncertainties are weighed against
//! each other. The result carries the K-only fit of the same points and says in words how
//! far allowing for σ(T) moves each parameter ([`ErrorsInTFit::comparison`]).

mod odr;
mod york;

use crate::error::{short, Error};
use crate::measurement::Measurement;
use crate::model::{FitOptions, Model, SigmaConvention, Weighting};
use crate::models::ParamDimension;
use crate::stats::{normal_quantile, t_quantile};
use crate::vant_hoff::{fit, Estimate, Parameter, VantHoffFit};
use crate::GAS_CONSTANT;
use serde::Serialize;

/// Which method made the numbers of a fit with errors in T.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ErrorsInTMethod {
    /// York's straight line (the linear model).
    York,
    /// Orthogonal-distance least squares over the parameters and the true temperatures.
    OrthogonalDistance,
}

impl ErrorsInTMethod {
    /// The key in JSON: "york", "orthogonal_distance".
    pub fn key(self) -> &'static str {
        match self {
            ErrorsInTMethod::York => "york",
            ErrorsInTMethod::OrthogonalDistance => "orthogonal_distance",
        }
    }
}

/// One point of a fit with errors in T.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ErrorsInTPoint {
    /// 0-based index into the input slice.
    pub index: usize,
    /// Whether the point took part in the fit.
    pub used: bool,
    /// The measured temperature, K.
    pub t_k: f64,
    /// Its standard uncertainty σ(T), K.
    pub sigma_t_k: f64,
    /// The adjusted temperature T* (the fit's estimate of the true temperature), K. For an
    /// excluded point with σ(ln K), the closest point of the fitted curve; else T.
    pub t_adjusted_k: f64,
    /// The residual in ln K at the adjusted temperature, ln K − f(T*).
    pub residual_ln_k: f64,
    /// The residual in temperature, T − T*, K.
    pub residual_t_k: f64,
    /// σ(ln K) of the point (if given).
    pub sigma_ln_k: Option<f64>,
    /// The effective uncertainty √(σ(ln K)² + (d ln K/dT)²σ(T)²) at T*, if σ(ln K) is given.
    pub effective_sigma_ln_k: Option<f64>,
    /// The point's term of the minimised sum, (residual_ln_k/σ(ln K))² + (residual_t_k/σ(T))²
    /// (0 for an excluded point).
    pub chi2_contribution: f64,
}

/// How far allowing for σ(T) moves one parameter from the K-only fit.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ParameterShift {
    /// The parameter's key ("delta_h", …).
    pub name: &'static str,
    /// The K-only estimate.
    pub k_only: Estimate,
    /// The estimate with errors in T.
    pub with_errors_in_t: Estimate,
    /// with − K-only, SI units.
    pub shift: f64,
    /// The shift in units of the K-only SE.
    pub shift_in_se: f64,
    /// How much the SE grows, in % of the K-only SE (negative when it shrinks).
    pub se_change_percent: f64,
}

/// A finished fit with errors in T. Made only by [`fit_errors_in_t`].
#[derive(Debug, Clone, Serialize)]
pub struct ErrorsInTFit {
    pub(crate) method: ErrorsInTMethod,
    pub(crate) model: Model,
    pub(crate) convention: SigmaConvention,
    pub(crate) params: Vec<Parameter>,
    pub(crate) covariance: Vec<Vec<f64>>,
    pub(crate) chi2: f64,
    pub(crate) dof: usize,
    pub(crate) n_used: usize,
    pub(crate) critical_value: f64,
    pub(crate) iterations: usize,
    pub(crate) sigma_t_summary: SigmaTSummary,
    pub(crate) points: Vec<ErrorsInTPoint>,
    pub(crate) shifts: Vec<ParameterShift>,
    pub(crate) comparison: String,
    #[serde(skip)]
    pub(crate) k_only: VantHoffFit,
}

/// The σ(T) of the used points: one value when they all share it, else the range.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SigmaTSummary {
    /// Smallest σ(T) of a used point, K.
    pub min_k: f64,
    /// Largest, K.
    pub max_k: f64,
}

impl SigmaTSummary {
    /// "σ(T) = 0.1 K" or "σ(T) = 0.05–0.2 K".
    pub fn describe(&self) -> String {
        if self.min_k == self.max_k {
            format!("σ(T) = {} K", short(self.min_k))
        } else {
            format!("σ(T) = {}–{} K", short(self.min_k), short(self.max_k))
        }
    }
}

impl ErrorsInTFit {
    /// Which method made the numbers.
    pub fn method(&self) -> ErrorsInTMethod {
        self.method
    }
    /// The model.
    pub fn model(&self) -> Model {
        self.model
    }
    /// The σ convention the SEs follow.
    pub fn convention(&self) -> SigmaConvention {
        self.convention
    }
    /// The parameters in the model's order, SI units.
    pub fn params(&self) -> &[Parameter] {
        &self.params
    }
    /// The parameter with this key.
    pub fn param(&self, key: &str) -> Option<Estimate> {
        self.params
            .iter()
            .find(|p| p.key() == key)
            .map(|p| p.estimate)
    }
    /// ΔH° (at θ for the ΔCp° models), J/mol.
    pub fn delta_h(&self) -> Estimate {
        self.params[0].estimate
    }
    /// ΔS° (at θ), J mol⁻¹ K⁻¹.
    pub fn delta_s(&self) -> Estimate {
        self.params[1].estimate
    }
    /// The covariance of the parameters, SI units (scaled by S/(n − p) under "σ are
    /// relative weights only").
    pub fn covariance(&self) -> &[Vec<f64>] {
        &self.covariance
    }
    /// The minimised sum S (χ² with n − p degrees of freedom when the σ are right).
    pub fn chi2(&self) -> f64 {
        self.chi2
    }
    /// Residual degrees of freedom n − p.
    pub fn dof(&self) -> usize {
        self.dof
    }
    /// S/(n − p).
    pub fn reduced_chi2(&self) -> f64 {
        if self.dof > 0 {
            self.chi2 / self.dof as f64
        } else {
            f64::NAN
        }
    }
    /// Points used.
    pub fn n_used(&self) -> usize {
        self.n_used
    }
    /// The critical value of the intervals (Student's t on n − p, or normal under known σ).
    pub fn critical_value(&self) -> f64 {
        self.critical_value
    }
    /// Iterations of the solver (York's slope, or Gauss–Newton steps).
    pub fn iterations(&self) -> usize {
        self.iterations
    }
    /// The σ(T) of the used points.
    pub fn sigma_t(&self) -> SigmaTSummary {
        self.sigma_t_summary
    }
    /// Per-point residuals in ln K and in T and each point's term of the sum, input order.
    pub fn points(&self) -> &[ErrorsInTPoint] {
        &self.points
    }
    /// Each parameter against the K-only fit.
    pub fn shifts(&self) -> &[ParameterShift] {
        &self.shifts
    }
    /// The comparison with the K-only fit in words.
    pub fn comparison(&self) -> &str {
        &self.comparison
    }
    /// The K-only fit of the same points and options.
    pub fn k_only(&self) -> &VantHoffFit {
        &self.k_only
    }
}

/// The coefficients alone of a fit with errors in T of the used points `t`, `y` with
/// standard uncertainties `sy`, `st` (all checked by the caller), started from `beta0`:
/// York's line for the linear model, orthogonal distance otherwise — the same solvers as
/// [`fit_errors_in_t`], without its K-only fit, diagnostics and words. For the draws of
/// Monte Carlo ([`crate::intervals::monte_carlo`] with σ(T)). `None` when the solver does
/// not settle.
pub(crate) fn coefficients(
    model: Model,
    theta: f64,
    t: &[f64],
    y: &[f64],
    sy: &[f64],
    st: &[f64],
    beta0: &[f64],
) -> Option<Vec<f64>> {
    let beta = if model == Model::LINEAR {
        let x: Vec<f64> = t.iter().map(|t| 1.0 / t).collect();
        let sx: Vec<f64> = t.iter().zip(st).map(|(t, s)| s / (t * t)).collect();
        let line = york::york(&x, y, &sx, sy, -beta0[0] / GAS_CONSTANT).ok()?;
        vec![-GAS_CONSTANT * line.b, GAS_CONSTANT * line.a]
    } else {
        let problem = odr::Problem {
            model,
            theta,
            t,
            y,
            sy,
            st,
        };
        odr::solve_coefficients(&problem, beta0).ok()?
    };
    beta.iter().all(|b| b.is_finite()).then_some(beta)
}

/// Fits `options.model` to `points` with errors in both ln K and T: York's line for the
/// linear model, orthogonal-distance least squares for the others. `sigma_t_k[i]` is the
/// standard uncertainty of point i's temperature in kelvin (a σ in °C is the same number;
/// one in °F is 5/9 of it in K).
///
/// # Errors
/// [`Error::DimensionMismatch`] when `sigma_t_k` and `points` differ in length;
/// [`Error::NonFinite`] or [`Error::NonPositiveSigma`] naming the point whose σ(T) is NaN,
/// infinite or ≤ 0; [`Error::NoSolution`] for an unweighted fit (σ(ln K) is needed to weigh
/// against σ(T)); every error of [`crate::fit`] (which makes the K-only fit first); and
/// [`Error::NoSolution`] when the iteration does not settle.
pub fn fit_errors_in_t(
    points: &[Measurement],
    sigma_t_k: &[f64],
    options: &FitOptions,
) -> Result<ErrorsInTFit, Error> {
    if sigma_t_k.len() != points.len() {
        return Err(Error::DimensionMismatch {
            what: "σ(T) values for the points",
            expected: points.len(),
            found: sigma_t_k.len(),
        });
    }
    for (i, &s) in sigma_t_k.iter().enumerate() {
        if !s.is_finite() {
            return Err(Error::NonFinite {
                what: "σ(T)",
                index: Some(i),
            });
        }
        if s <= 0.0 {
            return Err(Error::NoSolution(format!(
                "point {}: the temperature uncertainty σ(T) = {} K is not positive; give σ(T) > 0 (or leave σ(T) out to fit errors in K only)",
                i + 1,
                short(s)
            )));
        }
    }
    if options.weighting == Weighting::Unweighted {
        return Err(Error::NoSolution(
            "a fit with errors in T needs σ(ln K) for every used point, because σ(T) is weighed against it; give σ or leave σ(T) out".into(),
        ));
    }
    let k_only = fit(points, options)?;
    let model = options.model;
    let theta = options.t_ref_k;
    let used: Vec<usize> = (0..points.len()).filter(|&i| points[i].included).collect();
    let t: Vec<f64> = used.iter().map(|&i| points[i].t_k).collect();
    let y: Vec<f64> = used.iter().map(|&i| points[i].ln_k).collect();
    // `fit` has checked that every used point has a σ(ln K).
    let sy: Vec<f64> = used
        .iter()
        .map(|&i| points[i].sigma_ln_k.unwrap_or(1.0))
        .collect();
    let st: Vec<f64> = used.iter().map(|&i| sigma_t_k[i]).collect();
    let n = used.len();
    let p = model.n_params();
    let beta0 = k_only.coefficients();

    let (method, beta, unscaled, chi2, t_star, iterations) = if model == Model::LINEAR {
        let x: Vec<f64> = t.iter().map(|t| 1.0 / t).collect();
        let sx: Vec<f64> = t.iter().zip(&st).map(|(t, s)| s / (t * t)).collect();
        let b0 = -beta0[0] / GAS_CONSTANT;
        let line = york::york(&x, &y, &sx, &sy, b0)?;
        let r = GAS_CONSTANT;
        let beta = vec![-r * line.b, r * line.a];
        let unscaled = vec![
            vec![r * r * line.var_b, -r * r * line.cov_ab],
            vec![-r * r * line.cov_ab, r * r * line.var_a],
        ];
        let t_star: Vec<f64> = line.x_adjusted.iter().map(|x| 1.0 / x).collect();
        (
            ErrorsInTMethod::York,
            beta,
            unscaled,
            line.chi2,
            t_star,
            line.iterations,
        )
    } else {
        let problem = odr::Problem {
            model,
            theta,
            t: &t,
            y: &y,
            sy: &sy,
            st: &st,
        };
        let sol = odr::solve_full(&problem, &beta0)?;
        let c = &sol.unscaled_covariance;
        let unscaled = (0..p)
            .map(|a| (0..p).map(|b| c[(a, b)]).collect())
            .collect();
        (
            ErrorsInTMethod::OrthogonalDistance,
            sol.beta,
            unscaled,
            sol.chi2,
            sol.t_star,
            sol.iterations,
        )
    };

    let dof = n - p;
    let absolute = options.convention == SigmaConvention::Absolute;
    let scale = if absolute { 1.0 } else { chi2 / dof as f64 };
    let critical_value = if absolute {
        normal_quantile(0.5 + options.level / 2.0)
    } else {
        t_quantile(0.5 + options.level / 2.0, dof as f64)
    };
    let covariance: Vec<Vec<f64>> = unscaled
        .iter()
        .map(|row| row.iter().map(|v| v * scale).collect())
        .collect();
    let params: Vec<Parameter> = (0..p)
        .map(|j| Parameter {
            info: &model.params()[j],
            estimate: Estimate::symmetric(beta[j], covariance[j][j].sqrt(), critical_value),
        })
        .collect();
    if params
        .iter()
        .any(|p| !(p.estimate.value.is_finite() && p.estimate.se.is_finite()))
    {
        return Err(Error::NoSolution(
            "the fit with errors in T gave numbers that are not finite; check the temperatures and their uncertainties".into(),
        ));
    }

    let mut adjusted = vec![None; points.len()];
    for (r, &i) in used.iter().enumerate() {
        adjusted[i] = Some(t_star[r]);
    }
    let point_rows: Vec<ErrorsInTPoint> = points
        .iter()
        .enumerate()
        .map(|(i, m)| {
            let st = sigma_t_k[i];
            let ts = adjusted[i].unwrap_or_else(|| match m.sigma_ln_k {
                Some(sy) => odr::adjust_one(model, theta, &beta, m.t_k, m.ln_k, sy, st),
                None => m.t_k,
            });
            let (f, g) = odr::value_and_slope(model, theta, &beta, ts);
            let ry = m.ln_k - f;
            let rt = m.t_k - ts;
            let contribution = match (m.included, m.sigma_ln_k) {
                (true, Some(sy)) => (ry / sy).powi(2) + (rt / st).powi(2),
                _ => 0.0,
            };
            ErrorsInTPoint {
                index: i,
                used: m.included,
                t_k: m.t_k,
                sigma_t_k: st,
                t_adjusted_k: ts,
                residual_ln_k: ry,
                residual_t_k: rt,
                sigma_ln_k: m.sigma_ln_k,
                effective_sigma_ln_k: m.sigma_ln_k.map(|sy| (sy * sy + g * g * st * st).sqrt()),
                chi2_contribution: contribution,
            }
        })
        .collect();

    let sigma_t_summary = SigmaTSummary {
        min_k: st.iter().copied().fold(f64::INFINITY, f64::min),
        max_k: st.iter().copied().fold(f64::NEG_INFINITY, f64::max),
    };
    let shifts: Vec<ParameterShift> = params
        .iter()
        .zip(k_only.params())
        .map(|(w, k)| {
            let shift = w.estimate.value - k.estimate.value;
            ParameterShift {
                name: w.key(),
                k_only: k.estimate,
                with_errors_in_t: w.estimate,
                shift,
                shift_in_se: shift / k.estimate.se,
                se_change_percent: 100.0 * (w.estimate.se / k.estimate.se - 1.0),
            }
        })
        .collect();
    let comparison = describe_comparison(method, &sigma_t_summary, &params, &shifts);
    Ok(ErrorsInTFit {
        method,
        model,
        convention: options.convention,
        params,
        covariance,
        chi2,
        dof,
        n_used: n,
        critical_value,
        iterations,
        sigma_t_summary,
        points: point_rows,
        shifts,
        comparison,
        k_only,
    })
}

/// "allowing for σ(T) = 0.1 K (York's fit) moves ΔH° by +0.31 kJ/mol (0.20 SE of the
/// K-only fit) and its SE grows 4.0 %; ΔS° by …".
fn describe_comparison(
    method: ErrorsInTMethod,
    sigma_t: &SigmaTSummary,
    params: &[Parameter],
    shifts: &[ParameterShift],
) -> String {
    let how = match method {
        ErrorsInTMethod::York => "York's fit",
        ErrorsInTMethod::OrthogonalDistance => "orthogonal-distance fit",
    };
    let parts: Vec<String> = params
        .iter()
        .zip(shifts)
        .map(|(p, s)| {
            let (factor, unit) = match p.info.dimension {
                ParamDimension::Energy => (1e-3, "kJ/mol"),
                ParamDimension::Entropy | ParamDimension::HeatCapacity => (1.0, "J/(mol·K)"),
                ParamDimension::HeatCapacitySlope => (1.0, "J/(mol·K²)"),
            };
            let grows = if s.se_change_percent >= 0.0 {
                format!("its SE grows {:.1} %", s.se_change_percent)
            } else {
                format!("its SE shrinks {:.1} %", -s.se_change_percent)
            };
            format!(
                "{} by {:+.3} {unit} ({:.2} SE of the K-only fit) and {grows}",
                p.info.symbol,
                s.shift * factor,
                s.shift_in_se.abs()
            )
        })
        .collect();
    format!(
        "allowing for {} ({how}) moves {}",
        sigma_t.describe(),
        parts.join("; ")
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn data(model: Model, beta: &[f64], noise: &[f64]) -> Vec<Measurement> {
        let temps = [
            278.15, 283.15, 288.15, 293.15, 298.15, 303.15, 308.15, 313.15,
        ];
        temps
            .iter()
            .zip(noise)
            .map(|(&t, e)| {
                let x = model.row(t, 298.15);
                let y: f64 = x.iter().zip(beta).map(|(a, b)| a * b).sum();
                Measurement::new(t, y + e).with_sigma(0.02)
            })
            .collect()
    }

    const NOISE: [f64; 8] = [0.013, -0.021, 0.004, 0.017, -0.009, -0.015, 0.022, -0.006];

    #[test]
    fn tiny_sigma_t_gives_the_k_only_fit() {
        for &m in Model::all() {
            let beta = [-30e3, -20.0, -400.0, 3.0];
            let pts = data(m, &beta[..m.n_params()], &NOISE);
            let opts = FitOptions {
                model: m,
                ..FitOptions::default()
            };
            let f = fit_errors_in_t(&pts, &[1e-9; 8], &opts).unwrap();
            for s in f.shifts() {
                assert!(s.shift_in_se.abs() < 1e-6, "{m:?} {s:?}");
                assert!(s.se_change_percent.abs() < 1e-6, "{m:?} {s:?}");
            }
        }
    }

    #[test]
    fn sigma_t_widens_the_errors_and_is_said_in_words() {
        let pts = data(Model::CONSTANT_CP, &[-50e3, -100.0, -500.0], &NOISE);
        let opts = FitOptions {
            model: Model::CONSTANT_CP,
            convention: SigmaConvention::Absolute,
            ..FitOptions::default()
        };
        let f = fit_errors_in_t(&pts, &[0.3; 8], &opts).unwrap();
        assert_eq!(f.method(), ErrorsInTMethod::OrthogonalDistance);
        assert!(f.shifts()[0].se_change_percent > 0.0);
        assert!(f.comparison().starts_with("allowing for σ(T) = 0.3 K"));
        // The contributions add up to the minimised sum.
        let sum: f64 = f.points().iter().map(|p| p.chi2_contribution).sum();
        assert!((sum - f.chi2()).abs() < 1e-9 * f.chi2());
    }

    #[test]
    fn bad_sigma_t_is_refused() {
        let pts = data(Model::LINEAR, &[-30e3, -20.0], &NOISE);
        let opts = FitOptions::default();
        let mut s = [0.1; 8];
        s[2] = 0.0;
        let e = fit_errors_in_t(&pts, &s, &opts).unwrap_err();
        assert!(e.to_string().contains("point 3"), "{e}");
        s[2] = f64::NAN;
        let e = fit_errors_in_t(&pts, &s, &opts).unwrap_err();
        assert!(e.to_string().contains("point 3"), "{e}");
        assert!(fit_errors_in_t(&pts, &[0.1; 7], &opts).is_err());
        let unweighted = FitOptions {
            weighting: Weighting::Unweighted,
            ..opts
        };
        assert!(fit_errors_in_t(&pts, &[0.1; 8], &unweighted).is_err());
    }
}
