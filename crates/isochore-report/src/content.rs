//! What a report says, independent of the format: an ordered list of [`Block`]s (headings,
//! paragraphs, tables, figures, warnings) built once from a [`ReportInput`], which the HTML,
//! Markdown and PDF writers then lay out. Keeping the content here means every format
//! carries the same sentences and the same numbers.
//!
//! All text in blocks is plain (unescaped); each writer escapes for its own format.

use crate::figures::FigureKind;
use crate::present::{self, fixed, names, percent};
use crate::ReportInput;
use isochore_fit::{EnergyUnit, TemperatureUnit, VantHoffFit, Weighting, GAS_CONSTANT};

// The presentation rules live in `present`; these names stay here for existing callers.
pub use crate::present::{
    decimals_for, fixed as num, flag_words, show_t, sig, statistics_rows, ResultRow,
};

/// Data rows shown in a document table before the rest is left to the CSV.
pub const MAX_TABLE_ROWS: usize = 500;
/// Items of a list (flagged points, exclusions) shown before the rest is counted.
pub const MAX_LIST_ITEMS: usize = 100;

/// Where every row is when a document shows only some: the source file, and the data CSV.
fn full_data_note(input: &ReportInput, shown: usize, of: usize, what: &str) -> String {
    format!(
        "The first {shown} of {of} {what} are shown. All {of} are in the source file “{}” and in the report's data CSV (the “-data.csv” file of a report set, or the data table written alone as .csv).",
        input.source_name
    )
}

/// Caps a list at [`MAX_LIST_ITEMS`], adding a last item that counts the rest.
fn capped(mut items: Vec<String>, total: usize) -> Vec<String> {
    if total > MAX_LIST_ITEMS {
        items.truncate(MAX_LIST_ITEMS);
        items.push(format!(
            "… and {} more; the data CSV lists every row.",
            total - MAX_LIST_ITEMS
        ));
    }
    items
}

/// One piece of a report.
#[derive(Debug, Clone, PartialEq)]
pub enum Block {
    /// The document title.
    Title(String),
    /// The one-line summary of the job, shown under the title.
    Lead(String),
    /// A section heading.
    Heading(String),
    /// A paragraph.
    Paragraph(String),
    /// A paragraph in a fixed-width face (equations).
    Equation(String),
    /// A bulleted list.
    Bullets(Vec<String>),
    /// Cautions from the fit, shown prominently next to the numbers.
    Warnings(Vec<String>),
    /// A table.
    Table(Table),
    /// A figure with its caption.
    Figure(FigureKind, String),
}

/// A table of text cells.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    /// Column headers.
    pub header: Vec<String>,
    /// Rows of cells (each as long as `header`).
    pub rows: Vec<Vec<String>>,
    /// Which columns hold numbers (right-aligned).
    pub numeric: Vec<bool>,
    /// A note under the table, if any.
    pub note: Option<String>,
}

/// The entropy unit that goes with an energy unit, as (J per unit, symbol): the ΔS° rule
/// of [`present::per_kelvin`], in the form the command line's callers use.
pub fn entropy_unit(energy: EnergyUnit) -> (f64, &'static str) {
    let u = present::per_kelvin(energy);
    (u.si_per_unit, u.symbol)
}

/// The results rows of a report (see [`present::result_rows`]).
pub fn result_rows(input: &ReportInput) -> Vec<ResultRow> {
    present::result_rows(&input.fit, input.energy_unit, input.temperature_unit)
}

/// As [`result_rows`], from a fit and the display units alone.
pub fn result_rows_for(fit: &VantHoffFit, e: EnergyUnit, tu: TemperatureUnit) -> Vec<ResultRow> {
    present::result_rows(fit, e, tu)
}

