//! Quantities derived from a finished fit, each with delta-method uncertainty from the full
//! covariance: ΔG°(T), ΔH°(T), ΔS°(T), ln K(T) and K(T) with confidence and prediction
//! intervals, bands over a grid of 1/T, the joint (ΔH°, ΔS°) confidence ellipse, and the
//! temperature at which K reaches a target value.
//!
//! Every quantity here except the temperature for a target K is linear in the parameters,
//! so the delta method is exact for them; the target temperature uses the implicit-function
//! derivative.

use crate::error::Error;
use crate::model::{check_level, SigmaConvention};
use crate::stats::{chi2_quantile, f_quantile};
use crate::vant_hoff::{Estimate, ThermoAt, VantHoffFit};
use crate::GAS_CONSTANT;
use serde::{Deserialize, Serialize};

/// A closed interval.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Interval {
    /// Lower limit.
    pub low: f64,
    /// Upper limit.
    pub high: f64,
}

/// A prediction of ln K (or K) at one temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct ValuePrediction {
    /// Best estimate.
    pub value: f64,
    /// Standard error of the fitted mean.
    pub se: f64,
    /// Confidence interval of the mean at the fit's level.
    pub ci: Interval,
    /// Prediction interval for one new measurement of typical precision.
    pub pi: Interval,
}

/// Everything predicted at one temperature.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Prediction {
    /// Temperature, K.
    pub t_k: f64,
    /// ln K.
    pub ln_k: ValuePrediction,
    /// K (intervals are the exponentials of the ln K intervals; se by the delta method).
    pub k: ValuePrediction,
    /// ΔG°(T), J/mol.
    pub delta_g: Estimate,
    /// ΔH°(T), J/mol.
    pub delta_h: Estimate,
    /// ΔS°(T), J mol⁻¹ K⁻¹.
    pub delta_s: Estimate,
    /// Whether T lies outside the measured range.
    pub extrapolated: bool,
    /// A caution in words, when there is one.
    pub warning: Option<String>,
}

/// One point of the confidence and prediction bands.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct BandPoint {
    /// 1/T, K⁻¹.
    pub inv_t: f64,
    /// T, K.
    pub t_k: f64,
    /// Fitted ln K.
    pub ln_k: f64,
    /// Confidence band, lower.
    pub ci_low: f64,
    /// Confidence band, upper.
    pub ci_high: f64,
    /// Prediction band, lower.
    pub pi_low: f64,
    /// Prediction band, upper.
    pub pi_high: f64,
}

/// Most vertices [`VantHoffFit::ellipse`] draws; larger requests are capped (a smooth
/// outline needs a few hundred).
pub const MAX_ELLIPSE_VERTICES: usize = 65_536;

/// Most grid points [`VantHoffFit::band_grid`] evaluates; larger requests are capped.
pub const MAX_BAND_GRID: usize = 1_000_000;

/// Relative margin beyond the measured temperature range within which a temperature still
/// counts as inside it (absorbs the rounding of a unit conversion, e.g. °C to K): 1e-12.
pub const EXTRAPOLATION_RELATIVE_TOLERANCE: f64 = 1e-12;

impl VantHoffFit {
    fn n_params(&self) -> usize {
        self.params.len()
    }

    /// gᵀ Cov g.
    pub(crate) fn quadratic_form(&self, g: &[f64]) -> f64 {
        let p = self.n_params();
        let mut s = 0.0;
        for a in 0..p {
            for b in 0..p {
                s += g[a] * self.covariance[a][b] * g[b];
            }
        }
        s.max(0.0)
    }

    /// The estimate of the linear combination g·β.
    fn linear_estimate(&self, g: &[f64]) -> Estimate {
        let value: f64 = g
            .iter()
            .zip(&self.params)
            .map(|(g, p)| g * p.estimate.value)
            .sum();
        Estimate::symmetric(value, self.quadratic_form(g).sqrt(), self.critical_value)
    }

