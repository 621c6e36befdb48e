//! A file of calorimetric enthalpies, to be compared with van 't Hoff fits (issue 12 item 3,
//! `vhfit fit --calorimetric-file FILE`): delimited text (comma, semicolon or tab; `#`
//! comment lines) with a header naming, in any order,
//!
//! - the temperature, with its unit as in a data file: `T (°C)`, `T/K`, `temp [°F]`;
//! - the calorimetric enthalpy with its unit: `ΔH (kJ/mol)`, `dH_cal [kcal/mol]`, `dH/J/mol`
//!   is not read (write the unit in brackets);
//! - its standard uncertainty: `u`, `sd`, `σ`, `u(ΔH)`, … with a unit in brackets or, with
//!   none, the enthalpy's unit;
//! - optionally the series it belongs to (`series`, `sample`, `ligand`, …).
//!
//! Units come from the header rules of data files (`header.rs`); values are returned in K
//! and J/mol. A cell that is not a number, a temperature at or below 0 K or a negative
//! uncertainty is refused with its file, line and column.

use crate::error::{Error, RejectedRow, RowProblem};
use crate::header::{energy_unit, norm_name, split_bracket_unit, temp_unit};
use serde::{Deserialize, Serialize};
use std::path::Path;

/// One calorimetric enthalpy kept with a data set in a project file (the window's
/// calorimetric values of a series): ΔH_cal ± u at a temperature, SI units, the keys those
/// of the JSON output.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct SavedCalorimetric {
    /// Temperature, K.
    pub t_k: f64,
    /// ΔH_cal, J/mol.
    pub delta_h_cal: f64,
    /// Its standard uncertainty, J/mol.
    pub u_cal: f64,
}

impl SavedCalorimetric {
    /// Why the value cannot be used, in words, or `None`: a temperature at or below 0 K, a
    /// ΔH_cal that is not a number, or an uncertainty that is negative or not a number.
    pub fn problem(&self) -> Option<&'static str> {
        if !(self.t_k.is_finite() && self.t_k > 0.0) {
            Some("the temperature must be above 0 K")
        } else if !self.delta_h_cal.is_finite() {
            Some("ΔH_cal must be a number")
        } else if !(self.u_cal.is_finite() && self.u_cal >= 0.0) {
            Some("the uncertainty u must be a number ≥ 0")
        } else {
            None
        }
    }
}

/// One calorimetric value as read: SI units, the series it names if any, and its line.
#[derive(Debug, Clone, PartialEq)]
pub struct CalorimetricRow {
    /// The series named in the row, when the file has a series column.
    pub series: Option<String>,
    /// Temperature, K.
    pub t_k: f64,
    /// ΔH_cal, J/mol.
    pub delta_h: f64,
    /// Its standard uncertainty, J/mol.
    pub u: f64,
    /// 1-based line in the file.
    pub line: usize,
}

#[derive(Clone, Copy, PartialEq)]
enum Role {
    Series,
    Temperature,
    Enthalpy,
    Uncertainty,
}

fn role_of(base: &str) -> Option<Role> {
    let n = norm_name(base);
    if matches!(
        n.as_str(),
        "series" | "sample" | "ligand" | "condition" | "dataset" | "set" | "group" | "name"
    ) {
        return Some(Role::Series);
    }
    if matches!(n.as_str(), "t" | "temp" | "temperature") {
        return Some(Role::Temperature);
    }
    for p in [
        "u",
        "sd",
        "σ",
        "sigma",
        "se",
        "err",
        "error",
        "uncertainty",
        "stdev",
    ] {
        if let Some(rest) = n.strip_prefix(p) {
            if rest.is_empty()
                || rest.starts_with("deltah")
                || rest.starts_with("dh")
                || rest == "cal"
            {
                return Some(Role::Uncertainty);
            }
        }
    }
    if n.starts_with("deltah") || n.starts_with("dh") || n == "h" || n == "enthalpy" {
        return Some(Role::Enthalpy);
    }
    None
}

fn split_row(line: &str, delim: char) -> Vec<String> {
    line.split(delim)
        .map(|c| c.trim().trim_matches('"').trim().to_string())
        .collect()
}

