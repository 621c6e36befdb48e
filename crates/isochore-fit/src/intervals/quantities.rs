//! The quantities an interval run reports, each a function of the coefficients β alone so
//! that every draw can evaluate it: the parameters, ΔG°(T), ΔH°(T), ΔS°(T) and K(T) at a
//! temperature, the temperature where K reaches a target, and the temperature where
//! ΔH°(T) = 0 (models with a heat capacity). Each also carries the fit's own delta-method
//! estimate (Fieller's interval for a target temperature), for the comparison.
//!
//! The two temperatures are roots: a draw's root is found by Newton's method from the fit's
//! root (ln K(T) has slope ΔH°(T)/(RT²), ΔH°(T) has slope ΔCp°(T)), or in closed form where
//! the model has one, so each draw follows the same branch as the estimate; a draw whose
//! root cannot be found (K never reaches the target near the data, ΔCp° of the other sign)
//! is counted as undefined, not guessed.

use super::IntervalMethod;
use crate::model::Model;
use crate::vant_hoff::{Estimate, VantHoffFit};
use crate::GAS_CONSTANT;
use serde::Serialize;

/// What a reported quantity is.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "snake_case", tag = "kind")]
pub enum QuantityKind {
    /// The model's parameter with this index (in design order).
    Parameter {
        /// Index into the model's parameters.
        index: usize,
    },
    /// ΔG°(T), J/mol.
    DeltaG {
        /// Temperature, K.
        t_k: f64,
    },
    /// ΔH°(T), J/mol.
    DeltaH {
        /// Temperature, K.
        t_k: f64,
    },
    /// ΔS°(T), J mol⁻¹ K⁻¹.
    DeltaS {
        /// Temperature, K.
        t_k: f64,
    },
    /// K(T) (dimensionless).
    K {
        /// Temperature, K.
        t_k: f64,
    },
    /// The temperature (K) where K equals `k_target`.
    TemperatureForK {
        /// The target K.
        k_target: f64,
    },
    /// The temperature (K) where ΔH°(T) = 0.
    TemperatureDeltaHZero,
}

/// One quantity of a run: its key, what it is, and the fit's own (delta-method) estimate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Quantity {
    /// The machine key: a parameter's key, or `delta_g_at_reference`, `k_at_t_hm`,
    /// `t_at_k1`, `t_delta_h_zero`, …
    pub key: String,
    /// What it is.
    pub kind: QuantityKind,
    /// The fit's estimate with its delta-method SE and interval (Fieller's for the
    /// temperature at a target K).
    pub delta: Estimate,
    /// What made `delta`'s interval: the delta method, or Fieller's for the temperatures at
    /// a target K and where ΔH° = 0.
    pub delta_method: IntervalMethod,
}

/// A quantity made ready for the draws ([`Evaluator::prepare`]).
#[derive(Debug, Clone)]
pub(crate) enum Prepared {
    /// c·β.
    Linear(Vec<f64>),
    /// exp(c·β).
    Exp(Vec<f64>),
    /// A root, found for each β.
    Root,
}

/// Evaluates quantities from coefficient vectors.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Evaluator {
    model: Model,
    theta: f64,
}

impl Evaluator {
    pub(crate) fn new(fit: &VantHoffFit) -> Evaluator {
        Evaluator {
            model: fit.model(),
            theta: fit.options().t_ref_k,
        }
    }

    fn dot(row: &[f64], beta: &[f64]) -> f64 {
        row.iter().zip(beta).map(|(a, b)| a * b).sum()
    }

    /// c·β for the row `write` fills, on the stack for up to 16 parameters (no allocation in
    /// the draws' inner loop).
    fn row_dot(beta: &[f64], write: impl Fn(&mut [f64])) -> f64 {
        let p = beta.len();
        if p <= 16 {
            let mut buf = [0.0; 16];
            write(&mut buf[..p]);
            Self::dot(&buf[..p], beta)
        } else {
            let mut v = vec![0.0; p];
            write(&mut v);
            Self::dot(&v, beta)
        }
    }

    fn ln_k(&self, t: f64, beta: &[f64]) -> f64 {
        Self::row_dot(beta, |out| self.model.row_into(t, self.theta, out))
    }

    fn delta_h(&self, t: f64, beta: &[f64]) -> f64 {
        Self::row_dot(beta, |out| {
            self.model.spec().delta_h_row(t, self.theta, out)
        })
    }

    fn delta_cp(&self, t: f64, beta: &[f64]) -> f64 {
        Self::row_dot(beta, |out| {
            self.model.spec().delta_cp_row(t, self.theta, out)
        })
    }

