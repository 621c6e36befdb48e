//! The report of a joint fit: every format renders from three invented series fitted with
//! a shared ΔCp° and is readable by an independent parser (roxmltree for the SVG figures,
//! lopdf for the PDF, the PNG signature); the tables carry the fit crate's numbers; the
//! verdicts and cautions are in the words the issue asks for; hostile series names stay
//! text; a set writes exactly the files it plans, each the bytes its format alone writes
//! (figures drawn once for the set); a single fit's figure kind is refused.

use isochore_fit::calorimetric::{compare_calorimetric_series, CalorimetricValue};
use isochore_fit::global::{
    compensation, exner_test, fit_global, CompensationPoint, EqualityTest, SeriesInput, Sharing,
    SharingMap,
};
use isochore_fit::{EnergyUnit, FitOptions, Measurement, Model, TemperatureUnit, GAS_CONSTANT};
use isochore_report::{
    joint_report_set_paths, render_joint, write_joint_report, write_joint_report_set, FigureKind,
    JointCompensation, JointReportInput, JointSeries, ReportFormat, ReportRow,
};

/// Three invented series with ΔCp° = −700 J/(mol K) and a small alternating wobble.
fn series() -> Vec<Vec<Measurement>> {
    [(-40e3, -50.0), (-30e3, -15.0), (-20e3, 20.0)]
        .iter()
        .enumerate()
        .map(|(j, &(dh, ds))| {
            (0..8)
                .map(|i| {
                    let t = 283.15 + 5.0 * i as f64;
                    let w = if (i + j) % 2 == 0 { 0.012 } else { -0.012 };
                    let ln_k = -dh / (GAS_CONSTANT * t)
                        + ds / GAS_CONSTANT
                        + -700.0 * (298.15 / t - 1.0 + (t / 298.15).ln()) / GAS_CONSTANT
                        + w;
                    Measurement::new(t, ln_k).with_sigma(0.02)
                })
                .collect()
        })
        .collect()
}

fn input(labels: [&str; 3]) -> JointReportInput {
    let data = series();
    let inputs: Vec<SeriesInput<'_>> = data
        .iter()
        .zip(labels)
        .map(|(d, l)| SeriesInput::new(l, d))
        .collect();
    let opts = FitOptions {
        model: Model::CONSTANT_CP,
        ..FitOptions::default()
    };
    let shared = SharingMap::per_series().with("delta_cp", Sharing::Shared);
    let fit = fit_global(&inputs, &shared, &opts).unwrap();
    let full = fit_global(&inputs, &SharingMap::per_series(), &opts).unwrap();
    let test = EqualityTest::between(fit.clone(), full.clone()).unwrap();
    let points = CompensationPoint::from_fit(&full, opts.t_ref_k);
    let beta = compensation(&points, full.t_harmonic_all_k(), opts.level).ok();
    let exner = exner_test(&inputs, opts.weighting, opts.level).ok();
    let cal = compare_calorimetric_series(
        &fit,
        1,
        &[CalorimetricValue {
            t_k: 298.15,
            delta_h: -31e3,
            u: 500.0,
        }],
    )
    .unwrap();
    let series = data
        .iter()
        .zip(labels)
        .enumerate()
        .map(|(s, (d, l))| JointSeries {
            label: l.to_string(),
            source_name: format!("{l}.csv"),
            source_sha256: "00".repeat(32),
            rows: d
                .iter()
                .enumerate()
                .map(|(i, m)| ReportRow {
                    row: i + 1,
                    line: i + 2,
                    cells: vec![],
                    t_k: m.t_k,
                    ln_k: m.ln_k,
                    sigma_ln_k: m.sigma_ln_k,
                    included: m.included,
                    exclusion_reason: None,
                })
                .collect(),
            conversions: vec![],
            calorimetric: if s == 1 { cal.clone() } else { vec![] },
        })
        .collect();
    JointReportInput {
        title: "Joint test report".into(),
        series,
        fit,
        equality: Some(test),
        compensation: Some(JointCompensation {
            points,
            beta,
            exner,
        }),
        calorimetric_fit: None,
        warnings: vec![],
        energy_unit: EnergyUnit::KilojoulePerMole,
        temperature_unit: TemperatureUnit::Celsius,
        program_version: "test".into(),
        record: isochore_report::Record::default(),
        settings: vec![],
    }
}

