//! Every format renders from one synthetic fit and is readable by an independent parser
//! (roxmltree for SVG, lopdf for PDF, the PNG signature and its resolution chunk), the
//! numbers in the tables are the fit's, hostile text stays text, a full set is written with
//! nothing half-written left behind, and inconsistent input is refused with a typed error.

use isochore_fit::{fit, EnergyUnit, FitOptions, Measurement, TemperatureUnit, GAS_CONSTANT};
use isochore_report::{
    render, write_report_set, FigureKind, ReportError, ReportFormat, ReportInput, ReportRow,
    TEMP_PREFIX, TEMP_SUFFIX,
};

pub(crate) fn input(name: &str) -> ReportInput {
    // Exact data with ΔH° = −30 kJ/mol, ΔS° = −20 J/(mol K), plus a small alternating wobble
    // so the fit has residual scatter (values invented for the test).
    let temps = [283.15, 288.15, 293.15, 298.15, 303.15, 308.15, 313.15];
    let mut m: Vec<Measurement> = temps
        .iter()
        .enumerate()
        .map(|(i, &t)| {
            let wobble = if i % 2 == 0 { 0.01 } else { -0.01 };
            Measurement::new(t, 30e3 / (GAS_CONSTANT * t) - 20.0 / GAS_CONSTANT + wobble)
                .with_sigma(0.02)
        })
        .collect();
    m[3].included = false;
    let f = fit(&m, &FitOptions::default()).unwrap();
    let rows = m
        .iter()
        .enumerate()
        .map(|(i, p)| ReportRow {
            row: i + 1,
            line: i + 2,
            cells: vec![format!("{}", p.t_k), format!("{}", p.ln_k)],
            t_k: p.t_k,
            ln_k: p.ln_k,
            sigma_ln_k: p.sigma_ln_k,
            included: p.included,
            exclusion_reason: (!p.included).then(|| "bubble in the cell <b>".to_string()),
        })
        .collect();
    ReportInput {
        title: format!("Report for {name}"),
        series_name: name.to_string(),
        source_name: "test.csv".into(),
        source_sha256: "00".repeat(32),
        headers: vec!["T/K".into(), "ln K".into()],
        rows,
        conversions: vec!["none".into()],
        fit: f,
        energy_unit: EnergyUnit::KilocaloriePerMole,
        temperature_unit: TemperatureUnit::Celsius,
        quantity: None,
        program_version: "test".into(),
        record: isochore_report::Record::default(),
        settings: vec![],
        intervals: vec![],
        errors_in_t: None,
        calorimetric: vec![],
        calorimetric_fit: None,
    }
}

#[test]
fn all_formats_render_and_escape() {
    let hostile = "<script>alert(1)</script>";
    let inp = input(hostile);
    let html = String::from_utf8(render(&inp, ReportFormat::Html).unwrap()).unwrap();
    assert!(html.contains("&lt;script&gt;alert(1)&lt;/script&gt;"));
    assert!(!html.contains("<script"));
    assert!(html.contains("bubble in the cell &lt;b&gt;"));
    assert!(html.contains("kcal/mol"));
    let md = String::from_utf8(render(&inp, ReportFormat::Markdown).unwrap()).unwrap();
    assert!(!md.contains("<script"));
    let pdf = render(&inp, ReportFormat::Pdf).unwrap();
    assert!(pdf.starts_with(b"%PDF"));
    assert!(!lopdf::Document::load_mem(&pdf)
        .unwrap()
        .get_pages()
        .is_empty());
    for kind in FigureKind::ALL {
        let svg = String::from_utf8(render(&inp, ReportFormat::FigureSvg(kind)).unwrap()).unwrap();
        roxmltree::Document::parse(&svg).unwrap();
        let png = render(&inp, ReportFormat::FigurePng(kind)).unwrap();
        assert!(png.starts_with(b"\x89PNG\r\n\x1a\n"));
        // 300 dpi = 11811 pixels per metre (300 / 0.0254, rounded), unit byte 1 = metre
        // (PNG specification, W3C 2003, section 11.3.5.3 pHYs).
        let phys = png
            .windows(4)
            .position(|w| w == b"pHYs")
            .expect("a pHYs chunk");
        let ppm = u32::from_be_bytes(png[phys + 4..phys + 8].try_into().unwrap());
        assert_eq!(ppm, 11811, "{kind:?}");
        assert_eq!(png[phys + 12], 1);
    }
    let data = String::from_utf8(render(&inp, ReportFormat::DataCsv).unwrap()).unwrap();
    assert_eq!(data.lines().count(), 8);
    let res = String::from_utf8(render(&inp, ReportFormat::ResultsCsv).unwrap()).unwrap();
    // ΔH° of these data by statsmodels 0.15.0 WLS on the six included points:
    // −30002.3666548769 J/mol (crates/isochore-fit/tests/data/independent/
    // make_independent.py → independent.txt).
    let dh_j = -30002.3666548769;
    assert!(
        (inp.fit.delta_h().value - dh_j).abs() < 1e-9 * dh_j.abs(),
        "{}",
        inp.fit.delta_h().value
    );
    let dh: f64 = res
        .lines()
        .nth(1)
        .unwrap()
        .split(',')
        .nth(1)
        .unwrap()
        .parse()
        .unwrap();
    // The table in kcal/mol: 1 kcal = 4184 J exactly, the thermochemical calorie (NIST SP 811,
    // 2008, appendix B.8; ISO 80000-5; section numbers from memory). The division is the unit's definition, not a copy of
    // a formula. The CSV carries full precision, so 1e-9 tells it from the International
    // Table calorie (4186.8 J), which would be 6.7e-4 off.
    let want = dh_j / 4184.0;
    assert!((dh - want).abs() <= 1e-9 * want.abs(), "{dh} vs {want}");
}

