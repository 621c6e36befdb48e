//! The JSON contract of `isochore fit --json`, written straight to a stream so a 10⁶-row
//! file never needs its whole document in memory. SI units throughout (J/mol,
//! J mol⁻¹ K⁻¹, K). Never NaN or Infinity: an undefined number is written as null and a
//! warning says which.

use crate::load::Job;
use isochore_fit::{Estimate, VantHoffFit};
use serde_json::json;
use std::io::{self, Write};

/// Writes numbers as JSON, turning non-finite ones into null and remembering where. The
/// one place of the rule for a value with statistics ([`Nums::stats`]): when the value is
/// null, every statistic of it is null too, and the warning names the quantity.
pub struct Nums {
    undefined: Vec<String>,
}

impl Default for Nums {
    fn default() -> Self {
        Nums::new()
    }
}

impl Nums {
    /// Nothing undefined yet.
    pub fn new() -> Self {
        Nums {
            undefined: Vec::new(),
        }
    }

    /// A number, or null (remembered under `what`) when it is not finite.
    pub fn num(&mut self, what: &str, v: f64) -> serde_json::Value {
        if v.is_finite() {
            json!(v)
        } else {
            self.undefined.push(what.to_string());
            serde_json::Value::Null
        }
    }

    /// An optional number: null when absent (not a warning) or not finite (a warning).
    pub fn opt(&mut self, what: &str, v: Option<f64>) -> serde_json::Value {
        match v {
            Some(x) => self.num(what, x),
            None => serde_json::Value::Null,
        }
    }

    /// `{"value": …, name: …}` for a value and its statistics (SE, interval ends). When the
    /// value is not finite, the value and every statistic are null (a standard error of an
    /// undefined number means nothing) and one warning names `what`; otherwise each
    /// statistic that is not finite is null and named on its own.
    pub fn stats(&mut self, what: &str, value: f64, stats: &[(&str, f64)]) -> serde_json::Value {
        let mut m = serde_json::Map::new();
        if value.is_finite() {
            m.insert("value".into(), json!(value));
            for (name, v) in stats {
                m.insert((*name).into(), self.num(&format!("{what}.{name}"), *v));
            }
        } else {
            self.undefined
                .push(format!("{what} (value and all its statistics)"));
            m.insert("value".into(), serde_json::Value::Null);
            for (name, _) in stats {
                m.insert((*name).into(), serde_json::Value::Null);
            }
        }
        serde_json::Value::Object(m)
    }

    /// An estimate as `{value, se, ci_low, ci_high}` under the rule of [`Nums::stats`].
    pub fn estimate(&mut self, what: &str, e: &Estimate) -> serde_json::Value {
        self.stats(
            what,
            e.value,
            &[("se", e.se), ("ci_low", e.ci_low), ("ci_high", e.ci_high)],
        )
    }

    /// The warning naming every undefined value, or `None` when all were defined.
    pub fn warning(&self) -> Option<String> {
        if self.undefined.is_empty() {
            return None;
        }
        let shown: Vec<&str> = self.undefined.iter().take(20).map(String::as_str).collect();
        let more = self.undefined.len().saturating_sub(shown.len());
        Some(format!(
            "undefined value(s) written as null: {}{}",
            shown.join(", "),
            if more > 0 {
                format!(" and {more} more")
            } else {
                String::new()
            }
        ))
    }
}

fn field(
    w: &mut impl Write,
    first: &mut bool,
    key: &str,
    value: &serde_json::Value,
) -> io::Result<()> {
    if !*first {
        w.write_all(b",")?;
    }
    *first = false;
    serde_json::to_writer(&mut *w, key)?;
    w.write_all(b":")?;
    serde_json::to_writer(&mut *w, value)?;
    Ok(())
}

