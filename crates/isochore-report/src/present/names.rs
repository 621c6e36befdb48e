//! One name for each concept, as the window, the command line's text, the reports and the
//! README write it (the table of names is in DEVELOPERS.md; JSON keys and command-line
//! values are the fit crate's `key()` and `cli_name()`). A label that names one of these
//! concepts is taken from here, never typed again in a panel or a report.

use isochore_fit::{SigmaConvention, TemperatureUnit};

/// The setting that says what the stated σ mean.
pub const SIGMA_CONVENTION: &str = "σ convention";

/// What the stated σ mean, in the chemist's words: "σ are relative weights only" (the
/// scatter about the fit sets the error scale) or "σ are known standard uncertainties".
pub fn sigma_convention(c: SigmaConvention) -> &'static str {
    match c {
        SigmaConvention::ScaledByFit => "σ are relative weights only",
        SigmaConvention::Absolute => "σ are known standard uncertainties",
    }
}

/// What each σ convention does to the intervals, for hover texts.
pub fn sigma_convention_effect(c: SigmaConvention) -> &'static str {
    match c {
        SigmaConvention::ScaledByFit => {
            "the scatter about the fit sets the error scale (covariance times the reduced χ², Student's t intervals)"
        }
        SigmaConvention::Absolute => {
            "the stated σ set the error scale (no rescaling, normal intervals)"
        }
    }
}

/// The setting that says how points are weighted.
pub const WEIGHTING: &str = "weighting";
/// Each point weighted by 1/σ(ln K)².
pub const WEIGHTED: &str = "weighted by 1/σ²";
/// Every point counts the same and any σ is ignored (`--unweighted`, JSON `unweighted`).
pub const UNWEIGHTED: &str = "unweighted";

/// The weighting a fit used, in words: [`WEIGHTED`] or [`UNWEIGHTED`].
pub fn weighting(weighted: bool) -> &'static str {
    if weighted {
        WEIGHTED
    } else {
        UNWEIGHTED
    }
}

/// A point that takes part in the fit (JSON `used`).
pub const USED: &str = "used";
/// A point left out of the fit by the chemist (`--exclude`).
pub const EXCLUDED: &str = "excluded";

/// The undo label of excluding a row that was used: "exclude row 7".
pub fn exclude_row(row: usize) -> String {
    format!("exclude row {row}")
}

/// The undo label of using an excluded row again: "use row 7 again".
pub fn use_row_again(row: usize) -> String {
    format!("use row {row} again")
}

/// The undo label of changing only the reason of a row already excluded: "reason for
/// excluding row 7".
pub fn exclusion_reason_of_row(row: usize) -> String {
    format!("reason for excluding row {row}")
}

/// The residual the outlier rule tests, by its trade name.
pub const STUDENTIZED: &str = "externally studentized residual";
/// Its short form, for narrow columns and threshold sentences.
pub const STUDENTIZED_SHORT: &str = "ext. stud. residual";
/// The internally studentized residual, short form (the reports' diagnostics table).
pub const STUDENTIZED_INTERNAL_SHORT: &str = "int. stud. residual";

/// The weighted harmonic-mean temperature, by its symbol.
pub const T_HM: &str = "T_hm";
/// What [`T_HM`] is, for notes and hover texts.
pub const T_HM_MEANING: &str =
    "T_hm is the weighted harmonic-mean temperature of the used points (1/T_hm = Σ(w/T) / Σw)";

/// The model the comparison of nested models finds the data support.
pub const SUPPORTED_MODEL: &str = "supported by the data";

/// The comparison's answer as a sentence: "The data support the ΔCp° model."
pub fn data_support(model_name: &str) -> String {
    format!("The data support the {model_name} model.")
}

/// The axis of inverse temperature on van 't Hoff plots.
pub const INVERSE_T_AXIS: &str = "1000 K / T";