/// The exclusions, one sentence each.
pub fn exclusions(input: &ReportInput) -> Vec<String> {
    input
        .rows
        .iter()
        .filter(|r| !r.included)
        .map(|r| {
            format!(
                "Row {} (line {}): {}",
                r.row,
                r.line,
                r.exclusion_reason
                    .as_deref()
                    .filter(|s| !s.trim().is_empty())
                    .unwrap_or("excluded by the user; no reason was recorded")
            )
        })
        .collect()
}

/// The one-line description of the job.
pub fn job_line(input: &ReportInput) -> String {
    let fit = &input.fit;
    format!(
        "Van 't Hoff fit of series “{}” from {}: {} of {} points used, {} model, {}, {}% confidence intervals.",
        input.series_name,
        input.source_name,
        fit.n_used(),
        fit.n_total(),
        present::model_name(fit.model()),
        names::weighting(fit.weighted()),
        percent(fit.options().level),
    )
}

fn methods(input: &ReportInput) -> Vec<Block> {
    let fit = &input.fit;
    let o = &fit.options();
    let mut out = Vec::new();
    let equation = present::equation(fit.model(), o.t_ref_k);
    let weighting = match (o.weighting, fit.weighted()) {
        (Weighting::InverseVariance, true) => {
            "Each point is weighted by 1/σ(ln K)², with σ(ln K) propagated to first order from the uncertainty given in the file."
        }
        _ => "The fit is unweighted: every point counts the same (ordinary least squares).",
    };
    let convention = if present::is_absolute(fit) {
        "σ are known standard uncertainties: the parameter covariance is (XᵀWX)⁻¹ without rescaling, and intervals use the normal distribution. With σ known, the log-likelihood follows from χ², AICc and BIC count only the p coefficients (k = p), and the model comparison uses the likelihood-ratio (Δχ²) test."
    } else if fit.weighted() {
        "σ are relative weights only: the parameter covariance is scaled by the reduced χ² (the scatter about the fit sets the error scale), and intervals use Student's t with n − p degrees of freedom. With σ estimated from the scatter, AICc and BIC count the variance as well as the p coefficients (k = p + 1), and the model comparison uses the F-test."
    } else {
        "With no σ, the scatter about the fit sets the error scale: the parameter covariance is scaled by the reduced χ², and intervals use Student's t with n − p degrees of freedom. With σ estimated from the scatter, AICc and BIC count the variance as well as the p coefficients (k = p + 1), and the model comparison uses the F-test."
    };
    out.push(Block::Paragraph(format!(
        "The {} model was fitted to ln K by least squares written directly in the thermodynamic parameters, so the fitted coefficients are {} with their full covariance:",
        fit.model().describe(),
        present::coefficients_phrase(fit.model())
    )));
    out.push(Block::Equation(equation));
    out.push(Block::Paragraph(format!(
        "{weighting} {convention} Intervals are two-sided at the {}% level. ΔG°(T) = ΔH°(T) − T·ΔS°(T) and its standard error come from the full covariance (delta method, exact for these linear combinations). At the weighted harmonic-mean temperature T_hm (1/T_hm = Σwᵢ/Tᵢ / Σwᵢ), ΔG°(T_hm) is uncorrelated with ΔH° (exactly for the linear model; Krug, Hunter & Grieger 1976), so ΔH° with ΔG°(T_hm) is the pair to quote; ΔH° and ΔS° themselves stay nearly ±1 correlated at every temperature. R = {} J mol⁻¹ K⁻¹ (CODATA 2018, exact in the 2019 SI). Points are flagged as outliers when |externally studentized residual| > {}, as high leverage when h > {}·p/n, and as influential when Cook's distance D > {}/n (common rules of thumb).",
        percent(o.level),
        GAS_CONSTANT,
        sig(o.thresholds.outlier_studentized, 3),
        sig(o.thresholds.leverage_factor, 3),
        sig(o.thresholds.cooks_factor, 3),
    )));
    out
}

