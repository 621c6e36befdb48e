//! General weighted linear least squares by Householder QR with column scaling.
//!
//! This is the numerical kernel under every van 't Hoff model. It solves
//! `min Σ wᵢ (yᵢ − xᵢᵀβ)²` by factorising the √w-scaled, column-equilibrated design
//! `X̃ = W^{1/2} X D⁻¹ = Q R` (nalgebra's Householder QR), never by forming the normal
//! equations `XᵀWX`, which would square the condition number. The column scale factors
//! are powers of two, so equilibration rounds nothing. Björck's iterative refinement of the
//! augmented system, with residuals computed in twice the working precision (error-free
//! transformations, no extended-precision type), polishes the solution for ill-conditioned
//! and large-residual designs (NIST's Filip and Wampler sets). Leverages come from `R⁻¹` row by
//! row, `hᵢ = ‖R⁻ᵀ x̃ᵢ‖²`, so no n×n hat matrix is ever built and memory stays linear in n.
//!
//! It knows nothing about chemistry: columns and observations are plain numbers.

use crate::error::Error;
use nalgebra::{DMatrix, DVector};

mod formed;
mod streamed;

use formed::column_scale;
pub(crate) use formed::weighted_rss_formed;
#[cfg(test)]
pub(crate) use streamed::weighted_rss_streamed;
pub(crate) use streamed::weighted_rss_streamed_with_logs;

/// Relative size of a diagonal element of R, against the largest, below which the design
/// is declared rank deficient (the floor of [`rank_tolerance`]). Column scaling makes the
/// diagonal comparable; a column that truly depends on the others leaves a diagonal element
/// at rounding level.
pub const RANK_TOLERANCE: f64 = 1e-13;

/// The rank tolerance for a design of `n` rows, relative to the largest diagonal element
/// of the column-equilibrated R: `max(RANK_TOLERANCE, n·ε)`. The rounding left in R by a
/// dependent column grows with the number of rows accumulated (up to about n·ε), so a fixed
/// tolerance at the edge of floating point would let rounding noise of many repeats pass
/// for information (the rule of numerical rank used by LAPACK's and NumPy's rank
/// estimates, which scale ε by the problem's size; common practice).
pub fn rank_tolerance(n: usize) -> f64 {
    RANK_TOLERANCE.max(n as f64 * f64::EPSILON)
}

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

// Refinement settings, shared with the streaming path of `fit` (`crate::fast`): the
// column scaling, the error bound, when to refine and for how long.

/// Most refinement steps taken; each gains roughly −log10(ε·κ) digits, so a few suffice
/// whenever refinement can help at all.
pub(crate) const MAX_REFINEMENT_STEPS: usize = 6;

/// The power of two nearest to a positive finite `v`; `None` for anything else (the
/// general solver then scales by 1, the streaming path gives way to it).
pub(crate) fn power_of_two_near(v: f64) -> Option<f64> {
    if !(v.is_finite() && v > 0.0) {
        return None;
    }
    let d = 2f64.powi(v.log2().round().clamp(-1000.0, 1000.0) as i32);
    (d.is_finite() && d > 0.0).then_some(d)
}

/// Error-free sum: a + b = s + e exactly (Knuth's TwoSum).
#[inline]
pub(crate) fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

/// Veltkamp's split of `a` into a high and a low half of 26 bits each.
#[inline]
pub(crate) fn split(a: f64) -> (f64, f64) {
    const SPLIT: f64 = 134_217_729.0; // 2^27 + 1
    let ca = SPLIT * a;
    let hi = ca - (ca - a);
    (hi, a - hi)
}

/// Error-free product: a·b = p + e exactly (Dekker's TwoProduct with Veltkamp splitting;
/// no fused multiply-add, which is a slow library call on baseline x86-64).
#[inline]
fn two_prod(a: f64, b: f64) -> (f64, f64) {
    let (b_hi, b_lo) = split(b);
    two_prod_split(a, b, b_hi, b_lo)
}

