//! The temperature where ΔH° changes sign, T₀ with ΔH°(T₀) = 0 (ΔCp° models only), with
//! Fieller's interval generalised to any model: the set of temperatures T at which the
//! hypothesis ΔH°(T) = 0 is not rejected at the fit's level,
//!
//! ```text
//! { T > 0 : (c(T)·β̂)² ≤ crit² · c(T)ᵀ Σ c(T) },   c(T) = the model's ΔH°(T) row
//! ```
//!
//! For the constant-ΔCp° model c(T) = (1, 0, T − θ), so T₀ = θ − ΔH°(θ)/ΔCp° is a ratio and
//! the set is Fieller's interval for it (Fieller 1954): bounded only when ΔCp° is resolved
//! from zero at the level (|ΔCp°|/SE > crit); otherwise unbounded on one or both sides, and
//! said so in words. Because every shipped model is linear in β with normal errors, inverting
//! this t test is also the profile-likelihood interval of T₀ (the likelihood ratio of
//! ΔH°(T) = 0 is a monotone function of the same statistic). The SE beside the value is the
//! delta method's, |c(T₀)ᵀΣc(T₀)|^½ / |ΔCp°(T₀)| (dT₀/dβ = −c(T₀)/ΔCp°(T₀)); it alone
//! would mislead whenever the interval is unbounded or far from symmetric.

use crate::vant_hoff::{unbounded_interval, Estimate, VantHoffFit};

/// T₀ where ΔH°(T₀) = 0, with Fieller's interval.
#[derive(Debug, Clone, PartialEq)]
pub struct EnthalpyZero {
    /// T₀ (value, delta-method SE) with Fieller's interval; an infinite end is unbounded.
    pub estimate: Estimate,
    /// Whether T₀ lies outside the measured temperatures.
    pub extrapolated: bool,
    /// The result in words, with the unbounded side named where there is one.
    pub words: String,
}

/// How far around the data T₀ is looked for, as a factor on T_hm.
const SEARCH_FACTOR: f64 = 3.0;
/// Steps of the search grid (logarithmic).
const GRID: usize = 4000;

impl VantHoffFit {
    /// The temperature where ΔH° changes sign, nearest the data (within a factor of three of
    /// T_hm), with Fieller's interval at the fit's level; `None` for a model without ΔCp°,
    /// or when ΔH°(T) keeps its sign over that whole range.
    pub fn temperature_where_delta_h_is_zero(&self) -> Option<EnthalpyZero> {
        let model = self.model();
        if !model.has_heat_capacity() {
            return None;
        }
        let theta = self.options.t_ref_k;
        let beta = self.coefficients();
        let dot = |c: &[f64]| c.iter().zip(&beta).map(|(a, b)| a * b).sum::<f64>();
        let h = |t: f64| dot(&model.delta_h_row(t, theta));
        let centre = self.t_harmonic_k;
        let (lo, hi) = self.delta_h_zero_search_range();
        let step = (hi / lo).ln() / GRID as f64;
        // The sign change nearest T_hm.
        let mut best: Option<(f64, f64)> = None;
        let mut prev_t = lo;
        let mut prev_h = h(lo);
        for k in 1..=GRID {
            let t = lo * (step * k as f64).exp();
            let v = h(t);
            if prev_h == 0.0 || prev_h.signum() != v.signum() {
                let (mut a, mut b) = (prev_t, t);
                for _ in 0..100 {
                    let m = 0.5 * (a + b);
                    if h(m).signum() == h(a).signum() && h(m) != 0.0 {
                        a = m;
                    } else {
                        b = m;
                    }
                }
                let root = 0.5 * (a + b);
                let d = (root.ln() - centre.ln()).abs();
                if best.is_none_or(|(_, bd)| d < bd) {
                    best = Some((root, d));
                }
            }
            prev_t = t;
            prev_h = v;
        }
        let (t0, _) = best?;
        let c = model.delta_h_row(t0, theta);
        let slope = dot(&model.delta_cp_row(t0, theta));
        let se = self.quadratic_form(&c).sqrt() / slope.abs();
        let (ci_low, ci_high) = self.zero_set(t0);
        let estimate = Estimate {
            value: t0,
            se,
            ci_low,
            ci_high,
        };
        let mut z = EnthalpyZero {
            estimate,
            extrapolated: self.is_extrapolation(t0),
            words: String::new(),
        };
        z.words = self.root_words(&z, &|t| format!("{t:.2} K"));
        Some(z)
    }