    /// `q` made ready for many coefficient vectors: a quantity at a fixed temperature is a
    /// fixed row c (value c·β, or exp(c·β) for K), computed once.
    pub(crate) fn prepare(&self, q: &Quantity) -> Prepared {
        let th = self.theta;
        let p = self.model.n_params();
        match q.kind {
            QuantityKind::Parameter { index } => {
                let mut c = vec![0.0; p];
                c[index] = 1.0;
                Prepared::Linear(c)
            }
            QuantityKind::DeltaG { t_k } => Prepared::Linear(self.model.delta_g_row(t_k, th)),
            QuantityKind::DeltaH { t_k } => Prepared::Linear(self.model.delta_h_row(t_k, th)),
            QuantityKind::DeltaS { t_k } => Prepared::Linear(self.model.delta_s_row(t_k, th)),
            QuantityKind::K { t_k } => Prepared::Exp(self.model.row(t_k, th)),
            QuantityKind::TemperatureForK { .. } | QuantityKind::TemperatureDeltaHZero => {
                Prepared::Root
            }
        }
    }

    /// The value of `q` (prepared as `pq`) at `beta`: as [`Evaluator::value`].
    pub(crate) fn value_prepared(&self, pq: &Prepared, q: &Quantity, beta: &[f64]) -> f64 {
        match pq {
            Prepared::Linear(c) => Self::dot(c, beta),
            Prepared::Exp(c) => Self::dot(c, beta).exp(),
            Prepared::Root => self.value(q, beta),
        }
    }

    /// The value of `q` at `beta`; `start` is the fit's value (the root to follow). NaN
    /// where it is undefined for these coefficients.
    pub(crate) fn value(&self, q: &Quantity, beta: &[f64]) -> f64 {
        let th = self.theta;
        match q.kind {
            QuantityKind::Parameter { index } => beta[index],
            QuantityKind::DeltaG { t_k } => Self::dot(&self.model.delta_g_row(t_k, th), beta),
            QuantityKind::DeltaH { t_k } => self.delta_h(t_k, beta),
            QuantityKind::DeltaS { t_k } => Self::dot(&self.model.delta_s_row(t_k, th), beta),
            QuantityKind::K { t_k } => self.ln_k(t_k, beta).exp(),
            QuantityKind::TemperatureForK { k_target } => {
                let target = k_target.ln();
                if let Some(closed) = self.model.spec().solve_ln_k(beta, th, target) {
                    return closed
                        .filter(|t| t.is_finite() && *t > 0.0)
                        .unwrap_or(f64::NAN);
                }
                newton(
                    |t| self.ln_k(t, beta) - target,
                    |t| self.delta_h(t, beta) / (GAS_CONSTANT * t * t),
                    q.delta.value,
                )
            }
            QuantityKind::TemperatureDeltaHZero => newton(
                |t| self.delta_h(t, beta),
                |t| self.delta_cp(t, beta),
                q.delta.value,
            ),
        }
    }
}

/// Newton's method for f(T) = 0 from `start`, each step halved until |f| decreases and T
/// stays positive; NaN when it does not converge in 100 steps.
fn newton(f: impl Fn(f64) -> f64, df: impl Fn(f64) -> f64, start: f64) -> f64 {
    let mut t = start;
    let mut ft = f(t);
    for _ in 0..100 {
        if !ft.is_finite() {
            return f64::NAN;
        }
        let d = df(t);
        if !(d.is_finite() && d != 0.0) {
            return f64::NAN;
        }
        let mut step = ft / d;
        let mut accepted = false;
        for _ in 0..60 {
            let next = t - step;
            if next > 0.0 && next.is_finite() {
                let fn_ = f(next);
                if fn_.is_finite() && fn_.abs() < ft.abs() || fn_ == 0.0 {
                    let done = (next - t).abs() <= 1e-13 * next;
                    t = next;
                    ft = fn_;
                    accepted = true;
                    if done || ft == 0.0 {
                        return t;
                    }
                    break;
                }
            }
            step *= 0.5;
        }
        if !accepted {
            // No step reduces |f|: at a root to rounding, or no root on this branch.
            return if (step / t).abs() <= 1e-12 {
                t
            } else {
                f64::NAN
            };
        }
    }
    f64::NAN
}