/// [`two_prod`] with `b` already split (for many products with one factor).
#[inline]
pub(crate) fn two_prod_split(a: f64, b: f64, b_hi: f64, b_lo: f64) -> (f64, f64) {
    let p = a * b;
    let (a_hi, a_lo) = split(a);
    let e = ((a_hi * b_hi - p) + a_hi * b_lo + a_lo * b_hi) + a_lo * b_lo;
    (p, e)
}

/// `start + Σ xⱼ cⱼ` evaluated as if in twice the working precision, then rounded
/// (Ogita, Rump & Oishi's Dot2).
#[inline]
fn dot2(start: f64, x: &[f64], c: &[f64]) -> f64 {
    let mut p = start;
    let mut s = 0.0;
    for (a, b) in x.iter().zip(c) {
        let (h, r) = two_prod(*a, *b);
        let (q, t) = two_sum(p, h);
        p = q;
        s += t + r;
    }
    p + s
}

/// Relative error bound above which the solution is refined (see [`qr_error_bound`]).
pub(crate) const REFINE_ABOVE: f64 = 1e-13;

/// Whether a solution with first-order error bound `bound` is refined: above
/// [`REFINE_ABOVE`], or when the bound is not a number.
pub(crate) fn refinement_needed(bound: f64) -> bool {
    bound.is_nan() || bound > REFINE_ABOVE
}

/// The first-order relative error bound `c·ε·κ·(1 + κ‖r‖/(‖R‖_F‖x‖))` with c = 10·p, from
/// κ = ‖R‖_F‖R⁻¹‖_F, ‖R‖_F, ‖x‖ and the residual norm ‖r‖ (NaN passes through).
pub(crate) fn first_order_bound(kappa: f64, r_f: f64, x_norm: f64, r_norm: f64, p: usize) -> f64 {
    let rel_resid = if x_norm > 0.0 {
        r_norm / (r_f * x_norm)
    } else {
        f64::INFINITY
    };
    10.0 * p as f64 * f64::EPSILON * kappa * (1.0 + kappa * rel_resid)
}

/// First-order bound on the relative error of the Householder-QR least-squares solution:
/// `c·ε·κ·(1 + κ‖r‖/(‖R‖‖x‖))`, with κ = ‖R‖_F‖R⁻¹‖_F and c = 10·p for the constants the
/// bound hides. Infinite when R is singular.
fn qr_error_bound(r: &DMatrix<f64>, x_norm: f64, r_norm: f64, p: usize) -> f64 {
    let r_f = r.norm();
    let inv_f = match r.clone().try_inverse() {
        Some(inv) => inv.norm(),
        None => return f64::INFINITY,
    };
    let kappa = r_f * inv_f;
    let bound = first_order_bound(kappa, r_f, x_norm, r_norm, p);
    if bound.is_nan() {
        f64::INFINITY
    } else {
        bound
    }
}

/// The √w-scaled, column-equilibrated design X̃ = W^{1/2} X D⁻¹, read on the fly from the
/// caller's design so no second n×p copy is kept. With D a power of two the entries are
/// the same bits every time they are formed.
/// Where the rows of the design come from.
#[derive(Clone, Copy)]
enum Rows<'a> {
    /// An n×p matrix, column-major.
    Matrix(&'a [f64]),
    /// A model's row at each temperature, formed again whenever it is needed, so that no
    /// n×p design is kept beside the factorised copy (at most [`MAX_FORMED_COLUMNS`]
    /// columns).
    Model {
        t_k: &'a [f64],
        model: crate::model::Model,
        theta: f64,
    },
}

/// Most columns of a design whose rows are formed when needed ([`Rows::Model`]).
const MAX_FORMED_COLUMNS: usize = 8;

struct Scaled<'a> {
    rows: Rows<'a>,
    n: usize,
    p: usize,
    sqrt_w: &'a [f64],
    inv_scale: &'a [f64],
}

