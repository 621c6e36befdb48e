//! The result and statistic rows every front end shows, each a label, an estimate (value,
//! SE, interval) and a unit, built by looping over the fit's parameters — so a model with
//! another parameter shows it in the window, the command line and every report format with
//! no new code. Each front end only chooses how the cells of a row are written.

use super::model::model_name;
use super::names;
use super::number::{decimals_for, fixed, percent, sig, MISSING};
use super::units::{energy, order, per_kelvin, show_t, show_t_with, t_difference, unit_of};
use isochore_fit::{
    ComparisonStep, EnergyUnit, Estimate, Flags, Model, ModelComparison, ParamDimension, ParamInfo,
    Parameter, SigmaConvention, TemperatureUnit, VantHoffFit,
};

/// The fitted parameters in the model's order, each with what it is (key, symbol,
/// dimension) and its estimate in SI units.
pub fn fitted_params(fit: &VantHoffFit) -> &[Parameter] {
    fit.params()
}

/// Whether parameter `p` of `model` varies with temperature, so that its value is quoted
/// at the reference temperature θ: it does exactly when the model also fits a parameter of
/// a higher order (ΔH° and ΔS° vary when ΔCp° is fitted, ΔCp° when dΔCp°/dT is).
pub fn varies_with_t(model: Model, p: &ParamInfo) -> bool {
    model
        .params()
        .iter()
        .any(|q| order(q.dimension) > order(p.dimension))
}

/// One row of a results table, already in display units.
#[derive(Debug, Clone, PartialEq)]
pub struct ResultRow {
    /// What the row shows, e.g. "ΔH° at θ = 25.00 °C".
    pub quantity: String,
    /// The fitted parameter the row shows, when it shows one.
    pub param: Option<&'static ParamInfo>,
    /// The estimate in display units.
    pub estimate: Estimate,
    /// The unit symbol.
    pub unit: String,
}

impl ResultRow {
    fn new(
        quantity: String,
        param: Option<&'static ParamInfo>,
        estimate: Estimate,
        unit: &str,
    ) -> Self {
        ResultRow {
            quantity,
            param,
            estimate,
            unit: unit.to_string(),
        }
    }

    /// Value, SE, CI low, CI high, all with the decimals that show the SE to two
    /// significant digits (the tables of the documents and the command line).
    pub fn cells(&self) -> [String; 4] {
        let d = decimals_for(self.estimate.se);
        let e = self.estimate;
        [
            fixed(e.value, d),
            fixed(e.se, d),
            fixed(e.ci_low, d),
            fixed(e.ci_high, d),
        ]
    }

    /// The value to four significant digits with its unit, "-48.21 kJ/mol" (the window).
    pub fn value_with_unit(&self) -> String {
        format!("{} {}", sig(self.estimate.value, 4), self.unit)
    }

    /// The standard error to two significant digits (the window).
    pub fn se_short(&self) -> String {
        sig(self.estimate.se, 2)
    }

    /// The interval "low … high" to four significant digits (the window).
    pub fn interval_short(&self) -> String {
        format!(
            "{} … {}",
            sig(self.estimate.ci_low, 4),
            sig(self.estimate.ci_high, 4)
        )
    }

    /// Whether the row shows ΔH° or ΔS° themselves (the pair whose correlation is warned of).
    pub fn is_enthalpy_or_entropy(&self) -> bool {
        self.param.is_some_and(|p| {
            matches!(
                p.dimension,
                ParamDimension::Energy | ParamDimension::Entropy
            )
        })
    }
}

/// The parameter row of `p`: its symbol, "at θ" where it varies with T, in its unit.
fn param_row(
    fit: &VantHoffFit,
    p: &Parameter,
    e: EnergyUnit,
    label: impl Fn(&str, bool) -> String,
) -> ResultRow {
    let unit = unit_of(p.info.dimension, e);
    ResultRow::new(
        label(p.info.symbol, varies_with_t(fit.model(), p.info)),
        Some(p.info),
        unit.estimate(p.estimate),
        unit.symbol,
    )
}

