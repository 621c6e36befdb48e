//! The rows of a joint fit (several series fitted together), for the joint report and the
//! window's "fit together" view alike: the shared parameters, each series' own parameters,
//! the differences between series, both fits of the test of equality side by side, the
//! compensation analysis and the calorimetric comparison — labels, display units and
//! decimals decided here once. No statistics: every number is the fit crate's.

use super::names;
use super::number::{fixed, sig, MISSING};
use super::rows::{varies_with_t, ResultRow};
use super::units::{energy, per_kelvin, show_t, unit_of};
use isochore_fit::calorimetric::CalorimetricComparison;
use isochore_fit::global::{
    CalorimetricJointFit, Compensation, CompensationPoint, EqualityMethod, EqualityTest, ExnerTest,
    GlobalFit,
};
use isochore_fit::{EnergyUnit, Estimate, ParamInfo, TemperatureUnit};

/// A parameter's label in a joint fit: "ΔH° at θ = 25.00 °C" where it varies with T,
/// "ΔCp° (constant)" where the model fits nothing of a higher order, or the symbol alone
/// for ΔH° and ΔS° of the linear model.
pub fn param_label(fit: &GlobalFit, info: &ParamInfo, tu: TemperatureUnit) -> String {
    if varies_with_t(fit.model(), info) {
        format!(
            "{} at θ = {}",
            info.symbol,
            show_t(fit.options().t_ref_k, tu)
        )
    } else if super::units::order(info.dimension) > 0 {
        format!("{} (constant)", info.symbol)
    } else {
        info.symbol.to_string()
    }
}

fn row(label: String, info: Option<&'static ParamInfo>, e: Estimate, unit: &str) -> ResultRow {
    ResultRow {
        quantity: label,
        param: info,
        estimate: e,
        unit: unit.to_string(),
    }
}

/// The shared parameters of a joint fit, in the model's order, in display units.
pub fn shared_rows(fit: &GlobalFit, e: EnergyUnit, tu: TemperatureUnit) -> Vec<ResultRow> {
    fit.model()
        .params()
        .iter()
        .filter_map(|info| {
            let est = fit.shared(info.key)?;
            let u = unit_of(info.dimension, e);
            Some(row(
                param_label(fit, info, tu),
                Some(info),
                u.estimate(est),
                u.symbol,
            ))
        })
        .collect()
}

/// Series `s`'s own parameters in a fit (those not shared), then its ΔG° at θ and at its
/// harmonic-mean temperature (which use the shared parameters too), in display units.
/// Empty past the last series.
pub fn series_rows(
    fit: &GlobalFit,
    s: usize,
    e: EnergyUnit,
    tu: TemperatureUnit,
) -> Vec<ResultRow> {
    if s >= fit.n_series() {
        return Vec::new();
    }
    let mut rows: Vec<ResultRow> = fit
        .model()
        .params()
        .iter()
        .filter(|info| fit.shared(info.key).is_none())
        .filter_map(|info| {
            let est = fit.estimate(info.key, s)?;
            let u = unit_of(info.dimension, e);
            Some(row(
                param_label(fit, info, tu),
                Some(info),
                u.estimate(est),
                u.symbol,
            ))
        })
        .collect();
    let eu = energy(e);
    let theta = fit.options().t_ref_k;
    if let Some(g) = fit.delta_g_at(s, theta) {
        rows.push(row(
            format!("ΔG° at θ = {}", show_t(theta, tu)),
            None,
            eu.estimate(g),
            eu.symbol,
        ));
    }
    if let Some(t) = fit.t_harmonic_k(s) {
        if let Some(g) = fit.delta_g_at(s, t) {
            rows.push(row(
                format!("ΔG° at {} = {}", names::T_HM, show_t(t, tu)),
                None,
                eu.estimate(g),
                eu.symbol,
            ));
        }
    }
    rows
}

/// Every difference between series of every parameter fitted per series ("series A −
/// series B" and the row), from the joint covariance, in display units.
pub fn difference_rows(
    fit: &GlobalFit,
    labels: &[String],
    e: EnergyUnit,
    tu: TemperatureUnit,
) -> Vec<(String, ResultRow)> {
    let params = fit.model().params();
    fit.differences()
        .into_iter()
        .filter_map(|d| {
            let info = params.iter().find(|p| p.key == d.key)?;
            let u = unit_of(info.dimension, e);
            let pair = format!("{} − {}", labels.get(d.a)?, labels.get(d.b)?);
            Some((
                pair,
                row(
                    param_label(fit, info, tu),
                    Some(info),
                    u.estimate(d.estimate),
                    u.symbol,
                ),
            ))
        })
        .collect()
}

