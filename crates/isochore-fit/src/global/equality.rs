//! Are parameters equal across series? The extra-sum-of-squares F-test of the fit with
//! those parameters per series (full) against the fit with them shared (restricted), on the
//! same points and weights: [`EqualityTest`].

use super::error::GlobalError;
use super::result::GlobalFit;
use super::{fit_global, SeriesInput, Sharing, SharingMap};
use crate::model::{FitOptions, SigmaConvention};
use crate::stats::{chi2_upper_tail, f_upper_tail};
use crate::vant_hoff::format_p;
use serde::Serialize;

/// Which test decides: the extra-sum-of-squares F-test when the fit scales σ by the
/// residual scatter, Δχ² against χ²(q) when σ are known (absolute σ, weighted).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum EqualityMethod {
    /// F = (Δχ²/q)/(χ²_f/(n − p_f)) against F(q, n − p_f).
    F,
    /// Δχ² = χ²_r − χ²_f against χ²(q).
    Chi2,
}

impl EqualityMethod {
    /// The key written in JSON: `"F"` or `"chi2"`.
    pub fn key(self) -> &'static str {
        match self {
            EqualityMethod::F => "F",
            EqualityMethod::Chi2 => "chi2",
        }
    }
}

/// The test of a restricted fit (some parameters shared) against a full one (those
/// parameters per series) on the same data.
///
/// # Formula
/// ```text
/// F = ((χ²_r − χ²_f)/(p_f − p_r)) / (χ²_f/(n − p_f)),   p = P(F(p_f − p_r, n − p_f) ≥ F)
/// ΔAICc = AICc_r − AICc_f   (negative favours the shared parameters)
/// ```
/// Under absolute σ (weighted) the χ² test P(χ²(p_f − p_r) ≥ χ²_r − χ²_f) is given as well,
/// since there the σ are the scale and need not be estimated from the residuals.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EqualityTest {
    keys: Vec<&'static str>,
    f_statistic: f64,
    df_num: usize,
    df_den: usize,
    p_value: f64,
    chi2_p_value: Option<f64>,
    delta_aicc: Option<f64>,
    restricted: GlobalFit,
    full: GlobalFit,
}

impl EqualityTest {
    /// The test of `restricted` against `full`: both fits of the same model, options and
    /// points, every parameter shared in `full` shared in `restricted` too, and at least
    /// one more shared in `restricted`.
    ///
    /// # Errors
    /// [`GlobalError::NotNested`] when the fits are not nested fits of the same data;
    /// [`GlobalError::TooFewDegreesOfFreedom`] when the full fit leaves no residual degree
    /// of freedom.
    pub fn between(restricted: GlobalFit, full: GlobalFit) -> Result<EqualityTest, GlobalError> {
        if restricted.options() != full.options() {
            return Err(GlobalError::NotNested(
                "the two fits differ in model or options".into(),
            ));
        }
        let same_points = restricted.n_series() == full.n_series()
            && restricted
                .all_points()
                .map(|(s, d)| (s, d.index, d.t_k, d.ln_k, d.sigma_ln_k, d.used))
                .eq(full
                    .all_points()
                    .map(|(s, d)| (s, d.index, d.t_k, d.ln_k, d.sigma_ln_k, d.used)));
        if !same_points {
            return Err(GlobalError::NotNested(
                "the two fits are not of the same series and points".into(),
            ));
        }
        let mut keys = Vec::new();
        for info in full.model().params() {
            match (full.sharing_of(info.key), restricted.sharing_of(info.key)) {
                (Some(Sharing::Shared), Some(Sharing::PerSeries)) => {
                    return Err(GlobalError::NotNested(format!(
                        "{} is shared in the full fit but not in the restricted one",
                        info.key
                    )))
                }
                (Some(Sharing::PerSeries), Some(Sharing::Shared)) => keys.push(info.key),
                _ => {}
            }
        }
        let (p_r, p_f) = (restricted.n_params(), full.n_params());
        if keys.is_empty() || p_f <= p_r {
            return Err(GlobalError::NotNested(
                "the restricted fit shares no parameter the full fit has per series (one series has nothing to compare)".into(),
            ));
        }
        let df_num = p_f - p_r;
        let df_den = full.dof();
        if df_den == 0 {
            return Err(GlobalError::TooFewDegreesOfFreedom {
                points: full.n_used(),
                distinct_rows: full.n_used(),
                parameters: p_f,
                needed: p_f + 1,
            });
        }
        let (chi2_r, chi2_f) = (restricted.statistics().chi2, full.statistics().chi2);
        let drop = (chi2_r - chi2_f).max(0.0);
        // With χ²_f = 0 the full fit is exact: any drop is infinitely significant, and no
        // drop at all (both exact) is no evidence (as in the model comparison).
        let f_statistic = if chi2_f > 0.0 {
            (drop / df_num as f64) / (chi2_f / df_den as f64)
        } else if drop > 0.0 {
            f64::INFINITY
        } else {
            0.0
        };
        let p_value = f_upper_tail(f_statistic, df_num as f64, df_den as f64).unwrap_or(1.0);
        let chi2_p_value = (full.options().convention == SigmaConvention::Absolute
            && full.weighted())
        .then(|| chi2_upper_tail(drop, df_num as f64))
        .flatten();
        let delta_aicc = match (restricted.statistics().aicc, full.statistics().aicc) {
            (Some(a), Some(b)) => Some(a - b),
            _ => None,
        };
        Ok(EqualityTest {
            keys,
            f_statistic,
            df_num,
            df_den,
            p_value,
            chi2_p_value,
            delta_aicc,
            restricted,
            full,
        })
    }

