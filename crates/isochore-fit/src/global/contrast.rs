//! Linear functions of a [`GlobalFit`]'s coefficients, with their uncertainty from the
//! joint covariance: the difference of a parameter between two series (ΔH°₁ − ΔH°₂), the
//! harmonic-mean temperature of a series, ΔH°, ΔS° and ΔG° of a series at any temperature,
//! and the warning for series measured over temperature ranges that do not overlap.

use super::result::GlobalFit;
use crate::vant_hoff::Estimate;
use serde::Serialize;

/// A parameter's difference between two series of one joint fit (see
/// [`GlobalFit::difference`]).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SeriesDifference {
    /// The parameter's key.
    pub key: &'static str,
    /// 0-based index of the first series.
    pub a: usize,
    /// 0-based index of the second series.
    pub b: usize,
    /// The difference (first − second) with its SE and interval at the fit's level.
    pub estimate: Estimate,
}

impl GlobalFit {
    /// The estimate of the linear function cᵀβ of the coefficients, with variance cᵀΣc from
    /// the joint covariance and the fit's critical value; `None` when `c` has the wrong
    /// length.
    pub fn linear_estimate(&self, c: &[f64]) -> Option<Estimate> {
        if c.len() != self.estimates.len() {
            return None;
        }
        let value: f64 = c
            .iter()
            .zip(&self.estimates)
            .map(|(c, e)| c * e.value)
            .sum();
        let mut var = 0.0;
        for (a, ca) in c.iter().enumerate() {
            if *ca == 0.0 {
                continue;
            }
            for (b, cb) in c.iter().enumerate() {
                var += ca * cb * self.covariance[a][b];
            }
        }
        Some(Estimate::symmetric(
            value,
            var.max(0.0).sqrt(),
            self.critical_value,
        ))
    }

    /// A model coefficient row (over the model's parameters) for series `s`, spread over
    /// the columns of the block design.
    pub(super) fn spread(&self, s: usize, row: &[f64]) -> Option<Vec<f64>> {
        let cols = self.column_of.get(s)?;
        let mut c = vec![0.0; self.estimates.len()];
        for (k, &col) in cols.iter().enumerate() {
            c[col] += row.get(k).copied()?;
        }
        Some(c)
    }

    /// Parameter `key` of series `a` minus that of series `b`, with the SE and interval from
    /// the joint covariance:
    ///
    /// ```text
    /// Var(β_a − β_b) = Var β_a + Var β_b − 2 Cov(β_a, β_b)
    /// ```
    ///
    /// Exactly zero with zero SE when the parameter is shared. `None` for an unknown key or
    /// series.
    pub fn difference(&self, key: &str, a: usize, b: usize) -> Option<SeriesDifference> {
        let k = self
            .options
            .model
            .params()
            .iter()
            .position(|p| p.key == key)?;
        let key = self.options.model.params()[k].key;
        let (ca, cb) = (
            *self.column_of.get(a)?.get(k)?,
            *self.column_of.get(b)?.get(k)?,
        );
        let mut c = vec![0.0; self.estimates.len()];
        c[ca] += 1.0;
        c[cb] -= 1.0;
        Some(SeriesDifference {
            key,
            a,
            b,
            estimate: self.linear_estimate(&c)?,
        })
    }

    /// Every difference between series of every parameter fitted per series, pairs in
    /// order (1 − 2, 1 − 3, …, 2 − 3, …), parameters in the model's order.
    pub fn differences(&self) -> Vec<SeriesDifference> {
        let n = self.n_series();
        let mut out = Vec::new();
        for (info, sharing) in self.options.model.params().iter().zip(&self.sharing) {
            if *sharing == super::Sharing::Shared {
                continue;
            }
            for a in 0..n {
                for b in a + 1..n {
                    out.extend(self.difference(info.key, a, b));
                }
            }
        }
        out
    }

    /// The weighted harmonic-mean temperature of the used points of series `s`,
    /// T_hm = Σw / Σ(w/T) (w = 1/σ², or 1 unweighted); `None` past the last series.
    pub fn t_harmonic_k(&self, s: usize) -> Option<f64> {
        let pts = self.points.get(s)?;
        let (mut sw, mut swt) = (0.0, 0.0);
        for d in pts.iter().filter(|d| d.used) {
            let w = match (self.weighted, d.sigma_ln_k) {
                (true, Some(sigma)) => 1.0 / (sigma * sigma),
                _ => 1.0,
            };
            sw += w;
            swt += w / d.t_k;
        }
        Some(sw / swt)
    }

