//! The single report's section on calorimetric enthalpies (issue 12), when values were
//! given (the command line's `--calorimetric`, the window's values kept with the data set):
//! each ΔH_cal(T) ± u compared with the fit's ΔH°(T) — the difference with its interval and
//! z, the ratio ΔH_vH/ΔH_cal with Fieller's interval — each verdict in words and the caution
//! about coupled equilibria. The table's cells are the joint report's
//! ([`crate::present::joint::calorimetric_cells`]). With `--calorimetric-in-fit` (the slot
//! [`ReportInput::calorimetric_fit`]) the section adds the series fitted again with its
//! values as observations of ΔH°(T), each parameter beside the fit of ln K alone — the
//! joint report's table ([`constrained_blocks`], built on
//! [`crate::present::joint::constrained_rows`] and `constrained_summary`).

use crate::content::{Block, Table};
use crate::present::{joint, names};
use crate::ReportInput;
use isochore_fit::calorimetric::{CalorimetricComparison, COUPLED_EQUILIBRIA_CAUTION};
use isochore_fit::global::{CalorimetricJointFit, GlobalFit};
use isochore_fit::{EnergyUnit, TemperatureUnit};

/// The blocks of the section; empty without calorimetric values (neither comparisons nor
/// the fit with them).
pub(crate) fn blocks(input: &ReportInput) -> Vec<Block> {
    if input.calorimetric.is_empty() && input.calorimetric_fit.is_none() {
        return Vec::new();
    }
    let (e, tu) = (input.energy_unit, input.temperature_unit);
    let mut b = vec![Block::Heading(names::CALORIMETRIC.into())];
    if !input.calorimetric.is_empty() {
        b.push(Block::Paragraph(
            "Each calorimetric enthalpy is compared with the van 't Hoff ΔH° of this fit at the same temperature (ΔCp° taken into account where the model has it): d = ΔH_vH(T) − ΔH_cal with SE √(SE_vH² + u²) (the two measurements are independent), z = d/SE and a normal interval; the ratio ΔH_vH/ΔH_cal with Fieller's interval, unbounded when ΔH_cal is not clearly different from zero.".into(),
        ));
        let items: Vec<(&str, &CalorimetricComparison)> = input
            .calorimetric
            .iter()
            .map(|c| (input.series_name.as_str(), c))
            .collect();
        b.extend(comparison_blocks(&items, e, tu, input.fit.options().level));
    }
    if let Some(result) = &input.calorimetric_fit {
        let labels = [input.series_name.clone()];
        b.extend(constrained_blocks(
            &format!(
                "The series fitted again with {}, each parameter beside the fit of ln K alone:",
                joint::SINGLE_CONSTRAINED_FIT.trim_start_matches("fit with ")
            ),
            result
                .as_ref()
                .map(|(alone, with)| (with, alone, &labels[..])),
            e,
            tu,
        ));
    }
    b
}

/// A fit with the calorimetric values as observations of ΔH°(T) after `lead`: each
/// parameter "with ΔH_cal" beside "ln K alone" (`alone`, the fit of ln K alone, `labels`
/// its series), χ², degrees of freedom and the caution in words under the table; or the
/// refusal in words. The single report's section and the joint report's alike.
pub(crate) fn constrained_blocks(
    lead: &str,
    result: Result<(&CalorimetricJointFit, &GlobalFit, &[String]), &String>,
    e: EnergyUnit,
    tu: TemperatureUnit,
) -> Vec<Block> {
    let mut b = vec![Block::Paragraph(lead.to_string())];
    match result {
        Ok((with, alone, labels)) => b.push(Block::Table(Table {
            header: joint::constrained_header(alone.options().level),
            rows: joint::constrained_rows(with, alone, labels, e, tu)
                .iter()
                .map(joint::constrained_cells)
                .collect(),
            numeric: vec![false, false, true, true, true, true, false],
            note: Some(joint::constrained_summary(with)),
        })),
        Err(why) => b.push(Block::Paragraph(format!(
            "Not fitted: {}.",
            capitalised(why.trim_end_matches('.'))
        ))),
    }
    b
}

/// The comparison table of `items` (each after its series' label), each verdict after its
/// label, and the caution about coupled equilibria once: the single report's section and
/// the joint report's alike.
pub(crate) fn comparison_blocks(
    items: &[(&str, &CalorimetricComparison)],
    e: EnergyUnit,
    tu: TemperatureUnit,
    level: f64,
) -> Vec<Block> {
    let mut rows = Vec::new();
    let mut verdicts = Vec::new();
    for (label, c) in items {
        let mut r = vec![label.to_string()];
        r.extend(joint::calorimetric_cells(c, e, tu));
        rows.push(r);
        verdicts.push(format!("{label}: {}.", joint::verdict_words(c)));
    }
    vec![
        Block::Table(Table {
            header: joint::calorimetric_header(e, level),
            rows,
            numeric: vec![false, true, true, true, true, true, true],
            note: None,
        }),
        Block::Bullets(verdicts),
        Block::Paragraph(format!(
            "Caution: {}.",
            capitalised(COUPLED_EQUILIBRIA_CAUTION)
        )),
    ]
}

fn capitalised(s: &str) -> String {
    let mut c = s.chars();
    c.next()
        .map(|f| f.to_uppercase().collect::<String>() + c.as_str())
        .unwrap_or_default()
}
