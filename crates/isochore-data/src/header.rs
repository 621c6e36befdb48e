//! Header recognition: turns the header cells of a file into a [`ColumnMapping`].
//!
//! A header is read as a name plus an optional unit. The unit may follow in parentheses or
//! brackets (`T (°C)`, `Kd [µM]`), after a slash (`T/K`, `ΔG/kJ mol-1`) or after the last
//! underscore or space (`T_C`, `temp_K`, `Kd_nM`). Uncertainty columns are marked by a
//! leading or trailing word (`sigma_`, `sd_`, `err_`, `_err`, `σ`, `±`), by a function form
//! (`u(pKa)`, `σ(log K)`) or stand alone (`σ`, `±`, `sd`, `error`); a `%` unit or a `rel`,
//! `RSD` or `CV` word makes them relative. Matching ignores case, spaces, underscores and
//! dots, reads `µ`/`μ` as `u` and drops degree signs.

use crate::error::Error;
use crate::mapping::{
    same_family, ColumnMapping, QuantityColumn, TemperatureColumn, UncertaintyColumn,
    UncertaintyKind,
};
use isochore_fit::{ConcentrationUnit, EnergyUnit, QuantityKind, TemperatureUnit};

/// Family of a recognised name, before its unit is known.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Fam {
    Temp,
    K,
    LnK,
    Log,
    PK,
    /// pK_d = −log₁₀(K_d / M) = log₁₀ K of the association constant.
    PKd,
    Kd,
    Dg,
    Series,
    /// A data-set label of the looser kind (`name`, `label`, `run`): the data-set column
    /// only when no `series`-like column is present.
    Label,
    Note,
}

/// What one header cell was read as (also what a column choice of the caller asks for,
/// see `crate::assign`).
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum Class {
    Temp(Option<TemperatureUnit>),
    Quantity(QuantityKind),
    Uncertainty {
        of: Option<Fam>,
        unit: Option<String>,
        relative: bool,
    },
    Series,
    /// `name`, `label`, `run`: the data-set column unless a `series`-like column exists.
    Label,
    Note,
    /// A temperature uncertainty (`u(T)`, `σ(T)`): kept but not used unless a column choice
    /// gave it the σ(T) role (`chosen`).
    TempUncertainty {
        chosen: bool,
    },
    Ignored,
    Unknown,
}

/// The result of reading the headers. The temperature unit is `None` when the header
/// gave none; the importer then decides from the values.
pub(crate) struct Detected {
    pub mapping: ColumnMapping,
    pub temperature_unit_known: bool,
}

const TEMP_UNITS: &str = "K, °C (C, degC), °F (F, degF)";
const CONC_UNITS: &str = "M, mM, µM (uM), nM, pM, mol/L, mmol/L, µmol/L, nmol/L, pmol/L";
const ENERGY_UNITS: &str = "kJ/mol (kJ mol-1), kcal/mol (kcal mol-1), J/mol";
const K_UNITS: &str = "none (dimensionless) or M-1 (L/mol)";
const LOG_UNITS: &str = "none (a logarithm is dimensionless)";
const UNC_UNITS: &str =
    "% for an uncertainty in percent of the value, or the unit of the measured column";

/// Normalises a name: lower case, no spaces, underscores, dots, brackets or degree signs;
/// Greek delta as "delta"; micro as "u"; subscript digits as digits.
pub(crate) fn norm_name(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            ' ' | '_' | '.' | '(' | ')' | '[' | ']' | '{' | '}' | '°' | 'º' | '˚' | '⁰' | '\t'
            | '\u{a0}' => {}
            'Δ' | 'δ' | '∆' => out.push_str("delta"),
            'µ' | 'μ' => out.push('u'),
            '−' | '–' => out.push('-'),
            'ₐ' => out.push('a'),
            c @ '₀'..='₉' => out.push((b'0' + (c as u32 - '₀' as u32) as u8) as char),
            c => out.extend(c.to_lowercase()),
        }
    }
    out
}

/// Normalises a unit: lower case, no spaces, dots, carets or middle dots; superscript
/// minus and one as "-1"; micro as "u"; no degree signs or "deg".
fn norm_unit(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            ' ' | '.' | '^' | '·' | '*' | '⋅' | '°' | 'º' | '˚' | '{' | '}' | '\t' | '\u{a0}' =>
                {}
            'µ' | 'μ' => out.push('u'),
            '⁻' | '−' | '–' => out.push('-'),
            '¹' => out.push('1'),
            '³' => out.push('3'),
            '℃' => out.push('c'),
            '℉' => out.push('f'),
            c => out.extend(c.to_lowercase()),
        }
    }
    if let Some(rest) = out.strip_prefix("deg") {
        out = rest.to_string();
    }
    out
}