/// The results of the documents and the command line: ΔH°, ΔS° and ΔG° at θ and at the
/// harmonic-mean temperature, then every further parameter of the model (ΔCp°, …; "at θ"
/// where it varies with T, "(constant)" where it does not), the temperature where
/// K = 1 when there is one, and (ΔCp° models) the temperature where ΔH° = 0 when ΔH° changes
/// sign near the data.
pub fn result_rows(fit: &VantHoffFit, e: EnergyUnit, tu: TemperatureUnit) -> Vec<ResultRow> {
    let (eu, su) = (energy(e), per_kelvin(e));
    let theta = show_t(fit.at_reference().t_k, tu);
    let mut rows = Vec::new();
    for (label, at) in [
        (format!("θ = {theta}"), &fit.at_reference()),
        (
            format!("{} = {}", names::T_HM, show_t(fit.at_harmonic().t_k, tu)),
            &fit.at_harmonic(),
        ),
    ] {
        rows.push(ResultRow::new(
            format!("ΔH° at {label}"),
            None,
            eu.estimate(at.delta_h),
            eu.symbol,
        ));
        rows.push(ResultRow::new(
            format!("ΔS° at {label}"),
            None,
            su.estimate(at.delta_s),
            su.symbol,
        ));
        rows.push(ResultRow::new(
            format!("ΔG° at {label}"),
            None,
            eu.estimate(at.delta_g),
            eu.symbol,
        ));
    }
    for p in fitted_params(fit)
        .iter()
        .filter(|p| order(p.info.dimension) > 0)
    {
        rows.push(param_row(fit, p, e, |symbol, varies| {
            if varies {
                format!("{symbol} at θ = {theta}")
            } else {
                format!("{symbol} (constant)")
            }
        }));
    }
    if let Some(t1) = fit.t_at_k1() {
        // Usually far outside the data (K = 1 is rarely near the measured range): say so
        // next to the number.
        let mut quantity = if fit.is_extrapolation(t1.value) {
            format!("{} (ΔG° = 0), extrapolated", names::T_AT_K1)
        } else {
            format!("{} (ΔG° = 0)", names::T_AT_K1)
        };
        // An infinite end of Fieller's interval is shown as "—"; the words say why.
        quantity.push_str(unbounded_suffix(&t1));
        rows.push(temperature_row(quantity, t1, tu));
    }
    // ΔCp° models: the temperature where ΔH° changes sign, with Fieller's interval; the
    // words ([`VantHoffFit::delta_h_zero_words`]) go beside the table.
    rows.extend(delta_h_zero_row(fit, tu));
    rows
}

/// The row of the temperature where ΔH° changes sign (ΔCp° models), with Fieller's
/// interval, in `tu`: "T where ΔH° = 0", with ", extrapolated" outside the measured range
/// and "; interval unbounded below" (above, both) where an end is infinite. `None` for the
/// linear model and when ΔH° keeps its sign near the data; the words of
/// [`VantHoffFit::delta_h_zero_words_in`] go beside it in every front end.
pub fn delta_h_zero_row(fit: &VantHoffFit, tu: TemperatureUnit) -> Option<ResultRow> {
    let z = fit.temperature_where_delta_h_is_zero()?;
    let mut quantity = if z.extrapolated {
        format!("{}, extrapolated", names::T_DELTA_H_ZERO)
    } else {
        names::T_DELTA_H_ZERO.to_string()
    };
    quantity.push_str(unbounded_suffix(&z.estimate));
    Some(temperature_row(quantity, z.estimate, tu))
}

/// "; interval unbounded above" (below, both) for an estimate with an infinite end.
fn unbounded_suffix(e: &Estimate) -> &'static str {
    match (e.ci_low.is_finite(), e.ci_high.is_finite()) {
        (true, false) => "; interval unbounded above",
        (false, true) => "; interval unbounded below",
        (false, false) => "; interval unbounded",
        (true, true) => "",
    }
}

/// A temperature (K) with Fieller's interval as a row in `tu`.
fn temperature_row(quantity: String, t: Estimate, tu: TemperatureUnit) -> ResultRow {
    ResultRow::new(
        quantity,
        None,
        Estimate {
            value: tu.from_kelvin(t.value),
            se: t_difference(t.se, tu),
            ci_low: tu.from_kelvin(t.ci_low),
            ci_high: tu.from_kelvin(t.ci_high),
        },
        tu.symbol(),
    )
}

