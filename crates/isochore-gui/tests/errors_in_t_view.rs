//! The window's thermometer uncertainty (issue 13 item 4): one number field in the settings
//! panel sends one undoable command; the results panel then shows the fit with errors in T
//! that isochore-analysis makes (the method that made the numbers, each parameter beside the
//! fit in K only, and the comparison in isochore-fit's words); emptying the field or undo
//! takes it away. The numbers are checked against the library on the same data.

use crate::workbench::{bench, harness};
use egui::{Key, Modifiers};
use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use isochore_fit::errors_in_t::fit_errors_in_t;
use isochore_gui::Workbench;
use isochore_report::present::names;

type H = Harness<'static, Workbench>;

fn shows_part(h: &H, part: &str) -> bool {
    h.query_all_by_label_contains(part).next().is_some()
}

fn retype(h: &mut H, label: &str, text: &str) {
    h.get_by_label(label).click();
    h.run_steps(1);
    h.key_press_modifiers(Modifiers::COMMAND, Key::A);
    h.run_steps(1);
    // What is selected goes, then the new text (none: the field is emptied).
    h.key_press(Key::Backspace);
    h.run_steps(1);
    if !text.is_empty() {
        h.get_by_label(label).type_text(text);
    }
    h.run_steps(1);
    h.key_press(Key::Enter);
    h.run_steps(3);
}

#[test]
fn thermometer_uncertainty_field_shows_the_fit_with_errors_in_t() {
    let w = bench();
    let id = w.active.unwrap();
    let mut h = harness(w);
    assert!(!shows_part(&h, "allowing for σ(T)"));
    retype(&mut h, names::THERMOMETER_UNCERTAINTY, "0.2");
    let entry = h.state().project.get(id).unwrap();
    assert_eq!(entry.data.settings.thermometer_uncertainty_k, Some(0.2));
    let m = entry.points().unwrap().measurements;
    let f = fit_errors_in_t(&m, &vec![0.2; m.len()], entry.options()).unwrap();
    let sentence = f.comparison().to_string();
    assert!(shows_part(&h, &sentence), "no “{sentence}”");
    assert!(shows_part(&h, names::errors_in_t_method(f.method())));
    // Emptying the field takes it away.
    retype(&mut h, names::THERMOMETER_UNCERTAINTY, "");
    assert!(!shows_part(&h, "allowing for σ(T)"));
    assert_eq!(
        h.state()
            .project
            .get(id)
            .unwrap()
            .data
            .settings
            .thermometer_uncertainty_k,
        None
    );
    // A value that is not positive is refused in words.
    retype(&mut h, names::THERMOMETER_UNCERTAINTY, "-1");
    assert!(shows_part(&h, "not a positive number of kelvin"));
    assert!(!shows_part(&h, "allowing for σ(T)"));
}