    /// ΔH°(T) in J/mol, with delta-method SE: the model's ΔH° row c(T), value c·β, variance
    /// cᵀΣc. For the constant-ΔCp° model ΔH°(T) = ΔH°(θ) + ΔCp°(T − θ); constant for the
    /// linear model.
    pub fn delta_h_at(&self, t_k: f64) -> Estimate {
        let g = self.model().delta_h_row(t_k, self.options.t_ref_k);
        self.linear_estimate(&g)
    }

    /// ΔCp°(T) in J mol⁻¹ K⁻¹, with delta-method SE, for a model with a heat capacity.
    pub fn delta_cp_at(&self, t_k: f64) -> Option<Estimate> {
        let model = self.model();
        model.has_heat_capacity().then(|| {
            let g = model.delta_cp_row(t_k, self.options.t_ref_k);
            self.linear_estimate(&g)
        })
    }

    /// ΔS°(T) = ΔS°(θ) + ΔCp° ln(T/θ), J mol⁻¹ K⁻¹, with delta-method SE.
    pub fn delta_s_at(&self, t_k: f64) -> Estimate {
        let g = self.model().delta_s_row(t_k, self.options.t_ref_k);
        self.linear_estimate(&g)
    }

    /// ΔG°(T) = ΔH°(T) − T ΔS°(T), J/mol, with delta-method SE from the full covariance.
    ///
    /// # Formula
    /// ```text
    /// ΔG°(T) = ΔH°(θ) − T ΔS°(θ) + ΔCp° [(T − θ) − T ln(T/θ)]
    /// Var = gᵀ Σ g,  g = (1, −T, (T − θ) − T ln(T/θ))
    /// ```
    pub fn delta_g(&self, t_k: f64) -> Estimate {
        let g = self.model().delta_g_row(t_k, self.options.t_ref_k);
        self.linear_estimate(&g)
    }

    /// ΔH°, ΔS°, ΔG° (and ΔCp°) at temperature `t_k`.
    pub fn thermo_at(&self, t_k: f64) -> ThermoAt {
        ThermoAt {
            t_k,
            delta_h: self.delta_h_at(t_k),
            delta_s: self.delta_s_at(t_k),
            delta_g: self.delta_g(t_k),
            delta_cp: self.delta_cp_at(t_k),
        }
    }

    /// Whether `t_k` lies outside the range of the used temperatures. The test is relative
    /// ([`EXTRAPOLATION_RELATIVE_TOLERANCE`] of the range's ends), so it means the same at
    /// 1e-10 K as at 300 K; a temperature that is not a finite number is an extrapolation.
    pub fn is_extrapolation(&self, t_k: f64) -> bool {
        let tol = EXTRAPOLATION_RELATIVE_TOLERANCE;
        !t_k.is_finite() || t_k < self.t_min_k * (1.0 - tol) || t_k > self.t_max_k * (1.0 + tol)
    }

    fn ln_k_prediction(&self, t_k: f64) -> ValuePrediction {
        let row = self.model().row(t_k, self.options.t_ref_k);
        let e = self.linear_estimate(&row);
        let pred_se = (e.se * e.se + self.new_observation_variance).sqrt();
        let c = self.critical_value;
        ValuePrediction {
            value: e.value,
            se: e.se,
            ci: Interval {
                low: e.ci_low,
                high: e.ci_high,
            },
            pi: Interval {
                low: e.value - c * pred_se,
                high: e.value + c * pred_se,
            },
        }
    }

