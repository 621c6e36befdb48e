//! A cell retyped after import (in the window's table): it must follow the decimal
//! convention of its data set, as every cell of its file did when it was read, and the
//! row must still convert. A comma typed into a data set of decimal points may be a
//! thousands separator ("65,000"), and a point typed into a data set of decimal commas
//! may be one too ("65.000"): both are refused, as the importer refuses a file that mixes
//! the two, rather than read as 65.

use crate::dataset::DataSet;
use crate::error::{Error, RejectedRow};
use crate::mapping::{convert_cells, mark_of, Mark};

impl DataSet {
    /// Checks, without changing anything, that 0-based row `row` still converts with
    /// `text` in 0-based column `column`, and that a number typed into a mapped column
    /// (temperature, value, uncertainty) uses the data set's decimal mark.
    ///
    /// # Errors
    /// [`Error::DecimalMark`] naming the line and column when the typed number's mark
    /// breaks the data set's convention; [`Error::ProjectRow`] with the row, line and
    /// column when the row no longer converts; [`Error::NoSuchRow`] or
    /// [`Error::NoSuchColumn`] for a row or column that does not exist.
    pub fn check_cell_edit(&self, row: usize, column: usize, text: &str) -> Result<(), Error> {
        let no_such_row = || Error::NoSuchRow {
            series: self.name.clone(),
            row: row.saturating_add(1),
            rows: self.rows.len(),
        };
        let raw = self.rows.get(row).ok_or_else(no_such_row)?;
        if column >= raw.cells.len().max(self.headers.len()) {
            return Err(Error::NoSuchColumn {
                file: self.source.name.clone(),
                line: self.header_line,
                choice: format!("column {}", column.saturating_add(1)),
                found: self.headers.clone(),
            });
        }
        let m = &self.mapping;
        let numeric = column == m.temperature.column
            || column == m.quantity.column
            || m.uncertainty.is_some_and(|u| u.column == column);
        if numeric {
            if let Some(message) = mark_problem(text, self.written_with()) {
                return Err(Error::DecimalMark {
                    file: self.source.name.clone(),
                    line: raw.line,
                    column: column + 1,
                    header: self.headers.get(column).cloned().unwrap_or_default(),
                    cell: text.trim().to_string(),
                    message,
                });
            }
        }
        let cell = |c: usize| {
            if c == column {
                text
            } else {
                raw.cells.get(c).map_or("", String::as_str)
            }
        };
        convert_cells(
            m,
            self.decimal_comma,
            self.settings.fit.allow_extreme_temperatures,
            cell,
        )
        .map(|_| ())
        .map_err(|(col, problem)| Error::ProjectRow {
            series: self.name.clone(),
            row: row + 1,
            rejected: Box::new(RejectedRow {
                line: raw.line,
                column: Some(col + 1),
                header: self.headers.get(col).cloned(),
                cell: Some(cell(col).trim().to_string()),
                problem,
            }),
        })
    }
}

/// The decimal mark a data set's cells are written with.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Written {
    /// Decimal points (or commas are not decimal marks in it at all).
    Points,
    /// Decimal commas, shown by at least one cell.
    Commas,
    /// Commas are allowed as decimal marks but no cell shows either mark.
    Unsettled,
}

impl DataSet {
    /// Which decimal mark the number cells of this data set are written with: its
    /// `decimal_comma` setting, and, where that allows commas, the first cell of a mapped
    /// column that shows a mark (a data set of decimal points stays one even when its file
    /// allowed commas).
    fn written_with(&self) -> Written {
        if !self.decimal_comma {
            return Written::Points;
        }
        let m = &self.mapping;
        let columns: Vec<usize> = [m.temperature.column, m.quantity.column]
            .into_iter()
            .chain(m.uncertainty.map(|u| u.column))
            .collect();
        for r in &self.rows {
            for &c in &columns {
                match r.cells.get(c).map_or(Mark::None, |t| mark_of(t)) {
                    Mark::Point => return Written::Points,
                    Mark::Comma => return Written::Commas,
                    Mark::None | Mark::AmbiguousComma => {}
                }
            }
        }
        Written::Unsettled
    }
}

