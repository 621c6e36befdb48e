//! The options that steer a fit (model, weighting, confidence convention, level, flag
//! thresholds) and the rules on temperatures every fit shares. The models themselves are in
//! [`crate::models`].

use crate::error::Error;
pub use crate::models::Model;
use serde::{Deserialize, Serialize};

/// Default reference temperature θ of the ΔCp° model, 298.15 K (the standard-state
/// temperature conventionally used for tabulated thermochemistry).
pub const DEFAULT_REFERENCE_K: f64 = 298.15;

/// Lowest temperature accepted without the user's confirmation, 1 K (see
/// [`FitOptions::allow_extreme_temperatures`]). Equilibrium measurements below it are
/// practically unknown; a value there is nearly always a unit or typing mistake.
pub const MIN_PLAUSIBLE_K: f64 = 1.0;

/// Highest temperature accepted without the user's confirmation, 10 000 K (see
/// [`FitOptions::allow_extreme_temperatures`]); a value above it is nearly always a unit or
/// typing mistake (e.g. `37.0e300`).
pub const MAX_PLAUSIBLE_K: f64 = 10_000.0;

/// The temperature resolution, 1 mK: two temperatures closer than this are the same
/// temperature. A model with p parameters needs at least p temperatures that are distinct
/// at this resolution, and p + 1 for any error estimate (see [`count_distinct_temperatures`]).
/// The two-point calculation uses the same rule for its two temperatures.
pub const TEMPERATURE_RESOLUTION_K: f64 = 1e-3;

/// Highest confidence level accepted, 1 − 10⁻⁹: above it the critical value of an
/// interval is not distinguishable from infinity in double precision for few degrees of
/// freedom, and 0.5 + level/2 rounds to 1.
pub const MAX_LEVEL: f64 = 1.0 - 1e-9;

/// Whether a temperature in kelvin lies in the plausible range
/// [[`MIN_PLAUSIBLE_K`], [`MAX_PLAUSIBLE_K`]].
pub fn is_plausible_temperature(t_k: f64) -> bool {
    (MIN_PLAUSIBLE_K..=MAX_PLAUSIBLE_K).contains(&t_k)
}

/// How many distinct temperatures `temps` holds at the resolution
/// [`TEMPERATURE_RESOLUTION_K`], counting no further than `limit` (so the usual data answer
/// after a few values). A temperature is new when it differs by at least the resolution
/// from every temperature counted so far; non-finite values are skipped.
///
/// ```
/// use isochore_fit::model::count_distinct_temperatures;
/// let t = [300.0, 300.0004, 310.0, 300.0];
/// assert_eq!(count_distinct_temperatures(t.iter().copied(), 10), 2);
/// ```
pub fn count_distinct_temperatures(temps: impl IntoIterator<Item = f64>, limit: usize) -> usize {
    let mut seen: Vec<f64> = Vec::with_capacity(limit.min(8));
    if limit == 0 {
        return 0;
    }
    for t in temps {
        if !t.is_finite() {
            continue;
        }
        if seen
            .iter()
            .all(|s| (t - s).abs() >= TEMPERATURE_RESOLUTION_K)
        {
            seen.push(t);
            if seen.len() >= limit {
                break;
            }
        }
    }
    seen.len()
}

/// How points are weighted.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum Weighting {
    /// Weight each point by 1/σ(ln K)²; every used point needs σ.
    #[default]
    InverseVariance,
    /// Every point counts the same; σ, if given, is ignored.
    Unweighted,
}

/// What the stated σ mean, which decides how the parameter covariance is scaled. Written
/// `relative_weights` / `known_uncertainties` in JSON and project files (the names of
/// DEVELOPERS.md's table); the older `scaled_by_fit` / `absolute` are still read.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
pub enum SigmaConvention {
    /// σ are relative weights only (ordinary weighted least squares): the covariance is
    /// scaled by the reduced χ², and intervals use Student's t with n − p degrees of freedom.
    #[default]
    #[serde(rename = "relative_weights", alias = "scaled_by_fit")]
    ScaledByFit,
    /// σ are known standard uncertainties: the covariance is (XᵀWX)⁻¹ unscaled and
    /// intervals use the normal distribution.
    #[serde(rename = "known_uncertainties", alias = "absolute")]
    Absolute,
}

impl SigmaConvention {
    /// Both conventions, the default first.
    pub const ALL: [SigmaConvention; 2] = [SigmaConvention::ScaledByFit, SigmaConvention::Absolute];

    /// The key in JSON and project files: "relative_weights", "known_uncertainties".
    pub fn key(self) -> &'static str {
        match self {
            SigmaConvention::ScaledByFit => "relative_weights",
            SigmaConvention::Absolute => "known_uncertainties",
        }
    }

    /// The value of the command line's `--sigma`: "relative-weights", "known-uncertainties".
    pub fn cli_name(self) -> &'static str {
        match self {
            SigmaConvention::ScaledByFit => "relative-weights",
            SigmaConvention::Absolute => "known-uncertainties",
        }
    }

    /// The convention with this key or command-line name (the older keys `scaled_by_fit`
    /// and `absolute` included).
    pub fn from_key(key: &str) -> Option<SigmaConvention> {
        match key {
            "scaled_by_fit" => Some(SigmaConvention::ScaledByFit),
            "absolute" => Some(SigmaConvention::Absolute),
            _ => Self::ALL
                .into_iter()
                .find(|c| c.key() == key || c.cli_name() == key),
        }
    }
}

/// Thresholds for flagging points. Defaults are rules of the trade (common practice).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct FlagThresholds {
    /// |externally studentized residual| above this flags an outlier (default 3).
    pub outlier_studentized: f64,
    /// Leverage above this × p/n marks high leverage (default 2, i.e. h > 2p/n).
    pub leverage_factor: f64,
    /// Cook's distance above this / n marks an influential point (default 4, i.e. D > 4/n).
    pub cooks_factor: f64,
}

