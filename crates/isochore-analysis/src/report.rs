//! What a report is made from: the [`ReportInput`] of a fitted data set, its title, the
//! program line, and the paths of a report set. The command line and the window both call
//! [`report_input`], so their reports say the same things in the same words.

use crate::dataset::DataSet;
use isochore_fit::VantHoffFit;
use isochore_report::{ReportInput, ReportRow};

/// The program's version, recorded in reports ("program: isochore 0.1.0") and in the JSON
/// contract. Every crate of the workspace carries the same version.
pub const VERSION: &str = env!("CARGO_PKG_VERSION");

/// The title of the report of data set `series`.
pub fn report_title(series: &str) -> String {
    format!("Van 't Hoff analysis: {series}")
}

/// The report input of a fitted data set. `extra` records further settings after the data
/// set's own (the command line records itself there); the cautions from reading follow,
/// each under "reading".
///
/// The rows pair each point's origin with its measurement, in the order of `fit.points`.
pub fn report_input(set: &DataSet, fit: VantHoffFit, extra: &[(String, String)]) -> ReportInput {
    let rows = set
        .rows
        .iter()
        .zip(&set.measurements)
        .map(|(o, m)| ReportRow {
            row: o.row.get(),
            line: o.line,
            cells: o.cells.clone(),
            t_k: m.t_k,
            ln_k: m.ln_k,
            sigma_ln_k: m.sigma_ln_k,
            included: m.included,
            exclusion_reason: o.exclusion_reason.clone(),
        })
        .collect();
    let mut settings = set.settings.clone();
    settings.extend(extra.iter().cloned());
    settings.extend(
        set.warnings
            .iter()
            .map(|n| ("reading".to_string(), n.clone())),
    );
    ReportInput {
        title: report_title(&set.series),
        series_name: set.series.clone(),
        source_name: set.file_name.clone(),
        source_sha256: set.sha256.clone(),
        headers: set.headers.clone(),
        rows,
        conversions: set.conversions.clone(),
        fit,
        energy_unit: set.energy,
        temperature_unit: set.temperature,
        program_version: VERSION.to_string(),
        settings,
    }
}
