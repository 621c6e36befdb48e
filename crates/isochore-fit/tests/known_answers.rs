//! Known-answer checks of the engine's own formulas, each against an independent route to
//! the same number: derived quantities against finite differences of ln K(T) = x(T)·β,
//! the ellipse against its defining quadratic form, bands against `predict`, the
//! harmonic-mean temperature against the correlations it is meant to reduce, and the
//! excluded point's prediction residual against a refit without it.

use isochore_fit::{
    fit, FitOptions, Measurement, Model, SigmaConvention, VantHoffFit, GAS_CONSTANT,
};
use statrs::distribution::{ContinuousCDF, FisherSnedecor};

const THETA: f64 = 298.15;

/// Invented curved data (ΔH°(θ) = −45 kJ/mol, ΔS°(θ) = −60 J/(mol K), ΔCp° = −600
/// J/(mol K)) with fixed wobbles and unequal σ.
fn curved() -> Vec<Measurement> {
    let wobble = [
        0.012, -0.02, 0.007, 0.015, -0.011, 0.0, -0.018, 0.021, -0.004, 0.009,
    ];
    (0..10)
        .map(|i| {
            let t = 278.15 + 5.0 * i as f64;
            let x = Model::CONSTANT_CP.row(t, THETA);
            let y = x[0] * -45e3 + x[1] * -60.0 + x[2] * -600.0 + wobble[i];
            Measurement::new(t, y).with_sigma(0.01 + 0.003 * i as f64)
        })
        .collect()
}

fn options(model: Model) -> FitOptions {
    FitOptions {
        model,
        ..FitOptions::default()
    }
}

/// ln K(T; β) = x(T)·β, straight from the model's design row.
fn ln_k(f: &VantHoffFit, t: f64, beta: &[f64]) -> f64 {
    let row = f.model().row(t, f.options().t_ref_k);
    beta.iter().zip(row).map(|(b, x)| b * x).sum()
}

/// ΔG°, ΔH°, ΔS° at T from ln K(T; β) alone: ΔG° = −RT ln K, ΔH° = −R d ln K/d(1/T)
/// (central difference), ΔS° = (ΔH° − ΔG°)/T.
fn thermo_fd(f: &VantHoffFit, t: f64, beta: &[f64]) -> [f64; 3] {
    let r = GAS_CONSTANT;
    let dg = -r * t * ln_k(f, t, beta);
    let u = 1.0 / t;
    let h = 1e-4 * u;
    let dlnk_du = (ln_k(f, 1.0 / (u + h), beta) - ln_k(f, 1.0 / (u - h), beta)) / (2.0 * h);
    let dh = -r * dlnk_du;
    [dg, dh, (dh - dg) / t]
}

/// √(gᵀ Σ g) with g the finite-difference gradient of `q(β)` (exact for linear q up to
/// rounding).
fn se_fd(f: &VantHoffFit, q: impl Fn(&[f64]) -> f64) -> f64 {
    let beta = f.coefficients();
    let p = beta.len();
    let g: Vec<f64> = (0..p)
        .map(|j| {
            let step = 1e-3 * beta[j].abs().max(1.0);
            let mut up = beta.clone();
            let mut down = beta.clone();
            up[j] += step;
            down[j] -= step;
            (q(&up) - q(&down)) / (2.0 * step)
        })
        .collect();
    let mut v = 0.0;
    for a in 0..p {
        for b in 0..p {
            v += g[a] * f.covariance()[a][b] * g[b];
        }
    }
    v.sqrt()
}

