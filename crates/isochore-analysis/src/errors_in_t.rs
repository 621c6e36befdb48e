//! Errors in T as well as in K: which points carry a temperature uncertainty σ(T), and the
//! fit that allows for it. σ(T) comes from the file's σ(T) column (a column choice gives
//! the role, in the temperature column's unit) or from one thermometer uncertainty for all
//! points ([`Overrides::sigma_t_k`], else the data set's own
//! `SeriesSettings::thermometer_uncertainty_k`, the window's setting; either takes the
//! column's place). The statistics are
//! isochore-fit's ([`isochore_fit::errors_in_t`]: York's line for the linear model,
//! orthogonal distance for the others); without σ(T) nothing here runs and every output is
//! as it was.

use crate::dataset::{FitFailure, Overrides, PreparedSet};
use isochore_data::{DataSet, Point};
use isochore_fit::errors_in_t::{fit_errors_in_t, ErrorsInTFit};

/// The name of the setting recorded in reports: "temperature uncertainty σ(T)".
pub const SIGMA_T_SETTING: &str = "temperature uncertainty σ(T)";

/// Sets `set.sigma_t_k` from the caller's one value or the data set's σ(T) column. A point
/// made of averaged replicates takes the largest σ(T) of its rows (a thermometer's error at
/// one temperature does not average out).
///
/// # Errors
/// The data set's refusal of a σ(T) cell (empty, not a number, ≤ 0), naming row, line and
/// column.
pub(crate) fn attach(
    set: &mut PreparedSet,
    s: &DataSet,
    o: &Overrides,
) -> Result<(), isochore_data::Error> {
    let n = set.measurements.len();
    // The caller's value, else the data set's own thermometer uncertainty (the window's
    // setting, saved in the project).
    if let Some(v) = o.sigma_t_k.or(s.settings.thermometer_uncertainty_k) {
        set.sigma_t_k = Some(vec![v; n]);
        set.settings.push((
            SIGMA_T_SETTING.to_string(),
            format!("{} K for every point", short(v)),
        ));
        return Ok(());
    }
    let Some(rows) = s.sigma_t_k()? else {
        return Ok(());
    };
    // The rows of each point (replicates averaged or not), asked for only here.
    let points: Vec<Point> = s.points()?;
    let per_point = points
        .iter()
        .map(|p| {
            p.rows
                .iter()
                .filter_map(|&r| rows.get(r.wrapping_sub(1)).copied())
                .fold(f64::NAN, f64::max)
        })
        .collect();
    set.sigma_t_k = Some(per_point);
    let header = s
        .mapping
        .temperature_uncertainty
        .and_then(|c| s.headers.get(c))
        .cloned()
        .unwrap_or_default();
    set.settings.push((
        SIGMA_T_SETTING.to_string(),
        format!("column '{header}' (in the temperature column's unit)"),
    ));
    Ok(())
}

fn short(v: f64) -> String {
    let r = format!("{v:.6}");
    r.trim_end_matches('0').trim_end_matches('.').to_string()
}

impl PreparedSet {
    /// The fit with errors in T, when the set has σ(T); `None` otherwise (the fit is
    /// [`PreparedSet::fit`] alone).
    ///
    /// # Errors
    /// isochore-fit's refusal (a σ(T) ≤ 0, an unweighted fit, no convergence), with the data
    /// set named.
    pub fn fit_errors_in_t(&self) -> Option<Result<ErrorsInTFit, FitFailure>> {
        let sigma_t = self.sigma_t_k.as_ref()?;
        Some(
            fit_errors_in_t(&self.measurements, sigma_t, &self.options).map_err(|error| {
                FitFailure {
                    source: self.source.clone(),
                    series: self.series.clone(),
                    error,
                }
            }),
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::dataset::load;
    use isochore_data::ColumnChoice;
    use std::io::Write;

    fn file(text: &str) -> tempfile::NamedTempFile {
        let mut f = tempfile::Builder::new().suffix(".csv").tempfile().unwrap();
        f.write_all(text.as_bytes()).unwrap();
        f
    }

    const TEXT: &str = "T (°C),pKa,sd,u(T)\n10,7.60,0.01,0.1\n20,7.45,0.01,0.1\n30,7.31,0.01,0.2\n40,7.18,0.01,0.1\n50,7.06,0.01,0.3\n";

    #[test]
    fn sigma_t_from_a_column_or_one_value() {
        let f = file(TEXT);
        // No role: no σ(T), the fit as before.
        let sets = load(f.path(), &Overrides::default()).unwrap();
        assert_eq!(sets[0].sigma_t_k, None);
        assert!(sets[0].fit_errors_in_t().is_none());
        // The column, chosen.
        let o = Overrides {
            columns: vec!["sigma-t=u(T)".parse::<ColumnChoice>().unwrap()],
            ..Overrides::default()
        };
        let sets = load(f.path(), &o).unwrap();
        assert_eq!(sets[0].sigma_t_k, Some(vec![0.1, 0.1, 0.2, 0.1, 0.3]));
        assert!(sets[0]
            .settings
            .iter()
            .any(|(k, v)| k == SIGMA_T_SETTING && v.contains("'u(T)'")));
        let fit = sets[0].fit_errors_in_t().unwrap().unwrap();
        assert_eq!(fit.n_used(), 5);
        // One value for all points.
        let o = Overrides {
            sigma_t_k: Some(0.05),
            ..Overrides::default()
        };
        let sets = load(f.path(), &o).unwrap();
        assert_eq!(sets[0].sigma_t_k, Some(vec![0.05; 5]));
        // The data set's own setting (the window's field, saved in projects).
        let imp =
            isochore_data::import_path(f.path(), &isochore_data::ImportOptions::default()).unwrap();
        let mut d = imp.data_sets_with_cells().remove(0);
        d.settings.thermometer_uncertainty_k = Some(0.2);
        let set = PreparedSet::from_data_set(&d, "x.csv", &Overrides::default()).unwrap();
        assert_eq!(set.sigma_t_k, Some(vec![0.2; 5]));
        assert!(set.fit_errors_in_t().unwrap().is_ok());
    }

    #[test]
    fn a_bad_sigma_t_cell_is_named() {
        let f = file("T (°C),pKa,sd,u(T)\n10,7.60,0.01,0.1\n20,7.45,0.01,\n30,7.31,0.01,0.2\n");
        let o = Overrides {
            columns: vec!["sigma-t=4".parse::<ColumnChoice>().unwrap()],
            ..Overrides::default()
        };
        let e = load(f.path(), &o).unwrap_err().to_string();
        assert!(e.contains("line 3, column 4 ('u(T)')"), "{e}");
        assert!(e.contains(&f.path().display().to_string()), "{e}");
    }
}
