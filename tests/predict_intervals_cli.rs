//! `vhfit predict --intervals monte-carlo|bootstrap` (issue 13): K and ΔG° at each asked
//! temperature and the temperature at the target K carry the chosen method's interval and
//! `method`, equal to isochore-fit's own run with the same draws, generator start value,
//! temperatures and target (isochore-fit's Monte Carlo is itself checked against the delta
//! method and its BCa against scipy.stats.bootstrap); ln K, ΔH°, ΔS° and the prediction
//! intervals stay the delta method's; without `--intervals` nothing changes; `--draws` with
//! the delta method is a usage error.
//!
//! Test input: the invented binding demo shipped in assets/demo.

use super::cli::{demo, json_of, library_fit, run};
use isochore_data::{import_path, ImportOptions};
use isochore_fit::intervals::{
    bootstrap, monte_carlo, BootstrapScheme, IntervalOptions, IntervalRun, QuantityKind,
};
use isochore_fit::FitOptions;
use serde_json::Value;

fn best(run: &IntervalRun, want: impl Fn(&QuantityKind) -> bool) -> [f64; 3] {
    let b = run
        .quantities
        .iter()
        .find(|q| want(&q.quantity.kind))
        .unwrap()
        .best();
    [b.se, b.ci_low, b.ci_high]
}

fn got(v: &Value) -> [f64; 3] {
    ["se", "ci_low", "ci_high"].map(|k| v[k].as_f64().unwrap())
}

#[test]
fn predict_takes_the_chosen_method_s_intervals() {
    let path = demo("binding_qx7_halo2.csv");
    let base = [
        "predict", &path, "--at", "37", "--for-k", "1e7", "--json", "--draws", "1500",
    ];
    let plain = json_of(&run(&[
        "predict", &path, "--at", "37", "--for-k", "1e7", "--json",
    ]));
    assert!(plain.get("intervals").is_none());
    let m = import_path(&path, &ImportOptions::default())
        .unwrap()
        .series[0]
        .measurements()
        .unwrap();
    let lib = library_fit(&path, &[], FitOptions::default());
    let t = 310.15;
    let opts = IntervalOptions {
        draws: 1500,
        seed: 1,
        temperatures: vec![t],
        k_targets: vec![1.0, 1e7],
    };
    for (method, key, want) in [
        (
            "monte-carlo",
            "monte_carlo",
            monte_carlo(&m, &lib, None, &opts).unwrap(),
        ),
        (
            "bootstrap",
            "bootstrap_bca",
            bootstrap(&m, &lib, BootstrapScheme::Residuals, &opts).unwrap(),
        ),
    ] {
        let mut args = base.to_vec();
        args.extend(["--intervals", method]);
        let out = run(&args);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let j = json_of(&out);
        let p = &j["predictions"][0];
        assert_eq!(p["k"]["method"], key);
        assert_eq!(p["delta_g"]["method"], key);
        assert_eq!(j["for_k"]["t_k"]["method"], key);
        // The run's numbers, to the last bit (same draws, same start value).
        assert_eq!(
            got(&p["k"]),
            best(&want, |k| matches!(*k, QuantityKind::K { t_k } if t_k == t))
        );
        assert_eq!(
            got(&p["delta_g"]),
            best(
                &want,
                |k| matches!(*k, QuantityKind::DeltaG { t_k } if t_k == t)
            )
        );
        assert_eq!(
            got(&j["for_k"]["t_k"]),
            best(&want, |k| matches!(
                *k,
                QuantityKind::TemperatureForK { k_target } if k_target == 1e7
            ))
        );
        // The values are the fit's; ln K, ΔH°, ΔS° and the prediction interval the delta
        // method's.
        let q = &plain["predictions"][0];
        assert_eq!(p["k"]["value"], q["k"]["value"]);
        assert_eq!(p["k"]["pi_low"], q["k"]["pi_low"]);
        assert_eq!(p["k"]["pi_high"], q["k"]["pi_high"]);
        for key in ["ln_k", "delta_h", "delta_s"] {
            assert_eq!(p[key], q[key], "{key}");
        }
        assert_eq!(j["intervals"]["draws"], 1500);
        assert_eq!(j["intervals"]["seed"], 1);
        // The text has the table of the run.
        let args: Vec<&str> = args.into_iter().filter(|a| *a != "--json").collect();
        let text = String::from_utf8_lossy(&run(&args).stdout).into_owned();
        assert!(text.contains("95% intervals by"), "{text}");
        assert!(text.contains("K at 37.00 °C"), "{text}");
    }
    // --draws with the delta method: a usage error.
    let out = run(&["predict", &path, "--at", "37", "--draws", "100"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("--draws"));
}
