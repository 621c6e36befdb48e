//! Units of the quantities a lab writes down, and their conversion to the fitting scale.
//!
//! The fit works in kelvin, ln K (dimensionless, association sense) and J/mol. This module
//! owns the conversions from what a chemist measures: temperature in °C, K or °F; the
//! equilibrium quantity as K, ln K, log₁₀ K, pK (−log₁₀ K), a dissociation constant with a
//! concentration unit, or ΔG°; and an uncertainty in any of those, converted to σ(ln K)
//! by first-order propagation.
//!
//! It does not parse text: `isochore-data` reads headers and hands over these enums.

use crate::error::Error;
use crate::GAS_CONSTANT;
use serde::{Deserialize, Serialize};

/// Standard concentration c° = 1 mol/L, used to turn a dissociation constant into a
/// dimensionless association constant K = c°/K_d.
pub const STANDARD_CONCENTRATION_MOL_PER_L: f64 = 1.0;

/// Joules in one thermochemical calorie (exact by definition).
pub const JOULES_PER_CALORIE: f64 = 4.184;

/// Offset between the Celsius and Kelvin scales (exact by definition).
pub const CELSIUS_OFFSET: f64 = 273.15;

/// A temperature scale.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum TemperatureUnit {
    /// Kelvin.
    #[default]
    Kelvin,
    /// Degrees Celsius: T/K = t/°C + 273.15.
    Celsius,
    /// Degrees Fahrenheit: T/K = (t/°F + 459.67) × 5/9.
    Fahrenheit,
}

impl TemperatureUnit {
    /// Converts a temperature on this scale to kelvin.
    #[inline]
    pub fn to_kelvin(self, value: f64) -> f64 {
        match self {
            TemperatureUnit::Kelvin => value,
            TemperatureUnit::Celsius => value + CELSIUS_OFFSET,
            TemperatureUnit::Fahrenheit => (value + 459.67) * 5.0 / 9.0,
        }
    }

    /// Converts a temperature in kelvin to this scale.
    pub fn from_kelvin(self, kelvin: f64) -> f64 {
        match self {
            TemperatureUnit::Kelvin => kelvin,
            TemperatureUnit::Celsius => kelvin - CELSIUS_OFFSET,
            TemperatureUnit::Fahrenheit => kelvin * 9.0 / 5.0 - 459.67,
        }
    }

    /// Converts a temperature difference (or uncertainty) on this scale to kelvin.
    pub fn difference_to_kelvin(self, value: f64) -> f64 {
        match self {
            TemperatureUnit::Kelvin | TemperatureUnit::Celsius => value,
            TemperatureUnit::Fahrenheit => value * 5.0 / 9.0,
        }
    }

    /// The unit symbol: "K", "°C" or "°F".
    pub fn symbol(self) -> &'static str {
        match self {
            TemperatureUnit::Kelvin => "K",
            TemperatureUnit::Celsius => "°C",
            TemperatureUnit::Fahrenheit => "°F",
        }
    }
}

/// A molar concentration unit, for dissociation constants.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum ConcentrationUnit {
    /// mol/L (M).
    #[default]
    Molar,
    /// mmol/L (mM).
    Millimolar,
    /// µmol/L (µM).
    Micromolar,
    /// nmol/L (nM).
    Nanomolar,
    /// pmol/L (pM).
    Picomolar,
}

impl ConcentrationUnit {
    /// Moles per litre in one of this unit.
    #[inline]
    pub fn mol_per_l(self) -> f64 {
        match self {
            ConcentrationUnit::Molar => 1.0,
            ConcentrationUnit::Millimolar => 1e-3,
            ConcentrationUnit::Micromolar => 1e-6,
            ConcentrationUnit::Nanomolar => 1e-9,
            ConcentrationUnit::Picomolar => 1e-12,
        }
    }

    /// The unit symbol: "M", "mM", "µM", "nM" or "pM".
    pub fn symbol(self) -> &'static str {
        match self {
            ConcentrationUnit::Molar => "M",
            ConcentrationUnit::Millimolar => "mM",
            ConcentrationUnit::Micromolar => "µM",
            ConcentrationUnit::Nanomolar => "nM",
            ConcentrationUnit::Picomolar => "pM",
        }
    }
}

