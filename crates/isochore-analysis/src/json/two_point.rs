//! `vhfit two-point --json`: the hand calculation in either direction, with the inputs as
//! typed and in kelvin.

use super::EstimateJson;
use crate::report::VERSION;
use isochore_fit::Estimate;
use serde::Serialize;

/// The temperatures and K₁ as given, common to both directions.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TwoPointInputs {
    /// T₁ in kelvin.
    pub t1_k: f64,
    /// T₂ in kelvin.
    pub t2_k: f64,
    /// K₁.
    pub k1: f64,
    /// Confidence level.
    pub level: f64,
    /// T₁ as typed.
    pub t1: f64,
    /// T₂ as typed.
    pub t2: f64,
    /// The unit T₁ and T₂ were typed in: "C", "K" or "F".
    pub temp_unit: &'static str,
    /// Whether the unit was assumed (°C) because none was given.
    pub temp_unit_assumed: bool,
}

/// ΔH° and ΔS° from two (T, K) pairs.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EnthalpyJson {
    /// "enthalpy".
    pub direction: &'static str,
    /// The inputs.
    #[serde(flatten)]
    pub inputs: TwoPointInputs,
    /// K₂.
    pub k2: f64,
    /// ΔH°, J/mol.
    pub delta_h: EstimateJson,
    /// ΔS°, J mol⁻¹ K⁻¹.
    pub delta_s: EstimateJson,
    /// The program's version.
    pub version: &'static str,
}

impl EnthalpyJson {
    /// The document.
    pub fn new(inputs: TwoPointInputs, k2: f64, delta_h: &Estimate, delta_s: &Estimate) -> Self {
        EnthalpyJson {
            direction: "enthalpy",
            inputs,
            k2,
            delta_h: EstimateJson::of(delta_h),
            delta_s: EstimateJson::of(delta_s),
            version: VERSION,
        }
    }
}

/// K₂ at T₂ from (T₁, K₁) and ΔH°.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct KJson {
    /// "k".
    pub direction: &'static str,
    /// The inputs.
    #[serde(flatten)]
    pub inputs: TwoPointInputs,
    /// ΔH° given, J/mol.
    pub delta_h: f64,
    /// ln K₂.
    pub ln_k2: EstimateJson,
    /// K₂.
    pub k2: EstimateJson,
    /// The program's version.
    pub version: &'static str,
}

impl KJson {
    /// The document.
    pub fn new(inputs: TwoPointInputs, delta_h: f64, ln_k2: &Estimate, k2: &Estimate) -> Self {
        KJson {
            direction: "k",
            inputs,
            delta_h,
            ln_k2: EstimateJson::of(ln_k2),
            k2: EstimateJson::of(k2),
            version: VERSION,
        }
    }
}