fn is_k_name(n: &str) -> bool {
    let Some(rest) = n.strip_prefix('k') else {
        return false;
    };
    matches!(
        rest,
        "" | "a"
            | "b"
            | "eq"
            | "w"
            | "assoc"
            | "ass"
            | "bind"
            | "app"
            | "a1"
            | "a2"
            | "a3"
            | "b1"
            | "b2"
            | "b3"
            | "1"
            | "2"
            | "3"
            | "0"
            | "°"
    )
}

fn is_kd_name(n: &str) -> bool {
    matches!(n, "kd" | "kdiss" | "kdissoc" | "kd1" | "kd2" | "kdapp")
}

fn name_family(n: &str) -> Option<Fam> {
    if matches!(n, "t" | "temp" | "temperature") {
        return Some(Fam::Temp);
    }
    if is_k_name(n) {
        return Some(Fam::K);
    }
    if is_kd_name(n) {
        return Some(Fam::Kd);
    }
    if let Some(r) = n.strip_prefix("ln") {
        if is_k_name(r) {
            return Some(Fam::LnK);
        }
    }
    for p in ["log10", "lg10", "log", "lg"] {
        if let Some(r) = n.strip_prefix(p) {
            if is_k_name(r) {
                return Some(Fam::Log);
            }
        }
    }
    for p in ["-log10", "-log", "-lg"] {
        if let Some(r) = n.strip_prefix(p) {
            if is_k_name(r) {
                return Some(Fam::PK);
            }
        }
    }
    if let Some(r) = n.strip_prefix('p') {
        if is_k_name(r) {
            return Some(Fam::PK);
        }
        if is_kd_name(r) {
            return Some(Fam::PKd);
        }
    }
    for p in ["deltag", "dg"] {
        if let Some(r) = n.strip_prefix(p) {
            if matches!(r, "" | "0" | "o" | "bind" | "binding" | "r" | "rxn") {
                return Some(Fam::Dg);
            }
        }
    }
    if matches!(
        n,
        "series"
            | "sample"
            | "samples"
            | "sampleid"
            | "samplename"
            | "condition"
            | "conditions"
            | "set"
            | "dataset"
            | "group"
    ) {
        return Some(Fam::Series);
    }
    if matches!(
        n,
        "name" | "names" | "label" | "labels" | "run" | "runs" | "runid" | "runname"
    ) {
        return Some(Fam::Label);
    }
    if matches!(
        n,
        "note" | "notes" | "comment" | "comments" | "remark" | "remarks" | "memo" | "annotation"
    ) {
        return Some(Fam::Note);
    }
    None
}

const MARKERS: &[&str] = &[
    "sigma",
    "σ",
    "sd",
    "s.d.",
    "std",
    "stdev",
    "stddev",
    "err",
    "error",
    "unc",
    "uncert",
    "uncertainty",
    "u",
    "se",
    "sem",
    "±",
    "+/-",
    "rsd",
    "%rsd",
    "cv",
    "rel",
    "relative",
];

fn is_marker(tok: &str) -> bool {
    let t = tok.to_lowercase();
    MARKERS.contains(&t.as_str())
}

fn is_relative_marker(tok: &str) -> bool {
    matches!(
        tok.to_lowercase().as_str(),
        "rsd" | "%rsd" | "cv" | "rel" | "relative" | "%"
    )
}

/// Splits a trailing "(unit)" or "[unit]": returns (base, unit).
pub(crate) fn split_bracket_unit(h: &str) -> Option<(&str, &str)> {
    let h = h.trim_end();
    let (open, close) = if h.ends_with(')') {
        ('(', ')')
    } else if h.ends_with(']') {
        ('[', ']')
    } else {
        return None;
    };
    // Find the matching opening bracket from the end.
    let mut depth = 0usize;
    for (i, ch) in h.char_indices().rev() {
        if ch == close {
            depth += 1;
        } else if ch == open {
            depth -= 1;
            if depth == 0 {
                let base = &h[..i];
                let unit = &h[i + open.len_utf8()..h.len() - close.len_utf8()];
                return Some((base.trim(), unit.trim()));
            }
        }
    }
    None
}

