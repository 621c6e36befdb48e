//! Unit-guess stage of the reading pipeline: the temperature unit of a column whose header
//! names none.
//!
//! Reads the temperature cells once (before the scan) and applies the rule stated in the
//! README: every readable value below 150 is °C, every value at least 200 is K, anything
//! else is [`Error::MissingUnit`] asking for a unit. The mapping records the guess
//! (`temperature.assumed`), so that `Import::describe_mapping` says so.

use super::{DecimalMark, ImportOptions};
use crate::error::Error;
use crate::mapping::ColumnMapping;
use crate::text::{Delimiter, Reader, Record};
use isochore_fit::TemperatureUnit;

/// The rule for a temperature column without a unit (stated in the README): if every
/// readable value is below 150 the column is °C; if every value is at least 200 it is K;
/// otherwise the file must say.
#[allow(clippy::too_many_arguments)]
pub(super) fn decide_temperature_unit(
    file: &str,
    text: &str,
    data_start: usize,
    delimiter: Delimiter,
    o: &ImportOptions,
    headers: &[String],
    header_line: usize,
    mapping: &mut ColumnMapping,
) -> Result<(), Error> {
    let mut r = Reader::new(
        text,
        data_start,
        delimiter,
        o.max_line_bytes,
        o.max_columns,
        file,
    );
    let tc = mapping.temperature.column;
    let comma_ok = delimiter != Delimiter::Comma && o.decimal != DecimalMark::Point;
    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
    while let Some(Record { .. }) = r.next_record()? {
        if let Some(s) = r.spans.get(tc) {
            if let Ok(v) = crate::mapping::parse_number(s.raw(text), comma_ok) {
                lo = lo.min(v);
                hi = hi.max(v);
            }
        }
    }
    let unit = if hi < 150.0 {
        TemperatureUnit::Celsius
    } else if lo >= 200.0 {
        TemperatureUnit::Kelvin
    } else {
        return Err(Error::MissingUnit {
            file: file.to_string(),
            line: header_line,
            column: tc + 1,
            header: headers.get(tc).cloned().unwrap_or_default(),
            hint: format!(
                "the temperature has no unit and its values ({lo} to {hi}) do not tell °C from K; write the unit in the header, e.g. 'T (°C)' or 'T/K'"
            ),
        });
    };
    mapping.temperature.unit = unit;
    mapping.temperature.assumed = true;
    Ok(())
}
