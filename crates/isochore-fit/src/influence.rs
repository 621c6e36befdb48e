//! The influence view's coordinates, limits and curves: each point's place in the plane of
//! leverage h against the externally studentized residual t — the residual the outlier
//! rule tests, so a point beyond the ±limit lines is exactly a flagged one
//! ([`influence_coordinates`]); the limits a point is flagged against ([`FlagLimits`]: |t|,
//! leverage factor·p/n, Cook's factor/n); and the loci of constant Cook's distance in that
//! plane ([`cooks_contour_external`]). Front ends draw these rather than recompute them.
//!
//! # Formula
//! ```text
//! Dᵢ = rᵢ² hᵢ / (p (1 − hᵢ))   ⇒   |r| = √(D p (1 − h) / h)      (r internally studentized)
//! t = r √((ν − 1)/(ν − r²)),  ν = n − p                           (t externally studentized)
//! ```
//! (Cook 1977; Belsley, Kuh & Welsch 1980 for the relation of t to r, from memory; the same
//! relations the diagnostics use for each point.)

use crate::model::FlagThresholds;
use crate::vant_hoff::VantHoffFit;

/// The limits a point's diagnostics are flagged against, for a fit of `p` parameters on
/// `n` used points (the same limits the per-point diagnostics apply).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FlagLimits {
    /// |externally studentized residual| above this flags an outlier.
    pub studentized: f64,
    /// Leverage above this (leverage factor × p/n) flags high leverage.
    pub leverage: f64,
    /// Cook's distance above this (Cook's factor / n) flags an influential point.
    pub cooks_d: f64,
}

impl FlagLimits {
    /// The limits of `thresholds` for `p` parameters and `n` used points (n taken as at
    /// least 1).
    pub fn new(thresholds: FlagThresholds, p: usize, n: usize) -> Self {
        let n = n.max(1) as f64;
        FlagLimits {
            studentized: thresholds.outlier_studentized,
            leverage: thresholds.leverage_factor * p as f64 / n,
            cooks_d: thresholds.cooks_factor / n,
        }
    }

    /// The limits a finished fit flagged its points against.
    pub fn of(fit: &VantHoffFit) -> Self {
        FlagLimits::new(fit.options.thresholds, fit.params.len(), fit.n_used)
    }

    /// The Cook's distances an influence plot draws contours of: the flag limit and 1.
    pub fn contour_levels(self) -> [f64; 2] {
        [self.cooks_d, 1.0]
    }
}

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

/// The point's place on the influence plot, (leverage h, externally studentized residual
/// t): the residual the outlier flag tests. `None` for an excluded point or one whose t is
/// undefined.
pub fn influence_coordinates(d: &crate::PointDiagnostics) -> Option<[f64; 2]> {
    let t = d.student_ext?;
    (d.used && t.is_finite() && d.leverage.is_finite()).then_some([d.leverage, t])
}

