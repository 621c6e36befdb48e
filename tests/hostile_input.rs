//! The command line on hostile input (issue 17): repeats at two temperatures, implausible
//! temperatures and θ, mixed decimal marks, empty σ cells, σ whose weight cannot be formed,
//! underflow, a level too close to 1, and a prediction whose value is undefined. Each
//! message must name the true cause (and the line and column where there is one).

use crate::cli::{json_of, run};
use std::path::Path;
use std::process::Output;

fn write(dir: &Path, name: &str, text: &str) -> String {
    let p = dir.join(name);
    std::fs::write(&p, text).expect("test file written");
    p.to_string_lossy().into_owned()
}

fn stderr(out: &Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

/// A fit that must fail; returns its stderr.
fn refused(args: &[&str]) -> String {
    let out = run(args);
    assert!(!out.status.success(), "{args:?} succeeded");
    stderr(&out)
}

/// Four ordinary points: T in °C, K, u(K).
const GOOD: &str = "T (°C),K,u(K)\n15,2.0,0.02\n25,1.6,0.02\n35,1.3,0.02\n45,1.1,0.02\n";

#[test]
fn cp_on_two_temperatures_is_refused_for_many_repeats_as_for_few() {
    // Issue 17 item 5: 5,000 rows at each of two temperatures gave ΔCp° ± 0.0048, 1,000
    // pairs were refused as singular; both now say why, the same way.
    let dir = tempfile::tempdir().unwrap();
    for per in [1_000usize, 5_000] {
        let mut text = String::from("T/K,ln K,sigma_ln K\n");
        for i in 0..per {
            // The same two ln K values, written to 17 digits (rounding-level scatter).
            let wobble = if i % 2 == 0 { 0.0 } else { 1e-15 };
            text.push_str(&format!("288.15,{:.17},0.01\n", 1.25 + wobble));
            text.push_str(&format!("308.15,{:.17},0.01\n", 0.75 + wobble));
        }
        let path = write(dir.path(), &format!("two_{per}.csv"), &text);
        let err = refused(&["fit", &path, "--model", "cp", "--json"]);
        assert!(err.contains("only 2 distinct temperatures"), "{per}: {err}");
        assert!(err.contains("3 parameters"), "{per}: {err}");
        assert!(!err.contains("singular"), "{per}: {err}");
    }
}

#[test]
fn an_implausible_temperature_is_refused_with_its_line_unless_confirmed() {
    let dir = tempfile::tempdir().unwrap();
    let path = write(
        dir.path(),
        "typo.csv",
        "T (°C),K,u(K)\n15,2.0,0.02\n37.0e300,1.6,0.02\n35,1.3,0.02\n45,1.1,0.02\n",
    );
    let err = refused(&["fit", &path]);
    assert!(err.contains("line 3, column 1"), "{err}");
    assert!(err.contains("plausible range"), "{err}");
    // The library names the remedy in words; the command line adds its flag.
    assert!(
        err.contains("confirm such temperatures explicitly"),
        "{err}"
    );
    assert!(err.contains("--allow-extreme-temperatures"), "{err}");
    // Confirmed, the row is read (the fit may still refuse such numbers, for another cause).
    let out = run(&["fit", &path, "--allow-extreme-temperatures", "--json"]);
    assert!(
        !stderr(&out).contains("line 3, column 1"),
        "{}",
        stderr(&out)
    );
}

#[test]
fn theta_outside_the_range_is_named() {
    // Issue 17 items 7 and 12: --tref 1e-300 printed "ΔS° at θ = 0.00 K", 1e300 and 1e308
    // blamed units or "too few distinct temperatures".
    let dir = tempfile::tempdir().unwrap();
    let path = write(dir.path(), "good.csv", GOOD);
    for theta in ["1e-300K", "1e300K", "1e308K"] {
        let err = refused(&["fit", &path, "--model", "cp", "--tref", theta]);
        assert!(err.contains("θ"), "{theta}: {err}");
        assert!(err.contains("plausible range"), "{theta}: {err}");
        // The fit library says "confirm"; the command line names its flag.
        assert!(
            err.contains("--allow-extreme-temperatures"),
            "{theta}: {err}"
        );
        assert!(!err.contains("units") && !err.contains("distinct"), "{err}");
    }
}

#[test]
fn a_level_too_close_to_one_is_named() {
    let dir = tempfile::tempdir().unwrap();
    let path = write(dir.path(), "good.csv", GOOD);
    let err = refused(&["fit", &path, "--level", "0.9999999999999999"]);
    assert!(err.contains("too close to 1"), "{err}");
    assert!(!err.contains("units") && !err.contains("distinct"), "{err}");
}

#[test]
fn mixed_decimal_marks_are_refused_until_the_convention_is_stated() {
    // Issue 17 item 8.
    let dir = tempfile::tempdir().unwrap();
    let mixed = write(
        dir.path(),
        "mixed.tsv",
        "T (K)\tK\n300\t1,250\n310\t1.4\n320\t1,610\n330\t1800\n",
    );
    let err = refused(&["fit", &mixed]);
    assert!(err.contains("line 3, column 2"), "{err}");
    assert!(err.contains("--decimal-mark"), "{err}");
    assert!(
        err.contains("state the decimal mark (point or comma)"),
        "{err}"
    );
    // Stating a comma still refuses the point on line 3.
    let err = refused(&["fit", &mixed, "--decimal-mark", "comma"]);
    assert!(err.contains("line 3, column 2"), "{err}");
    // A thousands-looking comma in a ';' file: refused, then read as stated.
    let text = "T (°C);K\n15;1,500\n25;2\n35;3\n45;4\n";
    let thousands = write(dir.path(), "thousands.csv", text);
    let err = refused(&["fit", &thousands]);
    assert!(err.contains("line 2, column 2"), "{err}");
    assert!(err.contains("thousands separator"), "{err}");
    let out = run(&["fit", &thousands, "--decimal-mark", "comma", "--json"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    let ln_k = j["points"][0]["ln_k"].as_f64().unwrap();
    assert!((ln_k - 1.5f64.ln()).abs() < 1e-12, "{ln_k}");
    let err = refused(&["fit", &thousands, "--decimal-mark", "point"]);
    assert!(err.contains("line 2, column 2"), "{err}");
}

#[test]
fn an_empty_sigma_cell_is_located_and_unweighted_fits_the_file() {
    // Issue 17 item 11: "point 2: a weighted fit needs an uncertainty …", with no way out.
    let dir = tempfile::tempdir().unwrap();
    let path = write(
        dir.path(),
        "gaps.csv",
        "T (°C),K,u(K)\n15,2.0,0.02\n25,1.6,\n35,1.3,0.02\n45,1.1,0.02\n",
    );
    let err = refused(&["fit", &path]);
    assert!(err.contains("line 3, column 3 ('u(K)')"), "{err}");
    assert!(
        err.contains(&format!("{path}: line 3")),
        "the path as given: {err}"
    );
    assert!(err.contains("--unweighted"), "{err}");
    assert!(err.contains("fit unweighted"), "{err}");
    assert!(!err.contains("point 2"), "{err}");
    let out = run(&["fit", &path, "--unweighted", "--json"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let out = run(&["predict", &path, "--at", "30", "--unweighted", "--json"]);
    assert!(out.status.success(), "{}", stderr(&out));
    // A σ column with no values at all is a file without uncertainties: fitted unweighted.
    let none = write(
        dir.path(),
        "none.csv",
        "T (°C),K,u(K)\n15,2.0,\n25,1.6,\n35,1.3,\n45,1.1,\n",
    );
    let out = run(&["fit", &none, "--json"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    let w = j["warnings"].to_string();
    assert!(w.contains("unweighted"), "{w}");
}

#[test]
fn sigma_and_values_out_of_range_name_their_cause() {
    // Issue 17 item 12: σ = 1e300 was "uncertainty 0 is not positive", σ = 1e-300 "weight
    // is not a finite number", 1e-400 "zero or negative".
    let dir = tempfile::tempdir().unwrap();
    for (sigma, word) in [("1e300", "too large"), ("1e-300", "too small")] {
        let text = format!(
            "T (°C),ln K,sigma_ln K\n15,0.7,0.02\n25,0.5,{sigma}\n35,0.3,0.02\n45,0.1,0.02\n"
        );
        let path = write(dir.path(), "sigma.csv", &text);
        let err = refused(&["fit", &path]);
        assert!(err.contains(word), "{sigma}: {err}");
        assert!(err.contains("point 2"), "{sigma}: {err}");
        assert!(
            !err.contains("not positive") && !err.contains("not a finite"),
            "{err}"
        );
    }
    let path = write(
        dir.path(),
        "tiny.csv",
        "T (°C),K\n15,2.0\n25,1e-400\n35,1.3\n45,1.1\n",
    );
    let err = refused(&["fit", &path]);
    assert!(err.contains("line 3, column 2"), "{err}");
    assert!(err.contains("underflows"), "{err}");
    assert!(!err.contains("zero or negative"), "{err}");
}

#[test]
fn an_undefined_prediction_has_undefined_statistics_and_a_warning() {
    // Issue 17 item 10: `predict --at 1e308 --json` gave delta_g null with se 0.0 and no
    // warning.
    let dir = tempfile::tempdir().unwrap();
    let path = write(dir.path(), "good.csv", GOOD);
    let out = run(&[
        "predict",
        &path,
        "--at",
        "1e308",
        "--temp-unit",
        "K",
        "--json",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    let preds = j["predictions"].as_array().unwrap();
    let mut checked = 0;
    for p in preds {
        for key in ["ln_k", "k", "delta_g", "delta_h", "delta_s"] {
            let q = &p[key];
            if q["value"].is_null() {
                checked += 1;
                for (name, v) in q.as_object().unwrap() {
                    // `method` names what made the interval (issue 13); not a statistic.
                    if name == "method" {
                        continue;
                    }
                    assert!(v.is_null(), "{key}.{name} = {v} beside a null value");
                }
                let w = j["warnings"].to_string();
                assert!(w.contains(key), "no warning names {key}: {w}");
            }
        }
    }
    assert!(checked > 0, "no undefined value at 1e308 K: {j}");
}