    /// Predicts ln K, K, ΔG°, ΔH° and ΔS° at `t_k`, with confidence intervals and, for
    /// ln K and K, prediction intervals for one new measurement of typical precision.
    ///
    /// # Formula
    /// ```text
    /// ln K̂(T) = x(T)·β̂,  SE² = x(T)ᵀ Σ x(T),  PI: ln K̂ ± c √(SE² + s²·σ̄²)
    /// ```
    /// where c is the fit's critical value and s²·σ̄² the fit's new-observation variance.
    ///
    /// # Errors
    /// [`Error::NonFinite`] or [`Error::NonPositiveTemperature`] for an impossible T;
    /// [`Error::NoSolution`] when K at T overflows (T absurdly far from the data).
    pub fn predict(&self, t_k: f64) -> Result<Prediction, Error> {
        crate::units::check_temperature(t_k)?;
        let ln_k = self.ln_k_prediction(t_k);
        if !(ln_k.value.is_finite()
            && ln_k.se.is_finite()
            && ln_k.pi.low.is_finite()
            && ln_k.pi.high.exp().is_finite())
        {
            return Err(Error::NoSolution(format!(
                "K at {t_k} K is too large to represent; the temperature is far outside any sensible range"
            )));
        }
        let k = ValuePrediction {
            value: ln_k.value.exp(),
            se: ln_k.value.exp() * ln_k.se,
            ci: Interval {
                low: ln_k.ci.low.exp(),
                high: ln_k.ci.high.exp(),
            },
            pi: Interval {
                low: ln_k.pi.low.exp(),
                high: ln_k.pi.high.exp(),
            },
        };
        let extrapolated = self.is_extrapolation(t_k);
        let warning = extrapolated.then(|| {
            format!(
                "{t_k:.2} K lies outside the measured range {:.2}–{:.2} K: this is an extrapolation, valid only if the model holds there ({})",
                self.t_min_k,
                self.t_max_k,
                self.model().assumption()
            )
        });
        Ok(Prediction {
            t_k,
            ln_k,
            k,
            delta_g: self.delta_g(t_k),
            delta_h: self.delta_h_at(t_k),
            delta_s: self.delta_s_at(t_k),
            extrapolated,
            warning,
        })
    }

    /// Confidence and prediction bands of ln K at each 1/T in `inv_t` (K⁻¹). Non-positive or
    /// non-finite abscissae, and abscissae so extreme that ln K overflows, are skipped.
    pub fn bands(&self, inv_t: &[f64]) -> Vec<BandPoint> {
        inv_t
            .iter()
            .filter(|x| x.is_finite() && **x > 0.0)
            .filter_map(|&x| {
                let t_k = 1.0 / x;
                let v = self.ln_k_prediction(t_k);
                let b = BandPoint {
                    inv_t: x,
                    t_k,
                    ln_k: v.value,
                    ci_low: v.ci.low,
                    ci_high: v.ci.high,
                    pi_low: v.pi.low,
                    pi_high: v.pi.high,
                };
                [b.t_k, b.ln_k, b.ci_low, b.ci_high, b.pi_low, b.pi_high]
                    .iter()
                    .all(|v| v.is_finite())
                    .then_some(b)
            })
            .collect()
    }

    /// Bands on `n` evenly spaced values of 1/T spanning the used points, widened by
    /// `pad_fraction` of the span on each side (n is kept within 2 ..= [`MAX_BAND_GRID`];
    /// a non-finite or negative pad counts as none).
    pub fn band_grid(&self, n: usize, pad_fraction: f64) -> Vec<BandPoint> {
        let lo = 1.0 / self.t_max_k;
        let hi = 1.0 / self.t_min_k;
        let pad_fraction = if pad_fraction.is_finite() {
            pad_fraction.max(0.0)
        } else {
            0.0
        };
        let pad = (hi - lo) * pad_fraction;
        let (a, b) = (lo - pad, hi + pad);
        let n = n.clamp(2, MAX_BAND_GRID);
        let grid: Vec<f64> = (0..n)
            .map(|i| a + (b - a) * i as f64 / (n - 1) as f64)
            .collect();
        self.bands(&grid)
    }

    /// The joint confidence region of (ΔH°, ΔS°) at `level` as a closed polygon of
    /// `n_vertices` points (J/mol, J mol⁻¹ K⁻¹; kept within 8 ..= [`MAX_ELLIPSE_VERTICES`]).
    ///
    /// # Formula
    /// ```text
    /// (β − β̂)ᵀ Σ₂⁻¹ (β − β̂) ≤ 2 F(level; 2, n − p)   (scaled)   or   χ²(level; 2)   (absolute σ)
    /// ```
    /// where Σ₂ is the 2×2 covariance of ΔH° and ΔS°.
    ///
    /// # Errors
    /// [`Error::InvalidLevel`]; [`Error::NoSolution`] if the covariance is degenerate.
    pub fn ellipse(&self, level: f64, n_vertices: usize) -> Result<Vec<[f64; 2]>, Error> {
        let p = self.n_params();
        let (mut a, mut b) = (vec![0.0; p], vec![0.0; p]);
        a[0] = 1.0;
        b[1] = 1.0;
        self.region(&a, &b, level, n_vertices, "ΔH°–ΔS°")
    }