impl Default for FlagThresholds {
    fn default() -> Self {
        // Common practice: |t| > 3, h > 2p/n, D > 4/n.
        FlagThresholds {
            outlier_studentized: 3.0,
            leverage_factor: 2.0,
            cooks_factor: 4.0,
        }
    }
}

/// Everything that steers one fit.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct FitOptions {
    /// The model.
    pub model: Model,
    /// Reference temperature θ of the ΔCp° model, in kelvin.
    pub t_ref_k: f64,
    /// Weighting of points.
    pub weighting: Weighting,
    /// Covariance convention.
    pub convention: SigmaConvention,
    /// Confidence level for intervals, in (0, 1).
    pub level: f64,
    /// Flag thresholds.
    pub thresholds: FlagThresholds,
    /// The user confirms temperatures (and θ) outside [[`MIN_PLAUSIBLE_K`],
    /// [`MAX_PLAUSIBLE_K`]]; without it such a point or θ is refused (default false).
    pub allow_extreme_temperatures: bool,
}

impl Default for FitOptions {
    fn default() -> Self {
        FitOptions {
            model: Model::LINEAR,
            t_ref_k: DEFAULT_REFERENCE_K,
            weighting: Weighting::InverseVariance,
            convention: SigmaConvention::ScaledByFit,
            level: 0.95,
            thresholds: FlagThresholds::default(),
            allow_extreme_temperatures: false,
        }
    }
}

impl FitOptions {
    /// Checks the options.
    ///
    /// # Errors
    /// [`Error::InvalidLevel`], [`Error::InvalidReferenceTemperature`] (θ not a positive
    /// finite number of kelvin, or outside the plausible range without
    /// [`FitOptions::allow_extreme_temperatures`]) or [`Error::InvalidThreshold`].
    pub fn validate(&self) -> Result<(), Error> {
        check_level(self.level)?;
        if !(self.t_ref_k.is_finite() && self.t_ref_k > 0.0) {
            return Err(Error::InvalidReferenceTemperature(self.t_ref_k));
        }
        if !self.allow_extreme_temperatures && !is_plausible_temperature(self.t_ref_k) {
            return Err(Error::ImplausibleReferenceTemperature(self.t_ref_k));
        }
        let t = self.thresholds;
        for (name, value) in [
            ("outlier_studentized", t.outlier_studentized),
            ("leverage_factor", t.leverage_factor),
            ("cooks_factor", t.cooks_factor),
        ] {
            if !(value.is_finite() && value > 0.0) {
                return Err(Error::InvalidThreshold { name, value });
            }
        }
        Ok(())
    }
}

/// Checks a confidence level lies in the open interval (0, 1) and is at most
/// [`MAX_LEVEL`].
///
/// # Errors
/// [`Error::InvalidLevel`] outside (0, 1); [`Error::LevelTooCloseToOne`] above
/// [`MAX_LEVEL`].
pub fn check_level(level: f64) -> Result<(), Error> {
    if !(level.is_finite() && level > 0.0 && level < 1.0) {
        Err(Error::InvalidLevel(level))
    } else if level > MAX_LEVEL {
        Err(Error::LevelTooCloseToOne(level))
    } else {
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cp_column_vanishes_at_reference_with_zero_slope() {
        // At T = θ the ΔCp° term and its first derivative are zero, so ΔH°(θ), ΔS°(θ) keep
        // their meaning (analytic property of the Clarke–Glew form).
        let theta = 310.0;
        let row = Model::CONSTANT_CP.row(theta, theta);
        assert!(row[2].abs() < 1e-18);
        let h = 1e-3;
        let d = (Model::CONSTANT_CP.row(theta + h, theta)[2]
            - Model::CONSTANT_CP.row(theta - h, theta)[2])
            / (2.0 * h);
        assert!(d.abs() < 1e-9);
    }

    #[test]
    fn bad_options_are_refused() {
        let mut o = FitOptions::default();
        assert!(o.validate().is_ok());
        o.level = 1.0;
        assert!(o.validate().is_err());
        o.level = 0.9;
        o.t_ref_k = -3.0;
        assert!(o.validate().is_err());
        o.t_ref_k = 300.0;
        o.thresholds.cooks_factor = f64::NAN;
        assert!(o.validate().is_err());
    }

    #[test]
    fn sigma_conventions_are_written_by_their_new_names_and_read_by_the_old_too() {
        use SigmaConvention::*;
        // The names of DEVELOPERS.md's vocabulary table.
        assert_eq!(
            serde_json::to_string(&Absolute).unwrap(),
            "\"known_uncertainties\""
        );
        assert_eq!(
            serde_json::to_string(&ScaledByFit).unwrap(),
            "\"relative_weights\""
        );
        // Projects saved before the rename keep their meaning.
        for (text, c) in [
            ("\"absolute\"", Absolute),
            ("\"scaled_by_fit\"", ScaledByFit),
            ("\"known_uncertainties\"", Absolute),
            ("\"relative_weights\"", ScaledByFit),
        ] {
            assert_eq!(serde_json::from_str::<SigmaConvention>(text).unwrap(), c);
        }
        for c in SigmaConvention::ALL {
            assert_eq!(SigmaConvention::from_key(c.key()), Some(c));
            assert_eq!(SigmaConvention::from_key(c.cli_name()), Some(c));
        }
        assert_eq!(SigmaConvention::from_key("absolute"), Some(Absolute));
        assert_eq!(SigmaConvention::from_key("relative"), None);
    }
}
