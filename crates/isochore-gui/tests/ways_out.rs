//! The window's ways out of the refusals of issue 17, the same the command line offers
//! with its flags: a file whose decimal marks break the one-convention rule (the message
//! with its line and column, then the mark stated), temperatures outside 1–10 000 K (the
//! refused row named, then confirmed in the preview and in the series settings), and a
//! weighted series with an empty σ cell (the message with its line and column, then "fit
//! unweighted"). Each ends with the window showing the ΔH° that isochore-fit computes
//! from the same data, converted by hand in the test (T in K, ln of the value).

use crate::workbench::{accept_import, bench, delta_h_label, harness};
use egui::accesskit::Role;
use egui_kittest::kittest::{NodeT, Queryable};
use egui_kittest::Harness;
use isochore_fit::{FitOptions, Measurement, Weighting};
use isochore_gui::Workbench;

type H = Harness<'static, Workbench>;

/// Whether some node's label contains this text.
fn shows_part(h: &H, part: &str) -> bool {
    h.query_all_by_label_contains(part).next().is_some()
}

/// Pastes `text` as Ctrl+V does and lets the windows settle (they are centred, so they
/// move while they grow).
fn paste(h: &mut H, text: &str) {
    h.input_mut()
        .events
        .push(egui::Event::Paste(text.to_string()));
    h.run_steps(6);
}

/// Clicks the node labelled `label` and runs a few frames.
fn click(h: &mut H, label: &str) {
    h.get_by_label(label).click();
    h.run_steps(4);
}

/// Opens the combo box labelled `combo` and picks the entry `choice`.
fn choose(h: &mut H, combo: &str, choice: &str) {
    h.get_by_role_and_label(Role::ComboBox, combo).click();
    h.run_steps(2);
    h.get_by_role_and_label(Role::Button, choice).click();
    h.run_steps(4);
}

/// ΔH° (J/mol) by isochore-fit for (T in K, K) pairs, with equal weights or σ(ln K).
fn library_delta_h(points: &[(f64, f64, Option<f64>)], opts: FitOptions) -> f64 {
    let m: Vec<Measurement> = points
        .iter()
        .map(|&(t, k, s)| {
            let m = Measurement::new(t, k.ln());
            match s {
                Some(s) => m.with_sigma(s),
                None => m,
            }
        })
        .collect();
    isochore_fit::fit(&m, &opts).unwrap().delta_h().value
}

/// The results panel's "No fit: …" message, when there is one.
fn no_fit_message(h: &H) -> Option<String> {
    h.query_all_by_label_contains("No fit:").next().map(|n| {
        n.value()
            .or_else(|| n.accesskit_node().label())
            .unwrap_or_default()
    })
}

/// A ';'-separated table whose first value `1,500` could be 1.5 or one thousand five
/// hundred; no other cell settles which.
const THOUSANDS: &str = "T (°C);K\n15;1,500\n25;2\n35;3\n45;4\n";

#[test]
fn an_ambiguous_decimal_mark_is_named_and_the_stated_mark_reads_the_file() {
    let w = bench();
    let n_before = w.project.series.len();
    let mut h = harness(w);
    paste(&mut h, THOUSANDS);
    let q = h
        .state()
        .files
        .question
        .as_ref()
        .expect("the window asks for the decimal mark");
    assert!(q.message.contains("line 2, column 2"), "{}", q.message);
    assert!(h.state().files.preview.is_none());
    assert!(shows_part(&h, "line 2, column 2"), "the message is shown");
    assert!(shows_part(&h, "thousands separator"));
    click(&mut h, "Read with decimal comma (1,5)");
    assert!(h.state().files.question.is_none());
    let p = h
        .state()
        .files
        .preview
        .as_ref()
        .expect("the preview follows");
    assert_eq!(p.decimal, isochore_data::DecimalMark::Comma);
    let id = accept_import(&mut h, n_before);
    let s = h.state().project.get(id).unwrap();
    assert!(s.data.decimal_comma, "the data set keeps the stated mark");
    // 1,500 is 1.5 (a decimal comma), not 1500; no σ column: equal weights.
    let dh = library_delta_h(
        &[
            (288.15, 1.5, None),
            (298.15, 2.0, None),
            (308.15, 3.0, None),
            (318.15, 4.0, None),
        ],
        FitOptions {
            weighting: Weighting::Unweighted,
            ..FitOptions::default()
        },
    );
    assert!(
        shows_part(&h, &delta_h_label(dh)),
        "ΔH° of the comma reading"
    );
}

#[test]
fn stating_a_point_in_the_question_names_the_cell_again() {
    // The stated point makes `1,500` a cell that is not a number: the preview opens
    // with that row refused and named, rather than reading one thousand five hundred.
    let mut h = harness(bench());
    paste(&mut h, THOUSANDS);
    click(&mut h, "Read with decimal point (1.5)");
    let p = h.state().files.preview.as_ref().expect("preview");
    assert_eq!(p.decimal, isochore_data::DecimalMark::Point);
    let problems = p.problems();
    assert!(
        problems.iter().any(|m| m.contains("line 2, column 2")),
        "{problems:?}"
    );
}