/// The results of the window: every parameter of the model ("ΔH° at θ = 25.00 °C" where it
/// varies with T), then ΔG° at θ and at T_hm ("ΔG° at T_hm = 24.5 °C").
pub fn parameter_rows(fit: &VantHoffFit, e: EnergyUnit, tu: TemperatureUnit) -> Vec<ResultRow> {
    let eu = energy(e);
    let theta = show_t(fit.at_reference().t_k, tu);
    let mut rows: Vec<ResultRow> = fitted_params(fit)
        .iter()
        .map(|p| {
            param_row(fit, p, e, |symbol, varies| {
                if varies {
                    format!("{symbol} at θ = {theta}")
                } else {
                    symbol.to_string()
                }
            })
        })
        .collect();
    rows.push(ResultRow::new(
        format!("ΔG° at θ = {theta}"),
        None,
        eu.estimate(fit.at_reference().delta_g),
        eu.symbol,
    ));
    rows.push(ResultRow::new(
        format!(
            "ΔG° at {} = {}",
            names::T_HM,
            show_t_with(fit.at_harmonic().t_k, tu, 1)
        ),
        None,
        eu.estimate(fit.at_harmonic().delta_g),
        eu.symbol,
    ));
    rows
}

/// Whether the intervals are taken from absolute σ (normal quantile, no rescaling).
pub fn is_absolute(fit: &VantHoffFit) -> bool {
    fit.options().convention == SigmaConvention::Absolute && fit.weighted()
}

/// The distribution the critical value comes from: "normal" or "Student's t, 5 dof".
pub fn critical_distribution(fit: &VantHoffFit) -> String {
    if is_absolute(fit) {
        "normal".to_string()
    } else {
        format!("Student's t, {} dof", fit.dof())
    }
}

/// The fit statistics as (name, value) pairs, for every front end.
pub fn statistics_rows(fit: &VantHoffFit) -> Vec<(String, String)> {
    let s = fit.stats();
    let mut v = vec![
        (
            "points used / given".to_string(),
            format!("{} / {}", fit.n_used(), fit.n_total()),
        ),
        (
            "residual degrees of freedom".to_string(),
            fit.dof().to_string(),
        ),
        ("χ²".to_string(), sig(s.chi2, 5)),
        ("reduced χ²".to_string(), sig(s.reduced_chi2, 4)),
        ("residual SD".to_string(), sig(s.residual_sd, 4)),
        ("R²".to_string(), fixed(s.r2, 6)),
        ("adjusted R²".to_string(), fixed(s.adj_r2, 6)),
        (
            "AICc".to_string(),
            s.aicc
                .map_or(format!("{MISSING} (too few points)"), |a| fixed(a, 3)),
        ),
        ("BIC".to_string(), fixed(s.bic, 3)),
        ("corr(ΔH°, ΔS°) at θ".to_string(), fixed(fit.corr_h_s(), 5)),
        (
            "critical value".to_string(),
            format!(
                "{} ({})",
                fixed(fit.critical_value(), 4),
                critical_distribution(fit)
            ),
        ),
    ];
    if let Some(p) = s.chi2_p_value {
        v.push(("P(χ² ≥ observed)".to_string(), sig(p, 3)));
    }
    v
}