    /// The words of a found T₀, its temperatures written by `show`.
    fn root_words(&self, z: &EnthalpyZero, show: &dyn Fn(f64) -> String) -> String {
        let level = self.options.level;
        let pct = crate::vant_hoff::comparison_percent(level);
        let e = &z.estimate;
        match unbounded_interval("the temperature where ΔH° = 0", e, level) {
            Some(w) => format!(
                "ΔH° = 0 at {}, but ΔCp° is not resolved from zero well enough to fix where ΔH° changes sign: {}",
                show(e.value),
                w.message
            ),
            None => format!(
                "ΔH° = 0 at {} ({pct}% interval {} to {}, Fieller){}",
                show(e.value),
                show(e.ci_low),
                show(e.ci_high),
                if z.extrapolated {
                    "; outside the measured range, so it rests on the model's assumption about ΔCp°"
                } else {
                    ""
                }
            ),
        }
    }

    /// The temperature where ΔH° = 0 in words, for every model with ΔCp°: the words of
    /// [`VantHoffFit::temperature_where_delta_h_is_zero`] where ΔH° changes sign near the
    /// data, else that it keeps its sign over the whole range searched (a factor of three
    /// either side of T_hm). `None` for a model without ΔCp° (ΔH° is then constant).
    pub fn delta_h_zero_words(&self) -> Option<String> {
        self.delta_h_zero_words_in(|t| format!("{t:.2} K"))
    }

    /// [`VantHoffFit::delta_h_zero_words`] with every temperature written by `show` (the
    /// display unit of a report or the text; the JSON's words are in kelvin).
    pub fn delta_h_zero_words_in(&self, show: impl Fn(f64) -> String) -> Option<String> {
        if !self.model().has_heat_capacity() {
            return None;
        }
        Some(match self.temperature_where_delta_h_is_zero() {
            Some(z) => self.root_words(&z, &show),
            None => {
                let (lo, hi) = self.delta_h_zero_search_range();
                format!(
                    "ΔH° keeps its sign from {} to {} (a factor of {SEARCH_FACTOR:.0} either side of T_hm): no temperature where ΔH° = 0 near the data",
                    show(lo),
                    show(hi)
                )
            }
        })
    }

    /// The range (K) searched for the temperature where ΔH° = 0: T_hm/3 to 3·T_hm.
    pub fn delta_h_zero_search_range(&self) -> (f64, f64) {
        (
            self.t_harmonic_k / SEARCH_FACTOR,
            self.t_harmonic_k * SEARCH_FACTOR,
        )
    }

    /// The ends of the connected set around `t0` where ΔH°(T) = 0 is not rejected,
    /// searched up to a factor of 1000 each way (beyond it: infinite, i.e. unbounded).
    fn zero_set(&self, t0: f64) -> (f64, f64) {
        let (theta, model) = (self.options.t_ref_k, self.model());
        self.accepted_temperatures(t0, 0.0, |t| model.delta_h_row(t, theta))
    }
}

#[cfg(test)]
mod tests {
    use crate::{fit, FitOptions, Measurement, Model, SigmaConvention};

    /// Exact constant-ΔCp° data with ΔH°(θ) = −20 kJ/mol, ΔCp° = −1000 J/(mol K), so
    /// ΔH° = 0 at θ − 20 K = 278.15 K, plus fixed scatter (invented).
    fn data(scatter: f64, dcp: f64) -> Vec<Measurement> {
        let theta = 298.15;
        let noise = [0.6, -1.0, 0.2, 0.9, -0.4, -0.8, 1.0, -0.3, 0.1, -0.5];
        (0..10)
            .map(|i| {
                let t = 275.15 + 5.0 * i as f64;
                let x = Model::CONSTANT_CP.row(t, theta);
                let y = x[0] * -20e3 + x[1] * -50.0 + x[2] * dcp + scatter * noise[i];
                Measurement::new(t, y).with_sigma(0.01)
            })
            .collect()
    }