/// Points (h, t) of the upper branch of the contour Cook's D = `d` in the plane of leverage
/// against the externally studentized residual, for a model with `p` parameters and `dof`
/// = n − p residual degrees of freedom, at `n` leverages evenly spaced in [`h_min`,
/// `h_max`] (see [`cooks_contour`]). Where the contour's internal residual reaches √ν the
/// external one is unbounded, and those leverages are left out. Empty when `dof` < 2.
pub fn cooks_contour_external(
    d: f64,
    p: usize,
    dof: usize,
    h_min: f64,
    h_max: f64,
    n: usize,
) -> Vec<[f64; 2]> {
    if dof < 2 {
        return Vec::new();
    }
    let nu = dof as f64;
    cooks_contour(d, p, h_min, h_max, n)
        .into_iter()
        .filter_map(|[h, r]| {
            let rest = nu - r * r;
            (rest > 0.0).then(|| [h, r * ((nu - 1.0) / rest).sqrt()])
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn external_contours_have_the_requested_cooks_distance() {
        // t → r: r² = ν t²/(ν − 1 + t²) (the inverse of the relation above), then D as in
        // Cook (1977).
        let (p, nu) = (3usize, 7.0);
        let pts = cooks_contour_external(0.5, p, 7, 0.05, 0.95, 19);
        assert!(!pts.is_empty());
        for [h, t] in pts {
            let r2 = nu * t * t / (nu - 1.0 + t * t);
            let d = r2 * h / (p as f64 * (1.0 - h));
            assert!((d - 0.5).abs() < 1e-12, "h={h} t={t} d={d}");
        }
        assert!(cooks_contour_external(0.5, 2, 1, 0.1, 0.9, 10).is_empty());
    }

    #[test]
    fn the_plot_shows_the_residual_the_flag_tests() {
        use crate::{fit, FitOptions, Measurement, GAS_CONSTANT};
        // Invented: one wild point among ten; it must sit beyond the limit line on the plot
        // exactly when it is flagged as an outlier.
        let data: Vec<Measurement> = (0..10)
            .map(|i| {
                let t = 283.0 + 3.0 * i as f64;
                let wild = if i == 6 {
                    0.3
                } else {
                    0.004 * ((i * 7 % 5) as f64 - 2.0)
                };
                Measurement::new(t, 40e3 / (GAS_CONSTANT * t) - 10.0 / GAS_CONSTANT + wild)
                    .with_sigma(0.02)
            })
            .collect();
        let f = fit(&data, &FitOptions::default()).unwrap();
        let l = FlagLimits::of(&f);
        let mut beyond = 0;
        for d in f.points() {
            let [h, t] = influence_coordinates(d).unwrap();
            assert_eq!(h, d.leverage);
            assert_eq!(d.flags.outlier, t.abs() > l.studentized, "{d:?}");
            beyond += usize::from(t.abs() > l.studentized);
        }
        assert_eq!(beyond, 1);
    }

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
    fn flag_limits_are_the_rules_of_thumb() {
        // Common practice: |t| > 3, h > 2p/n, D > 4/n; p = 2, n = 10 gives 0.4 and 0.4.
        let l = FlagLimits::new(FlagThresholds::default(), 2, 10);
        assert_eq!(l.studentized, 3.0);
        assert!((l.leverage - 0.4).abs() < 1e-15);
        assert!((l.cooks_d - 0.4).abs() < 1e-15);
        assert_eq!(l.contour_levels(), [l.cooks_d, 1.0]);
        // No points is not a division by zero.
        assert!(FlagLimits::new(FlagThresholds::default(), 3, 0)
            .leverage
            .is_finite());
    }

    #[test]
    fn a_fits_flags_agree_with_its_limits() {
        use crate::{fit, FitOptions, Measurement, GAS_CONSTANT};
        // Invented: ΔH° = −30 kJ/mol, ΔS° = −20 J/(mol K), one far temperature and one
        // wild point, so some flags are raised.
        let data: Vec<Measurement> = [280.0, 285.0, 290.0, 295.0, 300.0, 305.0, 360.0]
            .iter()
            .enumerate()
            .map(|(i, &t)| {
                let wild = if i == 3 { 0.8 } else { 0.01 * (i as f64 - 3.0) };
                Measurement::new(t, 30e3 / (GAS_CONSTANT * t) - 20.0 / GAS_CONSTANT + wild)
                    .with_sigma(0.05)
            })
            .collect();
        let f = fit(&data, &FitOptions::default()).unwrap();
        let l = FlagLimits::of(&f);
        assert!(f.points().iter().any(|d| d.flags.any()));
        for d in f.points().iter().filter(|d| d.used) {
            assert_eq!(d.flags.high_leverage, d.leverage > l.leverage, "{d:?}");
            assert_eq!(
                d.flags.influential,
                d.cooks_d.is_some_and(|c| c > l.cooks_d),
                "{d:?}"
            );
            assert_eq!(
                d.flags.outlier,
                d.student_ext.is_some_and(|t| t.abs() > l.studentized),
                "{d:?}"
            );
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
