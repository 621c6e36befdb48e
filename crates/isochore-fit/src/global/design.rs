//! The block design of several series: which column carries which parameter for which
//! series ([`Layout`]), the checks on points, options and sharing before any arithmetic
//! ([`prepare`]), and the design matrix itself.
//!
//! Column order is parameter-major in the model's parameter order: a shared parameter has
//! one column; a per-series parameter has one column per series, in series order. A shared
//! column carries the model's column value in every series' rows; a per-series column
//! carries it in its own series' rows only and is zero elsewhere.

use super::error::{series_name, GlobalError};
use super::{SeriesInput, Sharing, SharingMap};
use crate::error::Error;
use crate::model::{
    count_distinct_temperatures, is_plausible_temperature, FitOptions, Model, SigmaConvention,
    Weighting,
};
use nalgebra::DMatrix;
use serde::Serialize;

/// One column of the block design: a model parameter, for one series or shared by all.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct GlobalColumn {
    key: &'static str,
    symbol: &'static str,
    series: Option<usize>,
    label: String,
}

impl GlobalColumn {
    /// The parameter's key, such as `"delta_h"`.
    pub fn key(&self) -> &'static str {
        self.key
    }

    /// The parameter's symbol, such as `"ΔH°"`.
    pub fn symbol(&self) -> &'static str {
        self.symbol
    }

    /// The series (0-based) the column belongs to; `None` for a shared parameter.
    pub fn series(&self) -> Option<usize> {
        self.series
    }

    /// A label for tables and messages: `delta_cp (shared)` or `delta_h [series 2 ("B")]`.
    pub fn label(&self) -> &str {
        &self.label
    }
}

/// Internal: the columns of a block design and where each series finds its parameters.
#[derive(Debug, Clone)]
pub(crate) struct Layout {
    pub(crate) model: Model,
    /// Sharing of each model parameter, in the model's order.
    pub(crate) sharing: Vec<Sharing>,
    pub(crate) columns: Vec<GlobalColumn>,
    /// `column_of[s][k]`: the column of model parameter k in series s's rows.
    pub(crate) column_of: Vec<Vec<usize>>,
}

impl Layout {
    /// The layout of `model` over `series` with `sharing`.
    ///
    /// # Errors
    /// [`GlobalError::NoSeries`]; [`GlobalError::UnknownParameter`] for a key in `sharing`
    /// the model does not have.
    pub(crate) fn new(
        model: Model,
        sharing: &SharingMap,
        series: &[SeriesInput<'_>],
    ) -> Result<Layout, GlobalError> {
        if series.is_empty() {
            return Err(GlobalError::NoSeries);
        }
        let params = model.params();
        for key in sharing.keys() {
            if !params.iter().any(|p| p.key == key) {
                return Err(GlobalError::UnknownParameter {
                    key: key.to_string(),
                    model: model.key(),
                    known: params.iter().map(|p| p.key).collect(),
                });
            }
        }
        let p = params.len();
        let s_count = series.len();
        let mut columns = Vec::new();
        let mut column_of = vec![vec![0usize; p]; s_count];
        let mut shares = Vec::with_capacity(p);
        for (k, info) in params.iter().enumerate() {
            let share = sharing.sharing_of(info.key);
            shares.push(share);
            match share {
                Sharing::Shared => {
                    for col in column_of.iter_mut() {
                        col[k] = columns.len();
                    }
                    columns.push(GlobalColumn {
                        key: info.key,
                        symbol: info.symbol,
                        series: None,
                        label: format!("{} (shared)", info.key),
                    });
                }
                Sharing::PerSeries => {
                    for (s, input) in series.iter().enumerate() {
                        column_of[s][k] = columns.len();
                        columns.push(GlobalColumn {
                            key: info.key,
                            symbol: info.symbol,
                            series: Some(s),
                            label: format!("{} [{}]", info.key, series_name(s, input.label)),
                        });
                    }
                }
            }
        }
        Ok(Layout {
            model,
            sharing: shares,
            columns,
            column_of,
        })
    }

    /// Number of columns.
    pub(crate) fn p(&self) -> usize {
        self.columns.len()
    }

    /// Keys of the parameters fitted per series.
    pub(crate) fn per_series_keys(&self) -> Vec<&'static str> {
        self.model
            .params()
            .iter()
            .zip(&self.sharing)
            .filter(|(_, s)| **s == Sharing::PerSeries)
            .map(|(p, _)| p.key)
            .collect()
    }
}

/// Internal: the validated used points of every series in one design.
pub(crate) struct Prepared {
    /// (series, 0-based index within the series) of each used point, in row order.
    pub(crate) rows: Vec<(usize, usize)>,
    pub(crate) y: Vec<f64>,
    pub(crate) weights: Option<Vec<f64>>,
    pub(crate) design: DMatrix<f64>,
}

fn point_error(series: usize, input: &SeriesInput<'_>, error: Error) -> GlobalError {
    GlobalError::Point {
        series,
        label: input.label.to_string(),
        error,
    }
}