/// The fit statistics in the window's short form, as (name, value) pairs: fewer digits
/// than the documents ([`statistics_rows`]), R² beside its adjusted value, p of χ² in words,
/// and the weighting, the range of T and the temperature where K = 1.
pub fn compact_statistics_rows(fit: &VantHoffFit, tu: TemperatureUnit) -> Vec<(String, String)> {
    let st = fit.stats();
    let mut v = vec![
        (
            "points used / given".to_string(),
            format!("{} / {}", fit.n_used(), fit.n_total()),
        ),
        ("degrees of freedom".to_string(), fit.dof().to_string()),
        (
            names::WEIGHTING.to_string(),
            names::weighting(fit.weighted()).to_string(),
        ),
        ("χ²".to_string(), sig(st.chi2, 4)),
        ("reduced χ²".to_string(), sig(st.reduced_chi2, 4)),
        ("residual SD".to_string(), sig(st.residual_sd, 3)),
        (
            "R² (adjusted)".to_string(),
            format!("{} ({})", fixed(st.r2, 5), fixed(st.adj_r2, 5)),
        ),
        (
            "AICc".to_string(),
            st.aicc.map_or(MISSING.to_string(), |a| fixed(a, 2)),
        ),
        ("BIC".to_string(), fixed(st.bic, 2)),
    ];
    if let Some(p) = st.chi2_p_value {
        v.push((
            "χ² against stated σ".to_string(),
            isochore_fit::vant_hoff::format_p(p),
        ));
    }
    v.push((
        "range of T".to_string(),
        format!(
            "{} – {}",
            fixed(tu.from_kelvin(fit.t_min_k()), 1),
            show_t_with(fit.t_max_k(), tu, 1)
        ),
    ));
    if let Some(t1) = fit.t_at_k1() {
        v.push((names::T_AT_K1.to_string(), show_t_with(t1.value, tu, 1)));
    }
    v
}

/// The SI unit of a dimension as the covariance table heads it: "J mol⁻¹", "J mol⁻¹ K⁻¹".
pub fn si_symbol(d: ParamDimension) -> &'static str {
    match d {
        ParamDimension::Energy => "J mol⁻¹",
        ParamDimension::Entropy | ParamDimension::HeatCapacity => "J mol⁻¹ K⁻¹",
        ParamDimension::HeatCapacitySlope => "J mol⁻¹ K⁻²",
    }
}

/// The unit of a covariance of two quantities in units `a` and `b`: "(kJ/mol)²" for a
/// variance, "(kJ/mol)·(J/(mol·K))" for two units; a unit without a slash or space needs no
/// parentheses ("K²").
pub fn covariance_unit(a: &str, b: &str) -> String {
    let wrap = |u: &str| {
        if u.contains(['/', ' ', '·']) {
            format!("({u})")
        } else {
            u.to_string()
        }
    };
    if a == b {
        format!("{}²", wrap(a))
    } else {
        format!("{}·{}", wrap(a), wrap(b))
    }
}

/// The full parameter covariance in the display units of the results, one row per pair
/// (each variance and each covariance once): a header ("covariance of", "value", "unit")
/// and rows such as "ΔH° with ΔS°", "-1.234", "(kJ/mol)·(J/(mol·K))", to five significant
/// digits. The unit of each entry is the product of its two quantities' units, so a
/// variance carries a squared unit.
pub fn covariance_table(fit: &VantHoffFit, e: EnergyUnit) -> (Vec<String>, Vec<Vec<String>>) {
    let params = fitted_params(fit);
    let header = vec![
        "covariance of".to_string(),
        "value".to_string(),
        "unit".to_string(),
    ];
    let mut rows = Vec::new();
    for (i, p) in params.iter().enumerate() {
        let up = unit_of(p.info.dimension, e);
        for (j, q) in params.iter().enumerate().skip(i) {
            let uq = unit_of(q.info.dimension, e);
            let value = fit
                .covariance()
                .get(i)
                .and_then(|r| r.get(j))
                .map_or(MISSING.to_string(), |v| {
                    sig(v / (up.si_per_unit * uq.si_per_unit), 5)
                });
            let what = if i == j {
                format!("{} (variance)", p.info.symbol)
            } else {
                format!("{} with {}", p.info.symbol, q.info.symbol)
            };
            rows.push(vec![what, value, covariance_unit(up.symbol, uq.symbol)]);
        }
    }
    (header, rows)
}

/// The flags of a point in words: "outlier, high leverage, influential".
pub fn flag_words(flags: Flags) -> String {
    let mut v = Vec::new();
    if flags.outlier {
        v.push("outlier");
    }
    if flags.high_leverage {
        v.push("high leverage");
    }
    if flags.influential {
        v.push("influential");
    }
    v.join(", ")
}

/// The confidence level of a fit as a percentage: "95".
pub fn level_percent(fit: &VantHoffFit) -> String {
    percent(fit.options().level)
}