#[test]
fn derived_quantities_match_finite_differences() {
    for model in [Model::LINEAR, Model::CONSTANT_CP] {
        let f = fit(&curved(), &options(model)).unwrap();
        let beta = f.coefficients();
        for t in [270.0, 298.15, 310.0, 330.0, 360.0] {
            let [dg, dh, ds] = thermo_fd(&f, t, &beta);
            let got_g = f.delta_g(t);
            let got_h = f.delta_h_at(t);
            let got_s = f.delta_s_at(t);
            // Values: the difference quotient of a smooth function, step 1e-4 relative.
            assert!(
                (got_g.value - dg).abs() < 1e-9 * dg.abs().max(1e3),
                "{model:?} ΔG {t}"
            );
            assert!(
                (got_h.value - dh).abs() < 1e-5 * dh.abs(),
                "{model:?} ΔH {t}: {} vs {dh}",
                got_h.value
            );
            assert!(
                (got_s.value - ds).abs() < 1e-5 * dh.abs() / t,
                "{model:?} ΔS {t}"
            );
            // Delta-method SEs: gradients with respect to β by finite differences.
            let se_g = se_fd(&f, |b| thermo_fd(&f, t, b)[0]);
            let se_h = se_fd(&f, |b| thermo_fd(&f, t, b)[1]);
            let se_s = se_fd(&f, |b| thermo_fd(&f, t, b)[2]);
            assert!((got_g.se - se_g).abs() < 1e-6 * se_g, "{model:?} SE ΔG {t}");
            assert!((got_h.se - se_h).abs() < 1e-4 * se_h, "{model:?} SE ΔH {t}");
            assert!((got_s.se - se_s).abs() < 1e-4 * se_s, "{model:?} SE ΔS {t}");
            // predict() agrees with ln K = x·β and with ΔG° = −RT ln K.
            let p = f.predict(t).unwrap();
            assert!(
                (p.ln_k.value - ln_k(&f, t, &beta)).abs() < 1e-12 * p.ln_k.value.abs().max(1.0)
            );
            assert!(
                (p.delta_g.value + GAS_CONSTANT * t * p.ln_k.value).abs()
                    < 1e-9 * p.delta_g.value.abs().max(1.0)
            );
            assert!((p.ln_k.se - se_fd(&f, |b| ln_k(&f, t, b))).abs() < 1e-6 * p.ln_k.se);
        }
    }
}

#[test]
fn ellipse_points_lie_on_the_quadratic_form() {
    for (model, convention) in [
        (Model::LINEAR, SigmaConvention::ScaledByFit),
        (Model::CONSTANT_CP, SigmaConvention::ScaledByFit),
        (Model::LINEAR, SigmaConvention::Absolute),
    ] {
        let f = fit(
            &curved(),
            &FitOptions {
                model,
                convention,
                ..FitOptions::default()
            },
        )
        .unwrap();
        let level = 0.95;
        // Radius²: 2·F(0.95; 2, n − p) (scaled) from statrs' F CDF inverted here by
        // bisection, or χ²(0.95; 2) = −2 ln 0.05 (absolute σ; closed form for 2 dof).
        let r2 = match convention {
            SigmaConvention::Absolute => -2.0 * (0.05f64).ln(),
            SigmaConvention::ScaledByFit => {
                let d = FisherSnedecor::new(2.0, f.dof() as f64).unwrap();
                let (mut lo, mut hi) = (0.0, 1e3);
                for _ in 0..200 {
                    let mid = 0.5 * (lo + hi);
                    if d.cdf(mid) < level {
                        lo = mid;
                    } else {
                        hi = mid;
                    }
                }
                2.0 * lo
            }
        };
        if model == Model::LINEAR && convention == SigmaConvention::ScaledByFit {
            // F(0.95; 2, 8) = 4.459 (F-distribution table, from memory).
            assert!((r2 / 2.0 - 4.459).abs() < 1e-3, "{}", r2 / 2.0);
        }
        let c = &f.covariance();
        let det = c[0][0] * c[1][1] - c[0][1] * c[0][1];
        let inv = [
            [c[1][1] / det, -c[0][1] / det],
            [-c[0][1] / det, c[0][0] / det],
        ];
        let (h0, s0) = (f.delta_h().value, f.delta_s().value);
        let poly = f.ellipse(level, 72).unwrap();
        assert_eq!(poly.len(), 72);
        for v in &poly {
            let (a, b) = (v[0] - h0, v[1] - s0);
            let q = a * a * inv[0][0] + 2.0 * a * b * inv[0][1] + b * b * inv[1][1];
            assert!(
                (q - r2).abs() < 1e-7 * r2,
                "{model:?} {convention:?}: {q} vs {r2}"
            );
        }
    }
}

