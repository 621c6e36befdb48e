//! The report's section on the fit with errors in T (issue 13): present with σ(T), absent
//! without, its numbers the fit's (isochore-fit's York fit, itself checked against York et
//! al. 2004's benchmark in that crate), the comparison the fit's own sentence (the one the
//! command line prints), and a refusal said in words.

use super::render::input;
use isochore_fit::errors_in_t::fit_errors_in_t;
use isochore_fit::{FitOptions, Measurement};
use isochore_report::present::{errors_in_t, plus_minus};
use isochore_report::{render, ReportFormat};

fn markdown(inp: &isochore_report::ReportInput) -> String {
    String::from_utf8(render(inp, ReportFormat::Markdown).unwrap()).unwrap()
}

#[test]
fn the_section_shows_the_fit_with_errors_in_t_beside_the_k_only_fit() {
    let mut inp = input("series");
    // No σ(T): no section.
    assert!(!markdown(&inp).contains("Fit with errors in T"));
    let m: Vec<Measurement> = inp
        .rows
        .iter()
        .map(|r| {
            let mut p = Measurement::new(r.t_k, r.ln_k).with_sigma(r.sigma_ln_k.unwrap());
            p.included = r.included;
            p
        })
        .collect();
    let f = fit_errors_in_t(&m, &vec![0.3; m.len()], &FitOptions::default()).unwrap();
    inp.errors_in_t = Some(Ok(f.clone()));
    let md = markdown(&inp);
    assert!(md.contains("## Fit with errors in T"), "{md}");
    assert!(md.contains("York's fit"), "{md}");
    // The comparison is the fit's own sentence (the command line prints the same).
    let sentence = f.comparison();
    assert!(
        sentence.starts_with("allowing for σ(T) = 0.3 K"),
        "{sentence}"
    );
    let escaped = |s: &str| {
        s.replace('(', "\\(")
            .replace(')', "\\)")
            .replace('+', "\\+")
    };
    // The report capitalises its first letter and escapes Markdown.
    assert!(md.contains(&escaped(&sentence[1..])), "{md}");
    // ΔH° with errors in T beside the K-only fit, in the report's unit (kcal/mol:
    // 4184 J, the thermochemical calorie).
    let rows = errors_in_t::parameter_rows(&f, inp.energy_unit);
    let h = &rows[0];
    let want = f.delta_h();
    assert!((h.with_errors_in_t.value - want.value / 4184.0).abs() < 1e-12);
    assert!((h.k_only.value - inp.fit.delta_h().value / 4184.0).abs() < 1e-12);
    let (with, k_only) = h.plus_minus();
    assert_eq!(
        with,
        plus_minus(want.value / 4184.0, want.se / 4184.0),
        "{with}"
    );
    assert!(md.contains(&with) && md.contains(&k_only), "{md}");
    // Every point has a row, the excluded one marked so.
    assert!(md.contains("| 4 |") && md.contains("excluded"), "{md}");
    // HTML and PDF carry the section too.
    let html = String::from_utf8(render(&inp, ReportFormat::Html).unwrap()).unwrap();
    assert!(html.contains("Fit with errors in T") && html.contains("York"));
    assert!(render(&inp, ReportFormat::Pdf)
        .unwrap()
        .starts_with(b"%PDF"));

    // A refusal is said in words, with no numbers.
    inp.errors_in_t = Some(Err("σ(ln K) is needed".into()));
    let md = markdown(&inp);
    assert!(
        md.contains("could not be made: σ\\(ln K\\) is needed"),
        "{md}"
    );
    assert!(!md.contains("adjusted T"), "{md}");
}
