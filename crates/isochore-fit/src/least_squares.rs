//! General weighted linear least squares by Householder QR with column scaling.
//!
//! This is the numerical kernel under every van 't Hoff model. It solves
//! `min Σ wᵢ (yᵢ − xᵢᵀβ)²` by factorising the √w-scaled, column-equilibrated design
//! `X̃ = W^{1/2} X D⁻¹ = Q R` (nalgebra's Householder QR), never by forming the normal
//! equations `XᵀWX`, which would square the condition number. One step of iterative
//! refinement on the residual polishes the solution for ill-conditioned designs (NIST's
//! Filip and Wampler sets). Leverages come from `R⁻¹` row by row, `hᵢ = ‖R⁻ᵀ x̃ᵢ‖²`, so no
//! n×n hat matrix is ever built and memory stays linear in n.
//!
//! It knows nothing about chemistry: columns and observations are plain numbers.

use crate::error::Error;
use nalgebra::{DMatrix, DVector};

/// Relative size of a diagonal element of R, against the largest, below which the design
/// is declared rank deficient. Column scaling makes the diagonal comparable; a column that
/// truly depends on the others leaves a diagonal element at rounding level (~1e-16).
pub const RANK_TOLERANCE: f64 = 1e-13;

/// The solution of a weighted linear least-squares problem and what diagnostics need.
#[derive(Debug, Clone)]
pub struct LinearFit {
    /// Estimated coefficients β, in the order of the design columns.
    pub coefficients: Vec<f64>,
    /// The unscaled covariance `(XᵀWX)⁻¹`. Multiply by the error variance s² for the
    /// ordinary (scaled) covariance, or use as is when the weights are absolute 1/σ².
    pub unscaled_covariance: DMatrix<f64>,
    /// Fitted values xᵢᵀβ.
    pub fitted: Vec<f64>,
    /// Raw residuals yᵢ − xᵢᵀβ.
    pub residuals: Vec<f64>,
    /// Leverages hᵢ, the diagonal of the weighted hat matrix.
    pub leverages: Vec<f64>,
    /// Weighted residual sum of squares Σ wᵢ eᵢ².
    pub rss: f64,
    /// Number of observations n.
    pub n: usize,
    /// Number of coefficients p.
    pub p: usize,
}

impl LinearFit {
    /// Residual degrees of freedom n − p.
    pub fn dof(&self) -> usize {
        self.n - self.p
    }
}