    /// The joint confidence region of ΔH° and ΔG° at the harmonic-mean temperature T_hm,
    /// as a closed polygon (J/mol for both), with the radius of [`VantHoffFit::ellipse`].
    ///
    /// For the linear model ΔG°(T_hm) is uncorrelated with ΔH° (Krug, Hunter & Grieger
    /// 1976), so this region is an upright ellipse whose widths are the two intervals,
    /// readable where the ΔH°–ΔS° one is a needle.
    ///
    /// # Errors
    /// As [`VantHoffFit::ellipse`].
    pub fn h_g_region(&self, level: f64, n_vertices: usize) -> Result<Vec<[f64; 2]>, Error> {
        let (t, theta) = (self.t_harmonic_k(), self.options.t_ref_k);
        let model = self.model();
        self.region(
            &model.delta_h_row(t, theta),
            &model.delta_g_row(t, theta),
            level,
            n_vertices,
            "ΔH°–ΔG°",
        )
    }

    /// The correlation of ΔH° and ΔG° at the harmonic-mean temperature T_hm: zero for the
    /// linear model (Krug, Hunter & Grieger 1976), small but not zero once ΔCp° is fitted.
    pub fn corr_h_g_harmonic(&self) -> f64 {
        let (t, theta) = (self.t_harmonic_k(), self.options.t_ref_k);
        let model = self.model();
        let (ga, gb) = (model.delta_h_row(t, theta), model.delta_g_row(t, theta));
        let (a, c) = (self.quadratic_form(&ga), self.quadratic_form(&gb));
        self.bilinear_form(&ga, &gb) / (a * c).sqrt()
    }

    /// aᵀ Cov b.
    fn bilinear_form(&self, ga: &[f64], gb: &[f64]) -> f64 {
        ga.iter()
            .zip(&self.covariance)
            .map(|(a, row)| a * row.iter().zip(gb).map(|(c, b)| c * b).sum::<f64>())
            .sum()
    }

    /// The joint region of the linear combinations a·β and b·β (see [`VantHoffFit::ellipse`]).
    fn region(
        &self,
        ga: &[f64],
        gb: &[f64],
        level: f64,
        n_vertices: usize,
        what: &str,
    ) -> Result<Vec<[f64; 2]>, Error> {
        check_level(level)?;
        let radius2 = if self.options.convention == SigmaConvention::Absolute && self.weighted {
            chi2_quantile(level, 2.0)
        } else {
            2.0 * f_quantile(level, 2.0, self.dof as f64)
        };
        let a = self.quadratic_form(ga);
        let c = self.quadratic_form(gb);
        let b = self.bilinear_form(ga, gb);
        // Cholesky of [[a, b], [b, c]].
        let l11 = a.sqrt();
        let l21 = b / l11;
        let l22_sq = c - l21 * l21;
        if !(radius2.is_finite() && l11 > 0.0 && l22_sq >= 0.0) {
            return Err(Error::NoSolution(format!(
                "the {what} covariance is degenerate; no confidence ellipse can be drawn"
            )));
        }
        let l22 = l22_sq.sqrt();
        let r = radius2.sqrt();
        let (x0, y0) = (
            self.linear_estimate(ga).value,
            self.linear_estimate(gb).value,
        );
        let n = n_vertices.clamp(8, MAX_ELLIPSE_VERTICES);
        Ok((0..n)
            .map(|i| {
                let ang = std::f64::consts::TAU * i as f64 / n as f64;
                let (u, v) = (r * ang.cos(), r * ang.sin());
                [x0 + l11 * u, y0 + l21 * u + l22 * v]
            })
            .collect())
    }