/// The column headings of [`equality_side_by_side`].
pub const EQUALITY_COLUMNS: [&str; 3] = ["fit statistic", "shared fit", "separate fits"];

/// The two fits of the test of equality side by side: parameters, used points, degrees of
/// freedom, χ², reduced χ², AICc and BIC of the shared fit and of the separate fits.
pub fn equality_side_by_side(t: &EqualityTest) -> Vec<[String; 3]> {
    let (r, f) = (t.restricted(), t.full());
    let aicc = |g: &GlobalFit| {
        g.statistics()
            .aicc
            .map_or(MISSING.to_string(), |v| fixed(v, 2))
    };
    vec![
        [
            "fitted coefficients".into(),
            r.n_params().to_string(),
            f.n_params().to_string(),
        ],
        [
            "used points".into(),
            r.n_used().to_string(),
            f.n_used().to_string(),
        ],
        [
            "degrees of freedom".into(),
            r.dof().to_string(),
            f.dof().to_string(),
        ],
        [
            "χ²".into(),
            sig(r.statistics().chi2, 5),
            sig(f.statistics().chi2, 5),
        ],
        [
            "reduced χ²".into(),
            sig(r.statistics().reduced_chi2, 4),
            sig(f.statistics().reduced_chi2, 4),
        ],
        ["AICc".into(), aicc(r), aicc(f)],
        [
            "BIC".into(),
            fixed(r.statistics().bic, 2),
            fixed(f.statistics().bic, 2),
        ],
    ]
}

/// The name of the test that decides, in words.
pub fn equality_method(m: EqualityMethod) -> &'static str {
    match m {
        EqualityMethod::F => "extra-sum-of-squares F-test (σ scaled by the scatter)",
        EqualityMethod::Chi2 => "Δχ² test against χ² (σ are known standard uncertainties)",
    }
}

/// The test of equality as (name, value) rows: the method, its statistic with its degrees
/// of freedom, the p-value and ΔAICc with its sign stated.
pub fn equality_test_rows(t: &EqualityTest) -> Vec<(String, String)> {
    let stat = match t.method() {
        EqualityMethod::F => format!(
            "F = {} with {} and {} degrees of freedom",
            sig(t.statistic(), 4),
            t.df_num(),
            t.df_den()
        ),
        EqualityMethod::Chi2 => format!(
            "Δχ² = {} with {} degree{} of freedom",
            sig(t.statistic(), 4),
            t.df_num(),
            if t.df_num() == 1 { "" } else { "s" }
        ),
    };
    let mut rows = vec![
        ("test".to_string(), equality_method(t.method()).to_string()),
        ("statistic".to_string(), stat),
        ("p-value".to_string(), sig(t.decisive_p_value(), 3)),
    ];
    if let Some(d) = t.delta_aicc() {
        rows.push((
            "ΔAICc = AICc(shared) − AICc(separate)".to_string(),
            format!("{} (negative favours sharing)", fixed(d, 2)),
        ));
    }
    rows
}

/// The column headings of [`compensation_rows`], with the energy and entropy units.
pub fn compensation_header(e: EnergyUnit) -> Vec<String> {
    let (eu, su) = (energy(e).symbol, per_kelvin(e).symbol);
    vec![
        "series".into(),
        format!("ΔH° / ({eu})"),
        "SE".into(),
        format!("ΔS° / ({su})"),
        "SE".into(),
        "r(ΔH°, ΔS°)".into(),
        format!("ΔG°(T_hm) / ({eu})"),
        "SE".into(),
    ]
}

/// One row per series of the compensation analysis: ΔH° and ΔS° at θ with their SEs and
/// correlation (from `full`, the separate fits), and ΔG° at the common `t_hm_k`.
pub fn compensation_rows(
    full: &GlobalFit,
    points: &[CompensationPoint],
    t_hm_k: f64,
    e: EnergyUnit,
) -> Vec<Vec<String>> {
    let (eu, su) = (energy(e), per_kelvin(e));
    points
        .iter()
        .enumerate()
        .map(|(s, p)| {
            let h = eu.estimate(Estimate::symmetric(p.delta_h, p.se_h, 0.0));
            let en = su.estimate(Estimate::symmetric(p.delta_s, p.se_s, 0.0));
            let dh = super::number::decimals_for(h.se);
            let ds = super::number::decimals_for(en.se);
            let r = p.cov_hs / (p.se_h * p.se_s);
            let g = full.delta_g_at(s, t_hm_k).map(|g| eu.estimate(g));
            let dg = g.map_or(2, |g| super::number::decimals_for(g.se));
            vec![
                p.label.clone(),
                fixed(h.value, dh),
                fixed(h.se, dh),
                fixed(en.value, ds),
                fixed(en.se, ds),
                fixed(r, 4),
                g.map_or(MISSING.to_string(), |g| fixed(g.value, dg)),
                g.map_or(MISSING.to_string(), |g| fixed(g.se, dg)),
            ]
        })
        .collect()
}

