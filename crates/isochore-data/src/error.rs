//! The error types of `isochore-data`: whole-file faults ([`Error`]) and the per-row faults
//! ([`RejectedRow`], [`RowProblem`]) that an import collects instead of giving up.
//!
//! Every message names the file, the physical line (header = line 1 when it is the first
//! line; comment and blank lines count) and the 1-based column with its header, and says
//! what would be accepted, so that a chemist can go straight to the cell in an editor.

use std::fmt;

/// Why one data row was not accepted. Shown after a location prefix by [`RejectedRow`].
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum RowProblem {
    /// A cell that must hold a number holds something else.
    NotANumber,
    /// A cell that must hold a number is empty.
    Empty,
    /// NaN or an infinity written in a number cell.
    NotFinite,
    /// The temperature is at or below absolute zero once converted to kelvin.
    BelowAbsoluteZero {
        /// The temperature in kelvin.
        kelvin: f64,
    },
    /// K or a dissociation constant is zero or negative, so it has no logarithm.
    NonPositiveConstant,
    /// An uncertainty is zero or negative.
    NonPositiveSigma,
    /// The converted ln K or σ(ln K) is not a finite number (a value far out of range).
    OutOfRange,
    /// A number so small that it underflows double precision to zero (e.g. `1e-400`).
    Underflow,
    /// A temperature outside the plausible range 1 to 10 000 K, not confirmed with
    /// [`crate::ImportOptions::allow_extreme_temperatures`].
    ImplausibleTemperature {
        /// The temperature in kelvin.
        kelvin: f64,
    },
    /// The row has a different number of cells than the header.
    Ragged {
        /// Cells in the header.
        expected: usize,
        /// Cells in this row.
        found: usize,
    },
}

/// One data row that was not accepted, with where and why.
#[derive(Debug, Clone, PartialEq)]
pub struct RejectedRow {
    /// Physical 1-based line in the file (comment and blank lines count).
    pub line: usize,
    /// 1-based column of the offending cell, if one cell is at fault.
    pub column: Option<usize>,
    /// The header of that column, if any.
    pub header: Option<String>,
    /// The cell as typed (trimmed), if one cell is at fault.
    pub cell: Option<String>,
    /// What is wrong.
    pub problem: RowProblem,
}

impl RejectedRow {
    /// A one-line message without the file name, e.g.
    /// `line 14, column 2 ('Kd (nM)'): 'abc' is not a number; …`.
    pub fn message(&self) -> String {
        let mut s = format!("line {}", self.line);
        if let Some(c) = self.column {
            s.push_str(&format!(", column {c}"));
            if let Some(h) = &self.header {
                s.push_str(&format!(" ('{h}')"));
            }
        }
        s.push_str(": ");
        let cell = self.cell.as_deref().unwrap_or("");
        match &self.problem {
            RowProblem::NotANumber => s.push_str(&format!(
                "'{cell}' is not a number; write a decimal number such as 25.0, 0.5 or 1.2e-3"
            )),
            RowProblem::Empty => {
                s.push_str("the cell is empty; a number is needed here (or delete the row)")
            }
            RowProblem::NotFinite => s.push_str(&format!(
                "'{cell}' is not a finite number; NaN and infinity cannot be fitted (delete the row or fill in the value)"
            )),
            RowProblem::BelowAbsoluteZero { kelvin } => s.push_str(&format!(
                "'{cell}' is {kelvin:.2} K, at or below absolute zero; check the value and the temperature unit in the header"
            )),
            RowProblem::NonPositiveConstant => s.push_str(&format!(
                "'{cell}' is zero or negative; an equilibrium or dissociation constant must be greater than 0"
            )),
            RowProblem::NonPositiveSigma => s.push_str(&format!(
                "'{cell}' is zero or negative; an uncertainty must be greater than 0 (leave the cell empty if unknown)"
            )),
            RowProblem::OutOfRange => s.push_str(&format!(
                "'{cell}' is out of range: its logarithm is not a finite number"
            )),
            RowProblem::Underflow => s.push_str(&format!(
                "'{cell}' is too small to represent: it underflows to 0 in double precision (the smallest is about 1e-308); check the value and its unit"
            )),
            RowProblem::ImplausibleTemperature { kelvin } => s.push_str(&format!(
                "'{cell}' is {} K, outside the plausible range {} to {} K; check the value and the temperature unit, or confirm such temperatures explicitly",
                short(*kelvin),
                isochore_fit::MIN_PLAUSIBLE_K,
                isochore_fit::MAX_PLAUSIBLE_K
            )),
            RowProblem::Ragged { expected, found } => s.push_str(&format!(
                "the row has {found} cells but the header has {expected}; every row needs one cell per header column (check for a stray or missing delimiter)"
            )),
        }
        s
    }
}

