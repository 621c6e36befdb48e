//! How a fit with errors in T is shown (issue 13): the line naming σ(T), the method and the
//! σ convention; each parameter with errors in T beside the fit in K only, in the chosen
//! units; each point's adjusted temperature and residuals; and, for reports, the methods
//! paragraph. The comparison in words is the fit's own
//! ([`isochore_fit::errors_in_t::ErrorsInTFit::comparison`]), the same sentence in the
//! command line's text and the reports. No statistics here.

use super::names;
use super::number::{fixed, percent, plus_minus, sig};
use super::units::{show_t, unit_of};
use isochore_fit::errors_in_t::{ErrorsInTFit, ErrorsInTMethod};
use isochore_fit::{EnergyUnit, Estimate, TemperatureUnit};

/// "fit with errors in T — σ(T) = 0.1 K (numbers by York's fit; σ are relative weights
/// only)".
pub fn heading_line(f: &ErrorsInTFit) -> String {
    format!(
        "{} — {} (numbers by {}; {})",
        names::ERRORS_IN_T,
        f.sigma_t().describe(),
        names::errors_in_t_method(f.method()),
        names::sigma_convention(f.convention())
    )
}

/// One parameter with errors in T beside the fit in K only, in display units.
#[derive(Debug, Clone, PartialEq)]
pub struct ErrorsInTRow {
    /// The parameter's symbol.
    pub symbol: &'static str,
    /// With errors in T.
    pub with_errors_in_t: Estimate,
    /// The fit in K only.
    pub k_only: Estimate,
    /// The unit.
    pub unit: &'static str,
}

impl ErrorsInTRow {
    /// "value ± SE" with errors in T and in K only.
    pub fn plus_minus(&self) -> (String, String) {
        let (e, k) = (self.with_errors_in_t, self.k_only);
        (plus_minus(e.value, e.se), plus_minus(k.value, k.se))
    }

    /// The interval with errors in T, "[low, high]", with the decimals of its value ± SE.
    pub fn interval(&self) -> String {
        let e = self.with_errors_in_t;
        let d = super::number::decimals_for(e.se);
        format!("[{}, {}]", fixed(e.ci_low, d), fixed(e.ci_high, d))
    }
}

/// Each parameter of `f` beside the fit in K only, energies in `e`.
pub fn parameter_rows(f: &ErrorsInTFit, e: EnergyUnit) -> Vec<ErrorsInTRow> {
    f.params()
        .iter()
        .zip(f.k_only().params())
        .map(|(p, k)| {
            let u = unit_of(p.info.dimension, e);
            ErrorsInTRow {
                symbol: p.info.symbol,
                with_errors_in_t: u.estimate(p.estimate),
                k_only: u.estimate(k.estimate),
                unit: u.symbol,
            }
        })
        .collect()
}

/// "S = 9.137 on 10 degrees of freedom (reduced χ² 0.9137)".
pub fn sum_line(f: &ErrorsInTFit) -> String {
    format!(
        "S = {} on {} degrees of freedom (reduced χ² {})",
        sig(f.chi2(), 5),
        f.dof(),
        sig(f.reduced_chi2(), 4)
    )
}

/// The header of the per-point table.
pub const POINT_HEADER: [&str; 7] = [
    "row",
    "T",
    names::SIGMA_T,
    names::ADJUSTED_T,
    "T − T*",
    "ln K − f(T*)",
    "share",
];

/// Each point's row: its 1-based row number (from `rows`, in the order of the fit's points),
/// T and the adjusted T in `tu`, σ(T) and T − T* in K, the residual in ln K, and its share
/// of S ("excluded" for an excluded point).
pub fn point_rows(
    f: &ErrorsInTFit,
    rows: impl IntoIterator<Item = usize>,
    tu: TemperatureUnit,
) -> Vec<[String; 7]> {
    let total = f.chi2();
    rows.into_iter()
        .zip(f.points())
        .map(|(row, p)| {
            let share = if p.used && total > 0.0 {
                format!("{} %", fixed(100.0 * p.chi2_contribution / total, 1))
            } else if p.used {
                "0 %".to_string()
            } else {
                names::EXCLUDED.to_string()
            };
            [
                row.to_string(),
                show_t(p.t_k, tu),
                format!("{} K", sig(p.sigma_t_k, 3)),
                show_t(p.t_adjusted_k, tu),
                format!("{} K", sig(p.residual_t_k, 3)),
                sig(p.residual_ln_k, 3),
                share,
            ]
        })
        .collect()
}

/// The methods paragraph of a report with a fit with errors in T: what σ(T) is, what the
/// method minimises, where its SEs come from, and that the rest of the report is the fit
/// in K only.
pub fn methods_paragraph(f: &ErrorsInTFit) -> String {
    let method = match f.method() {
        ErrorsInTMethod::York => "York's fit (York 1966; York et al. 2004): a straight line in 1/T and ln K with errors in both, σ(1/T) = σ(T)/T², with York's standard errors",
        ErrorsInTMethod::OrthogonalDistance => "an orthogonal-distance fit: the parameters and every point's true temperature estimated together by minimising Σ[(ln Kᵢ − f(Tᵢ*))²/σ(ln K)ᵢ² + (Tᵢ − Tᵢ*)²/σ(T)ᵢ²] (the full objective, not fixed weights iterated), with standard errors from its full Jacobian",
    };
    format!(
        "Each temperature carries a standard uncertainty, {}. The fit with errors in T weighs it against σ(ln K): {method}. Under “{}” its covariance {}; the {}% intervals use the same critical value as the fit in K only. Every other section of this report shows the fit in K only, which takes T as exact; the table below sets the two side by side.",
        f.sigma_t().describe(),
        names::sigma_convention(f.convention()),
        if f.convention() == isochore_fit::SigmaConvention::ScaledByFit {
            "is scaled by S/(n − p), as the fit in K only is by its reduced χ²"
        } else {
            "is used as it is, without rescaling"
        },
        percent(level_of(f)),
    )
}

/// The fit's confidence level (the K-only fit's, which the fit with errors in T shares).
fn level_of(f: &ErrorsInTFit) -> f64 {
    f.k_only().options().level
}