/// The axis of temperature in `tu`: "T / °C".
pub fn t_axis(tu: TemperatureUnit) -> String {
    format!("T / {}", tu.symbol())
}

/// An axis of a quantity in a unit, the unit in parentheses so its own slash is not read
/// as a second division: "ΔS° / (J/(mol·K))", "ΔH° / (kJ/mol)".
pub fn quantity_axis(symbol: &str, unit: &str) -> String {
    format!("{symbol} / ({unit})")
}

/// The sign convention of ΔAICc, said once beside the comparison.
pub const DELTA_AICC_SIGN: &str =
    "ΔAICc = AICc(larger model) − AICc(smaller model); a negative ΔAICc favours the larger model";

/// The name of what made an interval (issue 13), in the vocabulary of DEVELOPERS.md: "delta
/// method", "Fieller", "Monte Carlo", "bootstrap percentile", "bootstrap BCa".
pub fn interval_method(m: isochore_fit::intervals::IntervalMethod) -> &'static str {
    use isochore_fit::intervals::IntervalMethod::*;
    match m {
        Delta => "delta method",
        Fieller => "Fieller",
        MonteCarlo => "Monte Carlo",
        BootstrapPercentile => "bootstrap percentile",
        BootstrapBca => "bootstrap BCa",
    }
}

/// The name of a bootstrap scheme: "bootstrap of leverage-corrected residuals", "wild
/// bootstrap (Rademacher weights)", "bootstrap of cases".
pub fn bootstrap_scheme(s: isochore_fit::intervals::BootstrapScheme) -> &'static str {
    use isochore_fit::intervals::BootstrapScheme::*;
    match s {
        Residuals => "bootstrap of leverage-corrected residuals",
        Wild => "wild bootstrap (Rademacher weights)",
        Cases => "bootstrap of cases",
    }
}

/// The setting that chooses what makes the intervals (command line `--intervals`):
/// "intervals by".
pub const INTERVALS_BY: &str = "intervals by";
/// Intervals made by Monte Carlo or the bootstrap, beside the delta method's: the report's
/// section heading and the window's words when such a run fails.
pub const INTERVALS_BY_RESAMPLING: &str = "Intervals by resampling";
/// The number of draws of Monte Carlo or the bootstrap (`--draws`, JSON `intervals.draws`).
pub const DRAWS: &str = "draws";
/// The generator's start value (`--seed`, JSON `intervals.seed`): the same value gives the
/// same draws.
pub const SEED: &str = "seed";

/// A choice of the interval method in words: "delta method", "Monte Carlo", or the
/// bootstrap's scheme ([`bootstrap_scheme`]).
pub fn interval_choice(c: isochore_fit::intervals::IntervalChoice) -> &'static str {
    use isochore_fit::intervals::{IntervalChoice, IntervalMethod};
    match c {
        IntervalChoice::Delta => interval_method(IntervalMethod::Delta),
        IntervalChoice::MonteCarlo => interval_method(IntervalMethod::MonteCarlo),
        IntervalChoice::Bootstrap(s) => bootstrap_scheme(s),
    }
}

/// The temperature's standard uncertainty, in every front end: "σ(T)" (JSON `sigma_t_k`,
/// command line `--sigma-t`, column role `sigma-t`).
pub const SIGMA_T: &str = "σ(T)";
/// The window's field for one σ(T) for every point: "thermometer uncertainty".
pub const THERMOMETER_UNCERTAINTY: &str = "thermometer uncertainty";
/// The fit that allows for σ(T) as well as σ(ln K): "fit with errors in T" (JSON
/// `errors_in_t`).
pub const ERRORS_IN_T: &str = "fit with errors in T";
/// The ordinary fit, beside it: "fit in K only".
pub const K_ONLY: &str = "fit in K only";
/// The fit's estimate of a point's true temperature: "adjusted T" (JSON `t_adjusted_k`).
pub const ADJUSTED_T: &str = "adjusted T";

