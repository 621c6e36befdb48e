//! The command line's side of reading inputs: its options become isochore-analysis
//! [`Overrides`], and each refusal gets the flag that settles it appended to the library's
//! words (the libraries name the cause and the remedy; no library knows the command line
//! exists). Reading, the weighting rule and the data sets themselves are isochore-analysis'.

use crate::cli::{DecimalArg, FitOptionsArgs};
use isochore_analysis::{Exclusions, LoadError, Overrides, Remedy, RowNumber};
use isochore_data::DecimalMark;
use std::path::Path;

/// One data set ready to fit (isochore-analysis' type, under the command line's old name).
pub use isochore_analysis::PreparedSet as Job;

/// Reason recorded for rows excluded with `--exclude`.
pub const CLI_EXCLUSION: &str = "excluded on the command line (--exclude)";

/// The flag that takes a remedy, as appended to a message.
pub fn hint(remedy: Option<Remedy>) -> &'static str {
    match remedy {
        Some(Remedy::StateDecimalMark) => {
            " (on the command line: --decimal-mark point or --decimal-mark comma)"
        }
        Some(Remedy::FitUnweighted) => " (on the command line: --unweighted)",
        Some(Remedy::ConfirmExtremeTemperatures) => {
            " (on the command line: --allow-extreme-temperatures)"
        }
        Some(Remedy::SkipBadRows) | None => "",
    }
}

/// θ from `--tref` in kelvin (a unit suffix, else `--temp-unit`), if given.
///
/// # Errors
/// θ at or below absolute zero, naming the flag.
pub fn reference_temperature(a: &FitOptionsArgs) -> Result<Option<f64>, String> {
    a.tref.map(|t| t.kelvin(a.temp_unit, "--tref")).transpose()
}

/// The command-line options as isochore-analysis overrides. `with_cells` keeps the cells as
/// typed (for reports only; costly for huge files).
fn overrides(a: &FitOptionsArgs, with_cells: bool) -> Overrides {
    Overrides {
        model: a.model,
        // Checked by `reference_temperature` before any file is read.
        t_ref_k: a.tref.and_then(|t| t.kelvin(a.temp_unit, "--tref").ok()),
        level: a.level,
        sigma: if a.absolute_sigma {
            Some(isochore_fit::SigmaConvention::Absolute)
        } else {
            a.sigma
        },
        unweighted: a.unweighted,
        allow_extreme_temperatures: a.allow_extreme_temperatures,
        energy_unit: a.energy.map(|e| e.unit()),
        decimal: match a.decimal_mark {
            None => DecimalMark::Auto,
            Some(DecimalArg::Point) => DecimalMark::Point,
            Some(DecimalArg::Comma) => DecimalMark::Comma,
        },
        exclude: Exclusions {
            rows: a
                .exclude
                .as_ref()
                .map(|r| r.0.iter().filter_map(|&n| RowNumber::new(n)).collect())
                .unwrap_or_default(),
            reason: CLI_EXCLUSION.to_string(),
            at: "command line".to_string(),
        },
        skip_bad_rows: a.skip_bad_rows,
        with_cells,
        columns: a.columns.clone(),
        data_temperature_unit: a.data_temp_unit.map(|u| u.unit()),
        // Checked by `load` before the file is read.
        sigma_t_k: a
            .sigma_t
            .and_then(|t| t.kelvin_difference(a.temp_unit, "--sigma-t").ok()),
        min_points: None,
    }
}

/// A refusal in words, with the flag that settles it.
fn message(e: &LoadError) -> String {
    match e {
        LoadError::BadRows { source, rejected } => {
            let Some(first) = rejected.first() else {
                return e.to_string();
            };
            let more = if rejected.len() > 1 {
                format!(
                    " ({} bad rows in all; --skip-bad-rows fits the good ones)",
                    rejected.len()
                )
            } else {
                " (--skip-bad-rows fits the good rows)".to_string()
            };
            format!(
                "{source}: {}{}{more}",
                first.message(),
                hint(Remedy::for_row(first))
            )
        }
        LoadError::NoSuchRow {
            source,
            series,
            row,
            rows,
        } => format!(
            "{source}: series '{series}': --exclude names row {row}, but the series has {rows} data rows"
        ),
        LoadError::Data { error, .. }
            if matches!(
                **error,
                isochore_data::Error::MissingColumn { .. }
                    | isochore_data::Error::AmbiguousColumns { .. }
            ) =>
        {
            format!("{e} (on the command line: --column ROLE=COLUMN, e.g. --column temperature=2 --column K=3)")
        }
        // A data-set column (`run`, `name`, …) that names every row rather than every data
        // set leaves one point per data set: say how to read the file as one.
        LoadError::Data { error, .. }
            if matches!(
                &**error,
                isochore_data::Error::TooFewPoints { file, series, .. }
                    if Path::new(file).file_stem().and_then(|s| s.to_str()) != Some(series.as_str())
            ) =>
        {
            format!("{e} (when the data-set column names each row rather than each data set, --column series=none reads the file as one)")
        }
        _ => format!("{e}{}", hint(e.remedy())),
    }
}

/// Reads one path into data sets (one per data set of the file), the command-line options
/// laid over the file's settings.
///
/// # Errors
/// A message naming the file (and line and column where there is one), with the flag that
/// settles it.
pub fn load(path: &Path, a: &FitOptionsArgs, with_cells: bool) -> Result<Vec<Job>, String> {
    load_with(path, a, overrides(a, with_cells))
}

/// As [`load`], for a joint fit: a data set of two points is read too (whether a series
/// has enough points is decided by the sharing, when the joint fit is made).
pub fn load_for_joint(
    path: &Path,
    a: &FitOptionsArgs,
    with_cells: bool,
) -> Result<Vec<Job>, String> {
    let o = Overrides {
        min_points: Some(2),
        ..overrides(a, with_cells)
    };
    load_with(path, a, o)
}

fn load_with(path: &Path, a: &FitOptionsArgs, o: Overrides) -> Result<Vec<Job>, String> {
    if let Some(t) = a.sigma_t {
        t.kelvin_difference(a.temp_unit, "--sigma-t")?;
    }
    let mut sets = isochore_analysis::load(path, &o).map_err(|e| message(&e))?;
    if let Some(rows) = &a.exclude {
        let listed = rows
            .0
            .iter()
            .map(|r| r.to_string())
            .collect::<Vec<_>>()
            .join(",");
        for s in &mut sets {
            s.settings
                .push(("excluded on the command line".to_string(), listed.clone()));
        }
    }
    Ok(sets)
}