impl Scaled<'_> {
    /// Row i of the design as given (unweighted, unscaled), into `row[..p]`.
    #[inline]
    fn raw_row_into(&self, i: usize, row: &mut [f64]) {
        match self.rows {
            Rows::Matrix(design) => {
                for (j, v) in row.iter_mut().enumerate().take(self.p) {
                    *v = design[j * self.n + i];
                }
            }
            Rows::Model { t_k, model, theta } => model.row_into(t_k[i], theta, &mut row[..self.p]),
        }
    }

    /// Row i of the weighted, column-equilibrated design.
    #[inline]
    fn row_into(&self, i: usize, row: &mut [f64]) {
        let mut raw = [0.0; MAX_FORMED_COLUMNS];
        match self.rows {
            Rows::Matrix(design) => {
                for (j, v) in row.iter_mut().enumerate().take(self.p) {
                    *v = design[j * self.n + i] * self.sqrt_w[i] * self.inv_scale[j];
                }
            }
            Rows::Model { .. } => {
                self.raw_row_into(i, &mut raw);
                for (j, v) in row.iter_mut().enumerate().take(self.p) {
                    *v = raw[j] * self.sqrt_w[i] * self.inv_scale[j];
                }
            }
        }
    }
}

/// Solves `min ‖b − A x‖` from the QR factors of A and refines the solution by Björck's
/// iterative refinement of the augmented system
/// ```text
/// [ I  A ] [r]   [b]
/// [ Aᵀ 0 ] [x] = [0]
/// ```
/// with the residuals f = b − r − Ax and g = −Aᵀr computed in twice the working precision.
/// Unlike refinement of x alone, this also converges for large-residual problems (NIST's
/// Wampler4 and Wampler5), where the error of plain QR grows with κ(A)².
///
/// Returns the solution and the refined residual vector r = b − Ax.
fn refined_solution(
    qr: &nalgebra::linalg::QR<f64, nalgebra::Dyn, nalgebra::Dyn>,
    r: &DMatrix<f64>,
    a: &Scaled<'_>,
    b: &[f64],
) -> Option<(DVector<f64>, Vec<f64>)> {
    let (n, p) = (a.n, a.p);
    let mut work = DVector::from_column_slice(b);
    qr.q_tr_mul(&mut work);
    let mut x = r.solve_upper_triangular(&work.rows(0, p).into_owned())?;
    if x.iter().any(|v| !v.is_finite()) {
        return None;
    }
    let mut row = vec![0.0; p];
    let mut neg_x: Vec<f64> = x.iter().map(|v| -v).collect();
    // r₀ = b − A x₀ in working precision: the first correction's f, computed in twice the
    // working precision, absorbs its rounding.
    let mut res: Vec<f64> = (0..n)
        .map(|i| {
            a.row_into(i, &mut row);
            b[i] + row.iter().zip(&neg_x).map(|(r, c)| r * c).sum::<f64>()
        })
        .collect();
    // Refine only when the first-order error bound of Householder QR,
    // ε·κ·(1 + κ‖r‖/(‖R‖‖x‖)) (Golub & Van Loan, §5.3), says fewer than about 13 digits
    // are right: well-conditioned fits (most van 't Hoff data) skip the extra passes.
    let r_norm = res.iter().map(|v| v * v).sum::<f64>().sqrt();
    let bound = qr_error_bound(r, x.norm(), r_norm, p);
    if !refinement_needed(bound) {
        return Some((x, res));
    }
    let mut f = vec![0.0; n];
    let mut previous = x.amax();
    for _ in 0..MAX_REFINEMENT_STEPS {
        // f = b − r − A x and g = −Aᵀ r, both in twice the working precision.
        let mut g_hi = vec![0.0; p];
        let mut g_lo = vec![0.0; p];
        for i in 0..n {
            a.row_into(i, &mut row);
            let (b_minus_r, e0) = two_sum(b[i], -res[i]);
            f[i] = dot2(b_minus_r, &row, &neg_x) + e0;
            for j in 0..p {
                let (h, e1) = two_prod(-row[j], res[i]);
                let (q, e2) = two_sum(g_hi[j], h);
                g_hi[j] = q;
                g_lo[j] += e1 + e2;
            }
        }
        let g = DVector::from_iterator(p, g_hi.iter().zip(&g_lo).map(|(h, l)| h + l));
        // Correction: Rᵀ d₁ = g, R δx = (Qᵀf)₁ − d₁, δr = f − A δx.
        let d1 = r.tr_solve_upper_triangular(&g)?;
        work.copy_from_slice(&f);
        qr.q_tr_mul(&mut work);
        let dx = r.solve_upper_triangular(&(work.rows(0, p) - &d1))?;
        let size = dx.amax();
        if !size.is_finite() || size >= previous {
            break;
        }
        x += &dx;
        for (j, v) in neg_x.iter_mut().enumerate() {
            *v = -x[j];
        }
        for (i, ri) in res.iter_mut().enumerate() {
            a.row_into(i, &mut row);
            let adx: f64 = row.iter().zip(dx.iter()).map(|(r, d)| r * d).sum();
            *ri += f[i] - adx;
        }
        // Stop when the next correction, at the observed rate of convergence, would be
        // below rounding level.
        let rate = size / previous;
        previous = size;
        if size * rate <= f64::EPSILON * x.amax() {
            break;
        }
    }
    Some((x, res))
}

