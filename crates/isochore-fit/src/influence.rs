//! Curves for the influence view: the loci of constant Cook's distance in the plane of
//! leverage h against internally studentized residual r.
//!
//! # Formula
//! ```text
//! Dᵢ = rᵢ² hᵢ / (p (1 − hᵢ))   ⇒   |r| = √(D p (1 − h) / h)
//! ```
//! (Cook 1977; the same relation the diagnostics use for each point.)

/// Points (h, r) of the upper branch r > 0 of the contour Cook's D = `d` for a model with
/// `p` parameters, at `n` leverages evenly spaced in [`h_min`, `h_max`] (clamped to the
/// open interval (0, 1)). The lower branch is the mirror image r → −r. Returns an empty
/// vector for non-positive or non-finite `d`, `p = 0` or `n < 2`.
pub fn cooks_contour(d: f64, p: usize, h_min: f64, h_max: f64, n: usize) -> Vec<[f64; 2]> {
    if !(d.is_finite() && d > 0.0) || p == 0 || n < 2 {
        return Vec::new();
    }
    let lo = h_min.clamp(1e-6, 1.0 - 1e-6);
    let hi = h_max.clamp(1e-6, 1.0 - 1e-6);
    if !(hi - lo).is_finite() || hi <= lo {
        return Vec::new();
    }
    (0..n)
        .map(|i| {
            let h = lo + (hi - lo) * i as f64 / (n - 1) as f64;
            [h, (d * p as f64 * (1.0 - h) / h).sqrt()]
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn contour_points_have_the_requested_cooks_distance() {
        // Inverting the contour must give back D (definition of Cook's distance, Cook 1977).
        let p = 2;
        for [h, r] in cooks_contour(0.5, p, 0.05, 0.95, 19) {
            let d = r * r * h / (p as f64 * (1.0 - h));
            assert!((d - 0.5).abs() < 1e-12, "h={h} r={r} d={d}");
        }
    }

    #[test]
    fn nonsense_requests_give_no_curve() {
        assert!(cooks_contour(-1.0, 2, 0.1, 0.9, 10).is_empty());
        assert!(cooks_contour(1.0, 0, 0.1, 0.9, 10).is_empty());
        assert!(cooks_contour(1.0, 2, 0.9, 0.1, 10).is_empty());
        assert!(cooks_contour(f64::NAN, 2, 0.1, 0.9, 10).is_empty());
    }
}
