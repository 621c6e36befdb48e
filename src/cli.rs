//! The command-line grammar (clap derive): `fit`, `predict`, `two-point`, their options and
//! the parsers that refuse impossible values (a level outside (0, 1), a non-positive θ, a
//! row list that is not numbers) as usage errors, exit code 2.

use clap::{Args, Parser, Subcommand, ValueEnum};
use std::path::PathBuf;

/// Van 't Hoff analysis of equilibrium constants measured at several temperatures.
///
/// With no subcommand, opens the desktop workbench.
#[derive(Debug, Parser)]
#[command(name = "vhfit", version, about, long_about = None)]
pub struct Cli {
    /// What to do; omit to open the desktop window.
    #[command(subcommand)]
    pub command: Option<Command>,
}

/// The subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Fit each file (CSV or project file) and print the results, JSON, or write reports.
    Fit(FitArgs),
    /// Predict K, ln K and ΔG° at a temperature from the fit of a file.
    Predict(PredictArgs),
    /// The two-point calculation: ΔH° from two (T, K) pairs, or K at T₂ from K₁ and ΔH°.
    #[command(name = "two-point")]
    TwoPoint(TwoPointArgs),
}

/// The parser of `--model`: the command-line names of the shipped models (`linear`, `cp`,
/// `clarke-glew`), listed from the fit crate so that a new model needs no change here.
fn model_parser() -> impl clap::builder::TypedValueParser<Value = isochore_fit::Model> {
    use clap::builder::TypedValueParser;
    let names: Vec<clap::builder::PossibleValue> = isochore_fit::Model::all()
        .iter()
        .map(|m| clap::builder::PossibleValue::new(m.cli_name()).help(m.describe()))
        .collect();
    clap::builder::PossibleValuesParser::new(names).try_map(|name: String| {
        isochore_fit::Model::from_key(&name).ok_or_else(|| format!("unknown model \"{name}\""))
    })
}

/// The values of `--sigma`, each with the presentation module's words as help.
fn sigma_parser() -> impl clap::builder::TypedValueParser<Value = isochore_fit::SigmaConvention> {
    use clap::builder::TypedValueParser;
    let names: Vec<clap::builder::PossibleValue> = isochore_fit::SigmaConvention::ALL
        .iter()
        .map(|&c| {
            clap::builder::PossibleValue::new(c.cli_name())
                .help(isochore_report::present::names::sigma_convention(c))
        })
        .collect();
    clap::builder::PossibleValuesParser::new(names).try_map(|name: String| {
        isochore_fit::SigmaConvention::from_key(&name)
            .ok_or_else(|| format!("unknown σ convention \"{name}\""))
    })
}

/// Energy unit for readable output and reports (JSON is always SI).
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum EnergyArg {
    /// kJ/mol.
    #[value(name = "kJ", alias = "kj")]
    KJ,
    /// kcal/mol.
    #[value(name = "kcal")]
    Kcal,
}

impl EnergyArg {
    /// The fit crate's unit.
    pub fn unit(self) -> isochore_fit::EnergyUnit {
        match self {
            EnergyArg::KJ => isochore_fit::EnergyUnit::KilojoulePerMole,
            EnergyArg::Kcal => isochore_fit::EnergyUnit::KilocaloriePerMole,
        }
    }
}

/// Temperature unit of values typed on the command line.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum TempArg {
    /// Degrees Celsius.
    #[value(name = "C", alias = "c")]
    C,
    /// Kelvin.
    #[value(name = "K", alias = "k")]
    K,
    /// Degrees Fahrenheit.
    #[value(name = "F", alias = "f")]
    F,
}

impl TempArg {
    /// The fit crate's unit.
    pub fn unit(self) -> isochore_fit::TemperatureUnit {
        match self {
            TempArg::C => isochore_fit::TemperatureUnit::Celsius,
            TempArg::K => isochore_fit::TemperatureUnit::Kelvin,
            TempArg::F => isochore_fit::TemperatureUnit::Fahrenheit,
        }
    }
}

