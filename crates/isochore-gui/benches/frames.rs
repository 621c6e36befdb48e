//! Frame time of the workbench with a 10⁶-point series, headless: one egui pass (layout
//! of every panel, decimation of the plots) plus tessellation into triangles, while the
//! pointer drags (pans) the van 't Hoff plot. The GPU upload and the driver are not
//! included. The fit of the million points runs once, before timing, on the worker
//! thread; its duration is printed.
//!
//! A second group times the decimation alone on the same million points: one pass over
//! every visible point against the block index the window uses.
//!
//! Run: `cargo bench -p isochore-gui --bench frames`.

mod common;

use common::big_project;
use criterion::{criterion_group, criterion_main, Criterion};
use isochore_gui::{Prefs, Workbench};
use std::time::{Duration, Instant};

fn frames(c: &mut Criterion) {
    let mut bench = Workbench::new(Prefs::default());
    bench.block_fits = true;
    let start = Instant::now();
    let project = big_project(1_000_000);
    eprintln!("import of 10⁶ rows: {:.2?}", start.elapsed());
    bench.replace_project(project, false);
    bench.apply_pending();
    eprintln!(
        "fit of 10⁶ points (worker thread, waited for): {:.2?}",
        start.elapsed()
    );
    let ctx = egui::Context::default();
    let size = egui::vec2(1600.0, 1000.0);
    let mut t = 0.0;
    let mut x = 700.0f32;
    let mut dir = 1.0f32;
    let mut run = |ctx: &egui::Context, bench: &mut Workbench, events: Vec<egui::Event>| {
        t += 1.0 / 60.0;
        let input = egui::RawInput {
            screen_rect: Some(egui::Rect::from_min_size(egui::Pos2::ZERO, size)),
            time: Some(t),
            events,
            ..Default::default()
        };
        let out = ctx.run_ui(input, |ui| bench.frame(ui, t));
        let prims = ctx.tessellate(out.shapes, out.pixels_per_point);
        std::hint::black_box(prims);
    };
    // Warm up and press the button inside the plot.
    for _ in 0..5 {
        run(
            &ctx,
            &mut bench,
            vec![egui::Event::PointerMoved(egui::pos2(x, 250.0))],
        );
    }
    run(
        &ctx,
        &mut bench,
        vec![egui::Event::PointerButton {
            pos: egui::pos2(x, 250.0),
            button: egui::PointerButton::Primary,
            pressed: true,
            modifiers: egui::Modifiers::NONE,
        }],
    );
    let mut group = c.benchmark_group("workbench");
    group.sample_size(30);
    group.measurement_time(Duration::from_secs(15));
    group.bench_function("frame, 10^6 points, panning", |b| {
        b.iter(|| {
            x += 3.0 * dir;
            if !(500.0..900.0).contains(&x) {
                dir = -dir;
            }
            run(
                &ctx,
                &mut bench,
                vec![egui::Event::PointerMoved(egui::pos2(x, 250.0))],
            );
        })
    });
    group.finish();
    eprintln!(
        "markers drawn in the last frame: {}",
        bench.plot.drawn_markers
    );
}

fn decimation(c: &mut Criterion) {
    let n = 1_000_000usize;
    // x = 10³/T for 5–45 °C, y with a deterministic wiggle: a sorted, dense series.
    let xs: Vec<f64> = (0..n)
        .map(|i| 1e3 / (278.15 + 40.0 * i as f64 / n as f64))
        .collect();
    let ys: Vec<f64> = (0..n)
        .map(|i| 3.0 * xs[i] - 5.0 + 0.05 * ((i * 7919) % 101) as f64 / 101.0)
        .collect();
    let mut order: Vec<u32> = (0..n as u32).collect();
    order.sort_by(|&a, &b| xs[a as usize].total_cmp(&xs[b as usize]));
    let start = Instant::now();
    let index =
        isochore_gui::decimate::EnvelopeIndex::new((0..n).map(|i| (i as u32, xs[i], ys[i])));
    eprintln!(
        "envelope index of 10⁶ points built in {:.2?}",
        start.elapsed()
    );
    let (lo, hi) = index.x_range().expect("points");
    let mut group = c.benchmark_group("decimation, 10^6 points to 1000 columns");
    group.sample_size(20);
    group.measurement_time(Duration::from_secs(5));
    group.bench_function("one pass over the points", |b| {
        b.iter(|| isochore_gui::decimate::envelope(&|i| xs[i], &|i| ys[i], &order, lo, hi, 1000))
    });
    group.bench_function("block index", |b| b.iter(|| index.envelope(lo, hi, 1000)));
    group.finish();
}

criterion_group!(benches, frames, decimation);
criterion_main!(benches);
