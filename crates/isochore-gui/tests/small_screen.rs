//! The window at 1280 × 720 (issue 16 item 9, and the small things of item 12 a table
//! shows): the measurements table scrolls sideways to its last columns, a reason is read
//! in full on hover, "ln K" heads one column only, and the panels keep their places when a
//! unit changes.

use crate::workbench::bench;
use egui::accesskit::Role;
use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use isochore_gui::Workbench;

type H = Harness<'static, Workbench>;

fn small(w: Workbench) -> H {
    let mut h = Harness::builder()
        .with_size([1280.0, 720.0])
        .build_ui_state(
            |ui, w: &mut Workbench| {
                let t = ui.input(|i| i.time);
                w.frame(ui, t);
            },
            w,
        );
    h.run_steps(3);
    h
}

fn choose(h: &mut H, combo: &str, choice: &str) {
    h.get_by_role_and_label(Role::ComboBox, combo).click();
    h.run_steps(2);
    h.get_by_role_and_label(Role::Button, choice).click();
    h.run_steps(3);
}

#[test]
fn the_table_scrolls_sideways_and_a_reason_shows_in_full_on_hover() {
    let mut w = bench();
    // The demo's row 7 carries a long reason.
    let reason = "baseline drift after the lamp was changed; the cuvette was refilled twice, \
                  so this titration point is not comparable with the others";
    let id = w.active.unwrap();
    let s = w.project.get_mut(id).unwrap();
    s.data.exclusions.retain(|e| e.row != 7);
    s.data.exclusions.push(isochore_data::Exclusion {
        row: 7,
        reason: reason.to_string(),
        at: "2026-12-01T21:00:00Z".to_string(),
    });
    s.rev += 1;
    let mut h = small(w);
    let panel = h.get_by_label("Measurements").rect();
    // The last column ("note") lies beyond the panel's right edge at first…
    let note = h.get_by_role_and_label(Role::Label, "note").rect();
    assert!(note.left() > panel.left());
    // …and scrolling sideways (shift + wheel over the table) brings it in.
    let table_point = egui::pos2(panel.left() + 300.0, panel.bottom() + 80.0);
    h.hover_at(table_point);
    h.run_steps(1);
    let before = h.get_by_role_and_label(Role::Label, "reason").rect();
    for _ in 0..10 {
        h.event(egui::Event::MouseWheel {
            unit: egui::MouseWheelUnit::Point,
            delta: egui::vec2(-200.0, 0.0),
            modifiers: egui::Modifiers::NONE,
            phase: egui::TouchPhase::Move,
            source: egui::MouseWheelSource::Wheel,
        });
        h.run_steps(1);
    }
    h.run_steps(2);
    let after = h.get_by_role_and_label(Role::Label, "reason").rect();
    assert!(
        after.left() < before.left() - 100.0,
        "{before:?} → {after:?}"
    );
    assert!(after.right() <= 1280.0, "{after:?}");
    // The clipped reason is read in full on hover.
    let cell = h
        .get_by_label_contains("baseline drift after the lamp")
        .rect();
    h.hover_at(cell.center());
    h.run_steps(3);
    assert!(
        h.query_all_by_label(reason).count() >= 1,
        "no tooltip with the full reason"
    );
}

#[test]
fn panels_keep_their_places_when_a_unit_changes() {
    let mut h = small(bench());
    let place = |h: &H| {
        (
            h.get_by_role_and_label(Role::ComboBox, "energy unit")
                .rect(),
            h.get_by_label_contains("Residuals against temperature")
                .rect(),
        )
    };
    let before = place(&h);
    choose(&mut h, "energy unit", "kcal/mol");
    choose(&mut h, "temperature unit", "K");
    h.run_steps(3);
    let after = place(&h);
    assert_eq!(before.0.left(), after.0.left());
    assert_eq!(before.1.left(), after.1.left());
    assert!((before.1.width() - after.1.width()).abs() < 0.5);
}

/// The labels reading exactly `text` in the measurements panel (below its heading, on
/// the screen).
fn in_table(h: &H, text: &str) -> usize {
    let top = h.get_by_label("Measurements").rect().top();
    h.query_all_by_label(text)
        .filter(|n| n.rect().top() >= top && n.rect().bottom() <= 720.0)
        .count()
}

#[test]
fn ln_k_heads_one_column_only() {
    // The binding demo gives K_d: the converted column is plain "ln K".
    let h = small(bench());
    assert_eq!(in_table(&h, "ln K"), 1);
    // A file of ln K values has its own "ln K" column: the converted one is named apart.
    let mut w = bench();
    let text = "T (°C),ln K\n10,8.1\n20,7.6\n30,7.2\n40,6.8\n";
    let preview = isochore_gui::io::import_text(text, "lnk.csv").unwrap();
    let s = preview.series().remove(0);
    let id = s.id;
    w.project.series.push(s);
    w.active = Some(id);
    let h = small(w);
    assert_eq!(in_table(&h, "ln K"), 1);
    assert_eq!(in_table(&h, "ln K (converted)"), 1);
}
