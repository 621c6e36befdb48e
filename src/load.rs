//! Turning a path on the command line into fit jobs: a CSV file (read with isochore-data,
//! strict unless `--skip-bad-rows`) or a project file (its series, exclusions and settings),
//! one job per data set, with the command-line options laid over the file's settings.

use crate::cli::FitOptionsArgs;
use isochore_data::{Import, ImportOptions, Project};
use isochore_fit::{
    EnergyUnit, FitOptions, Measurement, Model, SigmaConvention, TemperatureUnit, Weighting,
};
use isochore_report::ReportRow;
use std::collections::BTreeMap;
use std::path::Path;

/// Reason recorded for rows excluded with `--exclude`.
pub const CLI_EXCLUSION: &str = "excluded on the command line (--exclude)";

/// One data set ready to fit.
#[derive(Debug, Clone)]
pub struct Job {
    /// The path as given on the command line.
    pub source: String,
    /// The file name.
    pub file_name: String,
    /// SHA-256 of the file's bytes (for a project: of the data set's original source).
    pub sha256: String,
    /// Name of the data set.
    pub series: String,
    /// Header cells as read.
    pub headers: Vec<String>,
    /// The unit conversions made, in words.
    pub conversions: Vec<String>,
    /// One row per point (cells filled only when asked for).
    pub rows: Vec<ReportRow>,
    /// Fit options after the command line is applied.
    pub options: FitOptions,
    /// Energy unit for people.
    pub energy: EnergyUnit,
    /// Temperature unit for people.
    pub temperature: TemperatureUnit,
    /// Cautions from reading (skipped rows, settings adapted).
    pub warnings: Vec<String>,
    /// Settings to record in reports (name, value).
    pub settings: Vec<(String, String)>,
}

impl Job {
    /// The measurements for the fit, in row order.
    pub fn measurements(&self) -> Vec<Measurement> {
        self.rows
            .iter()
            .map(|r| Measurement {
                t_k: r.t_k,
                ln_k: r.ln_k,
                sigma_ln_k: r.sigma_ln_k,
                included: r.included,
            })
            .collect()
    }
}

fn is_project(path: &Path) -> bool {
    let name = path
        .file_name()
        .and_then(|n| n.to_str())
        .unwrap_or("")
        .to_ascii_lowercase();
    name.ends_with(".json")
}

/// Applies the command-line options over `base`.
fn options(base: FitOptions, a: &FitOptionsArgs) -> FitOptions {
    let mut o = base;
    if let Some(m) = a.model {
        o.model = m;
    }
    if let Some(t) = a.tref {
        o.t_ref_k = t;
    }
    if let Some(l) = a.level {
        o.level = l;
    }
    if a.absolute_sigma {
        o.convention = SigmaConvention::Absolute;
    }
    if a.unweighted {
        o.weighting = Weighting::Unweighted;
    }
    if a.allow_extreme_temperatures {
        o.allow_extreme_temperatures = true;
    }
    o
}

/// Import options from the command line: the stated decimal mark and the confirmation of
/// extreme temperatures.
fn import_options(a: &FitOptionsArgs) -> ImportOptions {
    ImportOptions {
        decimal: match a.decimal_mark {
            None => isochore_data::DecimalMark::Auto,
            Some(crate::cli::DecimalArg::Point) => isochore_data::DecimalMark::Point,
            Some(crate::cli::DecimalArg::Comma) => isochore_data::DecimalMark::Comma,
        },
        allow_extreme_temperatures: a.allow_extreme_temperatures,
        ..ImportOptions::default()
    }
}

/// The command line's way out, appended to a library message: the libraries name the cause
/// and the remedy in words (no library knows the command line exists); the flag that takes
/// that remedy is named here.
pub fn data_hint(e: &isochore_data::Error) -> &'static str {
    match e {
        isochore_data::Error::DecimalMark { .. } => {
            " (on the command line: --decimal-mark point or --decimal-mark comma)"
        }
        isochore_data::Error::MissingSigma { .. } => " (on the command line: --unweighted)",
        isochore_data::Error::ProjectRow { rejected, .. } => row_hint(rejected),
        _ => "",
    }
}

