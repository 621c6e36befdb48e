//! Interaction tests of the workbench features that `workbench.rs` leaves out: settings,
//! series, table edits, the results and prediction panels, the two-point calculator, the
//! import preview's column mapping, Ctrl+S, the close question, the recovery offer, a fit
//! on the background thread, the ΔCp° model's temperature for a target K, and project
//! files from a newer version. Every expected number is computed in the test by
//! isochore-fit (the library the window must agree with) from the same measurements, and
//! compared with the text the window shows, formatted as the panels format it.
//!
//! The window is driven through egui_kittest (labels, clicks, keys) wherever a widget can
//! be reached; where a test uses the `Workbench` command API instead, a comment says so.

use crate::workbench::{accept_import, bench, delta_h_label, harness, temp_dir};
use egui::accesskit::Role;
use egui::{Key, Modifiers};
use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use isochore_fit::{
    Estimate, FitOptions, Measurement, Model, SigmaConvention, VantHoffFit, Weighting,
};
use isochore_gui::command::Command;
use isochore_gui::panels::style::{fixed, sig};
use isochore_gui::{Prefs, Workbench};
use std::path::Path;

type H = Harness<'static, Workbench>;

/// Joules in one thermochemical kilocalorie (exactly 4184 J; NIST SP 811, appendix B.8).
const J_PER_KCAL: f64 = 4184.0;

/// The id of the active series.
fn active_id(h: &H) -> u64 {
    h.state().active.expect("an active series")
}

/// The measurements of series `id` as the document converts them (isochore-data).
fn measurements(w: &Workbench, id: u64) -> Vec<Measurement> {
    w.project.get(id).unwrap().points().unwrap().measurements
}

/// isochore-fit on series `id`'s measurements with its options changed by `change`.
fn library(w: &Workbench, id: u64, change: impl FnOnce(&mut FitOptions)) -> VantHoffFit {
    let mut opts = *w.project.get(id).unwrap().options();
    change(&mut opts);
    isochore_fit::fit(&measurements(w, id), &opts).unwrap()
}

/// Whether some node carries exactly this label.
fn shows(h: &H, label: &str) -> bool {
    h.query_all_by_label(label).next().is_some()
}

/// Whether some node's label contains this text.
fn shows_part(h: &H, part: &str) -> bool {
    h.query_all_by_label_contains(part).next().is_some()
}

/// The accessible label of a results row: "ΔH° = -48.21 kJ/mol" (4 significant digits).
fn row_label(name: &str, e: Estimate, factor: f64, unit: &str) -> String {
    format!("{name} = {} {unit}", sig(e.value * factor, 4))
}

/// A results row's confidence interval as the panel writes it.
fn ci_label(e: Estimate, factor: f64) -> String {
    let e = e.scaled(factor);
    format!("{} … {}", sig(e.ci_low, 4), sig(e.ci_high, 4))
}

/// The text fields holding exactly `text`, in the order they are drawn (a text field's
/// text runs carry the same value, so the role is part of the query).
fn fields_holding<'h>(h: &'h H, text: &'h str) -> Vec<egui_kittest::Node<'h>> {
    h.query_all_by(move |n| n.role() == Role::TextInput && n.value().as_deref() == Some(text))
        .collect()
}

/// Replaces the text of the field holding `old` (the `nth` such field) with `new`, as
/// typed: click, select all, type. For fields with no label of their own.
fn retype_field(h: &mut H, old: &str, nth: usize, new: &str) {
    fields_holding(h, old)[nth].click();
    h.run_steps(1);
    h.key_press_modifiers(Modifiers::COMMAND, Key::A);
    h.run_steps(1);
    h.input_mut()
        .events
        .push(egui::Event::Text(new.to_string()));
    h.run_steps(3);
}

/// Replaces the text of the field labelled `label` with `text` and presses Enter
/// (click, select all, type, Enter: what a chemist does).
fn retype(h: &mut H, label: &str, text: &str) {
    h.get_by_label(label).click();
    h.run_steps(1);
    h.key_press_modifiers(Modifiers::COMMAND, Key::A);
    h.run_steps(1);
    h.get_by_label(label).type_text(text);
    h.run_steps(1);
    h.key_press(Key::Enter);
    h.run_steps(3);
}

/// Opens the combo box labelled `combo` and picks the entry `choice`.
fn choose(h: &mut H, combo: &str, choice: &str) {
    h.get_by_role_and_label(Role::ComboBox, combo).click();
    h.run_steps(2);
    h.get_by_role_and_label(Role::Button, choice).click();
    h.run_steps(3);
}

/// Ctrl+Z, then a few frames for the refit.
fn undo(h: &mut H) {
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(3);
}

/// The flags isochore-fit gives each point: (outlier, high leverage, influential).
fn flags(f: &VantHoffFit) -> Vec<(bool, bool, bool)> {
    f.points()
        .iter()
        .map(|p| (p.flags.outlier, p.flags.high_leverage, p.flags.influential))
        .collect()
}

/// The flags of the window's current analysis of series `id`.
fn window_flags(h: &H, id: u64) -> Vec<(bool, bool, bool)> {
    let a = h.state().fitter.get(id).unwrap();
    flags(a.fit.as_deref().unwrap())
}