/// Reads the calorimetric values of `text` (named `file` in messages).
///
/// # Errors
/// [`Error::Empty`] or [`Error::HeaderOnly`] for a file without values;
/// [`Error::MissingColumn`] without a temperature, enthalpy or uncertainty column;
/// [`Error::AmbiguousColumns`] for two columns of one role; [`Error::MissingUnit`] /
/// [`Error::UnknownUnit`] for a temperature or enthalpy without an accepted unit;
/// [`Error::Row`] for a cell that is not a usable number (line and column named).
pub fn parse_calorimetric(file: &str, text: &str) -> Result<Vec<CalorimetricRow>, Error> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut lines = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l))
        .filter(|(_, l)| !l.trim().is_empty() && !l.trim_start().starts_with('#'));
    let Some((header_line, header)) = lines.next() else {
        return Err(Error::Empty {
            file: file.to_string(),
        });
    };
    let delim = if header.contains('\t') {
        '\t'
    } else if header.contains(';') {
        ';'
    } else {
        ','
    };
    let headers = split_row(header, delim);
    let found = headers.clone();
    let mut cols: [Option<(usize, Option<String>)>; 4] = [None, None, None, None];
    for (i, h) in headers.iter().enumerate() {
        let (base, unit) = match split_bracket_unit(h) {
            Some((b, u)) => (b.to_string(), Some(u.to_string())),
            None => match h.split_once('/') {
                Some((b, u)) if !b.trim().is_empty() => {
                    (b.trim().to_string(), Some(u.trim().to_string()))
                }
                _ => (h.clone(), None),
            },
        };
        let Some(role) = role_of(&base) else { continue };
        let slot = &mut cols[role as usize];
        if let Some((first, _)) = slot {
            return Err(Error::AmbiguousColumns {
                file: file.to_string(),
                line: header_line,
                role: [
                    "series",
                    "temperature",
                    "calorimetric ΔH",
                    "uncertainty of ΔH",
                ][role as usize],
                columns: vec![(*first + 1, headers[*first].clone()), (i + 1, h.clone())],
            });
        }
        *slot = Some((i, unit));
    }
    let missing = |role: &'static str| Error::MissingColumn {
        file: file.to_string(),
        line: header_line,
        role,
        found: found.clone(),
    };
    let (t_col, t_unit) = cols[Role::Temperature as usize]
        .clone()
        .ok_or_else(|| missing("temperature"))?;
    let (h_col, h_unit) = cols[Role::Enthalpy as usize]
        .clone()
        .ok_or_else(|| missing("calorimetric ΔH"))?;
    let (u_col, u_unit) = cols[Role::Uncertainty as usize]
        .clone()
        .ok_or_else(|| missing("uncertainty of ΔH"))?;
    let series_col = cols[Role::Series as usize].as_ref().map(|c| c.0);
    let unit_error =
        |col: usize, unit: Option<String>, accepted: &'static str, hint: &str| match unit {
            None => Error::MissingUnit {
                file: file.to_string(),
                line: header_line,
                column: col + 1,
                header: headers[col].clone(),
                hint: hint.to_string(),
            },
            Some(u) => Error::UnknownUnit {
                file: file.to_string(),
                line: header_line,
                column: col + 1,
                header: headers[col].clone(),
                unit: u,
                accepted,
            },
        };
    let tu = t_unit
        .as_deref()
        .and_then(temp_unit)
        .ok_or_else(|| unit_error(t_col, t_unit.clone(), "K, °C, °F", "T (°C) or T (K)"))?;
    let hu = h_unit.as_deref().and_then(energy_unit).ok_or_else(|| {
        unit_error(
            h_col,
            h_unit.clone(),
            "kJ/mol, kcal/mol, J/mol",
            "ΔH (kJ/mol)",
        )
    })?;
    let uu = match &u_unit {
        None => hu,
        Some(u) => energy_unit(u).ok_or_else(|| {
            unit_error(
                u_col,
                u_unit.clone(),
                "kJ/mol, kcal/mol, J/mol",
                "u (kJ/mol)",
            )
        })?,
    };
    let mut out = Vec::new();
    for (line, l) in lines {
        let cells = split_row(l, delim);
        let reject = |col: usize, problem: RowProblem| Error::Row {
            file: file.to_string(),
            rejected: Box::new(RejectedRow {
                line,
                column: Some(col + 1),
                header: headers.get(col).cloned(),
                cell: cells.get(col).cloned(),
                problem,
            }),
        };
        let num = |col: usize| -> Result<f64, Error> {
            let c = cells.get(col).map_or("", String::as_str);
            if c.is_empty() {
                return Err(reject(col, RowProblem::Empty));
            }
            let v: f64 = c
                .replace('−', "-")
                .parse()
                .map_err(|_| reject(col, RowProblem::NotANumber))?;
            if v.is_finite() {
                Ok(v)
            } else {
                Err(reject(col, RowProblem::NotFinite))
            }
        };
        let t_k = tu.to_kelvin(num(t_col)?);
        if t_k <= 0.0 {
            return Err(reject(t_col, RowProblem::BelowAbsoluteZero { kelvin: t_k }));
        }
        let delta_h = num(h_col)? * hu.joules_per_mole();
        let u = num(u_col)? * uu.joules_per_mole();
        if u < 0.0 {
            return Err(reject(u_col, RowProblem::NonPositiveSigma));
        }
        let series = series_col
            .and_then(|c| cells.get(c))
            .filter(|s| !s.is_empty())
            .cloned();
        out.push(CalorimetricRow {
            series,
            t_k,
            delta_h,
            u,
            line,
        });
    }
    if out.is_empty() {
        return Err(Error::HeaderOnly {
            file: file.to_string(),
            line: header_line,
        });
    }
    Ok(out)
}