/// A molar energy unit. Energies are held in J/mol and shown in one of these.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case")]
pub enum EnergyUnit {
    /// J/mol.
    JoulePerMole,
    /// kJ/mol.
    #[default]
    KilojoulePerMole,
    /// kcal/mol (thermochemical calorie, 4.184 J).
    KilocaloriePerMole,
}

impl EnergyUnit {
    /// J/mol in one of this unit.
    #[inline]
    pub fn joules_per_mole(self) -> f64 {
        match self {
            EnergyUnit::JoulePerMole => 1.0,
            EnergyUnit::KilojoulePerMole => 1e3,
            EnergyUnit::KilocaloriePerMole => 1e3 * JOULES_PER_CALORIE,
        }
    }

    /// Converts a value in this unit to J/mol.
    #[inline]
    pub fn to_joules(self, value: f64) -> f64 {
        value * self.joules_per_mole()
    }

    /// Converts a value in J/mol to this unit.
    pub fn from_joules(self, joules: f64) -> f64 {
        joules / self.joules_per_mole()
    }

    /// The unit symbol: "J/mol", "kJ/mol" or "kcal/mol".
    pub fn symbol(self) -> &'static str {
        match self {
            EnergyUnit::JoulePerMole => "J/mol",
            EnergyUnit::KilojoulePerMole => "kJ/mol",
            EnergyUnit::KilocaloriePerMole => "kcal/mol",
        }
    }
}

/// What the measured column holds. Every kind converts to ln K of the association-sense,
/// dimensionless equilibrium constant.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "snake_case", tag = "kind", content = "unit")]
pub enum QuantityKind {
    /// K itself (dimensionless, standard state implied).
    #[default]
    K,
    /// Natural logarithm of K.
    LnK,
    /// Decimal logarithm of K.
    Log10K,
    /// pK = −log₁₀ K (pKa, pKw, …).
    PK,
    /// A dissociation constant K_d in a concentration unit; K = c°/K_d with c° = 1 mol/L.
    DissociationConstant(ConcentrationUnit),
    /// Standard Gibbs energy ΔG° = −RT ln K in an energy unit.
    DeltaG(EnergyUnit),
}

impl QuantityKind {
    /// Converts a measured value to ln K at temperature `t_kelvin` (needed only for ΔG°).
    ///
    /// # Formula
    /// ```text
    /// K:   ln K = ln(value)            ln K: ln K = value
    /// log: ln K = value · ln 10        pK:   ln K = −value · ln 10
    /// Kd:  ln K = −ln(value · u / c°)  ΔG°:  ln K = −value · e / (R T)
    /// ```
    /// where u is the concentration unit in mol/L, c° = 1 mol/L, e the energy unit in J/mol,
    /// R the gas constant and T the temperature in kelvin.
    ///
    /// # Errors
    /// [`Error::NonFinite`] for NaN or infinite input, [`Error::NonPositiveConstant`] for
    /// K ≤ 0 or K_d ≤ 0, [`Error::NonPositiveTemperature`] for T ≤ 0 (ΔG° only).
    #[inline]
    pub fn to_ln_k(self, value: f64, t_kelvin: f64) -> Result<f64, Error> {
        if !value.is_finite() {
            return Err(Error::NonFinite {
                what: "measured value",
                index: None,
            });
        }
        let ln10 = std::f64::consts::LN_10;
        let ln_k = match self {
            QuantityKind::K => {
                if value <= 0.0 {
                    return Err(Error::NonPositiveConstant { index: None, value });
                }
                value.ln()
            }
            QuantityKind::LnK => value,
            QuantityKind::Log10K => value * ln10,
            QuantityKind::PK => -value * ln10,
            QuantityKind::DissociationConstant(u) => {
                if value <= 0.0 {
                    return Err(Error::NonPositiveConstant { index: None, value });
                }
                -(value * u.mol_per_l() / STANDARD_CONCENTRATION_MOL_PER_L).ln()
            }
            QuantityKind::DeltaG(e) => {
                check_temperature(t_kelvin)?;
                -e.to_joules(value) / (GAS_CONSTANT * t_kelvin)
            }
        };
        if ln_k.is_finite() {
            Ok(ln_k)
        } else {
            Err(Error::NonFinite {
                what: "ln K",
                index: None,
            })
        }
    }

