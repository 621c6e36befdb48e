//! The streamed χ² against the stored-matrix solver, bit for bit, on many invented data
//! sets: every shipped model, weighted and unweighted, θ near and far from the data, points
//! left out, sizes about every multiple of eight (nalgebra's eight partial sums) and up to
//! tens of thousands of rows.

use super::*;
use crate::least_squares::weighted_rss_formed;
use proptest::prelude::*;

/// SplitMix64 (a fixed stream for the invented data).
struct Mix(u64);

impl Mix {
    fn next(&mut self) -> f64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        ((z ^ (z >> 31)) >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// Invented points: `n` temperatures over `span` K from `t0`, gently curved ln K with
/// noise `noise`, σ between 0.01 and 0.05, every `skip`-th point left out (0: none).
fn points(n: usize, t0: f64, span: f64, noise: f64, skip: usize, start: u64) -> Vec<Measurement> {
    let mut g = Mix(start);
    (0..n)
        .map(|i| {
            let t = t0 + span * (i as f64 + 0.5 * g.next()) / n as f64;
            let x = Model::CONSTANT_CP.row(t, 298.15);
            let y = x[0] * -40e3 + x[1] * -50.0 + x[2] * -700.0 + noise * (g.next() - 0.5);
            let m = Measurement::new(t, y).with_sigma(0.01 + 0.04 * g.next());
            if skip > 0 && i % skip == skip - 1 {
                m.excluded()
            } else {
                m
            }
        })
        .collect()
}

/// The stored-matrix solver's χ² on the same points (what `chi2_on_points` did before).
fn formed(model: Model, theta: f64, pts: &[Measurement], weighted: bool) -> Option<f64> {
    let used: Vec<&Measurement> = pts.iter().filter(|p| p.included).collect();
    let t: Vec<f64> = used.iter().map(|p| p.t_k).collect();
    let y: Vec<f64> = used.iter().map(|p| p.ln_k).collect();
    let w = weighted.then(|| {
        used.iter()
            .map(|p| {
                let s = p.sigma_ln_k.unwrap();
                1.0 / (s * s)
            })
            .collect()
    });
    weighted_rss_formed(model, theta, &t, y, w).ok()
}

/// Compares the two on one data set; true when the streamed path gave an answer.
fn same_bits(model: Model, theta: f64, pts: &[Measurement], weighted: bool) -> bool {
    let streamed = weighted_rss_streamed(model, theta, pts, weighted);
    // Every point's ln(T/θ) given, as the fit's streaming path keeps them: read from the
    // caller's memory when every point is used, picked out otherwise; the same bits.
    let logs: Vec<f64> = pts.iter().map(|p| (p.t_k / theta).ln()).collect();
    let given = weighted_rss_streamed_with_logs(model, theta, pts, weighted, Some(&logs));
    assert_eq!(streamed.map(f64::to_bits), given.map(f64::to_bits));
    if let Some(s) = streamed {
        let f = formed(model, theta, pts, weighted).expect("the stored solver solves it");
        assert_eq!(
            s.to_bits(),
            f.to_bits(),
            "{} θ = {theta} n = {} weighted = {weighted}: {s:e} against {f:e}",
            model.key(),
            pts.len()
        );
        true
    } else {
        false
    }
}

#[test]
fn streamed_chi2_is_the_stored_solver_s_to_the_bit() {
    let models = [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW];
    let mut answered = 0;
    let mut tried = 0;
    // Answers by the refinement steps taken: none, one, two, three or more.
    let mut steps = [0usize; 4];
    let sizes: Vec<usize> = (4..=40).chain([63, 64, 65, 127, 1000, 4097]).collect();
    for (c, &n) in sizes.iter().enumerate() {
        for model in models {
            for theta in [298.15, 310.0] {
                for weighted in [true, false] {
                    for (noise, skip) in [(0.02, 0), (0.2, 3)] {
                        let pts = points(n, 278.15, 40.0, noise, skip, c as u64 * 97 + 5);
                        if pts.iter().filter(|p| p.included).count() <= model.n_params() {
                            continue;
                        }
                        tried += 1;
                        LAST_STEPS.with(|c| c.set(0));
                        let same = same_bits(model, theta, &pts, weighted);
                        answered += usize::from(same);
                        if same {
                            let s = LAST_STEPS.with(|c| c.get());
                            steps[s.min(3)] += 1;
                        }
                    }
                }
            }
        }
    }
    // Most of these need no refinement; the rest fall back, which is allowed, but a
    // streamed path that never answers would test nothing.
    assert!(answered * 2 > tried, "{answered} of {tried} answered");
    assert!(steps[1] > 0, "no answer was refined: {steps:?}");
}

#[test]
fn a_large_set_and_the_fallbacks() {
    // 30 011 points over 5–60 °C (a tail of 3 rows after the eight partial sums).
    let pts = points(30_011, 278.15, 55.0, 0.05, 101, 11);
    for model in [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW] {
        assert!(same_bits(model, 298.15, &pts, true), "{}", model.key());
    }
    // 40 003 points, every one used: the passes are shared with a second thread by lanes
    // (from 4 096 whole blocks of eight), and three rows follow the last whole block.
    let all = points(40_003, 278.15, 55.0, 0.05, 0, 12);
    for model in [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW] {
        for weighted in [true, false] {
            assert!(
                same_bits(model, 298.15, &all, weighted),
                "{} weighted {weighted}",
                model.key()
            );
        }
    }
    // One temperature: rank deficient, left to the stored solver (which names the error).
    let one: Vec<Measurement> = (0..10)
        .map(|i| Measurement::new(300.0, i as f64).with_sigma(0.1))
        .collect();
    assert_eq!(
        weighted_rss_streamed(Model::LINEAR, 298.15, &one, true),
        None
    );
    // A weighted point without σ, fewer points than columns: not streamed.
    let mut no_sigma = points(10, 280.0, 30.0, 0.02, 0, 1);
    no_sigma[3].sigma_ln_k = None;
    assert_eq!(
        weighted_rss_streamed(Model::LINEAR, 298.15, &no_sigma, true),
        None
    );
    assert_eq!(
        weighted_rss_streamed(Model::CLARKE_GLEW, 298.15, &no_sigma[..3], true),
        None
    );
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]
    #[test]
    fn streamed_chi2_matches_on_random_sets(
        n in 5usize..300,
        t0 in 250.0f64..350.0,
        span in 5.0f64..80.0,
        noise in 0.0f64..1.0,
        skip in 0usize..6,
        start in 0u64..1_000_000,
        model in 0usize..3,
        theta in 260.0f64..340.0,
        weighted in any::<bool>(),
    ) {
        let model = [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW][model];
        let pts = points(n, t0, span, noise, skip, start);
        prop_assume!(pts.iter().filter(|p| p.included).count() > model.n_params());
        same_bits(model, theta, &pts, weighted);
    }
}

/// R and Qᵀb of the streamed passes against nalgebra's QR of the stored matrix.
fn same_factor(model: Model, theta: f64, pts: &[Measurement], weighted: bool) {
    let _ = weighted_rss_streamed(model, theta, pts, weighted);
    let (r, qtb, scale) = LAST_QR.with(|c| c.borrow_mut().take()).expect("factorised");
    let p = model.n_params();
    let used: Vec<&Measurement> = pts.iter().filter(|p| p.included).collect();
    let n = used.len();
    let mut a = DMatrix::<f64>::zeros(n, p);
    let mut b = DVector::<f64>::zeros(n);
    let mut row = vec![0.0; p];
    for (i, m) in used.iter().enumerate() {
        model.row_into(m.t_k, theta, &mut row);
        let sw = if weighted {
            let s = m.sigma_ln_k.unwrap();
            (1.0 / (s * s)).sqrt()
        } else {
            1.0
        };
        for j in 0..p {
            a[(i, j)] = row[j] * sw * (1.0 / scale[j]);
        }
        b[i] = m.ln_k * sw;
    }
    let qr = a.qr();
    qr.q_tr_mul(&mut b);
    let r0 = qr.r();
    for k in 0..p {
        assert_eq!(qtb[k].to_bits(), b[k].to_bits(), "Qᵀb {k} n = {n}");
        for j in k..p {
            assert_eq!(
                r[(k, j)].to_bits(),
                r0[(k, j)].to_bits(),
                "R {k},{j} n = {n}"
            );
        }
    }
}

#[test]
fn streamed_factor_is_nalgebra_s() {
    for n in (4..=40).chain([63, 64, 65, 1000]) {
        for model in [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW] {
            for weighted in [true, false] {
                let pts = points(n, 278.15, 40.0, 0.1, 4, n as u64);
                if pts.iter().filter(|p| p.included).count() > model.n_params() {
                    same_factor(model, 298.15, &pts, weighted);
                }
            }
        }
    }
    // Every point used and over 4 096 whole blocks: the passes shared by lanes with a
    // second thread (a tail of five rows).
    let all = points(40_005, 278.15, 55.0, 0.05, 0, 21);
    for model in [Model::LINEAR, Model::CLARKE_GLEW] {
        same_factor(model, 310.0, &all, true);
    }
}

#[test]
fn several_refinement_steps_give_the_stored_solver_s_bits() {
    // Narrow temperature ranges far from θ make the Clarke–Glew design ill-conditioned
    // enough for the refinement to take several steps; each row's r and f, formed again at
    // every step from the corrections so far, give the bits the kept vectors gave.
    let mut most = 0;
    for span in [3.0, 1.0, 0.3] {
        for theta in [298.15, 350.0, 600.0] {
            for model in [Model::CONSTANT_CP, Model::CLARKE_GLEW] {
                let pts = points(2000, 290.0, span, 0.02, 7, 3);
                LAST_STEPS.with(|c| c.set(0));
                assert!(same_bits(model, theta, &pts, true), "{span} {theta}");
                most = most.max(LAST_STEPS.with(|c| c.get()));
            }
        }
    }
    assert!(
        most >= 3,
        "at most {most} steps: the test no longer reaches several"
    );
}
