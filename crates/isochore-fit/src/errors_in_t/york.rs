//! York's straight line with errors in both coordinates (York, Can. J. Phys. 44, 1079,
//! 1966; York, Evensen, Martínez López & De Basabe Delgado, Am. J. Phys. 72, 367, 2004,
//! Section III), uncorrelated errors (r = 0), with the exact standard errors of the 2004
//! paper (its eq. 13, computed from the least-squares adjusted points).
//!
//! ```text
//! ωXᵢ = 1/σXᵢ², ωYᵢ = 1/σYᵢ²,  Wᵢ = ωXᵢωYᵢ/(ωXᵢ + b²ωYᵢ)
//! X̄ = ΣWX/ΣW, Ȳ = ΣWY/ΣW, Uᵢ = Xᵢ − X̄, Vᵢ = Yᵢ − Ȳ,  βᵢ = Wᵢ(Uᵢ/ωYᵢ + bVᵢ/ωXᵢ)
//! b ← ΣWβV/ΣWβU until b no longer changes;  a = Ȳ − bX̄
//! xᵢ = X̄ + βᵢ (adjusted),  x̄ = ΣWx/ΣW,  uᵢ = xᵢ − x̄
//! σb² = 1/ΣWu²,  σa² = 1/ΣW + x̄²σb²,  cov(a, b) = −x̄σb²,  S = ΣW(Y − a − bX)²
//! ```
//! These σ are the "known standard uncertainties" ones; the caller scales them by S/(n − 2)
//! when the σ are relative weights only.

use crate::error::Error;

/// The line y = a + b·x and its unscaled covariance.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct YorkLine {
    /// Intercept a.
    pub(crate) a: f64,
    /// Slope b.
    pub(crate) b: f64,
    /// σa² (unscaled).
    pub(crate) var_a: f64,
    /// σb² (unscaled).
    pub(crate) var_b: f64,
    /// cov(a, b) (unscaled).
    pub(crate) cov_ab: f64,
    /// S = ΣWᵢ(Yᵢ − a − bXᵢ)², the minimised sum (χ² with n − 2 degrees of freedom).
    pub(crate) chi2: f64,
    /// The adjusted abscissae xᵢ = X̄ + βᵢ (the least-squares estimates of the true x).
    pub(crate) x_adjusted: Vec<f64>,
    /// Iterations of the slope.
    pub(crate) iterations: usize,
}

/// Most iterations of the slope before giving up.
const MAX_ITERATIONS: usize = 10_000;

/// York's fit of `y` on `x` with standard uncertainties `sx`, `sy` (all > 0, finite; the
/// caller checks), starting from the slope `b0`.
///
/// # Errors
/// [`Error::NoSolution`] when the slope does not settle (a degenerate or hostile set).
pub(crate) fn york(
    x: &[f64],
    y: &[f64],
    sx: &[f64],
    sy: &[f64],
    b0: f64,
) -> Result<YorkLine, Error> {
    let n = x.len();
    let wx: Vec<f64> = sx.iter().map(|s| 1.0 / (s * s)).collect();
    let wy: Vec<f64> = sy.iter().map(|s| 1.0 / (s * s)).collect();
    let mut b = b0;
    let mut iterations = 0;
    let mut converged = false;
    // The fixed-point iteration of York et al. (2004), steps 3–6. Near the solution it
    // converges linearly; stopping when b repeats (or changes by a few ulps) gives the
    // slope to full precision.
    let mut last_change = f64::INFINITY;
    while iterations < MAX_ITERATIONS {
        iterations += 1;
        let s = sums(x, y, &wx, &wy, b);
        let next = s.num / s.den;
        if !next.is_finite() {
            break;
        }
        let change = (next - b).abs();
        b = next;
        if change <= 4.0 * f64::EPSILON * b.abs().max(f64::MIN_POSITIVE)
            || (change >= last_change && change <= 1e-13 * b.abs())
        {
            converged = true;
            break;
        }
        last_change = change;
    }
    if !converged {
        return Err(Error::NoSolution(format!(
            "York's fit did not settle on a slope within {MAX_ITERATIONS} iterations; the points may not determine a line"
        )));
    }
    let s = sums(x, y, &wx, &wy, b);
    let a = s.y_bar - b * s.x_bar;
    let x_adjusted: Vec<f64> = s.beta.iter().map(|bi| s.x_bar + bi).collect();
    let x_mean = s.w.iter().zip(&x_adjusted).map(|(w, x)| w * x).sum::<f64>() / s.sw;
    let swu2: f64 =
        s.w.iter()
            .zip(&x_adjusted)
            .map(|(w, x)| w * (x - x_mean) * (x - x_mean))
            .sum();
    let var_b = 1.0 / swu2;
    let var_a = 1.0 / s.sw + x_mean * x_mean * var_b;
    let chi2: f64 = (0..n)
        .map(|i| {
            let e = y[i] - a - b * x[i];
            s.w[i] * e * e
        })
        .sum();
    let out = YorkLine {
        a,
        b,
        var_a,
        var_b,
        cov_ab: -x_mean * var_b,
        chi2,
        x_adjusted,
        iterations,
    };
    if [out.a, out.b, out.var_a, out.var_b, out.cov_ab, out.chi2]
        .iter()
        .all(|v| v.is_finite())
    {
        Ok(out)
    } else {
        Err(Error::NoSolution(
            "York's fit gave numbers that are not finite; check the temperatures and their uncertainties".into(),
        ))
    }
}

