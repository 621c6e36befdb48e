//! Column choices made by the caller on top of the header reading: "this column is the
//! temperature", "column 3 holds K", "no data-set column". A choice is written
//! `ROLE=COLUMN`: the role is read the way a header is (`temperature`, `T (K)`, `K`, `pKa`,
//! `Kd (nM)`, `ΔG (kJ/mol)`, `sigma`, `u(pKa)`, `RSD (%)`, `series`, `note`, or `value` for
//! "the measured quantity, as its header says"), and the column is a header as typed or a
//! 1-based number; `none` drops the role (σ, data set or note). Each chosen column replaces
//! the column the headers gave that role, which is then kept but not used.

use crate::error::Error;
use crate::header::{classify, Class};
use isochore_fit::{QuantityKind, TemperatureUnit};
use std::str::FromStr;

/// The roles a column can be chosen for, in words (for messages and help texts).
pub const COLUMN_ROLES: &str = "temperature (or T, 'T (K)', 'T (°C)'), the measured quantity \
(K, ln K, log K, pKa, 'Kd (nM)', 'ΔG (kJ/mol)', …, or value to take the kind from the \
column's header), sigma (or u(pKa), 'RSD (%)'), sigma-t (the temperature's uncertainty σ(T), \
in the temperature column's unit; or u(T)), series, note";

/// Which column a choice names.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum ColumnRef {
    /// A 1-based column number.
    Number(usize),
    /// A header, as typed (compared without case and surrounding spaces).
    Name(String),
    /// No column: the role is dropped (only for σ, the data set and the note).
    Nothing,
}

/// What a chosen column is to hold.
#[derive(Debug, Clone, PartialEq)]
enum Role {
    Temperature(Option<TemperatureUnit>),
    /// `None`: the kind its header says.
    Quantity(Option<QuantityKind>),
    /// The uncertainty as its role text reads (`sigma`, `u(pKa)`, `RSD (%)`).
    Uncertainty(Class),
    /// The temperature's standard uncertainty σ(T).
    TemperatureUncertainty,
    Series,
    Note,
}

impl Role {
    fn name(&self) -> &'static str {
        match self {
            Role::Temperature(_) => "temperature",
            Role::Quantity(_) => "measured quantity",
            Role::Uncertainty(_) => "uncertainty",
            Role::TemperatureUncertainty => "temperature uncertainty σ(T)",
            Role::Series => "data set (series)",
            Role::Note => "note",
        }
    }

    /// Whether a column read as `c` holds this role.
    fn holds(&self, c: &Class) -> bool {
        matches!(
            (self, c),
            (Role::Temperature(_), Class::Temp(_))
                | (Role::Quantity(_), Class::Quantity(_))
                | (Role::Uncertainty(_), Class::Uncertainty { .. })
                | (
                    Role::TemperatureUncertainty,
                    Class::TempUncertainty { chosen: true }
                )
                | (Role::Series, Class::Series | Class::Label)
                | (Role::Note, Class::Note)
        )
    }
}

/// One column choice, `ROLE=COLUMN` (see the module documentation).
#[derive(Debug, Clone, PartialEq)]
pub struct ColumnChoice {
    text: String,
    role: Role,
    column: ColumnRef,
}

impl ColumnChoice {
    /// The choice as typed.
    pub fn as_typed(&self) -> &str {
        &self.text
    }

    /// The column it names.
    pub fn column(&self) -> &ColumnRef {
        &self.column
    }
}

impl FromStr for ColumnChoice {
    type Err = String;

    /// Reads `ROLE=COLUMN`, e.g. `temperature=T_degC`, `K=3`, `Kd (nM)=conc`, `series=none`.
    ///
    /// # Errors
    /// A message naming what is wrong: no `=`, an empty side, or a role that is not one.
    fn from_str(s: &str) -> Result<Self, String> {
        let Some((role_text, col_text)) = s.split_once('=') else {
            return Err(format!(
                "'{s}' is not a column choice: write ROLE=COLUMN, e.g. temperature=T_degC or K=3"
            ));
        };
        let (role_text, col_text) = (role_text.trim(), col_text.trim());
        if col_text.is_empty() {
            return Err(format!(
                "'{s}' names no column: give a header or a column number after '='"
            ));
        }
        let role = parse_role(role_text)?;
        let column = if col_text.eq_ignore_ascii_case("none") {
            if matches!(role, Role::Temperature(_) | Role::Quantity(_)) {
                return Err(format!(
                    "'{s}': the {} column cannot be none; a file needs one",
                    role.name()
                ));
            }
            ColumnRef::Nothing
        } else {
            match col_text.parse::<usize>() {
                Ok(0) => return Err(format!("'{s}': column numbers start at 1")),
                Ok(n) => ColumnRef::Number(n),
                Err(_) => ColumnRef::Name(col_text.to_string()),
            }
        };
        Ok(ColumnChoice {
            text: s.trim().to_string(),
            role,
            column,
        })
    }
}