#[test]
fn band_at_a_data_temperature_equals_predict() {
    for model in [Model::LINEAR, Model::CONSTANT_CP] {
        let f = fit(&curved(), &options(model)).unwrap();
        for m in curved() {
            let b = f.bands(&[1.0 / m.t_k])[0];
            let p = f.predict(m.t_k).unwrap();
            let close = |a: f64, b: f64| (a - b).abs() <= 1e-12 * b.abs().max(1.0);
            assert!(close(b.ln_k, p.ln_k.value));
            assert!(close(b.ci_low, p.ln_k.ci.low) && close(b.ci_high, p.ln_k.ci.high));
            assert!(close(b.pi_low, p.ln_k.pi.low) && close(b.pi_high, p.ln_k.pi.high));
            // And the fitted value there is the point's own fitted value.
            let d = f.points().iter().find(|d| d.t_k == m.t_k).unwrap();
            assert!(close(d.fitted, p.ln_k.value));
        }
    }
}

/// corr(u·β, v·β) from the fit's covariance.
fn corr(f: &VantHoffFit, u: &[f64], v: &[f64]) -> f64 {
    let q = |a: &[f64], b: &[f64]| -> f64 {
        let mut s = 0.0;
        for (ai, row) in a.iter().zip(f.covariance()) {
            for (bj, c) in b.iter().zip(row) {
                s += ai * c * bj;
            }
        }
        s
    };
    q(u, v) / (q(u, u) * q(v, v)).sqrt()
}

#[test]
fn harmonic_mean_temperature_decorrelates() {
    // Data well away from θ, so θ and T_h differ: 320–365 K.
    let pts: Vec<Measurement> = curved()
        .iter()
        .map(|m| {
            let t = m.t_k + 42.0;
            let x = Model::CONSTANT_CP.row(t, THETA);
            Measurement::new(
                t,
                x[0] * -45e3 + x[1] * -60.0 + x[2] * -600.0 + (m.ln_k - ln_model(m.t_k)),
            )
            .with_sigma(m.sigma_ln_k.unwrap())
        })
        .collect();
    let f = fit(&pts, &options(Model::CONSTANT_CP)).unwrap();
    let th = f.t_harmonic_k();
    // T_h is the weighted harmonic mean, computed here from the points.
    let (sw, swt) = pts.iter().fold((0.0, 0.0), |(a, b), m| {
        let w = 1.0 / m.sigma_ln_k.unwrap().powi(2);
        (a + w, b + w / m.t_k)
    });
    assert!((th - sw / swt).abs() < 1e-9 * th);
    let grads = |t: f64| {
        let dh = [1.0, 0.0, t - THETA];
        let ds = [0.0, 1.0, (t / THETA).ln()];
        let dg = [1.0, -t, (t - THETA) - t * (t / THETA).ln()];
        (dh, ds, dg)
    };
    let (h_th, s_th, g_th) = grads(th);
    let (h_0, s_0, g_0) = grads(THETA);
    let c_hs_th = corr(&f, &h_th, &s_th);
    let c_hs_0 = corr(&f, &h_0, &s_0);
    let c_hg_th = corr(&f, &h_th, &g_th);
    let c_hg_0 = corr(&f, &h_0, &g_0);
    eprintln!(
        "T_h = {th:.2} K: corr(ΔH°, ΔS°) = {c_hs_th:.6} (at θ: {c_hs_0:.6}); corr(ΔH°, ΔG°) = {c_hg_th:.6} (at θ: {c_hg_0:.6})"
    );
    // The reported values at T_h carry exactly these uncertainties.
    assert!(
        (f.at_harmonic().delta_h.se - se_of(&f, &h_th)).abs() < 1e-9 * f.at_harmonic().delta_h.se
    );
    // Re-expressed at T_h, ΔH° and ΔS° are less correlated than at θ (the design is centred
    // near T_h), though
    // only slightly: ΔS° = (ΔH° − ΔG°)/T keeps them near ±1 at any temperature …
    assert!(c_hs_th.abs() < c_hs_0.abs());
    // … and ΔG°(T_h) is much less correlated with ΔH°(T_h) than at θ.
    assert!(c_hg_th.abs() < 0.6 * c_hg_0.abs());

    // Linear model: ΔG°(T_h) and ΔH° are exactly uncorrelated (the centred 1/T design).
    let lin = fit(&pts, &options(Model::LINEAR)).unwrap();
    let c = corr(&lin, &[1.0, 0.0], &[1.0, -lin.t_harmonic_k()]);
    assert!(c.abs() < 1e-9, "{c}");
}

