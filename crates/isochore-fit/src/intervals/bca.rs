//! Summaries of a set of draws: the mean and standard deviation, the percentile at a
//! probability (linear interpolation between order statistics, NumPy's default, so a
//! fixture from NumPy/SciPy can be matched to rounding), the probabilistically symmetric
//! coverage interval of GUM Supplement 1 (JCGM 101:2008, §7.7), and Efron's (1987)
//! bias-corrected and accelerated (BCa) interval with the acceleration from the jackknife,
//! written as `scipy.stats.bootstrap` writes it (`tests/bca_scipy.rs` compares the two on
//! the same statistics).

use statrs::distribution::{ContinuousCDF, Normal};

/// Standard normal CDF Φ.
fn phi(x: f64) -> f64 {
    match Normal::new(0.0, 1.0) {
        Ok(d) => d.cdf(x),
        Err(_) => f64::NAN,
    }
}

/// Standard normal quantile Φ⁻¹ (NaN outside (0, 1); ±∞ at 0 and 1).
fn phi_inv(p: f64) -> f64 {
    if p == 0.0 {
        return f64::NEG_INFINITY;
    }
    if p == 1.0 {
        return f64::INFINITY;
    }
    crate::stats::normal_quantile(p)
}

/// Mean and standard deviation (n − 1 in the denominator) of `v`; NaN for the SD of fewer
/// than two values.
pub fn mean_sd(v: &[f64]) -> (f64, f64) {
    let n = v.len() as f64;
    if v.is_empty() {
        return (f64::NAN, f64::NAN);
    }
    let mean = v.iter().sum::<f64>() / n;
    if v.len() < 2 {
        return (mean, f64::NAN);
    }
    let ss: f64 = v.iter().map(|x| (x - mean) * (x - mean)).sum();
    (mean, (ss / (n - 1.0)).sqrt())
}

/// The percentile of the **sorted** values `sorted` at probability `p` in [0, 1], by linear
/// interpolation between order statistics at position p·(B − 1) (NumPy's default method,
/// Hyndman & Fan's type 7). NaN for no values or p outside [0, 1].
pub fn percentile_sorted(sorted: &[f64], p: f64) -> f64 {
    if sorted.is_empty() || !(0.0..=1.0).contains(&p) {
        return f64::NAN;
    }
    let pos = p * (sorted.len() - 1) as f64;
    let lo = pos.floor() as usize;
    let hi = pos.ceil() as usize;
    let frac = pos - lo as f64;
    if lo == hi {
        return sorted[lo];
    }
    // NumPy's `_lerp`: a + (b − a)·t, written from the nearer end when t ≥ ½.
    let (a, b) = (sorted[lo], sorted[hi]);
    let d = b - a;
    if frac >= 0.5 {
        b - d * (1.0 - frac)
    } else {
        a + d * frac
    }
}

/// The probabilistically symmetric interval at `level` of the sorted draws: the
/// percentiles at (1 − level)/2 and (1 + level)/2.
pub fn percentile_interval(sorted: &[f64], level: f64) -> (f64, f64) {
    let a = 0.5 * (1.0 - level);
    (
        percentile_sorted(sorted, a),
        percentile_sorted(sorted, 1.0 - a),
    )
}

