//! The plots and the cautions beside them (issue 16 items 10–12): the residual plot's
//! y-range follows the used points, the flag caution counts only used points, and marker
//! shapes each have a hollow form and never repeat a colour–shape pair.

use crate::workbench::{bench, harness};
use egui_kittest::kittest::Queryable;

/// The demo's outlier: row 7 of the binding series (30 °C, "baseline drift").
const OUTLIER_ROW: usize = 6;

#[test]
fn an_excluded_point_neither_sets_the_residual_range_nor_counts_as_flagged() {
    let mut h = harness(bench());
    // The row's checkbox ("use row 7"; "include row 7" before the vocabulary change).
    let row = OUTLIER_ROW + 1;
    let (now, before) = (format!("use row {row}"), format!("include row {row}"));
    h.query_by_label(&now)
        .or_else(|| h.query_by_label(&before))
        .expect("the row's checkbox")
        .click();
    h.run_steps(4);
    let w = h.state();
    let s = w.project.get(w.active.unwrap()).unwrap();
    let a = w.fitter.get(s.id).unwrap();
    let fit = a.fit.as_deref().unwrap();
    let points = fit.points();
    let k = a.point_of_row[OUTLIER_ROW].unwrap();
    assert!(!points[k].used);
    let [lo, hi] = w.diagnostics.residual_y.expect("residual plot drawn");
    // Every used residual is inside the range; the excluded one lies far outside it.
    for d in points.iter().filter(|d| d.used) {
        assert!(
            lo <= d.residual && d.residual <= hi,
            "{} in [{lo}, {hi}]",
            d.residual
        );
    }
    assert!(
        !(lo..=hi).contains(&points[k].residual),
        "{} in [{lo}, {hi}]",
        points[k].residual
    );
    h.get_by_label_contains("1 excluded point beyond the range drawn at the edge");
    // The caution counts only used points carrying a flag (the excluded outlier is still
    // marked in the table).
    assert!(points[k].flags.outlier);
    let used_flagged = points.iter().filter(|d| d.used && d.flags.any()).count();
    let flagged_caution = h.query_all_by_label_contains("flagged as outlier").count();
    if used_flagged == 0 {
        assert_eq!(flagged_caution, 0);
    } else {
        h.get_by_label_contains(&format!(
            "{} flagged as outlier",
            isochore_fit::error::counted(used_flagged, "point", "points")
        ));
    }
}

#[test]
fn warnings_give_temperatures_in_the_display_unit() {
    let mut h = harness(bench());
    // θ = 80 °C lies above the binding demo's 10–40 °C.
    h.get_by_label("θ").click();
    h.run_steps(1);
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::A);
    h.run_steps(1);
    h.get_by_label("θ").type_text("80");
    h.run_steps(1);
    h.key_press(egui::Key::Enter);
    h.run_steps(4);
    // 80 °C and the measured 10–40 °C, in °C as the rest of the screen (T/°C = T/K − 273.15).
    h.get_by_label_contains("θ = 80.00 °C lies outside the measured range 10.00–40.00 °C");
    assert!(h.query_by_label_contains("353.15").is_none());
}

#[test]
fn the_influence_key_names_each_contour_and_the_flag_limit() {
    let h = harness(bench());
    let w = h.state();
    let s = w.project.get(w.active.unwrap()).unwrap();
    let a = w.fitter.get(s.id).unwrap();
    let fit = a.fit.as_deref().unwrap();
    // The levels isochore-fit draws (the flag rule's 4/n first, then D = 1).
    let levels = isochore_fit::influence::FlagLimits::of(fit).contour_levels();
    let fixed = isochore_report::present::fixed;
    h.get_by_label_contains(&format!(
        "long dashes: Cook's D = {} (flag limit) · short dashes: Cook's D = {}",
        fixed(levels[0], 2),
        fixed(levels[1], 2)
    ));
}

/// Issue 16 item 10, in the window as drawn: eight series shown at once (the eighth is the
/// one that reused the first series' pair before), one row excluded in each. Every series
/// gets its own colour–shape pair, every shape has a hollow form (no asterisk, cross or
/// plus, which are lines only — egui_plot's marker set), the excluded point is drawn
/// hollow in the series' own shape and colour, and no series colour is the flag ring's.
#[test]
fn eight_series_get_eight_pairs_and_excluded_points_are_hollow() {
    use egui_plot::MarkerShape;
    use isochore_gui::command::Command;
    use isochore_gui::doc::Entry;
    let mut w = bench();
    let base = w.project.series[0].data.clone();
    while w.project.series.len() < 8 {
        let mut data = base.clone();
        data.name = format!("copy {}", w.project.series.len() + 1);
        data.shown = true;
        w.project.series.push(Entry::new(data));
    }
    for s in &mut w.project.series {
        s.data.shown = true;
    }
    let ids: Vec<u64> = w.project.series.iter().map(|s| s.id).collect();
    for &id in &ids {
        w.push(Command::SetExclusion {
            series: id,
            row: 2,
            exclusion: Some(("test".into(), "2026-12-03T09:00:00Z".into())),
        });
    }
    w.apply_pending();
    let mut h = harness(w);
    h.run_steps(4);
    let drawn = h.state().plot.drawn_styles.clone();
    assert_eq!(drawn.len(), 8, "{drawn:?}");
    let mut pairs = std::collections::HashSet::new();
    for d in &drawn {
        assert!(
            pairs.insert((d.color, format!("{:?}", d.shape))),
            "pair repeated: {d:?}"
        );
        assert!(
            !matches!(
                d.shape,
                MarkerShape::Asterisk | MarkerShape::Cross | MarkerShape::Plus
            ),
            "{d:?} has no hollow form"
        );
        assert_eq!(d.excluded_hollow, 1, "{d:?}");
        assert!(d.used_filled >= 2, "{d:?}");
        for dark in [false, true] {
            assert_ne!(
                d.color,
                isochore_gui::panels::style::flag_ring_color(dark),
                "a series colour is the flag ring's"
            );
        }
    }
}

/// Issue 11 item 1: the influence plot draws what the flag rule tests — the externally
/// studentized residual — so the demo's outlier (row 7) sits where the table puts it
/// (about −7.05, far outside the ±3 flag lines), not at the internally studentized −2.7.
#[test]
fn the_influence_plot_draws_the_residual_the_flag_rule_tests() {
    let h = harness(bench());
    let w = h.state();
    let s = w.project.get(w.active.unwrap()).unwrap();
    let a = w.fitter.get(s.id).unwrap();
    let fit = a.fit.as_deref().unwrap();
    let k = a.point_of_row[OUTLIER_ROW].unwrap();
    let d = &fit.points()[k];
    let ext = d.student_ext.expect("an externally studentized residual");
    // By hand from the internally studentized r: t = r·√((ν − 1)/(ν − r²)), ν = n − p
    // (Belsley, Kuh & Welsch 1980; from memory).
    let nu = fit.dof() as f64;
    let r = d.student_int.expect("an internally studentized residual");
    let by_hand = r * ((nu - 1.0) / (nu - r * r)).sqrt();
    assert!(
        (ext - by_hand).abs() < 1e-9 * ext.abs(),
        "{ext} vs {by_hand}"
    );
    let drawn = w
        .diagnostics
        .influence_drawn
        .iter()
        .find(|(i, _)| *i == k)
        .expect("the outlier is drawn")
        .1;
    assert_eq!(drawn[0], d.leverage);
    assert_eq!(drawn[1], ext);
    assert!(drawn[1] < -3.0 && r > -3.0, "ext {ext}, int {r}");
}