/// Checks options, points and sharing, in this order, before any arithmetic, and builds
/// the block design on the used points.
///
/// 1. the options ([`GlobalError::Options`]);
/// 2. every point of every series valid, and plausible unless
///    [`FitOptions::allow_extreme_temperatures`] ([`GlobalError::Point`]);
/// 3. every series with a used point ([`GlobalError::EmptySeries`]);
/// 4. every series with at least as many distinct temperatures as parameters of its own
///    ([`GlobalError::SingularSharing`]); and the series together with enough for the
///    shared ones: Σₛ min(dₛ, p) ≥ columns ([`GlobalError::SingularDesign`]);
/// 5. p + 1 used points and distinct design rows for a scaled fit, p under absolute σ
///    ([`GlobalError::TooFewDegreesOfFreedom`]);
/// 6. for a weighted fit, a σ on every used point whose weight 1/σ² is a normal number.
///
/// Temperatures are distinct at [`crate::TEMPERATURE_RESOLUTION_K`], as in a single fit.
pub(crate) fn prepare(
    series: &[SeriesInput<'_>],
    layout: &Layout,
    options: &FitOptions,
) -> Result<Prepared, GlobalError> {
    options.validate().map_err(GlobalError::Options)?;
    let weighted = options.weighting == Weighting::InverseVariance;
    let p_model = layout.model.n_params();
    let p_total = layout.p();
    let needed = if weighted && options.convention == SigmaConvention::Absolute {
        p_total
    } else {
        p_total + 1
    };
    for (s, input) in series.iter().enumerate() {
        for (i, pt) in input.points.iter().enumerate() {
            pt.validate(i).map_err(|e| point_error(s, input, e))?;
            if !options.allow_extreme_temperatures && !is_plausible_temperature(pt.t_k) {
                return Err(point_error(
                    s,
                    input,
                    Error::ImplausibleTemperature {
                        index: Some(i),
                        kelvin: pt.t_k,
                    },
                ));
            }
        }
    }
    let used_temps = |input: &SeriesInput<'_>| {
        input
            .points
            .iter()
            .filter(|m| m.included)
            .map(|m| m.t_k)
            .collect::<Vec<f64>>()
    };
    let mut distinct = Vec::with_capacity(series.len());
    for (s, input) in series.iter().enumerate() {
        let temps = used_temps(input);
        if temps.is_empty() {
            return Err(GlobalError::EmptySeries {
                series: s,
                label: input.label.to_string(),
            });
        }
        distinct.push(count_distinct_temperatures(
            temps.iter().copied(),
            needed.max(p_model),
        ));
    }
    let per_series = layout.per_series_keys();
    for (s, input) in series.iter().enumerate() {
        if distinct[s] < per_series.len() {
            return Err(GlobalError::SingularSharing {
                series: s,
                label: input.label.to_string(),
                distinct: distinct[s],
                needed: per_series.len(),
                per_series: per_series.clone(),
            });
        }
    }
    // Series s's rows span at most min(dₛ, p) dimensions of the model's p; the columns
    // cannot all be independent with fewer in total. Only shared columns can fail here once
    // every series passed the count above.
    let capacity: usize = distinct.iter().map(|&d| d.min(p_model)).sum();
    if capacity < p_total {
        let first_shared = layout
            .columns
            .iter()
            .find(|c| c.series.is_none())
            .map_or_else(String::new, |c| c.label.clone());
        return Err(GlobalError::SingularDesign {
            column: first_shared,
        });
    }
    let n_used: usize = series
        .iter()
        .map(|input| input.points.iter().filter(|m| m.included).count())
        .sum();
    // Points at one temperature share a design row within a series, and across series too
    // when nothing is fitted per series.
    let distinct_rows = if per_series.is_empty() {
        count_distinct_temperatures(series.iter().flat_map(used_temps), needed)
    } else {
        distinct.iter().sum::<usize>()
    };
    if n_used < needed || distinct_rows < needed {
        return Err(GlobalError::TooFewDegreesOfFreedom {
            points: n_used,
            distinct_rows: distinct_rows.min(needed),
            parameters: p_total,
            needed,
        });
    }

    let mut rows = Vec::with_capacity(n_used);
    let mut y = Vec::with_capacity(n_used);
    let mut weights = weighted.then(|| Vec::with_capacity(n_used));
    for (s, input) in series.iter().enumerate() {
        for (i, pt) in input.points.iter().enumerate() {
            if !pt.included {
                continue;
            }
            if let Some(w) = weights.as_mut() {
                let sigma = pt
                    .sigma_ln_k
                    .ok_or_else(|| point_error(s, input, Error::MissingSigma { index: i }))?;
                let wi = 1.0 / (sigma * sigma);
                if !wi.is_normal() {
                    return Err(point_error(
                        s,
                        input,
                        Error::SigmaOutOfRange {
                            index: Some(i),
                            value: sigma,
                        },
                    ));
                }
                w.push(wi);
            }
            rows.push((s, i));
            y.push(pt.ln_k);
        }
    }
    let design = block_design(series, layout, &rows, options.t_ref_k);
    Ok(Prepared {
        rows,
        y,
        weights,
        design,
    })
}

/// Writes the block row of point `m` of series `s` into `out` (length = columns): the
/// model's row in the series' columns, zero elsewhere. `scratch` has the model's length.
pub(crate) fn block_row(
    layout: &Layout,
    s: usize,
    t_k: f64,
    theta: f64,
    scratch: &mut [f64],
    out: &mut [f64],
) {
    layout.model.row_into(t_k, theta, scratch);
    out.iter_mut().for_each(|v| *v = 0.0);
    for (k, &c) in layout.column_of[s].iter().enumerate() {
        out[c] = scratch[k];
    }
}

/// The block design on the used points `rows`.
fn block_design(
    series: &[SeriesInput<'_>],
    layout: &Layout,
    rows: &[(usize, usize)],
    theta: f64,
) -> DMatrix<f64> {
    let p = layout.p();
    let mut x = DMatrix::zeros(rows.len(), p);
    let mut scratch = vec![0.0; layout.model.n_params()];
    let mut row = vec![0.0; p];
    for (r, &(s, i)) in rows.iter().enumerate() {
        block_row(
            layout,
            s,
            series[s].points[i].t_k,
            theta,
            &mut scratch,
            &mut row,
        );
        for (c, v) in row.iter().enumerate() {
            x[(r, c)] = *v;
        }
    }
    x
}