fn parse_role(t: &str) -> Result<Role, String> {
    let n = t.to_lowercase();
    if matches!(n.as_str(), "value" | "quantity" | "measured") {
        return Ok(Role::Quantity(None));
    }
    if matches!(
        n.as_str(),
        "sigma-t" | "sigma_t" | "sigmat" | "sigma t" | "σt" | "σ-t" | "u-t" | "u_t"
    ) {
        return Ok(Role::TemperatureUncertainty);
    }
    match classify(t) {
        Class::Temp(u) => Ok(Role::Temperature(u)),
        Class::Quantity(k) => Ok(Role::Quantity(Some(k))),
        c @ Class::Uncertainty { .. } => Ok(Role::Uncertainty(c)),
        Class::Series | Class::Label => Ok(Role::Series),
        Class::Note => Ok(Role::Note),
        Class::TempUncertainty { .. } => Ok(Role::TemperatureUncertainty),
        Class::Ignored | Class::Unknown => Err(format!(
            "'{t}' is not a column role (a quantity needs its unit where it has one, e.g. 'Kd (nM)'); roles: {COLUMN_ROLES}"
        )),
    }
}

/// Lays the caller's choices over the classes read from the headers.
pub(crate) fn apply(
    classes: &mut [Class],
    headers: &[String],
    choices: &[ColumnChoice],
    file: &str,
    line: usize,
) -> Result<(), Error> {
    let mut chosen: Vec<(usize, &ColumnChoice)> = Vec::new();
    for choice in choices {
        let column = match &choice.column {
            ColumnRef::Nothing => None,
            ColumnRef::Number(n) => Some(
                (*n <= headers.len())
                    .then(|| n - 1)
                    .ok_or_else(|| no_such_column(choice, headers, file, line))?,
            ),
            ColumnRef::Name(name) => Some(
                headers
                    .iter()
                    .position(|h| h.trim().eq_ignore_ascii_case(name.trim()))
                    .ok_or_else(|| no_such_column(choice, headers, file, line))?,
            ),
        };
        if let Some(c) = column {
            if let Some((_, earlier)) = chosen.iter().find(|(d, _)| *d == c) {
                return Err(Error::InvalidMapping {
                    file: file.to_string(),
                    message: format!(
                        "column {} ('{}') is chosen twice: '{}' and '{}'",
                        c + 1,
                        headers[c],
                        earlier.text,
                        choice.text
                    ),
                });
            }
            chosen.push((c, choice));
        }
        let own = column.map(|c| classes[c].clone());
        // The chosen column replaces the one the headers gave this role.
        for cl in classes.iter_mut() {
            if choice.role.holds(cl) {
                *cl = Class::Ignored;
            }
        }
        let Some(c) = column else {
            continue;
        };
        let own = own.unwrap_or(Class::Unknown);
        classes[c] = match &choice.role {
            Role::Temperature(None) if matches!(own, Class::Temp(Some(_))) => own,
            Role::Temperature(u) => Class::Temp(*u),
            Role::Quantity(Some(k)) => Class::Quantity(*k),
            Role::Quantity(None) => match own {
                Class::Quantity(_) => own,
                _ => {
                    return Err(Error::InvalidMapping {
                        file: file.to_string(),
                        message: format!(
                            "'{}': the header of column {} ('{}') does not say what it holds; name the quantity instead of '{}', e.g. K={}, pKa={} or 'Kd (nM)={}'",
                            choice.text,
                            c + 1,
                            headers[c],
                            choice.text.split('=').next().unwrap_or("").trim(),
                            c + 1,
                            c + 1,
                            c + 1
                        ),
                    })
                }
            },
            Role::Uncertainty(u) => {
                let bare = *u
                    == Class::Uncertainty {
                        of: None,
                        unit: None,
                        relative: false,
                    };
                if bare && matches!(own, Class::Uncertainty { .. }) {
                    own
                } else {
                    u.clone()
                }
            }
            Role::TemperatureUncertainty => Class::TempUncertainty { chosen: true },
            Role::Series => Class::Series,
            Role::Note => Class::Note,
        };
    }
    Ok(())
}

