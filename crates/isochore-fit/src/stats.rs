//! Quantiles and tail probabilities of the reference distributions, from statrs.
//!
//! Wrapped so the rest of the crate never sees a statrs constructor error: impossible
//! parameters give `NaN` quantiles or `None` tails, which callers turn into warnings.

use statrs::distribution::{ChiSquared, ContinuousCDF, FisherSnedecor, Normal, StudentsT};

/// Quantile of Student's t with `dof` degrees of freedom at probability `p`.
///
/// statrs' closed form through the inverse incomplete beta function is kept when its tail
/// probability checks out to 1e-10 relative; otherwise (far tails, where it is inaccurate)
/// the quantile is found by bisection on statrs' survival function.
pub fn t_quantile(p: f64, dof: f64) -> f64 {
    let d = match StudentsT::new(0.0, 1.0, dof) {
        Ok(d) if p > 0.0 && p < 1.0 => d,
        _ => return f64::NAN,
    };
    // Symmetric about 0: find the upper-tail quantile for the smaller tail and mirror.
    let tail = if p >= 0.5 { 1.0 - p } else { p };
    if tail == 0.5 {
        return 0.0;
    }
    let mut q = f64::NAN;
    if tail >= 1e-12 {
        let q0 = d.inverse_cdf(1.0 - tail);
        if q0.is_finite() && q0 > 0.0 && (d.sf(q0) - tail).abs() <= 1e-10 * tail {
            q = q0;
        }
    }
    if q.is_nan() {
        q = positive_root(|x| tail - d.sf(x));
    }
    if p >= 0.5 {
        q
    } else {
        -q
    }
}

/// Quantile of the standard normal distribution at probability `p`.
pub fn normal_quantile(p: f64) -> f64 {
    match Normal::new(0.0, 1.0) {
        Ok(d) if p > 0.0 && p < 1.0 => d.inverse_cdf(p),
        _ => f64::NAN,
    }
}

/// Quantile of F(d1, d2) at probability `p`.
///
/// F(2, d2), the case of the (ΔH°, ΔS°) ellipse, has the closed form
/// `x = (d2/2)·((1 − p)^(−2/d2) − 1)`; other cases are found by bisection on statrs' CDF
/// (statrs' own inverse panics for some probabilities near 0 or 1).
pub fn f_quantile(p: f64, d1: f64, d2: f64) -> f64 {
    let d = match FisherSnedecor::new(d1, d2) {
        Ok(d) if p > 0.0 && p < 1.0 => d,
        _ => return f64::NAN,
    };
    if d1 == 2.0 {
        return 0.5 * d2 * (-(2.0 / d2) * (-p).ln_1p()).exp_m1();
    }
    // The smaller tail keeps its relative precision: the CDF near 1 does not.
    if p > 0.5 {
        positive_root(|x| (1.0 - p) - d.sf(x))
    } else {
        positive_root(|x| d.cdf(x) - p)
    }
}

/// Quantile of χ²(k) at probability `p`: `−2 ln(1 − p)` for k = 2, otherwise by bisection
/// on statrs' CDF.
pub fn chi2_quantile(p: f64, k: f64) -> f64 {
    let d = match ChiSquared::new(k) {
        Ok(d) if p > 0.0 && p < 1.0 => d,
        _ => return f64::NAN,
    };
    if k == 2.0 {
        return -2.0 * (-p).ln_1p();
    }
    // The smaller tail keeps its relative precision: the CDF near 1 does not.
    if p > 0.5 {
        positive_root(|x| (1.0 - p) - d.sf(x))
    } else {
        positive_root(|x| d.cdf(x) - p)
    }
}

/// The x > 0 where the increasing function `g` crosses zero, by bisection on ln x over
/// the whole positive range of f64 (so only valid arguments ever reach statrs, and large
/// quantiles keep their relative precision). NaN if `g` misbehaves.
fn positive_root(g: impl Fn(f64) -> f64) -> f64 {
    let (mut lo, mut hi) = (-745.0f64, 709.0f64);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        let v = g(mid.exp());
        if v.is_nan() {
            return f64::NAN;
        }
        if v < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    (0.5 * (lo + hi)).exp()
}

/// Upper tail P(F(d1, d2) ≥ x); `None` for impossible parameters.
pub fn f_upper_tail(x: f64, d1: f64, d2: f64) -> Option<f64> {
    if x.is_infinite() && x > 0.0 {
        return Some(0.0);
    }
    let d = FisherSnedecor::new(d1, d2).ok()?;
    x.is_finite().then(|| d.sf(x.max(0.0)))
}

/// Upper tail P(χ²(k) ≥ x); `None` for impossible parameters.
pub fn chi2_upper_tail(x: f64, k: f64) -> Option<f64> {
    let d = ChiSquared::new(k).ok()?;
    x.is_finite().then(|| d.sf(x.max(0.0)))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn textbook_quantiles() {
        // Student's t table (e.g. any statistics handbook; from memory): t(0.975, 10) = 2.228139,
        // z(0.975) = 1.959964, F(0.95; 2, 10) = 4.102821, χ²(0.95; 2) = 5.991465.
        assert!((t_quantile(0.975, 10.0) - 2.228_139).abs() < 1e-6);
        assert!((normal_quantile(0.975) - 1.959_964).abs() < 1e-6);
        assert!((f_quantile(0.95, 2.0, 10.0) - 4.102_821).abs() < 1e-5);
        assert!((chi2_quantile(0.95, 2.0) - 5.991_465).abs() < 1e-6);
        assert!(t_quantile(0.975, 0.0).is_nan());
        assert!(f_upper_tail(1.0, 1.0, 0.0).is_none());
        // F(0.95; 3, 10) = 3.708265, χ²(0.95; 3) = 7.814728 (statistics tables, from
        // memory): the bisection path.
        assert!((f_quantile(0.95, 3.0, 10.0) - 3.708_265).abs() < 1e-5);
        assert!((chi2_quantile(0.95, 3.0) - 7.814_728).abs() < 1e-5);
    }

    #[test]
    fn quantiles_never_panic_and_invert_the_cdf() {
        // Found by the garbage-in test: statrs' F inverse panicked at extreme probabilities.
        let ps = [
            1e-300,
            1e-15,
            1e-9,
            0.01,
            0.5,
            0.95,
            0.999_999_999,
            1.0 - 1e-15,
        ];
        for &p in &ps {
            for dof in [1.0, 2.0, 3.0, 7.5, 100.0, 1e6] {
                let t = t_quantile(p, dof);
                let f2 = f_quantile(p, 2.0, dof);
                let f3 = f_quantile(p, 3.0, dof);
                let c = chi2_quantile(p, dof);
                for (name, q, cdf) in [
                    ("t", t, StudentsT::new(0.0, 1.0, dof).unwrap().cdf(t)),
                    ("F2", f2, FisherSnedecor::new(2.0, dof).unwrap().cdf(f2)),
                    ("F3", f3, FisherSnedecor::new(3.0, dof).unwrap().cdf(f3)),
                    ("chi2", c, ChiSquared::new(dof).unwrap().cdf(c)),
                ] {
                    assert!(!q.is_nan(), "{name}({p}, {dof})");
                    if q.is_finite() && (1e-12..=1.0 - 1e-9).contains(&p) {
                        assert!(
                            (cdf - p).abs() < 1e-9 * p.max(1e-3),
                            "{name}({p}, {dof}): {q} → {cdf}"
                        );
                    }
                }
            }
        }
    }
}
