//! What a joint fit's report says, as the [`Block`]s every format lays out: results first
//! (shared and per-series estimates, the test of equality with both fits side by side,
//! the differences between series), then the figures, the compensation analysis, the
//! calorimetric comparison, the data, methods, assumptions and the record.

use super::JointReportInput;
use crate::content::{Block, Table, MAX_LIST_ITEMS, MAX_TABLE_ROWS};
use crate::figures::FigureKind;
use crate::present::{self, cautions, fixed, flag_words, joint, names, percent, show_t};
use isochore_fit::global::compensation::CORRELATED_ESTIMATES_CAUTION;
use isochore_fit::{Weighting, GAS_CONSTANT};

/// `s` as a sentence: its first letter capitalised, a full stop at the end.
fn sentence(s: &str) -> String {
    // Only a Latin letter is capitalised: "β = 337 K" keeps its symbol.
    let mut c = s.chars();
    let first: String = c
        .next()
        .map(|f| f.to_ascii_uppercase().to_string())
        .unwrap_or_default();
    let rest = c.as_str().trim_end_matches('.');
    format!("{first}{rest}.")
}

fn strings(items: &[&str]) -> Vec<String> {
    items.iter().map(|s| s.to_string()).collect()
}

fn result_table(rows: Vec<Vec<String>>, first: &[&str], note: Option<String>) -> Table {
    let mut header = strings(first);
    header.extend(strings(&["value", "SE", "CI low", "CI high", "unit"]));
    let mut numeric = vec![false; first.len()];
    numeric.extend([true, true, true, true, false]);
    Table {
        header,
        rows,
        numeric,
        note,
    }
}

fn cells(r: &present::ResultRow) -> Vec<String> {
    let [v, se, lo, hi] = r.cells();
    vec![v, se, lo, hi, r.unit.clone()]
}

/// The one-line description of the job.
pub fn job_line(input: &JointReportInput) -> String {
    let fit = &input.fit;
    let shared: Vec<String> = fit
        .model()
        .params()
        .iter()
        .filter(|p| fit.shared(p.key).is_some())
        .map(|p| p.symbol.to_string())
        .collect();
    format!(
        "Van 't Hoff fit of {} series together ({}), {} shared by all and every other parameter per series: {} points used, {} model, {}, {}% confidence intervals.",
        input.series.len(),
        input.labels().join(", "),
        shared.join(", "),
        fit.n_used(),
        present::model_name(fit.model()),
        names::weighting(fit.weighted()),
        percent(fit.options().level),
    )
}

fn results(input: &JointReportInput, b: &mut Vec<Block>) {
    let fit = &input.fit;
    let (e, tu) = (input.energy_unit, input.temperature_unit);
    b.push(Block::Heading("Results".into()));
    let shared: Vec<Vec<String>> = joint::shared_rows(fit, e, tu)
        .iter()
        .map(|r| {
            let mut c = vec![r.quantity.clone()];
            c.extend(cells(r));
            c
        })
        .collect();
    b.push(Block::Paragraph(
        "Shared by all series (one value fitted to every series' points):".into(),
    ));
    b.push(Block::Table(result_table(shared, &["quantity"], None)));
    let mut per: Vec<Vec<String>> = Vec::new();
    for (s, series) in input.series.iter().enumerate() {
        for r in joint::series_rows(fit, s, e, tu) {
            let mut c = vec![series.label.clone(), r.quantity.clone()];
            c.extend(cells(&r));
            per.push(c);
        }
    }
    b.push(Block::Paragraph(
        "Each series' own parameters in the joint fit, and its ΔG° (which uses the shared parameters too):".into(),
    ));
    b.push(Block::Table(result_table(
        per,
        &["series", "quantity"],
        Some(format!(
            "SE = standard error; CI = {}% confidence interval, from the joint covariance. θ is the reference temperature; {}, here of each series' own points.",
            percent(fit.options().level),
            names::T_HM_MEANING
        )),
    )));
    if !input.warnings.is_empty() {
        b.push(Block::Warnings(input.warnings.clone()));
    }
}

