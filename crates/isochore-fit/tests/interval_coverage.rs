//! Coverage of the 95 % intervals of every method (issue 13): 1000 synthetic data sets of
//! known truth, each fitted and given delta-method (Fieller for T at K = 1), Monte Carlo and
//! bootstrap intervals; the share that covers the truth should lie within 93.6–96.4 %
//! (95 % ± 2 binomial SDs at 1000 sets, √(0.95·0.05/1000) = 0.69 %). Slow, so ignored by
//! default: `cargo test -p isochore-fit --release --test fit interval_coverage -- --ignored
//! --nocapture` prints the table recorded in the crate README. `COVERAGE_SETS` and
//! `COVERAGE_DRAWS` change the 1000 sets and 999 draws.

use isochore_fit::intervals::{bootstrap, monte_carlo, BootstrapScheme, IntervalOptions};
use isochore_fit::{fit, FitOptions, Measurement, Model};

/// SplitMix64 with Box–Muller normals: the synthetic errors (a generator of the test's own,
/// independent of the one under test).
struct SplitMix(u64);

impl SplitMix {
    fn next(&mut self) -> f64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        (((z ^ (z >> 31)) >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }
    fn normal(&mut self) -> f64 {
        let (u, v) = (self.next(), self.next());
        (-2.0 * u.ln()).sqrt() * (std::f64::consts::TAU * v).cos()
    }
}

fn env(name: &str, default: usize) -> usize {
    std::env::var(name)
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(default)
}

/// One scenario: model, temperatures, σ(ln K), the true β, the quantities checked and their
/// true values.
struct Scenario {
    name: &'static str,
    model: Model,
    temps: Vec<f64>,
    sigma: f64,
    beta: Vec<f64>,
    truth: Vec<(&'static str, f64)>,
}

fn scenarios() -> Vec<Scenario> {
    let theta: f64 = 298.15;
    let r = isochore_fit::GAS_CONSTANT;
    // Invented: ΔH° = −40 kJ/mol, ΔS° = −133 J/(mol K), so K = 1 at 300.75 K, inside the
    // range; ΔCp° = −500 J/(mol K) for the curved case.
    let (h, s, cp) = (-40e3, -133.0, -500.0);
    let g = h - theta * s;
    let lin_temps: Vec<f64> = (0..8).map(|i| 278.15 + 50.0 * i as f64 / 7.0).collect();
    let cp_temps: Vec<f64> = (0..12).map(|i| 278.15 + 55.0 * i as f64 / 11.0).collect();
    vec![
        Scenario {
            name: "linear, n = 8, σ = 0.05",
            model: Model::LINEAR,
            temps: lin_temps,
            sigma: 0.05,
            beta: vec![h, s],
            truth: vec![
                ("delta_h", h),
                ("delta_s", s),
                ("delta_g_at_reference", g),
                ("k_at_reference", (-g / (r * theta)).exp()),
                ("t_at_k1", h / s),
            ],
        },
        Scenario {
            name: "constant ΔCp°, n = 12, σ = 0.05",
            model: Model::CONSTANT_CP,
            temps: cp_temps,
            sigma: 0.05,
            beta: vec![h, s, cp],
            truth: vec![
                ("delta_h", h),
                ("delta_s", s),
                ("delta_cp", cp),
                ("delta_g_at_reference", g),
                ("t_delta_h_zero", theta - h / cp),
            ],
        },
    ]
}

#[test]
#[ignore = "slow: 1000 data sets × 5 methods; run with --ignored (see the module comment)"]
fn intervals_cover_the_truth() {
    let sets = env("COVERAGE_SETS", 1000);
    let draws = env("COVERAGE_DRAWS", 999);
    let methods = [
        "delta",
        "monte carlo",
        "residuals, percentile",
        "residuals, BCa",
        "wild, percentile",
        "wild, BCa",
        "cases, percentile",
        "cases, BCa",
    ];
    let mut report = String::new();
    // The delta method and Monte Carlo on the quantities linear in β, where both are exact
    // in the limit, must cover within 93.0–97.0 % (±3 binomial SDs at 1000 sets, so that a
    // method with exact coverage fails a cell about 0.3 % of the time; the ±2 SD band
    // 93.6–96.4 % of the issue is what the README's table is read against). The other
    // cells are reported, and the README says where a method falls short.
    let mut failures: Vec<(&str, &str, &str, f64)> = Vec::new();
    for sc in scenarios() {
        let nq = sc.truth.len();
        let mut covered = vec![vec![0usize; nq]; methods.len()];
        let mut missing = vec![vec![0usize; nq]; methods.len()];
        let mut rng = SplitMix(20_261_203);
        let opts = FitOptions {
            model: sc.model,
            ..FitOptions::default()
        };
        for set in 0..sets {
            let pts: Vec<Measurement> = sc
                .temps
                .iter()
                .map(|&t| {
                    let x = sc.model.row(t, 298.15);
                    let mean: f64 = x.iter().zip(&sc.beta).map(|(a, b)| a * b).sum();
                    Measurement::new(t, mean + sc.sigma * rng.normal()).with_sigma(sc.sigma)
                })
                .collect();
            let f = fit(&pts, &opts).unwrap();
            let io = IntervalOptions {
                draws,
                seed: set as u64,
                ..Default::default()
            };
            let mc = monte_carlo(&pts, &f, None, &io).unwrap();
            let runs = [
                bootstrap(&pts, &f, BootstrapScheme::Residuals, &io).unwrap(),
                bootstrap(&pts, &f, BootstrapScheme::Wild, &io).unwrap(),
                bootstrap(&pts, &f, BootstrapScheme::Cases, &io).unwrap(),
            ];
            for (k, (key, truth)) in sc.truth.iter().enumerate() {
                let mut intervals: Vec<Option<(f64, f64)>> = Vec::new();
                let pair =
                    |lo: f64, hi: f64| (lo.is_finite() || hi.is_finite()).then_some((lo, hi));
                intervals.push(
                    mc.get(key)
                        .map(|q| pair(q.quantity.delta.ci_low, q.quantity.delta.ci_high))
                        .unwrap_or(None),
                );
                intervals.push(
                    mc.get(key)
                        .and_then(|q| pair(q.interval.ci_low, q.interval.ci_high)),
                );
                for run in &runs {
                    let q = run.get(key);
                    intervals.push(q.and_then(|q| pair(q.interval.ci_low, q.interval.ci_high)));
                    intervals.push(q.and_then(|q| q.bca).map(|b| (b.ci_low, b.ci_high)));
                }
                for (m, iv) in intervals.into_iter().enumerate() {
                    match iv {
                        Some((lo, hi)) => {
                            // A NaN end (undefined) does not cover; an infinite one does.
                            if lo <= *truth && *truth <= hi {
                                covered[m][k] += 1;
                            }
                        }
                        None => missing[m][k] += 1,
                    }
                }
            }
        }
        report.push_str(&format!(
            "\n{} — {sets} data sets, {draws} draws, 95 % intervals, % covering the truth (sets without an interval in brackets)\n{:<24}",
            sc.name, "method"
        ));
        for (key, _) in &sc.truth {
            report.push_str(&format!("{key:>22}"));
        }
        report.push('\n');
        for (m, name) in methods.iter().enumerate() {
            report.push_str(&format!("{name:<24}"));
            for k in 0..nq {
                let pct = 100.0 * covered[m][k] as f64 / sets as f64;
                let cell = if missing[m][k] > 0 {
                    format!("{pct:.1} ({})", missing[m][k])
                } else {
                    format!("{pct:.1}")
                };
                report.push_str(&format!("{cell:>22}"));
            }
            report.push('\n');
        }
        failures.extend(
            (0..2)
                .flat_map(|m| sc.truth.iter().enumerate().map(move |(k, t)| (m, k, t.0)))
                .filter(|(_, _, key)| {
                    ["delta_h", "delta_s", "delta_cp", "delta_g_at_reference"].contains(key)
                })
                .map(|(m, k, key)| {
                    (
                        sc.name,
                        methods[m],
                        key,
                        100.0 * covered[m][k] as f64 / sets as f64,
                    )
                })
                .filter(|(.., pct)| sets >= 1000 && !(93.0..=97.0).contains(pct)),
        );
    }
    use std::io::Write;
    let _ = std::io::stderr().write_all(report.as_bytes());
    assert!(failures.is_empty(), "{failures:?}");
}
