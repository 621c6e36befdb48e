//! Speed of the resampled intervals (issue 13): 10⁴ Monte Carlo draws of a 20-point
//! constant-ΔCp° fit, and 10⁴ bootstrap draws of the same fit (residuals, wild, cases), each
//! with every reported quantity (parameters, ΔG° and K at θ and T_hm, ΔH° and ΔS° at T_hm,
//! T at K = 1, T where ΔH° = 0) and, for the bootstrap, the jackknife and BCa intervals;
//! and Monte Carlo with σ(T) = 0.1 K, each draw refitted by the orthogonal-distance fit.
//! The fit itself is outside the timing. Issue 13's target: under 50 ms each on the 2-core
//! machine.
//!
//! Run with `cargo bench -p isochore-fit --bench intervals`; the figures are recorded in the
//! crate README.

use criterion::{criterion_group, criterion_main, Criterion};
use isochore_fit::intervals::{bootstrap, monte_carlo, BootstrapScheme, IntervalOptions};
use isochore_fit::{fit, FitOptions, Measurement, Model};
use std::hint::black_box;

/// 20 points, 5–60 °C, of an invented binding with ΔH°(θ) = −45 kJ/mol, ΔS° = −60
/// J/(mol K), ΔCp° = −600 J/(mol K), σ(ln K) = 0.03 and fixed made-up errors.
fn data() -> Vec<Measurement> {
    (0..20)
        .map(|i| {
            let t = 278.15 + 55.0 * i as f64 / 19.0;
            let x = Model::CONSTANT_CP.row(t, 298.15);
            let err = 0.03 * (((i * 7919) % 13) as f64 / 6.0 - 1.0);
            let ln_k = x[0] * -45e3 + x[1] * -60.0 + x[2] * -600.0 + err;
            Measurement::new(t, ln_k).with_sigma(0.03)
        })
        .collect()
}

fn bench_intervals(c: &mut Criterion) {
    let pts = data();
    let options = FitOptions {
        model: Model::CONSTANT_CP,
        ..FitOptions::default()
    };
    let f = fit(&pts, &options).expect("synthetic data fit");
    let io = IntervalOptions {
        draws: 10_000,
        seed: 42,
        ..Default::default()
    };
    let mut group = c.benchmark_group("intervals/cp-20-points/10000-draws");
    group.sample_size(20);
    group.bench_function("monte_carlo", |b| {
        b.iter(|| monte_carlo(black_box(&pts), black_box(&f), None, &io).unwrap())
    });
    // With σ(T) = 0.1 K: every draw refitted by the orthogonal-distance fit (issue 13).
    let sigma_t = vec![0.1; pts.len()];
    group.bench_function("monte_carlo_sigma_t_orthogonal_distance", |b| {
        b.iter(|| monte_carlo(black_box(&pts), black_box(&f), Some(&sigma_t), &io).unwrap())
    });
    for scheme in [
        BootstrapScheme::Residuals,
        BootstrapScheme::Wild,
        BootstrapScheme::Cases,
    ] {
        group.bench_function(format!("bootstrap_{}", scheme.key()), |b| {
            b.iter(|| bootstrap(black_box(&pts), black_box(&f), scheme, &io).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, bench_intervals);
criterion_main!(benches);