/// A comparison step named by its models: "ΔCp° against linear".
pub fn step_name(step: &ComparisonStep) -> String {
    format!(
        "{} against {}",
        model_name(step.larger),
        model_name(step.smaller)
    )
}

/// One line for a comparison step: "ΔCp° against linear: F = 12.3, p = 0.004, ΔAICc = −5.21".
pub fn step_summary(step: &ComparisonStep) -> String {
    format!(
        "{}: F = {}, {}{}",
        step_name(step),
        sig(step.f_statistic, 3),
        isochore_fit::vant_hoff::format_p(step.f_p_value),
        step.delta_aicc
            .map_or(String::new(), |d| format!(", ΔAICc = {}", fixed(d, 2)))
    )
}

/// The comparison's table as (test, value) pairs: each step's F statistic with its extra
/// parameters, the p-value of F and ΔAICc (its sign said once, in
/// [`names::DELTA_AICC_SIGN`]), then the model supported by the data.
pub fn comparison_rows(c: &ModelComparison) -> Vec<(String, String)> {
    let mut rows = Vec::new();
    for s in &c.steps {
        let step = step_name(s);
        let plural = if s.df_extra == 1 { "" } else { "s" };
        rows.push((
            format!(
                "F statistic, {step} ({} extra parameter{plural})",
                s.df_extra
            ),
            sig(s.f_statistic, 4),
        ));
        rows.push((format!("p-value of F, {step}"), sig(s.f_p_value, 3)));
        rows.push((
            format!("ΔAICc, {step}"),
            s.delta_aicc.map_or(MISSING.to_string(), |d| fixed(d, 2)),
        ));
    }
    rows.push((
        names::SUPPORTED_MODEL.into(),
        model_name(c.preferred).to_string(),
    ));
    rows
}

/// The models of the comparison's ladder, simplest first: "linear ⊂ ΔCp° ⊂ Clarke–Glew".
pub fn ladder_text(c: &ModelComparison) -> String {
    let names: Vec<&str> = c
        .steps
        .first()
        .map(|s| model_name(s.smaller))
        .into_iter()
        .chain(c.steps.iter().map(|s| model_name(s.larger)))
        .collect();
    names.join(" ⊂ ")
}

#[cfg(test)]
mod tests {
    use super::*;
    use isochore_fit::{fit, FitOptions, Measurement, Weighting, GAS_CONSTANT};

    /// A fit of invented ln K with curvature (ΔCp° about −400 J/(mol K), ΔCp° slope
    /// 3 J/(mol K²)), plus a small alternating wobble so every SE is positive.
    fn fitted(model: Model) -> VantHoffFit {
        let theta = 298.15;
        let data: Vec<Measurement> = (0..9)
            .map(|i| {
                let t = 278.15 + 7.5 * i as f64;
                let (h, s, cp, b) = (-30e3, -20.0, -400.0, 3.0);
                let x = t / theta;
                let ln_k = -h / (GAS_CONSTANT * t)
                    + s / GAS_CONSTANT
                    + cp * (theta / t - 1.0 + x.ln()) / GAS_CONSTANT
                    + b * (theta / 2.0) * (x - 1.0 / x - 2.0 * x.ln()) / GAS_CONSTANT;
                Measurement::new(t, ln_k + if i % 2 == 0 { 2e-3 } else { -2e-3 })
            })
            .collect();
        let o = FitOptions {
            model,
            weighting: Weighting::Unweighted,
            ..FitOptions::default()
        };
        fit(&data, &o).unwrap()
    }

    fn quantities(rows: &[ResultRow]) -> Vec<&str> {
        rows.iter().map(|r| r.quantity.as_str()).collect()
    }