#[test]
fn each_setting_refits_and_undo_restores_the_results() {
    let w = bench();
    let id = w.active.unwrap();
    let f0 = library(&w, id, |_| {});
    let mut h = harness(w);
    let dg0 = row_label(
        "ΔG° at θ = 25.00 °C",
        f0.at_reference().delta_g,
        1e-3,
        "kJ/mol",
    );
    assert!(shows(&h, &dg0), "no {dg0}");
    assert!(shows(&h, &delta_h_label(f0.delta_h().value)));

    // θ: ΔG°(θ) moves to the new reference temperature.
    retype(&mut h, "θ", "37");
    let f = library(h.state(), id, |o| o.t_ref_k = 310.15);
    let dg = row_label(
        "ΔG° at θ = 37.00 °C",
        f.at_reference().delta_g,
        1e-3,
        "kJ/mol",
    );
    assert_ne!(dg, dg0);
    assert!(shows(&h, &dg), "no {dg}");
    assert!((h.state().project.get(id).unwrap().options().t_ref_k - 310.15).abs() < 1e-9);
    undo(&mut h);
    assert!(shows(&h, &dg0) && !shows(&h, &dg));

    // Confidence level: the header and every interval follow.
    let ci0 = ci_label(f0.delta_h(), 1e-3);
    assert!(shows(&h, "95 % CI") && shows(&h, &ci0));
    retype(&mut h, "confidence level", "90");
    let f = library(h.state(), id, |o| o.level = 0.90);
    let ci = ci_label(f.delta_h(), 1e-3);
    assert_ne!(ci, ci0);
    assert!(shows(&h, "90 % CI") && shows(&h, &ci), "no {ci}");
    undo(&mut h);
    assert!(shows(&h, "95 % CI") && shows(&h, &ci0) && !shows(&h, &ci));

    // Weighting: unweighted gives a different ΔH°.
    choose(&mut h, "weighting", "unweighted");
    let f = library(h.state(), id, |o| o.weighting = Weighting::Unweighted);
    let dh = delta_h_label(f.delta_h().value);
    assert_ne!(dh, delta_h_label(f0.delta_h().value));
    assert!(shows(&h, &dh), "no {dh}");
    undo(&mut h);
    assert!(shows(&h, &delta_h_label(f0.delta_h().value)) && !shows(&h, &dh));

    // σ convention: the same ΔH°, another standard error and interval.
    choose(&mut h, "σ convention", "σ are known standard uncertainties");
    let f = library(h.state(), id, |o| o.convention = SigmaConvention::Absolute);
    assert_eq!(f.delta_h().value, f0.delta_h().value);
    let ci = ci_label(f.delta_h(), 1e-3);
    assert_ne!(ci, ci0, "the demo's scatter differs from its stated σ");
    assert!(shows(&h, &ci), "no {ci}");
    assert!(shows(&h, &sig(f.delta_h().se / 1e3, 2)));
    undo(&mut h);
    assert!(shows(&h, &ci0) && !shows(&h, &ci));

    // Energy unit: kcal/mol (ΔS° then in cal/(mol·K)).
    choose(&mut h, "energy unit", "kcal/mol");
    let dh_kcal = row_label("ΔH°", f0.delta_h(), 1.0 / J_PER_KCAL, "kcal/mol");
    let ds_cal = row_label("ΔS°", f0.delta_s(), 1000.0 / J_PER_KCAL, "cal/(mol·K)");
    assert!(shows(&h, &dh_kcal), "no {dh_kcal}");
    assert!(shows(&h, &ds_cal), "no {ds_cal}");
    undo(&mut h);
    assert!(!shows(&h, &dh_kcal) && shows(&h, &delta_h_label(f0.delta_h().value)));

    // Temperature unit: kelvin.
    choose(&mut h, "temperature unit", "K");
    let dg_k = row_label(
        "ΔG° at θ = 298.15 K",
        f0.at_reference().delta_g,
        1e-3,
        "kJ/mol",
    );
    assert!(shows(&h, &dg_k), "no {dg_k}");
    undo(&mut h);
    assert!(shows(&h, &dg0) && !shows(&h, &dg_k));

    // Flag thresholds: each refits the flags to what isochore-fit gives with them.
    let base = flags(&f0);
    assert_eq!(window_flags(&h, id), base);
    let marks0 = h.query_all_by_label_contains("⚑").count();
    type Set = fn(&mut FitOptions);
    let cases: [(&str, &str, Set); 3] = [
        ("ext. stud. residual threshold", "0.5", |o| {
            o.thresholds.outlier_studentized = 0.5
        }),
        ("leverage factor", "1", |o| {
            o.thresholds.leverage_factor = 1.0
        }),
        ("Cook's D factor", "1", |o| o.thresholds.cooks_factor = 1.0),
    ];
    for (field, text, set) in cases {
        retype(&mut h, field, text);
        let f = library(h.state(), id, set);
        assert_ne!(flags(&f), base, "{field}: the lower threshold flags more");
        assert_eq!(window_flags(&h, id), flags(&f), "{field}");
        assert!(
            h.query_all_by_label_contains("⚑").count() > marks0,
            "{field}: more flags shown in the table"
        );
        undo(&mut h);
        assert_eq!(window_flags(&h, id), base, "{field} undone");
        assert_eq!(h.query_all_by_label_contains("⚑").count(), marks0);
    }
    assert_eq!(
        *h.state().project.get(id).unwrap().options(),
        f0.options(),
        "all undone"
    );
}

