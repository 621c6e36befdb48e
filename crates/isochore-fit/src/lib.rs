//! # isochore-fit
//!
//! The statistics of Isochore: weighted least-squares van 't Hoff regression written
//! directly in thermodynamic parameters, with honest uncertainties, per-point diagnostics
//! and the constant-ΔCp° model. Pure computation: no I/O, no clocks, no GUI; threads only
//! to spread the draws of [`intervals`] over the cores (rayon).
//!
//! ## Brief overview
//! - [`Measurement`]: one point on the fitting scale (T in K, ln K, optional σ(ln K),
//!   included or not). [`units`] converts lab quantities (°C, pKa, K_d in µM, ΔG° in
//!   kcal/mol, …) to that scale.
//! - [`fit`] with [`FitOptions`] returns a [`VantHoffFit`]: estimates of ΔH°, ΔS°
//!   (and ΔCp°) with covariance, [`FitStatistics`], [`PointDiagnostics`] for every point,
//!   the [`ModelComparison`] of linear vs ΔCp° and [`Warning`]s in words.
//! - Methods on [`VantHoffFit`] derive ΔG°(T), ΔH°(T), ΔS°(T), predictions of K with
//!   confidence and prediction intervals, bands, the (ΔH°, ΔS°) ellipse and the temperature
//!   for a target K.
//! - [`two_point`] is the hand calculation with propagated uncertainty.
//! - [`intervals`] gives Monte Carlo (GUM Supplement 1) and bootstrap (percentile, BCa)
//!   intervals of the parameters and derived quantities, reproducible from a seed.
//! - [`average_replicates`] makes one point of replicates at one temperature.
//! - [`least_squares`] is the general Householder-QR solver underneath.
//!
//! All energies are J/mol and entropies and heat capacities J mol⁻¹ K⁻¹.
//!
//! ```
//! use isochore_fit::{fit, FitOptions, Measurement, GAS_CONSTANT};
//! let data: Vec<Measurement> = [(283.15, 0.02), (293.15, 0.03), (303.15, 0.02), (313.15, 0.025)]
//!     .iter()
//!     .map(|&(t, s)| Measurement::new(t, -30e3 / (GAS_CONSTANT * t) + 20.0 / GAS_CONSTANT).with_sigma(s))
//!     .collect();
//! let result = fit(&data, &FitOptions::default()).unwrap();
//! assert!((result.delta_h().value - 30e3).abs() < 1e-6);
//! let at_37 = result.predict(310.15).unwrap();
//! assert!(!at_37.extrapolated);
//! ```

#![deny(missing_docs)]

pub mod calorimetric;
pub mod derived;
pub mod diagnostics;
pub mod enthalpy_zero;
pub mod error;
pub mod errors_in_t;
mod fast;
pub mod global;
pub mod influence;
pub mod intervals;
pub mod least_squares;
pub mod measurement;
pub mod model;
pub mod models;
pub mod replicates;
pub mod stats;
pub mod two_point;
pub mod units;
pub mod vant_hoff;

pub use derived::{BandPoint, Interval, Prediction, ValuePrediction};
pub use diagnostics::{FlagKind, Flags, PointDiagnostics, PointIter};
pub use error::Error;
pub use global::{
    fit_global, test_equal_across_series, EqualityMethod, EqualityTest, GlobalColumn, GlobalError,
    GlobalFit, SeriesDifference, SeriesInput, Sharing, SharingMap,
};
pub use measurement::Measurement;
pub use model::{
    count_distinct_temperatures, is_plausible_temperature, FitOptions, FlagThresholds, Model,
    SigmaConvention, Weighting, DEFAULT_REFERENCE_K, MAX_LEVEL, MAX_PLAUSIBLE_K, MIN_PLAUSIBLE_K,
    TEMPERATURE_RESOLUTION_K,
};
pub use models::{ModelSpec, ParamDimension, ParamInfo};
pub use replicates::average_replicates;
pub use units::{ConcentrationUnit, EnergyUnit, QuantityKind, TemperatureUnit};
pub use vant_hoff::{
    compare_models, fit, fit_estimates_first, fit_shared, fit_to_verdict, ComparisonStep,
    CompletedComparison, Estimate, FitStatistics, ModelComparison, Parameter, PendingComparison,
    StepTest, ThermoAt, VantHoffFit, Warning, WarningKind,
};

/// Molar gas constant R in J mol⁻¹ K⁻¹ (CODATA 2018; exact in the 2019 SI, as N_A·k_B).
pub const GAS_CONSTANT: f64 = 8.314_462_618;

/// The version of this crate, recorded in reports and project files.
pub const VERSION: &str = env!("CARGO_PKG_VERSION");
