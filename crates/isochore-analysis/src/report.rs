//! What a report is made from: the [`ReportInput`] of a fitted data set, its title, the
//! program line, and the paths of a report set. The command line and the window both call
//! [`report_input`], so their reports say the same things in the same words.

use crate::dataset::PreparedSet;
use crate::joint::JointAnalysis;
use isochore_fit::calorimetric::CalorimetricComparison;
use isochore_fit::global::{CalorimetricJointFit, GlobalError};
use isochore_fit::VantHoffFit;
use isochore_report::{
    JointCompensation, JointReportInput, JointSeries, Record, ReportInput, ReportRow,
};

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
pub fn report_input(
    set: &PreparedSet,
    fit: VantHoffFit,
    extra: &[(String, String)],
) -> ReportInput {
    let rows = report_rows(set);
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
        quantity: Some((
            set.quantity,
            isochore_report::present::quantity::quantity_symbol(set.quantity, &set.quantity_header),
        )),
        program_version: VERSION.to_string(),
        record: Record {
            analysed_at: utc_minutes(now_unix()),
            ..Record::default()
        },
        settings,
        intervals: Vec::new(),
        // With σ(T) (a column, one thermometer uncertainty), the fit with errors in T; its
        // refusal in words (for example an unweighted fit) takes its place.
        errors_in_t: set
            .fit_errors_in_t()
            .map(|r| r.map_err(|e| e.error.to_string())),
        // The caller adds calorimetric comparisons when it has values (the command line's
        // --calorimetric, the window's values kept with the data set).
        calorimetric: Vec::new(),
        // The caller adds the fit with the calorimetric values in it when asked
        // (`--calorimetric-in-fit`: `calorimetric::fit_single_with_calorimetric`).
        calorimetric_fit: None,
    }
}

/// Each point's origin paired with its measurement, in the order of the fit's points.
fn report_rows(set: &PreparedSet) -> Vec<ReportRow> {
    set.rows
        .iter()
        .zip(set.measurements.iter())
        .map(|(o, m)| ReportRow {
            row: o.row.get(),
            line: o.line,
            cells: o.cells.to_vec(),
            t_k: m.t_k,
            ln_k: m.ln_k,
            sigma_ln_k: m.sigma_ln_k,
            included: m.included,
            exclusion_reason: o.exclusion_reason.map(str::to_string),
        })
        .collect()
}

/// The title of the report of a joint fit of `n` series.
pub fn joint_report_title(n: usize) -> String {
    format!("Van 't Hoff analysis: {n} series fitted together")
}

/// The report input of a joint fit of `sets` (in the order fitted). `calorimetric[s]`
/// holds the comparisons of series s (empty where none were given; may be shorter than
/// the series); `constrained`, when asked for, the joint fit with the calorimetric values
/// as observations of ΔH°(T) ([`crate::joint::fit_with_calorimetric`]) or its refusal.
/// `extra` records further settings (the command line records itself); each data set's
/// own settings follow under its label.
pub fn joint_report_input(
    sets: &[PreparedSet],
    joint: &JointAnalysis,
    calorimetric: &[Vec<CalorimetricComparison>],
    constrained: Option<&Result<CalorimetricJointFit, GlobalError>>,
    extra: &[(String, String)],
) -> JointReportInput {
    let series = sets
        .iter()
        .zip(&joint.labels)
        .enumerate()
        .map(|(s, (set, label))| JointSeries {
            label: label.clone(),
            source_name: set.file_name.clone(),
            source_sha256: set.sha256.clone(),
            rows: report_rows(set),
            conversions: set.conversions.clone(),
            calorimetric: calorimetric.get(s).cloned().unwrap_or_default(),
        })
        .collect();
    let mut settings: Vec<(String, String)> = extra.to_vec();
    for (set, label) in sets.iter().zip(&joint.labels) {
        settings.extend(
            set.settings
                .iter()
                .map(|(k, v)| (format!("{label}: {k}"), v.clone())),
        );
    }
    let first = sets.first();
    JointReportInput {
        title: joint_report_title(sets.len()),
        series,
        fit: joint.fit.clone(),
        equality: joint.equality.clone(),
        compensation: joint.compensation.as_ref().map(|c| JointCompensation {
            points: c.points.clone(),
            beta: c.beta.clone(),
            exner: c.exner.clone(),
        }),
        calorimetric_fit: constrained.map(|r| r.clone().map_err(|e| e.to_string())),
        warnings: joint.warnings.clone(),
        energy_unit: first.map_or(isochore_fit::EnergyUnit::KilojoulePerMole, |s| s.energy),
        temperature_unit: first.map_or(isochore_fit::TemperatureUnit::Celsius, |s| s.temperature),
        program_version: VERSION.to_string(),
        record: Record {
            analysed_at: utc_minutes(now_unix()),
            ..Record::default()
        },
        settings,
    }
}

/// Seconds since 1970-01-01 UTC by the system clock (0 when the clock is before 1970).
pub fn now_unix() -> i64 {
    std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.as_secs() as i64)
}

/// A time as a report's record writes it: "2026-12-02 18:50 UTC".
pub fn utc_minutes(unix_seconds: i64) -> String {
    // Civil date from days since the epoch (H. Hinnant's public-domain algorithm).
    let days = unix_seconds.div_euclid(86_400);
    let secs = unix_seconds.rem_euclid(86_400);
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = yoe + era * 400 + i64::from(m <= 2);
    format!(
        "{y:04}-{m:02}-{d:02} {:02}:{:02} UTC",
        secs / 3600,
        secs % 3600 / 60
    )
}

#[cfg(test)]
mod tests {
    use super::utc_minutes;

    #[test]
    fn times_are_written_as_civil_dates() {
        // `date -u -d @0`, `date -u -d @951782400` (29 Feb 2000, a leap day of a century
        // leap year) and `date -u -d @1796158800` (GNU date, run offline).
        assert_eq!(utc_minutes(0), "1970-01-01 00:00 UTC");
        assert_eq!(utc_minutes(951_782_400), "2000-02-29 00:00 UTC");
        assert_eq!(utc_minutes(1_796_158_800), "2026-12-01 21:00 UTC");
    }
}
