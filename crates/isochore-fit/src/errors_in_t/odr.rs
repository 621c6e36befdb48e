//! Orthogonal-distance (effective-variance) least squares for any model: minimises the full
//! objective over the parameters β and the true temperatures Tᵢ*,
//!
//! ```text
//! S(β, T*) = Σ [ (yᵢ − x(Tᵢ*)·β)²/σyᵢ² + (Tᵢ − Tᵢ*)²/σTᵢ² ],   y = ln K
//! ```
//!
//! by Gauss–Newton on all n + p unknowns with a halving line search on S. The Jacobian of
//! the 2n residuals has a block structure — each δᵢ = Tᵢ* − Tᵢ enters only its own two
//! residuals — so each step eliminates the δᵢ one point at a time (the Schur complement):
//! with gᵢ = d ln K/dT at Tᵢ* = ΔH°(Tᵢ*)/(R Tᵢ*²) (the van 't Hoff relation, from the
//! model's ΔH° row) and eᵢ = yᵢ − x(Tᵢ*)·β, the step Δβ is the weighted least-squares
//! solution of
//!
//! ```text
//! zᵢ = eᵢ + gᵢδᵢ  on  x(Tᵢ*)  with weights 1/(σyᵢ² + gᵢ²σTᵢ²)
//! ```
//!
//! (solved by [`crate::least_squares::solve`], Householder QR, never the normal equations),
//! and the new δᵢ = gᵢσTᵢ²·(zᵢ − x(Tᵢ*)·Δβ)/(σyᵢ² + gᵢ²σTᵢ²). Unlike fixed weights iterated
//! to convergence, every quantity is re-evaluated at the current Tᵢ*, and the step is that
//! of the full problem, so the iteration stops at a stationary point of S itself.
//!
//! The unscaled covariance of β is the β block of (JᵀJ)⁻¹ of the full Jacobian at the
//! solution, which by the same elimination is (Σ x(Tᵢ*)x(Tᵢ*)ᵀ/(σyᵢ² + gᵢ²σTᵢ²))⁻¹ — the
//! convention of ODRPACK (Boggs & Rogers 1990), whose `cov_beta` it matches.

use crate::error::Error;
use crate::least_squares::solve;
use crate::model::Model;
use crate::GAS_CONSTANT;
use nalgebra::DMatrix;

/// The solution of the full problem.
#[derive(Debug, Clone)]
pub(crate) struct OdrSolution {
    /// The parameters in the model's order.
    pub(crate) beta: Vec<f64>,
    /// The adjusted (estimated true) temperatures Tᵢ*, K.
    pub(crate) t_star: Vec<f64>,
    /// The minimised S.
    pub(crate) chi2: f64,
    /// The β block of (JᵀJ)⁻¹ (unscaled covariance).
    pub(crate) unscaled_covariance: DMatrix<f64>,
    /// Gauss–Newton steps taken.
    pub(crate) iterations: usize,
}

/// Most Gauss–Newton steps.
const MAX_STEPS: usize = 200;
/// Most halvings of one step.
const MAX_HALVINGS: usize = 60;

/// The model's ln K and d ln K/dT at `t` for parameters `beta`.
pub(crate) fn value_and_slope(model: Model, theta: f64, beta: &[f64], t: f64) -> (f64, f64) {
    let p = beta.len();
    if p > STACK {
        let x = model.row(t, theta);
        let h = model.delta_h_row(t, theta);
        return (dot(&x, beta), dot(&h, beta) / (GAS_CONSTANT * t * t));
    }
    // The rows on the stack: no allocation in the inner loops (Monte Carlo refits this
    // fit thousands of times); the same sums in the same order as with vectors.
    let (mut x, mut h) = ([0.0; STACK], [0.0; STACK]);
    model.row_into(t, theta, &mut x[..p]);
    model.delta_h_row_into(t, theta, &mut h[..p]);
    (
        dot(&x[..p], beta),
        dot(&h[..p], beta) / (GAS_CONSTANT * t * t),
    )
}