/// [`data_hint`] for one rejected row.
pub fn row_hint(r: &isochore_data::RejectedRow) -> &'static str {
    match r.problem {
        isochore_data::RowProblem::ImplausibleTemperature { .. } => EXTREME_HINT,
        _ => "",
    }
}

/// The flag that confirms temperatures (and θ) outside 1–10 000 K.
pub const EXTREME_HINT: &str = " (on the command line: --allow-extreme-temperatures)";

/// A library message with the command line's hint, for data errors.
fn with_hint(e: &isochore_data::Error) -> String {
    format!("{e}{}", data_hint(e))
}

/// Reads one path into jobs (one per data set).
///
/// `with_cells` asks for the cells as read (needed for reports only; costly for huge files).
///
/// # Errors
/// A message naming the file (and line and column where there is one).
pub fn load(path: &Path, a: &FitOptionsArgs, with_cells: bool) -> Result<Vec<Job>, String> {
    if is_project(path) {
        load_project(path, a, with_cells)
    } else {
        load_csv(path, a, with_cells)
    }
}

fn finish_weighting(job: &mut Job) {
    // A file with no uncertainties at all is fitted unweighted (weights need σ).
    let any_sigma = job.rows.iter().any(|r| r.sigma_ln_k.is_some());
    if !any_sigma && job.options.weighting == Weighting::InverseVariance {
        job.options.weighting = Weighting::Unweighted;
        job.warnings.push(
            "the file gives no uncertainties, so the fit is unweighted and intervals come from the scatter".to_string(),
        );
    }
}

fn check_exclusions(job: &Job, a: &FitOptionsArgs) -> Result<(), String> {
    if let Some(rows) = &a.exclude {
        let max = job.rows.iter().map(|r| r.row).max().unwrap_or(0);
        if let Some(bad) = rows.0.iter().find(|&&r| r > max) {
            return Err(format!(
                "{}: series '{}': --exclude names row {bad}, but the series has {max} data rows",
                job.source, job.series
            ));
        }
    }
    Ok(())
}

/// A message from isochore-data, which names the file by its base name, named instead by
/// the path as given, so `d1/x.csv` and `d2/x.csv` are told apart.
fn named_by_path(message: &str, path: &Path) -> String {
    let shown = path.display().to_string();
    let base = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    match message.strip_prefix(&format!("{base}:")) {
        Some(rest) if !base.is_empty() && !message.starts_with(&format!("{shown}:")) => {
            format!("{shown}:{rest}")
        }
        _ if message.contains(&shown) => message.to_string(),
        _ => format!("{shown}: {message}"),
    }
}

fn load_csv(path: &Path, a: &FitOptionsArgs, with_cells: bool) -> Result<Vec<Job>, String> {
    let source = path.display().to_string();
    let imp: Import = isochore_data::import_path(path, &import_options(a))
        .map_err(|e| named_by_path(&with_hint(&e), path))?;
    let mut warnings = Vec::new();
    if let Some(first) = imp.rejected.first() {
        if !a.skip_bad_rows {
            let more = if imp.rejected.len() > 1 {
                format!(
                    " ({} bad rows in all; --skip-bad-rows fits the good ones)",
                    imp.rejected.len()
                )
            } else {
                " (--skip-bad-rows fits the good rows)".to_string()
            };
            return Err(format!(
                "{source}: {}{}{more}",
                first.message(),
                row_hint(first)
            ));
        }
        for r in &imp.rejected {
            warnings.push(format!("skipped {}", r.message()));
        }
    }
    let excluded: Vec<usize> = a.exclude.as_ref().map(|r| r.0.clone()).unwrap_or_default();
    let opts = options(FitOptions::default(), a);
    if opts.weighting == Weighting::InverseVariance {
        // σ in some rows and an empty σ cell in another: refused with its line and column.
        imp.check_sigma()
            .map_err(|e| named_by_path(&with_hint(&e), path))?;
    }
    let mut jobs = Vec::new();
    for s in &imp.series {
        let points = s.points(&excluded);
        let mut job = Job {
            source: source.clone(),
            file_name: imp.source.name.clone(),
            sha256: imp.source.sha256.clone(),
            series: s.name.clone(),
            headers: imp.headers.clone(),
            conversions: imp.describe_mapping(),
            rows: Vec::with_capacity(points.len()),
            options: opts,
            energy: a.energy.map_or(EnergyUnit::KilojoulePerMole, |e| e.unit()),
            temperature: imp.mapping.temperature.unit,
            warnings: warnings.clone(),
            settings: Vec::new(),
        };
        for p in &points {
            let first = p.rows.first().copied().unwrap_or(0);
            // Row numbers run 1, 2, … in each data set.
            let row = first.checked_sub(1).and_then(|i| s.rows.get(i));
            let m = p.measurement;
            job.rows.push(ReportRow {
                row: first,
                line: row.map_or(0, |r| r.line()),
                cells: match (with_cells, row) {
                    (true, Some(r)) => imp.cells(r),
                    _ => Vec::new(),
                },
                t_k: m.t_k,
                ln_k: m.ln_k,
                sigma_ln_k: m.sigma_ln_k,
                included: m.included,
                exclusion_reason: (!m.included).then(|| CLI_EXCLUSION.to_string()),
            });
        }
        check_exclusions(&job, a)?;
        if let Some(rows) = &a.exclude {
            job.settings.push((
                "excluded on the command line".to_string(),
                rows.0
                    .iter()
                    .map(|r| r.to_string())
                    .collect::<Vec<_>>()
                    .join(","),
            ));
        }
        finish_weighting(&mut job);
        jobs.push(job);
    }
    if jobs.is_empty() {
        return Err(format!("{source}: no data rows to fit"));
    }
    Ok(jobs)
}