/// β and the Krug–Hunter–Grieger test as (name, value) rows, temperatures in `tu`.
pub fn beta_rows(c: &Compensation, level: f64, tu: TemperatureUnit) -> Vec<(String, String)> {
    vec![
        (
            "compensation temperature β (York regression)".into(),
            format!("{} K (SE {} K)", fixed(c.beta, 1), fixed(c.se_beta, 1)),
        ),
        (
            format!("{}% interval of β", super::number::percent(level)),
            format!("{} to {} K", fixed(c.ci_low, 1), fixed(c.ci_high, 1)),
        ),
        (
            format!("harmonic-mean temperature {}", names::T_HM),
            format!(
                "{} ({})",
                show_t(c.t_hm_k, TemperatureUnit::Kelvin),
                show_t(c.t_hm_k, tu)
            ),
        ),
        (
            "β's interval excludes T_hm".into(),
            if c.excludes_t_hm { "yes" } else { "no" }.into(),
        ),
    ]
}

/// Exner's common-intersection test as (name, value) rows.
pub fn exner_rows(x: &ExnerTest) -> Vec<(String, String)> {
    vec![
        (
            "common-intersection F (Exner)".into(),
            format!(
                "F = {} with {} and {} degrees of freedom",
                sig(x.f_statistic, 4),
                x.df_num,
                x.df_den
            ),
        ),
        ("p-value".into(), sig(x.p_value, 3)),
        (
            "temperature of the common point".into(),
            x.t_iso_k.map_or_else(
                || "none (at 1/T ≤ 0)".to_string(),
                |t| format!("{} K", fixed(t, 1)),
            ),
        ),
    ]
}

/// The column headings of [`calorimetric_cells`], with the energy unit.
pub fn calorimetric_header(e: EnergyUnit, level: f64) -> Vec<String> {
    let u = energy(e).symbol;
    let pct = super::number::percent(level);
    vec![
        "series".into(),
        "T".into(),
        format!("ΔH_vH / ({u})"),
        format!("ΔH_cal / ({u})"),
        format!("ΔH_vH − ΔH_cal / ({u}) [{pct}% CI]"),
        "z".into(),
        format!("ΔH_vH/ΔH_cal [{pct}% Fieller]"),
    ]
}

/// One calorimetric comparison as the cells of [`calorimetric_header`] (after the series):
/// T, the two enthalpies ± SE or u, the difference with its interval, z, and the ratio
/// with Fieller's interval ("unbounded" where it has none).
pub fn calorimetric_cells(
    c: &CalorimetricComparison,
    e: EnergyUnit,
    tu: TemperatureUnit,
) -> Vec<String> {
    let u = energy(e);
    let vh = u.estimate(c.van_t_hoff);
    let d = u.estimate(c.difference);
    let dd = super::number::decimals_for(d.se);
    let t = if c.extrapolated {
        format!("{} (extrapolated)", show_t(c.calorimetric.t_k, tu))
    } else {
        show_t(c.calorimetric.t_k, tu)
    };
    vec![
        t,
        super::number::plus_minus(vh.value, vh.se),
        super::number::plus_minus(
            u.from_si(c.calorimetric.delta_h),
            u.from_si(c.calorimetric.u),
        ),
        format!(
            "{} [{}, {}]",
            fixed(d.value, dd),
            fixed(d.ci_low, dd),
            fixed(d.ci_high, dd)
        ),
        fixed(c.z, 2),
        match c.ratio_ci {
            Some((lo, hi)) => format!("{} [{}, {}]", fixed(c.ratio, 3), fixed(lo, 3), fixed(hi, 3)),
            None => format!("{} [unbounded]", fixed(c.ratio, 3)),
        },
    ]
}

/// A comparison's verdict without the caution about coupled equilibria that ends it (said
/// once beside the table instead of after every value).
pub fn verdict_words(c: &CalorimetricComparison) -> &str {
    c.verdict
        .trim_end_matches(isochore_fit::calorimetric::COUPLED_EQUILIBRIA_CAUTION)
        .trim_end_matches("; ")
}

