//! Columns of a file that are kept but not used: shown with the data (the import preview,
//! the report's data table), left out of the fit, and named once in a note. One sentence for
//! the command line, the window and the reports.

use isochore_data::ColumnMapping;

/// The note naming the columns kept but not used, e.g. "columns kept but not used:
/// operator, date"; `None` when every column with a header has a role.
pub fn unused_columns_note(mapping: &ColumnMapping, headers: &[String]) -> Option<String> {
    let unused = mapping.unused_columns(headers);
    match unused.len() {
        0 => None,
        1 => Some(format!("column kept but not used: {}", unused[0])),
        _ => Some(format!("columns kept but not used: {}", unused.join(", "))),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use isochore_data::{import_text, ImportOptions};

    #[test]
    fn one_note_names_every_unused_column() {
        let text = "operator,T (°C),pKa,date,\nAB,10,7.6,2026-01-05,\nAB,20,7.5,2026-01-05,\nCD,30,7.4,2026-01-06,\n";
        let imp = import_text("x.csv", text, &ImportOptions::default()).unwrap();
        assert_eq!(
            unused_columns_note(&imp.mapping, &imp.headers).as_deref(),
            Some("columns kept but not used: operator, date")
        );
        let imp = import_text(
            "x.csv",
            "T (°C),pKa,operator\n10,7.6,A\n20,7.5,A\n30,7.4,B\n",
            &ImportOptions::default(),
        )
        .unwrap();
        assert_eq!(
            unused_columns_note(&imp.mapping, &imp.headers).as_deref(),
            Some("column kept but not used: operator")
        );
        let imp = import_text(
            "x.csv",
            "T (°C),pKa\n10,7.6\n20,7.5\n30,7.4\n",
            &ImportOptions::default(),
        )
        .unwrap();
        assert_eq!(unused_columns_note(&imp.mapping, &imp.headers), None);
    }
}