fn se_of(f: &VantHoffFit, g: &[f64]) -> f64 {
    let mut s = 0.0;
    for a in 0..g.len() {
        for b in 0..g.len() {
            s += g[a] * f.covariance()[a][b] * g[b];
        }
    }
    s.sqrt()
}

fn ln_model(t: f64) -> f64 {
    let x = Model::CONSTANT_CP.row(t, THETA);
    x[0] * -45e3 + x[1] * -60.0 + x[2] * -600.0
}

#[test]
fn excluded_point_residual_matches_a_refit_without_it() {
    for model in [Model::LINEAR, Model::CONSTANT_CP] {
        for convention in [SigmaConvention::ScaledByFit, SigmaConvention::Absolute] {
            for k in [0usize, 4, 9] {
                let mut pts = curved();
                pts[k].ln_k += 0.1; // push it off the curve
                pts[k].included = false;
                let opts = FitOptions {
                    model,
                    convention,
                    ..FitOptions::default()
                };
                let with = fit(&pts, &opts).unwrap();
                let z = with.points()[k].prediction_residual.unwrap();
                // Independent route: fit the other nine points only, predict at T_k.
                let rest: Vec<Measurement> = pts
                    .iter()
                    .enumerate()
                    .filter(|(i, _)| *i != k)
                    .map(|(_, m)| Measurement {
                        included: true,
                        ..*m
                    })
                    .collect();
                let refit = fit(&rest, &opts).unwrap();
                let p = refit.predict(pts[k].t_k).unwrap();
                let s2 = match convention {
                    SigmaConvention::ScaledByFit => refit.stats().reduced_chi2,
                    SigmaConvention::Absolute => 1.0,
                };
                let w = 1.0 / pts[k].sigma_ln_k.unwrap().powi(2);
                let want = (pts[k].ln_k - p.ln_k.value) / (s2 / w + p.ln_k.se.powi(2)).sqrt();
                assert!(
                    (z - want).abs() < 1e-9 * want.abs(),
                    "{model:?} {convention:?} {k}: {z} vs {want}"
                );
                // Estimates equal the refit's.
                for (a, b) in with.coefficients().iter().zip(refit.coefficients()) {
                    assert!((a - b).abs() <= 1e-12 * b.abs());
                }
            }
        }
    }
}