#[test]
fn the_preview_decimal_choice_follows_the_one_convention_rule() {
    // Points throughout, read as the file shows; stating a comma refuses the first point
    // with its line and column; going back to the point reads it again.
    let text = "T (K);K\n300;1.5\n310;2.25\n320;3\n";
    let mut h = harness(bench());
    paste(&mut h, text);
    assert!(h.state().files.preview.is_some());
    choose(&mut h, "decimal mark", "decimal comma (1,5)");
    let e = h
        .state()
        .files
        .error
        .clone()
        .expect("the stated comma is refused");
    assert!(e.contains("line 2, column 2"), "{e}");
    assert!(shows_part(&h, "line 2, column 2"));
    choose(&mut h, "decimal mark", "decimal point (1.5)");
    assert!(
        h.state().files.error.is_none(),
        "{:?}",
        h.state().files.error
    );
    let p = h.state().files.preview.as_ref().unwrap();
    assert_eq!(p.decimal, isochore_data::DecimalMark::Point);
    assert_eq!(p.accepted_rows(), 3);
}

/// Temperatures above 10 000 K (invented, in kelvin) with σ(K).
const HOT: &str = "T (K),K,u(K)\n12000,2.0,0.02\n13000,1.8,0.02\n14000,1.65,0.02\n15000,1.5,0.02\n";

/// ΔH° by isochore-fit of (T in K, K) with σ(K) = 0.02 and extreme temperatures
/// confirmed: σ(ln K) = σ(K)/K (first-order propagation, common practice), weights 1/σ².
fn confirmed_delta_h(points: &[(f64, f64)]) -> f64 {
    let pts: Vec<(f64, f64, Option<f64>)> = points
        .iter()
        .map(|&(t, k)| (t, k, Some(0.02 / k)))
        .collect();
    library_delta_h(
        &pts,
        FitOptions {
            allow_extreme_temperatures: true,
            ..FitOptions::default()
        },
    )
}

#[test]
fn only_extreme_temperatures_are_named_then_confirmed_and_kept_for_refits() {
    let w = bench();
    let n_before = w.project.series.len();
    let mut h = harness(w);
    paste(&mut h, HOT);
    let said = format!("{:?}", h.state().messages);
    let q = h.state().files.question.as_ref().expect(&said);
    assert_eq!(q.kind, isochore_gui::io::QuestionKind::ExtremeTemperatures);
    assert!(q.message.contains("line 2, column 1"), "{}", q.message);
    assert!(shows_part(&h, "line 2, column 1"), "the message is shown");
    // What confirming means is said beside the button.
    assert!(shows_part(&h, "typing or unit mistake"));
    click(
        &mut h,
        "Confirm temperatures outside 1–10 000 K and read again",
    );
    let p = h
        .state()
        .files
        .preview
        .as_ref()
        .expect("the preview follows");
    assert!(p.allow_extreme_temperatures);
    assert!(p.problems().is_empty(), "{:?}", p.problems());
    let id = accept_import(&mut h, n_before);
    let s = h.state().project.get(id).unwrap();
    assert!(s.data.settings.fit.allow_extreme_temperatures);
    let dh = confirmed_delta_h(&[
        (12000.0, 2.0),
        (13000.0, 1.8),
        (14000.0, 1.65),
        (15000.0, 1.5),
    ]);
    assert!(
        shows_part(&h, &delta_h_label(dh)),
        "ΔH° of the confirmed data"
    );
    // Withdrawn in the settings, the refit refuses the first row with its line and
    // column and offers the confirmation again.
    click(&mut h, "accept below 1 K or above 10 000 K");
    let allowed = |h: &H| {
        h.state()
            .project
            .get(id)
            .unwrap()
            .data
            .settings
            .fit
            .allow_extreme_temperatures
    };
    assert!(!allowed(&h));
    let msg = no_fit_message(&h).expect("the refit is refused");
    assert!(msg.contains("line 2, column 1"), "{msg}");
    click(&mut h, "Confirm temperatures outside 1–10 000 K");
    assert!(allowed(&h));
    assert!(no_fit_message(&h).is_none());
    assert!(shows_part(&h, &delta_h_label(dh)), "the same ΔH° again");
}

