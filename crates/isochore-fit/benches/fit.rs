//! Speed of a complete van 't Hoff analysis: the fit with every per-point diagnostic, the
//! model comparison made inside `fit`, and confidence/prediction bands on a 200-point grid,
//! at n = 10, 10³ and 10⁶ points of seeded synthetic data (both models).
//!
//! Run with `cargo bench -p isochore-fit` (add `-- --quick` for a short run); the figures
//! are recorded in the crate README.

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use isochore_fit::{fit, FitOptions, Measurement, Model, GAS_CONSTANT};
use std::hint::black_box;

/// SplitMix64: a small seeded generator so every run sees the same data.
struct SplitMix(u64);

impl SplitMix {
    fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Uniform on (0, 1).
    fn uniform(&mut self) -> f64 {
        ((self.next_u64() >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }

    /// Standard normal (Box–Muller).
    fn normal(&mut self) -> f64 {
        let (u, v) = (self.uniform(), self.uniform());
        (-2.0 * u.ln()).sqrt() * (std::f64::consts::TAU * v).cos()
    }
}

/// n points between 5 and 65 °C of a binding with ΔH°(298.15 K) = −45 kJ/mol,
/// ΔS° = −60 J/(mol K), ΔCp° = −600 J/(mol K), σ(ln K) between 0.02 and 0.08.
fn data(n: usize, seed: u64) -> Vec<Measurement> {
    let mut rng = SplitMix(seed);
    (0..n)
        .map(|i| {
            let t = 278.15 + 60.0 * (i as f64 + rng.uniform()) / n as f64;
            let x = Model::CONSTANT_CP.row(t, 298.15);
            let sigma = 0.02 + 0.06 * rng.uniform();
            let ln_k = x[0] * -45e3 + x[1] * -60.0 + x[2] * -600.0 + sigma * rng.normal();
            Measurement::new(t, ln_k).with_sigma(sigma)
        })
        .collect()
}

fn analysis(points: &[Measurement], options: &FitOptions) -> usize {
    let f = fit(points, options).expect("synthetic data fit");
    let bands = f.band_grid(200, 0.1);
    f.points().len() + bands.len()
}

fn bench_fit(c: &mut Criterion) {
    let _ = GAS_CONSTANT;
    for model in [Model::LINEAR, Model::CONSTANT_CP] {
        let mut group = c.benchmark_group(format!("fit+diagnostics+bands/{}", model.key()));
        for &n in &[10usize, 1_000, 1_000_000] {
            if n >= 1_000_000 {
                group.sample_size(10);
            }
            let points = data(n, 2026);
            let options = FitOptions {
                model,
                ..FitOptions::default()
            };
            group.bench_with_input(BenchmarkId::from_parameter(n), &points, |b, pts| {
                b.iter(|| analysis(black_box(pts), black_box(&options)))
            });
        }
        group.finish();
    }
}

criterion_group!(benches, bench_fit);
criterion_main!(benches);