    #[test]
    fn a_fourth_parameter_gets_a_row_in_its_unit() {
        let f = fitted(Model::CLARKE_GLEW);
        let slope = f.param("delta_cp_slope").unwrap();
        let rows = result_rows(&f, EnergyUnit::KilojoulePerMole, TemperatureUnit::Celsius);
        let q = quantities(&rows);
        assert!(q.contains(&"ΔCp° at θ = 25.00 °C"), "{q:?}");
        let r = rows
            .iter()
            .find(|r| r.quantity == "dΔCp°/dT (constant)")
            .unwrap();
        assert_eq!(r.unit, "J/(mol·K²)");
        assert_eq!(r.estimate, slope);
        // kcal/mol: per K² in cal, 1 cal = 4.184 J (thermochemical, NIST SP 811, B.8).
        let rows = result_rows(&f, EnergyUnit::KilocaloriePerMole, TemperatureUnit::Kelvin);
        let r = rows
            .iter()
            .find(|r| r.quantity.starts_with("dΔCp°/dT"))
            .unwrap();
        assert_eq!(r.unit, "cal/(mol·K²)");
        assert!((r.estimate.value * 4.184 - slope.value).abs() <= 1e-12 * slope.value.abs());
        // The window's rows: every parameter, then ΔG° at θ and at T_hm.
        let w = parameter_rows(&f, EnergyUnit::KilojoulePerMole, TemperatureUnit::Celsius);
        assert_eq!(
            quantities(&w)[..5],
            [
                "ΔH° at θ = 25.00 °C",
                "ΔS° at θ = 25.00 °C",
                "ΔCp° at θ = 25.00 °C",
                "dΔCp°/dT",
                "ΔG° at θ = 25.00 °C"
            ]
        );
        assert!(w[5].quantity.starts_with("ΔG° at T_hm = "), "{:?}", w[5]);
        assert!(w[5].quantity.ends_with(" °C"), "{:?}", w[5]);
        assert_eq!(w.len(), 6);
        // The covariance table holds all four: 4 variances and 6 covariances, each with
        // the product of its quantities' units (a variance's unit squared).
        let (header, cov) = covariance_table(&f, EnergyUnit::KilojoulePerMole);
        assert_eq!(header, ["covariance of", "value", "unit"]);
        assert_eq!(cov.len(), 10);
        assert_eq!(cov[0][0], "ΔH° (variance)");
        assert_eq!(cov[0][2], "(kJ/mol)²");
        assert_eq!(cov[1][0], "ΔH° with ΔS°");
        assert_eq!(cov[1][2], "(kJ/mol)·(J/(mol·K))");
        assert_eq!(cov[9][2], "(J/(mol·K²))²");
        // The variance of ΔH° in (kJ/mol)² is the SI one over 10⁶.
        let var_h = f.covariance()[0][0] / 1e6;
        assert_eq!(cov[0][1], sig(var_h, 5));
        assert_eq!(covariance_unit("K", "K"), "K²");
    }

    #[test]
    fn the_highest_order_parameter_is_constant_and_the_others_at_theta() {
        let f = fitted(Model::CONSTANT_CP);
        let rows = result_rows(&f, EnergyUnit::KilojoulePerMole, TemperatureUnit::Kelvin);
        let q = quantities(&rows);
        assert!(q.contains(&"ΔCp° (constant)"), "{q:?}");
        assert!(q.iter().all(|q| !q.starts_with("dΔCp°")));
        let w = parameter_rows(&f, EnergyUnit::KilojoulePerMole, TemperatureUnit::Kelvin);
        assert_eq!(
            quantities(&w)[..3],
            ["ΔH° at θ = 298.15 K", "ΔS° at θ = 298.15 K", "ΔCp°"]
        );
        let lin = fitted(Model::LINEAR);
        let w = parameter_rows(&lin, EnergyUnit::KilojoulePerMole, TemperatureUnit::Kelvin);
        assert_eq!(quantities(&w)[..2], ["ΔH°", "ΔS°"]);
        assert!(w[0].is_enthalpy_or_entropy() && !w[2].is_enthalpy_or_entropy());
        // ΔH° in kJ/mol: the SI value over 1000; ΔS° stays in J/(mol·K).
        assert_eq!(w[0].unit, "kJ/mol");
        assert!((w[0].estimate.value * 1000.0 - lin.delta_h().value).abs() < 1e-9);
        assert_eq!(w[1].unit, "J/(mol·K)");
        assert_eq!(w[1].estimate.value, lin.delta_s().value);
    }
}
