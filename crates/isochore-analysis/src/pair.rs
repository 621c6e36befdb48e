//! The inputs of the two-point calculation, the same in the window and on the command line:
//! each K comes with its standard uncertainty either as u(K), in the unit of K, or as
//! σ(ln K). Both become σ(ln K) here, by one rule.

/// How the uncertainty of one K is given.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum KUncertainty {
    /// u(K), the standard uncertainty of K in the unit of K.
    OfK(f64),
    /// σ(ln K), the standard uncertainty of ln K.
    OfLnK(f64),
}

impl KUncertainty {
    /// The symbol the window and the command line show for this way of giving it.
    pub fn symbol(self) -> &'static str {
        match self {
            KUncertainty::OfK(_) => "u(K)",
            KUncertainty::OfLnK(_) => "σ(ln K)",
        }
    }

    /// σ(ln K) for a K of value `k`: u(K)/K (first-order propagation, d ln K = dK/K), or
    /// σ(ln K) as given. Zero means exact.
    ///
    /// # Errors
    /// A message naming the symbol when the uncertainty is negative or not a number, or when
    /// K is not a positive number.
    pub fn sigma_ln_k(self, k: f64) -> Result<f64, String> {
        let v = match self {
            KUncertainty::OfK(u) | KUncertainty::OfLnK(u) => u,
        };
        if !(v.is_finite() && v >= 0.0) {
            return Err(format!(
                "{} must be zero or a positive number",
                self.symbol()
            ));
        }
        if !(k.is_finite() && k > 0.0) {
            return Err("K must be a positive number".to_string());
        }
        Ok(match self {
            KUncertainty::OfK(u) => u / k,
            KUncertainty::OfLnK(s) => s,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn both_ways_of_giving_the_uncertainty_agree() {
        // d ln K = dK / K (first-order propagation, common practice): u(K) = 5 × 10⁴ on
        // K = 10⁶ is σ(ln K) = 0.05.
        let a = KUncertainty::OfK(5.0e4).sigma_ln_k(1.0e6).unwrap();
        let b = KUncertainty::OfLnK(0.05).sigma_ln_k(1.0e6).unwrap();
        assert!((a - b).abs() < 1e-15, "{a} {b}");
        assert!(KUncertainty::OfK(-1.0)
            .sigma_ln_k(2.0)
            .unwrap_err()
            .contains("u(K)"));
        assert!(KUncertainty::OfLnK(f64::NAN)
            .sigma_ln_k(2.0)
            .unwrap_err()
            .contains("σ(ln K)"));
        assert!(KUncertainty::OfK(0.1).sigma_ln_k(0.0).is_err());
    }
}