/// Options shared by `fit` and `predict`: how to read the files and how to fit.
#[derive(Debug, Clone, Args)]
pub struct FitOptionsArgs {
    /// Model: linear (constant ΔH°), cp (constant ΔCp°) or clarke-glew (ΔCp° linear in T).
    /// Default: the project's, else linear.
    #[arg(long, value_parser = model_parser())]
    pub model: Option<isochore_fit::Model>,
    /// Reference temperature θ at which ΔH°, ΔS° and ΔCp° are quoted, e.g. 25C or 298.15K;
    /// a number without a unit is read in --temp-unit (default 25 °C).
    #[arg(long, value_name = "T", value_parser = parse_temperature, allow_hyphen_values = true)]
    pub tref: Option<TypedTemperature>,
    /// Unit of every temperature typed without one (--tref, and --at of predict): C, K or F
    /// (default C).
    #[arg(long, value_enum, default_value = "C")]
    pub temp_unit: TempArg,
    /// Confidence level of every interval, between 0 and 1 (default 0.95).
    #[arg(long, value_name = "LEVEL", value_parser = parse_level)]
    pub level: Option<f64>,
    /// What the stated σ mean: relative-weights (σ are relative weights only; the scatter
    /// about the fit sets the error scale) or known-uncertainties (σ are known standard
    /// uncertainties; no rescaling, normal intervals). Default: the project's, else
    /// relative-weights.
    #[arg(long, value_name = "MEANING", value_parser = sigma_parser())]
    pub sigma: Option<isochore_fit::SigmaConvention>,
    /// The older name of `--sigma known-uncertainties`, still accepted.
    #[arg(long, hide = true, conflicts_with = "sigma")]
    pub absolute_sigma: bool,
    /// Exclude these 1-based data rows, e.g. 3,7 or 3-5 (added to a project's exclusions).
    #[arg(long, value_name = "ROWS", value_parser = parse_rows)]
    pub exclude: Option<RowList>,
    /// Energy unit for readable output and reports (JSON is always J/mol).
    #[arg(long, value_enum, value_name = "kJ|kcal")]
    pub energy: Option<EnergyArg>,
    /// Fit the good rows of a file with bad rows, listing every skipped line in the warnings
    /// (by default such a file is refused).
    #[arg(long)]
    pub skip_bad_rows: bool,
    /// Fit unweighted: every point counts the same and any σ is ignored (the way to fit a
    /// file whose σ column has empty cells).
    #[arg(long)]
    pub unweighted: bool,
    /// Accept temperatures (and θ) below 1 K or above 10 000 K, which are otherwise refused
    /// as a likely unit or typing mistake.
    #[arg(long)]
    pub allow_extreme_temperatures: bool,
    /// Choose a column of a data file, ROLE=COLUMN (repeatable): COLUMN is a header as typed
    /// or a 1-based number; ROLE is read as a header is: temperature, 'T (K)', K, ln K, log K,
    /// pKa, 'Kd (nM)', 'ΔG (kJ/mol)', value (the kind the column's own header says), sigma,
    /// 'RSD (%)', sigma-t (the temperature's uncertainty σ(T), in the temperature column's
    /// unit), series or note. COLUMN none drops sigma, sigma-t, series or note. A chosen column
    /// replaces the one the headers gave that role. E.g. --column temperature=T_degC
    /// --column K=3
    #[arg(long = "column", value_name = "ROLE=COLUMN", value_parser = parse_column)]
    pub columns: Vec<isochore_data::ColumnChoice>,
    /// Unit of a data file's temperature column whose header carries none: C, K or F
    /// (default: decided from the values, and said in the conversions). A header that states
    /// another unit is refused.
    #[arg(long, value_enum, value_name = "C|K|F")]
    pub data_temp_unit: Option<TempArg>,
    /// Decimal mark of CSV files (default: decided by the file; a file that mixes marks, or
    /// whose commas could be thousands separators, is refused until this is given).
    #[arg(long, value_enum, value_name = "point|comma")]
    pub decimal_mark: Option<DecimalArg>,
    /// One thermometer uncertainty σ(T) for every point, e.g. 0.1 or 0.1K (a temperature
    /// difference: 0.1 °C is 0.1 K, 0.18 °F is 0.1 K; a number without a unit is read in
    /// --temp-unit). The fit then allows for errors in T as well as in K (York's fit for the
    /// linear model, orthogonal distance for the others) and says how far that moves each
    /// parameter; it takes the place of a σ(T) column (--column sigma-t=COLUMN).
    #[arg(long, value_name = "σT", value_parser = parse_temperature, allow_hyphen_values = true)]
    pub sigma_t: Option<TypedTemperature>,
}

