//! How units are shown: the display unit of each kind of quantity for the energy unit the
//! chemist chose, and temperatures in the chosen temperature unit.
//!
//! The ΔS° rule lives here and nowhere else: entropies and heat capacities are quoted per
//! kelvin in the *small* unit of the energy family — J mol⁻¹ K⁻¹ beside J/mol and kJ/mol,
//! cal mol⁻¹ K⁻¹ beside kcal/mol — as chemists tabulate them; dΔCp°/dT follows ΔCp° (per
//! K², in J or cal).

use super::number::fixed;
use isochore_fit::{EnergyUnit, Estimate, ParamDimension, TemperatureUnit};

/// A display unit: how many SI units (J/mol, J mol⁻¹ K⁻¹, …) one of it holds, and its
/// symbol.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Unit {
    /// SI units in one of this unit (1000 for kJ/mol, 4.184 for cal/(mol·K)).
    pub si_per_unit: f64,
    /// The symbol, e.g. "kJ/mol", "J/(mol·K)".
    pub symbol: &'static str,
}

impl Unit {
    /// An SI value in this unit.
    pub fn from_si(self, v: f64) -> f64 {
        v / self.si_per_unit
    }

    /// An SI estimate (value, SE, interval) in this unit.
    pub fn estimate(self, e: Estimate) -> Estimate {
        e.scaled(1.0 / self.si_per_unit)
    }
}

/// A per-kelvin unit in the small unit of `e`'s family: `joule` with J/mol and kJ/mol,
/// `calorie` (1 cal = 4.184 J, thermochemical) with kcal/mol.
fn small_unit(e: EnergyUnit, joule: &'static str, calorie: &'static str) -> Unit {
    match e {
        EnergyUnit::KilocaloriePerMole => Unit {
            si_per_unit: isochore_fit::units::JOULES_PER_CALORIE,
            symbol: calorie,
        },
        EnergyUnit::JoulePerMole | EnergyUnit::KilojoulePerMole => Unit {
            si_per_unit: 1.0,
            symbol: joule,
        },
    }
}

/// Energies (ΔH°, ΔG°) in the chosen unit.
pub fn energy(e: EnergyUnit) -> Unit {
    Unit {
        si_per_unit: e.joules_per_mole(),
        symbol: e.symbol(),
    }
}

/// Entropies and heat capacities (ΔS°, ΔCp°): J/(mol·K) with J/mol and kJ/mol,
/// cal/(mol·K) with kcal/mol (the ΔS° rule).
pub fn per_kelvin(e: EnergyUnit) -> Unit {
    small_unit(e, "J/(mol·K)", "cal/(mol·K)")
}

/// Heat-capacity slopes (dΔCp°/dT): J/(mol·K²), or cal/(mol·K²) with kcal/mol.
pub fn per_kelvin_squared(e: EnergyUnit) -> Unit {
    small_unit(e, "J/(mol·K²)", "cal/(mol·K²)")
}

/// The display unit of a quantity of dimension `d` for the energy unit `e`.
pub fn unit_of(d: ParamDimension, e: EnergyUnit) -> Unit {
    match d {
        ParamDimension::Energy => energy(e),
        ParamDimension::Entropy | ParamDimension::HeatCapacity => per_kelvin(e),
        ParamDimension::HeatCapacitySlope => per_kelvin_squared(e),
    }
}

/// How many temperature derivatives of ΔH° a quantity of dimension `d` is: 0 for ΔH° and
/// ΔS° (the integration constants), 1 for ΔCp°, 2 for dΔCp°/dT. A parameter varies with
/// temperature exactly when its model also fits one of a higher order.
pub fn order(d: ParamDimension) -> u8 {
    match d {
        ParamDimension::Energy | ParamDimension::Entropy => 0,
        ParamDimension::HeatCapacity => 1,
        ParamDimension::HeatCapacitySlope => 2,
    }
}

/// A temperature in kelvin shown in `unit` with two decimals, e.g. "25.00 °C".
pub fn show_t(t_k: f64, unit: TemperatureUnit) -> String {
    show_t_with(t_k, unit, 2)
}

/// A temperature in kelvin shown in `unit` with `decimals` decimals.
pub fn show_t_with(t_k: f64, unit: TemperatureUnit, decimals: usize) -> String {
    format!(
        "{} {}",
        fixed(unit.from_kelvin(t_k), decimals),
        unit.symbol()
    )
}

