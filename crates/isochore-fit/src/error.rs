//! The one error type of `isochore-fit`: every way a fit or a conversion can be refused.
//!
//! Messages are written for a chemist: they say what is wrong, with which point (0-based
//! index into the slice the caller passed, shown 1-based as "point N"), and what to try.

use std::fmt;

/// Why a computation in `isochore-fit` was refused.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum Error {
    /// A value that must be finite is NaN or infinite.
    NonFinite {
        /// What the value is ("temperature", "ln K", "σ(ln K)", …).
        what: &'static str,
        /// 0-based index of the point, when the value belongs to one.
        index: Option<usize>,
    },
    /// A thermodynamic temperature is zero or negative (after conversion to kelvin).
    NonPositiveTemperature {
        /// 0-based index of the point, when the value belongs to one.
        index: Option<usize>,
        /// The offending temperature in kelvin.
        kelvin: f64,
    },
    /// An equilibrium or dissociation constant is zero or negative, so it has no logarithm.
    NonPositiveConstant {
        /// 0-based index of the point, when the value belongs to one.
        index: Option<usize>,
        /// The offending value.
        value: f64,
    },
    /// An uncertainty is zero or negative.
    NonPositiveSigma {
        /// 0-based index of the point, when the value belongs to one.
        index: Option<usize>,
        /// The offending value.
        value: f64,
    },
    /// Weighted fitting was asked for but a used point has no uncertainty.
    MissingSigma {
        /// 0-based index of the point.
        index: usize,
    },
    /// Fewer usable points than the model has parameters (or than a calculation needs).
    TooFewPoints {
        /// Points available.
        available: usize,
        /// Points needed.
        needed: usize,
    },
    /// All used points share one temperature, so no temperature dependence can be fitted.
    SingleTemperature,
    /// The design matrix is rank deficient (duplicated or dependent columns).
    RankDeficient {
        /// 0-based index of the first column found to depend on the others.
        column: usize,
    },
    /// Lengths of inputs that must match do not.
    DimensionMismatch {
        /// What was compared.
        what: &'static str,
        /// Expected length.
        expected: usize,
        /// Length given.
        found: usize,
    },
    /// A confidence level outside the open interval (0, 1).
    InvalidLevel(f64),
    /// A model reference temperature θ that is not a positive finite number of kelvin.
    InvalidReferenceTemperature(f64),
    /// A flag threshold that is not a positive finite number.
    InvalidThreshold {
        /// Which threshold.
        name: &'static str,
        /// The value given.
        value: f64,
    },
    /// A requested quantity has no solution for this fit (for example, K never reaches the
    /// target value at any positive temperature).
    NoSolution(String),
}

fn point(index: Option<usize>) -> String {
    match index {
        Some(i) => format!("point {}: ", i + 1),
        None => String::new(),
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Error::NonFinite { what, index } => write!(
                f,
                "{}the {what} is not a finite number (NaN or infinity); check the value in the data",
                point(*index)
            ),
            Error::NonPositiveTemperature { index, kelvin } => write!(
                f,
                "{}temperature {kelvin} K is at or below absolute zero; check the temperature unit (°C, K or °F)",
                point(*index)
            ),
            Error::NonPositiveConstant { index, value } => write!(
                f,
                "{}equilibrium constant {value} is not positive, so it has no logarithm; K and K_d must be > 0",
                point(*index)
            ),
            Error::NonPositiveSigma { index, value } => write!(
                f,
                "{}uncertainty {value} is not positive; give σ > 0 or fit unweighted",
                point(*index)
            ),
            Error::MissingSigma { index } => write!(
                f,
                "point {}: a weighted fit needs an uncertainty for every used point; give σ or fit unweighted",
                index + 1
            ),
            Error::TooFewPoints { available, needed } => write!(
                f,
                "{available} usable point(s) but at least {needed} are needed; include more points or choose a simpler model"
            ),
            Error::SingleTemperature => write!(
                f,
                "all used points are at the same temperature, so nothing about the temperature dependence can be fitted"
            ),
            Error::RankDeficient { column } => write!(
                f,
                "the fit is singular: column {} depends on the others (too few distinct temperatures for this model?)",
                column + 1
            ),
            Error::DimensionMismatch { what, expected, found } => {
                write!(f, "{what}: expected {expected} values, found {found}")
            }
            Error::InvalidLevel(l) => write!(
                f,
                "confidence level {l} is not between 0 and 1 (exclusive); for 95 % give 0.95"
            ),
            Error::InvalidReferenceTemperature(t) => write!(
                f,
                "reference temperature θ = {t} K is not a positive finite temperature in kelvin"
            ),
            Error::InvalidThreshold { name, value } => {
                write!(f, "flag threshold '{name}' = {value} must be a positive finite number")
            }
            Error::NoSolution(why) => write!(f, "{why}"),
        }
    }
}

impl std::error::Error for Error {}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn errors_are_send_sync_and_name_the_point() {
        fn assert_send_sync<T: Send + Sync>() {}
        assert_send_sync::<Error>();
        let e = Error::NonPositiveConstant {
            index: Some(4),
            value: -1.0,
        };
        assert!(e.to_string().starts_with("point 5:"), "{e}");
    }
}