/// A name with an optional unit, from "name", "name_unit" or "name unit".
fn name_and_unit(base: &str) -> Option<(Fam, Option<String>)> {
    let n = norm_name(base);
    if let Some(f) = name_family(&n) {
        return Some((f, None));
    }
    let cut = base.rfind(['_', ' '])?;
    let (name, unit) = (&base[..cut], base[cut + 1..].trim());
    let f = name_family(&norm_name(name))?;
    if unit.is_empty() {
        return Some((f, None));
    }
    Some((f, Some(unit.to_string())))
}

/// Reads one header cell.
pub(crate) fn classify(raw: &str) -> Class {
    let h = raw.trim();
    if h.is_empty() {
        return Class::Ignored;
    }
    // Function form of an uncertainty: u(pKa), σ(log K) (nM), sd(Kd)/nM. The prefix is
    // compared without case on `h` itself, so byte offsets stay valid in `h`.
    for m in [
        "u(", "σ(", "sd(", "sigma(", "err(", "s(", "std(", "unc(", "se(", "δ(",
    ] {
        let prefix = h.get(..m.len()).map(str::to_lowercase);
        if prefix.as_deref() == Some(m) {
            let inner_start = m.len();
            if let Some(close) = h[inner_start..].find(')') {
                let inner = &h[inner_start..inner_start + close];
                let after = h[inner_start + close + 1..].trim();
                let after_unit = split_bracket_unit(after)
                    .map(|(_, u)| u.to_string())
                    .or_else(|| after.strip_prefix('/').map(|u| u.trim().to_string()))
                    .filter(|u| !u.is_empty());
                return uncertainty_of(inner, after_unit, false);
            }
        }
    }
    // Split a unit in brackets or after a slash.
    let (base, unit): (&str, Option<String>) = if let Some((b, u)) = split_bracket_unit(h) {
        let nb = norm_name(b);
        if matches!(nb.as_str(), "ln" | "log" | "log10" | "lg" | "-log" | "p") || b.is_empty() {
            (h, None)
        } else {
            (b, Some(u.to_string()))
        }
    } else if let Some(i) = h.find('/').filter(|_| !h.starts_with("+/-")) {
        (h[..i].trim(), Some(h[i + 1..].trim().to_string()))
    } else {
        (h, None)
    };
    // Uncertainty markers: ±, +/-, σ prefix, marker words at either end.
    let mut b = base.trim();
    let mut is_unc = false;
    let mut relative = unit.as_deref().map(str::trim) == Some("%");
    loop {
        let before = b;
        for p in ["±", "+/-", "+-", "σ"] {
            if let Some(r) = b.strip_prefix(p) {
                b = r.trim_start_matches(['_', ' ', '.']).trim();
                is_unc = true;
            }
        }
        if let Some(r) = b.strip_suffix('±') {
            b = r.trim();
            is_unc = true;
        }
        if let Some(r) = b.strip_suffix('%') {
            b = r.trim_end_matches(['_', ' ']).trim();
            relative = true;
            is_unc = true;
        }
        if let Some(r) = b.strip_prefix('%') {
            b = r.trim_start_matches(['_', ' ']).trim();
            relative = true;
            is_unc = true;
        }
        let toks: Vec<&str> = b.split(['_', ' ']).filter(|t| !t.is_empty()).collect();
        if toks.len() >= 2 && is_marker(toks[0]) {
            relative |= is_relative_marker(toks[0]);
            let first = toks[0];
            let at = b.find(first).map(|i| i + first.len()).unwrap_or(0);
            b = b[at..].trim_start_matches(['_', ' ']).trim();
            is_unc = true;
        } else if toks.len() >= 2 && is_marker(toks[toks.len() - 1]) {
            let last = toks[toks.len() - 1];
            relative |= is_relative_marker(last);
            let at = b.rfind(last).unwrap_or(b.len());
            b = b[..at].trim_end_matches(['_', ' ']).trim();
            is_unc = true;
        } else if toks.len() == 1 && is_marker(toks[0]) {
            relative |= is_relative_marker(toks[0]);
            b = "";
            is_unc = true;
        }
        if b == before || b.is_empty() {
            break;
        }
    }
    if is_unc {
        return uncertainty_of(b, unit, relative);
    }
    let Some((fam, inner_unit)) = name_and_unit(b) else {
        return Class::Unknown;
    };
    let unit = unit.or(inner_unit);
    match fam {
        Fam::Series => Class::Series,
        // A free column such as "run time" is not a data-set label.
        Fam::Label if unit.is_none() => Class::Label,
        Fam::Label => Class::Unknown,
        Fam::Note => Class::Note,
        Fam::Temp => match unit.as_deref() {
            None => Class::Temp(None),
            Some(u) => match temp_unit(u) {
                Some(t) => Class::Temp(Some(t)),
                None => Class::Unknown,
            },
        },
        _ => match quantity_kind(fam, unit.as_deref()) {
            Ok(k) => Class::Quantity(k),
            Err(_) => Class::Unknown,
        },
    }
}

