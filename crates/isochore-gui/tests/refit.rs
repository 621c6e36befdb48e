//! A refit after an exclusion starts from the points already converted (`fitting::reanalyse`)
//! instead of the cells: its analysis must be the one made from the cells, every field
//! bit for bit (compared through `Debug`, which writes each f64 so that it reads back to
//! the same bits: two analyses print alike only when every number is identical). A cell
//! edit or averaged replicates make the refit start from the cells again.

use isochore_gui::command::{apply, Command};
use isochore_gui::doc::{Entry, Project};
use isochore_gui::fitting::{analyse, reanalyse, Analysis, Fitter};

/// `n` invented rows, ln K = 3000/T − 5 with a deterministic wiggle, σ = 0.03, 5–45 °C;
/// `repeat` rows share each temperature.
fn project(n: usize, repeat: usize) -> Project {
    let mut text = String::from("T (°C),ln K,u(ln K)\n");
    for i in 0..n {
        let t = 5.0 + 40.0 * (i / repeat) as f64 / n as f64;
        let wiggle = 0.05 * (((i * 7919) % 101) as f64 / 101.0 - 0.5);
        let ln_k = 3000.0 / (t + 273.15) - 5.0 + wiggle;
        text.push_str(&format!("{t:.6},{ln_k:.6},0.03\n"));
    }
    let imp = isochore_data::import_text("synthetic.csv", &text, &Default::default())
        .expect("invented data import");
    Project::from_data(isochore_data::Project::from_import(&imp), None)
}

fn exclude(p: &mut Project, row: usize) {
    let series = p.series[0].id;
    apply(
        p,
        Command::SetExclusion {
            series,
            row,
            exclusion: Some(("test".into(), "2026-12-03T12:00:00Z".into())),
        },
    )
    .expect("row exists");
}

fn same(a: &Analysis, b: &Analysis) -> bool {
    format!("{a:?}") == format!("{b:?}")
}

fn entry(p: &Project) -> &Entry {
    &p.series[0]
}

#[test]
fn a_refit_after_exclusions_is_the_analysis_made_from_the_cells() {
    // Above the plots' decimation threshold (4000 points), so the envelope indexes of the
    // van 't Hoff, residual and influence plots are built and compared too.
    let mut p = project(6_000, 1);
    let first = analyse(entry(&p));
    assert!(!first.infl_index.is_empty() && !first.resid_index.is_empty());
    exclude(&mut p, 7);
    let refit = reanalyse(entry(&p), &first).expect("only an exclusion changed");
    let full = analyse(entry(&p));
    assert!(!full.measurements[7].included);
    assert!(same(&refit, &full));
    // A second exclusion, refitted from the refit, and then the first one undone.
    exclude(&mut p, 5_999);
    let second = reanalyse(entry(&p), &refit).expect("only an exclusion changed");
    assert!(same(&second, &analyse(entry(&p))));
    let series = p.series[0].id;
    apply(
        &mut p,
        Command::SetExclusion {
            series,
            row: 7,
            exclusion: None,
        },
    )
    .expect("row exists");
    let third = reanalyse(entry(&p), &second).expect("only an exclusion changed");
    assert!(same(&third, &analyse(entry(&p))));
    let fit = third.fit.as_deref().expect("fit");
    assert_eq!(fit.n_used(), 5_999);
}

#[test]
fn a_cell_edit_or_averaged_replicates_start_from_the_cells() {
    let mut p = project(50, 1);
    let first = analyse(entry(&p));
    let series = p.series[0].id;
    apply(
        &mut p,
        Command::EditCell {
            series,
            row: 3,
            column: 1,
            text: "9.5".into(),
        },
    )
    .expect("cell exists");
    assert!(reanalyse(entry(&p), &first).is_none());

    // Replicates averaged: excluding one row regroups its temperature.
    let mut p = project(60, 3);
    let mut settings = p.series[0].data.settings;
    settings.replicates = isochore_data::Replicates::Average;
    let series = p.series[0].id;
    apply(&mut p, Command::SetSettings { series, settings }).expect("series exists");
    let first = analyse(entry(&p));
    exclude(&mut p, 4);
    assert!(reanalyse(entry(&p), &first).is_none());
}