/// Writes one fit as a JSON object. `source` adds a "source" field (for arrays).
pub fn write_fit(
    w: &mut impl Write,
    job: &Job,
    fit: &VantHoffFit,
    source: Option<&str>,
    with_points: bool,
) -> io::Result<()> {
    let mut n = Nums::new();
    let mut first = true;
    w.write_all(b"{")?;
    if let Some(s) = source {
        field(w, &mut first, "source", &json!(s))?;
    }
    field(w, &mut first, "model", &json!(fit.model().key()))?;
    field(
        w,
        &mut first,
        "t_ref_k",
        &n.num("t_ref_k", fit.options.t_ref_k),
    )?;
    field(w, &mut first, "level", &n.num("level", fit.options.level))?;
    field(w, &mut first, "n_used", &json!(fit.n_used))?;
    field(w, &mut first, "dof", &json!(fit.dof))?;
    let mut params = serde_json::Map::new();
    for p in &fit.params {
        let key = p.key();
        params.insert(key.to_string(), n.estimate(key, &p.estimate));
    }
    field(w, &mut first, "params", &serde_json::Value::Object(params))?;
    let cov: Vec<serde_json::Value> = fit
        .covariance
        .iter()
        .enumerate()
        .map(|(a, row)| {
            serde_json::Value::Array(
                row.iter()
                    .enumerate()
                    .map(|(b, v)| n.num(&format!("cov[{a}][{b}]"), *v))
                    .collect(),
            )
        })
        .collect();
    field(w, &mut first, "cov", &serde_json::Value::Array(cov))?;
    let s = &fit.stats;
    let v = n.num("corr_h_s", fit.corr_h_s);
    field(w, &mut first, "corr_h_s", &v)?;
    let v = n.num("residual_sd", s.residual_sd);
    field(w, &mut first, "residual_sd", &v)?;
    let v = n.num("r2", s.r2);
    field(w, &mut first, "r2", &v)?;
    let v = n.num("chi2", s.chi2);
    field(w, &mut first, "chi2", &v)?;
    let v = n.num("reduced_chi2", s.reduced_chi2);
    field(w, &mut first, "reduced_chi2", &v)?;
    let v = n.opt("aicc", s.aicc);
    field(w, &mut first, "aicc", &v)?;
    let v = n.num("bic", s.bic);
    field(w, &mut first, "bic", &v)?;
    let mc = match &fit.comparison {
        Some(c) => json!({
            "f_p_value": n.num("model_comparison.f_p_value", c.f_p_value),
            "delta_aicc": n.opt("model_comparison.delta_aicc", c.delta_aicc),
            "preferred": c.preferred.key(),
        }),
        None => serde_json::Value::Null,
    };
    field(w, &mut first, "model_comparison", &mc)?;
    if with_points {
        w.write_all(b",\"points\":[")?;
        for (i, (r, d)) in job.rows.iter().zip(&fit.points).enumerate() {
            if i > 0 {
                w.write_all(b",")?;
            }
            let row = r.row;
            let p = json!({
                "row": row,
                "series": job.series,
                "t_k": n.num(&format!("points[row {row}].t_k"), d.t_k),
                "ln_k": n.num(&format!("points[row {row}].ln_k"), d.ln_k),
                "sigma_ln_k": n.opt(&format!("points[row {row}].sigma_ln_k"), d.sigma_ln_k),
                "used": d.used,
                "fitted": n.num(&format!("points[row {row}].fitted"), d.fitted),
                "residual": n.num(&format!("points[row {row}].residual"), d.residual),
                "student_int": n.opt(&format!("points[row {row}].student_int"), d.student_int),
                "student_ext": n.opt(&format!("points[row {row}].student_ext"), d.student_ext),
                "leverage": n.num(&format!("points[row {row}].leverage"), d.leverage),
                "cooks_d": n.opt(&format!("points[row {row}].cooks_d"), d.cooks_d),
                "dffits": n.opt(&format!("points[row {row}].dffits"), d.dffits),
                "flags": d.flags,
            });
            serde_json::to_writer(&mut *w, &p)?;
        }
        w.write_all(b"]")?;
    }
    let t1 = match &fit.t_at_k1 {
        Some(e) => json!({
            "value": n.num("t_at_k1.value", e.value),
            "se": n.num("t_at_k1.se", e.se),
            "extrapolated": fit.is_extrapolation(e.value),
        }),
        None => serde_json::Value::Null,
    };
    field(w, &mut first, "t_at_k1", &t1)?;
    let mut warnings: Vec<String> = job.warnings.clone();
    warnings.extend(fit.warnings.iter().map(|w| w.message.clone()));
    warnings.extend(n.warning());
    field(w, &mut first, "warnings", &json!(warnings))?;
    field(w, &mut first, "version", &json!(env!("CARGO_PKG_VERSION")))?;
    w.write_all(b"}")?;
    Ok(())
}

/// A number, or null when it is not finite (the JSON contract never holds NaN or Infinity).
pub fn finite(v: f64) -> serde_json::Value {
    if v.is_finite() {
        serde_json::json!(v)
    } else {
        serde_json::Value::Null
    }
}

/// An estimate as `{value, se, ci_low, ci_high}`, by the rule of [`Nums::stats`] (where no
/// warning is collected; callers that can warn use [`Nums::estimate`]).
pub fn est(e: &isochore_fit::Estimate) -> serde_json::Value {
    Nums::new().estimate("", e)
}

/// Writes an error entry of a batch: `{"source": …, "error": …}`.
pub fn write_error(w: &mut impl Write, source: &str, error: &str) -> io::Result<()> {
    serde_json::to_writer(&mut *w, &json!({"source": source, "error": error}))?;
    Ok(())
}