/// Solves a weighted linear least-squares problem.
///
/// # Formula
/// ```text
/// β̂ = argmin Σᵢ wᵢ (yᵢ − Σⱼ Xᵢⱼ βⱼ)²,   (XᵀWX)⁻¹ = D⁻¹ R⁻¹ R⁻ᵀ D⁻¹,   hᵢ = ‖R⁻ᵀ x̃ᵢ‖²
/// ```
/// where W = diag(w), D = diag of the column norms of W^{1/2}X (rounded to powers of two),
/// and `W^{1/2} X D⁻¹ = QR`. Unit weights are used when `weights` is `None`.
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
    solve_impl(design, y, weights, true)
}

/// The weighted residual sum of squares of the least-squares solution only: the same
/// factorisation and refinement as [`solve`], without covariance, leverages or per-point
/// vectors (for model comparisons on large data).
///
/// # Errors
/// As [`solve`].
pub fn weighted_rss(
    design: &DMatrix<f64>,
    y: &[f64],
    weights: Option<&[f64]>,
) -> Result<f64, Error> {
    solve_impl(design, y, weights, false).map(|f| f.rss)
}

fn solve_impl(
    design: &DMatrix<f64>,
    y: &[f64],
    weights: Option<&[f64]>,
    full: bool,
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

    // Weighted, column-equilibrated design X̃ = W^{1/2} X D⁻¹. D holds powers of two
    // (the nearest to each column's norm), so the scaling itself rounds nothing.
    let rows = Rows::Matrix(design.as_slice());
    let scale = column_scale(&rows, n, p, &sqrt_w)?;
    let ys: Vec<f64> = y.iter().zip(&sqrt_w).map(|(v, s)| v * s).collect();
    factorised(
        rows,
        n,
        p,
        ys,
        &sqrt_w,
        &scale,
        full.then_some((design.as_slice(), y)),
    )
}