    /// Converts ln K back to this kind at temperature `t_kelvin` (the inverse of
    /// [`QuantityKind::to_ln_k`]).
    pub fn from_ln_k(self, ln_k: f64, t_kelvin: f64) -> f64 {
        let ln10 = std::f64::consts::LN_10;
        match self {
            QuantityKind::K => ln_k.exp(),
            QuantityKind::LnK => ln_k,
            QuantityKind::Log10K => ln_k / ln10,
            QuantityKind::PK => -ln_k / ln10,
            QuantityKind::DissociationConstant(u) => {
                (-ln_k).exp() * STANDARD_CONCENTRATION_MOL_PER_L / u.mol_per_l()
            }
            QuantityKind::DeltaG(e) => e.from_joules(-GAS_CONSTANT * t_kelvin * ln_k),
        }
    }

    /// Converts an absolute uncertainty σ of the measured value to σ(ln K), to first order.
    ///
    /// # Formula
    /// ```text
    /// K, Kd: σ(ln K) = σ / value     ln K: σ(ln K) = σ
    /// log, pK: σ(ln K) = σ · ln 10    ΔG°:  σ(ln K) = σ · e / (R T)
    /// ```
    ///
    /// # Errors
    /// [`Error::NonPositiveSigma`] for σ ≤ 0, plus the errors of [`QuantityKind::to_ln_k`].
    #[inline]
    pub fn sigma_to_ln_k(self, value: f64, sigma: f64, t_kelvin: f64) -> Result<f64, Error> {
        if !sigma.is_finite() {
            return Err(Error::NonFinite {
                what: "uncertainty",
                index: None,
            });
        }
        if sigma <= 0.0 {
            return Err(Error::NonPositiveSigma {
                index: None,
                value: sigma,
            });
        }
        self.to_ln_k(value, t_kelvin)?;
        let ln10 = std::f64::consts::LN_10;
        let s = match self {
            QuantityKind::K | QuantityKind::DissociationConstant(_) => sigma / value,
            QuantityKind::LnK => sigma,
            QuantityKind::Log10K | QuantityKind::PK => sigma * ln10,
            QuantityKind::DeltaG(e) => e.to_joules(sigma) / (GAS_CONSTANT * t_kelvin),
        };
        if s.is_finite() && s > 0.0 {
            Ok(s)
        } else {
            Err(Error::NonPositiveSigma {
                index: None,
                value: s,
            })
        }
    }

    /// Converts σ(ln K) back to an uncertainty of this kind at `value` (inverse of
    /// [`QuantityKind::sigma_to_ln_k`]).
    pub fn sigma_from_ln_k(self, value: f64, sigma_ln_k: f64, t_kelvin: f64) -> f64 {
        let ln10 = std::f64::consts::LN_10;
        match self {
            QuantityKind::K | QuantityKind::DissociationConstant(_) => sigma_ln_k * value,
            QuantityKind::LnK => sigma_ln_k,
            QuantityKind::Log10K | QuantityKind::PK => sigma_ln_k / ln10,
            QuantityKind::DeltaG(e) => e.from_joules(sigma_ln_k * GAS_CONSTANT * t_kelvin),
        }
    }

    /// A short label for the quantity, e.g. "K", "ln K", "pK", "K_d (µM)", "ΔG° (kJ/mol)".
    pub fn label(self) -> String {
        match self {
            QuantityKind::K => "K".into(),
            QuantityKind::LnK => "ln K".into(),
            QuantityKind::Log10K => "log₁₀ K".into(),
            QuantityKind::PK => "pK".into(),
            QuantityKind::DissociationConstant(u) => format!("K_d ({})", u.symbol()),
            QuantityKind::DeltaG(e) => format!("ΔG° ({})", e.symbol()),
        }
    }
}

