//! One measured point on the fitting scale: temperature in kelvin, ln K, optional σ(ln K),
//! and whether the chemist includes it. Conversion from lab units is in [`crate::units`].

use crate::error::Error;
use serde::{Deserialize, Serialize};
use std::sync::Arc;

/// One equilibrium measurement, already on the fitting scale.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Measurement {
    /// Temperature in kelvin.
    pub t_k: f64,
    /// Natural logarithm of the (association-sense, dimensionless) equilibrium constant.
    pub ln_k: f64,
    /// Standard uncertainty of ln K, if known.
    pub sigma_ln_k: Option<f64>,
    /// Whether the point takes part in the fit. Excluded points are kept and still get a
    /// predicted value and a prediction-standardised residual.
    pub included: bool,
}

impl Measurement {
    /// An included point with no uncertainty.
    pub fn new(t_k: f64, ln_k: f64) -> Self {
        Measurement {
            t_k,
            ln_k,
            sigma_ln_k: None,
            included: true,
        }
    }

    /// The same point with σ(ln K) set.
    pub fn with_sigma(mut self, sigma_ln_k: f64) -> Self {
        self.sigma_ln_k = Some(sigma_ln_k);
        self
    }

    /// The same point, excluded from the fit.
    pub fn excluded(mut self) -> Self {
        self.included = false;
        self
    }

    /// Whether [`Measurement::validate`] passes, without forming its error: one expression
    /// without branches, for passes over many points that check on the way.
    #[inline]
    pub(crate) fn is_valid(&self) -> bool {
        let s = self.sigma_ln_k.unwrap_or(1.0);
        self.t_k.is_finite()
            & (self.t_k > 0.0)
            & self.ln_k.is_finite()
            & (s.is_finite() & (s > 0.0))
    }

    /// Checks the values, naming the point by its 0-based `index` in errors.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::NonPositiveTemperature`] or [`Error::NonPositiveSigma`].
    pub fn validate(&self, index: usize) -> Result<(), Error> {
        if !self.t_k.is_finite() {
            return Err(Error::NonFinite {
                what: "temperature",
                index: Some(index),
            });
        }
        if self.t_k <= 0.0 {
            return Err(Error::NonPositiveTemperature {
                index: Some(index),
                kelvin: self.t_k,
            });
        }
        if !self.ln_k.is_finite() {
            return Err(Error::NonFinite {
                what: "ln K",
                index: Some(index),
            });
        }
        if let Some(s) = self.sigma_ln_k {
            if !s.is_finite() {
                return Err(Error::NonFinite {
                    what: "σ(ln K)",
                    index: Some(index),
                });
            }
            if s <= 0.0 {
                return Err(Error::NonPositiveSigma {
                    index: Some(index),
                    value: s,
                });
            }
        }
        Ok(())
    }
}

/// The points given to a fit: borrowed for the fit alone, or shared with the caller. A fit
/// whose per-point diagnostics are computed on demand (the streaming path) keeps the points
/// it was given: shared ones by a second reference, borrowed ones as a copy.
#[derive(Debug, Clone, Copy)]
pub(crate) enum Given<'a> {
    /// The caller keeps the points; the fit copies them if it needs them later.
    Borrowed(&'a [Measurement]),
    /// The caller shares the points; the fit holds another reference if it needs them.
    Shared(&'a Arc<Vec<Measurement>>),
}

impl<'a> Given<'a> {
    /// The points.
    pub(crate) fn slice(self) -> &'a [Measurement] {
        match self {
            Given::Borrowed(s) => s,
            Given::Shared(a) => a.as_slice(),
        }
    }

    /// The points for the fit to keep: another reference when shared, a copy otherwise.
    pub(crate) fn to_shared(self) -> Arc<Vec<Measurement>> {
        match self {
            Given::Borrowed(s) => Arc::new(s.to_vec()),
            Given::Shared(a) => Arc::clone(a),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn is_valid_agrees_with_validate() {
        // Every combination of ordinary and edge values (the two carry the same rule, one
        // as errors and one as a flag for passes over many points).
        let edges = [
            298.15,
            1e-300,
            0.0,
            -0.0,
            -5.0,
            f64::NAN,
            f64::INFINITY,
            f64::NEG_INFINITY,
        ];
        let mut seen_both = [false; 2];
        for &t in &edges {
            for &y in &edges {
                for s in edges.iter().map(|&s| Some(s)).chain([None]) {
                    let m = Measurement {
                        t_k: t,
                        ln_k: y,
                        sigma_ln_k: s,
                        included: true,
                    };
                    let ok = m.validate(0).is_ok();
                    assert_eq!(m.is_valid(), ok, "{m:?}");
                    seen_both[usize::from(ok)] = true;
                }
            }
        }
        assert_eq!(seen_both, [true, true]);
    }
}