fn uncertainty_of(inner: &str, unit: Option<String>, mut relative: bool) -> Class {
    let inner = inner.trim();
    let (of, inner_unit) = if inner.is_empty() {
        (None, None)
    } else {
        match name_and_unit(inner) {
            Some((f, u)) => (Some(f), u),
            None => return Class::Unknown,
        }
    };
    let unit = unit.or(inner_unit);
    if unit.as_deref().map(str::trim) == Some("%") {
        relative = true;
    }
    if of == Some(Fam::Temp) {
        return Class::TempUncertainty { chosen: false };
    }
    if matches!(of, Some(Fam::Series | Fam::Label | Fam::Note)) {
        return Class::Unknown;
    }
    Class::Uncertainty { of, unit, relative }
}

pub(crate) fn temp_unit(u: &str) -> Option<TemperatureUnit> {
    match norm_unit(u).as_str() {
        "k" | "kelvin" => Some(TemperatureUnit::Kelvin),
        "c" | "celsius" | "oc" => Some(TemperatureUnit::Celsius),
        "f" | "fahrenheit" | "of" => Some(TemperatureUnit::Fahrenheit),
        _ => None,
    }
}

fn conc_unit(u: &str) -> Option<ConcentrationUnit> {
    let mut n = norm_unit(u);
    for long in [
        "mol/l",
        "moll-1",
        "mol/dm3",
        "moldm-3",
        "mol/litre",
        "mol/liter",
        "molar",
    ] {
        if let Some(p) = n.strip_suffix(long) {
            n = format!("{p}m");
            break;
        }
    }
    match n.as_str() {
        "m" => Some(ConcentrationUnit::Molar),
        "mm" | "millim" => Some(ConcentrationUnit::Millimolar),
        "um" | "microm" => Some(ConcentrationUnit::Micromolar),
        "nm" | "nanom" => Some(ConcentrationUnit::Nanomolar),
        "pm" | "picom" => Some(ConcentrationUnit::Picomolar),
        _ => None,
    }
}

pub(crate) fn energy_unit(u: &str) -> Option<EnergyUnit> {
    let n = norm_unit(u).replace('/', "").replace("mol-1", "mol");
    match n.as_str() {
        "kjmol" => Some(EnergyUnit::KilojoulePerMole),
        "kcalmol" => Some(EnergyUnit::KilocaloriePerMole),
        "jmol" => Some(EnergyUnit::JoulePerMole),
        _ => None,
    }
}

fn is_dimensionless(u: &str) -> bool {
    matches!(
        norm_unit(u).as_str(),
        "" | "-" | "1" | "none" | "dimensionless" | "unitless"
    )
}

fn is_inverse_molar(u: &str) -> bool {
    matches!(
        norm_unit(u).as_str(),
        "m-1" | "1/m" | "l/mol" | "lmol-1" | "dm3/mol" | "dm3mol-1"
    )
}

/// The quantity kind for a family and a unit, or the list of accepted units.
fn quantity_kind(fam: Fam, unit: Option<&str>) -> Result<QuantityKind, &'static str> {
    match fam {
        Fam::K => match unit {
            None => Ok(QuantityKind::K),
            Some(u) if is_dimensionless(u) || is_inverse_molar(u) => Ok(QuantityKind::K),
            _ => Err(K_UNITS),
        },
        Fam::LnK | Fam::Log | Fam::PK | Fam::PKd => {
            if unit.is_none_or(is_dimensionless) {
                Ok(match fam {
                    Fam::LnK => QuantityKind::LnK,
                    Fam::Log | Fam::PKd => QuantityKind::Log10K,
                    _ => QuantityKind::PK,
                })
            } else {
                Err(LOG_UNITS)
            }
        }
        Fam::Kd => match unit.and_then(conc_unit) {
            Some(c) => Ok(QuantityKind::DissociationConstant(c)),
            None => Err(CONC_UNITS),
        },
        Fam::Dg => match unit.and_then(energy_unit) {
            Some(e) => Ok(QuantityKind::DeltaG(e)),
            None => Err(ENERGY_UNITS),
        },
        Fam::Temp | Fam::Series | Fam::Label | Fam::Note => Err(TEMP_UNITS),
    }
}