fn cautions(input: &ReportInput) -> Vec<String> {
    let fit = &input.fit;
    let tu = input.temperature_unit;
    vec![
        present::cautions::ACTIVITIES.to_string(),
        present::model_caution(fit.model()),
        present::cautions::extrapolation(&show_t(fit.t_min_k(), tu), &show_t(fit.t_max_k(), tu)),
        present::cautions::CALORIMETRY.to_string(),
        present::cautions::LAB_METHODS.to_string(),
    ]
}

fn data_table(input: &ReportInput) -> Table {
    let fit = &input.fit;
    let mut header: Vec<String> = vec!["row".into(), "line".into()];
    header.extend(input.headers.iter().cloned());
    header.extend(
        [
            "T / K",
            "ln K",
            "σ(ln K)",
            "used",
            "fitted ln K",
            "residual",
            "flags",
        ]
        .iter()
        .map(|s| s.to_string()),
    );
    let mut numeric = vec![true, true];
    numeric.extend(input.headers.iter().map(|_| false));
    numeric.extend([true, true, true, false, true, true, false]);
    let n_cols = header.len();
    let rows: Vec<Vec<String>> = input
        .rows
        .iter()
        .zip(fit.points())
        .take(MAX_TABLE_ROWS)
        .map(|(r, d)| {
            let mut cells = vec![r.row.to_string(), r.line.to_string()];
            for i in 0..input.headers.len() {
                cells.push(r.cells.get(i).cloned().unwrap_or_default());
            }
            cells.push(fixed(r.t_k, 2));
            cells.push(fixed(r.ln_k, 4));
            cells.push(
                r.sigma_ln_k
                    .map_or(present::MISSING.to_string(), |s| fixed(s, 4)),
            );
            cells.push(if r.included { "yes" } else { "no" }.to_string());
            cells.push(fixed(d.fitted, 4));
            cells.push(fixed(d.residual, 4));
            cells.push(flag_words(d.flags));
            cells.resize(n_cols, String::new());
            cells
        })
        .collect();
    let note = (input.rows.len() > MAX_TABLE_ROWS)
        .then(|| full_data_note(input, MAX_TABLE_ROWS, input.rows.len(), "rows"));
    Table {
        header,
        rows,
        numeric,
        note,
    }
}