#[test]
fn a_full_set_is_written_and_nothing_half_written_is_left() {
    let inp = input("set");
    let dir = tempfile::tempdir().unwrap();
    let written = write_report_set(&inp, dir.path(), "set").unwrap();
    // HTML, PDF, Markdown, two CSV tables, and each figure as SVG and PNG (the Markdown
    // figures are the same SVG files or further ones beside it).
    assert!(
        written.len() >= 5 + 2 * FigureKind::ALL.len(),
        "{written:?}"
    );
    for p in &written {
        let len = std::fs::metadata(p).unwrap().len();
        assert!(len > 0, "{} is empty", p.display());
    }
    // The folder holds exactly the files reported as written: no temporary file (the
    // writer's TEMP_PREFIX…TEMP_SUFFIX, `.isochore-*.part`) or anything else beside them.
    let mut on_disk: Vec<String> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    on_disk.sort();
    let mut reported: Vec<String> = written
        .iter()
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    reported.sort();
    reported.dedup();
    assert_eq!(on_disk, reported, "files in the folder vs files written");
    assert!(
        !on_disk
            .iter()
            .any(|n| n.starts_with(TEMP_PREFIX) && n.ends_with(TEMP_SUFFIX)),
        "temporary file left: {on_disk:?}"
    );
    let html = std::fs::read_to_string(dir.path().join("set.html")).unwrap();
    assert!(html.contains("<svg"), "figures are inline");
    assert!(!html.contains("<script"), "no scripts");
}

#[test]
fn mismatched_rows_are_an_error() {
    let mut inp = input("x");
    inp.rows.pop();
    assert!(matches!(
        render(&inp, ReportFormat::Html),
        Err(ReportError::Input(_))
    ));
}

/// The report says what is true of T_hm (issue 11 item 3): ΔG°(T_hm) is uncorrelated with
/// ΔH° (Krug, Hunter & Grieger 1976); ΔH° and ΔS° are not "least correlated" there, they
/// stay near ±1 at every temperature.
#[test]
fn the_harmonic_mean_sentence_is_the_true_one() {
    let inp = input("T_hm");
    for format in [ReportFormat::Html, ReportFormat::Markdown] {
        let text = String::from_utf8(render(&inp, format).unwrap()).unwrap();
        assert!(!text.contains("least correlated"), "{format:?}");
        assert!(text.contains("uncorrelated with ΔH°"), "{format:?}");
    }
    // And it is true of the fit: the correlation of ΔH° with ΔG°(T_hm) vanishes for the
    // linear model, while that of ΔH° with ΔS° stays near ±1.
    let f = &inp.fit;
    let dh = f.delta_h();
    let dg = f.delta_g(f.t_harmonic_k());
    let cov = f.covariance();
    // Cov(ΔH°, ΔG°(T)) = Cov(ΔH°, ΔH°) − T Cov(ΔH°, ΔS°) for the linear model.
    let c = cov[0][0] - f.t_harmonic_k() * cov[0][1];
    assert!(
        (c / (dh.se * dg.se)).abs() < 1e-9,
        "{}",
        c / (dh.se * dg.se)
    );
    assert!(f.corr_h_s().abs() > 0.9, "{}", f.corr_h_s());
}

/// The report says which σ convention set the model comparison and the information
/// criteria (issue 11 item 8): k = p + 1 and the F-test when the fit scales σ.
#[test]
fn the_report_names_the_comparison_convention() {
    let inp = input("convention");
    let html = String::from_utf8(render(&inp, ReportFormat::Html).unwrap()).unwrap();
    assert_eq!(
        inp.fit.options().convention,
        isochore_fit::SigmaConvention::ScaledByFit
    );
    assert!(
        html.contains("k = p + 1") && html.contains("F-test"),
        "{html}"
    );
    assert!(!html.contains("likelihood-ratio"));
}

#[test]
fn the_lab_record_is_in_every_document() {
    let mut inp = input("record <test>");
    inp.program_version = "9.8.7".into();
    inp.record = isochore_report::Record {
        analysed_at: "2026-12-02 18:50 UTC".into(),
        analyst: Some("A. Chemist & co".into()),
        note: Some("buffer B, second instrument".into()),
    };
    let html = String::from_utf8(render(&inp, ReportFormat::Html).unwrap()).unwrap();
    assert!(
        html.contains("Analysed 2026-12-02 18:50 UTC by A. Chemist &amp; co with vhfit 9.8.7."),
        "{html}"
    );
    assert!(html.contains("Note: buffer B, second instrument"));
    let md = String::from_utf8(render(&inp, ReportFormat::Markdown).unwrap()).unwrap();
    // (Markdown escapes the ampersand its own way.)
    assert!(
        md.contains("Analysed 2026-12-02 18:50 UTC by A. Chemist"),
        "{md}"
    );
    assert!(md.contains("co with vhfit 9.8.7."));
    // Without a name or note, the date and program remain and nothing is left dangling.
    inp.record.analyst = Some("  ".into());
    inp.record.note = None;
    let md = String::from_utf8(render(&inp, ReportFormat::Markdown).unwrap()).unwrap();
    assert!(md.contains("Analysed 2026-12-02 18:50 UTC with vhfit 9.8.7."));
    assert!(!md.contains("Note:"));
}
