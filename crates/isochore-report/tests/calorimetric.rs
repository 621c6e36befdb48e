//! The single report's "Calorimetric ΔH°" section with the series fitted again with its
//! calorimetric values as observations of ΔH°(T) (`ReportInput::calorimetric_fit`, issue
//! 12): each parameter "with ΔH_cal" beside "ln K alone" in every format, the numbers the
//! fit crate's (each rounded as shown), χ² and the degrees of freedom in words; a refusal in
//! words; nothing of it without the slot.

use super::render::input;
use isochore_fit::calorimetric::{compare_calorimetric, CalorimetricValue};
use isochore_fit::global::{
    fit_global, fit_global_with_calorimetric, CalorimetricObservation, SeriesInput, SharingMap,
};
use isochore_fit::Measurement;
use isochore_report::{render, ReportFormat, ReportInput};

/// The thermochemical calorie, J (common practice; the report's kcal/mol).
const CAL: f64 = 4184.0;

/// render.rs's input (ΔH° = −30 kJ/mol, ΔS° = −20 J/(mol·K), kcal/mol, °C) with an invented
/// calorimetric ΔH of −31.0 ± 0.3 kJ/mol at 25 °C compared and fitted with ln K.
fn with_fit() -> ReportInput {
    let mut i = input("S1");
    let m: Vec<Measurement> = i
        .rows
        .iter()
        .map(|r| {
            let mut p = Measurement::new(r.t_k, r.ln_k).with_sigma(r.sigma_ln_k.unwrap());
            p.included = r.included;
            p
        })
        .collect();
    let value = CalorimetricValue {
        t_k: 298.15,
        delta_h: -31_000.0,
        u: 300.0,
    };
    let opts = i.fit.options();
    let inputs = [SeriesInput::new("S1", &m)];
    let sharing = SharingMap::per_series();
    let alone = fit_global(&inputs, &sharing, &opts).unwrap();
    let obs = [CalorimetricObservation { series: 0, value }];
    let with = fit_global_with_calorimetric(&inputs, &sharing, &opts, &obs).unwrap();
    i.calorimetric = compare_calorimetric(&i.fit, &[value]).unwrap();
    i.calorimetric_fit = Some(Ok((alone, with)));
    i
}

fn text(i: &ReportInput, f: ReportFormat) -> String {
    String::from_utf8(render(i, f).unwrap()).unwrap()
}

/// `shown` (as written, e.g. "-7.41") agrees with `exact` to the decimals it shows.
fn rounds_to(shown: &str, exact: f64) {
    let v: f64 = shown.parse().unwrap_or_else(|_| panic!("{shown}"));
    let d = shown.split('.').nth(1).map_or(0, str::len);
    let half = 0.5 * 10f64.powi(-(d as i32)) * (1.0 + 1e-9);
    assert!((v - exact).abs() <= half, "{shown} is not {exact} rounded");
}