/// Reads the headers of a file into a mapping. `line` is the header's physical line. The
/// caller's column choices and temperature unit (`o.columns`, `o.temperature_unit`) are laid
/// over what the headers say; a header not recognised is a column kept but not used unless
/// `o.ignore_unknown_columns` is false.
pub(crate) fn detect(
    headers: &[String],
    file: &str,
    line: usize,
    o: &crate::ImportOptions,
) -> Result<Detected, Error> {
    let ignore_unknown = o.ignore_unknown_columns;
    // Duplicates first: they make every other message confusing.
    for (j, h) in headers.iter().enumerate() {
        let hn = h.trim().to_lowercase();
        if hn.is_empty() {
            continue;
        }
        if let Some(i) = headers[..j]
            .iter()
            .position(|g| g.trim().to_lowercase() == hn)
        {
            return Err(Error::DuplicateHeader {
                file: file.to_string(),
                line,
                first: i + 1,
                second: j + 1,
                header: h.clone(),
            });
        }
    }
    let mut classes: Vec<Class> = headers.iter().map(|h| classify(h)).collect();
    crate::assign::apply(&mut classes, headers, &o.columns, file, line)?;
    crate::assign::apply_temperature_unit(&mut classes, headers, o.temperature_unit, file)?;
    let mut temps = Vec::new();
    let mut quants = Vec::new();
    let mut uncs = Vec::new();
    let mut series = Vec::new();
    let mut labels = Vec::new();
    let mut notes = Vec::new();
    let mut sigma_t = Vec::new();
    let mut ignored = Vec::new();
    for (i, c) in classes.iter().enumerate() {
        match c {
            Class::Temp(u) => temps.push((i, *u)),
            Class::Quantity(k) => quants.push((i, *k)),
            Class::Uncertainty { of, unit, relative } => {
                uncs.push((i, *of, unit.clone(), *relative))
            }
            Class::Series => series.push(i),
            Class::Label => labels.push(i),
            Class::Note => notes.push(i),
            Class::TempUncertainty { chosen: true } => sigma_t.push(i),
            Class::TempUncertainty { chosen: false } | Class::Ignored => ignored.push(i),
            Class::Unknown => {
                if let Some(e) = unit_error(&headers[i], file, line, i) {
                    return Err(e);
                }
                if ignore_unknown {
                    ignored.push(i);
                } else {
                    return Err(Error::UnknownHeader {
                        file: file.to_string(),
                        line,
                        column: i + 1,
                        header: headers[i].clone(),
                        found: headers.to_vec(),
                    });
                }
            }
        }
    }
    let ambiguous = |role: &'static str, cols: &[usize]| Error::AmbiguousColumns {
        file: file.to_string(),
        line,
        role,
        columns: cols.iter().map(|&c| (c + 1, headers[c].clone())).collect(),
    };
    let missing = |role: &'static str| Error::MissingColumn {
        file: file.to_string(),
        line,
        role,
        found: headers.to_vec(),
    };
    if temps.len() > 1 {
        let cols: Vec<usize> = temps.iter().map(|t| t.0).collect();
        return Err(ambiguous("temperature", &cols));
    }
    if quants.len() > 1 {
        let cols: Vec<usize> = quants.iter().map(|t| t.0).collect();
        return Err(ambiguous("measured quantity", &cols));
    }
    if uncs.len() > 1 {
        let cols: Vec<usize> = uncs.iter().map(|t| t.0).collect();
        return Err(ambiguous("uncertainty", &cols));
    }
    if series.len() > 1 {
        return Err(ambiguous("data set (series)", &series));
    }
    // A `name`, `label` or `run` column names the data sets when no `series`-like column
    // does; the first such column is used and any other is kept but not used.
    match (series.is_empty(), labels.split_first()) {
        (true, Some((&first, rest))) => {
            series.push(first);
            ignored.extend_from_slice(rest);
        }
        _ => ignored.extend_from_slice(&labels),
    }
    ignored.sort_unstable();
    if notes.len() > 1 {
        return Err(ambiguous("note", &notes));
    }
    let Some(&(tcol, tunit)) = temps.first() else {
        return Err(missing("temperature"));
    };
    let Some(&(qcol, kind)) = quants.first() else {
        return Err(missing("measured quantity"));
    };
    let uncertainty = match uncs.first() {
        None => None,
        Some((ucol, of, unit, relative)) => {
            let ucol = *ucol;
            Some(UncertaintyColumn {
                column: ucol,
                kind: uncertainty_kind(*of, unit.as_deref(), *relative, kind).map_err(
                    |message| Error::BadHeader {
                        file: file.to_string(),
                        line,
                        column: ucol + 1,
                        header: headers[ucol].clone(),
                        message,
                    },
                )?,
            })
        }
    };
    Ok(Detected {
        mapping: ColumnMapping {
            temperature: TemperatureColumn {
                column: tcol,
                unit: tunit.unwrap_or(TemperatureUnit::Celsius),
                assumed: tunit.is_none(),
            },
            quantity: QuantityColumn { column: qcol, kind },
            uncertainty,
            series: series.first().copied(),
            note: notes.first().copied(),
            temperature_uncertainty: sigma_t.first().copied(),
            ignored,
        },
        temperature_unit_known: tunit.is_some(),
    })
}

