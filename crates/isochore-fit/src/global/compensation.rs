//! Enthalpy–entropy compensation across three or more series: the compensation temperature
//! β from a regression of ΔH° on ΔS° that accounts for each point's ΔH°–ΔS° covariance
//! ([`compensation`]), the Krug–Hunter–Grieger test (β's interval against the harmonic-mean
//! temperature) and Exner's common-intersection F-test on the van 't Hoff lines
//! ([`exner_test`]).
//!
//! ΔH° and ΔS° estimated from one series' data are strongly correlated (r near ±1), and
//! their errors alone place the points of several series on a line of slope near T_hm. A
//! straight ΔH°–ΔS° line is therefore expected from correlated estimates and proves nothing
//! by itself; only a β whose interval excludes T_hm is evidence of more (Krug, Hunter &
//! Grieger, J. Phys. Chem. 80, 2335 and 2341, 1976).

use super::error::GlobalError;
use super::result::GlobalFit;
use super::SeriesInput;
use crate::least_squares::weighted_rss;
use crate::model::Weighting;
use crate::stats::{f_upper_tail, t_quantile};
use nalgebra::DMatrix;
use serde::Serialize;

/// One series' (ΔS°, ΔH°) with their standard errors and covariance, at one temperature.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CompensationPoint {
    /// The series' label.
    pub label: String,
    /// ΔH°, J/mol.
    pub delta_h: f64,
    /// ΔS°, J mol⁻¹ K⁻¹.
    pub delta_s: f64,
    /// SE of ΔH°.
    pub se_h: f64,
    /// SE of ΔS°.
    pub se_s: f64,
    /// Cov(ΔH°, ΔS°).
    pub cov_hs: f64,
}

impl CompensationPoint {
    /// Every series of a joint fit, ΔH° and ΔS° at `t_k` with the covariance from the joint
    /// covariance.
    pub fn from_fit(fit: &GlobalFit, t_k: f64) -> Vec<CompensationPoint> {
        (0..fit.n_series())
            .filter_map(|s| {
                let h = fit.delta_h_at(s, t_k)?;
                let e = fit.delta_s_at(s, t_k)?;
                Some(CompensationPoint {
                    label: fit.series_label(s)?.to_string(),
                    delta_h: h.value,
                    delta_s: e.value,
                    se_h: h.se,
                    se_s: e.se,
                    cov_hs: fit.h_s_covariance_at(s, t_k)?,
                })
            })
            .collect()
    }
}

/// The compensation temperature and the Krug–Hunter–Grieger test.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Compensation {
    /// β = dΔH°/dΔS°, K: the slope of the line ΔH° = α + βΔS°.
    pub beta: f64,
    /// Its standard error (scaled by √(S/(n − 2)) when the scatter exceeds the points' own
    /// uncertainty).
    pub se_beta: f64,
    /// Lower end of β's interval.
    pub ci_low: f64,
    /// Upper end of β's interval.
    pub ci_high: f64,
    /// α, J/mol: ΔH° where ΔS° = 0.
    pub alpha: f64,
    /// S/(n − 2): the weighted scatter about the line per degree of freedom (about 1 when the
    /// points' own uncertainties explain it).
    pub reduced_s: f64,
    /// The harmonic-mean temperature the test compares β with, K.
    pub t_hm_k: f64,
    /// Whether β's interval excludes T_hm (the Krug–Hunter–Grieger criterion).
    pub excludes_t_hm: bool,
    /// The verdict in words, with the caution about correlated estimates.
    pub verdict: String,
}

/// The caution every compensation verdict carries.
pub const CORRELATED_ESTIMATES_CAUTION: &str = "ΔH° and ΔS° estimated from the same data are strongly correlated, so their errors alone line the series up with a slope near the harmonic-mean temperature; compensation between correlated estimates is expected and proves nothing by itself";

