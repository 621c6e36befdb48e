//! Intervals by Monte Carlo or the bootstrap in the window (issue 13 item 6): the setting in
//! the settings panel is one undoable change recorded in the project; the run goes to a
//! worker thread and then the results panel names the method of every interval and draws a
//! histogram of the draws for each parameter and derived quantity; Cancel stops a long run
//! and leaves the delta method's intervals. The window's numbers are checked against
//! isochore-analysis' run_intervals (what `vhfit fit --intervals …` calls) on the same data
//! set: equal to the bit.

use crate::workbench::{bench, harness};
use egui::accesskit::Role;
use egui::{Key, Modifiers};
use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use isochore_analysis::intervals::{run_intervals, IntervalChoice, IntervalRequest};
use isochore_analysis::{Overrides, PreparedSet};
use isochore_fit::intervals::{BootstrapScheme, IntervalMethod, IntervalRun};
use isochore_gui::intervals_run::{RunState, HISTOGRAM_BINS};
use isochore_gui::Workbench;
use isochore_report::present::names;

type H = Harness<'static, Workbench>;

fn shows(h: &H, label: &str) -> bool {
    h.query_all_by_label(label).next().is_some()
}

fn shows_part(h: &H, part: &str) -> bool {
    h.query_all_by_label_contains(part).next().is_some()
}

fn choose(h: &mut H, combo: &str, choice: &str) {
    h.get_by_role_and_label(Role::ComboBox, combo).click();
    h.run_steps(2);
    h.get_by_role_and_label(Role::Button, choice).click();
    h.run_steps(3);
}

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

/// What `vhfit fit --intervals …` computes for the data set as the window holds it: the
/// data set prepared and fitted by isochore-analysis, then run_intervals.
fn command_line_run(w: &Workbench, id: u64) -> IntervalRun {
    let data = &w.project.get(id).unwrap().data;
    let set = PreparedSet::from_data_set(data, &data.source.name, &Overrides::default()).unwrap();
    let fit = set.fit().unwrap();
    run_intervals(&set, &fit, &data.settings.intervals)
        .unwrap()
        .unwrap()
}

/// The same to the bit: every number's shortest round-trip form (NaN, the value of an
/// interval a quantity does not have, is not equal to itself under `==`).
fn same(a: &IntervalRun, b: &IntervalRun) -> bool {
    format!("{a:?}") == format!("{b:?}")
}

fn window_run(w: &Workbench, id: u64) -> IntervalRun {
    match w.interval_runs.state(id).map(|s| s.1) {
        Some(RunState::Done(o)) => o.run.clone(),
        other => panic!("no finished run: {other:?}"),
    }
}