#[test]
fn switching_the_active_series_and_hiding_series() {
    let w = bench();
    let binding = w.project.series[0].id;
    let acid = w.project.series[1].id;
    let f_acid = library(&w, acid, |_| {});
    let mut h = harness(w);
    let (b_name, a_name) = ("QX-7 binding Halo-2", "quillonic acid pKa");
    // The acid series is hidden at start: its name is only in the series list.
    assert_eq!(h.query_all_by_label(a_name).count(), 1);
    h.get_by_label(&format!("show series {a_name}")).click();
    h.run_steps(3);
    assert!(h.state().project.get(acid).unwrap().data.shown);
    // Now drawn: its name is also in the plot's key.
    assert_eq!(h.query_all_by_label(a_name).count(), 2);
    undo(&mut h);
    assert!(!h.state().project.get(acid).unwrap().data.shown);
    assert_eq!(h.query_all_by_label(a_name).count(), 1);

    // Make the acid series active: results and table follow it.
    h.get_by_label(a_name).click();
    h.run_steps(3);
    assert_eq!(active_id(&h), acid);
    assert!(shows(&h, &delta_h_label(f_acid.delta_h().value)));
    assert!(shows(&h, &format!("{a_name} — 12 rows, 0 excluded")));
    // The binding series (shown, no longer active) stays in the key until it is hidden.
    let in_key = |h: &H| h.query_all_by_label(b_name).count();
    assert_eq!(in_key(&h), 2);
    h.get_by_label(&format!("show series {b_name}")).click();
    h.run_steps(3);
    assert!(!h.state().project.get(binding).unwrap().data.shown);
    assert_eq!(in_key(&h), 1);
}

#[test]
fn editing_a_table_cell_refits_and_a_bad_value_is_refused() {
    let w = bench();
    let id = w.active.unwrap();
    let opts = *w.project.get(id).unwrap().options();
    let mut m = measurements(&w, id);
    let dh0 = isochore_fit::fit(&m, &opts).unwrap().delta_h().value;
    // Row 4 was measured at 20.0 °C; typed as 21.0 °C its point moves by exactly 1 K and
    // keeps its K and σ.
    m[3].t_k += 1.0;
    let dh1 = isochore_fit::fit(&m, &opts).unwrap().delta_h().value;
    assert_ne!(delta_h_label(dh0), delta_h_label(dh1));
    let mut h = harness(w);
    h.get_by_label("20.0").click();
    h.run_steps(2);
    retype(&mut h, "edit row 4", "21.0");
    assert_eq!(h.state().project.get(id).unwrap().cell(3, 0), "21.0");
    assert!(shows(&h, &delta_h_label(dh1)), "ΔH° after the edit");

    // Not a number: said in the table, the cell and the fit stay.
    h.get_by_label("110.73").click();
    h.run_steps(2);
    retype(&mut h, "edit row 4", "abc");
    assert!(shows_part(&h, "the cell was kept"));
    assert_eq!(h.state().project.get(id).unwrap().cell(3, 1), "110.73");
    assert!(shows(&h, &delta_h_label(dh1)));

    undo(&mut h);
    assert_eq!(h.state().project.get(id).unwrap().cell(3, 0), "20.0");
    assert!(shows(&h, &delta_h_label(dh0)));
}