fn equality(input: &JointReportInput, b: &mut Vec<Block>) {
    b.push(Block::Heading("Test of equality".into()));
    let Some(t) = &input.equality else {
        b.push(Block::Paragraph(
            "The test of equality could not be made: the separate fits (every parameter per series) could not be computed; the warnings say why.".into(),
        ));
        return;
    };
    b.push(Block::Paragraph(format!(
        "The shared fit is compared with the separate fits, in which the shared parameters are fitted per series too, on the same points with the same weights. Verdict: {}",
        sentence(&t.verdict())
    )));
    b.push(Block::Table(Table {
        header: strings(&joint::EQUALITY_COLUMNS),
        rows: joint::equality_side_by_side(t)
            .into_iter()
            .map(|r| r.to_vec())
            .collect(),
        numeric: vec![false, true, true],
        note: None,
    }));
    b.push(Block::Table(Table {
        header: strings(&["test of equality", "value"]),
        rows: joint::equality_test_rows(t)
            .into_iter()
            .map(|(k, v)| vec![k, v])
            .collect(),
        numeric: vec![false, false],
        note: Some("A small p-value says the shared parameters differ between the series; a large one does not prove them equal.".into()),
    }));
}

fn differences(input: &JointReportInput, b: &mut Vec<Block>) {
    let rows = joint::difference_rows(
        &input.fit,
        &input.labels(),
        input.energy_unit,
        input.temperature_unit,
    );
    if rows.is_empty() {
        return;
    }
    b.push(Block::Heading("Differences between series".into()));
    b.push(Block::Table(result_table(
        rows.iter()
            .map(|(pair, r)| {
                let mut c = vec![r.quantity.clone(), pair.clone()];
                c.extend(cells(r));
                c
            })
            .collect(),
        &["quantity", "series"],
        Some("Each difference is first series − second in the joint fit; its SE is √(Var a + Var b − 2 Cov(a, b)) from the joint covariance, so what the series share is counted once.".into()),
    )));
}

fn figures(input: &JointReportInput, b: &mut Vec<Block>) {
    let fit = &input.fit;
    let level = percent(fit.options().level);
    b.push(Block::Heading("Van 't Hoff plot".into()));
    b.push(Block::Figure(
        FigureKind::SeriesVantHoff,
        format!(
            "ln K against 1000/T of every series (one marker shape and colour each), with the line the joint fit gives each series under the shared parameters. Filled markers are used points (bars ±σ where given), hollow ones excluded points. The top axis gives the temperature in {}.",
            input.temperature_unit.symbol()
        ),
    ));
    b.push(Block::Heading("Residuals by series".into()));
    b.push(Block::Figure(
        FigureKind::SeriesResiduals,
        format!(
            "Residual ln K − fitted of each series in the joint fit, against temperature, one panel per series on a common scale (bars ±σ where given; hollow markers are excluded points). A trend within a panel says the shared parameters do not suit that series; {level}% intervals are in the tables."
        ),
    ));
    b.push(Block::Table(diagnostics_table(input)));
    let mut flagged = Vec::new();
    let mut total = 0;
    for (s, series) in input.series.iter().enumerate() {
        for (r, d) in series
            .rows
            .iter()
            .zip(fit.points(s).unwrap_or(&[]))
            .filter(|(_, d)| d.flags.any())
        {
            total += 1;
            if flagged.len() < MAX_LIST_ITEMS {
                flagged.push(format!(
                    "{}, row {} ({}): {}.",
                    series.label,
                    r.row,
                    show_t(r.t_k, input.temperature_unit),
                    flag_words(d.flags)
                ));
            }
        }
    }
    if flagged.is_empty() {
        b.push(Block::Paragraph("No point is flagged.".into()));
    } else {
        if total > flagged.len() {
            flagged.push(format!(
                "… and {} more; the data CSV lists every row.",
                total - flagged.len()
            ));
        }
        b.push(Block::Paragraph("Flagged points:".into()));
        b.push(Block::Bullets(flagged));
    }
}

fn diagnostics_table(input: &JointReportInput) -> Table {
    let tu = input.temperature_unit;
    let opt = |v: Option<f64>| v.map_or(present::MISSING.to_string(), |x| fixed(x, 3));
    let mut rows = Vec::new();
    let mut total = 0;
    for (s, series) in input.series.iter().enumerate() {
        for (r, d) in series.rows.iter().zip(input.fit.points(s).unwrap_or(&[])) {
            total += 1;
            if rows.len() >= MAX_TABLE_ROWS {
                continue;
            }
            rows.push(vec![
                series.label.clone(),
                r.row.to_string(),
                show_t(r.t_k, tu),
                fixed(d.ln_k, 4),
                if d.used { names::USED } else { names::EXCLUDED }.to_string(),
                fixed(d.residual, 4),
                opt(d.student_ext),
                fixed(d.leverage, 3),
                opt(d.cooks_d),
                flag_words(d.flags),
            ]);
        }
    }
    let note = (total > MAX_TABLE_ROWS).then(|| {
        format!(
            "The first {MAX_TABLE_ROWS} of {total} points are shown; the report's data CSV holds every one."
        )
    });
    Table {
        header: strings(&[
            "series",
            "row",
            "T",
            "ln K",
            "used",
            "residual",
            names::STUDENTIZED_SHORT,
            "leverage",
            "Cook's D",
            "flags",
        ]),
        rows,
        numeric: vec![
            false, true, true, true, false, true, true, true, true, false,
        ],
        note,
    }
}

