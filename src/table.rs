//! Readable text output of `vhfit fit`: the detailed table for one data set (estimates
//! ± SE with intervals, fit statistics, model comparison, flagged and excluded points,
//! warnings in words) and the one-row-per-series summary of a batch.

use crate::load::Job;
use isochore_fit::VantHoffFit;
use isochore_report::present::{
    critical_distribution, fitted_params, fixed, flag_words, level_percent, names, plus_minus,
    quantity, result_rows, show_t, sig, statistics_rows, unit_of, MISSING,
};
use std::io::{self, Write};

fn pad(s: &str, w: usize) -> String {
    let n = s.chars().count();
    if n >= w {
        s.to_string()
    } else {
        format!("{s}{}", " ".repeat(w - n))
    }
}

fn lpad(s: &str, w: usize) -> String {
    let n = s.chars().count();
    if n >= w {
        s.to_string()
    } else {
        format!("{}{s}", " ".repeat(w - n))
    }
}

/// The full readable account of one fit.
pub fn detailed(w: &mut impl Write, job: &Job, fit: &VantHoffFit) -> io::Result<()> {
    writeln!(w, "{} — series “{}”", job.source, job.series)?;
    writeln!(
        w,
        "model: {}; {}{}; {}% intervals ({})",
        fit.model().describe(),
        names::weighting(fit.weighted()),
        if fit.weighted() {
            format!(", {}", names::sigma_convention(fit.options().convention))
        } else {
            String::new()
        },
        level_percent(fit),
        critical_distribution(fit)
    )?;
    writeln!(w)?;
    let rows = result_rows(fit, job.energy, job.temperature);
    let lp = level_percent(fit);
    let header = [
        "quantity".to_string(),
        "value".to_string(),
        "± SE".to_string(),
        format!("{lp}% CI"),
        "unit".to_string(),
    ];
    // Then the constant in the quantity the file gave (K_d in nM, pKa, K ×10ⁿ) at θ and
    // T_hm, as the reports and the window give it; its interval is not symmetric, so no SE.
    let symbol = quantity::quantity_symbol(job.quantity, &job.quantity_header);
    let constant = quantity::constant_rows(fit, job.quantity, &symbol, job.temperature);
    let cells: Vec<[String; 5]> = rows
        .iter()
        .map(|r| {
            let [v, se, lo, hi] = r.cells();
            [
                r.quantity.clone(),
                v,
                format!("± {se}"),
                format!("[{lo}, {hi}]"),
                r.unit.clone(),
            ]
        })
        .chain(constant.into_iter().map(|c| {
            [
                c[0].clone(),
                c[1].clone(),
                String::new(),
                format!("[{}, {}]", c[3], c[4]),
                c[5].clone(),
            ]
        }))
        .collect();
    let mut widths = header.clone().map(|h| h.chars().count());
    for c in &cells {
        for (i, s) in c.iter().enumerate() {
            widths[i] = widths[i].max(s.chars().count());
        }
    }
    let line = |w: &mut dyn Write, c: &[String; 5]| -> io::Result<()> {
        writeln!(
            w,
            "  {}  {}  {}  {}  {}",
            pad(&c[0], widths[0]),
            lpad(&c[1], widths[1]),
            pad(&c[2], widths[2]),
            pad(&c[3], widths[3]),
            c[4]
        )
    };
    line(w, &header)?;
    for c in &cells {
        line(w, c)?;
    }
    // ΔCp° models: where ΔH° changes sign (or that it does not near the data) in words.
    // Below the table, after a blank line (the table ends at the first blank line).
    if let Some(words) = fit.delta_h_zero_words_in(|t| show_t(t, job.temperature)) {
        writeln!(w)?;
        writeln!(w, "  {words}")?;
    }
    writeln!(w)?;
    writeln!(w, "fit statistics:")?;
    for (k, v) in statistics_rows(fit) {
        writeln!(w, "  {}  {v}", pad(&k, 28))?;
    }
    writeln!(w)?;
    match fit.comparison() {
        Some(c) => {
            writeln!(w, "model comparison: {}", c.verdict)?;
            writeln!(
                w,
                "  {} ({})",
                names::data_support(isochore_report::present::model_name(c.preferred)),
                names::DELTA_AICC_SIGN
            )?;
        }
        None => writeln!(w, "model comparison: not possible with so few points")?,
    }
    let flagged: Vec<String> = job
        .rows
        .iter()
        .zip(fit.points())
        .filter(|(_, d)| d.flags.any())
        .take(50)
        .map(|(r, d)| {
            format!(
                "  row {} (line {}, {}): {}; {} = {}, h = {}, D = {}",
                r.row,
                r.line,
                show_t(d.t_k, job.temperature),
                flag_words(d.flags),
                names::STUDENTIZED_SHORT,
                d.student_ext
                    .or(d.prediction_residual)
                    .map_or(MISSING.into(), |t| fixed(t, 2)),
                fixed(d.leverage, 3),
                d.cooks_d.map_or(MISSING.into(), |c| fixed(c, 3))
            )
        })
        .collect();
    if !flagged.is_empty() {
        writeln!(w, "flagged points:")?;
        for f in flagged {
            writeln!(w, "{f}")?;
        }
    }
    let excluded: Vec<String> = job
        .rows
        .iter()
        .zip(job.measurements.iter())
        .filter(|(_, m)| !m.included)
        .take(50)
        .map(|(r, _)| {
            format!(
                "  row {} (line {}): {}",
                r.row,
                r.line,
                r.exclusion_reason.unwrap_or("no reason recorded")
            )
        })
        .collect();
    if !excluded.is_empty() {
        writeln!(w, "excluded points:")?;
        for e in excluded {
            writeln!(w, "{e}")?;
        }
    }
    let warnings: Vec<&str> = job
        .warnings
        .iter()
        .map(String::as_str)
        .chain(fit.warnings().iter().map(|w| w.message.as_str()))
        .collect();
    if !warnings.is_empty() {
        writeln!(w, "warnings:")?;
        for m in warnings {
            writeln!(w, "  - {m}")?;
        }
    }
    Ok(())
}