/// The decimal mark of CSV files, as stated on the command line.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum DecimalArg {
    /// '.' is the decimal mark (1,500 is not a number).
    Point,
    /// ',' is the decimal mark (1,500 is 1.5); needs a delimiter other than the comma.
    Comma,
}

/// `vhfit fit`.
#[derive(Debug, Clone, Args)]
pub struct FitArgs {
    /// CSV files or project files (*.isochore.json).
    #[arg(required = true, value_name = "FILE")]
    pub files: Vec<PathBuf>,
    /// Fit options.
    #[command(flatten)]
    pub fit: FitOptionsArgs,
    /// Print the JSON contract (SI units) instead of a table.
    #[arg(long)]
    pub json: bool,
    /// Leave the per-point table out (JSON: no "points"; text: one row per series).
    #[arg(long)]
    pub summary: bool,
    /// Write reports: a file (.html, .pdf, .md, .svg, .png; x.csv is the results table,
    /// x-data.csv the data table) for one series, or a folder that receives every format for
    /// each series.
    #[arg(long, value_name = "PATH")]
    pub report: Option<PathBuf>,
    /// The analyst's name, recorded in the report beside the time of the analysis.
    #[arg(long, value_name = "NAME", requires = "report")]
    pub analyst: Option<String>,
    /// A note recorded in the report under the record line (what was measured, why a point
    /// was excluded, the notebook page).
    #[arg(long, value_name = "TEXT", requires = "report")]
    pub note: Option<String>,