/// Solves a weighted linear least-squares problem.
///
/// # Formula
/// ```text
/// β̂ = argmin Σᵢ wᵢ (yᵢ − Σⱼ Xᵢⱼ βⱼ)²,   (XᵀWX)⁻¹ = D⁻¹ R⁻¹ R⁻ᵀ D⁻¹,   hᵢ = ‖R⁻ᵀ x̃ᵢ‖²
/// ```
/// where W = diag(w), D = diag of the column norms of W^{1/2}X, and `W^{1/2} X D⁻¹ = QR`.
/// Unit weights are used when `weights` is `None`.
///
/// # Errors
/// [`Error::DimensionMismatch`] when `y` or `weights` do not match the design rows;
/// [`Error::TooFewPoints`] when n < p; [`Error::NonFinite`] for a NaN or infinite entry;
/// [`Error::NonPositiveSigma`] for a weight ≤ 0; [`Error::RankDeficient`] when a column is
/// zero or depends on the others.
///
/// # Examples
/// ```
/// use isochore_fit::least_squares::solve;
/// use nalgebra::DMatrix;
/// // y = 1 + 2x through three exact points.
/// let x = DMatrix::from_row_slice(3, 2, &[1.0, 0.0, 1.0, 1.0, 1.0, 2.0]);
/// let fit = solve(&x, &[1.0, 3.0, 5.0], None).unwrap();
/// assert!((fit.coefficients[1] - 2.0).abs() < 1e-12);
/// ```
pub fn solve(
    design: &DMatrix<f64>,
    y: &[f64],
    weights: Option<&[f64]>,
) -> Result<LinearFit, Error> {
    let (n, p) = design.shape();
    if y.len() != n {
        return Err(Error::DimensionMismatch {
            what: "observations",
            expected: n,
            found: y.len(),
        });
    }
    if let Some(w) = weights {
        if w.len() != n {
            return Err(Error::DimensionMismatch {
                what: "weights",
                expected: n,
                found: w.len(),
            });
        }
    }
    if p == 0 {
        return Err(Error::TooFewPoints {
            available: n,
            needed: 1,
        });
    }
    if n < p {
        return Err(Error::TooFewPoints {
            available: n,
            needed: p,
        });
    }
    if design.iter().any(|v| !v.is_finite()) {
        return Err(Error::NonFinite {
            what: "design matrix entry",
            index: None,
        });
    }
    for (i, v) in y.iter().enumerate() {
        if !v.is_finite() {
            return Err(Error::NonFinite {
                what: "observation",
                index: Some(i),
            });
        }
    }
    let sqrt_w: Vec<f64> = match weights {
        Some(w) => {
            let mut out = Vec::with_capacity(n);
            for (i, &wi) in w.iter().enumerate() {
                if !wi.is_finite() {
                    return Err(Error::NonFinite {
                        what: "weight",
                        index: Some(i),
                    });
                }
                if wi <= 0.0 {
                    return Err(Error::NonPositiveSigma {
                        index: Some(i),
                        value: wi,
                    });
                }
                out.push(wi.sqrt());
            }
            out
        }
        None => vec![1.0; n],
    };

    // Weighted, column-equilibrated design X̃ = W^{1/2} X D⁻¹.
    let mut xs = design.clone();
    for (i, &s) in sqrt_w.iter().enumerate() {
        if s != 1.0 {
            for j in 0..p {
                xs[(i, j)] *= s;
            }
        }
    }
    let mut scale = vec![0.0; p];
    for (j, d) in scale.iter_mut().enumerate() {
        let norm = xs.column(j).norm();
        if norm == 0.0 || !norm.is_finite() {
            return Err(Error::RankDeficient { column: j });
        }
        *d = norm;
        xs.column_mut(j).unscale_mut(norm);
    }
    let ys = DVector::from_iterator(n, y.iter().zip(&sqrt_w).map(|(v, s)| v * s));

    let qr = xs.clone().qr();
    let r = qr.r();
    let max_diag = (0..p).map(|j| r[(j, j)].abs()).fold(0.0, f64::max);
    for j in 0..p {
        if !(r[(j, j)].abs() > RANK_TOLERANCE * max_diag) {
            return Err(Error::RankDeficient { column: j });
        }
    }
    let r = r.view((0, 0), (p, p)).into_owned();

    let solve_scaled = |rhs: &DVector<f64>| -> Option<DVector<f64>> {
        let mut qtb = rhs.clone();
        qr.q_tr_mul(&mut qtb);
        let top = qtb.rows(0, p).into_owned();
        r.solve_upper_triangular(&top)
    };
    let mut beta_s = solve_scaled(&ys).ok_or(Error::RankDeficient { column: p - 1 })?;
    // One step of iterative refinement: solve for the correction from the residual.
    let resid_s = &ys - &xs * &beta_s;
    if let Some(delta) = solve_scaled(&resid_s) {
        if delta.iter().all(|v| v.is_finite()) {
            beta_s += delta;
        }
    }

    // R⁻¹ (upper triangular) for the covariance and the leverages.
    let r_inv = r
        .clone()
        .try_inverse()
        .ok_or(Error::RankDeficient { column: p - 1 })?;
    let cov_s = &r_inv * r_inv.transpose();
    let mut unscaled_covariance = DMatrix::zeros(p, p);
    for a in 0..p {
        for b in 0..p {
            unscaled_covariance[(a, b)] = cov_s[(a, b)] / (scale[a] * scale[b]);
        }
    }
    let coefficients: Vec<f64> = (0..p).map(|j| beta_s[j] / scale[j]).collect();

    let mut fitted = Vec::with_capacity(n);
    let mut residuals = Vec::with_capacity(n);
    let mut leverages = Vec::with_capacity(n);
    let mut rss = 0.0;
    let mut a = vec![0.0; p];
    for i in 0..n {
        let mut f = 0.0;
        for (j, c) in coefficients.iter().enumerate() {
            f += design[(i, j)] * c;
        }
        let e = y[i] - f;
        rss += (sqrt_w[i] * e).powi(2);
        fitted.push(f);
        residuals.push(e);
        // a = R⁻ᵀ x̃ᵢ, with R⁻¹ upper triangular: a_k = Σ_{j ≤ k} R⁻¹[j,k] x̃ᵢⱼ.
        let mut h = 0.0;
        for k in 0..p {
            let mut s = 0.0;
            for j in 0..=k {
                s += r_inv[(j, k)] * xs[(i, j)];
            }
            a[k] = s;
            h += s * s;
        }
        leverages.push(h.min(1.0));
    }
    if !rss.is_finite() || coefficients.iter().any(|c| !c.is_finite()) {
        return Err(Error::NonFinite {
            what: "fit result",
            index: None,
        });
    }
    Ok(LinearFit {
        coefficients,
        unscaled_covariance,
        fitted,
        residuals,
        leverages,
        rss,
        n,
        p,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn straight_line_and_leverage_sum() {
        // The leverages of a fit with p coefficients sum to p (trace of the hat matrix).
        let xs = [1.0, 2.0, 3.0, 4.0, 10.0];
        let x = DMatrix::from_fn(5, 2, |i, j| if j == 0 { 1.0 } else { xs[i] });
        let y: Vec<f64> = xs
            .iter()
            .map(|v| 0.5 - 1.5 * v + if *v == 3.0 { 0.1 } else { 0.0 })
            .collect();
        let fit = solve(&x, &y, Some(&[1.0, 2.0, 3.0, 1.0, 0.5])).unwrap();
        let sum: f64 = fit.leverages.iter().sum();
        assert!((sum - 2.0).abs() < 1e-12, "{sum}");
        // Weighted residuals are orthogonal to each design column.
        let w = [1.0, 2.0, 3.0, 1.0, 0.5];
        let dot: f64 = (0..5).map(|i| w[i] * fit.residuals[i] * xs[i]).sum();
        assert!(dot.abs() < 1e-12);
    }

    #[test]
    fn singular_designs_are_typed_errors() {
        // Duplicated column.
        let x = DMatrix::from_fn(4, 2, |i, _| i as f64 + 1.0);
        assert!(matches!(
            solve(&x, &[1.0, 2.0, 3.0, 4.0], None),
            Err(Error::RankDeficient { .. })
        ));
        // Zero column.
        let x = DMatrix::from_fn(4, 2, |i, j| if j == 0 { 1.0 } else { 0.0 * i as f64 });
        assert!(matches!(
            solve(&x, &[1.0, 2.0, 3.0, 4.0], None),
            Err(Error::RankDeficient { .. })
        ));
        // Fewer rows than columns.
        let x = DMatrix::from_element(1, 2, 1.0);
        assert!(matches!(
            solve(&x, &[1.0], None),
            Err(Error::TooFewPoints { .. })
        ));
        // NaN, bad weight, wrong length.
        let x = DMatrix::from_fn(3, 2, |i, j| if j == 0 { 1.0 } else { i as f64 });
        assert!(solve(&x, &[1.0, f64::NAN, 2.0], None).is_err());
        assert!(solve(&x, &[1.0, 2.0, 2.0], Some(&[1.0, 0.0, 1.0])).is_err());
        assert!(solve(&x, &[1.0, 2.0], None).is_err());
    }
}