#[test]
fn results_and_prediction_panels_show_the_library_numbers() {
    let w = bench();
    let id = w.active.unwrap();
    let f = library(&w, id, |_| {});
    let mut h = harness(w);
    let th = f.t_harmonic_k() - 273.15;
    let rows = [
        ("ΔH°".to_string(), f.delta_h(), 1e-3, "kJ/mol"),
        ("ΔS°".to_string(), f.delta_s(), 1.0, "J/(mol·K)"),
        (
            "ΔG° at θ = 25.00 °C".to_string(),
            f.at_reference().delta_g,
            1e-3,
            "kJ/mol",
        ),
        (
            format!("ΔG° at T_hm = {} °C", fixed(th, 1)),
            f.at_harmonic().delta_g,
            1e-3,
            "kJ/mol",
        ),
    ];
    // The constant in the file's quantity: the demo is a K_d file in nM, K_d = c°/K with
    // c° = 1 M = 10⁹ nM (by hand), at θ = 25 °C.
    let ln_k = f.predict(298.15).unwrap().ln_k.value;
    let kd = isochore_report::present::times_ten_with(
        1e9 * (-ln_k).exp(),
        4,
        isochore_report::present::Exponent::Caret,
    );
    let kd_row = format!("K_d at θ = 25.00 °C = {kd} nM");
    assert!(shows(&h, &kd_row), "no {kd_row}");
    for (name, e, factor, unit) in rows {
        let v = row_label(&name, e, factor, unit);
        assert!(shows(&h, &v), "no {v}");
        assert!(shows(&h, &sig(e.se * factor, 2)), "{name}: SE");
        assert!(shows(&h, &ci_label(e, factor)), "{name}: CI");
    }
    assert!(shows(
        &h,
        &format!("corr(ΔH°, ΔS°) = {}", fixed(f.corr_h_s(), 4))
    ));
    // Beside it, the ΔH°–ΔG°(T_hm) region (issue 11 item 3): for the linear model
    // Cov(ΔH°, ΔG°(T)) = Var ΔH° − T·Cov(ΔH°, ΔS°), zero at T_hm (Krug, Hunter & Grieger
    // 1976), here from the library's covariance by hand.
    let c = f.covariance();
    let cov_hg = c[0][0] - f.t_harmonic_k() * c[0][1];
    let r_hg = cov_hg / (c[0][0].sqrt() * f.at_harmonic().delta_g.se);
    assert!(r_hg.abs() < 1e-9, "{r_hg}");
    assert!(shows(
        &h,
        &format!("corr(ΔH°, ΔG° at T_hm) = {}", fixed(r_hg.abs(), 4))
    ));
    // The fit statistics, folded at start.
    h.get_by_label("Fit statistics").click();
    h.run_steps(3);
    assert!(shows(&h, &format!("{} / {}", f.n_used(), f.n_total())));
    assert!(shows(&h, &sig(f.stats().chi2, 4)));
    assert!(shows(&h, &sig(f.stats().reduced_chi2, 4)));
    let r2 = format!(
        "{} ({})",
        fixed(f.stats().r2, 5),
        fixed(f.stats().adj_r2, 5)
    );
    assert!(shows(&h, &r2), "no {r2}");

    // Prediction at the panel's starting temperature, 37 °C, then at 15 °C (typed).
    let check = |h: &H, t_c: f64| {
        let p = f.predict(t_c + 273.15).unwrap();
        // K is written ×10ⁿ, the power after a caret in the window
        // (isochore_report::present::times_ten_with, checked against hand-worked values in
        // its own tests).
        use isochore_report::present::{times_ten_with, Exponent::Caret};
        let s3 = |x: f64| times_ten_with(x, 3, Caret);
        let k = format!(
            "{} ({} … {})",
            times_ten_with(p.k.value, 4, Caret),
            s3(p.k.ci.low),
            s3(p.k.ci.high)
        );
        assert!(shows(h, &k), "{t_c} °C: no {k}");
        assert!(shows(
            h,
            &format!("{} … {}", s3(p.k.pi.low), s3(p.k.pi.high))
        ));
        let f3 = |x: f64| fixed(x, 3);
        let ln_k = format!(
            "{} ({} … {})",
            f3(p.ln_k.value),
            f3(p.ln_k.ci.low),
            f3(p.ln_k.ci.high)
        );
        assert!(shows(h, &ln_k), "{t_c} °C: no {ln_k}");
        // The demo's series is a K_d file in nM: the prediction in K_d too, K_d = c°/K with
        // c° = 1 M = 10⁹ nM (by hand), the interval's ends swapped.
        let kd = |ln_k: f64| 1e9 * (-ln_k).exp();
        let t4 = |x: f64| times_ten_with(x, 4, Caret);
        let kd_row = format!(
            "{} nM ({} … {})",
            t4(kd(p.ln_k.value)),
            t4(kd(p.ln_k.ci.high)),
            t4(kd(p.ln_k.ci.low))
        );
        assert!(shows(h, &kd_row), "{t_c} °C: no {kd_row}");
        let g = p.delta_g.scaled(1e-3);
        let g = format!(
            "{} kJ/mol ({} … {})",
            sig(g.value, 4),
            sig(g.ci_low, 4),
            sig(g.ci_high, 4)
        );
        assert!(shows(h, &g), "{t_c} °C: no {g}");
    };
    check(&h, 37.0);
    // The temperature field has no label of its own: found by the text it holds.
    assert_eq!(fields_holding(&h, "37").len(), 1);
    retype_field(&mut h, "37", 0, "15");
    assert_eq!(h.state().predict.t_text, "15");
    check(&h, 15.0);
}

