//! The report's section on the fit with errors in T (issue 13), when the data set has σ(T):
//! the methods paragraph, each parameter with errors in T beside the fit in K only, S, the
//! comparison in words (the fit's own sentence, the one the command line prints) and each
//! point's adjusted temperature. A refusal (for example an unweighted fit) is said in words
//! instead. The lines come from [`crate::present::errors_in_t`].

use crate::content::{Block, Table, MAX_TABLE_ROWS};
use crate::present::{errors_in_t, names, percent};
use crate::ReportInput;

/// The blocks of the section; empty without σ(T).
pub(crate) fn blocks(input: &ReportInput) -> Vec<Block> {
    let Some(result) = &input.errors_in_t else {
        return Vec::new();
    };
    let mut b = vec![Block::Heading(capitalised(names::ERRORS_IN_T))];
    let f = match result {
        Ok(f) => f,
        Err(why) => {
            b.push(Block::Paragraph(format!(
                "The data set has σ(T), but the {} could not be made: {why}. The results above are the {}.",
                names::ERRORS_IN_T,
                names::K_ONLY
            )));
            return b;
        }
    };
    b.push(Block::Paragraph(errors_in_t::methods_paragraph(f)));
    let rows = errors_in_t::parameter_rows(f, input.energy_unit);
    b.push(Block::Table(Table {
        header: vec![
            "parameter".into(),
            format!("{} (value ± SE)", names::ERRORS_IN_T),
            format!("{}% CI", percent(input.fit.options().level)),
            format!("{} (value ± SE)", names::K_ONLY),
            "unit".into(),
        ],
        rows: rows
            .iter()
            .map(|r| {
                let (with, k_only) = r.plus_minus();
                vec![
                    r.symbol.to_string(),
                    with,
                    r.interval(),
                    k_only,
                    r.unit.to_string(),
                ]
            })
            .collect(),
        numeric: vec![false, true, true, true, false],
        note: Some(format!(
            "{}; {}.",
            capitalised(&errors_in_t::heading_line(f)),
            errors_in_t::sum_line(f)
        )),
    }));
    b.push(Block::Paragraph(format!(
        "{}.",
        capitalised(f.comparison())
    )));
    let shown: Vec<Vec<String>> =
        errors_in_t::point_rows(f, input.rows.iter().map(|r| r.row), input.temperature_unit)
            .into_iter()
            .take(MAX_TABLE_ROWS)
            .map(Vec::from)
            .collect();
    let n = f.points().len();
    b.push(Block::Table(Table {
        header: errors_in_t::POINT_HEADER.map(String::from).to_vec(),
        rows: shown,
        numeric: vec![true, true, true, true, true, true, true],
        note: Some(format!(
            "T* is the {} (the fit's estimate of the true temperature); share is the point's part of S.{}",
            names::ADJUSTED_T,
            if n > MAX_TABLE_ROWS {
                format!(" The first {MAX_TABLE_ROWS} of {n} points are shown.")
            } else {
                String::new()
            }
        )),
    }));
    b
}

/// `s` with its first letter in capitals.
fn capitalised(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_uppercase().chain(c).collect(),
        None => String::new(),
    }
}