fn compensation(input: &JointReportInput, b: &mut Vec<Block>) {
    b.push(Block::Heading("Enthalpy–entropy compensation".into()));
    let (Some(c), Some(t)) = (&input.compensation, &input.equality) else {
        b.push(Block::Paragraph(if input.series.len() < 3 {
            "The compensation analysis needs three or more series; this fit has two.".into()
        } else {
            "The compensation analysis could not be made; the warnings say why.".into()
        }));
        return;
    };
    let full = t.full();
    let level = full.options().level;
    let tu = input.temperature_unit;
    let t_hm = full.t_harmonic_all_k();
    b.push(Block::Paragraph(format!(
        "Caution: {}",
        sentence(CORRELATED_ESTIMATES_CAUTION)
    )));
    b.push(Block::Paragraph(format!(
        "Each series' ΔH° and ΔS° at θ = {} come from the separate fits (every parameter per series), so that no shared parameter ties the points together. ΔG° is taken at the harmonic-mean temperature of all points, T_hm = {}, where it is nearly uncorrelated with ΔH°.",
        show_t(full.options().t_ref_k, tu),
        show_t(t_hm, tu)
    )));
    b.push(Block::Table(Table {
        header: joint::compensation_header(input.energy_unit),
        rows: joint::compensation_rows(full, &c.points, t_hm, input.energy_unit),
        numeric: vec![false, true, true, true, true, true, true, true],
        note: None,
    }));
    b.push(Block::Figure(
        FigureKind::CompensationEntropy,
        format!(
            "ΔH° against ΔS° at θ, each series' {}% joint confidence region (shaded) and estimate (cross). The solid line is the compensation line of slope β from York's regression; the dashed grey line has slope T_hm, the line correlated errors alone produce.",
            percent(level)
        ),
    ));
    b.push(Block::Figure(
        FigureKind::CompensationGibbs,
        format!(
            "ΔH° at θ against ΔG° at T_hm = {}, each series' {}% joint confidence region. Here the regions are nearly upright: ΔH° and ΔG°(T_hm) are nearly uncorrelated, so a trend in this plot is not made by the errors.",
            show_t(t_hm, tu),
            percent(level)
        ),
    ));
    match &c.beta {
        Some(beta) => {
            b.push(Block::Table(Table {
                header: strings(&["Krug–Hunter–Grieger test", "value"]),
                rows: joint::beta_rows(beta, level, tu)
                    .into_iter()
                    .map(|(k, v)| vec![k, v])
                    .collect(),
                numeric: vec![false, false],
                note: None,
            }));
            b.push(Block::Paragraph(format!(
                "Verdict: {}",
                sentence(&beta.verdict)
            )));
        }
        None => b.push(Block::Paragraph(
            "No compensation temperature could be computed; the warnings say why.".into(),
        )),
    }
    match &c.exner {
        Some(x) => {
            b.push(Block::Table(Table {
                header: strings(&["Exner's test", "value"]),
                rows: joint::exner_rows(x)
                    .into_iter()
                    .map(|(k, v)| vec![k, v])
                    .collect(),
                numeric: vec![false, false],
                note: None,
            }));
            b.push(Block::Paragraph(format!(
                "Verdict: {}",
                sentence(&x.verdict)
            )));
        }
        None => b.push(Block::Paragraph(
            "Exner's common-intersection test could not be made; the warnings say why.".into(),
        )),
    }
}

fn calorimetric(input: &JointReportInput, b: &mut Vec<Block>) {
    if input.series.iter().all(|s| s.calorimetric.is_empty()) {
        return;
    }
    let (e, tu) = (input.energy_unit, input.temperature_unit);
    b.push(Block::Heading(names::CALORIMETRIC.into()));
    b.push(Block::Paragraph(
        "Each calorimetric enthalpy is compared with the van 't Hoff ΔH° of its series at the same temperature, from the joint fit (so a shared ΔCp° carries every series' information into the comparison): the difference with a normal interval and z, and the ratio ΔH_vH/ΔH_cal with Fieller's interval.".into(),
    ));
    let items: Vec<(&str, &isochore_fit::calorimetric::CalorimetricComparison)> = input
        .series
        .iter()
        .flat_map(|s| s.calorimetric.iter().map(move |c| (s.label.as_str(), c)))
        .collect();
    b.extend(crate::calorimetric_section::comparison_blocks(
        &items,
        e,
        tu,
        input.fit.options().level,
    ));
    constrained(input, b);
}