/// For an unknown header whose name is recognised, the precise unit error.
fn unit_error(h: &str, file: &str, line: usize, i: usize) -> Option<Error> {
    let t = h.trim();
    let (base, unit) = if let Some((b, u)) = split_bracket_unit(t) {
        (b, Some(u.to_string()))
    } else if let Some(i) = t.find('/') {
        (t[..i].trim(), Some(t[i + 1..].trim().to_string()))
    } else {
        (t, None)
    };
    let (fam, inner) = name_and_unit(base)?;
    let unit = unit.or(inner);
    let accepted = match fam {
        Fam::Temp => TEMP_UNITS,
        Fam::Series | Fam::Label | Fam::Note => return None,
        f => match quantity_kind(f, unit.as_deref()) {
            Ok(_) => return None,
            Err(a) => a,
        },
    };
    match unit {
        Some(u) => Some(Error::UnknownUnit {
            file: file.to_string(),
            line,
            column: i + 1,
            header: h.to_string(),
            unit: u,
            accepted,
        }),
        None => Some(Error::MissingUnit {
            file: file.to_string(),
            line,
            column: i + 1,
            header: h.to_string(),
            hint: match fam {
                Fam::Kd => format!(
                    "a dissociation constant needs its concentration unit, e.g. 'Kd (µM)' or 'Kd_nM'; accepted: {CONC_UNITS}"
                ),
                _ => format!(
                    "a Gibbs energy needs its unit, e.g. 'ΔG (kJ/mol)'; accepted: {ENERGY_UNITS}"
                ),
            },
        }),
    }
}

fn uncertainty_kind(
    of: Option<Fam>,
    unit: Option<&str>,
    relative: bool,
    kind: QuantityKind,
) -> Result<UncertaintyKind, String> {
    if relative {
        return match unit {
            None => Ok(UncertaintyKind::RelativePercent),
            Some(u) if u.trim() == "%" => Ok(UncertaintyKind::RelativePercent),
            Some(u) => Err(format!(
                "a relative uncertainty is given in %, not '{u}'; accepted: {UNC_UNITS}"
            )),
        };
    }
    let own = match of {
        None => match unit {
            None => kind,
            Some(u) => match kind {
                QuantityKind::DissociationConstant(_) => QuantityKind::DissociationConstant(
                    conc_unit(u).ok_or_else(|| bad_unc_unit(u, CONC_UNITS))?,
                ),
                QuantityKind::DeltaG(_) => QuantityKind::DeltaG(
                    energy_unit(u).ok_or_else(|| bad_unc_unit(u, ENERGY_UNITS))?,
                ),
                QuantityKind::K if is_dimensionless(u) || is_inverse_molar(u) => kind,
                _ if is_dimensionless(u) => kind,
                _ => return Err(bad_unc_unit(u, UNC_UNITS)),
            },
        },
        Some(f) => match (f, unit) {
            (Fam::Kd, None) | (Fam::Dg, None) => kind,
            (f, u) => quantity_kind(f, u).map_err(|acc| bad_unc_unit(u.unwrap_or(""), acc))?,
        },
    };
    if !same_family(own, kind) {
        return Err(format!(
            "this uncertainty is of {} but the measured column holds {}; rename the header or choose the columns in the column mapping",
            own.label(),
            kind.label()
        ));
    }
    Ok(UncertaintyKind::Absolute(own))
}