struct Sums {
    w: Vec<f64>,
    sw: f64,
    x_bar: f64,
    y_bar: f64,
    beta: Vec<f64>,
    num: f64,
    den: f64,
}

/// The weights, weighted means, βᵢ and the two sums of the slope update at slope `b`.
fn sums(x: &[f64], y: &[f64], wx: &[f64], wy: &[f64], b: f64) -> Sums {
    let n = x.len();
    let w: Vec<f64> = (0..n)
        .map(|i| wx[i] * wy[i] / (wx[i] + b * b * wy[i]))
        .collect();
    let sw: f64 = w.iter().sum();
    let x_bar = w.iter().zip(x).map(|(w, x)| w * x).sum::<f64>() / sw;
    let y_bar = w.iter().zip(y).map(|(w, y)| w * y).sum::<f64>() / sw;
    let mut beta = Vec::with_capacity(n);
    let (mut num, mut den) = (0.0, 0.0);
    for i in 0..n {
        let u = x[i] - x_bar;
        let v = y[i] - y_bar;
        let bi = w[i] * (u / wy[i] + b * v / wx[i]);
        num += w[i] * bi * v;
        den += w[i] * bi * u;
        beta.push(bi);
    }
    Sums {
        w,
        sw,
        x_bar,
        y_bar,
        beta,
        num,
        den,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Pearson's data with York's weights; values of the R package bfsl 0.2.0's README (an
    /// implementation of York et al. 2004): a = 5.47991 ± 0.29497, b = −0.48053 ± 0.05799,
    /// S = 11.87 on 8 degrees of freedom. Full-precision values are checked in
    /// tests/errors_in_t.rs against an independent script.
    #[test]
    fn pearson_york() {
        let x = [0.0, 0.9, 1.8, 2.6, 3.3, 4.4, 5.2, 6.1, 6.5, 7.4];
        let y = [5.9, 5.4, 4.4, 4.6, 3.5, 3.7, 2.8, 2.8, 2.4, 1.5];
        let wx = [
            1000.0, 1000.0, 500.0, 800.0, 200.0, 80.0, 60.0, 20.0, 1.8, 1.0,
        ];
        let wy = [1.0, 1.8, 4.0, 8.0, 20.0, 20.0, 70.0, 70.0, 100.0, 500.0];
        let sx: Vec<f64> = wx.iter().map(|w: &f64| 1.0 / w.sqrt()).collect();
        let sy: Vec<f64> = wy.iter().map(|w: &f64| 1.0 / w.sqrt()).collect();
        let l = york(&x, &y, &sx, &sy, -0.5).unwrap();
        assert!((l.a - 5.47991).abs() < 5e-6, "{}", l.a);
        assert!((l.b - -0.48053).abs() < 5e-6, "{}", l.b);
        assert!((l.var_a.sqrt() - 0.29497).abs() < 5e-6);
        assert!((l.var_b.sqrt() - 0.05799).abs() < 5e-6);
        assert!((l.chi2 - 11.87).abs() < 5e-3);
    }
}