fn no_such_column(choice: &ColumnChoice, headers: &[String], file: &str, line: usize) -> Error {
    Error::NoSuchColumn {
        file: file.to_string(),
        line,
        choice: choice.text.clone(),
        found: headers.to_vec(),
    }
}

/// The caller's scale for a temperature column whose header carries no unit. A header (or
/// a choice) that states another unit is refused rather than overruled.
pub(crate) fn apply_temperature_unit(
    classes: &mut [Class],
    headers: &[String],
    unit: Option<TemperatureUnit>,
    file: &str,
) -> Result<(), Error> {
    let Some(unit) = unit else {
        return Ok(());
    };
    for (i, c) in classes.iter_mut().enumerate() {
        match c {
            Class::Temp(None) => *c = Class::Temp(Some(unit)),
            Class::Temp(Some(stated)) if *stated != unit => {
                return Err(Error::InvalidMapping {
                    file: file.to_string(),
                    message: format!(
                        "column {} ('{}') states {}, but the temperature unit given for the file is {}; the unit given is for a header that carries none",
                        i + 1,
                        headers[i],
                        stated.symbol(),
                        unit.symbol()
                    ),
                });
            }
            _ => {}
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{import_text, ImportOptions, UncertaintyKind};
    use isochore_fit::ConcentrationUnit;

    fn choose(list: &[&str]) -> ImportOptions {
        ImportOptions {
            columns: list.iter().map(|c| c.parse().unwrap()).collect(),
            ..ImportOptions::default()
        }
    }

    const TEXT: &str = "operator,T_degC,conc,spread\nAB,10,5,0.5\nAB,20,8,0.4\nCD,30,12,0.6\n";

    #[test]
    fn choices_map_columns_by_name_and_number() {
        let o = choose(&["temperature=T_degC", "Kd (nM)=3", "sigma=4"]);
        let imp = import_text("x.csv", TEXT, &o).unwrap();
        let m = &imp.mapping;
        assert_eq!(m.temperature.column, 1);
        // 10, 20, 30 are all below 150: °C by the unit rule of the crate README.
        assert_eq!(m.temperature.unit, TemperatureUnit::Celsius);
        assert_eq!(
            m.quantity.kind,
            QuantityKind::DissociationConstant(ConcentrationUnit::Nanomolar)
        );
        assert_eq!(
            m.uncertainty.map(|u| (u.column, u.kind)),
            Some((
                3,
                UncertaintyKind::Absolute(QuantityKind::DissociationConstant(
                    ConcentrationUnit::Nanomolar
                ))
            ))
        );
        assert_eq!(m.unused_columns(&imp.headers), vec!["operator"]);
    }

    #[test]
    fn a_chosen_column_replaces_the_recognised_one() {
        let text = "T (°C),T_K,pKa\n10,283.15,7.6\n20,293.15,7.5\n30,303.15,7.4\n";
        // Two temperature columns: ambiguous until one is chosen.
        assert!(import_text("x.csv", text, &ImportOptions::default()).is_err());
        let imp = import_text("x.csv", text, &choose(&["temperature=2"])).unwrap();
        assert_eq!(imp.mapping.temperature.column, 1);
        assert_eq!(imp.mapping.temperature.unit, TemperatureUnit::Kelvin);
        assert_eq!(imp.mapping.unused_columns(&imp.headers), vec!["T (°C)"]);
    }

    #[test]
    fn bad_choices_name_what_is_wrong() {
        let e = import_text("x.csv", TEXT, &choose(&["temperature=T_C", "K=3"]))
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("'temperature=T_C'") && e.contains("no column"),
            "{e}"
        );
        assert!(e.contains("'T_degC'"), "lists the headers: {e}");
        let e = import_text("x.csv", TEXT, &choose(&["temperature=2", "K=9"]))
            .unwrap_err()
            .to_string();
        assert!(e.contains("'K=9'"), "{e}");
        let e = import_text("x.csv", TEXT, &choose(&["temperature=2", "value=3"]))
            .unwrap_err()
            .to_string();
        assert!(e.contains("does not say what it holds"), "{e}");
        assert!("absorbance=3".parse::<ColumnChoice>().is_err());
        assert!("K".parse::<ColumnChoice>().is_err());
        assert!("K=0".parse::<ColumnChoice>().is_err());
        assert!("temperature=none".parse::<ColumnChoice>().is_err());
        assert_eq!(
            "series=none".parse::<ColumnChoice>().unwrap().column(),
            &ColumnRef::Nothing
        );
    }

    #[test]
    fn a_temperature_uncertainty_is_used_only_when_chosen() {
        let text = "T (°F),pKa,u(T)\n50,7.6,0.18\n68,7.5,0.18\n86,7.4,0.36\n";
        // Read from its header alone, u(T) is kept but not used (as before the role).
        let imp = import_text("x.csv", text, &ImportOptions::default()).unwrap();
        assert_eq!(imp.mapping.temperature_uncertainty, None);
        assert_eq!(imp.mapping.unused_columns(&imp.headers), vec!["u(T)"]);
        for choice in ["sigma-t=u(T)", "sigma_t=3", "u(T)=3", "σ(T)=u(T)"] {
            let imp = import_text("x.csv", text, &choose(&[choice])).unwrap();
            assert_eq!(imp.mapping.temperature_uncertainty, Some(2), "{choice}");
            assert!(imp.mapping.unused_columns(&imp.headers).is_empty());
            let d = imp.mapping.describe(&imp.headers);
            assert!(
                d.iter().any(|l| l.contains("σ(T) in °F, × 5/9 to K")),
                "{d:?}"
            );
        }
        let imp = import_text("x.csv", text, &choose(&["sigma-t=3", "sigma-t=none"])).unwrap();
        assert_eq!(imp.mapping.temperature_uncertainty, None);
        // A column cannot be both σ(ln K) and σ(T).
        let e = import_text("x.csv", text, &choose(&["sigma=3", "sigma-t=3"])).unwrap_err();
        assert!(e.to_string().contains("chosen twice"), "{e}");
    }

    #[test]
    fn sigma_t_in_kelvin_and_bad_cells_named() {
        // °F: a difference of 0.18 °F is 0.1 K (5/9, SI Brochure's definition of the scale).
        let text = "T (°F),pKa,u(T)\n50,7.6,0.18\n68,7.5,0.18\n86,7.4,0.36\n";
        let imp = import_text("x.csv", text, &choose(&["sigma-t=u(T)"])).unwrap();
        let s = imp.data_sets_with_cells()[0].sigma_t_k().unwrap().unwrap();
        for (got, want) in s.iter().zip([0.1, 0.1, 0.2]) {
            assert!((got - want).abs() < 1e-15, "{got}");
        }
        // The reader's rows alone cannot give σ(T): said, not guessed.
        assert!(imp.series[0].sigma_t_k().is_err());
        // °C: the same number in K.
        let text = "T (°C),pKa,u(T)\n10,7.6,0.1\n20,7.5,0.1\n30,7.4,0.2\n";
        let imp = import_text("x.csv", text, &choose(&["sigma-t=3"])).unwrap();
        let s = imp.data_sets_with_cells()[0].sigma_t_k().unwrap().unwrap();
        assert_eq!(s, vec![0.1, 0.1, 0.2]);
        for (cell, words) in [
            ("", "empty"),
            ("0", "zero or negative"),
            ("-0.1", "zero or negative"),
            ("NaN", ""),
        ] {
            let text = format!("T (°C),pKa,u(T)\n10,7.6,0.1\n20,7.5,{cell}\n30,7.4,0.2\n");
            let imp = import_text("x.csv", &text, &choose(&["sigma-t=3"])).unwrap();
            let e = imp.data_sets_with_cells()[0]
                .sigma_t_k()
                .unwrap_err()
                .to_string();
            assert!(
                e.contains("line 3, column 3 ('u(T)')") && e.contains(words),
                "{cell:?}: {e}"
            );
        }
        // Without the role there is no σ(T).
        let imp = import_text("x.csv", text, &ImportOptions::default()).unwrap();
        assert_eq!(imp.data_sets_with_cells()[0].sigma_t_k().unwrap(), None);
    }

    #[test]
    fn temperature_unit_for_a_header_without_one() {
        let text = "T,K\n10,2\n20,3\n30,4\n";
        let o = ImportOptions {
            temperature_unit: Some(TemperatureUnit::Kelvin),
            allow_extreme_temperatures: true,
            ..ImportOptions::default()
        };
        let imp = import_text("x.csv", text, &o).unwrap();
        assert_eq!(imp.mapping.temperature.unit, TemperatureUnit::Kelvin);
        assert!(!imp.mapping.temperature.assumed);
        // A header that states °C is not overruled.
        let e = import_text("x.csv", "T (°C),K\n10,2\n20,3\n30,4\n", &o)
            .unwrap_err()
            .to_string();
        assert!(e.contains("column 1 ('T (°C)') states °C"), "{e}");
    }
}