    /// Fieller's interval of the ratio, solved directly: with u = T − θ, a = ΔH°(θ),
    /// b = ΔCp°, the ends solve (b² − c²V_b)u² + 2(ab − c²C_ab)u + (a² − c²V_a) = 0
    /// (Fieller 1954; the textbook form of the ratio a/b).
    #[test]
    fn fieller_for_the_constant_cp_model_matches_the_quadratic() {
        for convention in [SigmaConvention::ScaledByFit, SigmaConvention::Absolute] {
            let opts = FitOptions {
                model: Model::CONSTANT_CP,
                convention,
                ..FitOptions::default()
            };
            let f = fit(&data(0.01, -1000.0), &opts).unwrap();
            let z = f.temperature_where_delta_h_is_zero().unwrap();
            let (a, b) = (f.coefficients()[0], f.coefficients()[2]);
            let c = f.covariance();
            let (va, vb, cab) = (c[0][0], c[2][2], c[0][2]);
            let k2 = f.critical_value().powi(2);
            let (qa, qb, qc) = (b * b - k2 * vb, 2.0 * (a * b - k2 * cab), a * a - k2 * va);
            assert!(qa > 0.0, "ΔCp° resolved: a bounded interval");
            let disc = (qb * qb - 4.0 * qa * qc).sqrt();
            let u1 = (-qb - disc) / (2.0 * qa);
            let u2 = (-qb + disc) / (2.0 * qa);
            let (lo, hi) = (298.15 + u1.min(u2), 298.15 + u1.max(u2));
            assert!((z.estimate.value - (298.15 - a / b)).abs() < 1e-9);
            assert!(
                (z.estimate.ci_low - lo).abs() < 1e-6,
                "{} {lo}",
                z.estimate.ci_low
            );
            assert!(
                (z.estimate.ci_high - hi).abs() < 1e-6,
                "{} {hi}",
                z.estimate.ci_high
            );
            // Delta-method SE of a ratio: √(V_a + 2uC_ab + u²V_b)/|b| at u = −a/b.
            let u = -a / b;
            let se = (va + 2.0 * u * cab + u * u * vb).sqrt() / b.abs();
            assert!((z.estimate.se - se).abs() < 1e-9 * se);
            assert!(z.words.contains("Fieller"), "{}", z.words);
        }
    }

    #[test]
    fn unresolved_heat_capacity_gives_an_unbounded_interval_in_words() {
        // ΔCp° = −300 J/(mol K) under scatter twenty times larger: not resolved.
        let opts = FitOptions {
            model: Model::CONSTANT_CP,
            ..FitOptions::default()
        };
        let f = fit(&data(0.2, -300.0), &opts).unwrap();
        let dcp = f.delta_cp().unwrap();
        assert!(dcp.value.abs() < f.critical_value() * dcp.se, "{dcp:?}");
        let z = f
            .temperature_where_delta_h_is_zero()
            .expect("a sign change near the data");
        assert!(!z.estimate.ci_low.is_finite() || !z.estimate.ci_high.is_finite());
        assert!(z.words.contains("unbounded"), "{}", z.words);
        assert!(z.words.contains("not resolved"), "{}", z.words);
        // The linear model has no such temperature, and no words for it.
        let lin = fit(&data(0.01, -1000.0), &FitOptions::default()).unwrap();
        assert!(lin.temperature_where_delta_h_is_zero().is_none());
        assert!(lin.delta_h_zero_words().is_none());
    }

    #[test]
    fn no_sign_change_near_the_data_is_said_in_words() {
        // ΔH°(θ) = −20 kJ/mol with ΔCp° = −10 J/(mol K): ΔH° = 0 only at θ − 2000 K < 0
        // (T₀ = θ − ΔH°/ΔCp°, Kirchhoff's law integrated at constant ΔCp°), far outside
        // T_hm/3 … 3·T_hm.
        let opts = FitOptions {
            model: Model::CONSTANT_CP,
            ..FitOptions::default()
        };
        let f = fit(&data(0.01, -10.0), &opts).unwrap();
        assert!(f.temperature_where_delta_h_is_zero().is_none());
        let w = f.delta_h_zero_words().unwrap();
        assert!(w.contains("keeps its sign"), "{w}");
        let (lo, hi) = f.delta_h_zero_search_range();
        assert!((hi / lo - 9.0).abs() < 1e-12);
        // With a sign change the words are the estimate's own.
        let g = fit(&data(0.01, -1000.0), &opts).unwrap();
        assert_eq!(
            g.delta_h_zero_words(),
            g.temperature_where_delta_h_is_zero().map(|z| z.words)
        );
        // In another unit every temperature is written by the caller (°C = K − 273.15, the
        // definition of the Celsius scale; T₀ near 278.15 K, 5 °C, with this scatter).
        let z = g.temperature_where_delta_h_is_zero().unwrap();
        let c = g
            .delta_h_zero_words_in(|t| format!("{:.2} °C", t - 273.15))
            .unwrap();
        let want = format!("ΔH° = 0 at {:.2} °C (", z.estimate.value - 273.15);
        assert!(c.starts_with(&want), "{c}");
        assert!((z.estimate.value - 278.15).abs() < 0.5);
        assert!(!c.contains(" K"), "{c}");
    }
}