#[test]
fn the_two_point_calculator_agrees_with_the_library_and_by_hand() {
    use isochore_fit::two_point::{enthalpy_from_pairs, StatePoint};
    let mut h = harness(bench());
    h.get_by_label("Two-point calculation").click();
    h.run_steps(3);
    let expect = |k2: f64| {
        // The panel's starting pairs: 25 °C with K = 1.0e6, 37 °C with K₂; σ(ln K) = 0.05.
        let a = StatePoint {
            sigma_ln_k: 0.05,
            ..StatePoint::exact(298.15, 1.0e6)
        };
        let b = StatePoint {
            sigma_ln_k: 0.05,
            ..StatePoint::exact(310.15, k2)
        };
        let r = enthalpy_from_pairs(a, b, 0.95).unwrap();
        // By hand (the two-point van 't Hoff equation, first-order propagation):
        // ΔH° = R ln(K₂/K₁)/(1/T₁ − 1/T₂), SE = R √(σ₁² + σ₂²)/|1/T₁ − 1/T₂|.
        let rr = 8.314_462_618; // J/(mol·K), CODATA 2018 (exact in the 2019 SI)
        let d = 1.0 / 298.15 - 1.0 / 310.15;
        let dh = rr * (k2 / 1.0e6_f64).ln() / d;
        let se = rr * (0.05_f64.powi(2) * 2.0).sqrt() / d.abs();
        assert!((r.delta_h.value - dh).abs() < 1e-9 * dh.abs());
        assert!((r.delta_h.se - se).abs() < 1e-9 * se);
        let (hh, ss) = (r.delta_h.scaled(1e-3), r.delta_s);
        format!(
            "ΔH° = {} ± {} kJ/mol   ΔS° = {} ± {} J/(mol·K)",
            sig(hh.value, 4),
            sig(hh.se, 2),
            sig(ss.value, 4),
            sig(ss.se, 2)
        )
    };
    let first = expect(4.0e5);
    assert!(shows(&h, &first), "no {first}");
    // K₂ retyped (the fields have no label of their own: found by the text they hold).
    retype_field(&mut h, "4.0e5", 0, "2.0e5");
    let second = expect(2.0e5);
    assert_ne!(first, second);
    assert!(shows(&h, &second), "no {second}");
    // Two equal temperatures: the library's refusal is shown instead of numbers.
    // Two fields hold "37" now: the prediction's T (first) and pair 2's T (last).
    assert_eq!(fields_holding(&h, "37").len(), 2);
    retype_field(&mut h, "37", 1, "25");
    assert_eq!(h.state().predict.two_point[3], "25");
    let refusal = enthalpy_from_pairs(
        StatePoint::exact(298.15, 1.0e6),
        StatePoint::exact(298.15, 2.0e5),
        0.95,
    )
    .unwrap_err()
    .to_string();
    assert!(shows(&h, &refusal), "no {refusal}");
    assert!(!shows(&h, &second));
}

/// An invented table with two runs of K, the second in a column the import takes for a
/// note (its header is not a quantity's): the chemist maps it as the value.
const TWO_RUNS: &str = "T/K\tK\tnote\n\
    283.15\t5210\t880\n290.15\t4180\t1010\n297.15\t3420\t1150\n\
    304.15\t2790\t1320\n311.15\t2335\t1490\n318.15\t1930\t1700\n";

/// ΔH° by isochore-fit from column `col` (1 or 2) of [`TWO_RUNS`], equal weights.
fn run_delta_h(col: usize) -> f64 {
    let m: Vec<Measurement> = TWO_RUNS
        .lines()
        .skip(1)
        .map(|l| {
            let c: Vec<f64> = l.split('\t').map(|x| x.parse().unwrap()).collect();
            Measurement::new(c[0], c[col].ln())
        })
        .collect();
    let opts = FitOptions {
        weighting: Weighting::Unweighted,
        ..FitOptions::default()
    };
    isochore_fit::fit(&m, &opts).unwrap().delta_h().value
}

#[test]
fn changing_the_value_column_in_the_import_preview() {
    let w = bench();
    let n_before = w.project.series.len();
    let mut h = harness(w);
    h.input_mut()
        .events
        .push(egui::Event::Paste(TWO_RUNS.to_string()));
    h.run_steps(3);
    let said = format!("{:?}", h.state().messages);
    let p = h.state().files.preview.as_ref().expect(&said);
    assert_eq!(p.mapping.quantity.column, 1, "K is recognised as the value");
    assert!(shows_part(&h, "6 rows read"));
    // Let the preview window settle (it is centred, so it moves while it grows).
    h.run_steps(4);
    choose(&mut h, "value column", "3 · note");
    assert!(
        h.state().files.error.is_none(),
        "{:?}",
        h.state().files.error
    );
    let p = h.state().files.preview.as_ref().expect("preview kept");
    assert_eq!(p.mapping.quantity.column, 2);
    let id = accept_import(&mut h, n_before);
    let s = h.state().project.get(id).unwrap();
    assert_eq!(s.data.mapping.quantity.column, 2);
    let dh = run_delta_h(2);
    // The second run rises with T (endothermic), the first falls: a sign check on the
    // invented numbers.
    assert!(dh > 0.0 && run_delta_h(1) < 0.0);
    assert!(shows(&h, &delta_h_label(dh)), "ΔH° of the third column");
}