#[test]
fn monte_carlo_names_its_intervals_draws_histograms_and_matches_the_command_line() {
    let w = bench();
    let id = w.active.unwrap();
    let mut h = harness(w);
    // The delta method: the results table says so, and there is no resampling block.
    assert!(shows(&h, "95 % CI") && shows(&h, names::interval_method(IntervalMethod::Delta)));
    assert!(!shows_part(&h, "% CI ("));
    // The predictions below name theirs too.
    assert!(shows(&h, "CI and PI by the delta method"));
    let rev = h.state().project.get(id).unwrap().rev;
    choose(&mut h, names::INTERVALS_BY, "Monte Carlo");
    // One undoable change that does not refit the series (its revision stays).
    assert_eq!(h.state().history.undo_label(), Some("interval method"));
    assert_eq!(h.state().project.get(id).unwrap().rev, rev);
    // Refused in words, the setting unchanged: no draws, too many, not a number
    // (isochore-fit's check_draws gives the first two sentences).
    retype(&mut h, names::DRAWS, "0");
    assert!(shows(&h, "the number of draws must be at least 1"));
    retype(&mut h, names::DRAWS, "2000000");
    assert!(shows_part(&h, "at most 1000000 are allowed"));
    retype(&mut h, names::SEED, "x7");
    assert!(shows_part(&h, "'x7' is not a whole number"));
    assert_eq!(
        h.state()
            .project
            .get(id)
            .unwrap()
            .data
            .settings
            .intervals
            .draws,
        10_000
    );
    retype(&mut h, names::DRAWS, "2000");
    retype(&mut h, names::SEED, "7");
    let want = IntervalRequest {
        choice: IntervalChoice::MonteCarlo,
        draws: 2000,
        seed: 7,
    };
    assert_eq!(
        h.state().project.get(id).unwrap().data.settings.intervals,
        want
    );
    h.run_steps(2);
    // Every interval of the block names its method; the heading says how many draws.
    assert!(shows(&h, "95 % CI (Monte Carlo, 2000 draws)"));
    assert!(shows_part(&h, "2000 draws, seed 7"));
    let run = window_run(h.state(), id);
    assert!(same(&run, &command_line_run(h.state(), id)));
    assert_eq!((run.draws, run.seed), (2000, 7));
    let dh = run.get("delta_h").unwrap();
    assert!(dh.interval.ci_low < dh.interval.value && dh.interval.value < dh.interval.ci_high);
    // One histogram per parameter and derived quantity, each of HISTOGRAM_BINS bars.
    let drawn = h.state().results.intervals.drawn_histograms.clone();
    let labels: Vec<&str> = drawn.iter().map(|d| d.0.as_str()).collect();
    assert!(
        labels.contains(&"ΔH°") && labels.contains(&"ΔS°"),
        "{labels:?}"
    );
    assert!(
        labels.iter().any(|l| l.starts_with("ΔG° at θ")),
        "{labels:?}"
    );
    assert!(drawn.len() >= 3);
    assert!(drawn.iter().all(|d| d.1 == HISTOGRAM_BINS), "{drawn:?}");

    // Reopening the project gives the same intervals: the setting is in the project file.
    let text = h.state().project.to_data().to_json();
    let again = isochore_data::Project::from_json(&text, "again.isochore.json").unwrap();
    let mut w2 = bench();
    w2.replace_project(isochore_gui::doc::Project::from_data(again, None), false);
    let id2 = w2.active.unwrap();
    w2.apply_pending();
    assert!(same(&window_run(&w2, id2), &run));

    // Undo takes the setting back step by step to the delta method; the block goes.
    for _ in 0..3 {
        h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
        h.run_steps(3);
    }
    assert!(h
        .state()
        .project
        .get(id)
        .unwrap()
        .data
        .settings
        .intervals
        .is_default());
    assert!(!shows_part(&h, "% CI ("));
    assert!(h.state().results.intervals.drawn_histograms.is_empty());
}

#[test]
fn the_bootstrap_run_is_the_command_lines_and_names_bca_or_percentile() {
    let w = bench();
    let id = w.active.unwrap();
    let mut h = harness(w);
    choose(
        &mut h,
        names::INTERVALS_BY,
        names::bootstrap_scheme(BootstrapScheme::Wild),
    );
    retype(&mut h, names::DRAWS, "1000");
    h.run_steps(2);
    let run = window_run(h.state(), id);
    assert!(same(&run, &command_line_run(h.state(), id)));
    assert!(shows(
        &h,
        &format!(
            "95 % CI ({}, 1000 draws)",
            names::bootstrap_scheme(BootstrapScheme::Wild)
        )
    ));
    // With 10 points the methods paragraph, open for the bootstrap, warns in words that its
    // intervals run narrow (present::intervals::methods_paragraph's caution).
    assert!(shows_part(
        &h,
        "bootstrap intervals are expected to be too narrow"
    ));
    // Each quantity's row names what made its interval.
    let dh = run.get("delta_h").unwrap().best();
    assert!(shows_part(
        &h,
        &format!("({})", names::interval_method(dh.method))
    ));
}

