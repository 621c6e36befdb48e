//! [`GlobalError`]: every way a fit of several series in one block design can be refused.
//!
//! Series are numbered 0-based in the fields and shown 1-based with their label in the
//! messages ("series 2 (\"pH 7.4\")"); points are 0-based within their series, like the
//! index of the [`crate::Error`] a single-series fit gives, which the messages show 1-based.

use crate::error::Error;
use std::fmt;

/// Why a fit of several series ([`super::fit_global`]) or an equality test
/// ([`super::test_equal_across_series`]) was refused.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum GlobalError {
    /// No series was given.
    NoSeries,
    /// A series has no used point (none at all, or every point excluded).
    EmptySeries {
        /// 0-based index of the series.
        series: usize,
        /// Its label.
        label: String,
    },
    /// The sharing map names a parameter the model does not have.
    UnknownParameter {
        /// The key given.
        key: String,
        /// The model's key.
        model: &'static str,
        /// The parameter keys the model has, in design order.
        known: Vec<&'static str>,
    },
    /// A point of one series is invalid (its `index` is 0-based within the series).
    Point {
        /// 0-based index of the series.
        series: usize,
        /// Its label.
        label: String,
        /// What is wrong with the point, as a single-series fit would say it.
        error: Error,
    },
    /// The options are invalid (level, θ, thresholds).
    Options(Error),
    /// The sharing asks more of one series than its temperatures can tell: fewer distinct
    /// temperatures than the parameters it has of its own.
    SingularSharing {
        /// 0-based index of the series.
        series: usize,
        /// Its label.
        label: String,
        /// Distinct temperatures of the series (counted up to `needed`).
        distinct: usize,
        /// Parameters fitted for this series alone, which is also the number of distinct
        /// temperatures needed.
        needed: usize,
        /// Keys of those parameters.
        per_series: Vec<&'static str>,
    },
    /// The block design is singular although every series passes the count of
    /// [`GlobalError::SingularSharing`]: a column cannot be told apart from the others (for
    /// example a shared parameter when each series is fitted exactly by its own parameters).
    SingularDesign {
        /// The label of the first column found to depend on the others, such as
        /// `delta_cp (shared)` or `delta_h [series 2 "B"]`.
        column: String,
    },
    /// Too few points, or too few distinct design rows, for the error estimate: a scaled
    /// fit needs at least p + 1 of each, p under absolute σ.
    TooFewDegreesOfFreedom {
        /// Used points over all series.
        points: usize,
        /// Distinct design rows (counted up to `needed`): points at one temperature in one
        /// series share a row, and so do points of different series when no parameter is
        /// fitted per series.
        distinct_rows: usize,
        /// Columns of the block design.
        parameters: usize,
        /// Points and distinct rows needed.
        needed: usize,
    },
    /// The fits given to an equality test are not nested fits of the same data.
    NotNested(String),
    /// The numbers overflow or the result cannot be evaluated (absurd units or θ).
    NoSolution(String),
}

/// "series 2 ("B")": 1-based, with the label when there is one.
pub(crate) fn series_name(series: usize, label: &str) -> String {
    if label.is_empty() {
        format!("series {}", series + 1)
    } else {
        format!("series {} (\"{label}\")", series + 1)
    }
}

impl fmt::Display for GlobalError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            GlobalError::NoSeries => write!(f, "no series to fit; give at least one series"),
            GlobalError::EmptySeries { series, label } => write!(
                f,
                "{} has no used point; include points or leave the series out",
                series_name(*series, label)
            ),
            GlobalError::UnknownParameter { key, model, known } => write!(
                f,
                "the sharing names parameter '{key}', which the '{model}' model does not have; its parameters are {}",
                known.join(", ")
            ),
            GlobalError::Point { series, label, error } => {
                write!(f, "{}: {error}", series_name(*series, label))
            }
            GlobalError::Options(e) => write!(f, "{e}"),
            GlobalError::SingularSharing { series, label, distinct, needed, per_series } => write!(
                f,
                "the sharing is singular: {} has {} but {} of its own ({}), which need at least {needed}; share some of them across series, choose a simpler model, or measure that series at more temperatures",
                series_name(*series, label),
                crate::error::counted(*distinct, "distinct temperature", "distinct temperatures"),
                crate::error::counted(*needed, "parameter", "parameters"),
                per_series.join(", ")
            ),
            GlobalError::SingularDesign { column } => write!(
                f,
                "the sharing is singular: column {column} of the block design is numerically dependent on the others, so its parameter cannot be told apart from them (each series may already be fitted exactly by its own parameters); share fewer parameters per series or measure at more temperatures"
            ),
            GlobalError::TooFewDegreesOfFreedom { points, distinct_rows, parameters, needed } => write!(
                f,
                "too few degrees of freedom: {} with {} for {}, but {needed} of each are needed for an error estimate; share more parameters, include more points, or choose a simpler model",
                crate::error::counted(*points, "used point", "used points"),
                crate::error::counted(*distinct_rows, "distinct design row", "distinct design rows"),
                crate::error::counted(*parameters, "parameter", "parameters")
            ),
            GlobalError::NotNested(why) => write!(f, "the fits cannot be compared: {why}"),
            GlobalError::NoSolution(why) => write!(f, "{why}"),
        }
    }
}

impl std::error::Error for GlobalError {}