/// The quantities reported for `fit`: every parameter; ΔG° and K at θ and at T_hm (and
/// ΔH°, ΔS° at T_hm for a model with a heat capacity, where they differ from the
/// parameters); at each of `temperatures`, ΔG° and K; the temperature for each target in
/// `k_targets` where the fit has one; and the temperature where ΔH° = 0 for a model with a
/// heat capacity, where the fit has one ([`VantHoffFit::temperature_where_delta_h_is_zero`]:
/// within a factor of three of T_hm, with Fieller's interval).
pub fn quantities(fit: &VantHoffFit, temperatures: &[f64], k_targets: &[f64]) -> Vec<Quantity> {
    let mut out: Vec<Quantity> = fit
        .params()
        .iter()
        .enumerate()
        .map(|(index, p)| Quantity {
            key: p.key().to_string(),
            kind: QuantityKind::Parameter { index },
            delta: p.estimate,
            delta_method: IntervalMethod::Delta,
        })
        .collect();
    let at = |label: &str, t_k: f64, out: &mut Vec<Quantity>| {
        out.push(Quantity {
            key: format!("delta_g_at_{label}"),
            kind: QuantityKind::DeltaG { t_k },
            delta: fit.delta_g(t_k),
            delta_method: IntervalMethod::Delta,
        });
        if let Ok(p) = fit.predict(t_k) {
            out.push(Quantity {
                key: format!("k_at_{label}"),
                kind: QuantityKind::K { t_k },
                delta: Estimate {
                    value: p.k.value,
                    se: p.k.se,
                    ci_low: p.k.ci.low,
                    ci_high: p.k.ci.high,
                },
                delta_method: IntervalMethod::Delta,
            });
        }
    };
    at("reference", fit.options().t_ref_k, &mut out);
    let hm = fit.t_harmonic_k();
    at("t_hm", hm, &mut out);
    if fit.model().has_heat_capacity() {
        out.push(Quantity {
            key: "delta_h_at_t_hm".into(),
            kind: QuantityKind::DeltaH { t_k: hm },
            delta: fit.delta_h_at(hm),
            delta_method: IntervalMethod::Delta,
        });
        out.push(Quantity {
            key: "delta_s_at_t_hm".into(),
            kind: QuantityKind::DeltaS { t_k: hm },
            delta: fit.delta_s_at(hm),
            delta_method: IntervalMethod::Delta,
        });
    }
    for &t in temperatures {
        at(&format!("{t}_k"), t, &mut out);
    }
    for &k in k_targets {
        if let Ok(e) = fit.temperature_for_k(k) {
            let key = if k == 1.0 {
                "t_at_k1".to_string()
            } else {
                format!("t_at_k_{k}")
            };
            out.push(Quantity {
                key,
                kind: QuantityKind::TemperatureForK { k_target: k },
                delta: e,
                delta_method: IntervalMethod::Fieller,
            });
        }
    }
    // The fit's own T₀ and Fieller's interval (`crate::enthalpy_zero`), the draws' start.
    if let Some(ez) = fit.temperature_where_delta_h_is_zero() {
        out.push(Quantity {
            key: "t_delta_h_zero".into(),
            kind: QuantityKind::TemperatureDeltaHZero,
            delta: ez.estimate,
            delta_method: IntervalMethod::Fieller,
        });
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{fit, FitOptions, Measurement};

    #[test]
    fn values_at_the_estimate_are_the_fits_own() {
        // Invented curved data: ΔH°(θ) = −20 kJ/mol, ΔS° = −30 J/(mol K), ΔCp° = −800.
        let theta = 298.15;
        let pts: Vec<Measurement> = (0..9)
            .map(|i| {
                let t = 278.0 + 5.0 * i as f64;
                let x = Model::CONSTANT_CP.row(t, theta);
                let e = if i % 2 == 0 { 0.01 } else { -0.01 };
                Measurement::new(t, x[0] * -20e3 + x[1] * -30.0 + x[2] * -800.0 + e)
                    .with_sigma(0.02)
            })
            .collect();
        let opts = FitOptions {
            model: Model::CONSTANT_CP,
            ..FitOptions::default()
        };
        let f = fit(&pts, &opts).unwrap();
        let qs = quantities(&f, &[310.0], &[1.0]);
        let ev = Evaluator::new(&f);
        let beta = f.coefficients();
        for q in &qs {
            let v = ev.value(q, &beta);
            assert!(
                (v - q.delta.value).abs() <= 1e-9 * q.delta.value.abs().max(1.0),
                "{}: {v} vs {}",
                q.key,
                q.delta.value
            );
        }
        // ΔH°(T) = ΔH°(θ) + ΔCp°(T − θ) = 0 at T = θ − ΔH°(θ)/ΔCp° (the model's equation).
        let t0 = qs.iter().find(|q| q.key == "t_delta_h_zero").unwrap();
        let want = theta - beta[0] / beta[2];
        assert!((t0.delta.value - want).abs() < 1e-6);
        assert!(qs.iter().any(|q| q.key == "t_at_k1"));
    }
}
