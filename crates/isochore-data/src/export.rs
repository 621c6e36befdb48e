//! Export of a data set to CSV with a units-bearing header that the importer reads back:
//! `T (K)`, the measured quantity in its own unit (`Kd (nM)`, `pK`, `dG (kJ/mol)`, …), its
//! absolute uncertainty `u(…)` when any row has one, and `note`. Leading `#` lines record
//! the data set, its source and the exclusions (the importer skips them).

use crate::dataset::{DataSet, Exclusion};
use crate::error::Error;
use crate::import::Row;
use isochore_fit::QuantityKind;

/// The header the export writes for a quantity kind, e.g. "Kd (nM)".
pub fn quantity_header(kind: QuantityKind) -> String {
    match kind {
        QuantityKind::K => "K".into(),
        QuantityKind::LnK => "ln K".into(),
        QuantityKind::Log10K => "log K".into(),
        QuantityKind::PK => "pK".into(),
        QuantityKind::DissociationConstant(u) => format!("Kd ({})", u.symbol()),
        QuantityKind::DeltaG(e) => format!("dG ({})", e.symbol()),
    }
}

fn uncertainty_header(kind: QuantityKind) -> String {
    match kind {
        QuantityKind::K => "u(K)".into(),
        QuantityKind::LnK => "u(ln K)".into(),
        QuantityKind::Log10K => "u(log K)".into(),
        QuantityKind::PK => "u(pK)".into(),
        QuantityKind::DissociationConstant(u) => format!("u(Kd) ({})", u.symbol()),
        QuantityKind::DeltaG(e) => format!("u(dG) ({})", e.symbol()),
    }
}

/// Formats a number so that it reads back to the same f64 (shortest round-trip form).
fn num(v: f64) -> String {
    let a = v.abs();
    if a == 0.0 || (1e-4..1e7).contains(&a) {
        format!("{v}")
    } else {
        format!("{v:e}")
    }
}

/// Exports a data set, writing the quantity as `kind` (usually its file's,
/// `mapping.quantity.kind`, as [`DataSet::export_csv`] does).
///
/// # Errors
/// As [`DataSet::converted`].
pub fn export_csv(set: &DataSet, kind: QuantityKind) -> Result<String, Error> {
    set.export_csv_as(kind)
}

pub(crate) fn write_csv(
    name: &str,
    source: &str,
    kind: QuantityKind,
    rows: &[Row],
    notes: &[Option<String>],
    exclusions: &[Exclusion],
) -> String {
    let one_line = |s: &str| s.replace(['\n', '\r'], " ");
    let mut out = String::new();
    out.push_str(&format!("# data set: {}\n", one_line(name)));
    if !source.is_empty() {
        out.push_str(&format!("# source: {}\n", one_line(source)));
    }
    for e in exclusions {
        out.push_str(&format!(
            "# excluded row {} at {}: {}\n",
            e.row,
            one_line(&e.at),
            one_line(&e.reason)
        ));
    }
    let has_sigma = rows.iter().any(|r| r.sigma_ln_k().is_some());
    let has_note = notes.iter().any(Option::is_some);
    let mut w = csv::WriterBuilder::new()
        .terminator(csv::Terminator::Any(b'\n'))
        .from_writer(Vec::new());
    let mut header = vec!["T (K)".to_string(), quantity_header(kind)];
    if has_sigma {
        header.push(uncertainty_header(kind));
    }
    if has_note {
        header.push("note".into());
    }
    // Writing to a Vec cannot fail; errors are ignored rather than unwrapped.
    let _ = w.write_record(&header);
    for (i, r) in rows.iter().enumerate() {
        let (t, ln_k, sigma) = (r.t_k, r.ln_k, r.sigma_ln_k());
        let value = kind.from_ln_k(ln_k, t);
        let mut rec = vec![num(t), num(value)];
        if has_sigma {
            rec.push(
                sigma
                    .map(|s| num(kind.sigma_from_ln_k(value, s, t)))
                    .unwrap_or_default(),
            );
        }
        if has_note {
            let n = notes.get(i).cloned().flatten().unwrap_or_default();
            // A note starting with '#' would read as a comment line when first in a row; it
            // never is first here, but keep it quoted-safe anyway through the csv writer.
            rec.push(n);
        }
        let _ = w.write_record(&rec);
    }
    let bytes = w.into_inner().unwrap_or_default();
    out.push_str(&String::from_utf8_lossy(&bytes));
    out
}