fn diagnostics_table(input: &ReportInput) -> Table {
    let fit = &input.fit;
    let header: Vec<String> = [
        "row",
        "T",
        "leverage",
        names::STUDENTIZED_INTERNAL_SHORT,
        names::STUDENTIZED_SHORT,
        "Cook's D",
        "DFFITS",
        "flags",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect();
    let opt = |v: Option<f64>| v.map_or(present::MISSING.to_string(), |x| fixed(x, 3));
    let used = fit.points().iter().filter(|d| d.used).count();
    let note =
        (used > MAX_TABLE_ROWS).then(|| full_data_note(input, MAX_TABLE_ROWS, used, "used points"));
    let rows = input
        .rows
        .iter()
        .zip(fit.points())
        .filter(|(_, d)| d.used)
        .take(MAX_TABLE_ROWS)
        .map(|(r, d)| {
            vec![
                r.row.to_string(),
                show_t(r.t_k, input.temperature_unit),
                fixed(d.leverage, 3),
                opt(d.student_int),
                opt(d.student_ext),
                opt(d.cooks_d),
                opt(d.dffits),
                flag_words(d.flags),
            ]
        })
        .collect();
    Table {
        header,
        rows,
        numeric: vec![true, true, true, true, true, true, true, false],
        note,
    }
}

/// The model comparison: the ladder's verdict in words and each step's F-test and ΔAICc.
fn comparison(fit: &VantHoffFit) -> Vec<Block> {
    let Some(c) = fit.comparison() else {
        return vec![Block::Paragraph(
            "The models could not be compared: the next larger model needs more used points at more distinct temperatures than there are.".into(),
        )];
    };
    vec![
        Block::Paragraph(format!(
            "The nested models {} compared on the same points: {}. {} This report uses the {} model.",
            present::ladder_text(c),
            c.verdict,
            names::data_support(present::model_name(c.preferred)),
            present::model_name(fit.model()),
        )),
        Block::Table(Table {
            header: vec!["test".into(), "value".into()],
            rows: present::comparison_rows(c)
                .into_iter()
                .map(|(k, v)| vec![k, v])
                .collect(),
            numeric: vec![false, true],
            note: Some(format!("{}.", names::DELTA_AICC_SIGN)),
        }),
    ]
}

/// The lab record in one sentence: when, by whom, with which program and version
/// ("Analysed 2026-12-02 18:50 UTC by A. Chemist with vhfit 0.1.0.").
pub fn record_line(input: &ReportInput) -> String {
    let r = &input.record;
    let mut s = String::from("Analysed");
    if !r.analysed_at.trim().is_empty() {
        s.push_str(&format!(" {}", r.analysed_at.trim()));
    }
    if let Some(a) = r.analyst.as_deref().filter(|a| !a.trim().is_empty()) {
        s.push_str(&format!(" by {}", a.trim()));
    }
    s.push_str(&format!(" with vhfit {}.", input.program_version));
    s
}

/// Builds the whole report as blocks, in reading order.
pub fn build(input: &ReportInput) -> Vec<Block> {
    let fit = &input.fit;
    let e = input.energy_unit;
    let s_unit = present::per_kelvin(e).symbol;
    let tu = input.temperature_unit;
    let mut b = vec![
        Block::Title(input.title.clone()),
        Block::Lead(job_line(input)),
        Block::Paragraph(record_line(input)),
    ];
    if let Some(note) = input
        .record
        .note
        .as_deref()
        .filter(|n| !n.trim().is_empty())
    {
        b.push(Block::Paragraph(format!("Note: {}", note.trim())));
    }

    // Results first: that is what the reader came for.
    b.push(Block::Heading("Results".into()));
    let rows = result_rows(input);
    b.push(Block::Table(Table {
        header: ["quantity", "value", "SE", "CI low", "CI high", "unit"]
            .iter()
            .map(|s| s.to_string())
            .collect(),
        rows: rows
            .iter()
            .map(|r| {
                let [v, se, lo, hi] = r.cells();
                vec![r.quantity.clone(), v, se, lo, hi, r.unit.clone()]
            })
            .chain({
                // The constant in the quantity the file gave (K_d in nM, pKa, K ×10ⁿ).
                let (kind, symbol) = input
                    .quantity
                    .clone()
                    .unwrap_or((isochore_fit::QuantityKind::K, "K".to_string()));
                present::quantity::constant_rows(fit, kind, &symbol, tu)
            })
            .collect(),
        numeric: vec![false, true, true, true, true, false],
        note: Some(format!(
            "SE = standard error; CI = {}% confidence interval. θ is the reference temperature; {}.",
            percent(fit.options().level),
            names::T_HM_MEANING
        )),
    }));
    // ΔCp° models: where ΔH° changes sign, or that it does not near the data, in words
    // (the row above gives the numbers; the words say when Fieller's interval is unbounded).
    if let Some(words) = fit.delta_h_zero_words_in(|t| show_t(t, tu)) {
        b.push(Block::Paragraph(format!("{words}.")));
    }
    if !fit.warnings().is_empty() {
        b.push(Block::Warnings(
            fit.warnings()
                .iter()
                .map(|w| present::units::warning_in_unit(w, fit, tu))
                .collect(),
        ));
    }
    b.push(Block::Table(Table {
        header: vec!["fit statistic".into(), "value".into()],
        rows: statistics_rows(fit)
            .into_iter()
            .map(|(k, v)| vec![k, v])
            .collect(),
        numeric: vec![false, true],
        note: None,
    }));
    if !input.intervals.is_empty() {
        // Issue 13: the methods paragraph and the delta method beside the resampled
        // intervals.
        b.push(Block::Heading(names::INTERVALS_BY_RESAMPLING.into()));
        b.push(Block::Paragraph(present::intervals::methods_paragraph(
            fit,
            &input.intervals,
        )));
        // With σ(T), Monte Carlo is centred on the fit with errors in T (issue 13).
        if matches!(input.errors_in_t, Some(Ok(_))) {
            b.push(Block::Paragraph(
                present::intervals::WITH_SIGMA_T.to_string(),
            ));
        }
        let (header, rows) =
            present::intervals::comparison_table(fit, &input.intervals, input.energy_unit, tu);
        let columns = header.len();
        b.push(Block::Table(Table {
            header,
            rows,
            numeric: (0..columns).map(|i| i == 1).collect(),
            note: Some(format!(
                "{}% intervals; the value is the fit's estimate in every column.",
                percent(fit.options().level)
            )),
        }));
        // Each quantity named as in the table, not by its JSON key.
        b.extend(
            input
                .intervals
                .iter()
                .flat_map(|r| present::intervals::run_warnings(fit, r, tu))
                .map(|w| Block::Paragraph(format!("Note: {w}"))),
        );
    }

    // Issue 13: with σ(T), the fit with errors in T beside the fit in K only.
    b.extend(crate::errors_in_t_section::blocks(input));
    b.extend(crate::calorimetric_section::blocks(input));

    b.push(Block::Heading("Van 't Hoff plot".into()));
    b.push(Block::Figure(
        FigureKind::VantHoff,
        format!(
            "ln K against 1000/T with the fitted {} model (line), its {}% confidence band (shaded) and prediction band (dashed). Filled circles are used points (bars ±σ where given), hollow circles are excluded points, and a ring marks a flagged point. The top axis gives the temperature in {}.",
            present::model_name(fit.model()),
            percent(fit.options().level),
            tu.symbol()
        ),
    ));

    b.push(Block::Heading("Residuals and influence".into()));
    b.push(Block::Figure(
        FigureKind::Residuals,
        "Residual ln K − fitted against temperature (bars ±σ where given); hollow circles are excluded points, shown against the fit they took no part in.".into(),
    ));
    b.push(Block::Figure(
        FigureKind::Influence,
        format!(
            "The {} against leverage for the used points, with contours of Cook's distance D = {}/n and D = 1; dotted lines mark the leverage threshold {}·p/n and residuals of ±{}.",
            names::STUDENTIZED,
            sig(fit.options().thresholds.cooks_factor, 3),
            sig(fit.options().thresholds.leverage_factor, 3),
            sig(fit.options().thresholds.outlier_studentized, 3)
        ),
    ));
    b.push(Block::Table(diagnostics_table(input)));
    let flagged: Vec<String> = input
        .rows
        .iter()
        .zip(fit.points())
        .filter(|(_, d)| d.flags.any())
        .take(MAX_LIST_ITEMS + 1)
        .map(|(r, d)| {
            format!(
                "Row {} ({}): {}.",
                r.row,
                show_t(r.t_k, tu),
                flag_words(d.flags)
            )
        })
        .collect();
    if flagged.is_empty() {
        b.push(Block::Paragraph("No point is flagged.".into()));
    } else {
        let total = fit.points().iter().filter(|d| d.flags.any()).count();
        b.push(Block::Paragraph("Flagged points:".into()));
        b.push(Block::Bullets(capped(flagged, total)));
    }

    b.push(Block::Heading("ΔH° and ΔS° together".into()));
    b.push(Block::Paragraph(format!(
        "ΔH° and ΔS° are estimated jointly and their errors are correlated (r = {} at θ). The left panel is their joint {}% confidence region; quoting them separately overstates what is known about each. They stay this correlated at every temperature, because ΔS° = (ΔH° − ΔG°)/T; at T_hm = {}, ΔG° is {} (r = {}), so ΔH° with ΔG°(T_hm) is the pair to quote: the right panel is their joint region.",
        fixed(fit.corr_h_s(), 4),
        percent(fit.options().level),
        show_t(fit.t_harmonic_k(), tu),
        if fit.corr_h_g_harmonic().abs() < 1e-6 {
            "uncorrelated with ΔH°"
        } else {
            "far less correlated with ΔH° than ΔS° is (zero only without ΔCp°)"
        },
        fixed(fit.corr_h_g_harmonic(), 4)
    )));
    b.push(Block::Figure(
        FigureKind::Ellipse,
        format!(
            "Left: ΔH° ({}) with ΔS° ({}) at θ = {}. Right: ΔH° with ΔG° at T_hm = {}.",
            e.symbol(),
            s_unit,
            show_t(fit.options().t_ref_k, tu),
            show_t(fit.t_harmonic_k(), tu)
        ),
    ));
    let (header, rows) = present::covariance_table(fit, e);
    if rows.len() >= 3 {
        b.push(Block::Table(Table {
            header,
            rows,
            numeric: vec![false, true, false],
            note: Some(
                "Each covariance is in the product of its two quantities' units; a variance is in the square of its unit.".into(),
            ),
        }));
    }

    b.push(Block::Heading("Model comparison".into()));
    b.extend(comparison(fit));

    b.push(Block::Heading("Data".into()));
    b.push(Block::Paragraph(format!(
        "Source: {} ({} rows). Columns as read are shown with the values converted to the fitting scale.",
        input.source_name,
        input.rows.len()
    )));
    b.push(Block::Table(data_table(input)));
    if !input.conversions.is_empty() {
        b.push(Block::Paragraph("Conversions made:".into()));
        b.push(Block::Bullets(input.conversions.clone()));
    }
    b.push(Block::Heading("Exclusions".into()));
    let ex = exclusions(input);
    if ex.is_empty() {
        b.push(Block::Paragraph("No point was excluded.".into()));
    } else {
        let total = ex.len();
        b.push(Block::Bullets(capped(ex, total)));
    }

    b.push(Block::Heading("Methods".into()));
    b.extend(methods(input));
    b.push(Block::Heading("Assumptions and cautions".into()));
    b.push(Block::Bullets(cautions(input)));

    b.push(Block::Heading("Reproducibility".into()));
    let o = &fit.options();
    let mut settings: Vec<Vec<String>> = vec![
        vec!["program".into(), format!("vhfit {}", input.program_version)],
        vec!["analysed".into(), input.record.analysed_at.clone()],
        vec!["source file".into(), input.source_name.clone()],
        vec!["source SHA-256".into(), input.source_sha256.clone()],
        vec!["series".into(), input.series_name.clone()],
        vec!["model".into(), o.model.key().to_string()],
    ];
    settings.extend(option_rows(o, fit.weighted(), e));
    for (k, v) in &input.settings {
        settings.push(vec![k.clone(), v.clone()]);
    }
    b.push(Block::Table(Table {
        header: vec!["setting".into(), "value".into()],
        rows: settings,
        numeric: vec![false, false],
        note: None,
    }));
    b
}

/// The fit options as rows of the "Reproducibility" table, from θ to R: the single fit's
/// report and the joint fit's alike.
pub(crate) fn option_rows(
    o: &isochore_fit::FitOptions,
    weighted: bool,
    e: EnergyUnit,
) -> Vec<Vec<String>> {
    vec![
        vec![
            "reference temperature θ".into(),
            format!("{} K", fixed(o.t_ref_k, 2)),
        ],
        vec![
            names::WEIGHTING.into(),
            names::weighting(weighted).to_string(),
        ],
        vec![
            names::SIGMA_CONVENTION.into(),
            names::sigma_convention(o.convention).to_string(),
        ],
        vec!["confidence level".into(), sig(o.level, 4)],
        vec![
            "flag thresholds".into(),
            present::thresholds_text(o.thresholds),
        ],
        vec!["energy unit".into(), e.symbol().to_string()],
        vec!["R".into(), format!("{GAS_CONSTANT} J mol⁻¹ K⁻¹")],
    ]
}
