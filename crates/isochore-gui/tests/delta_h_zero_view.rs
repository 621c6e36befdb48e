//! The temperature where ΔH° = 0 in the window's results table (issue 13): with the
//! constant-ΔCp° model the row shows the number, SE and Fieller interval the JSON of
//! `vhfit fit --json` holds (`t_delta_h_zero`), the interval named "Fieller", and the words
//! below the table; the linear model has no such row.

use crate::workbench::{bench, harness};
use egui_kittest::kittest::{NodeT, Queryable};
use isochore_analysis::{json::write_fit, Overrides, PreparedSet};
use isochore_fit::intervals::IntervalMethod;
use isochore_fit::Model;
use isochore_gui::command::Command;
use isochore_gui::panels::style::sig;
use isochore_gui::Workbench;
use isochore_report::present::names;

/// The number after `"key":` in the first object after `"t_delta_h_zero":` of `json`
/// (serde_json writes each f64 in its shortest round-trip form, so parsing it back gives
/// the same f64); `None` for null.
fn t0_field(json: &str, key: &str) -> Option<f64> {
    let obj = &json[json
        .find("\"t_delta_h_zero\":{")
        .expect("t_delta_h_zero in the JSON")..];
    let obj = &obj[..obj.find('}').unwrap()];
    let at = obj.find(&format!("\"{key}\":")).unwrap() + key.len() + 3;
    let raw = obj[at..].split(',').next().unwrap();
    (raw != "null").then(|| raw.parse().unwrap())
}

/// The JSON `vhfit fit --json` writes for the series as the window holds it (the data set
/// prepared and fitted by isochore-analysis, then its JSON writer).
fn command_line_json(w: &Workbench, id: u64) -> String {
    let data = &w.project.get(id).unwrap().data;
    let set = PreparedSet::from_data_set(data, &data.source.name, &Overrides::default()).unwrap();
    let fit = set.fit().unwrap();
    let mut out = Vec::new();
    write_fit(&mut out, &set, &fit, None, false).unwrap();
    String::from_utf8(out).unwrap()
}

fn bench_with_model(series: usize, model: Model) -> (Workbench, u64) {
    let mut w = bench();
    let id = w.project.series[series].id;
    w.active = Some(id);
    let mut settings = w.project.get(id).unwrap().data.settings;
    settings.fit.model = model;
    w.push(Command::SetSettings {
        series: id,
        settings,
    });
    w.apply_pending();
    (w, id)
}

#[test]
fn the_constant_cp_model_shows_the_temperature_where_delta_h_is_zero_as_the_json_does() {
    // The acid demo (second series): with constant ΔCp° ΔH° changes sign above the data.
    let (w, id) = bench_with_model(1, Model::CONSTANT_CP);
    let json = command_line_json(&w, id);
    let t0 = t0_field(&json, "value").expect("a temperature where ΔH° = 0");
    let (lo, hi) = (t0_field(&json, "ci_low"), t0_field(&json, "ci_high"));
    let se = t0_field(&json, "se").unwrap();
    assert!(
        json.contains("\"method\":\"fieller\",\"extrapolated\":true"),
        "{json}"
    );
    // Independent of the root search: for the constant-ΔCp° model ΔH°(T) = ΔH°(θ) +
    // ΔCp°·(T − θ) (Kirchhoff's law, any physical chemistry textbook), so T₀ = θ − ΔH°(θ)/ΔCp°.
    let s = w.project.get(id).unwrap();
    let set =
        PreparedSet::from_data_set(&s.data, &s.data.source.name, &Overrides::default()).unwrap();
    let fit = set.fit().unwrap();
    let (h, cp) = (fit.delta_h().value, fit.param("delta_cp").unwrap().value);
    let direct = fit.options().t_ref_k - h / cp;
    assert!((t0 - direct).abs() < 1e-6 * direct, "{t0} against {direct}");
    let tu = s.data.settings.temperature_unit;
    let h = harness(w);
    // The row: its name (extrapolated: the JSON says so) with the value in the display unit.
    let quantity = format!("{}, extrapolated", names::T_DELTA_H_ZERO);
    let shown = |k: f64| sig(tu.from_kelvin(k), 4);
    let value = format!("{} {}", shown(t0), tu.symbol());
    h.get_by_label(&format!("{quantity} = {value}"));
    // SE (a temperature difference: the same number in K and °C) and Fieller's interval.
    assert!(h.query_all_by_label(&sig(se, 2)).next().is_some());
    let interval = format!("{} … {}", shown(lo.unwrap()), shown(hi.unwrap()));
    assert!(
        h.query_all_by_label(&interval).next().is_some(),
        "{interval}"
    );
    assert!(h
        .query_all_by_label(names::interval_method(IntervalMethod::Fieller))
        .next()
        .is_some());
    // The words below the table, temperatures in the display unit.
    let words = h
        .query_all_by_label_contains("ΔH° = 0 at ")
        .filter_map(|n| n.value().or_else(|| n.accesskit_node().label()))
        .collect::<Vec<_>>();
    assert_eq!(words.len(), 1, "{words:?}");
    assert!(
        words[0].contains("Fieller") && words[0].contains("outside the measured range"),
        "{words:?}"
    );
    assert!(
        words[0].contains(&isochore_report::present::show_t(t0, tu)),
        "{words:?}"
    );
}

#[test]
fn no_row_for_the_linear_model_and_words_only_where_delta_h_keeps_its_sign() {
    // The linear model: ΔH° is constant, nothing said.
    let (w, _) = bench_with_model(1, Model::LINEAR);
    let h = harness(w);
    assert!(h
        .query_all_by_label_contains(names::T_DELTA_H_ZERO)
        .next()
        .is_none());
    // The binding demo with constant ΔCp°: ΔH° keeps its sign near the data (the JSON's
    // value is null), so no row, only the words.
    let (w, id) = bench_with_model(0, Model::CONSTANT_CP);
    assert_eq!(t0_field(&command_line_json(&w, id), "value"), None);
    let h = harness(w);
    assert!(h
        .query_all_by_label_contains(names::T_DELTA_H_ZERO)
        .next()
        .is_none());
    assert!(h
        .query_all_by_label_contains("ΔH° keeps its sign from ")
        .next()
        .is_some());
}