/// Reads a calorimetric file from `path` (see [`parse_calorimetric`]).
///
/// # Errors
/// [`Error::Io`] when the file cannot be read, then as [`parse_calorimetric`].
pub fn read_calorimetric(path: &Path) -> Result<Vec<CalorimetricRow>, Error> {
    let file = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|e| Error::Io {
        path: file.clone(),
        message: e.to_string(),
    })?;
    let text = String::from_utf8_lossy(&bytes);
    parse_calorimetric(&file, &text)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_units_series_and_refuses_bad_cells_in_words() {
        // The demo's invented values (kJ/mol; 25 °C = 298.15 K by definition of °C).
        let rows = parse_calorimetric(
            "itc.csv",
            "# invented\nsample,T (°C),dH_cal (kJ/mol),u\nPX-11,25,-62.4,0.6\nPX-13,37,-45.1,0.5\n",
        )
        .unwrap();
        assert_eq!(rows.len(), 2);
        assert_eq!(rows[0].series.as_deref(), Some("PX-11"));
        assert!((rows[0].t_k - 298.15).abs() < 1e-12);
        assert!((rows[0].delta_h + 62_400.0).abs() < 1e-9);
        assert!((rows[0].u - 600.0).abs() < 1e-9);
        assert_eq!(rows[1].line, 4);
        // kcal/mol: 1 kcal = 4184 J (thermochemical calorie); u in its own unit.
        let rows = parse_calorimetric("x", "T/K;ΔH (kcal/mol);u (J/mol)\n300;-10;250\n").unwrap();
        assert!((rows[0].delta_h + 41_840.0).abs() < 1e-9 && rows[0].u == 250.0);
        assert!(rows[0].series.is_none());
        let e = parse_calorimetric("f.csv", "T (°C),ΔH (kJ/mol),u\n25,abc,0.5\n")
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("f.csv") && e.contains("line 2") && e.contains("column 2"),
            "{e}"
        );
        let e = parse_calorimetric("f.csv", "T,ΔH (kJ/mol),u\n25,-1,0.5\n")
            .unwrap_err()
            .to_string();
        assert!(e.contains("T (°C)"), "{e}");
        let e = parse_calorimetric("f.csv", "T (°C),u\n25,0.5\n")
            .unwrap_err()
            .to_string();
        assert!(e.contains("calorimetric ΔH"), "{e}");
    }
}
