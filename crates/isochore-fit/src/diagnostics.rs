//! Per-point diagnostics of a weighted fit: fitted value, residuals, leverage, studentized
//! residuals, Cook's distance, DFFITS, and flags against stated thresholds.
//!
//! Weighted diagnostics are the ordinary ones of the √w-scaled problem (√w·y on √w·X).
//! Excluded points get a predicted value and a prediction-standardised residual instead.

use crate::measurement::Measurement;
use crate::model::FitOptions;
use crate::vant_hoff::Solved;
use nalgebra::DMatrix;
use serde::{Deserialize, Serialize};

/// One reason a point is flagged.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum FlagKind {
    /// |externally studentized residual| above the threshold (for an excluded point, the
    /// prediction-standardised residual).
    Outlier,
    /// Leverage above factor × p/n.
    HighLeverage,
    /// Cook's distance above factor / n.
    Influential,
}

/// The set of flags on a point. Serialised as a list such as `["outlier", "influential"]`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(into = "Vec<FlagKind>", from = "Vec<FlagKind>")]
pub struct Flags {
    /// Outlier candidate.
    pub outlier: bool,
    /// High leverage.
    pub high_leverage: bool,
    /// Influential.
    pub influential: bool,
}

impl Flags {
    /// Whether any flag is set.
    pub fn any(self) -> bool {
        self.outlier || self.high_leverage || self.influential
    }

    /// The flags set, in a fixed order.
    pub fn kinds(self) -> Vec<FlagKind> {
        let mut v = Vec::new();
        if self.outlier {
            v.push(FlagKind::Outlier);
        }
        if self.high_leverage {
            v.push(FlagKind::HighLeverage);
        }
        if self.influential {
            v.push(FlagKind::Influential);
        }
        v
    }
}

impl From<Flags> for Vec<FlagKind> {
    fn from(f: Flags) -> Self {
        f.kinds()
    }
}

impl From<Vec<FlagKind>> for Flags {
    fn from(v: Vec<FlagKind>) -> Self {
        Flags {
            outlier: v.contains(&FlagKind::Outlier),
            high_leverage: v.contains(&FlagKind::HighLeverage),
            influential: v.contains(&FlagKind::Influential),
        }
    }
}

/// Diagnostics of one point.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PointDiagnostics {
    /// 0-based index into the input slice.
    pub index: usize,
    /// Temperature, K.
    pub t_k: f64,
    /// Measured ln K.
    pub ln_k: f64,
    /// σ(ln K) used for the weight; `None` in an unweighted fit.
    pub sigma_ln_k: Option<f64>,
    /// Whether the point took part in the fit.
    pub used: bool,
    /// Fitted (predicted) ln K at the point's temperature.
    pub fitted: f64,
    /// Residual ln K − fitted.
    pub residual: f64,
    /// √w × residual.
    pub weighted_residual: f64,
    /// Leverage hᵢ = wᵢ xᵢᵀ(XᵀWX)⁻¹xᵢ (for an excluded point, the leverage it would have
    /// relative to the fitted points).
    pub leverage: f64,
    /// Internally studentized residual rᵢ/(s√(1 − hᵢ)); used points only.
    pub student_int: Option<f64>,
    /// Externally studentized residual rᵢ/(s₍ᵢ₎√(1 − hᵢ)); used points only.
    pub student_ext: Option<f64>,
    /// Cook's distance rᵢ² hᵢ / (p s² (1 − hᵢ)²); used points only.
    pub cooks_d: Option<f64>,
    /// DFFITS = tᵢ √(hᵢ/(1 − hᵢ)); used points only.
    pub dffits: Option<f64>,
    /// Standard deviation of (ln K − fitted) for a new, independent measurement at this
    /// point: √(variance scale/wᵢ + xᵢᵀ Cov xᵢ). A point without σ in a weighted fit (an
    /// excluded one) takes the typical weight n/Σw of the used points.
    pub prediction_se: f64,
    /// For an excluded point, residual / prediction_se: how many prediction standard
    /// deviations off it sits. `None` for used points.
    pub prediction_residual: Option<f64>,
    /// Flags raised against the thresholds.
    pub flags: Flags,
}

/// What every point's diagnostics share: the fit's sizes, variance, covariance and thresholds.
pub(crate) struct PointContext<'a> {
    /// Number of coefficients p.
    pub(crate) p: usize,
    /// Used points n.
    pub(crate) n: f64,
    /// Residual degrees of freedom n − p.
    pub(crate) dof: f64,
    /// s² = χ²/(n − p).
    pub(crate) s2: f64,
    /// Covariance multiplier (s², or 1 under absolute σ).
    pub(crate) variance_scale: f64,
    /// Scaled covariance of the coefficients.
    pub(crate) cov: &'a DMatrix<f64>,
    /// Unscaled covariance (XᵀWX)⁻¹.
    pub(crate) unscaled_cov: &'a DMatrix<f64>,
    /// The coefficients.
    pub(crate) beta: &'a [f64],
    /// Whether weights 1/σ² were applied.
    pub(crate) weighted: bool,
    /// Weight of a point with no σ of its own: n/Σw of the used points (1 unweighted).
    pub(crate) typical_w: f64,
    /// Flag thresholds.
    pub(crate) thresholds: crate::model::FlagThresholds,
}

