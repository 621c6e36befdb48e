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
    /// A confidence level so close to 1 (above [`crate::model::MAX_LEVEL`]) that its
    /// interval cannot be computed in double precision.
    LevelTooCloseToOne(f64),
    /// A temperature outside the plausible range [`crate::model::MIN_PLAUSIBLE_K`] to
    /// [`crate::model::MAX_PLAUSIBLE_K`], not confirmed with
    /// [`crate::FitOptions::allow_extreme_temperatures`].
    ImplausibleTemperature {
        /// 0-based index of the point.
        index: Option<usize>,
        /// The temperature in kelvin.
        kelvin: f64,
    },
    /// A reference temperature θ outside the plausible range, not confirmed.
    ImplausibleReferenceTemperature(f64),
    /// An uncertainty whose square (for the weight 1/σ²) overflows or underflows double
    /// precision (σ above about 1e154 or below about 1e-154).
    SigmaOutOfRange {
        /// 0-based index of the point.
        index: Option<usize>,
        /// The uncertainty σ(ln K).
        value: f64,
    },
    /// Fewer distinct temperatures (at [`crate::model::TEMPERATURE_RESOLUTION_K`]) than the
    /// model needs: p for the estimates, p + 1 for any error estimate.
    TooFewTemperatures {
        /// Distinct temperatures found (counted up to `needed`).
        distinct: usize,
        /// Distinct temperatures needed.
        needed: usize,
        /// Parameters of the model.
        parameters: usize,
        /// Used points (rows), which may be many more than the temperatures.
        points: usize,
    },
    /// The design is too ill-conditioned for a point's diagnostics to be computed, although
    /// the point's temperature is ordinary.
    IllConditioned {
        /// 0-based index of the first point that could not be evaluated.
        index: usize,
        /// Its temperature in kelvin.
        kelvin: f64,
    },
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

/// A count with its noun in the right number, for messages: `counted(1, "point", "points")`
/// is "1 point", `counted(3, "point", "points")` is "3 points".
///
/// ```
/// assert_eq!(isochore_fit::error::counted(1, "row", "rows"), "1 row");
/// assert_eq!(isochore_fit::error::counted(0, "row", "rows"), "0 rows");
/// ```
pub fn counted(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// A value for a message: at most 6 significant digits (a 300-digit number is never
/// printed), in exponent form when very large or small.
pub(crate) fn short(v: f64) -> String {
    if !v.is_finite() {
        return format!("{v}");
    }
    let rounded = format!("{v:.5e}").parse::<f64>().unwrap_or(v);
    format!("{rounded:?}")
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
                "{}temperature {} K is at or below absolute zero; check the temperature unit (°C, K or °F)",
                point(*index),
                short(*kelvin)
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
                "{} but at least {needed} are needed; include more points or choose a simpler model",
                counted(*available, "usable point", "usable points")
            ),
            Error::SingleTemperature => write!(
                f,
                "all used points are at the same temperature, so nothing about the temperature dependence can be fitted"
            ),
            Error::RankDeficient { column } => write!(
                f,
                "the fit is singular: design column {} is numerically dependent on the others, so its parameter cannot be told apart from them (temperatures too close together for this model, or θ far from the data)",
                column + 1
            ),
            Error::DimensionMismatch { what, expected, found } => {
                write!(f, "{what}: expected {expected} values, found {found}")
            }
            Error::InvalidLevel(l) => write!(
                f,
                "confidence level {l} is not between 0 and 1 (exclusive); for 95 % give 0.95"
            ),
            Error::LevelTooCloseToOne(l) => write!(
                f,
                "confidence level {l} is too close to 1: its interval would be infinitely wide in double precision; give at most {} (e.g. 0.999)",
                crate::model::MAX_LEVEL
            ),
            Error::ImplausibleTemperature { index, kelvin } => write!(
                f,
                "{}temperature {} K is outside the plausible range {} to {} K; check the value and its unit, or confirm such temperatures explicitly (allow extreme temperatures)",
                point(*index),
                short(*kelvin),
                crate::model::MIN_PLAUSIBLE_K,
                crate::model::MAX_PLAUSIBLE_K
            ),
            Error::ImplausibleReferenceTemperature(t) => write!(
                f,
                "reference temperature θ = {} K is outside the plausible range {} to {} K; give θ in kelvin near the data (default 298.15), or confirm extreme temperatures explicitly",
                short(*t),
                crate::model::MIN_PLAUSIBLE_K,
                crate::model::MAX_PLAUSIBLE_K
            ),
            Error::SigmaOutOfRange { index, value } => write!(
                f,
                "{}uncertainty σ(ln K) = {} is too {} for its weight 1/σ² to be computed in double precision; σ of ln K is usually between 1e-6 and 10 — check the value and its unit",
                point(*index),
                short(*value),
                if value.abs() > 1.0 { "large" } else { "small" }
            ),
            Error::TooFewTemperatures { distinct, needed, parameters, points } => write!(
                f,
                "only {} among {} (temperatures closer than {} K count as one), but a model with {parameters} parameters needs at least {parameters} distinct temperatures, and {} for an error estimate: repeats at one temperature do not tell the model's shape; measure at {needed} or more temperatures, or choose a simpler model",
                counted(*distinct, "distinct temperature", "distinct temperatures"),
                counted(*points, "used point", "used points"),
                crate::model::TEMPERATURE_RESOLUTION_K,
                parameters + 1
            ),
            Error::IllConditioned { index, kelvin } => write!(
                f,
                "point {} ({} K): the fit is too ill-conditioned to evaluate this point — the design is numerically singular (temperatures nearly alike, or θ far from the data); widen the temperature range or choose θ near the data",
                index + 1,
                short(*kelvin)
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
