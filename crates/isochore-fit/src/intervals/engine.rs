//! The refits of an interval run. With the temperatures fixed the design is fixed, so the
//! estimate is linear in ln K: β(y) = M y with M = (XᵀWX)⁻¹XᵀW, taken once from a
//! Householder QR of the √w-scaled design (M = D⁻¹R⁻¹Q₁ᵀW^{1/2}, never the normal
//! equations), and a draw costs one p×n product. It is applied to the perturbation only,
//! β* = β̂ + M δ, so the fit's own β̂ (refined where it needed it) is the centre of every
//! draw. When the design changes from draw to draw (temperatures drawn, rows resampled),
//! [`solve`] refits from scratch by the same QR.

use crate::least_squares::rank_tolerance;
use crate::model::Model;
use nalgebra::DMatrix;

/// The used points of a fit, in input order, as the refits see them.
#[derive(Debug, Clone)]
pub(crate) struct Design {
    /// Temperatures, K.
    pub(crate) t: Vec<f64>,
    /// ln K.
    pub(crate) y: Vec<f64>,
    /// Weights 1/σ² (1 when unweighted).
    pub(crate) w: Vec<f64>,
    /// Raw residuals of the fit.
    pub(crate) e: Vec<f64>,
    /// Leverages of the fit.
    pub(crate) h: Vec<f64>,
    /// The model and θ.
    pub(crate) model: Model,
    pub(crate) theta: f64,
}

impl Design {
    pub(crate) fn n(&self) -> usize {
        self.t.len()
    }
    pub(crate) fn p(&self) -> usize {
        self.model.n_params()
    }
}

/// The √w-scaled, column-scaled design of `model` at temperatures `t` with weights `w`, its
/// QR, and the column scales. `None` when rank deficient or not finite.
fn factor(
    model: Model,
    theta: f64,
    t: &[f64],
    w: &[f64],
) -> Option<(
    nalgebra::linalg::QR<f64, nalgebra::Dyn, nalgebra::Dyn>,
    Vec<f64>,
)> {
    let (n, p) = (t.len(), model.n_params());
    if n < p {
        return None;
    }
    let mut a = DMatrix::<f64>::zeros(n, p);
    let mut row = vec![0.0; p];
    for i in 0..n {
        model.row_into(t[i], theta, &mut row);
        let sw = w[i].sqrt();
        for j in 0..p {
            a[(i, j)] = row[j] * sw;
        }
    }
    factor_weighted(a)
}

/// The QR and column scales of `a`, a design whose rows are already scaled by √w.
#[allow(clippy::type_complexity)]
fn factor_weighted(
    mut a: DMatrix<f64>,
) -> Option<(
    nalgebra::linalg::QR<f64, nalgebra::Dyn, nalgebra::Dyn>,
    Vec<f64>,
)> {
    let (n, p) = (a.nrows(), a.ncols());
    if n < p {
        return None;
    }
    let scale: Vec<f64> = (0..p)
        .map(|j| {
            let norm = a.column(j).norm();
            if norm > 0.0 && norm.is_finite() {
                norm
            } else {
                1.0
            }
        })
        .collect();
    for (j, &s) in scale.iter().enumerate() {
        a.column_mut(j).iter_mut().for_each(|v| *v /= s);
    }
    if !a.iter().all(|v| v.is_finite()) {
        return None;
    }
    let qr = a.qr();
    let r = qr.r();
    let big = (0..p).map(|j| r[(j, j)].abs()).fold(0.0, f64::max);
    let tol = rank_tolerance(n) * big;
    if (0..p).any(|j| r[(j, j)].abs() <= tol) {
        return None;
    }
    Some((qr, scale))
}

/// The p×n map M with β(y) = M y for the weighted least-squares fit of `d` (column-major
/// p×n: `m[i * p + j]` is Mⱼᵢ). `None` when the design is rank deficient.
pub(crate) fn linear_map(d: &Design) -> Option<Vec<f64>> {
    let (qr, scale) = factor(d.model, d.theta, &d.t, &d.w)?;
    map_of(qr, &scale, &d.w)
}

/// The p×n map M with β(y) = M y for the weighted least-squares fit of any design `x`
/// (n×p, rows not yet weighted) with weights `w` (a joint fit's block design), laid out as
/// [`linear_map`]'s. `None` when the design is rank deficient.
pub(crate) fn linear_map_of(x: &DMatrix<f64>, w: &[f64]) -> Option<Vec<f64>> {
    let mut a = x.clone();
    for (i, wi) in w.iter().enumerate() {
        let sw = wi.sqrt();
        a.row_mut(i).iter_mut().for_each(|v| *v *= sw);
    }
    let (qr, scale) = factor_weighted(a)?;
    map_of(qr, &scale, w)
}

fn map_of(
    qr: nalgebra::linalg::QR<f64, nalgebra::Dyn, nalgebra::Dyn>,
    scale: &[f64],
    w: &[f64],
) -> Option<Vec<f64>> {
    let (n, p) = (w.len(), scale.len());
    let q = qr.q(); // n×p
    let r = qr.r();
    let qt = q.transpose(); // p×n
    let x = r.solve_upper_triangular(&qt)?; // R⁻¹Q₁ᵀ, p×n
    let mut m = vec![0.0; n * p];
    for i in 0..n {
        let sw = w[i].sqrt();
        for j in 0..p {
            m[i * p + j] = x[(j, i)] * sw / scale[j];
        }
    }
    m.iter().all(|v| v.is_finite()).then_some(m)
}

/// β̂ + M δ into `out`.
#[inline]
pub(crate) fn apply(m: &[f64], beta: &[f64], delta: &[f64], out: &mut [f64]) {
    let p = beta.len();
    out.copy_from_slice(beta);
    for (i, &di) in delta.iter().enumerate() {
        let col = &m[i * p..(i + 1) * p];
        for j in 0..p {
            out[j] += col[j] * di;
        }
    }
}

/// The weighted least-squares coefficients of `model` on (t, y, w) by Householder QR;
/// `None` when the design is rank deficient (a resample with too few distinct temperatures).
pub(crate) fn solve(model: Model, theta: f64, t: &[f64], y: &[f64], w: &[f64]) -> Option<Vec<f64>> {
    let p = model.n_params();
    let (qr, scale) = factor(model, theta, t, w)?;
    let mut b =
        nalgebra::DVector::from_iterator(y.len(), y.iter().zip(w).map(|(y, w)| y * w.sqrt()));
    qr.q_tr_mul(&mut b);
    let r = qr.r();
    let x = r.solve_upper_triangular(&b.rows(0, p).into_owned())?;
    let beta: Vec<f64> = (0..p).map(|j| x[j] / scale[j]).collect();
    beta.iter().all(|v| v.is_finite()).then_some(beta)
}
