//! The report's tables as CSV: every data row (cells as read, converted values and
//! per-point diagnostics) and the results (estimates with SE and interval in the user's
//! units, then the fit statistics). Written with the csv crate so quoting is always right.

use crate::content::{flag_words, result_rows, statistics_rows};
use crate::{ReportError, ReportInput};

fn csv_err(e: csv::Error) -> ReportError {
    ReportError::Input(format!("writing CSV: {e}"))
}

fn opt(v: Option<f64>) -> String {
    v.filter(|x| x.is_finite())
        .map_or(String::new(), |x| format!("{x}"))
}

fn fin(v: f64) -> String {
    if v.is_finite() {
        format!("{v}")
    } else {
        String::new()
    }
}

/// All data rows with full-precision converted values and diagnostics.
pub(crate) fn data_csv(input: &ReportInput) -> Result<Vec<u8>, ReportError> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header: Vec<String> = vec!["row".into(), "line".into()];
    header.extend(input.headers.iter().map(|h| format!("as read: {h}")));
    header.extend(
        [
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
        ]
        .iter()
        .map(|s| s.to_string()),
    );
    w.write_record(&header).map_err(csv_err)?;
    for (r, d) in input.rows.iter().zip(&input.fit.points) {
        let mut rec: Vec<String> = vec![r.row.to_string(), r.line.to_string()];
        for i in 0..input.headers.len() {
            rec.push(r.cells.get(i).cloned().unwrap_or_default());
        }
        rec.extend([
            fin(r.t_k),
            fin(r.ln_k),
            opt(r.sigma_ln_k),
            r.included.to_string(),
            fin(d.fitted),
            fin(d.residual),
            fin(d.leverage),
            opt(d.student_int),
            opt(d.student_ext),
            opt(d.cooks_d),
            opt(d.dffits),
            flag_words(d.flags),
            r.exclusion_reason.clone().unwrap_or_default(),
        ]);
        w.write_record(&rec).map_err(csv_err)?;
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
    w.into_inner()
        .map_err(|e| ReportError::Input(format!("writing CSV: {e}")))
}
