//! The general solver's χ² without a stored design: [`weighted_rss_formed`] forms each row
//! of a model's design from its temperature whenever a pass needs it (the model comparison
//! on large data sets, where the n × p design was a third of the memory), and
//! [`column_scale`], the column equilibration both it and `solve` use.

use super::{factorised, power_of_two_near, weighted_rss, Rows, Scaled, MAX_FORMED_COLUMNS};
use crate::error::Error;
use nalgebra::DMatrix;

/// [`weighted_rss`] of `model`'s design at the temperatures `t_k` (θ = `theta`) with
/// observations `y` and weights `weights`: the same numbers, bit for bit, without an n×p
/// design beside the factorised copy (each row is formed again from its temperature when a
/// pass needs it), and with √w and √w·y written over `weights` and `y`. For the model
/// comparison on large data sets, where the design was a third of the memory.
///
/// # Errors
/// As [`weighted_rss`].
pub(crate) fn weighted_rss_formed(
    model: crate::model::Model,
    theta: f64,
    t_k: &[f64],
    mut y: Vec<f64>,
    weights: Option<Vec<f64>>,
) -> Result<f64, Error> {
    let (n, p) = (t_k.len(), model.n_params());
    if p > MAX_FORMED_COLUMNS || p == 0 || n < p || y.len() != n {
        let mut design = DMatrix::zeros(n, p);
        let mut row = vec![0.0; p];
        for (i, &t) in t_k.iter().enumerate() {
            model.row_into(t, theta, &mut row);
            for (c, v) in row.iter().enumerate() {
                design[(i, c)] = *v;
            }
        }
        return weighted_rss(&design, &y, weights.as_deref());
    }
    if let Some(w) = &weights {
        if w.len() != n {
            return Err(Error::DimensionMismatch {
                what: "weights",
                expected: n,
                found: w.len(),
            });
        }
    }
    let rows = Rows::Model { t_k, model, theta };
    // The checks of `solve_impl`, in its order: the design, the observations, the weights.
    let mut raw = [0.0; MAX_FORMED_COLUMNS];
    let probe = Scaled {
        rows,
        n,
        p,
        sqrt_w: &[],
        inv_scale: &[],
    };
    for i in 0..n {
        probe.raw_row_into(i, &mut raw);
        if raw[..p].iter().any(|v| !v.is_finite()) {
            return Err(Error::NonFinite {
                what: "design matrix entry",
                index: None,
            });
        }
    }
    for (i, v) in y.iter().enumerate() {
        if !v.is_finite() {
            return Err(Error::NonFinite {
                what: "observation",
                index: Some(i),
            });
        }
    }
    let sqrt_w = match weights {
        Some(mut w) => {
            for (i, wi) in w.iter_mut().enumerate() {
                if !wi.is_finite() {
                    return Err(Error::NonFinite {
                        what: "weight",
                        index: Some(i),
                    });
                }
                if *wi <= 0.0 {
                    return Err(Error::NonPositiveSigma {
                        index: Some(i),
                        value: *wi,
                    });
                }
                *wi = wi.sqrt();
            }
            w
        }
        None => vec![1.0; n],
    };
    let scale = column_scale(&rows, n, p, &sqrt_w)?;
    for (v, s) in y.iter_mut().zip(&sqrt_w) {
        *v *= s;
    }
    let fit = factorised(rows, n, p, y, &sqrt_w, &scale, None)?;
    Ok(fit.rss)
}

/// D: for each column of the weighted design W^{1/2} X, the power of two nearest its norm
/// (the norm computed on values divided by the column's largest, so nothing overflows).
///
/// # Errors
/// [`Error::RankDeficient`] for a column of zeros or of non-finite numbers.
pub(super) fn column_scale(
    rows: &Rows<'_>,
    n: usize,
    p: usize,
    sqrt_w: &[f64],
) -> Result<Vec<f64>, Error> {
    let xs = Scaled {
        rows: *rows,
        n,
        p,
        sqrt_w,
        inv_scale: &[],
    };
    let mut raw = vec![0.0; p];
    let mut big = vec![0.0f64; p];
    for (i, s) in sqrt_w.iter().enumerate() {
        xs.raw_row_into(i, &mut raw);
        for j in 0..p {
            big[j] = big[j].max((raw[j] * s).abs());
        }
    }
    if let Some(j) = big.iter().position(|&b| b == 0.0 || !b.is_finite()) {
        return Err(Error::RankDeficient { column: j });
    }
    // Each column's sum in row order, as a sum over the column alone adds them.
    let mut sum = vec![0.0f64; p];
    for (i, s) in sqrt_w.iter().enumerate() {
        xs.raw_row_into(i, &mut raw);
        for j in 0..p {
            sum[j] += (raw[j] * s / big[j]).powi(2);
        }
    }
    Ok((0..p)
        .map(|j| power_of_two_near(big[j] * sum[j].sqrt()).unwrap_or(1.0))
        .collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_formed_when_needed_give_the_stored_design_s_chi2_to_the_bit() {
        // Curved, noisy, unequally weighted invented data over 5–60 °C; every shipped
        // model, weighted and unweighted, with θ near the data and far from it (the latter
        // ill-conditioned enough to be refined).
        use crate::model::Model;
        let n = 2000;
        let t: Vec<f64> = (0..n)
            .map(|i| 278.15 + 55.0 * i as f64 / (n - 1) as f64)
            .collect();
        let y: Vec<f64> = t
            .iter()
            .enumerate()
            .map(|(i, &t)| 5413.0 / t - 7.2 + 0.01 * ((i * 7919 % 13) as f64 - 6.0))
            .collect();
        let w: Vec<f64> = (0..n)
            .map(|i| 1.0 / (0.01 + 0.001 * (i % 7) as f64).powi(2))
            .collect();
        for model in [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW] {
            for theta in [298.15, 2000.0] {
                for weights in [Some(w.clone()), None] {
                    let mut x = DMatrix::zeros(n, model.n_params());
                    for (i, &ti) in t.iter().enumerate() {
                        let r = model.row(ti, theta);
                        for (j, v) in r.iter().enumerate() {
                            x[(i, j)] = *v;
                        }
                    }
                    let stored = weighted_rss(&x, &y, weights.as_deref());
                    let formed = weighted_rss_formed(model, theta, &t, y.clone(), weights);
                    assert_eq!(
                        stored.map(f64::to_bits),
                        formed.map(f64::to_bits),
                        "{} θ = {theta}",
                        model.key()
                    );
                }
            }
        }
    }
}