/// The BCa interval at `level` (Efron 1987; DiCiccio & Efron 1996, eq. 3.9–3.11):
/// ```text
/// z₀ = Φ⁻¹(#{θ* < θ̂}/B + #{θ* = θ̂}/(2B))           (ties counted half, as scipy does)
/// a  = Σ (θ̄₍.₎ − θ₍ᵢ₎)³ / (6 [Σ (θ̄₍.₎ − θ₍ᵢ₎)²]^{3/2})  (jackknife values θ₍ᵢ₎)
/// α₁,₂ = Φ(z₀ + (z₀ + z_α)/(1 − a(z₀ + z_α))),  z_α = Φ⁻¹((1 ∓ level)/2)
/// interval = the percentiles of the draws at α₁ and α₂
/// ```
/// `sorted` are the bootstrap values sorted, `estimate` θ̂, `jackknife` the leave-one-out
/// values. `None` when the bias correction is infinite (every draw on one side of θ̂), the
/// acceleration is undefined (all jackknife values equal) or an adjusted level is not a
/// probability.
pub fn bca_interval(
    sorted: &[f64],
    estimate: f64,
    jackknife: &[f64],
    level: f64,
) -> Option<(f64, f64)> {
    let b = sorted.len();
    if b == 0 || jackknife.len() < 2 {
        return None;
    }
    let below = sorted.partition_point(|&x| x < estimate);
    let at_or_below = sorted.partition_point(|&x| x <= estimate);
    let z0 = phi_inv((below + at_or_below) as f64 / (2.0 * b as f64));
    let a = acceleration(jackknife)?;
    if !(z0.is_finite() && a.is_finite()) {
        return None;
    }
    let alpha = 0.5 * (1.0 - level);
    let adjust = |z: f64| {
        let num = z0 + z;
        phi(z0 + num / (1.0 - a * num))
    };
    let za = phi_inv(alpha);
    let (a1, a2) = (adjust(za), adjust(-za));
    if !((0.0..=1.0).contains(&a1) && (0.0..=1.0).contains(&a2)) {
        return None;
    }
    Some((percentile_sorted(sorted, a1), percentile_sorted(sorted, a2)))
}

/// The jackknife acceleration â = Σ U³ / (6 (Σ U²)^{3/2}), U = (n − 1)(θ̄₍.₎ − θ₍ᵢ₎) (the
/// factor (n − 1) cancels). `None` when every jackknife value is the same.
pub fn acceleration(jackknife: &[f64]) -> Option<f64> {
    let n = jackknife.len() as f64;
    let mean = jackknife.iter().sum::<f64>() / n;
    let (mut s2, mut s3) = (0.0, 0.0);
    for &t in jackknife {
        let u = (n - 1.0) * (mean - t);
        s2 += u * u;
        s3 += u * u * u;
    }
    // scipy divides the sums by n³ and n² before the ratio; the same number up to rounding.
    let (s3, s2) = (s3 / (n * n * n), s2 / (n * n));
    (s2 > 0.0).then(|| s3 / (6.0 * s2.powf(1.5)))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn percentiles_interpolate_as_numpy_does() {
        // numpy.percentile([1, 2, 3, 4], [0, 25, 50, 90, 100]) = [1, 1.75, 2.5, 3.7, 4]
        // (NumPy 2.x, method "linear"; from memory, and the formula by hand).
        let v = [1.0, 2.0, 3.0, 4.0];
        for (p, want) in [(0.0, 1.0), (0.25, 1.75), (0.5, 2.5), (0.9, 3.7), (1.0, 4.0)] {
            assert!((percentile_sorted(&v, p) - want).abs() < 1e-15, "{p}");
        }
        assert!(percentile_sorted(&[], 0.5).is_nan());
    }

    #[test]
    fn bca_without_bias_or_skew_is_the_percentile_interval() {
        // Symmetric draws about the estimate and a symmetric jackknife: z₀ = 0, a = 0.
        let sorted: Vec<f64> = (0..1001).map(|i| i as f64 - 500.0).collect();
        let jack = [-1.0, 0.0, 1.0];
        let (lo, hi) = bca_interval(&sorted, 0.0, &jack, 0.9).unwrap();
        let (plo, phi_) = percentile_interval(&sorted, 0.9);
        // Φ(Φ⁻¹(0.05)) in statrs returns 0.05 to about 1e-11, which moves the ends by 1e-9 here.
        assert!(
            (lo - plo).abs() < 1e-7 && (hi - phi_).abs() < 1e-7,
            "{lo} {plo} {hi} {phi_}"
        );
        // Every draw above the estimate: no finite bias correction.
        assert!(bca_interval(&sorted, -1e9, &jack, 0.9).is_none());
    }
}