    /// The weighted harmonic-mean temperature Σw / Σ(w/T) of the used points of every
    /// series together.
    pub fn t_harmonic_all_k(&self) -> f64 {
        let (mut sw, mut swt) = (0.0, 0.0);
        for (_, d) in self.all_points().filter(|(_, d)| d.used) {
            let w = match (self.weighted, d.sigma_ln_k) {
                (true, Some(sigma)) => 1.0 / (sigma * sigma),
                _ => 1.0,
            };
            sw += w;
            swt += w / d.t_k;
        }
        sw / swt
    }

    /// The lowest and highest temperature of the used points of series `s`, K.
    pub fn t_range_k(&self, s: usize) -> Option<(f64, f64)> {
        let pts = self.points.get(s)?;
        pts.iter()
            .filter(|d| d.used)
            .map(|d| d.t_k)
            .fold(None, |acc, t| match acc {
                None => Some((t, t)),
                Some((lo, hi)) => Some((f64::min(lo, t), f64::max(hi, t))),
            })
    }

    /// ΔH°(T) of series `s` with its uncertainty from the joint covariance.
    pub fn delta_h_at(&self, s: usize, t_k: f64) -> Option<Estimate> {
        let row = self.options.model.delta_h_row(t_k, self.options.t_ref_k);
        self.linear_estimate(&self.spread(s, &row)?)
    }

    /// ΔS°(T) of series `s` with its uncertainty from the joint covariance.
    pub fn delta_s_at(&self, s: usize, t_k: f64) -> Option<Estimate> {
        let row = self.options.model.delta_s_row(t_k, self.options.t_ref_k);
        self.linear_estimate(&self.spread(s, &row)?)
    }

    /// ΔG°(T) = ΔH°(T) − TΔS°(T) of series `s` with its uncertainty from the joint
    /// covariance.
    pub fn delta_g_at(&self, s: usize, t_k: f64) -> Option<Estimate> {
        let row = self.options.model.delta_g_row(t_k, self.options.t_ref_k);
        self.linear_estimate(&self.spread(s, &row)?)
    }

    /// The covariance of ΔH°(T) and ΔS°(T) of series `s` (J² mol⁻² K⁻¹).
    pub fn h_s_covariance_at(&self, s: usize, t_k: f64) -> Option<f64> {
        let theta = self.options.t_ref_k;
        let h = self.spread(s, &self.options.model.delta_h_row(t_k, theta))?;
        let e = self.spread(s, &self.options.model.delta_s_row(t_k, theta))?;
        Some(self.cross_covariance(&h, &e))
    }

    /// The covariance of ΔH°(T) and ΔG°(T) of series `s`; zero (to rounding) at the series'
    /// harmonic-mean temperature when ΔH° does not vary with T (the linear model), where ΔG°
    /// is uncorrelated with ΔH° (Krug, Hunter & Grieger 1976).
    pub fn h_g_covariance_at(&self, s: usize, t_k: f64) -> Option<f64> {
        let theta = self.options.t_ref_k;
        let h = self.spread(s, &self.options.model.delta_h_row(t_k, theta))?;
        let g = self.spread(s, &self.options.model.delta_g_row(t_k, theta))?;
        Some(self.cross_covariance(&h, &g))
    }

    /// aᵀΣb over the columns.
    pub(super) fn cross_covariance(&self, a: &[f64], b: &[f64]) -> f64 {
        let mut c = 0.0;
        for (i, ai) in a.iter().enumerate() {
            for (j, bj) in b.iter().enumerate() {
                c += ai * bj * self.covariance[i][j];
            }
        }
        c
    }
}

/// The warning in words when two series were measured over temperature ranges that do not
/// overlap (their parameters are then compared only by extrapolating at least one of them),
/// or `None`. `ranges` are (label, lowest K, highest K) in series order.
pub(crate) fn disjoint_ranges_warning(ranges: &[(String, f64, f64)]) -> Option<String> {
    let mut pairs = Vec::new();
    for (i, a) in ranges.iter().enumerate() {
        for (j, b) in ranges.iter().enumerate().skip(i + 1) {
            if a.2 < b.1 || b.2 < a.1 {
                pairs.push(format!(
                    "{} ({}–{} K) and {} ({}–{} K)",
                    name(i, &a.0),
                    crate::error::short(a.1),
                    crate::error::short(a.2),
                    name(j, &b.0),
                    crate::error::short(b.1),
                    crate::error::short(b.2)
                ));
            }
        }
    }
    if pairs.is_empty() {
        return None;
    }
    Some(format!(
        "series measured over temperature ranges that do not overlap: {}; a shared parameter then joins data that never met, and a difference between them at θ rests on extrapolating at least one series, so read the equality test with care",
        pairs.join("; ")
    ))
}

fn name(i: usize, label: &str) -> String {
    super::error::series_name(i, label)
}