/// Why a typed number's decimal mark does not fit a data set written as `written` says,
/// in words; `None` when it fits.
fn mark_problem(text: &str, written: Written) -> Option<String> {
    let message = match (mark_of(text), written) {
        (Mark::AmbiguousComma, Written::Points) => {
            "the comma may be a thousands separator or a decimal comma, and this data set is written with decimal points; type the number with a decimal point, without a thousands separator"
        }
        (Mark::Comma, Written::Points) => {
            "a decimal comma, but this data set is written with decimal points; type the number with a decimal point"
        }
        (Mark::Point, Written::Commas | Written::Unsettled) => {
            "a decimal point, but this data set is written with decimal commas (a point may be a thousands separator); type the number with a decimal comma, without a thousands separator"
        }
        (Mark::AmbiguousComma, Written::Unsettled) => {
            "the comma may be a thousands separator or a decimal comma, and no cell of this data set settles which; type the number without a thousands separator, with a decimal comma"
        }
        _ => return None,
    };
    Some(message.to_string())
}

#[cfg(test)]
mod tests {
    use crate::{import_text, ImportOptions, Project};

    fn series(text: &str) -> crate::DataSet {
        let imp = import_text("lab.csv", text, &ImportOptions::default()).unwrap();
        Project::from_import(&imp).series.remove(0)
    }

    #[test]
    fn a_typed_number_follows_the_data_sets_decimal_mark() {
        // Invented numbers; the files' conventions are stated by their own cells.
        let points = series("T (°C),K,u(K)\n20,1.5,0.1\n25,2.5,0.1\n30,3.5,0.1\n");
        assert!(!points.decimal_comma);
        assert!(points.check_cell_edit(0, 1, "1.75").is_ok());
        assert!(points.check_cell_edit(0, 1, "65000").is_ok());
        let e = points
            .check_cell_edit(0, 1, "65,000")
            .unwrap_err()
            .to_string();
        assert!(
            e.starts_with("lab.csv: line 2, column 2 ('K'): '65,000':"),
            "{e}"
        );
        assert!(e.contains("thousands separator"), "{e}");
        assert!(points.check_cell_edit(2, 0, "30,5").is_err());

        let commas = series("T (°C);K;u(K)\n20;1,5;0,1\n25;2,5;0,1\n30;3,5;0,1\n");
        assert!(commas.decimal_comma);
        assert!(commas.check_cell_edit(1, 1, "2,75").is_ok());
        let e = commas
            .check_cell_edit(1, 1, "65.000")
            .unwrap_err()
            .to_string();
        assert!(
            e.starts_with("lab.csv: line 3, column 2 ('K'): '65.000':"),
            "{e}"
        );
        // In a data set of decimal commas, "1,500" is 1.5 (the file's rule settles it).
        assert!(commas.check_cell_edit(1, 1, "1,500").is_ok());

        // A data set of decimal points whose setting allows commas (as a project written
        // before the setting meant "decimal commas" may say): its cells settle it.
        let mut lax = points.clone();
        lax.decimal_comma = true;
        assert!(lax.check_cell_edit(0, 1, "65,000").is_err());
        assert!(lax.check_cell_edit(0, 1, "65.5").is_ok());
    }

    #[test]
    fn a_row_that_no_longer_converts_is_named() {
        let points = series("T (°C),K\n20,1.5\n25,2.5\n30,3.5\n");
        let e = points.check_cell_edit(2, 1, "abc").unwrap_err().to_string();
        assert!(e.contains("row 3") && e.contains("line 4"), "{e}");
        assert!(points.check_cell_edit(7, 1, "1").is_err());
        assert!(points.check_cell_edit(0, 9, "1").is_err());
    }
}