/// One line of a batch summary.
pub struct SummaryRow {
    /// Source, series, points used/given and model.
    lead: Vec<String>,
    /// Each fitted parameter's symbol with "value ± SE" in display units, in model order.
    params: Vec<(&'static str, String)>,
    /// R², flagged points and warnings.
    tail: Vec<String>,
}

impl SummaryRow {
    /// The summary of one fit.
    pub fn new(job: &Job, fit: &VantHoffFit) -> Self {
        let params = fitted_params(fit)
            .iter()
            .map(|p| {
                let e = unit_of(p.info.dimension, job.energy).estimate(p.estimate);
                (p.info.symbol, plus_minus(e.value, e.se))
            })
            .collect();
        SummaryRow {
            lead: vec![
                job.source.clone(),
                job.series.clone(),
                format!("{}/{}", fit.n_used(), fit.n_total()),
                fit.model().key().to_string(),
            ],
            params,
            tail: vec![
                sig(fit.stats().r2, 5),
                fit.flagged_points().len().to_string(),
                (fit.warnings().len() + job.warnings.len()).to_string(),
            ],
        }
    }
}

/// The batch table: one column per parameter any row's model fits (in model order; "—"
/// where a row's model has no such parameter).
pub fn summary(w: &mut impl Write, rows: &[SummaryRow]) -> io::Result<()> {
    let mut symbols: Vec<&'static str> = Vec::new();
    for (symbol, _) in rows.iter().flat_map(|r| &r.params) {
        if !symbols.contains(symbol) {
            symbols.push(symbol);
        }
    }
    let mut header: Vec<String> = ["source", "series", "n", "model"]
        .iter()
        .map(|s| s.to_string())
        .collect();
    header.extend(symbols.iter().map(|s| s.to_string()));
    header.extend(["R²", "flagged", "warnings"].iter().map(|s| s.to_string()));
    let cells: Vec<Vec<String>> = rows
        .iter()
        .map(|r| {
            let mut c = r.lead.clone();
            c.extend(symbols.iter().map(|s| {
                r.params
                    .iter()
                    .find(|(p, _)| p == s)
                    .map_or(MISSING.to_string(), |(_, v)| v.clone())
            }));
            c.extend(r.tail.iter().cloned());
            c
        })
        .collect();
    let mut widths: Vec<usize> = header.iter().map(|h| h.chars().count()).collect();
    for r in &cells {
        for (i, c) in r.iter().enumerate() {
            widths[i] = widths[i].max(c.chars().count());
        }
    }
    let write_row = |w: &mut dyn Write, cells: &[String]| -> io::Result<()> {
        let parts: Vec<String> = cells
            .iter()
            .enumerate()
            .map(|(i, c)| pad(c, widths[i]))
            .collect();
        writeln!(w, "{}", parts.join("  ").trim_end())
    };
    write_row(w, &header)?;
    for r in &cells {
        write_row(w, r)?;
    }
    Ok(())
}
