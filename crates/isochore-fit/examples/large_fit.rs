//! A complete analysis (fit, every diagnostic, the model comparison, bands on a 200-point
//! grid) of n synthetic points, for measuring peak memory against n and for profiling:
//! `cargo run --release -p isochore-fit --example large_fit -- 1000000 cp` under
//! `/usr/bin/time -v` (maximum resident set size). Prints the wall time of the analysis and,
//! on Linux, the CPU time of this thread (from `/proc/thread-self/schedstat`), which a
//! machine loaded by other work does not inflate as it does the wall time. A third argument
//! repeats the analysis. `LARGE_FIT_FIRST=1` times `fit_estimates_first` and the pending
//! comparison (streamed over the points) instead, and checks the completed fit's comparison
//! against `fit`'s, bit for bit.

use isochore_fit::{fit, FitOptions, Measurement, Model};
use std::time::Instant;

fn main() {
    let mut args = std::env::args().skip(1);
    let n: usize = args
        .next()
        .and_then(|a| a.parse().ok())
        .unwrap_or(1_000_000);
    let model = match args.next().as_deref() {
        Some("cp") => Model::CONSTANT_CP,
        _ => Model::LINEAR,
    };
    let repeats: usize = args.next().and_then(|a| a.parse().ok()).unwrap_or(1);
    // Deterministic pseudo-noise (an additive recurrence), no generator crate needed.
    let mut u = 0.5f64;
    let points: Vec<Measurement> = (0..n)
        .map(|i| {
            u = (u + 0.618_033_988_749_894_9) % 1.0;
            let t = 278.15 + 60.0 * (i as f64 + 0.5) / n as f64;
            let x = Model::CONSTANT_CP.row(t, 298.15);
            let sigma = 0.02 + 0.06 * u;
            let noise = sigma * (u - 0.5) * 3.0;
            Measurement::new(t, x[0] * -45e3 + x[1] * -60.0 + x[2] * -600.0 + noise)
                .with_sigma(sigma)
        })
        .collect();
    let options = FitOptions {
        model,
        ..FitOptions::default()
    };
    if std::env::var_os("LARGE_FIT_PHASES").is_some() {
        phases(&points, model);
    }
    if std::env::var_os("LARGE_FIT_FIRST").is_some() {
        let shared = std::sync::Arc::new(points.clone());
        for _ in 0..repeats {
            let start = Instant::now();
            let (mut f, pending) =
                isochore_fit::fit_estimates_first(&shared, &options).expect("fit");
            let estimates = start.elapsed().as_secs_f64() * 1e3;
            if let Some(p) = pending {
                f.complete_comparison(p.run(&points));
            }
            let total = start.elapsed().as_secs_f64() * 1e3;
            println!(
                "n = {n}, model {}: estimates {estimates:.1} ms, with the comparison {total:.1} ms",
                model.key()
            );
        }
        let whole = fit(&points, &options).expect("fit");
        let (mut f, pending) = isochore_fit::fit_estimates_first(&shared, &options).expect("fit");
        if let Some(p) = pending {
            f.complete_comparison(p.run(&points));
        }
        assert_eq!(f.comparison(), whole.comparison());
        assert_eq!(f.warnings(), whole.warnings());
        return;
    }
    for _ in 0..repeats {
        let start = Instant::now();
        let cpu_start = thread_cpu_ns();
        match fit(&points, &options) {
            Ok(f) => {
                let bands = f.band_grid(200, 0.1);
                let wall = start.elapsed().as_secs_f64() * 1e3;
                let cpu = match (cpu_start, thread_cpu_ns()) {
                    (Some(a), Some(b)) => format!("{:.1} ms CPU", (b - a) as f64 / 1e6),
                    _ => "CPU time unavailable".to_string(),
                };
                println!(
                    "n = {n}, model {}: ΔH° = {:.1} J/mol, {} diagnostics, {} band points, {wall:.1} ms wall, {cpu}",
                    model.key(),
                    f.delta_h().value,
                    f.points().len(),
                    bands.len(),
                );
            }
            Err(e) => println!("n = {n}: {e}"),
        }
    }
}

/// CPU time of the calling thread in nanoseconds (Linux `/proc/thread-self/schedstat`,
/// first field: time spent on the CPU); `None` elsewhere.
fn thread_cpu_ns() -> Option<u64> {
    let s = std::fs::read_to_string("/proc/thread-self/schedstat").ok()?;
    s.split_whitespace().next()?.parse().ok()
}

/// Times the pieces of an analysis separately (set LARGE_FIT_PHASES=1).
fn phases(points: &[Measurement], model: Model) {
    use isochore_fit::least_squares::{solve, weighted_rss};
    let n = points.len();
    let p = model.n_params();
    let t0 = Instant::now();
    let x = nalgebra::DMatrix::from_fn(n, p, |i, j| model.row(points[i].t_k, 298.15)[j]);
    let y: Vec<f64> = points.iter().map(|m| m.ln_k).collect();
    let w: Vec<f64> = points
        .iter()
        .map(|m| m.sigma_ln_k.map_or(1.0, |s| 1.0 / (s * s)))
        .collect();
    let t1 = Instant::now();
    let full = solve(&x, &y, Some(&w)).expect("solve");
    let t2 = Instant::now();
    let rss = weighted_rss(&x, &y, Some(&w)).expect("rss");
    let t3 = Instant::now();
    let qr = x.clone().qr();
    let t4 = Instant::now();

    println!(
        "phases (ms): design {:.1}, solve {:.1}, rss-only {:.1}, bare nalgebra QR {:.1} (χ² {} = {})",
        (t1 - t0).as_secs_f64() * 1e3,
        (t2 - t1).as_secs_f64() * 1e3,
        (t3 - t2).as_secs_f64() * 1e3,
        (t4 - t3).as_secs_f64() * 1e3,
        full.rss,
        rss + 0.0 * qr.r()[(0, 0)],
    );
}
