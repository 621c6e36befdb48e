//! End-to-end checks of `vhfit fit A.csv B.csv --share KEYS --intervals
//! monte-carlo|bootstrap` (issue 13 for joint fits): the JSON's estimates and `intervals`
//! record are isochore-fit's run with the same generator start value, to the bit; the text
//! names the method; bad settings are refused with exit 2.
//!
//! Test inputs: the two invented series of `joint_cli` (an exothermic binding with a
//! negative ΔCp°), ΔCp° shared.

use super::cli::{json_of, run};
use super::joint_cli::{two_files, LNK_A, LNK_B, SIG_A, SIG_B, T_A, T_B};
use isochore_fit::global::{fit_global, GlobalFit, SeriesInput, Sharing, SharingMap};
use isochore_fit::intervals::{
    joint_bootstrap, joint_monte_carlo, BootstrapScheme, IntervalOptions, JointRun, JointTarget,
    Progress, ResampledInterval,
};
use isochore_fit::{FitOptions, Measurement, Model};
use serde_json::Value;

fn points(t: &[f64], y: &[f64], s: &[f64]) -> Vec<Measurement> {
    t.iter()
        .zip(y)
        .zip(s)
        .map(|((t, y), s)| Measurement::new(*t, *y).with_sigma(*s))
        .collect()
}

/// The library's joint fit of the two series as the command line makes it (ΔCp° model,
/// the default options otherwise) and `run` on it.
fn library_run(run: impl Fn(&[SeriesInput<'_>], &GlobalFit) -> JointRun) -> (GlobalFit, JointRun) {
    let (a, b) = (points(&T_A, &LNK_A, &SIG_A), points(&T_B, &LNK_B, &SIG_B));
    let series = [SeriesInput::new("a", &a), SeriesInput::new("b", &b)];
    let sharing = SharingMap::per_series().with("delta_cp", Sharing::Shared);
    let o = FitOptions {
        model: Model::CONSTANT_CP,
        ..FitOptions::default()
    };
    let f = fit_global(&series, &sharing, &o).unwrap();
    let r = run(&series, &f);
    (f, r)
}

/// `{value, se, ci_low, ci_high, method}` equals `want` to the bit.
fn same(j: &Value, want: ResampledInterval, what: &str) {
    assert_eq!(j["method"], want.method.key(), "{what}");
    for (field, v) in [
        ("value", want.value),
        ("se", want.se),
        ("ci_low", want.ci_low),
        ("ci_high", want.ci_high),
    ] {
        assert_eq!(j[field].as_f64(), Some(v), "{what}.{field}");
    }
}

fn joint_json(extra: &[&str]) -> Value {
    let (a, b) = two_files("intervals");
    let mut args = vec![
        "fit",
        a.as_str(),
        b.as_str(),
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--json",
        "--summary",
    ];
    args.extend_from_slice(extra);
    let out = run(&args);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    json_of(&out)
}

fn check(j: &Value, r: &JointRun) {
    let best = |t: JointTarget| r.get(&t).unwrap().best();
    same(
        &j["params"]["delta_cp"],
        best(JointTarget::Shared { key: "delta_cp" }),
        "params.delta_cp",
    );
    for s in 0..2 {
        for key in ["delta_h", "delta_s"] {
            same(
                &j["series_params"][s]["params"][key],
                best(JointTarget::Series { key, series: s }),
                &format!("series_params[{s}].{key}"),
            );
        }
    }
    let diffs = j["differences"].as_array().unwrap();
    assert_eq!(diffs.len(), 2);
    for d in diffs {
        let key = if d["key"] == "delta_h" {
            "delta_h"
        } else {
            "delta_s"
        };
        same(d, best(JointTarget::Difference { key, a: 0, b: 1 }), key);
    }
    let q = j["intervals"]["quantities"].as_array().unwrap();
    assert_eq!(q.len(), r.targets.len());
    assert_eq!(q[0]["kind"], "series");
    assert_eq!(q[0]["series"], "a");
    assert_eq!(j["intervals"]["draws"], r.run.draws);
    assert_eq!(j["intervals"]["seed"], r.run.seed);
}

#[test]
fn joint_json_is_the_fit_crates_run_for_the_same_generator_start_value() {
    let opts = IntervalOptions {
        draws: 2_000,
        seed: 17,
        ..Default::default()
    };
    let j = joint_json(&[
        "--intervals",
        "monte-carlo",
        "--draws",
        "2000",
        "--seed",
        "17",
    ]);
    let (f, r) = library_run(|s, f| joint_monte_carlo(s, f, &opts, &Progress::new()).unwrap());
    check(&j, &r);
    assert_eq!(j["intervals"]["method"], "monte_carlo");
    assert!(j["intervals"]["scheme"].is_null());
    // The delta method's estimate beside each quantity is the joint fit's own.
    let d = &j["intervals"]["quantities"][0]["delta"];
    assert_eq!(d["method"], "delta");
    assert_eq!(d["se"].as_f64(), Some(f.estimate("delta_h", 0).unwrap().se));

    let j = joint_json(&[
        "--intervals",
        "bootstrap",
        "--bootstrap-scheme",
        "wild",
        "--draws",
        "2000",
        "--seed",
        "17",
    ]);
    let (_, r) = library_run(|s, f| {
        joint_bootstrap(s, f, BootstrapScheme::Wild, &opts, &Progress::new()).unwrap()
    });
    check(&j, &r);
    assert_eq!(j["intervals"]["method"], "bootstrap");
    assert_eq!(j["intervals"]["scheme"], "wild_rademacher");
    assert_eq!(j["params"]["delta_cp"]["method"], "bootstrap_bca");
}

#[test]
fn joint_text_names_the_method_and_bad_settings_are_refused() {
    let (a, b) = two_files("intervals-text");
    let base = ["fit", &a, &b, "--model", "cp", "--share", "delta_cp"];
    let with = |extra: &[&str]| run(&[&base[..], extra].concat());
    let out = with(&["--intervals", "monte-carlo", "--draws", "500"]);
    assert!(out.status.success());
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("intervals by Monte Carlo (GUM Supplement 1), 500 draws")
            && text.contains("over the joint fit"),
        "{text}"
    );
    assert!(
        text.contains("(shared)") && text.contains("a − b"),
        "{text}"
    );
    // The joint report keeps the delta method's intervals and says so in its record, naming
    // the run asked for.
    let md = std::env::temp_dir().join(format!(
        "isochore-joint-intervals-{}.md",
        std::process::id()
    ));
    let md_s = md.to_string_lossy().into_owned();
    let out = with(&[
        "--intervals",
        "bootstrap",
        "--draws",
        "300",
        "--report",
        &md_s,
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let report = std::fs::read_to_string(&md).unwrap();
    let _ = std::fs::remove_file(&md);
    assert!(
        report.contains("interval method")
            && report.contains("bootstrap of leverage-corrected residuals, 300 draws")
            && report.contains("this report's intervals are the delta method's"),
        "{report}"
    );
    // Zero draws, and case resampling, are refused in words with exit 2.
    let out = with(&["--intervals", "monte-carlo", "--draws", "0"]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("at least 1 draw"), "{err}");
    let out = with(&["--intervals", "bootstrap", "--bootstrap-scheme", "cases"]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("case resampling of a joint fit"), "{err}");
}