/// The names of the files in `dir`, sorted.
fn names_in(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

#[test]
fn ctrl_s_saves_atomically_and_the_file_reloads_to_the_same_analysis() {
    let dir = temp_dir("ctrl-s");
    let path = dir.join("demo.isochore.json");
    let mut h = harness(bench());
    // A project never saved: Ctrl+S asks for a name.
    h.key_press_modifiers(Modifiers::COMMAND, Key::S);
    h.run_steps(2);
    crate::workbench::type_path_and_press(&mut h, &path, "Save");
    assert!(path.exists() && !h.state().history.dirty());
    let first = std::fs::read(&path).unwrap();
    // An edit, then plain Ctrl+S: written to the same file, no dialog.
    h.get_by_label("use row 3").click();
    h.run_steps(3);
    assert!(h.state().history.dirty());
    h.key_press_modifiers(Modifiers::COMMAND, Key::S);
    h.run_steps(3);
    assert!(
        h.state().files.dialog.is_none(),
        "no dialog for a named project"
    );
    assert!(!h.state().history.dirty());
    assert!(h.state().messages.is_empty(), "{:?}", h.state().messages);
    // Atomic: the new file, the previous one as .bak, no temporary left behind.
    assert_eq!(
        names_in(&dir),
        ["demo.isochore.json", "demo.isochore.json.bak"]
    );
    assert_eq!(
        std::fs::read(dir.join("demo.isochore.json.bak")).unwrap(),
        first
    );
    let saved = isochore_data::Project::load(&path).unwrap();
    assert_eq!(saved.series, h.state().project.to_data().series);
    assert_eq!(saved.series[0].exclusions.len(), 1);
    assert_eq!(saved.series[0].exclusions[0].row, 3);
    // Reopened in a new window: the same ΔH° as the window that saved it, and as the
    // library from the file's own points.
    let id = active_id(&h);
    let dh = library(h.state(), id, |_| {}).delta_h().value;
    let from_file = saved.series[0].points().unwrap();
    let m: Vec<Measurement> = from_file.iter().map(|p| p.measurement).collect();
    let dh_file = isochore_fit::fit(&m, &saved.series[0].settings.fit)
        .unwrap()
        .delta_h()
        .value;
    assert_eq!(dh, dh_file);
    let mut again = Workbench::new(Prefs::default());
    again.block_fits = true;
    again.open_path(&path);
    again.apply_pending();
    let h2 = harness(again);
    assert!(shows(&h2, &delta_h_label(dh)));
    let _ = std::fs::remove_dir_all(&dir);
}

/// Sends what the window manager's close button becomes in egui's input.
fn press_close_button(h: &mut H) {
    h.input_mut()
        .viewports
        .entry(egui::ViewportId::ROOT)
        .or_default()
        .events
        .push(egui::ViewportEvent::Close);
    h.step();
}

/// The viewport commands the last frame sent (Close, CancelClose, …).
fn sent(h: &H) -> Vec<egui::ViewportCommand> {
    h.output()
        .viewport_output
        .get(&egui::ViewportId::ROOT)
        .map(|v| v.commands.clone())
        .unwrap_or_default()
}

#[test]
fn closing_with_unsaved_changes_asks_first() {
    // Nothing unsaved: the window may close, no question.
    let mut h = harness(bench());
    press_close_button(&mut h);
    h.run_steps(1);
    assert!(h.state().may_close);
    assert!(!shows(&h, "Unsaved changes"));

    // Unsaved changes: the close is cancelled and the question asked.
    let mut h = harness(bench());
    h.get_by_label("use row 2").click();
    h.run_steps(3);
    press_close_button(&mut h);
    assert!(sent(&h).contains(&egui::ViewportCommand::CancelClose));
    h.run_steps(2);
    assert!(shows(&h, "Unsaved changes"));
    assert!(!h.state().may_close);
    // "Keep working": the question goes, the work stays.
    h.get_by_label("Keep working").click();
    h.run_steps(2);
    assert!(!shows(&h, "Unsaved changes"));
    assert!(h.state().history.dirty() && !h.state().may_close);
    // Asked again; "Close without saving" closes.
    press_close_button(&mut h);
    h.run_steps(2);
    h.get_by_label("Close without saving").click();
    h.step();
    assert!(sent(&h).contains(&egui::ViewportCommand::Close));
    assert!(h.state().may_close);

    // "Save and close" on a saved project: written, then closed.
    let dir = temp_dir("close");
    let path = dir.join("c.isochore.json");
    let mut w = bench();
    w.save_to(&path);
    let mut h = harness(w);
    let before = std::fs::read(&path).unwrap();
    h.get_by_label("use row 2").click();
    h.run_steps(3);
    press_close_button(&mut h);
    h.run_steps(2);
    h.get_by_label("Save and close").click();
    h.step();
    assert!(sent(&h).contains(&egui::ViewportCommand::Close));
    assert!(!h.state().history.dirty());
    let after = isochore_data::Project::load(&path).unwrap();
    assert_ne!(std::fs::read(&path).unwrap(), before);
    assert_eq!(after.series[0].exclusions[0].row, 2);
    let _ = std::fs::remove_dir_all(&dir);
}

/// Saves the demo to `path`, excludes row 3 of the binding series and lets the autosave
/// write (through the `Workbench` API: the autosave runs on the app clock, not on a
/// gesture).
fn leave_an_autosave(path: &Path) -> f64 {
    let mut w = bench();
    w.save_to(path);
    let id = w.active.unwrap();
    w.push(Command::SetExclusion {
        series: id,
        row: 2,
        exclusion: Some(("cloudy sample".into(), "2026-12-01T21:00:00Z".into())),
    });
    w.apply_pending();
    let dh = library(&w, id, |_| {}).delta_h().value;
    w.set_clock(w.prefs.autosave_secs + 1.0);
    assert!(w.autosave_tick());
    dh
}

fn reopen(path: &Path) -> H {
    let mut w = Workbench::new(Prefs::default());
    w.block_fits = true;
    w.open_path(path);
    w.apply_pending();
    harness(w)
}

#[test]
fn the_recovery_offer_is_shown_and_restores_or_discards_the_work() {
    let dir = temp_dir("recover");
    let path = dir.join("r.isochore.json");
    let auto = dir.join("r.isochore.json.autosave");
    let offer = "Unsaved work from an earlier session was found";

    // Restore: the exclusion comes back, the project is unsaved, the autosave is used up.
    let dh_excl = leave_an_autosave(&path);
    assert!(auto.exists());
    let mut h = reopen(&path);
    let dh_file = library(h.state(), active_id(&h), |_| {}).delta_h().value;
    assert_ne!(delta_h_label(dh_file), delta_h_label(dh_excl));
    assert!(shows_part(&h, offer));
    assert!(shows(&h, &delta_h_label(dh_file)));
    h.get_by_label("Restore it").click();
    h.run_steps(3);
    assert!(!shows_part(&h, offer));
    let s = h.state().project.get(active_id(&h)).unwrap();
    assert_eq!(s.exclusion(2).unwrap().reason, "cloudy sample");
    assert!(h.state().history.dirty());
    assert!(!auto.exists());
    assert!(shows(&h, &delta_h_label(dh_excl)));

    // Discard: the file's version stays and the autosave is deleted.
    leave_an_autosave(&path);
    let mut h = reopen(&path);
    assert!(shows_part(&h, offer));
    h.get_by_label("Discard it").click();
    h.run_steps(3);
    assert!(!shows_part(&h, offer));
    assert!(h.state().recoveries.is_empty());
    assert!(!auto.exists());
    assert!(!h.state().history.dirty());
    assert!(h.state().project.series[0].exclusion(2).is_none());
    assert!(shows(&h, &delta_h_label(dh_file)));
    let _ = std::fs::remove_dir_all(&dir);
}

/// A large invented series (over the background-fit size): T from 280 to 320 K, ln K on
/// a van 't Hoff line with a small deterministic wobble.
fn large_table(rows: usize) -> String {
    let mut s = String::from("T/K,K\n");
    for i in 0..rows {
        let t = 280.0 + 40.0 * i as f64 / (rows - 1) as f64;
        let ln_k = 2.0 + 3000.0 / t + 0.02 * (i as f64 * 0.7).sin();
        s.push_str(&format!("{t:.6},{:.9e}\n", ln_k.exp()));
    }
    s
}

/// Steps frames until the fit of series `id` is current and nothing runs (at most
/// `max_steps` frames, pausing 10 ms between them). Returns whether it got there.
fn wait_for_fit(h: &mut H, id: u64, max_steps: usize) -> bool {
    for _ in 0..max_steps {
        {
            let w = h.state();
            let rev = w.project.get(id).unwrap().rev;
            let current = w.fitter.get(id).is_some_and(|a| a.rev == rev);
            if current && w.fitter.running(&w.project.series).is_empty() {
                return true;
            }
        }
        std::thread::sleep(std::time::Duration::from_millis(10));
        h.step();
    }
    false
}

#[test]
fn a_large_series_is_fitted_on_the_background_thread() {
    let rows = isochore_gui::fitting::BACKGROUND_ROWS + 1;
    let text = large_table(rows);
    let mut w = bench();
    // The fit thread really runs: frames do not wait for it.
    w.block_fits = false;
    let n_before = w.project.series.len();
    let mut h = harness(w);
    h.input_mut().events.push(egui::Event::Paste(text));
    h.run_steps(2);
    let id = accept_import(&mut h, n_before);
    assert!(wait_for_fit(&mut h, id, 3000), "the fit never arrived");
    let f = library(h.state(), id, |_| {});
    assert_eq!(f.n_used(), rows);
    h.run_steps(2);
    assert!(shows(&h, &delta_h_label(f.delta_h().value)));

    // Leave a row out (through the command API: the table is virtualised and the row
    // may be off screen). The fit starts on its thread; until it arrives the previous
    // result stays on screen.
    {
        let w = h.state_mut();
        w.push(Command::SetExclusion {
            series: id,
            row: 0,
            exclusion: Some((String::new(), "2026-12-01T21:00:00Z".into())),
        });
        w.apply_pending();
        let running = w.fitter.running(&w.project.series);
        assert_eq!(running.len(), 1, "a fit in flight");
        assert_eq!((running[0].series, running[0].rows), (id, rows));
        let shown = w.fitter.get(id).unwrap();
        assert_ne!(
            shown.rev,
            w.project.get(id).unwrap().rev,
            "older result kept"
        );
    }
    assert!(wait_for_fit(&mut h, id, 3000), "the refit never arrived");
    let f2 = library(h.state(), id, |_| {});
    assert_eq!(f2.n_used(), rows - 1);
    assert_ne!(f2.delta_h().value, f.delta_h().value);
    h.run_steps(2);
    let a = h.state().fitter.get(id).unwrap();
    assert_eq!(
        a.fit.as_deref().unwrap().delta_h().value,
        f2.delta_h().value,
        "the thread's fit is the library's"
    );
    assert!(!shows_part(&h, "refitting"));
}

#[test]
fn the_cp_model_gives_the_temperature_for_a_target_k_or_says_there_is_none() {
    let w = bench();
    let id = w.active.unwrap();
    let f = library(&w, id, |o| o.model = Model::CONSTANT_CP);
    // K = 5e6 lies inside the demo's K (about 3e6 to 1.5e7).
    let t = f.temperature_for_k(5.0e6).unwrap();
    assert!(!f.is_extrapolation(t.value));
    assert!(t.se > 0.0);
    let want = format!(
        "T = {} °C (SE {} K, CI {} … {} °C)",
        fixed(t.value - 273.15, 2),
        sig(t.se, 2),
        fixed(t.ci_low - 273.15, 1),
        fixed(t.ci_high - 273.15, 1)
    );
    // The linear model puts the same K at another temperature: the model matters here.
    let lin = library(&w, id, |_| {}).temperature_for_k(5.0e6).unwrap();
    assert!(!want.contains(&fixed(lin.value - 273.15, 2)));
    // K = 1e-3 is below the lowest K the curved fit reaches in the searched range.
    let none = f.temperature_for_k(1.0e-3).unwrap_err().to_string();
    assert!(none.contains("never reaches"), "{none}");

    let mut h = harness(w);
    choose(
        &mut h,
        "model",
        &isochore_report::present::model_label(isochore_fit::Model::CONSTANT_CP),
    );
    assert_eq!(
        h.state().project.get(id).unwrap().options().model,
        Model::CONSTANT_CP
    );
    h.get_by_label("target K").click();
    h.run_steps(1);
    h.get_by_label("target K").type_text("5e6");
    h.run_steps(3);
    assert!(shows(&h, &want), "no {want}");
    h.get_by_label("target K").click();
    h.run_steps(1);
    h.key_press_modifiers(Modifiers::COMMAND, Key::A);
    h.run_steps(1);
    h.get_by_label("target K").type_text("1e-3");
    h.run_steps(3);
    assert!(shows(&h, &none), "no {none}");
    assert!(!shows_part(&h, "T = "));
}

#[test]
fn a_project_from_a_newer_version_is_refused_and_left_untouched() {
    let dir = temp_dir("newer");
    let path = dir.join("future.isochore.json");
    let mut w = bench();
    w.save_to(&path);
    let text = std::fs::read_to_string(&path).unwrap();
    let found = format!("\"schema_version\": {}", isochore_data::SCHEMA_VERSION);
    assert!(text.contains(&found), "{text}");
    let newer = format!("\"schema_version\": {}", isochore_data::SCHEMA_VERSION + 1);
    std::fs::write(&path, text.replacen(&found, &newer, 1)).unwrap();
    let bytes = std::fs::read(&path).unwrap();
    let files = names_in(&dir);

    let w = bench();
    let before = w.project.clone();
    let mut h = harness(w);
    h.key_press_modifiers(Modifiers::COMMAND, Key::O);
    h.run_steps(2);
    crate::workbench::type_path_and_press(&mut h, &path, "Open");
    let said = h.state().messages.join("\n");
    assert!(said.contains("future.isochore.json"), "{said}");
    assert!(said.contains("newer"), "{said}");
    assert!(shows_part(&h, "is newer than this version"));
    assert_eq!(h.state().project, before);
    assert!(!h.state().history.dirty());
    // Dropped on the window: refused the same way.
    h.input_mut()
        .dropped_files
        .push(crate::workbench::dropped(path.clone()));
    h.run_steps(3);
    assert_eq!(h.state().messages.len(), 2);
    assert_eq!(h.state().project, before);
    // The file is byte for byte what it was, and nothing was written beside it.
    assert_eq!(std::fs::read(&path).unwrap(), bytes);
    assert_eq!(names_in(&dir), files);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn the_two_point_calculator_takes_u_of_k_as_the_command_line_does() {
    use isochore_fit::two_point::{enthalpy_from_pairs, StatePoint};
    let mut h = harness(bench());
    h.get_by_label("Two-point calculation").click();
    h.run_steps(3);
    // The panel's starting pairs (25 °C, K = 1.0e6; 37 °C, K = 4.0e5) with σ(ln K) = 0.05
    // each; u(K) = σ(ln K)·K (first-order propagation) is 5.0e4 and 2.0e4.
    let a = StatePoint {
        sigma_ln_k: 0.05,
        ..StatePoint::exact(298.15, 1.0e6)
    };
    let b = StatePoint {
        sigma_ln_k: 0.05,
        ..StatePoint::exact(310.15, 4.0e5)
    };
    let r = enthalpy_from_pairs(a, b, 0.95).unwrap();
    let hh = r.delta_h.scaled(1e-3);
    let want = format!("ΔH° = {} ± {} kJ/mol", sig(hh.value, 4), sig(hh.se, 2));
    assert!(shows_part(&h, &want), "no {want}");
    h.get_by_label("u(K)").click();
    h.run_steps(3);
    assert!(h.state().predict.two_point_u_of_k);
    // 0.05 read as u(K) on K = 10⁶ is a different, far smaller uncertainty.
    assert!(
        !shows_part(&h, &want),
        "u(K) = 0.05 gave the σ(ln K) result"
    );
    retype_field(&mut h, "0.05", 0, "5.0e4");
    retype_field(&mut h, "0.05", 0, "2.0e4");
    assert!(shows_part(&h, &want), "no {want} from u(K)");
}