    /// The parameters tested: per series in the full fit, shared in the restricted one.
    pub fn keys(&self) -> &[&'static str] {
        &self.keys
    }

    /// The F statistic.
    pub fn f_statistic(&self) -> f64 {
        self.f_statistic
    }

    /// Numerator degrees of freedom: the columns the sharing removes.
    pub fn df_num(&self) -> usize {
        self.df_num
    }

    /// Denominator degrees of freedom: the residual degrees of freedom of the full fit.
    pub fn df_den(&self) -> usize {
        self.df_den
    }

    /// P(F(df_num, df_den) ≥ F): small values say the parameters differ between series.
    pub fn p_value(&self) -> f64 {
        self.p_value
    }

    /// Under absolute σ (weighted), P(χ²(df_num) ≥ χ²_r − χ²_f); `None` otherwise.
    pub fn chi2_p_value(&self) -> Option<f64> {
        self.chi2_p_value
    }

    /// AICc(restricted) − AICc(full); negative favours the shared parameters. `None` when
    /// either AICc is undefined.
    pub fn delta_aicc(&self) -> Option<f64> {
        self.delta_aicc
    }

    /// The test that decides: Δχ² when σ are known (absolute σ, weighted), else F.
    pub fn method(&self) -> EqualityMethod {
        if self.chi2_p_value.is_some() {
            EqualityMethod::Chi2
        } else {
            EqualityMethod::F
        }
    }

    /// The statistic of [`EqualityTest::method`]: F, or Δχ² = χ²_r − χ²_f (never negative).
    pub fn statistic(&self) -> f64 {
        match self.method() {
            EqualityMethod::F => self.f_statistic,
            EqualityMethod::Chi2 => {
                (self.restricted.statistics().chi2 - self.full.statistics().chi2).max(0.0)
            }
        }
    }

    /// The p-value of [`EqualityTest::method`].
    pub fn decisive_p_value(&self) -> f64 {
        self.chi2_p_value.unwrap_or(self.p_value)
    }

    /// Whether the parameters differ between the series at the fits' significance level
    /// (1 − confidence level): the decisive p-value below it.
    pub fn rejects_equality(&self) -> bool {
        self.decisive_p_value() < 1.0 - self.full.options().level
    }

    /// The verdict in words, with the statistic, its degrees of freedom and the p-value.
    pub fn verdict(&self) -> String {
        let symbols: Vec<&str> = self
            .full
            .model()
            .params()
            .iter()
            .filter(|p| self.keys.contains(&p.key))
            .map(|p| p.symbol)
            .collect();
        let what = match symbols.split_last() {
            Some((last, rest)) if !rest.is_empty() => format!("{} and {last}", rest.join(", ")),
            _ => symbols.join(""),
        };
        let (verb, value) = if symbols.len() == 1 {
            ("differs", "value")
        } else {
            ("differ", "values")
        };
        let stat = match self.method() {
            EqualityMethod::F => format!(
                "F = {:.3} on {} and {} degrees of freedom",
                self.f_statistic, self.df_num, self.df_den
            ),
            EqualityMethod::Chi2 => format!(
                "Δχ² = {:.3} on {} degree{} of freedom, σ taken as known",
                self.statistic(),
                self.df_num,
                if self.df_num == 1 { "" } else { "s" }
            ),
        };
        let alpha = crate::vant_hoff::comparison_percent(1.0 - self.full.options().level);
        let p = format_p(self.decisive_p_value());
        if self.rejects_equality() {
            format!(
                "{what} {verb} between the series ({stat}, {p}): sharing is rejected at the {alpha}% level; quote each series' own {value}"
            )
        } else {
            format!(
                "no evidence that {what} {verb} between the series ({stat}, {p}): the shared {value} is consistent with the data at the {alpha}% level (which does not prove the series equal)"
            )
        }
    }

    /// The fit with the tested parameters shared.
    pub fn restricted(&self) -> &GlobalFit {
        &self.restricted
    }

    /// The fit with the tested parameters per series.
    pub fn full(&self) -> &GlobalFit {
        &self.full
    }
}

/// Tests whether the parameters `keys` are equal across the series: fits them per series
/// and shared (every other parameter as `sharing` says) and compares the two fits with
/// [`EqualityTest::between`].
///
/// # Errors
/// Any error of [`fit_global`] for either fit; [`GlobalError::NotNested`] when `keys` is
/// empty or there is one series (nothing to compare).
pub fn test_equal_across_series(
    series: &[SeriesInput<'_>],
    sharing: &SharingMap,
    keys: &[&str],
    options: &FitOptions,
) -> Result<EqualityTest, GlobalError> {
    let mut full_map = sharing.clone();
    let mut restricted_map = sharing.clone();
    for key in keys {
        full_map.set(key, Sharing::PerSeries);
        restricted_map.set(key, Sharing::Shared);
    }
    let full = fit_global(series, &full_map, options)?;
    let restricted = fit_global(series, &restricted_map, options)?;
    EqualityTest::between(restricted, full)
}