#[test]
fn every_format_shows_the_fit_with_the_calorimetric_values() {
    let i = with_fit();
    let (alone, with) = match &i.calorimetric_fit {
        Some(Ok(p)) => p,
        _ => unreachable!(),
    };
    let w = with.estimate("delta_h", 0).unwrap();
    let a = alone.estimate("delta_h", 0).unwrap();
    // The one-series fit of ln K alone is the single fit (the report's own ΔH°).
    let single = i.fit.delta_h();
    assert!((a.value - single.value).abs() <= 1e-9 * single.value.abs());
    assert!((a.se - single.se).abs() <= 1e-9 * single.se);
    // ΔH_cal = −31 ± 0.3 kJ/mol pulls ΔH° from about −30 towards itself.
    assert!(w.value < a.value && w.se < a.se, "{w:?} vs {a:?}");

    let md = text(&i, ReportFormat::Markdown).replace('\\', "");
    let section = md
        .split("## Calorimetric ΔH°")
        .nth(1)
        .and_then(|s| s.split("\n## ").next())
        .expect("the section");
    assert!(section.contains(
        "| parameter | series | with ΔH_cal: value ± SE | 95% CI | ln K alone: value ± SE | 95% CI | unit |"
    ));
    let row = section
        .lines()
        .find(|l| l.starts_with("| ΔH° | S1 |"))
        .unwrap_or_else(|| panic!("no ΔH° row in\n{section}"));
    let cells: Vec<&str> = row.split('|').map(str::trim).collect();
    assert_eq!(cells[7], "kcal/mol");
    for (cell, e) in [(cells[3], w), (cells[5], a)] {
        let (v, se) = cell.split_once(" ± ").unwrap();
        rounds_to(v, e.value / CAL);
        rounds_to(se, e.se / CAL);
    }
    let ci: Vec<&str> = cells[4]
        .trim_matches(|c| c == '[' || c == ']')
        .split(", ")
        .collect();
    rounds_to(ci[0], w.ci_low / CAL);
    rounds_to(ci[1], w.ci_high / CAL);
    assert!(section.contains(&format!(
        "χ² = {:.4} over 6 ln K points and 1 calorimetric value, 5 degrees of freedom.",
        with.statistics().chi2
    )));
    assert!(section.contains("The series fitted again with the calorimetric values"));
    assert!(section.contains("pulls ΔH° towards itself"));
    // The comparison stays ahead of it.
    assert!(section.find("Fieller").unwrap() < section.find("with ΔH_cal").unwrap());

    let html = text(&i, ReportFormat::Html);
    assert!(html.contains("with ΔH_cal: value ± SE") && html.contains("ln K alone: value ± SE"));
    assert!(html.contains("1 calorimetric value, 5 degrees of freedom"));

    let csv = text(&i, ReportFormat::ResultsCsv);
    let value = |name: &str| -> f64 {
        let r = csv
            .lines()
            .find(|l| l.starts_with(&format!("{name},")))
            .unwrap_or_else(|| panic!("no {name} in\n{csv}"));
        r.split(',').nth(1).unwrap().parse().unwrap()
    };
    assert!((value("ΔH° with ΔH_cal") * CAL - w.value).abs() <= 1e-9 * w.value.abs());
    assert_eq!(value("χ² with ΔH_cal"), with.statistics().chi2);
    assert_eq!(value("degrees of freedom with ΔH_cal"), 5.0);
    assert_eq!(value("calorimetric values in the fit"), 1.0);

    let pdf = render(&i, ReportFormat::Pdf).unwrap();
    let doc = lopdf::Document::load_mem(&pdf).unwrap();
    let plain =
        lopdf::Document::load_mem(&render(&input("S1"), ReportFormat::Pdf).unwrap()).unwrap();
    assert!(doc.get_pages().len() >= plain.get_pages().len());
}

#[test]
fn a_refusal_is_said_in_words_and_no_slot_shows_nothing() {
    let mut i = with_fit();
    i.calorimetric_fit = Some(Err(
        "calorimetric values can constrain the fit only when every ln K has its σ".into(),
    ));
    let md = text(&i, ReportFormat::Markdown).replace('\\', "");
    assert!(md.contains(
        "Not fitted: Calorimetric values can constrain the fit only when every ln K has its σ."
    ));
    assert!(!md.contains("with ΔH_cal"));
    assert!(!text(&i, ReportFormat::ResultsCsv).contains("with ΔH_cal"));
    // The fit alone (no comparisons) still gets the section.
    let mut only = with_fit();
    only.calorimetric.clear();
    let md = text(&only, ReportFormat::Markdown).replace('\\', "");
    assert!(
        md.contains("## Calorimetric ΔH°") && md.contains("with ΔH_cal") && !md.contains("Fieller")
    );
    // Without the slot: the comparisons, no such table.
    let mut none = with_fit();
    none.calorimetric_fit = None;
    for f in [
        ReportFormat::Markdown,
        ReportFormat::Html,
        ReportFormat::ResultsCsv,
    ] {
        assert!(!text(&none, f).contains("with ΔH_cal"), "{f:?}");
    }
    assert!(text(&none, ReportFormat::Markdown).contains("Fieller"));
}