    // ---- Several series fitted together (issue 12): options of the joint fit ----
    /// Fit every series of every file together, sharing these parameters (comma-separated
    /// JSON keys, e.g. delta_cp or delta_h,delta_cp) and fitting the others per series; the
    /// output adds the test of equality against the separate fits.
    #[arg(long, value_name = "KEYS", value_delimiter = ',')]
    pub share: Option<Vec<String>>,
    /// Compare each fit's van 't Hoff ΔH° with calorimetric values: temperature:ΔH:u, e.g.
    /// 37C:-28.4:0.5 or 25C:-30:0.4,37C:-28.4:0.5 (ΔH and u in the --energy unit, default
    /// kJ/mol; a temperature without a unit is read in --temp-unit).
    #[arg(
        long,
        value_name = "T:ΔH:u",
        value_delimiter = ',',
        allow_hyphen_values = true
    )]
    pub calorimetric: Option<Vec<String>>,
    /// With --calorimetric or --calorimetric-file: fit the calorimetric values together with
    /// ln K, each as one more observation of its series' ΔH°(T) weighted by 1/u² (weighted
    /// fits only), so that they constrain ΔH°(θ) and ΔCp°; printed after the fit (each
    /// series alone, or the joint fit with --share) beside the fit of ln K alone.
    #[arg(long)]
    pub calorimetric_in_fit: bool,
    /// Calorimetric values from a file: a header naming the temperature with its unit
    /// (T (°C)), ΔH with its unit (ΔH (kJ/mol)), its uncertainty u, and optionally the
    /// series (series, sample, ligand); compared as --calorimetric values are.
    #[arg(long, value_name = "FILE")]
    pub calorimetric_file: Option<PathBuf>,

    // ---- Intervals beyond the delta method (issue 13) ----
    /// How the intervals are made: delta (the delta method; Fieller's interval for the
    /// temperature where K = 1), monte-carlo (parametric Monte Carlo after GUM Supplement 1:
    /// ln K drawn from the stated σ, scaled by the fit's residual SD when σ are relative
    /// weights only, and refitted) or bootstrap (see --bootstrap-scheme). The text adds a
    /// table of the resampled intervals beside the delta method's; the JSON's intervals
    /// carry "method". Default: the method a project file records for each series (chosen
    /// in the window, with its draws and seed; --draws, --seed and --bootstrap-scheme
    /// replace those; with --share, the one all the series record), else delta.
    #[arg(long, value_enum, value_name = "METHOD")]
    pub intervals: Option<IntervalsArg>,
    /// Number of Monte Carlo or bootstrap draws, 1 to 1000000 (default 10000).
    #[arg(long, value_name = "N", value_parser = parse_draws)]
    pub draws: Option<usize>,
    /// Seed of the random-number generator, a whole number from 0 to 18446744073709551615
    /// (default 1); the same seed gives the same intervals on any machine and is recorded
    /// in the JSON.
    #[arg(long, value_name = "S", value_parser = parse_seed)]
    pub seed: Option<u64>,
    /// How the bootstrap makes new data: residuals (leverage-corrected residuals drawn with
    /// replacement; default), wild (each residual kept at its point with a random sign,
    /// Rademacher weights) or cases (points drawn with replacement; warned about below 20
    /// points).
    #[arg(long, value_enum, value_name = "SCHEME")]
    pub bootstrap_scheme: Option<SchemeArg>,
}

/// The values of `--intervals`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum IntervalsArg {
    /// The delta method (the default).
    Delta,
    /// Parametric Monte Carlo (GUM Supplement 1).
    MonteCarlo,
    /// The bootstrap.
    Bootstrap,
}

/// The values of `--bootstrap-scheme`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SchemeArg {
    /// Leverage-corrected residuals, resampled.
    Residuals,
    /// The wild bootstrap with Rademacher weights.
    Wild,
    /// Points resampled.
    Cases,
}

/// `--draws`: a whole number from 1 to `isochore_fit::intervals::MAX_DRAWS`.
fn parse_draws(s: &str) -> Result<usize, String> {
    let max = isochore_fit::intervals::MAX_DRAWS;
    match s.trim().parse::<u64>() {
        Ok(0) => Err("at least 1 draw is needed (10000 are usually plenty)".to_string()),
        Ok(n) if n > max as u64 => Err(format!("at most {max} draws are allowed")),
        Ok(n) => Ok(n as usize),
        Err(_) => Err(format!("'{s}' is not a whole number of draws, e.g. 10000")),
    }
}

/// `--seed`: a whole number from 0 to 2⁶⁴ − 1.
fn parse_seed(s: &str) -> Result<u64, String> {
    s.trim().parse::<u64>().map_err(|_| {
        format!("'{s}' is not a seed: give a whole number from 0 to 18446744073709551615")
    })
}