fn text(format: ReportFormat, i: &JointReportInput) -> String {
    String::from_utf8(render_joint(i, format).unwrap()).unwrap()
}

#[test]
fn every_format_renders_with_the_verdicts_in_words() {
    let i = input(["A", "B", "C"]);
    let html = text(ReportFormat::Html, &i);
    let verdict = i.equality.as_ref().unwrap().verdict();
    let escaped = verdict.replace('\'', "&#x27;");
    assert!(html.contains(&escaped[1..40]) || html.contains(&verdict[1..40]));
    assert!(html.contains("proves nothing by itself"));
    assert!(html.contains("Krug–Hunter–Grieger") && html.contains("Exner"));
    assert!(html.contains("Fieller") && html.contains("coupled equilibria"));
    assert!(html.contains("validated methods"));
    assert!(html.contains("shared fit") && html.contains("separate fits"));
    // The shared ΔCp° in the results CSV is the fit crate's, in J/(mol·K).
    let csv = text(ReportFormat::ResultsCsv, &i);
    let row = csv.lines().find(|l| l.starts_with("shared,")).unwrap();
    let v: f64 = row.split(',').nth(3).unwrap().parse().unwrap();
    assert_eq!(v, i.fit.shared("delta_cp").unwrap().value);
    let data = text(ReportFormat::DataCsv, &i);
    assert_eq!(data.lines().count(), 1 + 3 * 8);
    let md = text(ReportFormat::Markdown, &i);
    assert!(md.contains("figure-compensation-dh-ds.svg"));
    for kind in FigureKind::JOINT {
        let svg = text(ReportFormat::FigureSvg(kind), &i);
        roxmltree::Document::parse(&svg).unwrap();
        let png = render_joint(&i, ReportFormat::FigurePng(kind)).unwrap();
        assert!(png.starts_with(b"\x89PNG"));
    }
    let pdf = render_joint(&i, ReportFormat::Pdf).unwrap();
    let doc = lopdf::Document::load_mem(&pdf).unwrap();
    assert!(doc.get_pages().len() >= 4);
}

#[test]
fn hostile_names_stay_text_and_sets_write_their_plan() {
    let i = input(["<script>x</script>", "B|*", "C"]);
    let html = text(ReportFormat::Html, &i);
    assert!(!html.contains("<script>x") && html.contains("&lt;script&gt;"));
    let md = text(ReportFormat::Markdown, &i);
    assert!(!md.contains("<script>") && md.contains("B\\|\\*"));
    let dir = tempfile::tempdir().unwrap();
    let written = write_joint_report_set(&i, dir.path(), "j").unwrap();
    assert_eq!(written, joint_report_set_paths(&i, dir.path(), "j"));
    let mut on_disk: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    on_disk.sort();
    let mut want = written.clone();
    want.sort();
    assert_eq!(on_disk, want);
    // A single fit's figure kind names its joint counterpart; a joint kind on a single
    // fit's report is refused with a typed error (render.rs covers that side).
    let a = render_joint(&i, ReportFormat::FigureSvg(FigureKind::VantHoff)).unwrap();
    let b = render_joint(&i, ReportFormat::FigureSvg(FigureKind::SeriesVantHoff)).unwrap();
    assert_eq!(a, b);
    // Inconsistent input is refused, not drawn.
    let mut bad = i.clone();
    bad.series.pop();
    assert!(render_joint(&bad, ReportFormat::Html).is_err());
}

#[test]
fn every_file_of_a_joint_set_is_what_its_format_alone_writes() {
    // As tests/report_set.rs for a single fit: the set draws and rasterises each figure
    // once; the PDF (not byte-for-byte repeatable) by its pages and image streams.
    let i = input(["A", "B", "C"]);
    let set = tempfile::tempdir().unwrap();
    let alone = tempfile::tempdir().unwrap();
    let written = write_joint_report_set(&i, set.path(), "j").unwrap();
    let mut each = Vec::new();
    for (format, name) in isochore_report::joint::joint_report_set_plan(&i, "j") {
        each.extend(write_joint_report(&i, format, &alone.path().join(name)).unwrap());
    }
    // Markdown + 4 SVG, HTML, PDF, two CSV tables, 4 PNG (three series: compensation plots).
    crate::report_set::same_files(&written, &each, alone.path());
}
