//! BCa against `scipy.stats.bootstrap` (scipy 1.17.1, numpy 2.4.6) fed the same resamples:
//! `tests/data/independent/make_bca.py` wrote the resample indices scipy drew, its
//! bootstrap values, the jackknife values and its BCa interval of ΔH° (unweighted linear
//! van 't Hoff fit of an invented data set) into `bca_scipy.txt`. Here every resample is
//! refitted with `isochore_fit::fit` and the interval made by `intervals::bca_interval`.

use crate::common::{reference_table, REL};
use isochore_fit::intervals::{bca_interval, mean_sd};
use isochore_fit::{fit, FitOptions, Measurement, Weighting};

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * b.abs().max(1e-300)
}

#[test]
fn bca_matches_scipy_on_the_same_resamples() {
    let tab = reference_table("independent/bca_scipy.txt");
    let t = &tab["t_k"];
    let ln_k = &tab["ln_k"];
    let n = t.len();
    let opts = FitOptions {
        weighting: Weighting::Unweighted,
        ..FitOptions::default()
    };
    let delta_h = |idx: &[usize]| -> f64 {
        let pts: Vec<Measurement> = idx
            .iter()
            .map(|&j| Measurement::new(t[j], ln_k[j]))
            .collect();
        fit(&pts, &opts).expect("resample fits").delta_h().value
    };
    let all: Vec<usize> = (0..n).collect();
    let theta_hat = delta_h(&all);
    // scipy's θ̂ (make_bca.py).
    assert!(close(theta_hat, tab["theta_hat"][0], REL));
    let jack: Vec<f64> = (0..n)
        .map(|i| {
            let rest: Vec<usize> = all.iter().copied().filter(|&j| j != i).collect();
            delta_h(&rest)
        })
        .collect();
    for (a, b) in jack.iter().zip(&tab["jackknife"]) {
        assert!(close(*a, *b, REL), "jackknife {a} vs scipy {b}");
    }
    let mut boot = Vec::new();
    let mut b = 0;
    while let Some(row) = tab.get(&format!("idx{b}")) {
        let idx: Vec<usize> = row[..n].iter().map(|&v| v as usize).collect();
        let v = delta_h(&idx);
        // scipy's statistic on the same resample.
        assert!(close(v, row[n], REL), "resample {b}: {v} vs {}", row[n]);
        boot.push(v);
        b += 1;
    }
    assert_eq!(boot.len(), 2000);
    // scipy's standard_error is the SD of the bootstrap distribution (ddof = 1).
    assert!(close(mean_sd(&boot).1, tab["boot_se"][0], REL));
    boot.sort_by(f64::total_cmp);
    let level = tab["level"][0];
    let (lo, hi) = bca_interval(&boot, theta_hat, &jack, level).expect("BCa defined");
    // scipy.stats.bootstrap(method="BCa") on the same statistics (make_bca.py).
    assert!(
        close(lo, tab["bca_low"][0], REL),
        "{lo} vs {}",
        tab["bca_low"][0]
    );
    assert!(
        close(hi, tab["bca_high"][0], REL),
        "{hi} vs {}",
        tab["bca_high"][0]
    );
}