/// `vhfit predict`.
#[derive(Debug, Clone, Args)]
pub struct PredictArgs {
    /// A CSV file or project file.
    #[arg(value_name = "FILE")]
    pub file: PathBuf,
    /// Temperature(s) to predict at, e.g. 37, 25,37 or 310.15K (a number without a unit is
    /// read in --temp-unit, default °C).
    #[arg(
        long,
        value_name = "T",
        value_delimiter = ',',
        allow_hyphen_values = true,
        required_unless_present_any = ["for_k", "for_value"],
        value_parser = parse_temperature
    )]
    pub at: Vec<TypedTemperature>,
    /// Also find the temperature at which K reaches this value (dimensionless K).
    #[arg(long, value_name = "K", conflicts_with = "for_value")]
    pub for_k: Option<f64>,
    /// Also find the temperature at which the file's own quantity reaches this value, in
    /// the file's unit: a K_d in the K_d column's unit (e.g. 150 for 150 nM), a pKa, a
    /// log K or a K. Not for a ΔG° file (a ΔG° target is a different K at each T).
    #[arg(long, value_name = "VALUE", allow_hyphen_values = true)]
    pub for_value: Option<f64>,
    /// Fit options.
    #[command(flatten)]
    pub fit: FitOptionsArgs,
    /// Print JSON (SI units) instead of text.
    #[arg(long)]
    pub json: bool,
    /// How the intervals of K and ΔG° at each temperature and of the temperature at the
    /// target K are made: delta (the delta method; Fieller's for the temperature),
    /// monte-carlo or bootstrap, as for `vhfit fit`. The text adds a table of the resampled
    /// intervals; the JSON's carry "method". Default: the method a project file records for
    /// each series (chosen in the window, with its draws and seed; --draws, --seed and
    /// --bootstrap-scheme replace those), else delta.
    #[arg(long, value_enum, value_name = "METHOD")]
    pub intervals: Option<IntervalsArg>,
    /// Number of Monte Carlo or bootstrap draws, 1 to 1000000 (default 10000).
    #[arg(long, value_name = "N", value_parser = parse_draws)]
    pub draws: Option<usize>,
    /// Seed of the random-number generator, a whole number from 0 to 18446744073709551615
    /// (default 1).
    #[arg(long, value_name = "S", value_parser = parse_seed)]
    pub seed: Option<u64>,
    /// How the bootstrap makes new data: residuals (default), wild or cases.
    #[arg(long, value_enum, value_name = "SCHEME")]
    pub bootstrap_scheme: Option<SchemeArg>,
}

/// `vhfit two-point`.
#[derive(Debug, Clone, Args)]
#[command(group(clap::ArgGroup::new("direction").required(true).args(["k2", "delta_h"])))]
pub struct TwoPointArgs {
    /// First temperature, e.g. 25C or 298.15K (a number without a unit is read in
    /// --temp-unit, default °C).
    #[arg(long, value_name = "T", allow_hyphen_values = true, value_parser = parse_temperature)]
    pub t1: TypedTemperature,
    /// K at the first temperature.
    #[arg(long)]
    pub k1: f64,
    /// Second temperature, e.g. 37C or 310.15K.
    #[arg(long, value_name = "T", allow_hyphen_values = true, value_parser = parse_temperature)]
    pub t2: TypedTemperature,
    /// K at the second temperature: gives ΔH° and ΔS° from the two pairs.
    #[arg(long)]
    pub k2: Option<f64>,
    /// ΔH° (unit from --energy): gives K at the second temperature.
    #[arg(long, allow_hyphen_values = true)]
    pub delta_h: Option<f64>,
    /// Standard uncertainty u(K₁), in the unit of K₁ (0 if exact); or give --sigma-ln-k1.
    #[arg(
        long,
        value_name = "U",
        allow_hyphen_values = true,
        conflicts_with = "sigma_ln_k1"
    )]
    pub u_k1: Option<f64>,
    /// Standard uncertainty u(K₂), in the unit of K₂; or give --sigma-ln-k2.
    #[arg(
        long,
        value_name = "U",
        allow_hyphen_values = true,
        conflicts_with = "sigma_ln_k2"
    )]
    pub u_k2: Option<f64>,
    /// Standard uncertainty of ln K₁, σ(ln K₁), instead of --u-k1 (as the window takes it).
    #[arg(long, value_name = "SIGMA", allow_hyphen_values = true)]
    pub sigma_ln_k1: Option<f64>,
    /// Standard uncertainty of ln K₂, σ(ln K₂), instead of --u-k2.
    #[arg(long, value_name = "SIGMA", allow_hyphen_values = true)]
    pub sigma_ln_k2: Option<f64>,
    /// Standard uncertainty of both temperatures (same unit as T; 0 if exact).
    #[arg(long, default_value_t = 0.0)]
    pub u_t: f64,
    /// Standard uncertainty of ΔH° (unit from --energy).
    #[arg(long, default_value_t = 0.0)]
    pub u_delta_h: f64,
    /// Unit of temperatures typed without one (--t1, --t2; --u-t is in the unit of T₁):
    /// C, K or F (default °C, and the output says it was assumed).
    #[arg(long, value_enum, value_name = "C|K|F")]
    pub temp_unit: Option<TempArg>,
    /// Energy unit of ΔH° in and out (JSON is always J/mol).
    #[arg(long, value_enum, default_value = "kJ")]
    pub energy: EnergyArg,
    /// Confidence level, between 0 and 1.
    #[arg(long, default_value_t = 0.95, value_parser = parse_level)]
    pub level: f64,
    /// Print JSON (SI units) instead of text.
    #[arg(long)]
    pub json: bool,
}

