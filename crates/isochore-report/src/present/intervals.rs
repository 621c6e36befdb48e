//! How a Monte Carlo or bootstrap run is shown (issue 13): the line that says which method
//! made the intervals, one row per quantity with the resampled interval beside the delta
//! method's, in the chosen units, and for reports the methods paragraph and the table that
//! compares the delta method, Monte Carlo and the bootstrap. The command line's text and the reports take these
//! rows; the names of the methods are [`super::names::interval_method`]'s.

use super::names::{bootstrap_scheme, interval_method, T_HM};
use super::number::{decimals_for, fixed, percent, times_ten, MISSING};
use super::rows::varies_with_t;
use super::units::{show_t, unit_of};
use isochore_fit::intervals::{
    IntervalMethod, IntervalRun, QuantityKind, QuantityResult, Resampling,
};
use isochore_fit::{EnergyUnit, Estimate, ParamDimension, TemperatureUnit, VantHoffFit};

/// One row: a quantity with its resampled interval and the delta method's.
#[derive(Debug, Clone, PartialEq)]
pub struct IntervalRow {
    /// The quantity in words: "ΔH°(θ)", "ΔCp°" (constant-ΔCp° model; "ΔCp°(θ)" where it
    /// varies with T), "ΔG° at θ = 25.00 °C", "T where K = 1".
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

/// The quantity's name as the rows write it ("ΔH°(θ)", "ΔCp°", "ΔG° at θ = 25.00 °C", "T
/// where K = 1") — the name of DEVELOPERS.md's vocabulary, where the JSON writes its key
/// (`delta_h`, `delta_g_at_reference`, `t_at_k1`).
pub fn quantity_name(fit: &VantHoffFit, q: &QuantityResult, tu: TemperatureUnit) -> String {
    name_and_dimension(fit, q, tu).0
}

/// The run's cautions in the vocabulary's words: a caution about one quantity starts with
/// its name ([`quantity_name`]: "T where K = 1: undefined in 433 of 10000 draws; …") where
/// isochore-fit, and the JSON's `warnings`, start it with the quantity's key (`t_at_k1`).
/// Cautions about the run as a whole are as isochore-fit writes them.
pub fn run_warnings(fit: &VantHoffFit, run: &IntervalRun, tu: TemperatureUnit) -> Vec<String> {
    run.warnings
        .iter()
        .map(|w| {
            run.quantities
                .iter()
                .find_map(|q| {
                    w.strip_prefix(q.quantity.key.as_str())
                        .and_then(|rest| rest.strip_prefix(": "))
                        .map(|rest| format!("{}: {rest}", quantity_name(fit, q, tu)))
                })
                .unwrap_or_else(|| w.clone())
        })
        .collect()
}

/// The quantity's name and, where it has one, the dimension of its unit.
fn name_and_dimension(
    fit: &VantHoffFit,
    q: &QuantityResult,
    tu: TemperatureUnit,
) -> (String, Option<ParamDimension>) {
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
    match q.quantity.kind {
        QuantityKind::Parameter { index } => {
            let p = &fit.params()[index];
            // "(θ)" only where the parameter varies with T (the rule of the results rows):
            // ΔH° and ΔS° of the ΔCp° models, ΔCp° of Clarke–Glew; the constant-ΔCp°
            // model's ΔCp° is a constant.
            (
                if varies_with_t(fit.model(), p.info) {
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
        QuantityKind::TemperatureForK { k_target: 1.0 } => {
            (super::names::T_AT_K1.to_string(), None)
        }
        QuantityKind::TemperatureForK { k_target } => {
            (format!("T where K = {}", times_ten(k_target, 4)), None)
        }
        QuantityKind::TemperatureDeltaHZero => (super::names::T_DELTA_H_ZERO.to_string(), None),
    }
}

fn row(fit: &VantHoffFit, q: &QuantityResult, e: EnergyUnit, tu: TemperatureUnit) -> IntervalRow {
    let best = q.best();
    let (quantity, dimension) = name_and_dimension(fit, q, tu);
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

/// The methods paragraph of a report whose intervals were also made by resampling: what was
/// drawn, how many draws from which seed, how each interval is read, and the caution about
/// the bootstrap with few points.
pub fn methods_paragraph(fit: &VantHoffFit, runs: &[IntervalRun]) -> String {
    let Some(first) = runs.first() else {
        return String::new();
    };
    let mut s = format!(
        "Besides the delta method (first-order propagation of the covariance; Fieller's interval for a temperature where K or ΔH° reaches a value), the {}% intervals were made by resampling, {} draws each from seed {} (a ChaCha8 generator with one stream per draw, so the same seed gives the same numbers on any machine).",
        percent(first.level),
        first.draws,
        first.seed
    );
    for run in runs {
        match run.resampling {
            Resampling::MonteCarlo => {
                s.push_str(" Monte Carlo (GUM Supplement 1): each ln K was drawn from a normal distribution about its measured value with its σ");
                let scaled = fit.options().convention == isochore_fit::SigmaConvention::ScaledByFit
                    || !fit.weighted();
                if scaled {
                    s.push_str(&format!(
                        ", scaled by the residual SD, itself drawn from its χ² distribution with {} degrees of freedom (σ are relative weights only)",
                        fit.dof()
                    ));
                }
                s.push_str(", and the model refitted; the interval runs between the percentiles that leave equal shares outside, and the SE is the SD of the draws.");
            }
            Resampling::Bootstrap(scheme) => {
                s.push_str(&format!(
                    " {}: new data sets were made from the fit's {} and refitted; the interval is BCa (Efron 1987, acceleration from the jackknife) where defined, else the percentile interval, and the SE is the SD of the bootstrap values.",
                    capitalised(bootstrap_scheme(scheme)),
                    match scheme {
                        isochore_fit::intervals::BootstrapScheme::Residuals => "leverage-corrected residuals, drawn with replacement",
                        isochore_fit::intervals::BootstrapScheme::Wild => "residuals, each kept at its point with a random sign",
                        isochore_fit::intervals::BootstrapScheme::Cases => "points, drawn with replacement",
                    }
                ));
            }
        }
    }
    if runs
        .iter()
        .any(|r| matches!(r.resampling, Resampling::Bootstrap(_)))
        && fit.n_used() < 20
    {
        s.push_str(&format!(
            " With {} points the bootstrap intervals are expected to be too narrow (about 90 % coverage for a nominal 95 % in simulations with 8 and 12 points, isochore-fit's documentation): read them as a check on the assumptions, not as the result.",
            fit.n_used()
        ));
    }
    s
}

/// The sentence a report adds to the methods paragraph when the data set has σ(T): Monte
/// Carlo is then centred on the fit with errors in T, the bootstrap on the fit in K only.
pub const WITH_SIGMA_T: &str = "The temperatures carry σ(T): Monte Carlo drew each temperature too and refitted every draw with errors in T, so its intervals, and the value and delta-method columns of the table below, belong to the fit with errors in T (see “Fit with errors in T”); the bootstrap resamples the fit in K only, whose own estimates are in the results above.";

/// The table comparing the delta method with each run: one row per quantity of the first
/// run, the value, then the interval of each method, then the unit. Returns (header, rows).
pub fn comparison_table(
    fit: &VantHoffFit,
    runs: &[IntervalRun],
    e: EnergyUnit,
    tu: TemperatureUnit,
) -> (Vec<String>, Vec<Vec<String>>) {
    let Some(first) = runs.first() else {
        return (Vec::new(), Vec::new());
    };
    let mut header = vec![
        "quantity".to_string(),
        "value".to_string(),
        "delta method".to_string(),
    ];
    for run in runs {
        header.push(match run.resampling {
            Resampling::MonteCarlo => "Monte Carlo".to_string(),
            Resampling::Bootstrap(s) => bootstrap_scheme(s).to_string(),
        });
    }
    header.push("unit".to_string());
    let rows = first
        .quantities
        .iter()
        .map(|q| {
            let r = row(fit, q, e, tu);
            let mut cells = vec![r.quantity.clone(), r.value.clone()];
            cells.push(
                if r.delta_method == interval_method(IntervalMethod::Delta) {
                    r.delta.clone()
                } else {
                    format!("{} ({})", r.delta, r.delta_method)
                },
            );
            for run in runs {
                cells.push(match run.get(&q.quantity.key) {
                    Some(other) => {
                        let o = row(fit, other, e, tu);
                        if matches!(run.resampling, Resampling::Bootstrap(_)) {
                            format!(
                                "{} ({})",
                                o.interval,
                                o.method.trim_start_matches("bootstrap ")
                            )
                        } else {
                            o.interval
                        }
                    }
                    None => MISSING.to_string(),
                });
            }
            cells.push(r.unit);
            cells
        })
        .collect();
    (header, rows)
}

/// `s` with its first letter in capitals.
fn capitalised(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_uppercase().chain(c).collect(),
        None => String::new(),
    }
}