/// Checks that a temperature in kelvin is finite and positive.
///
/// # Errors
/// [`Error::NonFinite`] or [`Error::NonPositiveTemperature`].
#[inline]
pub fn check_temperature(t_kelvin: f64) -> Result<(), Error> {
    if !t_kelvin.is_finite() {
        return Err(Error::NonFinite {
            what: "temperature",
            index: None,
        });
    }
    if t_kelvin <= 0.0 {
        return Err(Error::NonPositiveTemperature {
            index: None,
            kelvin: t_kelvin,
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn temperature_fixed_points() {
        // Definitions of the Celsius and Fahrenheit scales (SI Brochure, 9th ed., from memory):
        // 0 °C = 273.15 K; 32 °F = 0 °C; 212 °F = 100 °C.
        assert_eq!(TemperatureUnit::Celsius.to_kelvin(0.0), 273.15);
        assert!((TemperatureUnit::Fahrenheit.to_kelvin(32.0) - 273.15).abs() < 1e-12);
        assert!((TemperatureUnit::Fahrenheit.to_kelvin(212.0) - 373.15).abs() < 1e-12);
        assert!((TemperatureUnit::Fahrenheit.from_kelvin(373.15) - 212.0).abs() < 1e-12);
    }

    #[test]
    fn quantity_kinds_agree_on_one_constant() {
        // K = 1e-7 written seven ways must give one ln K.
        let t = 298.15;
        let ln_k = (1e-7f64).ln();
        let dg = -GAS_CONSTANT * t * ln_k; // J/mol
        let cases = [
            (QuantityKind::K, 1e-7),
            (QuantityKind::LnK, ln_k),
            (QuantityKind::Log10K, -7.0),
            (QuantityKind::PK, 7.0),
            (
                QuantityKind::DissociationConstant(ConcentrationUnit::Micromolar),
                1e13,
            ),
            (QuantityKind::DeltaG(EnergyUnit::KilojoulePerMole), dg / 1e3),
            (
                QuantityKind::DeltaG(EnergyUnit::KilocaloriePerMole),
                // J per kcal: the thermochemical calorie, 4.184 J exactly (NIST SP 811, B.8; from memory).
                dg / 4184.0,
            ),
        ];
        for (kind, v) in cases {
            let got = kind.to_ln_k(v, t).unwrap();
            assert!((got - ln_k).abs() < 1e-12, "{kind:?}: {got} vs {ln_k}");
            let back = kind.from_ln_k(got, t);
            assert!((back - v).abs() <= 1e-12 * v.abs().max(1.0), "{kind:?}");
        }
    }

    #[test]
    fn nonsense_is_refused() {
        assert!(QuantityKind::K.to_ln_k(0.0, 300.0).is_err());
        assert!(QuantityKind::K.to_ln_k(-2.0, 300.0).is_err());
        assert!(QuantityKind::K.to_ln_k(f64::NAN, 300.0).is_err());
        assert!(QuantityKind::DeltaG(EnergyUnit::KilojoulePerMole)
            .to_ln_k(1.0, 0.0)
            .is_err());
        assert!(QuantityKind::PK.sigma_to_ln_k(7.0, 0.0, 300.0).is_err());
        assert!(QuantityKind::PK.sigma_to_ln_k(7.0, -0.1, 300.0).is_err());
        assert!(check_temperature(-1.0).is_err());
    }

    #[test]
    fn sigma_round_trips() {
        let t = 310.0;
        for kind in [
            QuantityKind::K,
            QuantityKind::PK,
            QuantityKind::DeltaG(EnergyUnit::KilocaloriePerMole),
        ] {
            let v = 4.5;
            let s = kind.sigma_to_ln_k(v, 0.05, t).unwrap();
            assert!((kind.sigma_from_ln_k(v, s, t) - 0.05).abs() < 1e-14);
        }
    }
}