fn bad_unc_unit(u: &str, accepted: &str) -> String {
    format!("unknown unit '{u}' for an uncertainty; accepted here: {accepted}")
}

#[cfg(test)]
mod tests {
    use super::*;

    fn one(h: &str) -> Class {
        classify(h)
    }

    #[test]
    fn header_conventions() {
        use ConcentrationUnit as C;
        use TemperatureUnit as T;
        // Conventions listed in issue 3 (common practice in lab spreadsheets).
        let cases: Vec<(&str, Class)> = vec![
            ("T (°C)", Class::Temp(Some(T::Celsius))),
            ("T/K", Class::Temp(Some(T::Kelvin))),
            ("T_C", Class::Temp(Some(T::Celsius))),
            ("temp_K", Class::Temp(Some(T::Kelvin))),
            ("Temperature [°F]", Class::Temp(Some(T::Fahrenheit))),
            ("temp/K", Class::Temp(Some(T::Kelvin))),
            ("T", Class::Temp(None)),
            (
                "Kd (µM)",
                Class::Quantity(QuantityKind::DissociationConstant(C::Micromolar)),
            ),
            (
                "Kd (uM)",
                Class::Quantity(QuantityKind::DissociationConstant(C::Micromolar)),
            ),
            (
                "Kd_nM",
                Class::Quantity(QuantityKind::DissociationConstant(C::Nanomolar)),
            ),
            (
                "Kd / pM",
                Class::Quantity(QuantityKind::DissociationConstant(C::Picomolar)),
            ),
            (
                "KD (mmol/L)",
                Class::Quantity(QuantityKind::DissociationConstant(C::Millimolar)),
            ),
            (
                "Kd (M)",
                Class::Quantity(QuantityKind::DissociationConstant(C::Molar)),
            ),
            (
                "ΔG/kJ mol-1",
                Class::Quantity(QuantityKind::DeltaG(EnergyUnit::KilojoulePerMole)),
            ),
            (
                "dG (kcal/mol)",
                Class::Quantity(QuantityKind::DeltaG(EnergyUnit::KilocaloriePerMole)),
            ),
            (
                "ΔG° (kJ·mol⁻¹)",
                Class::Quantity(QuantityKind::DeltaG(EnergyUnit::KilojoulePerMole)),
            ),
            ("pK", Class::Quantity(QuantityKind::PK)),
            ("pKa", Class::Quantity(QuantityKind::PK)),
            ("pKa2", Class::Quantity(QuantityKind::PK)),
            ("PKW", Class::Quantity(QuantityKind::PK)),
            ("pKb", Class::Quantity(QuantityKind::PK)),
            ("K", Class::Quantity(QuantityKind::K)),
            ("Ka", Class::Quantity(QuantityKind::K)),
            ("Keq", Class::Quantity(QuantityKind::K)),
            ("Ka (M-1)", Class::Quantity(QuantityKind::K)),
            ("ln K", Class::Quantity(QuantityKind::LnK)),
            ("lnK", Class::Quantity(QuantityKind::LnK)),
            ("ln(K)", Class::Quantity(QuantityKind::LnK)),
            ("log K", Class::Quantity(QuantityKind::Log10K)),
            ("log10 K", Class::Quantity(QuantityKind::Log10K)),
            ("log₁₀ K", Class::Quantity(QuantityKind::Log10K)),
            ("lgK", Class::Quantity(QuantityKind::Log10K)),
            ("sample", Class::Series),
            ("Series", Class::Series),
            ("condition", Class::Series),
            ("sample id", Class::Series),
            ("Sample_ID", Class::Series),
            ("name", Class::Label),
            ("Label", Class::Label),
            ("run", Class::Label),
            ("run time", Class::Unknown),
            ("operator", Class::Unknown),
            ("note", Class::Note),
            ("Comment", Class::Note),
            ("", Class::Ignored),
            ("u(T)", Class::TempUncertainty { chosen: false }),
            ("Absorbance", Class::Unknown),
        ];
        for (h, want) in cases {
            assert_eq!(one(h), want, "header {h:?}");
        }
    }