/// A value for a message: at most 6 significant digits, in exponent form when very large
/// or small.
fn short(v: f64) -> String {
    if !v.is_finite() {
        return format!("{v}");
    }
    let rounded = format!("{v:.5e}").parse::<f64>().unwrap_or(v);
    format!("{rounded:?}")
}

impl fmt::Display for RejectedRow {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message())
    }
}

/// Why a file, a piece of pasted text or a project could not be read or written.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum Error {
    /// The operating system refused to read or write a file.
    Io {
        /// The path involved.
        path: String,
        /// The system's message.
        message: String,
    },
    /// The file is larger than [`crate::ImportOptions::max_file_bytes`].
    FileTooLarge {
        /// The file name.
        file: String,
        /// Its size in bytes (at least this many).
        bytes: u64,
        /// The limit.
        limit: u64,
    },
    /// Nothing but blank and comment lines.
    Empty {
        /// The file name.
        file: String,
    },
    /// A header line but no data rows.
    HeaderOnly {
        /// The file name.
        file: String,
        /// The header line.
        line: usize,
    },
    /// A NUL byte: a binary file, or UTF-16 text without a byte-order mark.
    Binary {
        /// The file name.
        file: String,
        /// Physical line of the first NUL.
        line: usize,
        /// 1-based character position of the first NUL in that line.
        character: usize,
    },
    /// A line longer than [`crate::ImportOptions::max_line_bytes`].
    LineTooLong {
        /// The file name.
        file: String,
        /// The line.
        line: usize,
        /// Its length in bytes.
        bytes: usize,
        /// The limit.
        limit: usize,
    },
    /// A line with more cells than [`crate::ImportOptions::max_columns`].
    TooManyColumns {
        /// The file name.
        file: String,
        /// The line.
        line: usize,
        /// Cells found (at least this many).
        found: usize,
        /// The limit.
        limit: usize,
    },
    /// Two columns with the same header.
    DuplicateHeader {
        /// The file name.
        file: String,
        /// The header line.
        line: usize,
        /// 1-based column of the first occurrence.
        first: usize,
        /// 1-based column of the repeat.
        second: usize,
        /// The header text.
        header: String,
    },
    /// A column choice of the caller names a column the file does not have.
    NoSuchColumn {
        /// The file name.
        file: String,
        /// The header line.
        line: usize,
        /// The choice as typed (`temperature=T_degC`).
        choice: String,
        /// All headers found.
        found: Vec<String>,
    },
    /// A header that is not recognised (only when unknown columns are refused, see
    /// `ImportOptions::ignore_unknown_columns`).
    UnknownHeader {
        /// The file name.
        file: String,
        /// The header line.
        line: usize,
        /// 1-based column.
        column: usize,
        /// The header text.
        header: String,
        /// All headers found.
        found: Vec<String>,
    },
    /// A recognised quantity with a unit that is not accepted for it.
    UnknownUnit {
        /// The file name.
        file: String,
        /// The header line.
        line: usize,
        /// 1-based column.
        column: usize,
        /// The header text.
        header: String,
        /// The unit as written.
        unit: String,
        /// The units that would be accepted for this column.
        accepted: &'static str,
    },
    /// A column whose unit must be given (K_d, ΔG°) has none, or a temperature column
    /// without a unit whose values do not settle the scale.
    MissingUnit {
        /// The file name.
        file: String,
        /// The header line.
        line: usize,
        /// 1-based column.
        column: usize,
        /// The header text.
        header: String,
        /// What to write instead.
        hint: String,
    },
    /// A header that is recognised but does not fit the rest of the file (for example an
    /// uncertainty of a different quantity than the measured column).
    BadHeader {
        /// The file name.
        file: String,
        /// The header line.
        line: usize,
        /// 1-based column.
        column: usize,
        /// The header text.
        header: String,
        /// What is wrong and what to write instead.
        message: String,
    },
    /// A needed column (temperature or the measured quantity) is absent.
    MissingColumn {
        /// The file name.
        file: String,
        /// The header line.
        line: usize,
        /// "temperature" or "measured quantity".
        role: &'static str,
        /// All headers found.
        found: Vec<String>,
    },
    /// Two or more columns claim the same role.
    AmbiguousColumns {
        /// The file name.
        file: String,
        /// The header line.
        line: usize,
        /// The role ("temperature", "measured quantity", "uncertainty", …).
        role: &'static str,
        /// The 1-based columns with their headers.
        columns: Vec<(usize, String)>,
    },
    /// A column mapping given by the caller does not fit the file.
    InvalidMapping {
        /// The file name.
        file: String,
        /// What is wrong.
        message: String,
    },
    /// A data row was rejected and the caller asked for strict reading.
    Row {
        /// The file name.
        file: String,
        /// The rejected row.
        rejected: Box<RejectedRow>,
    },
    /// A data set has fewer usable points than needed.
    TooFewPoints {
        /// The file name.
        file: String,
        /// The data set.
        series: String,
        /// Usable points found.
        found: usize,
        /// Points needed.
        needed: usize,
        /// Rows rejected in the whole file, with their reasons.
        rejected: Vec<RejectedRow>,
    },
    /// All usable points of a data set share one temperature.
    SingleTemperature {
        /// The file name.
        file: String,
        /// The data set.
        series: String,
        /// The temperature in kelvin.
        kelvin: f64,
    },
    /// A project file is not valid JSON or does not match the project schema.
    ProjectDamaged {
        /// The path.
        path: String,
        /// What is wrong (with line and column where known).
        message: String,
        /// The backup `<path>.bak` of the previous save, when one exists beside the file
        /// (only then does the message point to it).
        backup: Option<String>,
    },
    /// A project file written by a newer version of Isochore.
    ProjectTooNew {
        /// The path.
        path: String,
        /// Its schema version.
        found: u32,
        /// The newest schema version this version reads.
        supported: u32,
    },
    /// A row of a project does not convert (the project was edited by hand).
    ProjectRow {
        /// The data set.
        series: String,
        /// 1-based data row.
        row: usize,
        /// The fault, located in the original file.
        rejected: Box<RejectedRow>,
    },
    /// Number cells use different decimal marks (or a comma that may be a thousands
    /// separator while nothing settles the convention).
    DecimalMark {
        /// The file name.
        file: String,
        /// Physical line of the offending cell.
        line: usize,
        /// Its 1-based column.
        column: usize,
        /// The column's header.
        header: String,
        /// The cell as typed.
        cell: String,
        /// What is wrong and how to state the convention.
        message: String,
    },
    /// A data set whose uncertainty column has values in some rows and an empty cell in
    /// others, read for a weighted fit.
    MissingSigma {
        /// The file name.
        file: String,
        /// The data set.
        series: String,
        /// Physical line of the first row without σ.
        line: usize,
        /// 1-based column of the uncertainty.
        column: usize,
        /// Its header.
        header: String,
    },
    /// A data row number that the data set does not have.
    NoSuchRow {
        /// The data set.
        series: String,
        /// The row asked for.
        row: usize,
        /// Rows in the data set.
        rows: usize,
    },
}