    /// The temperature at which K equals `k_target`, with a delta-method SE and Fieller's
    /// interval ([`VantHoffFit::fieller_interval`]; its ends may be infinite).
    ///
    /// # Formula
    /// ```text
    /// x(T*)·β̂ = ln K_target,   SE(T*) = √(x(T*)ᵀ Σ x(T*)) / |∂ln K/∂T|,  ∂ln K/∂T = ΔH°(T*)/(R T*²)
    /// ```
    /// A model with a closed form ([`crate::ModelSpec::solve_ln_k`]; the linear model's one
    /// root T* = ΔH°/(ΔS° − R ln K_target)) gives it when positive. Any other model is
    /// searched between a third of the lowest and three times the highest measured
    /// temperature, cut where ΔH°(T) changes sign; the root nearest the harmonic-mean
    /// temperature is returned.
    ///
    /// # Errors
    /// [`Error::NonPositiveConstant`] for a target ≤ 0; [`Error::NoSolution`] when K never
    /// reaches the target at a positive temperature (in the searched range).
    pub fn temperature_for_k(&self, k_target: f64) -> Result<Estimate, Error> {
        if !k_target.is_finite() {
            return Err(Error::NonFinite {
                what: "target K",
                index: None,
            });
        }
        if k_target <= 0.0 {
            return Err(Error::NonPositiveConstant {
                index: None,
                value: k_target,
            });
        }
        let target = k_target.ln();
        let theta = self.options.t_ref_k;
        let beta = self.coefficients();
        let g = |t: f64| -> f64 {
            let row = self.model().row(t, theta);
            row.iter().zip(&beta).map(|(x, b)| x * b).sum::<f64>() - target
        };
        let none = || {
            Error::NoSolution(format!(
                "K never reaches {k_target} at a positive temperature near the data for this fit"
            ))
        };
        let model = self.model();
        let t_star = match model.spec().solve_ln_k(&beta, theta, target) {
            Some(closed) => closed.ok_or_else(none)?,
            None => {
                // d ln K/dT = ΔH°(T)/(RT²), so ln K(T) − ln K_target turns only where ΔH°(T)
                // changes sign. The searched range is cut at those turning points (found on a
                // fine grid and refined by bisection); on each piece the function is monotone
                // and has at most one root, found by bisection.
                let lo = self.t_min_k / 3.0;
                let hi = self.t_max_k * 3.0;
                let dh = |t: f64| -> f64 {
                    let c = model.delta_h_row(t, theta);
                    c.iter().zip(&beta).map(|(c, b)| c * b).sum()
                };
                let mut cuts = vec![lo];
                const GRID: usize = 512;
                let mut prev = (lo, dh(lo));
                for k in 1..=GRID {
                    let t = lo + (hi - lo) * k as f64 / GRID as f64;
                    let v = dh(t);
                    if v.is_finite()
                        && prev.1.is_finite()
                        && v != 0.0
                        && v.signum() != prev.1.signum()
                    {
                        let turn = bisect(&dh, prev.0, t);
                        if turn > lo && turn < hi {
                            cuts.push(turn);
                        }
                    }
                    prev = (t, v);
                }
                cuts.push(hi);
                let mut best: Option<f64> = None;
                for w in cuts.windows(2) {
                    let (a, b) = (w[0], w[1]);
                    let (ga, gb) = (g(a), g(b));
                    if !(ga.is_finite() && gb.is_finite()) {
                        continue;
                    }
                    if ga == 0.0 || gb == 0.0 || ga.signum() != gb.signum() {
                        let root = if ga == 0.0 {
                            a
                        } else if gb == 0.0 {
                            b
                        } else {
                            bisect(&g, a, b)
                        };
                        let better = best.is_none_or(|r| {
                            (root - self.t_harmonic_k).abs() < (r - self.t_harmonic_k).abs()
                        });
                        if better {
                            best = Some(root);
                        }
                    }
                }
                best.ok_or_else(none)?
            }
        };
        let row = model.row(t_star, theta);
        let slope = self.delta_h_at(t_star).value / (GAS_CONSTANT * t_star * t_star);
        let se = self.quadratic_form(&row).sqrt() / slope.abs();
        if !se.is_finite() {
            return Err(none());
        }
        let (ci_low, ci_high) = self.fieller_interval(t_star, target);
        Ok(Estimate {
            value: t_star,
            se,
            ci_low,
            ci_high,
        })
    }