/// Diagnostics of point `i` with design row `x` (its first p entries are used). `used`
/// carries (leverage, residual, fitted value) for a point that took part in the fit.
pub(crate) fn diagnose_one(
    ctx: &PointContext<'_>,
    i: usize,
    m: &Measurement,
    x: &[f64],
    used: Option<(f64, f64, f64)>,
) -> PointDiagnostics {
    let p = ctx.p;
    let n = ctx.n;
    let dof = ctx.dof;
    let s2 = ctx.s2;
    let th = ctx.thresholds;
    let cov = ctx.cov;
    let good = |v: f64| v.is_finite().then_some(v);
    let sigma_ln_k = if ctx.weighted { m.sigma_ln_k } else { None };
    let w = sigma_ln_k.map_or(ctx.typical_w, |s| 1.0 / (s * s));
    let sw = w.sqrt();
    let x = &x[..p];
    let quad: f64 = (0..p)
        .map(|a| (0..p).map(|b| x[a] * cov[(a, b)] * x[b]).sum::<f64>())
        .sum();
    let prediction_se = (ctx.variance_scale / w + quad).sqrt();
    let mut d = PointDiagnostics {
        index: i,
        t_k: m.t_k,
        ln_k: m.ln_k,
        sigma_ln_k,
        used: m.included,
        fitted: 0.0,
        residual: 0.0,
        weighted_residual: 0.0,
        leverage: 0.0,
        student_int: None,
        student_ext: None,
        cooks_d: None,
        dffits: None,
        prediction_se,
        prediction_residual: None,
        flags: Flags::default(),
    };
    if let Some((h, e, fitted)) = used {
        let rw = sw * e;
        d.fitted = fitted;
        d.residual = e;
        d.weighted_residual = rw;
        d.leverage = h;
        let one_minus_h = 1.0 - h;
        if dof >= 1.0 && s2 > 0.0 && one_minus_h > 1e-10 {
            let t_int = rw / (s2.sqrt() * one_minus_h.sqrt());
            d.student_int = good(t_int);
            let cook = rw * rw * h / (p as f64 * s2 * one_minus_h * one_minus_h);
            d.cooks_d = good(cook);
            if dof >= 2.0 {
                let s2_i = (dof * s2 - rw * rw / one_minus_h) / (dof - 1.0);
                if s2_i > 0.0 {
                    let t_ext = rw / (s2_i.sqrt() * one_minus_h.sqrt());
                    d.student_ext = good(t_ext);
                    d.dffits = good(t_ext * (h / one_minus_h).sqrt());
                }
            }
        }
        d.flags.outlier = d
            .student_ext
            .is_some_and(|t| t.abs() > th.outlier_studentized);
        d.flags.high_leverage = h > th.leverage_factor * p as f64 / n;
        d.flags.influential = d.cooks_d.is_some_and(|c| c > th.cooks_factor / n);
    } else {
        let fitted: f64 = (0..p).map(|a| x[a] * ctx.beta[a]).sum();
        let e = m.ln_k - fitted;
        d.fitted = fitted;
        d.residual = e;
        d.weighted_residual = sw * e;
        let uc = ctx.unscaled_cov;
        d.leverage = w
            * (0..p)
                .map(|a| (0..p).map(|b| x[a] * uc[(a, b)] * x[b]).sum::<f64>())
                .sum::<f64>();
        let z = e / prediction_se;
        d.prediction_residual = good(z);
        d.flags.outlier = d
            .prediction_residual
            .is_some_and(|z| z.abs() > th.outlier_studentized);
    }
    d
}

/// Computes diagnostics for every point (used and excluded).
pub(crate) fn diagnose_points(
    points: &[Measurement],
    solved: &Solved,
    options: &FitOptions,
    cov: &DMatrix<f64>,
    variance_scale: f64,
    s2: f64,
) -> Vec<PointDiagnostics> {
    let lin = &solved.lin;
    let n = lin.n as f64;
    let theta = options.t_ref_k;
    let mut position = vec![usize::MAX; points.len()];
    for (r, &i) in solved.used.iter().enumerate() {
        position[i] = r;
    }
    // Weight of a point with no σ of its own (an excluded point in a weighted fit): that of
    // a typical used point, 1/σ̄² with σ̄² = n/Σw (1 when unweighted).
    let typical_w = solved
        .weights
        .as_ref()
        .map_or(1.0, |w| w.iter().sum::<f64>() / n);
    let ctx = PointContext {
        p: lin.p,
        n,
        dof: lin.dof() as f64,
        s2,
        variance_scale,
        cov,
        unscaled_cov: &lin.unscaled_covariance,
        beta: &lin.coefficients,
        weighted: solved.weights.is_some(),
        typical_w,
        thresholds: options.thresholds,
    };
    points
        .iter()
        .enumerate()
        .map(|(i, m)| {
            let row = options.model.row(m.t_k, theta);
            let r = position[i];
            let used =
                (r != usize::MAX).then(|| (lin.leverages[r], lin.residuals[r], lin.fitted[r]));
            diagnose_one(&ctx, i, m, &row, used)
        })
        .collect()
}