/// What the header recogniser accepts, shown with unknown-header errors.
pub const ACCEPTED_HEADERS: &str = "temperature: T, temp, temperature with a unit as \
'T (°C)', 'T/K', 'T_C', 'temp_K' or 'T [°F]'; measured quantity: K, Ka, Kb, Keq, ln K, log K, \
log10 K, lgK, pK, pKa, pKa2, pKw, pKb, pKd, Kd (M, mM, µM, uM, nM, pM), ΔG or dG (kJ/mol, \
kcal/mol, J/mol); uncertainty: sigma_…, sd_…, err_…, u(…), ±, σ, error, or '%' (percent of the value) \
column; data set: series, sample, sample id, condition, set, group (else name, label, run); free \
text: note, comment, remark; any other column is kept but not used";

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Error::Io { path, message } => write!(f, "{path}: {message}"),
            Error::FileTooLarge { file, bytes, limit } => write!(
                f,
                "{file}: the file is {bytes} bytes, more than the limit of {limit} bytes; split it or raise the limit"
            ),
            Error::Empty { file } => write!(
                f,
                "{file}: the file is empty (no header and no data); expected a header line such as 'T (°C),K' followed by one row per measurement"
            ),
            Error::HeaderOnly { file, line } => write!(
                f,
                "{file}: line {line} is a header but no data rows follow; add one row per measurement below it"
            ),
            Error::Binary { file, line, character } => write!(
                f,
                "{file}: line {line}, character {character}: a NUL byte; this looks like a binary file or UTF-16 text without a byte-order mark; save it as CSV text (UTF-8)"
            ),
            Error::LineTooLong { file, line, bytes, limit } => write!(
                f,
                "{file}: line {line} is {bytes} bytes long, more than the limit of {limit}; is this a delimited text file with one measurement per line?"
            ),
            Error::TooManyColumns { file, line, found, limit } => write!(
                f,
                "{file}: line {line} has at least {found} columns, more than the limit of {limit}; expected a few columns (temperature, quantity, uncertainty, series, note)"
            ),
            Error::DuplicateHeader { file, line, first, second, header } => write!(
                f,
                "{file}: line {line}, column {second} ('{header}'): the same header as column {first}; rename or delete one of them"
            ),
            Error::NoSuchColumn { file, line, choice, found } => write!(
                f,
                "{file}: line {line}: the column choice '{choice}' names no column of the file; columns found: {}",
                numbered_list(found)
            ),
            Error::UnknownHeader { file, line, column, header, found } => write!(
                f,
                "{file}: line {line}, column {column} ('{header}'): header not recognised. Headers found: {}. Accepted: {ACCEPTED_HEADERS}",
                quote_list(found)
            ),
            Error::UnknownUnit { file, line, column, header, unit, accepted } => write!(
                f,
                "{file}: line {line}, column {column} ('{header}'): unknown unit '{unit}'; accepted here: {accepted}"
            ),
            Error::MissingUnit { file, line, column, header, hint } => {
                write!(f, "{file}: line {line}, column {column} ('{header}'): {hint}")
            }
            Error::BadHeader { file, line, column, header, message } => {
                write!(f, "{file}: line {line}, column {column} ('{header}'): {message}")
            }
            Error::MissingColumn { file, line, role, found } => write!(
                f,
                "{file}: line {line}: no {role} column among the headers {}. Accepted: {ACCEPTED_HEADERS}",
                quote_list(found)
            ),
            Error::AmbiguousColumns { file, line, role, columns } => {
                let list: Vec<String> =
                    columns.iter().map(|(c, h)| format!("column {c} ('{h}')")).collect();
                write!(
                    f,
                    "{file}: line {line}: more than one {role} column: {}; keep one, or choose one in the column mapping",
                    list.join(", ")
                )
            }
            Error::InvalidMapping { file, message } => {
                write!(f, "{file}: the column mapping does not fit the file: {message}")
            }
            Error::Row { file, rejected } => write!(f, "{file}: {rejected}"),
            Error::TooFewPoints { file, series, found, needed, rejected } => {
                write!(
                    f,
                    "{file}: data set '{series}' has {}; at least {needed} are needed",
                    isochore_fit::error::counted(*found, "usable point", "usable points")
                )?;
                if let Some(first) = rejected.first() {
                    write!(
                        f,
                        " ({} of the file {} rejected; the first: {first})",
                        isochore_fit::error::counted(rejected.len(), "row", "rows"),
                        if rejected.len() == 1 { "was" } else { "were" }
                    )?;
                }
                Ok(())
            }
            Error::SingleTemperature { file, series, kelvin } => write!(
                f,
                "{file}: data set '{series}': every point is at one temperature ({kelvin:.2} K); a van 't Hoff analysis needs at least two temperatures"
            ),
            Error::ProjectDamaged { path, message, backup } => {
                write!(
                    f,
                    "{path}: not a readable Isochore project ({message}); the file was not changed"
                )?;
                if let Some(b) = backup {
                    write!(f, ". If a save was interrupted, '{b}' holds the previous version")?;
                }
                Ok(())
            }
            Error::ProjectTooNew { path, found, supported } => write!(
                f,
                "{path}: project schema version {found} is newer than this version of Isochore reads (up to {supported}); update Isochore. The file was not changed"
            ),
            Error::ProjectRow { series, row, rejected } => write!(
                f,
                "data set '{series}', row {row}: {rejected}"
            ),
            Error::DecimalMark { file, line, column, header, cell, message } => write!(
                f,
                "{file}: line {line}, column {column} ('{header}'): '{cell}': {message}"
            ),
            Error::MissingSigma { file, series, line, column, header } => write!(
                f,
                "{file}: line {line}, column {column} ('{header}'): the uncertainty cell is empty, while other rows of data set '{series}' give one; a weighted fit needs σ on every row. Fill in the cell, or fit unweighted, which ignores every σ"
            ),
            Error::NoSuchRow { series, row, rows } => write!(
                f,
                "data set '{series}' has no row {row}; rows are numbered 1 to {rows}"
            ),
        }
    }
}

impl std::error::Error for Error {}

fn quote_list(items: &[String]) -> String {
    let v: Vec<String> = items.iter().map(|h| format!("'{h}'")).collect();
    v.join(", ")
}

fn numbered_list(items: &[String]) -> String {
    let v: Vec<String> = items
        .iter()
        .enumerate()
        .map(|(i, h)| format!("{} '{h}'", i + 1))
        .collect();
    v.join(", ")
}