/// A list of 1-based row numbers.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RowList(pub Vec<usize>);

/// Parses "3,7" or "3-5,9" into sorted, distinct 1-based rows.
pub fn parse_rows(s: &str) -> Result<RowList, String> {
    let mut rows = Vec::new();
    for part in s.split(',').map(str::trim).filter(|p| !p.is_empty()) {
        let one = |t: &str| -> Result<usize, String> {
            match t.trim().parse::<usize>() {
                Ok(0) => Err("row numbers start at 1".to_string()),
                Ok(n) => Ok(n),
                Err(_) => Err(format!("'{t}' is not a row number (give e.g. 3,7 or 3-5)")),
            }
        };
        match part.split_once('-') {
            Some((a, b)) => {
                let (a, b) = (one(a)?, one(b)?);
                if b < a || b - a > 10_000_000 {
                    return Err(format!("'{part}' is not a valid range of rows"));
                }
                rows.extend(a..=b);
            }
            None => rows.push(one(part)?),
        }
    }
    if rows.is_empty() {
        return Err("give at least one row number, e.g. 3,7".to_string());
    }
    rows.sort_unstable();
    rows.dedup();
    Ok(RowList(rows))
}

fn parse_column(s: &str) -> Result<isochore_data::ColumnChoice, String> {
    s.parse()
}

fn parse_level(s: &str) -> Result<f64, String> {
    let v: f64 = s
        .trim()
        .parse()
        .map_err(|_| format!("'{s}' is not a number"))?;
    if v.is_finite() && v > 0.0 && v < 1.0 {
        Ok(v)
    } else {
        Err("the level must lie strictly between 0 and 1, e.g. 0.95".to_string())
    }
}

/// A temperature as typed on the command line: a number with an optional unit suffix.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TypedTemperature {
    /// The number.
    pub value: f64,
    /// The unit suffix, when one was typed (`25C`, `298.15K`, `77F`, `25 °C`).
    pub unit: Option<TempArg>,
}

impl TypedTemperature {
    /// In kelvin, reading a number without a unit in `default`.
    ///
    /// # Errors
    /// When the temperature is at or below absolute zero (or not finite), naming the flag.
    pub fn kelvin(self, default: TempArg, flag: &str) -> Result<f64, String> {
        let unit = self.unit.unwrap_or(default);
        let k = unit.unit().to_kelvin(self.value);
        if k.is_finite() && k > 0.0 {
            Ok(k)
        } else {
            Err(format!(
                "{flag} {} {} is {} K, at or below absolute zero; give a unit (e.g. 25C or 298.15K) or --temp-unit",
                self.value,
                unit.unit().symbol(),
                crate::output::short(k)
            ))
        }
    }
}

