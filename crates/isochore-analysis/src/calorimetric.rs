//! Calorimetric enthalpies kept with a data set (the window's, saved in project files as
//! [`SavedCalorimetric`]), the rules both front ends follow with them: a value typed in the
//! display units becomes SI ([`entry_from_display`]), a calorimetric file's rows go to the
//! series they name or, naming none, to every series ([`rows_for_series`], the command
//! line's rule for `--calorimetric-file`), the comparisons with a single fit's and a
//! joint fit's ΔH°(T) ([`compare_single`], [`compare_joint`]), and a single data set fitted
//! with its calorimetric values as observations of ΔH°(T)
//! ([`fit_single_with_calorimetric`]). The statistics are
//! isochore-fit's (`calorimetric`).

use crate::joint::JointAnalysis;
use isochore_data::calorimetric::CalorimetricRow;
use isochore_data::{DataSet, SavedCalorimetric};
use isochore_fit::calorimetric::{
    compare_calorimetric, compare_calorimetric_series, CalorimetricComparison, CalorimetricValue,
};
use isochore_fit::global::{
    fit_global, fit_global_with_calorimetric, CalorimetricJointFit, CalorimetricObservation,
    GlobalError, GlobalFit,
};
use isochore_fit::{EnergyUnit, SeriesInput, SharingMap, TemperatureUnit, VantHoffFit};

/// A saved value as isochore-fit's.
pub fn value_of(s: &SavedCalorimetric) -> CalorimetricValue {
    CalorimetricValue {
        t_k: s.t_k,
        delta_h: s.delta_h_cal,
        u: s.u_cal,
    }
}

/// The calorimetric values of a data set, as isochore-fit's.
pub fn values(data: &DataSet) -> Vec<CalorimetricValue> {
    data.calorimetric.iter().map(value_of).collect()
}

fn number(what: &str, text: &str) -> Result<f64, String> {
    let t = text.trim().replace('−', "-");
    t.parse::<f64>()
        .ok()
        .filter(|v| v.is_finite())
        .ok_or_else(|| format!("{what}: '{}' is not a number", text.trim()))
}

/// A value typed as text in the display units — the temperature in `tu`, ΔH_cal and u in
/// `eu` — in SI.
///
/// # Errors
/// In words, naming the field: a cell that is not a number, a temperature at or below
/// 0 K, a negative u.
pub fn entry_from_display(
    t: &str,
    delta_h: &str,
    u: &str,
    tu: TemperatureUnit,
    eu: EnergyUnit,
) -> Result<SavedCalorimetric, String> {
    let jpm = eu.joules_per_mole();
    let entry = SavedCalorimetric {
        t_k: tu.to_kelvin(number("T", t)?),
        delta_h_cal: number("ΔH_cal", delta_h)? * jpm,
        u_cal: number("u", u)? * jpm,
    };
    match entry.problem() {
        Some(why) => Err(why.to_string()),
        None => Ok(entry),
    }
}

/// The rows of a calorimetric file that apply to the series named `name`: those naming it
/// and those naming no series.
pub fn rows_for_series(rows: &[CalorimetricRow], name: &str) -> Vec<SavedCalorimetric> {
    rows.iter()
        .filter(|r| r.series.as_deref().is_none_or(|s| s == name))
        .map(|r| SavedCalorimetric {
            t_k: r.t_k,
            delta_h_cal: r.delta_h,
            u_cal: r.u,
        })
        .collect()
}

/// The data set's calorimetric values compared with its own fit's ΔH°(T).
///
/// # Errors
/// isochore-fit's refusal in words.
pub fn compare_single(
    fit: &VantHoffFit,
    data: &DataSet,
) -> Result<Vec<CalorimetricComparison>, String> {
    compare_calorimetric(fit, &values(data)).map_err(|e| e.to_string())
}

/// Each series' values (`values[s]`, empty where none) compared with its ΔH°(T) in the
/// joint fit (the SE from the joint covariance).
///
/// # Errors
/// isochore-fit's refusal in words, naming the series.
pub fn compare_joint(
    joint: &JointAnalysis,
    values: &[Vec<CalorimetricValue>],
) -> Result<Vec<Vec<CalorimetricComparison>>, String> {
    values
        .iter()
        .enumerate()
        .take(joint.fit.n_series())
        .map(|(s, v)| {
            compare_calorimetric_series(&joint.fit, s, v).map_err(|e| {
                let label = joint.labels.get(s).map_or("", String::as_str);
                format!("series '{label}': {e}")
            })
        })
        .collect()
}