/// The joint fit with the calorimetric values as observations of ΔH°(T), when asked for:
/// each parameter beside the joint fit of ln K alone, or the refusal in words (the single
/// report's builder, [`crate::calorimetric_section::constrained_blocks`]).
fn constrained(input: &JointReportInput, b: &mut Vec<Block>) {
    let Some(result) = &input.calorimetric_fit else {
        return;
    };
    let labels = input.labels();
    b.extend(crate::calorimetric_section::constrained_blocks(
        &format!(
            "{}, each parameter beside the joint fit of ln K alone:",
            sentence(joint::CONSTRAINED_FIT).trim_end_matches('.')
        ),
        result.as_ref().map(|c| (c, &input.fit, &labels[..])),
        input.energy_unit,
        input.temperature_unit,
    ));
}

fn data(input: &JointReportInput, b: &mut Vec<Block>) {
    b.push(Block::Heading("Data".into()));
    b.push(Block::Table(Table {
        header: strings(&["series", "source", "rows", "used", "temperatures"]),
        rows: input
            .series
            .iter()
            .enumerate()
            .map(|(s, series)| {
                let used = series.rows.iter().filter(|r| r.included).count();
                let (lo, hi) = input.fit.t_range_k(s).unwrap_or((f64::NAN, f64::NAN));
                vec![
                    series.label.clone(),
                    series.source_name.clone(),
                    series.rows.len().to_string(),
                    used.to_string(),
                    format!(
                        "{} to {}",
                        show_t(lo, input.temperature_unit),
                        show_t(hi, input.temperature_unit)
                    ),
                ]
            })
            .collect(),
        numeric: vec![false, false, true, true, false],
        note: Some("Every row as read, with its converted values and diagnostics, is in the report's data CSV.".into()),
    }));
    // Series read from one file share its conversions: each is said once per file.
    let mut conversions: Vec<String> = Vec::new();
    for s in &input.series {
        for c in &s.conversions {
            let line = format!("{}: {c}", s.source_name);
            if !conversions.contains(&line) {
                conversions.push(line);
            }
        }
    }
    if !conversions.is_empty() {
        b.push(Block::Paragraph("Conversions made:".into()));
        b.push(Block::Bullets(conversions));
    }
    b.push(Block::Heading("Exclusions".into()));
    let ex: Vec<String> = input
        .series
        .iter()
        .flat_map(|s| {
            s.rows.iter().filter(|r| !r.included).map(move |r| {
                format!(
                    "{}, row {} (line {}): {}",
                    s.label,
                    r.row,
                    r.line,
                    r.exclusion_reason
                        .as_deref()
                        .filter(|x| !x.trim().is_empty())
                        .unwrap_or("excluded by the user; no reason was recorded")
                )
            })
        })
        .take(MAX_LIST_ITEMS)
        .collect();
    if ex.is_empty() {
        b.push(Block::Paragraph("No point was excluded.".into()));
    } else {
        b.push(Block::Bullets(ex));
    }
}