impl TypedTemperature {
    /// As a temperature difference in kelvin (°C and K alike, °F × 5/9), reading a number
    /// without a unit in `default`: for an uncertainty such as `--sigma-t`.
    ///
    /// # Errors
    /// When it is not a positive finite number, naming the flag.
    pub fn kelvin_difference(self, default: TempArg, flag: &str) -> Result<f64, String> {
        let unit = self.unit.unwrap_or(default);
        let k = match unit {
            TempArg::F => self.value * 5.0 / 9.0,
            TempArg::C | TempArg::K => self.value,
        };
        if k.is_finite() && k > 0.0 {
            Ok(k)
        } else {
            Err(format!(
                "{flag} {} {}: an uncertainty must be a positive number (e.g. 0.1K); leave {flag} out to fit errors in K only",
                self.value,
                unit.unit().symbol()
            ))
        }
    }
}

/// Reads a temperature: a number, optionally followed by K, C, °C, F or °F.
pub(crate) fn parse_temperature(s: &str) -> Result<TypedTemperature, String> {
    let t = s.trim();
    let (number, unit) = [
        ("°C", TempArg::C),
        ("°F", TempArg::F),
        ("C", TempArg::C),
        ("c", TempArg::C),
        ("K", TempArg::K),
        ("k", TempArg::K),
        ("F", TempArg::F),
        ("f", TempArg::F),
    ]
    .iter()
    .find_map(|(suffix, u)| t.strip_suffix(suffix).map(|n| (n.trim(), Some(*u))))
    .unwrap_or((t, None));
    let value: f64 = number.parse().map_err(|_| {
        format!("'{s}' is not a temperature: give a number with an optional unit, e.g. 25C, 298.15K or 77F")
    })?;
    if !value.is_finite() {
        return Err(format!("'{s}' is not a finite temperature"));
    }
    Ok(TypedTemperature { value, unit })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn temperatures_with_and_without_units() {
        let t = parse_temperature("25C").unwrap();
        assert_eq!((t.value, t.unit), (25.0, Some(TempArg::C)));
        let t = parse_temperature("298.15 K").unwrap();
        assert_eq!((t.value, t.unit), (298.15, Some(TempArg::K)));
        assert_eq!(parse_temperature("25 °C").unwrap().unit, Some(TempArg::C));
        assert_eq!(parse_temperature("-5").unwrap().unit, None);
        assert!(parse_temperature("25X").is_err());
        assert!(parse_temperature("inf").is_err());
        // 0 °C = 273.15 K (the definition of the Celsius scale); −300 °C is below 0 K.
        let zero = parse_temperature("0").unwrap();
        assert!((zero.kelvin(TempArg::C, "--tref").unwrap() - 273.15).abs() < 1e-12);
        assert!(parse_temperature("-300C")
            .unwrap()
            .kelvin(TempArg::K, "--tref")
            .is_err());
        assert!(parse_temperature("0K")
            .unwrap()
            .kelvin(TempArg::C, "--tref")
            .is_err());
    }

    #[test]
    fn draws_and_seeds() {
        assert_eq!(parse_draws("10000"), Ok(10_000));
        assert!(parse_draws("0").unwrap_err().contains("at least 1"));
        assert!(parse_draws("1000001")
            .unwrap_err()
            .contains("at most 1000000"));
        assert!(parse_draws("1e4").is_err());
        assert_eq!(parse_seed("18446744073709551615"), Ok(u64::MAX));
        assert!(parse_seed("-1").unwrap_err().contains("not a seed"));
        assert!(parse_seed("abc").is_err());
    }

    #[test]
    fn row_lists() {
        assert_eq!(parse_rows("3,7").unwrap().0, vec![3, 7]);
        assert_eq!(parse_rows("7, 3-5,4").unwrap().0, vec![3, 4, 5, 7]);
        assert!(parse_rows("0").is_err());
        assert!(parse_rows("a").is_err());
        assert!(parse_rows("5-3").is_err());
        assert!(parse_rows("").is_err());
    }

    #[test]
    fn grammar_is_consistent() {
        use clap::CommandFactory;
        Cli::command().debug_assert();
    }
}