/// The model's ln K at `t` (the first of [`value_and_slope`], without the slope).
fn value(model: Model, theta: f64, beta: &[f64], t: f64) -> f64 {
    let p = beta.len();
    if p > STACK {
        return dot(&model.row(t, theta), beta);
    }
    let mut x = [0.0; STACK];
    model.row_into(t, theta, &mut x[..p]);
    dot(&x[..p], beta)
}

/// Parameters up to which the rows are kept on the stack.
const STACK: usize = 16;

fn dot(v: &[f64], beta: &[f64]) -> f64 {
    v.iter().zip(beta).map(|(a, b)| a * b).sum::<f64>()
}

/// The data of one problem: the model, θ, and per used point T, ln K, σ(ln K), σ(T).
pub(crate) struct Problem<'a> {
    pub(crate) model: Model,
    pub(crate) theta: f64,
    pub(crate) t: &'a [f64],
    pub(crate) y: &'a [f64],
    pub(crate) sy: &'a [f64],
    pub(crate) st: &'a [f64],
}

impl Problem<'_> {
    /// S at (β, δ).
    fn objective(&self, beta: &[f64], delta: &[f64]) -> f64 {
        (0..self.t.len())
            .map(|i| {
                let f = value(self.model, self.theta, beta, self.t[i] + delta[i]);
                let ey = (self.y[i] - f) / self.sy[i];
                let et = delta[i] / self.st[i];
                ey * ey + et * et
            })
            .sum()
    }

    /// The reduced weighted least-squares problem at (β, δ): design rows x(Tᵢ*),
    /// right-hand side zᵢ, weights 1/(σyᵢ² + gᵢ²σTᵢ²), and the gᵢ.
    fn reduced(&self, beta: &[f64], delta: &[f64]) -> (DMatrix<f64>, Vec<f64>, Vec<f64>, Vec<f64>) {
        let n = self.t.len();
        let p = beta.len();
        let mut design = DMatrix::zeros(n, p);
        let mut z = Vec::with_capacity(n);
        let mut w = Vec::with_capacity(n);
        let mut g = Vec::with_capacity(n);
        // One row buffer for every point.
        let mut x = vec![0.0; p];
        for i in 0..n {
            let ts = self.t[i] + delta[i];
            self.model.row_into(ts, self.theta, &mut x);
            let (f, gi) = value_and_slope(self.model, self.theta, beta, ts);
            for (j, v) in x.iter().enumerate() {
                design[(i, j)] = *v;
            }
            // z = e + gδ: the step's right-hand side.
            z.push(self.y[i] - f + gi * delta[i]);
            w.push(1.0 / (self.sy[i] * self.sy[i] + gi * gi * self.st[i] * self.st[i]));
            g.push(gi);
        }
        (design, z, w, g)
    }
}

/// Minimises S from the start `beta0` (the K-only fit) with every δᵢ = 0.
///
/// # Errors
/// The solver's errors (rank deficiency of the design at Tᵢ*), or [`Error::NoSolution`]
/// when the temperatures run off (an adjusted temperature at or below 0 K or not finite)
/// or the iteration does not settle.
pub(crate) fn solve_full(pb: &Problem<'_>, beta0: &[f64]) -> Result<OdrSolution, Error> {
    let (beta, delta, s, iterations) = minimise(pb, beta0)?;
    let (t, n) = (pb.t, pb.t.len());
    let (design, _, w, _) = pb.reduced(&beta, &delta);
    let zero = vec![0.0; n];
    let last = solve(&design, &zero, Some(&w))?;
    let t_star: Vec<f64> = (0..n).map(|i| t[i] + delta[i]).collect();
    if beta.iter().chain(&t_star).any(|v| !v.is_finite()) {
        return Err(Error::NoSolution(
            "the fit with errors in T gave numbers that are not finite".into(),
        ));
    }
    Ok(OdrSolution {
        beta,
        t_star,
        chi2: s,
        unscaled_covariance: last.unscaled_covariance,
        iterations,
    })
}

/// The coefficients alone of [`solve_full`]'s minimum (the same iteration, without the
/// covariance): for the refits of Monte Carlo draws.
///
/// # Errors
/// As [`solve_full`].
pub(crate) fn solve_coefficients(pb: &Problem<'_>, beta0: &[f64]) -> Result<Vec<f64>, Error> {
    minimise(pb, beta0).map(|(beta, ..)| beta)
}