#[test]
fn cancel_stops_a_long_run_and_leaves_the_delta_method() {
    let mut w = bench();
    // Runs in the background, as in the window.
    w.block_fits = false;
    let id = w.active.unwrap();
    let mut h = harness(w);
    choose(&mut h, names::INTERVALS_BY, "Monte Carlo");
    // The most draws allowed: far longer than a few frames.
    retype(
        &mut h,
        names::DRAWS,
        &isochore_fit::intervals::MAX_DRAWS.to_string(),
    );
    assert!(matches!(
        h.state().interval_runs.state(id).map(|s| s.1),
        Some(RunState::Running(_))
    ));
    assert!(shows_part(&h, "draws"));
    h.get_by_role_and_label(Role::Button, "Cancel").click();
    h.run_steps(3);
    assert!(matches!(
        h.state().interval_runs.state(id).map(|s| s.1),
        Some(RunState::Cancelled)
    ));
    assert!(shows(
        &h,
        "Cancelled: every interval above is the delta method's."
    ));
    // The results table is still the delta method's, and no histogram is drawn.
    assert!(shows(&h, "95 % CI") && shows(&h, names::interval_method(IntervalMethod::Delta)));
    assert!(h.state().results.intervals.drawn_histograms.is_empty());
    // It stays cancelled over more frames, until asked to run again.
    h.run_steps(5);
    assert!(matches!(
        h.state().interval_runs.state(id).map(|s| s.1),
        Some(RunState::Cancelled)
    ));
    h.get_by_role_and_label(Role::Button, "Run again").click();
    h.run_steps(3);
    assert!(matches!(
        h.state().interval_runs.state(id).map(|s| s.1),
        Some(RunState::Running(_))
    ));
    h.get_by_role_and_label(Role::Button, "Cancel").click();
    h.run_steps(2);
}

#[test]
fn a_report_exported_from_the_window_compares_the_methods_as_the_command_line_does() {
    use isochore_gui::export::{ExportFormat, ExportJob, FormatSet};
    let mut w = bench();
    let id = w.active.unwrap();
    let mut settings = w.project.get(id).unwrap().data.settings;
    settings.intervals = IntervalRequest {
        choice: IntervalChoice::MonteCarlo,
        draws: 500,
        seed: 3,
    };
    w.push(isochore_gui::command::Command::SetSettings {
        series: id,
        settings,
    });
    w.apply_pending();
    let dir = crate::workbench::temp_dir("intervals-report");
    let mut formats = FormatSet(0);
    formats.set(ExportFormat::Markdown, true);
    ExportJob::start(
        &w.project,
        &w.fitter,
        &[id],
        &dir,
        isochore_gui::export::Choices::formats(formats),
    )
    .and_then(ExportJob::wait)
    .unwrap();
    let md = crate::workbench::file_ending(&dir, ".md");
    let text = std::fs::read_to_string(md).unwrap();
    // The section the command line's --intervals monte-carlo --report writes: the methods
    // paragraph (the draws and generator start value) and the comparison of methods.
    assert!(text.contains("Intervals by resampling"), "{text}");
    assert!(text.contains("500 draws each from seed 3"), "{text}");
    assert!(text.contains(names::bootstrap_scheme(BootstrapScheme::Residuals)));
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn with_a_heat_capacity_the_draws_of_delta_cp_and_of_the_temperature_where_delta_h_is_zero_are_drawn(
) {
    // The invented ligand demo (assets/demo), first series, fitted with constant ΔCp°: its
    // run has ΔCp° and the temperature where ΔH° = 0 (as `vhfit fit … --model cp
    // --intervals monte-carlo` lists them).
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../assets/demo/ligands_px_orrin3.csv"
    );
    let text = std::fs::read_to_string(path).unwrap();
    let imp = isochore_data::import_text(
        "ligands_px_orrin3.csv",
        &text,
        &isochore_data::ImportOptions::default(),
    )
    .unwrap();
    let mut w = bench();
    w.replace_project(
        isochore_gui::doc::Project::from_data(isochore_data::Project::from_import(&imp), None),
        false,
    );
    let id = w.active.unwrap();
    let mut settings = w.project.get(id).unwrap().data.settings;
    settings.fit.model = isochore_fit::Model::CONSTANT_CP;
    settings.intervals = IntervalRequest {
        choice: IntervalChoice::MonteCarlo,
        draws: 1000,
        seed: 1,
    };
    w.push(isochore_gui::command::Command::SetSettings {
        series: id,
        settings,
    });
    w.apply_pending();
    let mut h = harness(w);
    h.run_steps(2);
    let run = window_run(h.state(), id);
    assert!(run.get("delta_cp").is_some() && run.get("t_delta_h_zero").is_some());
    assert!(same(&run, &command_line_run(h.state(), id)));
    let drawn = h.state().results.intervals.drawn_histograms.clone();
    let labels: Vec<&str> = drawn.iter().map(|d| d.0.as_str()).collect();
    // present's label: "ΔCp°", a constant in this model ("ΔCp°(θ)" only where it varies
    // with T, DEVELOPERS.md's table).
    assert!(labels.contains(&"ΔCp°"), "{labels:?}");
    assert!(
        !labels.iter().any(|l| l.starts_with("ΔCp°(θ)")),
        "{labels:?}"
    );
    assert!(labels.contains(&"T where ΔH° = 0"), "{labels:?}");
    assert!(drawn.iter().all(|d| d.1 == HISTOGRAM_BINS), "{drawn:?}");
}

