//! Replicate averaging: several measurements made at one temperature become one point.
//!
//! Which rows are replicates (a temperature tolerance, exclusions, row bookkeeping) is
//! decided by the caller, `isochore-data`; this module holds only the arithmetic, so that
//! every statistic of the program lives in this crate.

use crate::measurement::Measurement;

/// One point standing for `replicates`: the mean temperature and, for ln K,
///
/// - the inverse-variance weighted mean Σwᵢ ln Kᵢ / Σwᵢ with wᵢ = 1/σᵢ² and σ = 1/√Σw,
///   when every replicate has σ;
/// - otherwise the plain mean with σ = s/√n, the standard error of the mean from the
///   sample standard deviation s (none when the spread is zero or not finite);
/// - a single replicate is returned with its own ln K and σ.
///
/// The result is included in the fit whatever the replicates' `included` flags say (the
/// caller passes only the replicates it includes). Sums run in the order given. `None`
/// when `replicates` is empty.
pub fn average_replicates(replicates: &[Measurement]) -> Option<Measurement> {
    let first = replicates.first()?;
    let n = replicates.len() as f64;
    let t_k = replicates.iter().map(|m| m.t_k).sum::<f64>() / n;
    let all_sigma = replicates.iter().all(|m| m.sigma_ln_k.is_some());
    let (ln_k, sigma_ln_k) = if replicates.len() == 1 {
        (first.ln_k, first.sigma_ln_k)
    } else if all_sigma {
        let w: Vec<f64> = replicates
            .iter()
            .map(|m| {
                let s = m.sigma_ln_k.unwrap_or(1.0);
                1.0 / (s * s)
            })
            .collect();
        let sw: f64 = w.iter().sum();
        let mean = replicates
            .iter()
            .zip(&w)
            .map(|(m, wi)| wi * m.ln_k)
            .sum::<f64>()
            / sw;
        (mean, Some(1.0 / sw.sqrt()))
    } else {
        let mean = replicates.iter().map(|m| m.ln_k).sum::<f64>() / n;
        let ss = replicates
            .iter()
            .map(|m| (m.ln_k - mean).powi(2))
            .sum::<f64>();
        let sd = (ss / (n - 1.0)).sqrt();
        let se = sd / n.sqrt();
        (mean, (se.is_finite() && se > 0.0).then_some(se))
    };
    Some(Measurement {
        t_k,
        ln_k,
        sigma_ln_k,
        included: true,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn weighted_and_plain_means_follow_their_definitions() {
        // Inverse-variance weighted mean (common practice): σ = 0.1 and 0.2 give weights
        // 100 and 25, so ln K = (100·1 + 25·2)/125 = 1.2 and σ = 1/√125, worked by hand.
        let a = Measurement::new(300.0, 1.0).with_sigma(0.1);
        let b = Measurement::new(300.02, 2.0).with_sigma(0.2);
        let m = average_replicates(&[a, b]).unwrap();
        assert!((m.t_k - 300.01).abs() < 1e-12);
        assert!((m.ln_k - 1.2).abs() < 1e-12);
        assert!((m.sigma_ln_k.unwrap() - 1.0 / 125f64.sqrt()).abs() < 1e-15);
        // Without σ on every replicate: mean 2, s = 1 (values 1, 2, 3), σ = 1/√3, by hand.
        let c = Measurement::new(300.0, 3.0).excluded();
        let m = average_replicates(&[a, Measurement::new(300.0, 2.0), c]).unwrap();
        assert!((m.ln_k - 2.0).abs() < 1e-12 && m.included);
        assert!((m.sigma_ln_k.unwrap() - 1.0 / 3f64.sqrt()).abs() < 1e-12);
        // No spread: no σ. One replicate: itself. None: nothing.
        let same = Measurement::new(300.0, 2.0);
        assert_eq!(average_replicates(&[same, same]).unwrap().sigma_ln_k, None);
        assert_eq!(average_replicates(&[b]), Some(b));
        assert_eq!(average_replicates(&[]), None);
    }
}