    #[test]
    fn uncertainty_headers() {
        let u = |of: Option<Fam>, unit: Option<&str>, relative: bool| Class::Uncertainty {
            of,
            unit: unit.map(str::to_string),
            relative,
        };
        let cases: Vec<(&str, Class)> = vec![
            ("sigma_lnK", u(Some(Fam::LnK), None, false)),
            ("sd_Kd (nM)", u(Some(Fam::Kd), Some("nM"), false)),
            ("sd_Kd_nM", u(Some(Fam::Kd), Some("nM"), false)),
            ("err_pKa", u(Some(Fam::PK), None, false)),
            ("u(pKa)", u(Some(Fam::PK), None, false)),
            ("σ(log K)", u(Some(Fam::Log), None, false)),
            ("σ", u(None, None, false)),
            ("±", u(None, None, false)),
            ("± (kJ/mol)", u(None, Some("kJ/mol"), false)),
            ("Kd_err", u(Some(Fam::Kd), None, false)),
            ("error", u(None, None, false)),
            ("RSD (%)", u(None, Some("%"), true)),
            ("sd (%)", u(None, Some("%"), true)),
            ("rel_err", u(None, None, true)),
            ("K err %", u(Some(Fam::K), None, true)),
        ];
        for (h, want) in cases {
            assert_eq!(one(h), want, "header {h:?}");
        }
    }

    #[test]
    fn detect_maps_columns() {
        let h: Vec<String> = ["T (°C)", "Kd (nM)", "sd_Kd (µM)", "note"]
            .iter()
            .map(|s| s.to_string())
            .collect();
        let d = detect(&h, "f.csv", 1, &crate::ImportOptions::default()).unwrap();
        assert_eq!(d.mapping.temperature.column, 0);
        assert_eq!(d.mapping.quantity.column, 1);
        assert_eq!(
            d.mapping.uncertainty.unwrap().kind,
            UncertaintyKind::Absolute(QuantityKind::DissociationConstant(
                ConcentrationUnit::Micromolar
            ))
        );
        assert_eq!(d.mapping.note, Some(3));
    }

    proptest::proptest! {
        #![proptest_config(proptest::prelude::ProptestConfig { cases: 512, ..Default::default() })]

        /// Any header text, including case changes that alter byte lengths ('İ'), is read
        /// without panicking.
        #[test]
        fn any_header_is_safe(h in "(?s).{0,24}", pre in proptest::sample::select(vec!["", "u(", "U(", "σ(", "sd_", "İ", "Kd_", "T (", "±"])) {
            let text = format!("{pre}{h}");
            let _ = classify(&text);
            let strict = crate::ImportOptions { ignore_unknown_columns: false, ..Default::default() };
            let _ = detect(&[text.clone(), "T/K".into(), "K".into()], "f", 1, &strict);
            let _ = detect(&[text], "f", 1, &crate::ImportOptions::default());
        }
    }

    #[test]
    fn a_label_column_names_the_data_sets_unless_a_series_column_does() {
        let h = |v: &[&str]| -> Vec<String> { v.iter().map(|s| s.to_string()).collect() };
        let o = crate::ImportOptions::default();
        let d = detect(&h(&["name", "T/K", "K", "operator"]), "f", 1, &o).unwrap();
        assert_eq!(d.mapping.series, Some(0));
        assert_eq!(d.mapping.ignored, vec![3]);
        let d = detect(&h(&["run", "T/K", "K", "sample"]), "f", 1, &o).unwrap();
        assert_eq!(d.mapping.series, Some(3));
        assert_eq!(d.mapping.ignored, vec![0]);
        let d = detect(&h(&["label", "run", "T/K", "K"]), "f", 1, &o).unwrap();
        assert_eq!(d.mapping.series, Some(0));
        assert_eq!(d.mapping.ignored, vec![1]);
        // Refused only when asked to refuse unknown columns.
        let strict = crate::ImportOptions {
            ignore_unknown_columns: false,
            ..Default::default()
        };
        assert!(detect(&h(&["T/K", "K", "operator"]), "f", 1, &strict).is_err());
    }

    #[test]
    fn mismatched_uncertainty_is_refused() {
        let h: Vec<String> = ["T/K", "pKa", "sd_Kd (nM)"]
            .iter()
            .map(|s| s.to_string())
            .collect();
        let e = detect(&h, "f.csv", 1, &crate::ImportOptions::default())
            .err()
            .unwrap()
            .to_string();
        assert!(e.contains("column 3"), "{e}");
        assert!(e.contains("measured column holds pK"), "{e}");
    }
}