/// The Gauss–Newton iteration of [`solve_full`]: β, δ, S and the steps taken.
fn minimise(pb: &Problem<'_>, beta0: &[f64]) -> Result<(Vec<f64>, Vec<f64>, f64, usize), Error> {
    let (t, st) = (pb.t, pb.st);
    let n = t.len();
    let p = beta0.len();
    let mut beta = beta0.to_vec();
    let mut delta = vec![0.0; n];
    let mut s = pb.objective(&beta, &delta);
    let mut iterations = 0;
    let mut settled = false;
    while iterations < MAX_STEPS {
        iterations += 1;
        let (design, z, w, g) = pb.reduced(&beta, &delta);
        let step = solve(&design, &z, Some(&w))?;
        // The linearised model's minimum: S − rss is the decrease Gauss–Newton predicts.
        let predicted = s - step.rss;
        let d_beta = step.coefficients.clone();
        let d_delta: Vec<f64> = (0..n)
            .map(|i| {
                let q = z[i] - step.fitted[i];
                g[i] * st[i] * st[i] * q * w[i] - delta[i]
            })
            .collect();
        if predicted.is_nan() || predicted <= 1e-15 * s.max(f64::MIN_POSITIVE) {
            settled = true;
            break;
        }
        let mut alpha = 1.0;
        let mut accepted = false;
        for _ in 0..MAX_HALVINGS {
            let nb: Vec<f64> = (0..p).map(|j| beta[j] + alpha * d_beta[j]).collect();
            let nd: Vec<f64> = (0..n).map(|i| delta[i] + alpha * d_delta[i]).collect();
            if nd
                .iter()
                .zip(t)
                .any(|(d, t)| t + d <= 0.0 || !d.is_finite())
            {
                alpha *= 0.5;
                continue;
            }
            let ns = pb.objective(&nb, &nd);
            if ns.is_finite() && ns <= s {
                let gain = s - ns;
                beta = nb;
                delta = nd;
                s = ns;
                accepted = true;
                // A step that gains no more than rounding: done. (A shortened step counts
                // too: near the minimum rounding can make the full step's S a hair larger,
                // and a halved step that gains nothing would otherwise repeat to
                // MAX_STEPS — about one Monte Carlo draw in seven did so.)
                if gain <= 1e-15 * s.max(f64::MIN_POSITIVE) {
                    settled = true;
                }
                break;
            }
            alpha *= 0.5;
        }
        if !accepted {
            // No step along the Gauss–Newton direction lowers S: a minimum to rounding.
            settled = true;
            break;
        }
        if settled {
            break;
        }
    }
    if !settled {
        return Err(Error::NoSolution(format!(
            "the fit with errors in T did not settle within {MAX_STEPS} steps; the temperature uncertainties may be too large for the data to fix the true temperatures"
        )));
    }
    Ok((beta, delta, s, iterations))
}

/// The adjusted temperature of one point for fixed β (an excluded point's, for its
/// residuals): Gauss–Newton on the point's own two residuals.
pub(crate) fn adjust_one(
    model: Model,
    theta: f64,
    beta: &[f64],
    t: f64,
    y: f64,
    sy: f64,
    st: f64,
) -> f64 {
    let mut d = 0.0f64;
    let cost = |d: f64| {
        let (f, _) = value_and_slope(model, theta, beta, t + d);
        ((y - f) / sy).powi(2) + (d / st).powi(2)
    };
    let mut c = cost(d);
    for _ in 0..100 {
        let (f, g) = value_and_slope(model, theta, beta, t + d);
        let z = y - f + g * d;
        let target = g * st * st * z / (sy * sy + g * g * st * st);
        let mut alpha = 1.0;
        let mut moved = false;
        for _ in 0..40 {
            let nd = d + alpha * (target - d);
            let nc = cost(nd);
            if t + nd > 0.0 && nc.is_finite() && nc <= c {
                moved = (nd - d).abs() > 1e-15 * t;
                d = nd;
                c = nc;
                break;
            }
            alpha *= 0.5;
        }
        if !moved {
            break;
        }
    }
    t + d
}