/// β by York's regression with correlated errors in both variables (York, Evensen, Martínez
/// & Delgado, Am. J. Phys. 72, 367, 2004), x = ΔS°, y = ΔH°, each point weighted by its own
/// SEs and correlation; the interval β ± t(n − 2) SE at `level`; the Krug–Hunter–Grieger test
/// against `t_hm_k`.
///
/// # Errors
/// [`GlobalError::NoSolution`] with fewer than three points, a non-positive or non-finite
/// SE, a correlation of ±1 (a point with no extent across the line), or no convergence.
pub fn compensation(
    points: &[CompensationPoint],
    t_hm_k: f64,
    level: f64,
) -> Result<Compensation, GlobalError> {
    let n = points.len();
    if n < 3 {
        return Err(GlobalError::NoSolution(format!(
            "a compensation analysis needs at least three series, but {} given",
            crate::error::counted(n, "was", "were")
        )));
    }
    let mut wx = Vec::with_capacity(n);
    let mut wy = Vec::with_capacity(n);
    let mut r = Vec::with_capacity(n);
    for p in points {
        let ok = |v: f64| v.is_finite() && v > 0.0;
        if !(ok(p.se_h) && ok(p.se_s) && p.delta_h.is_finite() && p.delta_s.is_finite()) {
            return Err(GlobalError::NoSolution(format!(
                "series '{}': ΔH° and ΔS° need finite values and positive standard errors",
                p.label
            )));
        }
        let rho = p.cov_hs / (p.se_h * p.se_s);
        if rho.is_nan() || rho.abs() >= 1.0 - 1e-15 {
            return Err(GlobalError::NoSolution(format!(
                "series '{}': ΔH° and ΔS° are perfectly correlated, so the point has no uncertainty across the line",
                p.label
            )));
        }
        wx.push(1.0 / (p.se_s * p.se_s));
        wy.push(1.0 / (p.se_h * p.se_h));
        r.push(rho);
    }
    let x: Vec<f64> = points.iter().map(|p| p.delta_s).collect();
    let y: Vec<f64> = points.iter().map(|p| p.delta_h).collect();
    // Start from the ordinary slope of y on x.
    let mx = x.iter().sum::<f64>() / n as f64;
    let my = y.iter().sum::<f64>() / n as f64;
    let sxx: f64 = x.iter().map(|v| (v - mx).powi(2)).sum();
    let sxy: f64 = x.iter().zip(&y).map(|(a, b)| (a - mx) * (b - my)).sum();
    let mut b = if sxx > 0.0 { sxy / sxx } else { t_hm_k };
    let mut state = None;
    for _ in 0..500 {
        let w: Vec<f64> = (0..n)
            .map(|i| {
                let a = (wx[i] * wy[i]).sqrt();
                wx[i] * wy[i] / (wx[i] + b * b * wy[i] - 2.0 * b * r[i] * a)
            })
            .collect();
        let sw: f64 = w.iter().sum();
        let xb = w.iter().zip(&x).map(|(w, x)| w * x).sum::<f64>() / sw;
        let yb = w.iter().zip(&y).map(|(w, y)| w * y).sum::<f64>() / sw;
        let beta_i: Vec<f64> = (0..n)
            .map(|i| {
                let (u, v) = (x[i] - xb, y[i] - yb);
                let a = (wx[i] * wy[i]).sqrt();
                w[i] * (u / wy[i] + b * v / wx[i] - (b * u + v) * r[i] / a)
            })
            .collect();
        let num: f64 = (0..n).map(|i| w[i] * beta_i[i] * (y[i] - yb)).sum();
        let den: f64 = (0..n).map(|i| w[i] * beta_i[i] * (x[i] - xb)).sum();
        let next = num / den;
        if !next.is_finite() {
            break;
        }
        let done = (next - b).abs() <= 1e-13 * next.abs().max(1e-300);
        b = next;
        state = Some((w, sw, xb, yb, beta_i));
        if done {
            break;
        }
    }
    let Some((w, sw, xb, yb, beta_i)) = state else {
        return Err(GlobalError::NoSolution(
            "the compensation regression did not converge".into(),
        ));
    };
    let alpha = yb - b * xb;
    // Adjusted x and the slope's variance (York et al. 2004, eq. 13).
    let xa: Vec<f64> = (0..n).map(|i| xb + beta_i[i]).collect();
    let xbar = (0..n).map(|i| w[i] * xa[i]).sum::<f64>() / sw;
    let su: f64 = (0..n).map(|i| w[i] * (xa[i] - xbar).powi(2)).sum();
    let s: f64 = (0..n)
        .map(|i| w[i] * (y[i] - b * x[i] - alpha).powi(2))
        .sum();
    let reduced_s = s / (n - 2) as f64;
    let se_beta = (1.0 / su).sqrt() * reduced_s.max(1.0).sqrt();
    let crit = t_quantile(0.5 + level / 2.0, (n - 2) as f64);
    let (ci_low, ci_high) = (b - crit * se_beta, b + crit * se_beta);
    if !(b.is_finite() && se_beta.is_finite() && ci_low.is_finite()) {
        return Err(GlobalError::NoSolution(
            "the compensation regression gave no finite slope; the series' ΔS° may not differ enough".into(),
        ));
    }
    let excludes_t_hm = t_hm_k < ci_low || t_hm_k > ci_high;
    let pct = crate::vant_hoff::comparison_percent(level);
    let verdict = if excludes_t_hm {
        format!(
            "β = {b:.0} K ({pct}% interval {ci_low:.0} to {ci_high:.0} K) excludes the harmonic-mean temperature {t_hm_k:.1} K: by the Krug–Hunter–Grieger criterion the compensation goes beyond what correlated errors produce. {CORRELATED_ESTIMATES_CAUTION}; an interval that excludes T_hm is the evidence needed, and chemistry must still explain it"
        )
    } else {
        format!(
            "β = {b:.0} K ({pct}% interval {ci_low:.0} to {ci_high:.0} K) includes the harmonic-mean temperature {t_hm_k:.1} K: no evidence of compensation beyond the artefact of correlated errors (Krug–Hunter–Grieger criterion). {CORRELATED_ESTIMATES_CAUTION}"
        )
    };
    Ok(Compensation {
        beta: b,
        se_beta,
        ci_low,
        ci_high,
        alpha,
        reduced_s,
        t_hm_k,
        excludes_t_hm,
        verdict,
    })
}