/// A project's series (`data`, named `label`) fitted again with its own calorimetric values
/// ([`values`]) as observations of its ΔH°(T): prepared as `vhfit fit` prepares a project's
/// series, then [`fit_single_with_calorimetric`]. The window's "Calorimetric ΔH°" panel
/// and its report export both take it from here.
///
/// # Errors
/// A data set that cannot be prepared ([`GlobalError::NoSolution`] with the reason), or
/// [`fit_single_with_calorimetric`]'s refusal.
pub fn fit_data_set_with_calorimetric(
    data: &DataSet,
    label: &str,
) -> Result<(GlobalFit, CalorimetricJointFit), GlobalError> {
    let set = crate::PreparedSet::from_data_set(data, label, &crate::Overrides::default())
        .map_err(|e| GlobalError::NoSolution(e.to_string()))?;
    fit_single_with_calorimetric(&set, label, &values(data))
}

/// One data set fitted again with calorimetric values as observations of its ΔH°(T)
/// (isochore-fit's `fit_with_calorimetric` on a single series, every parameter its own),
/// with the same fit of ln K alone in the same form for the side-by-side table
/// (`present::joint::constrained_rows`). `label` names the series.
///
/// # Errors
/// isochore-fit's refusal: an unweighted fit, no value, a value with u = 0, too few points.
pub fn fit_single_with_calorimetric(
    set: &crate::PreparedSet,
    label: &str,
    values: &[CalorimetricValue],
) -> Result<(GlobalFit, CalorimetricJointFit), GlobalError> {
    let inputs = [SeriesInput::new(label, &set.measurements)];
    let sharing = SharingMap::per_series();
    let alone = fit_global(&inputs, &sharing, &set.options)?;
    let obs: Vec<CalorimetricObservation> = values
        .iter()
        .map(|&value| CalorimetricObservation { series: 0, value })
        .collect();
    let with = fit_global_with_calorimetric(&inputs, &sharing, &set.options, &obs)?;
    Ok((alone, with))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Display units to SI: 25 °C = 298.15 K, 1 kcal = 4184 J (thermochemical calorie,
    /// common practice); refusals name the field.
    #[test]
    fn typed_values_become_si() {
        let e = entry_from_display(
            "25",
            "-10",
            "0.5",
            TemperatureUnit::Celsius,
            EnergyUnit::KilocaloriePerMole,
        )
        .unwrap();
        assert!((e.t_k - 298.15).abs() < 1e-12);
        assert!((e.delta_h_cal + 41_840.0).abs() < 1e-9);
        assert!((e.u_cal - 2_092.0).abs() < 1e-9);
        let bad = entry_from_display(
            "x",
            "1",
            "1",
            TemperatureUnit::Kelvin,
            EnergyUnit::KilojoulePerMole,
        );
        assert!(bad.unwrap_err().starts_with("T: 'x'"));
        let cold = entry_from_display(
            "-300",
            "1",
            "1",
            TemperatureUnit::Celsius,
            EnergyUnit::KilojoulePerMole,
        );
        assert!(cold.unwrap_err().contains("above 0 K"));
    }

    #[test]
    fn file_rows_go_to_their_series_or_to_all() {
        let row = |series: Option<&str>, t_k: f64| CalorimetricRow {
            series: series.map(str::to_string),
            t_k,
            delta_h: -1.0,
            u: 0.1,
            line: 2,
        };
        let rows = [
            row(Some("A"), 300.0),
            row(None, 310.0),
            row(Some("B"), 320.0),
        ];
        let a: Vec<f64> = rows_for_series(&rows, "A").iter().map(|v| v.t_k).collect();
        assert_eq!(a, [300.0, 310.0]);
        let c: Vec<f64> = rows_for_series(&rows, "C").iter().map(|v| v.t_k).collect();
        assert_eq!(c, [310.0]);
    }
}