/// The temperature where K = 1, i.e. ΔG° = 0: "T where K = 1" (JSON `t_at_k1`); the
/// temperature at another target K is "T where K = 1.000 × 10⁵".
pub const T_AT_K1: &str = "T where K = 1";

/// The temperature where ΔH° changes sign (ΔCp° models): "T where ΔH° = 0" (JSON
/// `t_delta_h_zero`).
pub const T_DELTA_H_ZERO: &str = "T where ΔH° = 0";

/// The method of a fit with errors in T: "York's fit" (the linear model) or
/// "orthogonal-distance fit" (JSON `york`, `orthogonal_distance`).
pub fn errors_in_t_method(m: isochore_fit::errors_in_t::ErrorsInTMethod) -> &'static str {
    match m {
        isochore_fit::errors_in_t::ErrorsInTMethod::York => "York's fit",
        isochore_fit::errors_in_t::ErrorsInTMethod::OrthogonalDistance => "orthogonal-distance fit",
    }
}

/// Calorimetric enthalpies compared with the van 't Hoff ΔH°: the reports' section and the
/// window's "Calorimetric ΔH°" window and heading (DEVELOPERS.md: "ΔH_cal" ± "u").
pub const CALORIMETRIC: &str = "Calorimetric ΔH°";

/// The compensation plots' vertical axis: "ΔH° at θ / (kJ/mol)".
pub fn compensation_h_axis(energy_unit: &str) -> String {
    quantity_axis("ΔH° at θ", energy_unit)
}

/// The compensation plots' horizontal axis: ΔS° at θ ("ΔS° at θ = 25.00 °C / (J/(mol·K))")
/// or, with `gibbs`, ΔG° at the harmonic-mean temperature of every series' used points
/// ("ΔG° at T_hm = 27.31 °C / (kJ/mol)"); `at_k` is θ or T_hm, `unit` the axis unit.
pub fn compensation_x_axis(gibbs: bool, at_k: f64, tu: TemperatureUnit, unit: &str) -> String {
    let at = super::units::show_t(at_k, tu);
    if gibbs {
        quantity_axis(&format!("ΔG° at {T_HM} = {at}"), unit)
    } else {
        quantity_axis(&format!("ΔS° at θ = {at}"), unit)
    }
}

/// The fitted compensation line ΔH° = α + βΔS°, by its slope: "β = 612 K (York)".
pub fn beta_line(beta_k: f64) -> String {
    format!("β = {} K (York)", super::number::fixed(beta_k, 0))
}

/// The reference line of slope T_hm, the slope correlated errors alone give:
/// "slope T_hm = 300.1 K".
pub fn t_hm_slope_line(t_hm_k: f64) -> String {
    format!("slope {T_HM} = {} K", super::number::fixed(t_hm_k, 1))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_two_sigma_conventions_say_what_the_chemist_knows() {
        let a = sigma_convention(SigmaConvention::ScaledByFit);
        let b = sigma_convention(SigmaConvention::Absolute);
        assert_ne!(a, b);
        for s in [a, b] {
            assert!(s.starts_with("σ are "), "{s}");
            // Not the keyword of a general curve-fitting routine, nor "relative" alone.
            assert!(!s.contains("absolute") && !s.contains("scaled"), "{s}");
        }
        assert_eq!(t_axis(TemperatureUnit::Celsius), "T / °C");
        assert_eq!(weighting(false), "unweighted");
        assert_eq!(use_row_again(7), "use row 7 again");
        assert_eq!(beta_line(612.4), "β = 612 K (York)");
        assert_eq!(t_hm_slope_line(300.06), "slope T_hm = 300.1 K");
        assert_eq!(
            compensation_x_axis(true, 298.15, TemperatureUnit::Celsius, "kJ/mol"),
            "ΔG° at T_hm = 25.00 °C / (kJ/mol)"
        );
    }
}