#[test]
fn temperature_for_k_finds_the_root_nearest_the_data() {
    // ln K with a maximum inside the range: ΔH°(θ) = 0 at θ, ΔCp° = −2000 J/(mol K), so
    // ΔH°(T) changes sign at θ and ln K peaks there (invented, exact data).
    let pts: Vec<Measurement> = (0..9)
        .map(|i| {
            let t = 278.15 + 5.0 * i as f64;
            let x = Model::CONSTANT_CP.row(t, THETA);
            Measurement::new(t, x[1] * 20.0 + x[2] * -2000.0).with_sigma(0.01)
        })
        .collect();
    let f = fit(&pts, &options(Model::CONSTANT_CP)).unwrap();
    let peak = f.predict(THETA).unwrap().ln_k.value;
    for drop in [0.01, 0.1, 0.5] {
        let target = (peak - drop).exp();
        let got = f.temperature_for_k(target).unwrap().value;
        // Independent route: a fine scan of ln K(T) − ln target for sign changes
        // (step 1 mK), keeping the crossing nearest T_h.
        let mut best: Option<f64> = None;
        let mut t = 200.0;
        let g = |t: f64| ln_k(&f, t, &f.coefficients()) - target.ln();
        while t < 400.0 {
            if g(t).signum() != g(t + 1e-3).signum() {
                let c = t + 5e-4;
                if best.is_none_or(|b: f64| {
                    (c - f.t_harmonic_k()).abs() < (b - f.t_harmonic_k()).abs()
                }) {
                    best = Some(c);
                }
            }
            t += 1e-3;
        }
        let want = best.unwrap();
        assert!((got - want).abs() < 1e-3, "drop {drop}: {got} vs {want}");
        assert!(g(got).abs() < 1e-9, "{}", g(got));
    }
    // Above the peak there is no solution.
    assert!(f.temperature_for_k((peak + 0.1).exp()).is_err());
}

#[test]
fn h_g_region_is_upright_for_the_linear_model_and_sized_by_the_two_ses() {
    // Krug, Hunter & Grieger (1976): for the linear model ΔG°(T_hm) is uncorrelated with
    // ΔH°, with T_hm = Σw/Σ(w/T). So the region is an upright ellipse whose half-widths
    // are √(radius²)·SE(ΔH°) and √(radius²)·SE(ΔG°(T_hm)), the radius being that of the
    // ΔH°–ΔS° ellipse (2·F(0.95; 2, n − p), computed from the first region's own points).
    let f = fit(&curved(), &options(Model::LINEAR)).unwrap();
    let g = f.delta_g(f.t_harmonic_k());
    let h = f.delta_h();
    let poly = f.h_g_region(0.95, 400).unwrap();
    let (xmin, xmax) = poly
        .iter()
        .fold((f64::MAX, f64::MIN), |(a, b), v| (a.min(v[0]), b.max(v[0])));
    let (ymin, ymax) = poly
        .iter()
        .fold((f64::MAX, f64::MIN), |(a, b), v| (a.min(v[1]), b.max(v[1])));
    // The ΔH° extent of the ΔH°–ΔS° ellipse is √(radius²)·SE(ΔH°) as well.
    let hs = f.ellipse(0.95, 400).unwrap();
    let hs_half = hs
        .iter()
        .map(|v| (v[0] - h.value).abs())
        .fold(0.0, f64::max);
    let r = hs_half / h.se;
    assert!(((xmax - xmin) / 2.0 - r * h.se).abs() < 1e-9 * h.se * r);
    // A 400-gon's extent is the ellipse's to cos(π/400) (y extent is not at a vertex).
    assert!(((ymax - ymin) / 2.0 / (r * g.se) - 1.0).abs() < 1e-4);
    // Upright: the vertex of largest ΔH° sits at the centre's ΔG°.
    let right = poly
        .iter()
        .cloned()
        .fold([f64::MIN, 0.0], |m, v| if v[0] > m[0] { v } else { m });
    assert!(
        (right[1] - g.value).abs() < 1e-6 * g.se,
        "{} vs {}",
        right[1],
        g.value
    );
    // For the ΔCp° model the region still centres on the two estimates.
    let c = fit(&curved(), &options(Model::CONSTANT_CP)).unwrap();
    let t = c.t_harmonic_k();
    let poly = c.h_g_region(0.95, 64).unwrap();
    let cx = poly.iter().map(|v| v[0]).sum::<f64>() / 64.0;
    let cy = poly.iter().map(|v| v[1]).sum::<f64>() / 64.0;
    assert!((cx - c.delta_h_at(t).value).abs() < 1e-6 * c.delta_h_at(t).se);
    assert!((cy - c.delta_g(t).value).abs() < 1e-6 * c.delta_g(t).se);
}