/// A temperature *difference* or standard error in kelvin, in `unit` (no offset; °F
/// degrees are 5/9 K).
pub fn t_difference(v: f64, unit: TemperatureUnit) -> f64 {
    match unit {
        TemperatureUnit::Fahrenheit => v * 9.0 / 5.0,
        _ => v,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn entropy_is_per_kelvin_in_the_small_unit() {
        // kJ/mol does not make ΔS° kJ/(mol·K): chemists quote J mol⁻¹ K⁻¹ (common practice).
        assert_eq!(per_kelvin(EnergyUnit::KilojoulePerMole).symbol, "J/(mol·K)");
        assert_eq!(per_kelvin(EnergyUnit::KilojoulePerMole).si_per_unit, 1.0);
        assert_eq!(per_kelvin(EnergyUnit::JoulePerMole).symbol, "J/(mol·K)");
        // kcal/mol goes with cal/(mol·K): 1 cal (thermochemical) = 4.184 J exactly
        // (NIST SP 811, B.8).
        let cal = per_kelvin(EnergyUnit::KilocaloriePerMole);
        assert_eq!(cal.symbol, "cal/(mol·K)");
        assert!((cal.from_si(4.184) - 1.0).abs() < 1e-15);
        assert_eq!(
            unit_of(ParamDimension::HeatCapacity, EnergyUnit::KilojoulePerMole),
            per_kelvin(EnergyUnit::KilojoulePerMole)
        );
        assert_eq!(
            unit_of(
                ParamDimension::HeatCapacitySlope,
                EnergyUnit::KilojoulePerMole
            )
            .symbol,
            "J/(mol·K²)"
        );
        assert_eq!(
            unit_of(
                ParamDimension::HeatCapacitySlope,
                EnergyUnit::KilocaloriePerMole
            )
            .symbol,
            "cal/(mol·K²)"
        );
    }

    #[test]
    fn energies_follow_the_chosen_unit() {
        let kj = energy(EnergyUnit::KilojoulePerMole);
        assert_eq!(kj.symbol, "kJ/mol");
        assert!((kj.from_si(-48_210.0) + 48.21).abs() < 1e-12);
        let kcal = energy(EnergyUnit::KilocaloriePerMole);
        // 4184 J = 1 kcal (thermochemical, NIST SP 811, B.8).
        assert!((kcal.from_si(4184.0) - 1.0).abs() < 1e-15);
        let e = kcal.estimate(Estimate {
            value: -8368.0,
            se: 418.4,
            ci_low: -9000.0,
            ci_high: -7000.0,
        });
        assert!((e.value + 2.0).abs() < 1e-12 && (e.se - 0.1).abs() < 1e-12);
    }

    #[test]
    fn temperatures_and_their_differences() {
        assert_eq!(show_t(298.15, TemperatureUnit::Celsius), "25.00 °C");
        assert_eq!(show_t(298.15, TemperatureUnit::Kelvin), "298.15 K");
        assert_eq!(show_t(f64::NAN, TemperatureUnit::Kelvin), "— K");
        // A 1 K difference is 1.8 °F; in °C it stays 1.
        assert!((t_difference(1.0, TemperatureUnit::Fahrenheit) - 1.8).abs() < 1e-15);
        assert_eq!(t_difference(1.0, TemperatureUnit::Celsius), 1.0);
    }

    #[test]
    fn only_higher_orders_make_a_parameter_vary() {
        use ParamDimension::*;
        assert!(order(HeatCapacity) > order(Entropy));
        assert!(order(HeatCapacitySlope) > order(HeatCapacity));
        assert_eq!(order(Energy), order(Entropy));
    }
}

/// A warning of the fit as the chemist reads it: the temperatures of the extrapolation
/// warning (θ, the measured range, T_hm) in the display unit, as everywhere else on the
/// screen or page; every other warning as isochore-fit wrote it (their temperatures, if
/// any, are differences, which read the same in K and °C).
pub fn warning_in_unit(
    w: &isochore_fit::Warning,
    fit: &isochore_fit::VantHoffFit,
    unit: TemperatureUnit,
) -> String {
    if w.kind != isochore_fit::WarningKind::Extrapolation || unit == TemperatureUnit::Kelvin {
        return w.message.clone();
    }
    format!(
        "the reference temperature θ = {} lies outside the measured range {}–{}: the values quoted at θ are extrapolations, valid only if the model holds there ({}); a θ inside the range, near T_hm = {}, is better determined",
        show_t(fit.options().t_ref_k, unit),
        fixed(unit.from_kelvin(fit.t_min_k()), 2),
        show_t(fit.t_max_k(), unit),
        fit.options().model.assumption(),
        show_t(fit.t_harmonic_k(), unit),
    )
}

#[cfg(test)]
mod warning_tests {
    use super::*;
    use isochore_fit::{fit, FitOptions, Measurement, TemperatureUnit as T, WarningKind};

    #[test]
    fn the_extrapolation_warning_speaks_the_display_unit() {
        // Invented points at 10–40 °C, θ = 80 °C (353.15 K), outside the range.
        let pts: Vec<Measurement> = [283.15, 293.15, 303.15, 313.15]
            .iter()
            .enumerate()
            .map(|(i, &t)| {
                Measurement::new(t, 5000.0 / t - 10.0 + 0.01 * i as f64).with_sigma(0.05)
            })
            .collect();
        let opts = FitOptions {
            t_ref_k: 353.15,
            ..FitOptions::default()
        };
        let f = fit(&pts, &opts).unwrap();
        let w = f
            .warnings()
            .iter()
            .find(|w| w.kind == WarningKind::Extrapolation)
            .expect("an extrapolation warning");
        let c = warning_in_unit(w, &f, T::Celsius);
        // 353.15 K = 80 °C, 283.15 K = 10 °C, 313.15 K = 40 °C (T/°C = T/K − 273.15).
        assert!(c.contains("θ = 80.00 °C"), "{c}");
        assert!(c.contains("range 10.00–40.00 °C"), "{c}");
        assert!(!c.contains(" K"), "{c}");
        assert_eq!(warning_in_unit(w, &f, T::Kelvin), w.message);
    }
}
