//! The report's tables as CSV: every data row (cells as read, converted values and
//! per-point diagnostics) and the results (estimates with SE and interval in the user's
//! units, then the fit statistics). Written with the csv crate so quoting is always right.

use crate::content::result_rows;
use crate::present::{flag_words, statistics_rows};
use crate::{ReportError, ReportInput};
use std::fmt::Write as _;

/// A CSV writer's error as the report's.
pub(crate) fn csv_err(e: csv::Error) -> ReportError {
    ReportError::Input(format!("writing CSV: {e}"))
}

/// A number at full precision, or an empty cell when it is not finite.
pub(crate) fn fin(v: f64) -> String {
    if v.is_finite() {
        format!("{v}")
    } else {
        String::new()
    }
}

/// The columns of each point after its origin (row, line, cells as read): converted
/// values and diagnostics — the single report's data CSV and the joint report's alike.
pub(crate) const POINT_COLUMNS: [&str; 13] = [
    "t_k",
    "ln_k",
    "sigma_ln_k",
    "used",
    "fitted",
    "residual",
    "leverage",
    "student_int",
    "student_ext",
    "cooks_d",
    "dffits",
    "flags",
    "exclusion_reason",
];

/// All data rows with full-precision converted values and diagnostics.
pub(crate) fn data_csv(input: &ReportInput) -> Result<Vec<u8>, ReportError> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header: Vec<String> = vec!["row".into(), "line".into()];
    header.extend(input.headers.iter().map(|h| format!("as read: {h}")));
    header.extend(POINT_COLUMNS.iter().map(|s| s.to_string()));
    w.write_record(&header).map_err(csv_err)?;
    // One reused buffer per field rather than a vector of strings per row: a million rows
    // are written in about a second instead of several.
    let mut b = String::with_capacity(32);
    let mut num = |w: &mut csv::Writer<Vec<u8>>, v: Option<f64>| -> Result<(), ReportError> {
        b.clear();
        if let Some(x) = v.filter(|x| x.is_finite()) {
            let _ = write!(b, "{x}");
        }
        w.write_field(b.as_bytes()).map_err(csv_err)
    };
    for (r, d) in input.rows.iter().zip(input.fit.points()) {
        w.write_field(r.row.to_string()).map_err(csv_err)?;
        w.write_field(r.line.to_string()).map_err(csv_err)?;
        for i in 0..input.headers.len() {
            w.write_field(r.cells.get(i).map_or("", String::as_str))
                .map_err(csv_err)?;
        }
        num(&mut w, Some(r.t_k))?;
        num(&mut w, Some(r.ln_k))?;
        num(&mut w, r.sigma_ln_k)?;
        w.write_field(if r.included { "true" } else { "false" })
            .map_err(csv_err)?;
        num(&mut w, Some(d.fitted))?;
        num(&mut w, Some(d.residual))?;
        num(&mut w, Some(d.leverage))?;
        num(&mut w, d.student_int)?;
        num(&mut w, d.student_ext)?;
        num(&mut w, d.cooks_d)?;
        num(&mut w, d.dffits)?;
        w.write_field(flag_words(d.flags)).map_err(csv_err)?;
        w.write_field(r.exclusion_reason.as_deref().unwrap_or(""))
            .map_err(csv_err)?;
        w.write_record(None::<&[u8]>).map_err(csv_err)?;
    }
    w.into_inner()
        .map_err(|e| ReportError::Input(format!("writing CSV: {e}")))
}

/// The results table and fit statistics.
pub(crate) fn results_csv(input: &ReportInput) -> Result<Vec<u8>, ReportError> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(["quantity", "value", "se", "ci_low", "ci_high", "unit"])
        .map_err(csv_err)?;
    for r in result_rows(input) {
        let e = r.estimate;
        w.write_record([
            r.quantity.clone(),
            fin(e.value),
            fin(e.se),
            fin(e.ci_low),
            fin(e.ci_high),
            r.unit.clone(),
        ])
        .map_err(csv_err)?;
    }
    // The constant in the quantity the file gave (K_d in its unit, pKa, K), plain numbers.
    let (kind, symbol) = input
        .quantity
        .clone()
        .unwrap_or((isochore_fit::QuantityKind::K, "K".to_string()));
    let tu = input.temperature_unit;
    for (name, v, lo, hi) in
        crate::present::quantity::constant_values(&input.fit, kind, &symbol, tu)
    {
        w.write_record([
            name,
            fin(v),
            String::new(),
            fin(lo),
            fin(hi),
            crate::present::quantity::quantity_unit(kind).to_string(),
        ])
        .map_err(csv_err)?;
    }
    for (k, v) in statistics_rows(&input.fit) {
        w.write_record([
            k,
            v,
            String::new(),
            String::new(),
            String::new(),
            String::new(),
        ])
        .map_err(csv_err)?;
    }
    // With --calorimetric-in-fit: the series fitted again with its calorimetric values as
    // observations of ΔH°(T), each parameter "… with ΔH_cal", then its χ² and degrees of
    // freedom (the fit of ln K alone is the rows above).
    if let Some(Ok((alone, with))) = &input.calorimetric_fit {
        let labels = [input.series_name.clone()];
        let (e, tu) = (input.energy_unit, input.temperature_unit);
        for r in crate::present::joint::constrained_rows(with, alone, &labels, e, tu) {
            let x = r.with.estimate;
            w.write_record([
                format!("{} with ΔH_cal", r.with.quantity),
                fin(x.value),
                fin(x.se),
                fin(x.ci_low),
                fin(x.ci_high),
                r.with.unit.clone(),
            ])
            .map_err(csv_err)?;
        }
        let plain = |k: &str, v: String| {
            [
                k.to_string(),
                v,
                String::new(),
                String::new(),
                String::new(),
                String::new(),
            ]
        };
        w.write_record(plain("χ² with ΔH_cal", fin(with.statistics().chi2)))
            .map_err(csv_err)?;
        w.write_record(plain(
            "degrees of freedom with ΔH_cal",
            with.dof().to_string(),
        ))
        .map_err(csv_err)?;
        w.write_record(plain(
            "calorimetric values in the fit",
            with.n_calorimetric().to_string(),
        ))
        .map_err(csv_err)?;
    }
    w.into_inner()
        .map_err(|e| ReportError::Input(format!("writing CSV: {e}")))
}