/// Exner's common-intersection test of the van 't Hoff lines ln K = a_s + b_s/T.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ExnerTest {
    /// The temperature at which the lines through one common point meet, K (1/x₀); `None`
    /// when the best common point lies at 1/T ≤ 0.
    pub t_iso_k: Option<f64>,
    /// F = ((SS_common − SS_free)/(k − 2)) / (SS_free/(N − 2k)).
    pub f_statistic: f64,
    /// k − 2.
    pub df_num: usize,
    /// N − 2k.
    pub df_den: usize,
    /// P(F(k − 2, N − 2k) ≥ F): small values say the lines do not share a point.
    pub p_value: f64,
    /// The verdict in words.
    pub verdict: String,
}

/// Exner's F-test (Exner, Collect. Czech. Chem. Commun. 29, 1094, 1964; Nature 227, 366,
/// 1970): k straight van 't Hoff lines (ΔH° constant in each series) forced through one
/// common point (x₀, y₀) in the (1/T, ln K) plane — k + 2 parameters, x₀ found by a search
/// of the residual sum of squares — against k free lines (2k parameters), weighted by 1/σ²
/// when `weighting` says so. Lines through a common point are what compensation with
/// β = 1/x₀ means for the data themselves rather than for correlated estimates.
///
/// # Errors
/// [`GlobalError::NoSolution`] with fewer than three series, too few points (N ≤ 2k), a
/// series with fewer than two distinct temperatures, or a missing σ in a weighted test.
pub fn exner_test(
    series: &[SeriesInput<'_>],
    weighting: Weighting,
    level: f64,
) -> Result<ExnerTest, GlobalError> {
    let k = series.len();
    if k < 3 {
        return Err(GlobalError::NoSolution(
            "Exner's common-intersection test needs at least three series".into(),
        ));
    }
    let mut rows: Vec<(usize, f64, f64, f64)> = Vec::new();
    for (s, input) in series.iter().enumerate() {
        for m in input.points.iter().filter(|m| m.included) {
            let w = match weighting {
                Weighting::Unweighted => 1.0,
                Weighting::InverseVariance => match m.sigma_ln_k {
                    Some(sig) if sig > 0.0 && sig.is_finite() => 1.0 / (sig * sig),
                    _ => {
                        return Err(GlobalError::NoSolution(format!(
                            "{}: a point has no usable σ for a weighted test",
                            super::error::series_name(s, input.label)
                        )))
                    }
                },
            };
            rows.push((s, 1.0 / m.t_k, m.ln_k, w));
        }
    }
    let n = rows.len();
    if n <= 2 * k {
        return Err(GlobalError::NoSolution(format!(
            "Exner's test needs more than {} used points for {} series, but has {n}",
            2 * k,
            k
        )));
    }
    let y: Vec<f64> = rows.iter().map(|r| r.2).collect();
    let w: Vec<f64> = rows.iter().map(|r| r.3).collect();
    let weights = (weighting == Weighting::InverseVariance).then_some(w.as_slice());
    let xs: Vec<f64> = rows.iter().map(|r| r.1).collect();
    let (xmin, xmax) = xs
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
            (a.min(v), b.max(v))
        });
    let xc = 0.5 * (xmin + xmax);
    let span = (xmax - xmin).max(1e-12);
    let fail = |e: crate::Error| GlobalError::NoSolution(format!("Exner's test: {e}"));
    // Free lines: per series intercept and slope (x centred for conditioning).
    let mut free = DMatrix::zeros(n, 2 * k);
    for (i, r) in rows.iter().enumerate() {
        free[(i, r.0)] = 1.0;
        free[(i, k + r.0)] = (r.1 - xc) / span;
    }
    let ss_free = weighted_rss(&free, &y, weights).map_err(fail)?;
    // Lines through (x0, y0): ln K = y0 + b_s (x − x0).
    let common = |x0: f64| -> f64 {
        let mut d = DMatrix::zeros(n, k + 1);
        for (i, r) in rows.iter().enumerate() {
            d[(i, 0)] = 1.0;
            d[(i, 1 + r.0)] = (r.1 - x0) / span;
        }
        weighted_rss(&d, &y, weights).unwrap_or(f64::INFINITY)
    };
    // A coarse grid of x0 over a wide window, then golden-section refinement.
    let reach = 200.0 * span;
    let steps = 800;
    let grid = |i: usize| xc - reach + 2.0 * reach * i as f64 / steps as f64;
    let best = (0..=steps)
        .map(|i| (grid(i), common(grid(i))))
        .fold((xc, f64::INFINITY), |a, b| if b.1 < a.1 { b } else { a });
    let h = 2.0 * reach / steps as f64;
    let (mut lo, mut hi) = (best.0 - h, best.0 + h);
    let g = (5f64.sqrt() - 1.0) / 2.0;
    for _ in 0..200 {
        let (c, d) = (hi - g * (hi - lo), lo + g * (hi - lo));
        if common(c) < common(d) {
            hi = d;
        } else {
            lo = c;
        }
    }
    let x0 = 0.5 * (lo + hi);
    let ss_common = common(x0).min(best.1);
    let df_num = k - 2;
    let df_den = n - 2 * k;
    let drop = (ss_common - ss_free).max(0.0);
    let f_statistic = if ss_free > 0.0 {
        (drop / df_num as f64) / (ss_free / df_den as f64)
    } else if drop > 0.0 {
        f64::INFINITY
    } else {
        0.0
    };
    let p_value = f_upper_tail(f_statistic, df_num as f64, df_den as f64).unwrap_or(1.0);
    let t_iso_k = (x0 > 0.0).then(|| 1.0 / x0);
    let iso = t_iso_k.map_or_else(
        || "at no positive temperature".to_string(),
        |t| format!("near {t:.0} K"),
    );
    let p = crate::vant_hoff::format_p(p_value);
    let alpha = crate::vant_hoff::comparison_percent(1.0 - level);
    let verdict = if p_value < 1.0 - level {
        format!(
            "the van 't Hoff lines do not share one common point (Exner's F = {f_statistic:.3} on {df_num} and {df_den} degrees of freedom, {p}): no single compensation temperature describes the series"
        )
    } else {
        format!(
            "the van 't Hoff lines are consistent with one common point {iso} (Exner's F = {f_statistic:.3} on {df_num} and {df_den} degrees of freedom, {p}, at the {alpha}% level); lines that hardly differ also pass this test, so read it with β's interval"
        )
    };
    Ok(ExnerTest {
        t_iso_k,
        f_statistic,
        df_num,
        df_den,
        p_value,
        verdict,
    })
}