/// Whether a joint fit took its σ as known standard uncertainties (weighted, absolute σ):
/// no rescaling, normal intervals, the Δχ² test.
pub fn is_absolute(fit: &GlobalFit) -> bool {
    fit.options().convention == isochore_fit::SigmaConvention::Absolute && fit.weighted()
}

/// One parameter of the joint fit with the calorimetric values as observations of ΔH°(T),
/// beside the same parameter of the joint fit of ln K alone.
#[derive(Debug, Clone, PartialEq)]
pub struct ConstrainedRow {
    /// "shared", or the series' label.
    pub series: String,
    /// With the calorimetric values in the fit (display units).
    pub with: ResultRow,
    /// From ln K alone (display units).
    pub alone: ResultRow,
}

/// What the joint fit with calorimetric values is called (the window, reports, text).
pub const CONSTRAINED_FIT: &str =
    "joint fit with the calorimetric values as observations of ΔH°(T) (weight 1/u²)";

/// What one series fitted with its calorimetric values is called (the single report, the
/// text of `vhfit fit --calorimetric-in-fit`).
pub const SINGLE_CONSTRAINED_FIT: &str =
    "fit with the calorimetric values as observations of ΔH°(T) (weight 1/u²)";

/// Every parameter of `constrained` (shared ones first under "shared", then each series'
/// own, in the model's order) beside the same parameter of `fit`, the joint fit of ln K
/// alone, in display units.
pub fn constrained_rows(
    constrained: &CalorimetricJointFit,
    fit: &GlobalFit,
    labels: &[String],
    e: EnergyUnit,
    tu: TemperatureUnit,
) -> Vec<ConstrainedRow> {
    let params = fit.model().params();
    let mut out = Vec::new();
    let mut push = |info: &'static ParamInfo, s: usize, who: String| {
        let (Some(w), Some(a)) = (constrained.estimate(info.key, s), fit.estimate(info.key, s))
        else {
            return;
        };
        let u = unit_of(info.dimension, e);
        let label = param_label(fit, info, tu);
        out.push(ConstrainedRow {
            series: who,
            with: row(label.clone(), Some(info), u.estimate(w), u.symbol),
            alone: row(label, Some(info), u.estimate(a), u.symbol),
        });
    };
    for info in params.iter().filter(|p| fit.shared(p.key).is_some()) {
        push(info, 0, "shared".into());
    }
    for (s, l) in labels.iter().enumerate() {
        for info in params.iter().filter(|p| fit.shared(p.key).is_none()) {
            push(info, s, l.clone());
        }
    }
    out
}

/// The column headings of [`constrained_cells`], at confidence level `level`.
pub fn constrained_header(level: f64) -> Vec<String> {
    let pct = super::number::percent(level);
    vec![
        "parameter".into(),
        "series".into(),
        "with ΔH_cal: value ± SE".into(),
        format!("{pct}% CI"),
        "ln K alone: value ± SE".into(),
        format!("{pct}% CI"),
        "unit".into(),
    ]
}

/// One [`ConstrainedRow`] as the cells of [`constrained_header`].
pub fn constrained_cells(r: &ConstrainedRow) -> Vec<String> {
    let pair = |x: &ResultRow| {
        let [v, se, lo, hi] = x.cells();
        (format!("{v} ± {se}"), format!("[{lo}, {hi}]"))
    };
    let (wv, wi) = pair(&r.with);
    let (av, ai) = pair(&r.alone);
    vec![
        r.with.quantity.clone(),
        r.series.clone(),
        wv,
        wi,
        av,
        ai,
        r.with.unit.clone(),
    ]
}

/// The constrained fit's χ², degrees of freedom and counts in words, with the caution that
/// a calorimetric value including heat from coupled equilibria pulls ΔH° towards itself.
pub fn constrained_summary(c: &CalorimetricJointFit) -> String {
    format!(
        "χ² = {} over {} ln K points and {} calorimetric {}, {} {}. Combine only values that agree with the van 't Hoff ΔH° (see the comparison): a calorimetric enthalpy that includes heat from coupled equilibria pulls ΔH° towards itself.",
        fixed(c.statistics().chi2, 4),
        c.n_ln_k(),
        c.n_calorimetric(),
        if c.n_calorimetric() == 1 { "value" } else { "values" },
        c.dof(),
        if c.dof() == 1 { "degree of freedom" } else { "degrees of freedom" }
    )
}
