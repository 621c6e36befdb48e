//! A refit after an exclusion with 10⁶ points, as the window does it: the series' revision
//! changes, `fitting::Fitter::update` starts the refit on its worker thread and the
//! benchmark waits for the result (the window keeps drawing the previous result
//! meanwhile). Each iteration excludes or brings back one row, so every refit fits a
//! different set of points. Then the time until the refit's estimates are on screen (the
//! worker sends them before the model comparison, which follows and is waited for outside
//! the timing). Beside it, for comparison: `isochore_fit::fit` alone on the same
//! points, and the analysis made from the cells (what every refit cost before the
//! converted points were kept).
//!
//! Run: `cargo bench -p isochore-gui --bench refit`.

mod common;

use common::big_project;
use criterion::{criterion_group, criterion_main, Criterion};
use isochore_gui::command::{apply, Command};
use isochore_gui::doc::Project;
use isochore_gui::fitting::{analyse, Fitter};
use std::time::{Duration, Instant};

/// Excludes a row, then brings it back, then excludes another (every 7919th): each refit
/// fits a different set of points.
#[derive(Default)]
struct Toggle {
    row: usize,
    excluded: bool,
}

impl Toggle {
    fn next(&mut self, project: &mut Project, id: u64) {
        self.excluded = !self.excluded;
        if self.excluded {
            self.row = (self.row + 7919) % 1_000_000;
        }
        apply(
            project,
            Command::SetExclusion {
                series: id,
                row: self.row,
                exclusion: self
                    .excluded
                    .then(|| ("bench".into(), "2026-12-03T12:00:00Z".into())),
            },
        )
        .expect("row exists");
    }
}

fn refit(c: &mut Criterion) {
    let mut project = big_project(1_000_000);
    let id = project.series[0].id;
    let mut fitter = Fitter::default();
    let start = Instant::now();
    fitter.update(&project.series, 0.0, true);
    eprintln!(
        "first analysis of 10⁶ points (from the cells): {:.2?}",
        start.elapsed()
    );
    let mut toggle = Toggle::default();
    let mut group = c.benchmark_group("refit, 10^6 points");
    group.sample_size(10);
    group.measurement_time(Duration::from_secs(10));
    group.bench_function("after an exclusion (the window's path)", |b| {
        b.iter(|| {
            toggle.next(&mut project, id);
            fitter.update(&project.series, 0.0, true);
            std::hint::black_box(fitter.get(id));
        })
    });
    group.bench_function(
        "estimates shown after an exclusion (the comparison follows)",
        |b| {
            b.iter_custom(|iters| {
                let mut shown = Duration::ZERO;
                for _ in 0..iters {
                    toggle.next(&mut project, id);
                    let rev = project.series[0].rev;
                    let start = Instant::now();
                    loop {
                        fitter.update(&project.series, 0.0, false);
                        if fitter.get(id).is_some_and(|a| a.rev == rev) {
                            break;
                        }
                        std::thread::sleep(Duration::from_micros(200));
                    }
                    shown += start.elapsed();
                    // The comparison, untimed, before the next exclusion.
                    while !fitter.running(&project.series).is_empty() {
                        std::thread::sleep(Duration::from_millis(1));
                        fitter.update(&project.series, 0.0, false);
                    }
                    let a = fitter.get(id).expect("fitted");
                    assert!(a.fit.as_deref().is_ok_and(|f| !f.comparison_pending()));
                }
                shown
            })
        },
    );
    let points = project.series[0].points().expect("points").measurements;
    let options = isochore_analysis::weighting::for_data_set(
        &project.series[0].data,
        *project.series[0].options(),
    )
    .expect("weighting")
    .options;
    group.bench_function("isochore_fit::fit alone", |b| {
        b.iter(|| std::hint::black_box(isochore_fit::fit(&points, &options).expect("fit")))
    });
    group.bench_function("analysis from the cells", |b| {
        b.iter(|| std::hint::black_box(analyse(&project.series[0])))
    });
    group.finish();
}

criterion_group!(benches, refit);
criterion_main!(benches);