#[test]
fn a_large_refit_in_the_background_ends_as_the_analysis_made_from_the_cells() {
    // Above the rows fitted off the UI thread and the points from which the fit's model
    // comparison is made after its estimates are shown (20 000 each): the worker sends the
    // estimates, then the comparison, and the analysis in the slot must end up the one made
    // from the cells, every number and caution included.
    let mut p = project(25_000, 1);
    let mut fitter = Fitter::default();
    fitter.update(&p.series, 0.0, true);
    exclude(&mut p, 11);
    fitter.update(&p.series, 1.0, true);
    let id = p.series[0].id;
    let a = fitter.get(id).expect("fitted");
    let fit = a.fit.as_deref().expect("fit");
    assert!(!fit.comparison_pending() && fit.comparison().is_some());
    assert_eq!(fit.n_used(), 24_999);
    // The residual and influence indexes and the flags, made after the estimates were
    // shown, are in place too.
    assert!(!a.plots_pending && !a.resid_index.is_empty() && !a.infl_index.is_empty());
    assert!(same(&a, &analyse(entry(&p))));
    assert!(fitter.running(&p.series).is_empty());
}

#[test]
fn large_refits_one_after_another_each_end_as_the_analysis_made_from_the_cells() {
    // Each large refit marks the points of an earlier analysis again (the shown one's, or
    // those of the analysis before it once that is given back): excluded, brought back,
    // another excluded, the last row excluded; every analysis must be the one made from the
    // cells.
    let mut p = project(25_000, 1);
    let mut fitter = Fitter::default();
    fitter.update(&p.series, 0.0, true);
    let id = p.series[0].id;
    let steps = [
        (11, true),
        (11, false),
        (24_999, true),
        (300, true),
        (24_999, false),
    ];
    for (k, (row, out)) in steps.into_iter().enumerate() {
        apply(
            &mut p,
            Command::SetExclusion {
                series: id,
                row,
                exclusion: out.then(|| ("test".into(), "2026-12-03T12:00:00Z".into())),
            },
        )
        .expect("row exists");
        fitter.update(&p.series, 1.0 + k as f64, true);
        let a = fitter.get(id).expect("fitted");
        assert!(same(&a, &analyse(entry(&p))), "step {k}");
    }
}

#[test]
fn no_report_is_written_while_a_large_refit_waits_for_its_comparison() {
    // A large refit shows its estimates before its model comparison: a report started in
    // that moment would lack the comparison, so the export refuses it in words; once the
    // comparison is in place the analysis is whole again.
    use isochore_gui::export::{ExportFormat, ExportJob, FormatSet};
    let mut p = project(25_000, 1);
    let mut fitter = Fitter::default();
    fitter.update(&p.series, 0.0, true);
    exclude(&mut p, 11);
    let id = p.series[0].id;
    let mut formats = FormatSet(0);
    formats.set(ExportFormat::Markdown, true);
    let dir = std::env::temp_dir().join(format!("isochore-refit-export-{}", std::process::id()));
    let mut refused = 0;
    for step in 0..20_000 {
        fitter.update(&p.series, 1.0 + step as f64 * 1e-3, false);
        let new = fitter
            .get(id)
            .is_some_and(|a| a.fit.as_deref().is_ok_and(|f| f.n_used() == 24_999));
        if !new {
            std::thread::sleep(std::time::Duration::from_millis(1));
            continue;
        }
        if fitter.comparison_pending(id) {
            let a = fitter.get(id).expect("fitted");
            assert!(a.fit.as_deref().expect("fit").comparison().is_none());
            // The plots' indexes come with the comparison: until then none is shown.
            assert!(a.plots_pending && a.resid_index.is_empty() && a.flagged.is_empty());
            let Err(why) = ExportJob::start(
                &p,
                &fitter,
                &[id],
                &dir,
                isochore_gui::export::Choices::formats(formats),
            ) else {
                panic!("a report was started without the model comparison");
            };
            assert!(why.contains("model comparison"), "{why}");
            refused += 1;
            std::thread::sleep(std::time::Duration::from_millis(1));
            continue;
        }
        break;
    }
    let a = fitter.get(id).expect("fitted");
    assert!(a.fit.as_deref().expect("fit").comparison().is_some());
    assert!(!fitter.comparison_pending(id));
    assert!(!a.plots_pending && !a.infl_index.is_empty() && a.flagged.len() == 25_000);
    assert!(same(&a, &analyse(entry(&p))));
    eprintln!("exports refused while the comparison was pending: {refused}");
    let _ = std::fs::remove_dir_all(&dir);
}
