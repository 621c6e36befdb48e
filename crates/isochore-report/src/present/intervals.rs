//! How a Monte Carlo or bootstrap run is shown (issue 13): the line that says which method
//! made the intervals, and one row per quantity with the resampled interval beside the
//! delta method's, in the chosen units. The command line's text and the reports take these
//! rows; the names of the methods are [`super::names::interval_method`]'s.

use super::names::{bootstrap_scheme, interval_method, T_HM};
use super::number::{decimals_for, fixed, percent, times_ten, MISSING};
use super::units::{show_t, unit_of};
use isochore_fit::intervals::{IntervalRun, QuantityKind, QuantityResult, Resampling};
use isochore_fit::{EnergyUnit, Estimate, ParamDimension, TemperatureUnit, VantHoffFit};

/// One row: a quantity with its resampled interval and the delta method's.
#[derive(Debug, Clone, PartialEq)]
pub struct IntervalRow {
    /// The quantity in words: "ΔH°(θ)", "ΔG° at θ = 25.00 °C", "T where K = 1".
    pub quantity: String,
    /// The estimate.
    pub value: String,
    /// SD of the draws.
    pub se: String,
    /// The resampled interval, "[low, high]".
    pub interval: String,
    /// What made it ("Monte Carlo", "bootstrap BCa", …).
    pub method: &'static str,
    /// The delta method's interval (Fieller's for a temperature at a target K or where
    /// ΔH° = 0), "[low, high]".
    pub delta: String,
    /// What made [`IntervalRow::delta`]: "delta method" or "Fieller".
    pub delta_method: &'static str,
    /// The unit of the numbers.
    pub unit: String,
}

/// "95% intervals by Monte Carlo (GUM Supplement 1), 10000 draws, seed 1" or "95% intervals
/// by bootstrap of leverage-corrected residuals, 10000 draws, seed 1".
pub fn method_line(run: &IntervalRun) -> String {
    let what = match run.resampling {
        Resampling::MonteCarlo => "Monte Carlo (GUM Supplement 1)".to_string(),
        Resampling::Bootstrap(s) => bootstrap_scheme(s).to_string(),
    };
    format!(
        "{}% intervals by {what}, {} draws, seed {}",
        percent(run.level),
        run.draws,
        run.seed
    )
}

fn pair(lo: String, hi: String) -> String {
    format!("[{lo}, {hi}]")
}

/// The rows of `run` for `fit`, energies in `e` and temperatures in `tu` (differences and
/// the temperatures of a root in kelvin).
pub fn interval_rows(
    fit: &VantHoffFit,
    run: &IntervalRun,
    e: EnergyUnit,
    tu: TemperatureUnit,
) -> Vec<IntervalRow> {
    run.quantities.iter().map(|q| row(fit, q, e, tu)).collect()
}

fn row(fit: &VantHoffFit, q: &QuantityResult, e: EnergyUnit, tu: TemperatureUnit) -> IntervalRow {
    let best = q.best();
    let theta = fit.options().t_ref_k;
    let at = |t: f64| {
        if t == theta {
            format!("θ = {}", show_t(t, tu))
        } else if t == fit.t_harmonic_k() {
            format!("{T_HM} = {}", show_t(t, tu))
        } else {
            show_t(t, tu)
        }
    };
    let (quantity, dimension): (String, Option<ParamDimension>) = match q.quantity.kind {
        QuantityKind::Parameter { index } => {
            let p = &fit.params()[index];
            let varies = p.info.at_reference && fit.model().has_heat_capacity();
            (
                if varies {
                    format!("{}(θ)", p.info.symbol)
                } else {
                    p.info.symbol.to_string()
                },
                Some(p.info.dimension),
            )
        }
        QuantityKind::DeltaG { t_k } => {
            (format!("ΔG° at {}", at(t_k)), Some(ParamDimension::Energy))
        }
        QuantityKind::DeltaH { t_k } => {
            (format!("ΔH° at {}", at(t_k)), Some(ParamDimension::Energy))
        }
        QuantityKind::DeltaS { t_k } => {
            (format!("ΔS° at {}", at(t_k)), Some(ParamDimension::Entropy))
        }
        QuantityKind::K { t_k } => (format!("K at {}", at(t_k)), None),
        QuantityKind::TemperatureForK { k_target } => {
            (format!("T where K = {}", times_ten(k_target, 4)), None)
        }
        QuantityKind::TemperatureDeltaHZero => ("T where ΔH° = 0".to_string(), None),
    };
    let is_k = matches!(q.quantity.kind, QuantityKind::K { .. });
    let (scale, unit) = match dimension {
        Some(d) => {
            let u = unit_of(d, e);
            (u.si_per_unit, u.symbol.to_string())
        }
        None if is_k => (1.0, String::new()),
        None => (1.0, "K".to_string()),
    };
    let shown = |est: Estimate| est.scaled(1.0 / scale);
    let b = shown(best.estimate());
    let d = shown(q.quantity.delta);
    let fmt = |v: f64, se: f64| -> String {
        if !v.is_finite() {
            MISSING.to_string()
        } else if is_k {
            times_ten(v, 4)
        } else {
            fixed(v, decimals_for(se))
        }
    };
    IntervalRow {
        quantity,
        value: fmt(b.value, d.se),
        se: fmt(b.se, d.se),
        interval: pair(fmt(b.ci_low, d.se), fmt(b.ci_high, d.se)),
        method: interval_method(best.method),
        delta: pair(fmt(d.ci_low, d.se), fmt(d.ci_high, d.se)),
        delta_method: interval_method(q.quantity.delta_method),
        unit,
    }
}