fn load_project(path: &Path, a: &FitOptionsArgs, with_cells: bool) -> Result<Vec<Job>, String> {
    let source = path.display().to_string();
    let mut project = Project::load(path).map_err(|e| e.to_string())?;
    let mut jobs = Vec::new();
    for s in &mut project.series {
        if let Some(rows) = &a.exclude {
            for &r in &rows.0 {
                s.exclude(r, CLI_EXCLUSION, "command line")
                    .map_err(|e| format!("{source}: {e}"))?;
            }
        }
        if a.allow_extreme_temperatures {
            s.settings.fit.allow_extreme_temperatures = true;
        }
        if options(s.settings.fit, a).weighting == Weighting::InverseVariance {
            s.check_sigma()
                .map_err(|e| format!("{source}: {}", with_hint(&e)))?;
        }
        let points = s
            .points()
            .map_err(|e| format!("{source}: {}", with_hint(&e)))?;
        let reasons: BTreeMap<usize, String> = s
            .exclusions
            .iter()
            .map(|e| (e.row, e.reason.clone()))
            .collect();
        let mut job = Job {
            source: source.clone(),
            file_name: s.source.name.clone(),
            sha256: s.source.sha256.clone(),
            series: s.name.clone(),
            headers: s.headers.clone(),
            conversions: s.mapping.describe(&s.headers),
            rows: Vec::with_capacity(points.len()),
            options: options(s.settings.fit, a),
            energy: a.energy.map_or(s.settings.energy_unit, |e| e.unit()),
            temperature: s.settings.temperature_unit,
            warnings: Vec::new(),
            settings: vec![("project file".to_string(), source.clone())],
        };
        for p in &points {
            let first = p.rows.first().copied().unwrap_or(0);
            let raw = first.checked_sub(1).and_then(|i| s.rows.get(i));
            let m = p.measurement;
            job.rows.push(ReportRow {
                row: first,
                line: raw.map_or(0, |r| r.line),
                cells: match (with_cells, raw) {
                    (true, Some(r)) => r.cells.clone(),
                    _ => Vec::new(),
                },
                t_k: m.t_k,
                ln_k: m.ln_k,
                sigma_ln_k: m.sigma_ln_k,
                included: m.included,
                exclusion_reason: if m.included {
                    None
                } else {
                    p.rows.iter().find_map(|r| reasons.get(r).cloned())
                },
            });
        }
        if points.iter().any(|p| p.rows.len() > 1) {
            job.warnings.push(
                "replicates were averaged as the project asks; each point is named by its first row".to_string(),
            );
        }
        finish_weighting(&mut job);
        jobs.push(job);
    }
    if jobs.is_empty() {
        return Err(format!("{source}: the project holds no data sets"));
    }
    Ok(jobs)
}