#[test]
fn a_run_the_library_refuses_is_said_in_words_and_the_delta_method_stays() {
    let mut w = bench();
    let id = w.active.unwrap();
    // Seven of the binding demo's ten rows left out: three points, fewer than the
    // bootstrap's p + 2 = 4 for the linear model.
    for row in 3..10 {
        w.push(isochore_gui::command::Command::SetExclusion {
            series: id,
            row,
            exclusion: Some(("test".into(), "2026-12-01T21:00:00Z".into())),
        });
    }
    let mut settings = w.project.get(id).unwrap().data.settings;
    settings.intervals = IntervalRequest {
        choice: IntervalChoice::Bootstrap(BootstrapScheme::Residuals),
        draws: 100,
        seed: 1,
    };
    w.push(isochore_gui::command::Command::SetSettings {
        series: id,
        settings,
    });
    w.apply_pending();
    let h = harness(w);
    assert!(matches!(
        h.state().interval_runs.state(id).map(|s| s.1),
        Some(RunState::Failed(_))
    ));
    // isochore-fit's sentence, after the window's words.
    assert!(shows_part(
        &h,
        "No intervals by resampling: the bootstrap needs at least 4 used points"
    ));
    assert!(shows(&h, "95 % CI") && shows(&h, names::interval_method(IntervalMethod::Delta)));
    assert!(h.state().results.intervals.drawn_histograms.is_empty());
}

#[test]
fn with_a_thermometer_uncertainty_monte_carlo_is_still_the_command_lines() {
    // σ(T) = 0.1 K for every point: each draw draws the temperatures too (isochore-analysis
    // passes the data set's σ(T), as `vhfit fit … --sigma-t 0.1K --intervals monte-carlo`).
    let mut w = bench();
    let id = w.active.unwrap();
    let mut settings = w.project.get(id).unwrap().data.settings;
    settings.thermometer_uncertainty_k = Some(0.1);
    settings.intervals = IntervalRequest {
        choice: IntervalChoice::MonteCarlo,
        draws: 300,
        seed: 11,
    };
    w.push(isochore_gui::command::Command::SetSettings {
        series: id,
        settings,
    });
    w.apply_pending();
    let h = harness(w);
    let run = window_run(h.state(), id);
    assert!(same(&run, &command_line_run(h.state(), id)));
    assert!(
        run.warnings.iter().any(|w| w.contains("σ(T)")),
        "{:?}",
        run.warnings
    );
    assert!(shows(&h, "95 % CI (Monte Carlo, 300 draws)"));
}

#[test]
fn a_caution_about_one_quantity_names_it_as_the_rows_do() {
    // The binding demo with constant ΔCp° and Monte Carlo: K never reaches 1 near the data
    // in many draws; the caution says "T where K = 1" (DEVELOPERS.md's name), not the JSON
    // key t_at_k1, which the run's own warnings keep.
    let mut w = bench();
    let id = w.active.unwrap();
    let mut settings = w.project.get(id).unwrap().data.settings;
    settings.fit.model = isochore_fit::Model::CONSTANT_CP;
    settings.intervals = IntervalRequest {
        choice: IntervalChoice::MonteCarlo,
        draws: 2000,
        seed: 1,
    };
    w.push(isochore_gui::command::Command::SetSettings {
        series: id,
        settings,
    });
    w.apply_pending();
    let mut h = harness(w);
    h.run_steps(2);
    let run = window_run(h.state(), id);
    assert!(
        run.warnings
            .iter()
            .any(|w| w.starts_with("t_at_k1: undefined in ")),
        "{:?}",
        run.warnings
    );
    assert!(shows_part(
        &h,
        &format!("{}: undefined in ", names::T_AT_K1)
    ));
    assert!(!shows_part(&h, "t_at_k1"));
}
