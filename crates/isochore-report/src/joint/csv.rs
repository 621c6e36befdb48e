//! A joint fit's tables as CSV: every data row of every series with its converted values
//! and diagnostics in the joint fit, and the results — shared and per-series estimates,
//! differences, the test of equality, the compensation analysis and the calorimetric
//! comparison, and the joint fit with the calorimetric values as observations of ΔH°(T)
//! when asked for (section `calorimetric_fit`) — one row each, full precision in the
//! display units.

use super::JointReportInput;
use crate::csv_tables::{csv_err, fin, POINT_COLUMNS};
use crate::present::{flag_words, joint};
use crate::ReportError;

fn opt(v: Option<f64>) -> String {
    v.map_or_else(String::new, fin)
}

/// Every row of every series, in the fit's series order.
pub(super) fn data_csv(input: &JointReportInput) -> Result<Vec<u8>, ReportError> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header = vec!["series", "source", "row", "line"];
    header.extend(POINT_COLUMNS);
    w.write_record(&header).map_err(csv_err)?;
    for (s, series) in input.series.iter().enumerate() {
        for (r, d) in series.rows.iter().zip(input.fit.points(s).unwrap_or(&[])) {
            w.write_record([
                series.label.clone(),
                series.source_name.clone(),
                r.row.to_string(),
                r.line.to_string(),
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
            ])
            .map_err(csv_err)?;
        }
    }
    w.into_inner()
        .map_err(|e| ReportError::Input(format!("writing CSV: {e}")))
}

/// The results, one row each: section, series (or pair, or empty), quantity, value, SE,
/// interval and unit; tests give their statistic as the value and the rest in words.
pub(super) fn results_csv(input: &JointReportInput) -> Result<Vec<u8>, ReportError> {
    let (e, tu) = (input.energy_unit, input.temperature_unit);
    let fit = &input.fit;
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record([
        "section", "series", "quantity", "value", "se", "ci_low", "ci_high", "unit",
    ])
    .map_err(csv_err)?;
    let est = |w: &mut csv::Writer<Vec<u8>>,
               section: &str,
               series: &str,
               r: &crate::present::ResultRow|
     -> Result<(), ReportError> {
        let x = r.estimate;
        w.write_record([
            section.to_string(),
            series.to_string(),
            r.quantity.clone(),
            fin(x.value),
            fin(x.se),
            fin(x.ci_low),
            fin(x.ci_high),
            r.unit.clone(),
        ])
        .map_err(csv_err)
    };
    for r in joint::shared_rows(fit, e, tu) {
        est(&mut w, "shared", "", &r)?;
    }
    for (s, series) in input.series.iter().enumerate() {
        for r in joint::series_rows(fit, s, e, tu) {
            est(&mut w, "per series", &series.label, &r)?;
        }
    }
    for (pair, r) in joint::difference_rows(fit, &input.labels(), e, tu) {
        est(&mut w, "difference", &pair, &r)?;
    }
    let text = |w: &mut csv::Writer<Vec<u8>>,
                section: &str,
                series: &str,
                quantity: &str,
                value: String,
                unit: &str|
     -> Result<(), ReportError> {
        w.write_record([section, series, quantity, value.as_str(), "", "", "", unit])
            .map_err(csv_err)
    };
    if let Some(t) = &input.equality {
        for [name, shared, separate] in joint::equality_side_by_side(t) {
            text(&mut w, "equality: shared fit", "", &name, shared, "")?;
            text(&mut w, "equality: separate fits", "", &name, separate, "")?;
        }
        text(
            &mut w,
            "equality test",
            "",
            t.method().key(),
            fin(t.statistic()),
            "",
        )?;
        text(
            &mut w,
            "equality test",
            "",
            "df_num",
            t.df_num().to_string(),
            "",
        )?;
        text(
            &mut w,
            "equality test",
            "",
            "df_den",
            t.df_den().to_string(),
            "",
        )?;
        text(
            &mut w,
            "equality test",
            "",
            "p_value",
            fin(t.decisive_p_value()),
            "",
        )?;
        text(&mut w, "equality test", "", "verdict", t.verdict(), "")?;
    }
    if let Some(c) = &input.compensation {
        if let Some(b) = &c.beta {
            w.write_record([
                "compensation".to_string(),
                String::new(),
                "beta (York)".to_string(),
                fin(b.beta),
                fin(b.se_beta),
                fin(b.ci_low),
                fin(b.ci_high),
                "K".to_string(),
            ])
            .map_err(csv_err)?;
            text(&mut w, "compensation", "", "t_hm", fin(b.t_hm_k), "K")?;
            text(&mut w, "compensation", "", "verdict", b.verdict.clone(), "")?;
        }
        if let Some(x) = &c.exner {
            text(&mut w, "exner", "", "F", fin(x.f_statistic), "")?;
            text(&mut w, "exner", "", "p_value", fin(x.p_value), "")?;
            text(&mut w, "exner", "", "t_iso", opt(x.t_iso_k), "K")?;
            text(&mut w, "exner", "", "verdict", x.verdict.clone(), "")?;
        }
    }
    let eu = crate::present::energy(e);
    for series in &input.series {
        for c in &series.calorimetric {
            let at = crate::present::show_t(c.calorimetric.t_k, tu);
            let d = eu.estimate(c.difference);
            w.write_record([
                "calorimetric".to_string(),
                series.label.clone(),
                format!("ΔH_vH − ΔH_cal at {at}"),
                fin(d.value),
                fin(d.se),
                fin(d.ci_low),
                fin(d.ci_high),
                eu.symbol.to_string(),
            ])
            .map_err(csv_err)?;
            let (lo, hi) = c.ratio_ci.unwrap_or((f64::NAN, f64::NAN));
            w.write_record([
                "calorimetric".to_string(),
                series.label.clone(),
                format!("ΔH_vH/ΔH_cal at {at}"),
                fin(c.ratio),
                String::new(),
                fin(lo),
                fin(hi),
                String::new(),
            ])
            .map_err(csv_err)?;
            text(
                &mut w,
                "calorimetric",
                &series.label,
                &format!("z at {at}"),
                fin(c.z),
                "",
            )?;
        }
    }
    if let Some(Ok(c)) = &input.calorimetric_fit {
        for r in joint::constrained_rows(c, &input.fit, &input.labels(), e, tu) {
            let x = r.with.estimate;
            w.write_record([
                "calorimetric_fit".to_string(),
                r.series.clone(),
                r.with.quantity.clone(),
                fin(x.value),
                fin(x.se),
                fin(x.ci_low),
                fin(x.ci_high),
                r.with.unit.clone(),
            ])
            .map_err(csv_err)?;
        }
    }
    w.into_inner()
        .map_err(|e| ReportError::Input(format!("writing CSV: {e}")))
}