fn methods(input: &JointReportInput, b: &mut Vec<Block>) {
    let fit = &input.fit;
    let o = fit.options();
    b.push(Block::Heading("Methods".into()));
    b.push(Block::Paragraph(format!(
        "The {} model was fitted to every series at once by least squares on one block design: a shared parameter has one column carrying the model's term in every series' rows; a parameter fitted per series has one column per series, zero outside its own rows. The model, for each series s:",
        fit.model().describe()
    )));
    b.push(Block::Equation(present::equation(fit.model(), o.t_ref_k)));
    let weighting = match (o.weighting, fit.weighted()) {
        (Weighting::InverseVariance, true) => "Each point is weighted by 1/σ(ln K)².",
        _ => "The fit is unweighted: every point counts the same.",
    };
    let scale = if joint::is_absolute(fit) {
        "σ are known standard uncertainties: the covariance is (XᵀWX)⁻¹ without rescaling, intervals use the normal distribution, and the test of equality is Δχ² against χ²(q)."
    } else {
        "The scatter about the fit sets the error scale: the covariance is scaled by the reduced χ² of the joint fit (one residual variance for all series), intervals use Student's t with n − p degrees of freedom, and the test of equality is the extra-sum-of-squares F-test, F = ((χ²_shared − χ²_separate)/q) / (χ²_separate/(n − p_separate))."
    };
    b.push(Block::Paragraph(format!(
        "{weighting} {scale} Intervals are two-sided at the {}% level. Differences between series and ΔG°(T) = ΔH°(T) − T·ΔS°(T) take their SE from the full joint covariance. R = {} J mol⁻¹ K⁻¹ (CODATA 2018).",
        percent(o.level),
        GAS_CONSTANT
    )));
    if input.compensation.is_some() {
        b.push(Block::Paragraph(
            "Compensation: β is the slope of ΔH° on ΔS° by York's regression with correlated errors in both variables (York, Evensen, Martínez & Delgado, Am. J. Phys. 72, 367, 2004), each series weighted by its own SEs and ΔH°–ΔS° correlation; by the criterion of Krug, Hunter & Grieger (J. Phys. Chem. 80, 2335 and 2341, 1976) compensation is evidence of more than correlated errors only when β's interval excludes T_hm. Exner's test (Collect. Czech. Chem. Commun. 29, 1094, 1964) compares straight van 't Hoff lines forced through one common point with free lines by an F-test.".into(),
        ));
    }
    if input.series.iter().any(|s| !s.calorimetric.is_empty()) {
        b.push(Block::Paragraph(
            "Calorimetric comparison: d = ΔH_vH(T) − ΔH_cal with SE √(SE_vH² + u²) (the two measurements are independent), z = d/SE, a normal interval; the ratio ΔH_vH/ΔH_cal with Fieller's interval, unbounded when ΔH_cal is not clearly different from zero.".into(),
        ));
    }
}

fn record(input: &JointReportInput, b: &mut Vec<Block>) {
    let fit = &input.fit;
    let o = fit.options();
    let tu = input.temperature_unit;
    b.push(Block::Heading("Assumptions and cautions".into()));
    let (lo, hi) = (0..fit.n_series())
        .filter_map(|s| fit.t_range_k(s))
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), (l, h)| {
            (a.min(l), b.max(h))
        });
    b.push(Block::Bullets(vec![
        cautions::ACTIVITIES.to_string(),
        present::model_caution(fit.model()),
        "Sharing a parameter assumes it is the same in every series; the test of equality can reject that assumption but never prove it.".to_string(),
        cautions::extrapolation(&show_t(lo, tu), &show_t(hi, tu)),
        cautions::CALORIMETRY.to_string(),
        cautions::LAB_METHODS.to_string(),
    ]));
    b.push(Block::Heading("Reproducibility".into()));
    let shared: Vec<&str> = fit
        .model()
        .params()
        .iter()
        .filter(|p| fit.shared(p.key).is_some())
        .map(|p| p.key)
        .collect();
    let mut rows: Vec<Vec<String>> = vec![
        vec!["program".into(), format!("vhfit {}", input.program_version)],
        vec!["analysed".into(), input.record.analysed_at.clone()],
    ];
    for s in &input.series {
        rows.push(vec![
            format!("series “{}”", s.label),
            format!("{} (SHA-256 {})", s.source_name, s.source_sha256),
        ]);
    }
    rows.extend([
        vec!["model".into(), o.model.key().to_string()],
        vec!["shared".into(), shared.join(", ")],
    ]);
    rows.extend(crate::content::option_rows(
        o,
        fit.weighted(),
        input.energy_unit,
    ));
    for (k, v) in &input.settings {
        rows.push(vec![k.clone(), v.clone()]);
    }
    b.push(Block::Table(Table {
        header: strings(&["setting", "value"]),
        rows,
        numeric: vec![false, false],
        note: None,
    }));
}

/// The whole joint report as blocks, in reading order.
pub fn build(input: &JointReportInput) -> Vec<Block> {
    let mut b = vec![
        Block::Title(input.title.clone()),
        Block::Lead(job_line(input)),
        Block::Paragraph(joint_record_line(input)),
    ];
    if let Some(note) = input
        .record
        .note
        .as_deref()
        .filter(|n| !n.trim().is_empty())
    {
        b.push(Block::Paragraph(format!("Note: {}", note.trim())));
    }
    results(input, &mut b);
    equality(input, &mut b);
    differences(input, &mut b);
    figures(input, &mut b);
    compensation(input, &mut b);
    calorimetric(input, &mut b);
    data(input, &mut b);
    methods(input, &mut b);
    record(input, &mut b);
    b
}

fn joint_record_line(input: &JointReportInput) -> String {
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