    /// Fieller's interval (1954) for the temperature T* where ln K reaches `target`: the
    /// connected set of temperatures around T* at which the hypothesis ln K(T) = `target` is
    /// not rejected by the t-test (z under absolute σ) at the fit's level,
    /// ```text
    /// (x(T)·β̂ − ln K_target)² ≤ c² · x(T)ᵀ Σ x(T),   c = the fit's critical value.
    /// ```
    /// For the linear model, x(T)·β − ln K_target = (ΔS° − R ln K_target − ΔH°/T)/R is the
    /// numerator of Fieller's ratio 1/T* = (ΔS° − R ln K_target)/ΔH°, so this is his interval
    /// exactly; for a model with ΔCp° it is the same test inverted pointwise. The set is
    /// searched outwards from T* on a logarithmic grid (steps of 0.2 % in T, out to 1000 T*
    /// and T*/1000) and its ends refined by bisection. An end the search does not find is
    /// unbounded: `+∞` above, `−∞` below (the set then reaches towards 0 K; no finite bound
    /// is ever at or below 0 K).
    pub fn fieller_interval(&self, t_star: f64, target: f64) -> (f64, f64) {
        let (theta, model) = (self.options.t_ref_k, self.model());
        self.accepted_temperatures(t_star, target, |t| model.row(t, theta))
    }

    /// The connected set of temperatures around `centre` where the t-test of
    /// `row_at(T)·β = target` does not reject at the fit's level: the test inverted
    /// pointwise, searched outwards on a logarithmic grid (steps of 0.2 % in T, out to 1000
    /// times and a thousandth of `centre`) with the ends refined by bisection. An end not
    /// found is unbounded (`+∞` above, `−∞` below). Fieller's interval for T at a target K
    /// and for the temperature where ΔH° = 0 are both this set.
    pub(crate) fn accepted_temperatures(
        &self,
        centre: f64,
        target: f64,
        row_at: impl Fn(f64) -> Vec<f64>,
    ) -> (f64, f64) {
        let beta = self.coefficients();
        let c2 = self.critical_value * self.critical_value;
        let outside = |t: f64| -> bool {
            let row = row_at(t);
            let y: f64 = row.iter().zip(&beta).map(|(x, b)| x * b).sum();
            let d = y - target;
            // A temperature where the model cannot be evaluated ends the set, and so does
            // any comparison that is not a number (an exact fit with an infinite critical
            // value): written so that NaN counts as outside.
            !(d.is_finite() && d * d <= c2 * self.quadratic_form(&row))
        };
        const STEP: f64 = 0.002;
        const REACH: f64 = 1000.0;
        let steps = (REACH.ln() / STEP).ceil() as usize;
        let edge = |up: bool| -> f64 {
            let mut inside = centre;
            for k in 1..=steps {
                let t = centre * (if up { 1.0 } else { -1.0 } * STEP * k as f64).exp();
                if outside(t) {
                    // Bisect between the last temperature inside and this one.
                    let (mut a, mut b) = (inside, t);
                    for _ in 0..80 {
                        let m = 0.5 * (a + b);
                        if outside(m) {
                            b = m;
                        } else {
                            a = m;
                        }
                    }
                    return 0.5 * (a + b);
                }
                inside = t;
            }
            if up {
                f64::INFINITY
            } else {
                f64::NEG_INFINITY
            }
        };
        (edge(false), edge(true))
    }
}

fn bisect(g: &impl Fn(f64) -> f64, mut a: f64, mut b: f64) -> f64 {
    let mut ga = g(a);
    for _ in 0..200 {
        let m = 0.5 * (a + b);
        let gm = g(m);
        if gm == 0.0 || (b - a) < 1e-12 * m {
            return m;
        }
        if ga.signum() == gm.signum() {
            a = m;
            ga = gm;
        } else {
            b = m;
        }
    }
    0.5 * (a + b)
}
