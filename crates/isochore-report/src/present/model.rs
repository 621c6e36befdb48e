//! Model names, equations and the sentences that say what a model assumes, all taken from
//! the fit crate's [`Model`] (its short name, description, equation and parameters), and
//! the flag thresholds in words.

use super::number::{fixed, sig};
use super::units::order;
use isochore_fit::{FlagThresholds, Model};

/// The model's short name for sentences: "linear", "ΔCp°", "Clarke–Glew".
pub fn model_name(m: Model) -> &'static str {
    m.short_name()
}

/// The model's name as a noun phrase, for the window's chooser and headings: "linear
/// model", "ΔCp° model", "Clarke–Glew model" (its description goes in the hover text).
pub fn model_label(m: Model) -> String {
    format!("{} model", m.short_name())
}

/// The model in plain words, for reports and hover texts: its description.
pub fn model_description(m: Model) -> &'static str {
    m.describe()
}

/// Whether any parameter of the model varies with temperature (so θ matters).
pub fn uses_reference(m: Model) -> bool {
    let params = m.params();
    params.iter().any(|p| {
        params
            .iter()
            .any(|q| order(q.dimension) > order(p.dimension))
    })
}

/// The equation of ln K, with θ in kelvin where the model uses it.
pub fn equation(m: Model, theta_k: f64) -> String {
    if uses_reference(m) {
        format!("{},  θ = {} K", m.equation(), fixed(theta_k, 2))
    } else {
        m.equation().to_string()
    }
}

/// The fitted coefficients in words: "ΔH° and ΔS°", "ΔH°(θ), ΔS°(θ) and ΔCp°".
pub fn coefficients_phrase(m: Model) -> String {
    let params = m.params();
    let names: Vec<String> = params
        .iter()
        .map(|p| {
            if params
                .iter()
                .any(|q| order(q.dimension) > order(p.dimension))
            {
                format!("{}(θ)", p.symbol)
            } else {
                p.symbol.to_string()
            }
        })
        .collect();
    match names.split_last() {
        None => String::new(),
        Some((last, [])) => last.clone(),
        Some((last, rest)) => format!("{} and {last}", rest.join(", ")),
    }
}

/// What the model neglects, as a caution: ΔCp° for a model without a heat capacity, else
/// the derivatives beyond its highest-order parameter.
pub fn model_caution(m: Model) -> String {
    let top = m.params().iter().max_by_key(|p| order(p.dimension));
    match top {
        Some(p) if order(p.dimension) > 0 => format!(
            "{} is assumed constant over the measured range; higher temperature derivatives are neglected.",
            p.symbol
        ),
        _ => "ΔCp° is neglected: ΔH° and ΔS° are assumed independent of temperature over the measured range.".to_string(),
    }
}

/// The flag thresholds in short form: "|ext. stud. residual| > 3, h > 2·p/n, D > 4/n".
pub fn thresholds_text(th: FlagThresholds) -> String {
    format!(
        "|{}| > {}, h > {}·p/n, D > {}/n",
        super::names::STUDENTIZED_SHORT,
        sig(th.outlier_studentized, 3),
        sig(th.leverage_factor, 3),
        sig(th.cooks_factor, 3)
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn words_come_from_the_models_parameters() {
        assert_eq!(coefficients_phrase(Model::LINEAR), "ΔH° and ΔS°");
        assert_eq!(
            coefficients_phrase(Model::CONSTANT_CP),
            "ΔH°(θ), ΔS°(θ) and ΔCp°"
        );
        assert_eq!(
            coefficients_phrase(Model::CLARKE_GLEW),
            "ΔH°(θ), ΔS°(θ), ΔCp°(θ) and dΔCp°/dT"
        );
        assert!(model_caution(Model::LINEAR).starts_with("ΔCp° is neglected"));
        assert!(model_caution(Model::CONSTANT_CP).starts_with("ΔCp° is assumed constant"));
        assert!(model_caution(Model::CLARKE_GLEW).starts_with("dΔCp°/dT is assumed constant"));
        assert!(!equation(Model::LINEAR, 298.15).contains('θ'));
        assert!(equation(Model::CONSTANT_CP, 310.0).ends_with("θ = 310.00 K"));
    }

    #[test]
    fn thresholds_in_words() {
        // Three significant digits, as the reports have always written them.
        assert_eq!(
            thresholds_text(FlagThresholds::default()),
            "|ext. stud. residual| > 3.00, h > 2.00·p/n, D > 4.00/n"
        );
        let th = FlagThresholds {
            outlier_studentized: 2.5,
            leverage_factor: 1.5,
            cooks_factor: 10.0,
        };
        assert_eq!(
            thresholds_text(th),
            "|ext. stud. residual| > 2.50, h > 1.50·p/n, D > 10.0/n"
        );
    }
}