#[test]
fn an_extreme_row_is_named_in_the_preview_and_confirmed_there() {
    let text = "T (K),K,u(K)\n8500,2.0,0.02\n9000,1.8,0.02\n9500,1.65,0.02\n10500,1.5,0.02\n";
    let w = bench();
    let n_before = w.project.series.len();
    let mut h = harness(w);
    paste(&mut h, text);
    let p = h.state().files.preview.as_ref().expect("preview");
    let problems = p.problems();
    assert_eq!(problems.len(), 1, "{problems:?}");
    assert!(problems[0].contains("line 5, column 1"), "{problems:?}");
    assert!(shows_part(&h, "line 5, column 1"));
    assert!(shows_part(&h, "plausible range"));
    // What the checkbox means is said beside it.
    assert!(shows_part(&h, "typing or unit mistake"));
    click(&mut h, "accept temperatures below 1 K or above 10 000 K");
    let p = h.state().files.preview.as_ref().unwrap();
    assert!(p.allow_extreme_temperatures);
    assert!(p.problems().is_empty(), "{:?}", p.problems());
    assert_eq!(p.accepted_rows(), 4);
    let id = accept_import(&mut h, n_before);
    assert!(
        h.state()
            .project
            .get(id)
            .unwrap()
            .data
            .settings
            .fit
            .allow_extreme_temperatures
    );
    let dh = confirmed_delta_h(&[(8500.0, 2.0), (9000.0, 1.8), (9500.0, 1.65), (10500.0, 1.5)]);
    assert!(shows_part(&h, &delta_h_label(dh)), "ΔH° of all four rows");
}

/// σ given on three rows and empty on line 3.
const GAPS: &str = "T (°C),K,u(K)\n15,2.0,0.02\n25,1.6,\n35,1.3,0.02\n45,1.1,0.02\n";

/// ΔH° by isochore-fit of [`GAPS`] with equal weights (σ ignored).
fn gaps_unweighted_delta_h() -> f64 {
    library_delta_h(
        &[
            (288.15, 2.0, None),
            (298.15, 1.6, None),
            (308.15, 1.3, None),
            (318.15, 1.1, None),
        ],
        FitOptions {
            weighting: Weighting::Unweighted,
            ..FitOptions::default()
        },
    )
}

#[test]
fn an_empty_sigma_cell_is_not_fitted_silently_and_fit_unweighted_is_offered() {
    let w = bench();
    let n_before = w.project.series.len();
    let mut h = harness(w);
    paste(&mut h, GAPS);
    // The preview says so before anything is added.
    assert!(shows_part(&h, "line 3, column 3 ('u(K)')"));
    let id = accept_import(&mut h, n_before);
    let s = h.state().project.get(id).unwrap();
    assert_eq!(s.options().weighting, Weighting::InverseVariance);
    // The weighted fit is refused with the library's message, line and column.
    let msg = no_fit_message(&h).expect("no silent fit");
    assert!(msg.contains("line 3, column 3 ('u(K)')"), "{msg}");
    assert!(msg.contains("fit unweighted"), "{msg}");
    assert!(
        !msg.contains("--"),
        "no command-line flag in the window: {msg}"
    );
    click(&mut h, "Fit unweighted");
    let s = h.state().project.get(id).unwrap();
    assert_eq!(s.options().weighting, Weighting::Unweighted);
    assert!(no_fit_message(&h).is_none());
    let dh = gaps_unweighted_delta_h();
    assert!(
        shows_part(&h, &delta_h_label(dh)),
        "ΔH° of the unweighted fit"
    );
}

#[test]
fn fit_unweighted_can_be_chosen_in_the_preview() {
    let w = bench();
    let n_before = w.project.series.len();
    let mut h = harness(w);
    paste(&mut h, GAPS);
    click(
        &mut h,
        "fit unweighted (every point counts the same; every σ is ignored)",
    );
    assert!(h.state().files.preview.as_ref().unwrap().unweighted);
    assert!(!shows_part(&h, "line 3, column 3 ('u(K)')"));
    let id = accept_import(&mut h, n_before);
    let s = h.state().project.get(id).unwrap();
    assert_eq!(s.options().weighting, Weighting::Unweighted);
    let dh = gaps_unweighted_delta_h();
    assert!(shows_part(&h, &delta_h_label(dh)));
}

/// A pasted table with columns the importer does not know (issue 11 item 6): the preview
/// shows them with the rows and names them in one note; the fit leaves them out.
#[test]
fn unknown_columns_are_shown_in_the_preview_and_left_out_of_the_fit() {
    let w = bench();
    let n_before = w.project.series.len();
    let mut h = harness(w);
    paste(
        &mut h,
        "operator\tT/K\tK\tdate\nAB\t283.15\t2.0\t2026-11-02\nAB\t293.15\t2.6\t2026-11-02\n\
         CD\t303.15\t3.3\t2026-11-03\nCD\t313.15\t4.1\t2026-11-03\n",
    );
    assert!(
        shows_part(&h, "columns kept but not used: operator, date"),
        "the note in the preview"
    );
    assert!(
        shows_part(&h, "2026-11-03"),
        "the free cells in the preview rows"
    );
    accept_import(&mut h, n_before);
    // ΔH° of the four (T, K) pairs alone, by isochore-fit, unweighted (no σ column).
    let dh = library_delta_h(
        &[
            (283.15, 2.0, None),
            (293.15, 2.6, None),
            (303.15, 3.3, None),
            (313.15, 4.1, None),
        ],
        FitOptions {
            weighting: Weighting::Unweighted,
            ..FitOptions::default()
        },
    );
    assert!(shows_part(&h, &delta_h_label(dh)), "ΔH° of the four pairs");
}