/// The solution from the weighted, column-equilibrated design (rows from `rows`, weights
/// √w `sqrt_w`, column scale `scale`) and the weighted observations `ys`: QR, refinement
/// and χ²; with `full` (the design as a column-major slice and the observations) also the
/// covariance, fitted values, residuals and leverages.
fn factorised(
    rows: Rows<'_>,
    n: usize,
    p: usize,
    ys: Vec<f64>,
    sqrt_w: &[f64],
    scale: &[f64],
    full: Option<(&[f64], &[f64])>,
) -> Result<LinearFit, Error> {
    let inv_scale: Vec<f64> = scale.iter().map(|d| 1.0 / d).collect();
    let xs = Scaled {
        rows,
        n,
        p,
        sqrt_w,
        inv_scale: &inv_scale,
    };
    let mut a = DMatrix::zeros(n, p);
    let mut row = vec![0.0; p];
    for i in 0..n {
        xs.row_into(i, &mut row);
        for (j, v) in row.iter().enumerate() {
            a[(i, j)] = *v;
        }
    }
    if a.iter().any(|v| !v.is_finite()) {
        return Err(Error::NonFinite {
            what: "design matrix entry",
            index: None,
        });
    }

    let qr = a.qr();
    let r = qr.r();
    let max_diag = (0..p).map(|j| r[(j, j)].abs()).fold(0.0, f64::max);
    let tolerance = rank_tolerance(n);
    for j in 0..p {
        let d = r[(j, j)].abs();
        if d.is_nan() || d <= tolerance * max_diag {
            return Err(Error::RankDeficient { column: j });
        }
    }
    let r = r.view((0, 0), (p, p)).into_owned();
    let (beta_s, res) =
        refined_solution(&qr, &r, &xs, &ys).ok_or(Error::RankDeficient { column: p - 1 })?;
    drop(qr);
    let coefficients: Vec<f64> = (0..p).map(|j| beta_s[j] / scale[j]).collect();
    let rss_scaled: f64 = res.iter().map(|v| v * v).sum();
    drop(res);
    if !rss_scaled.is_finite() || coefficients.iter().any(|c| !c.is_finite()) {
        return Err(Error::NonFinite {
            what: "fit result",
            index: None,
        });
    }
    let Some((raw, y)) = full else {
        return Ok(LinearFit {
            coefficients,
            unscaled_covariance: DMatrix::zeros(p, p),
            fitted: Vec::new(),
            residuals: Vec::new(),
            leverages: Vec::new(),
            rss: rss_scaled,
            n,
            p,
        });
    };

    // R⁻¹ (upper triangular) for the covariance and the leverages.
    let r_inv = r
        .clone()
        .try_inverse()
        .ok_or(Error::RankDeficient { column: p - 1 })?;
    let cov_s = &r_inv * r_inv.transpose();
    let mut unscaled_covariance = DMatrix::zeros(p, p);
    for a in 0..p {
        for b in 0..p {
            unscaled_covariance[(a, b)] = cov_s[(a, b)] * inv_scale[a] * inv_scale[b];
        }
    }

    let mut fitted = Vec::with_capacity(n);
    let mut residuals = Vec::with_capacity(n);
    let mut leverages = Vec::with_capacity(n);
    let mut row_s = vec![0.0; p];
    let r_inv_cols: Vec<Vec<f64>> = (0..p)
        .map(|k| (0..=k).map(|j| r_inv[(j, k)]).collect())
        .collect();
    for (i, &yi) in y.iter().enumerate() {
        let f: f64 = (0..p).map(|j| raw[j * n + i] * coefficients[j]).sum();
        fitted.push(f);
        residuals.push(yi - f);
        // hᵢ = ‖R⁻ᵀ x̃ᵢ‖², with R⁻¹ upper triangular: (R⁻ᵀx̃)_k = Σ_{j ≤ k} R⁻¹[j,k] x̃ᵢⱼ.
        xs.row_into(i, &mut row_s);
        let mut h = 0.0;
        for col in &r_inv_cols {
            let s: f64 = col.iter().zip(&row_s).map(|(c, x)| c * x).sum();
            h += s * s;
        }
        leverages.push(h.min(1.0));
    }
    Ok(LinearFit {
        coefficients,
        unscaled_covariance,
        fitted,
        residuals,
        leverages,
        rss: rss_scaled,
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
