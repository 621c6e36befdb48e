//! End-to-end checks of `vhfit fit A.csv B.csv --share KEYS` (issue 12): the JSON object of
//! a joint fit carries statsmodels' numbers, the differences between series follow from its
//! own covariance, one file holding two data sets fits as two files do, and bad input
//! (unknown key, one series, a singular sharing, disjoint temperature ranges, --report)
//! gets a clear message and the promised exit code.
//!
//! Reference values: statsmodels 0.15.0 (PyPI; numpy 2.4.6, scipy 1.17.1), WLS with weights
//! 1/σ² on the block design, from `crates/isochore-fit/tests/data/independent/make_global.py`
//! (run 2026-12-02; the same numbers `crates/isochore-fit/tests/global.rs` checks the library
//! against). Test inputs: the two invented series of that test (an exothermic binding with a
//! negative ΔCp°).

use super::cli::{close, json_of, run};
use serde_json::Value;
use std::path::PathBuf;

pub(super) const T_A: [f64; 10] = [
    278.15, 283.15, 288.15, 293.15, 298.15, 303.15, 308.15, 313.15, 318.15, 323.15,
];
pub(super) const LNK_A: [f64; 10] = [
    5.8331, 5.7024, 5.5965, 5.4316, 5.263, 5.1037, 4.9169, 4.6914, 4.4942, 4.273,
];
pub(super) const SIG_A: [f64; 10] = [
    0.010, 0.015, 0.008, 0.012, 0.020, 0.010, 0.009, 0.018, 0.011, 0.014,
];
pub(super) const T_B: [f64; 8] = [
    280.65, 285.65, 290.65, 295.65, 300.65, 305.65, 310.65, 315.65,
];
pub(super) const LNK_B: [f64; 8] = [
    5.7651, 5.7206, 5.6158, 5.5179, 5.4051, 5.2448, 5.1088, 4.9333,
];
pub(super) const SIG_B: [f64; 8] = [0.020, 0.012, 0.016, 0.010, 0.025, 0.013, 0.015, 0.011];

/// statsmodels 0.15.0 WLS (make_global.py): ΔH°_A, ΔH°_B, ΔS°_A, ΔS°_B, ΔCp° and their SEs.
const EST: [f64; 5] = [
    -25113.237266862874,
    -18229.50722223697,
    -40.337780214474755,
    -15.774766001874617,
    -594.4759551738249,
];
const SE: [f64; 5] = [
    143.47375838748948,
    238.37515596401155,
    0.483854676845953,
    0.7987680202500473,
    20.834546779372577,
];
/// statsmodels' `compare_f_test` of ΔCp° per series against shared: F, p, df_num, df_den.
const F_TEST: [f64; 4] = [0.12611760520433218, 0.7286555174040572, 1.0, 12.0];

/// A temporary folder unique to one test.
fn folder(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("isochore-joint-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&d).expect("temporary folder");
    d
}

fn write_csv(dir: &std::path::Path, name: &str, t: &[f64], y: &[f64], s: &[f64]) -> String {
    let mut text = String::from("T (K),ln K,sigma ln K\n");
    for ((t, y), s) in t.iter().zip(y).zip(s) {
        text.push_str(&format!("{t},{y},{s}\n"));
    }
    let p = dir.join(name);
    std::fs::write(&p, text).expect("write csv");
    p.to_string_lossy().into_owned()
}

pub(super) fn two_files(name: &str) -> (String, String) {
    let d = folder(name);
    (
        write_csv(&d, "a.csv", &T_A, &LNK_A, &SIG_A),
        write_csv(&d, "b.csv", &T_B, &LNK_B, &SIG_B),
    )
}

fn num(v: &Value) -> f64 {
    v.as_f64()
        .unwrap_or_else(|| panic!("expected a number, got {v}"))
}

fn stderr(out: &std::process::Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

#[test]
fn joint_json_carries_statsmodels_numbers() {
    let (a, b) = two_files("json");
    let out = run(&[
        "fit", &a, &b, "--model", "cp", "--share", "delta_cp", "--json",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    assert_eq!(j["kind"], "joint_fit");
    assert_eq!(j["shared"], serde_json::json!(["delta_cp"]));
    assert_eq!(j["series"][0]["name"], "a");
    assert_eq!(j["series"][1]["name"], "b");
    let rel = 1e-9; // the project's bar (issue 10), not a reference value
    let dcp = &j["params"]["delta_cp"];
    assert!(close(num(&dcp["value"]), EST[4], rel));
    assert!(close(num(&dcp["se"]), SE[4], rel));
    assert!(j["params"].get("delta_h").is_none(), "ΔH° is not shared");
    for (s, (ih, is)) in [(0, 2), (1, 3)].into_iter().enumerate() {
        let p = &j["series_params"][s]["params"];
        assert!(close(num(&p["delta_h"]["value"]), EST[ih], rel));
        assert!(close(num(&p["delta_h"]["se"]), SE[ih], rel));
        assert!(close(num(&p["delta_s"]["value"]), EST[is], rel));
        assert!(close(num(&p["delta_s"]["se"]), SE[is], rel));
        assert!(p.get("delta_cp").is_none(), "shared ΔCp° is not per series");
    }
    let t = &j["equality_test"];
    assert_eq!(t["method"], "F");
    assert!(close(num(&t["statistic"]), F_TEST[0], rel));
    assert!(close(num(&t["p_value"]), F_TEST[1], rel));
    assert_eq!(num(&t["df_num"]), F_TEST[2]);
    assert_eq!(num(&t["df_den"]), F_TEST[3]);
    assert!(t["verdict"]
        .as_str()
        .unwrap()
        .starts_with("no evidence that ΔCp°"));
    assert_eq!(j["fit_statistics"]["joint"]["dof"], 13);
    assert_eq!(j["fit_statistics"]["separate"]["dof"], 12);
    // 18 points, series by series, each with its series' name.
    let pts = j["points"].as_array().unwrap();
    assert_eq!(pts.len(), 18);
    assert_eq!(pts[9]["series"], "a");
    assert_eq!(pts[10]["series"], "b");
    assert_eq!(pts[10]["row"], 1);
}

/// ΔH°_A − ΔH°_B and its SE follow from the joint estimates and covariance in the same
/// document: Var(a − b) = Var a + Var b − 2 Cov(a, b) (a relation, not a copied value).
#[test]
fn differences_follow_from_the_joint_covariance() {
    let (a, b) = two_files("diff");
    let out = run(&[
        "fit",
        &a,
        &b,
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--json",
        "--summary",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    let cov = |i: usize, k: usize| num(&j["cov"][i][k]);
    let d = j["differences"]
        .as_array()
        .unwrap()
        .iter()
        .find(|d| d["key"] == "delta_h")
        .expect("a ΔH° difference")
        .clone();
    assert_eq!(d["series_a"], "a");
    assert_eq!(j["columns"][0]["series"], "a");
    assert_eq!(j["columns"][1]["series"], "b");
    assert!(j["columns"][4]["series"].is_null());
    assert!(close(num(&d["value"]), EST[0] - EST[1], 1e-9));
    let var = cov(0, 0) + cov(1, 1) - 2.0 * cov(0, 1);
    assert!(close(num(&d["se"]), var.sqrt(), 1e-12));
    assert!(num(&d["ci_low"]) < num(&d["value"]) && num(&d["value"]) < num(&d["ci_high"]));
    assert!(j.get("points").is_none(), "--summary leaves the points out");
}

#[test]
fn one_file_with_two_data_sets_fits_as_two_files() {
    let (a, b) = two_files("pair");
    let d = folder("one");
    let mut text = String::from("series,T (K),ln K,sigma ln K\n");
    for (name, t, y, s) in [
        ("a", &T_A[..], &LNK_A[..], &SIG_A[..]),
        ("b", &T_B[..], &LNK_B[..], &SIG_B[..]),
    ] {
        for ((t, y), s) in t.iter().zip(y).zip(s) {
            text.push_str(&format!("{name},{t},{y},{s}\n"));
        }
    }
    let both = d.join("both.csv");
    std::fs::write(&both, text).unwrap();
    let both = both.to_string_lossy().into_owned();
    let args = [
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--json",
        "--summary",
    ];
    let one = run(&[&["fit", both.as_str()][..], &args[..]].concat());
    let two = run(&[&["fit", a.as_str(), b.as_str()][..], &args[..]].concat());
    assert!(one.status.success(), "{}", stderr(&one));
    let (one, two) = (json_of(&one), json_of(&two));
    assert_eq!(one["params"], two["params"]);
    assert_eq!(one["series_params"], two["series_params"]);
    assert_eq!(one["equality_test"], two["equality_test"]);
}

#[test]
fn known_sigma_gives_the_chi2_test() {
    let (a, b) = two_files("chi2");
    let out = run(&[
        "fit",
        &a,
        &b,
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--absolute-sigma",
        "--json",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    let t = &j["equality_test"];
    assert_eq!(t["method"], "chi2");
    assert!(t["df_den"].is_null());
    // Δχ² is the difference of the two fits' χ², written side by side.
    let joint = num(&j["fit_statistics"]["joint"]["chi2"]);
    let separate = num(&j["fit_statistics"]["separate"]["chi2"]);
    assert!(close(num(&t["statistic"]), joint - separate, 1e-9));
}

#[test]
fn text_shows_both_fits_and_the_verdict() {
    let (a, b) = two_files("text");
    let out = run(&["fit", &a, &b, "--model", "cp", "--share", "delta_cp"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let text = String::from_utf8(out.stdout).unwrap();
    for want in [
        "joint fit of 2 series",
        "separate fits",
        "test of equality: no evidence that ΔCp° differs",
        "differences between series",
        "points by series",
    ] {
        assert!(text.contains(want), "missing '{want}' in:\n{text}");
    }
}

#[test]
fn bad_joint_requests_are_refused_in_words() {
    let (a, b) = two_files("bad");
    let out = run(&["fit", &a, &b, "--model", "cp", "--share", "delta_x"]);
    assert_eq!(out.status.code(), Some(1));
    let e = stderr(&out);
    assert!(e.contains("'delta_x'") && e.contains("delta_cp"), "{e}");

    let out = run(&["fit", &a, "--share", "delta_h"]);
    assert_eq!(out.status.code(), Some(1));
    assert!(
        stderr(&out).contains("at least two series"),
        "{}",
        stderr(&out)
    );

    let out = run(&["fit", &a, &b, "--share", ","]);
    assert_eq!(out.status.code(), Some(2));

    // A report never overwrites its own input: a.csv named as the results table.
    let d = folder("bad2");
    let before = std::fs::read(&a).unwrap();
    let out = run(&["fit", &a, &b, "--share", "delta_h", "--report", &a]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains("no report was written"),
        "{}",
        stderr(&out)
    );
    assert_eq!(std::fs::read(&a).unwrap(), before);
    // A calorimetric value naming no series fitted is refused in words.
    let out = run(&[
        "fit",
        &a,
        &b,
        "--share",
        "delta_h",
        "--calorimetric",
        "nobody:25C:-20:0.5",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("'nobody'"), "{}", stderr(&out));

    // A file without σ is fitted unweighted, a file with σ weighted: refused in words,
    // and --unweighted settles it.
    let plain = d.join("plain.csv");
    let mut text = String::from("T (K),ln K\n");
    for (t, y) in T_A.iter().zip(LNK_A) {
        text.push_str(&format!("{t},{y}\n"));
    }
    std::fs::write(&plain, text).unwrap();
    let plain = plain.to_string_lossy().into_owned();
    let out = run(&["fit", &plain, &b, "--share", "delta_h"]);
    assert_eq!(out.status.code(), Some(1));
    assert!(stderr(&out).contains("unweighted"), "{}", stderr(&out));
    let out = run(&["fit", &plain, &b, "--share", "delta_h", "--unweighted"]);
    assert!(out.status.success(), "{}", stderr(&out));

    // Three points at two temperatures cannot carry three parameters of their own.
    let dup = write_csv(
        &d,
        "dup.csv",
        &[280.0, 280.0, 290.0],
        &[5.0, 5.02, 4.9],
        &[0.01; 3],
    );
    let out = run(&[
        "fit",
        &a,
        &dup,
        "--model",
        "clarke-glew",
        "--share",
        "delta_cp",
    ]);
    assert_eq!(out.status.code(), Some(1));
    let e = stderr(&out);
    assert!(e.contains("singular") && e.contains("dup"), "{e}");
}

#[test]
fn disjoint_temperature_ranges_are_warned_in_words() {
    let d = folder("disjoint");
    let a = write_csv(&d, "cold.csv", &T_A, &LNK_A, &SIG_A);
    let hot: Vec<f64> = T_B.iter().map(|t| t + 100.0).collect();
    let b = write_csv(&d, "hot.csv", &hot, &LNK_B, &SIG_B);
    let out = run(&["fit", &a, &b, "--share", "delta_h", "--json", "--summary"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    let w: Vec<&str> = j["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(Value::as_str)
        .collect();
    assert!(
        w.iter().any(|w| w.contains("do not overlap")),
        "warnings: {w:?}"
    );
}

/// Three series add the compensation analysis (β with the Krug–Hunter–Grieger verdict and
/// Exner's test); two leave it null.
#[test]
fn three_series_add_the_compensation_analysis() {
    let (a, b) = two_files("comp");
    let d = folder("comp3");
    let shifted: Vec<f64> = LNK_A.iter().map(|y| y + 0.3).collect();
    let c = write_csv(&d, "c.csv", &T_A, &shifted, &SIG_A);
    let out = run(&[
        "fit",
        &a,
        &b,
        &c,
        "--share",
        "delta_h",
        "--json",
        "--summary",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    let comp = &j["compensation"];
    assert_eq!(comp["points"].as_array().unwrap().len(), 3);
    let verdict = comp["beta"]["verdict"].as_str().unwrap();
    assert!(verdict.contains("proves nothing by itself"), "{verdict}");
    assert!(comp["beta"]["t_hm_k"].as_f64().unwrap() > 278.0);
    assert!(comp["exner"]["df_num"] == 1 && comp["exner"]["df_den"] == 28 - 6);
    let out = run(&["fit", &a, &b, "--share", "delta_h", "--json", "--summary"]);
    assert!(json_of(&out)["compensation"].is_null());
}

#[test]
fn joint_report_writes_every_format_with_the_verdict() {
    let (a, b) = two_files("report");
    let dir = folder("report-out").join("set");
    let dir_s = dir.to_string_lossy().into_owned();
    let out = run(&[
        "fit",
        &a,
        &b,
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--calorimetric",
        "a:25C:-25.0:0.4",
        "--report",
        &dir_s,
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    for name in [
        "joint-fit.html",
        "joint-fit.pdf",
        "joint-fit.md",
        "joint-fit-data.csv",
        "joint-fit-results.csv",
        "joint-fit-vanthoff-by-series.png",
        "joint-fit-residuals-by-series.svg",
    ] {
        assert!(dir.join(name).is_file(), "{name} missing");
    }
    // Two series: no compensation figures.
    assert!(!dir.join("joint-fit-compensation-dh-ds.png").exists());
    let html = std::fs::read_to_string(dir.join("joint-fit.html")).unwrap();
    // The verdict of statsmodels' F-test (F = 0.126, p = 0.729; make_global.py).
    assert!(html.contains("No evidence that ΔCp° differs"), "verdict");
    assert!(html.contains("0.1261") && html.contains("0.729"), "F and p");
    assert!(html.contains("Fieller") && html.contains("coupled equilibria"));
    assert!(html.contains("validated methods"));
    let results = std::fs::read_to_string(dir.join("joint-fit-results.csv")).unwrap();
    let shared = results
        .lines()
        .find(|l| l.starts_with("shared,"))
        .expect("shared row");
    let v: f64 = shared.split(',').nth(3).unwrap().parse().unwrap();
    // statsmodels' shared ΔCp° (EST[4], J/(mol K)), shown in J/(mol·K).
    assert!(close(v, EST[4], 1e-9), "{v}");
    // Written again over its own files: allowed (the manifest lists them).
    let again = run(&[
        "fit", &a, &b, "--model", "cp", "--share", "delta_cp", "--report", &dir_s,
    ]);
    assert!(again.status.success(), "{}", stderr(&again));
    // One file.
    let pdf = folder("report-out").join("one.pdf");
    let out = run(&[
        "fit",
        &a,
        &b,
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--report",
        &pdf.to_string_lossy(),
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(std::fs::read(&pdf).unwrap().starts_with(b"%PDF"));
}

#[test]
fn calorimetric_values_can_constrain_the_joint_fit() {
    let (a, b) = two_files("constrained");
    // The invented calorimetric values of make_calorimetric_joint.py (kJ/mol here).
    let cal = "a:25C:-25.4:0.3,a:37C:-32.3:0.45,b:25C:-18.0:0.25";
    let args = [
        "fit",
        &a,
        &b,
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--summary",
        "--calorimetric",
        cal,
        "--calorimetric-in-fit",
    ];
    let out = run(&args);
    assert!(out.status.success(), "{}", stderr(&out));
    let text = String::from_utf8_lossy(&out.stdout);
    let block = text
        .split("joint fit with the calorimetric values")
        .nth(1)
        .expect("the constrained block");
    // statsmodels 0.15.0 WLS on the stacked design (calorimetric_joint.txt): ΔCp° =
    // −593.848 J/(mol K), SE 16.549 (scaled), shown to the SE's two digits.
    let line = block
        .lines()
        .find(|l| l.contains("(shared)"))
        .expect("shared row");
    assert!(line.contains("-594 ± 17"), "{line}");
    assert!(
        block.contains("3 calorimetric values, 16 degrees of freedom"),
        "{block}"
    );
    // The Markdown report has the same numbers beside the fit of ln K alone.
    let md = folder("constrained-report").join("joint.md");
    let mut report = args.to_vec();
    let md_s = md.to_string_lossy().into_owned();
    report.extend(["--report", &md_s]);
    let out = run(&report);
    assert!(out.status.success(), "{}", stderr(&out));
    let text = std::fs::read_to_string(&md).unwrap();
    let row = text
        .lines()
        .find(|l| l.contains("| shared |") && l.contains("ΔCp°"))
        .unwrap_or_else(|| panic!("no shared ΔCp° row in\n{text}"));
    // ΔCp° −593.848 ± 16.549 (statsmodels, above) beside ln K alone −594.476 ± 20.835
    // (make_global.py), each shown to its SE's two digits.
    assert!(
        row.contains("-594 ± 17") && row.contains("-594 ± 21"),
        "{row}"
    );
    assert!(text.contains("ln K alone: value ± SE"), "{text}");
    assert!(text.contains("3 calorimetric values, 16 degrees of freedom"));
    // Without --share, values naming a series: a usage error in words (a single series'
    // fit with its values is tests/calorimetric_cli.rs's).
    let out = run(&["fit", &a, "--calorimetric", cal, "--calorimetric-in-fit"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains("is for a joint fit (--share)"),
        "{}",
        stderr(&out)
    );
    // With --json: one object, `calorimetric_fit`, with the same numbers as the text.
    let mut json = args.to_vec();
    json.push("--json");
    let out = run(&json);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    let c = &j["calorimetric_fit"];
    // statsmodels 0.15.0 WLS on the stacked design (calorimetric_joint.txt, scaled SEs):
    // ΔH°_a, ΔH°_b, ΔS°_a, ΔS°_b, ΔCp°; χ² and the degrees of freedom.
    let rel = 1e-9; // the project's bar (issue 10), not a reference value
    let dcp = &c["params"]["delta_cp"];
    assert!(close(num(&dcp["value"]), -593.8482917236602, rel), "{dcp}");
    assert!(close(num(&dcp["se"]), 16.5485340846324, rel), "{dcp}");
    let refs = [
        (
            -25192.87254952666,
            112.75055602892492,
            -40.60552278435859,
            0.38355105067508843,
        ),
        (
            -18089.072294496782,
            141.87004039145057,
            -15.305824523464757,
            0.4757536025320592,
        ),
    ];
    for (s, (h, se_h, ds, se_s)) in refs.into_iter().enumerate() {
        let p = &c["series_params"][s]["params"];
        assert!(close(num(&p["delta_h"]["value"]), h, rel), "{p}");
        assert!(close(num(&p["delta_h"]["se"]), se_h, rel), "{p}");
        assert!(close(num(&p["delta_s"]["value"]), ds, rel), "{p}");
        assert!(close(num(&p["delta_s"]["se"]), se_s, rel), "{p}");
        assert!(p.get("delta_cp").is_none(), "shared ΔCp° is not per series");
    }
    assert!(close(num(&c["chi2"]), 8.38932597035888, rel));
    assert_eq!(c["dof"], 16);
    assert_eq!(c["n_calorimetric"], 3);
    assert_eq!(c["n_ln_k"], 18);
    assert_eq!(c["columns"].as_array().unwrap().len(), 5);
    // The joint fit of ln K alone stays beside it, unchanged (make_global.py's ΔCp°).
    assert!(close(num(&j["params"]["delta_cp"]["value"]), EST[4], rel));
    // Without --calorimetric-in-fit the object is left out.
    let plain: Vec<&str> = json
        .iter()
        .copied()
        .filter(|a| *a != "--calorimetric-in-fit")
        .collect();
    assert!(json_of(&run(&plain)).get("calorimetric_fit").is_none());
    // Unweighted: null, and a warning says why.
    let mut json_unweighted = json.clone();
    json_unweighted.push("--unweighted");
    let j = json_of(&run(&json_unweighted));
    assert!(j["calorimetric_fit"].is_null());
    assert!(j["warnings"].as_array().unwrap().iter().any(|w| w
        .as_str()
        .unwrap()
        .contains("only when every ln K has its σ")));
    // Unweighted: the constrained fit is refused in words, the rest still printed.
    let mut unweighted = args.to_vec();
    unweighted.push("--unweighted");
    let out = run(&unweighted);
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(String::from_utf8_lossy(&out.stdout)
        .contains("not fitted: calorimetric values can constrain the fit only when"),);
}

#[test]
fn calorimetric_values_can_come_from_a_file() {
    let (a, b) = two_files("calfile");
    let d = folder("calfile-in");
    let file = d.join("itc.csv");
    std::fs::write(
        &file,
        "# invented\nsample,T (°C),dH_cal (kJ/mol),u (kJ/mol)\na,25,-25.4,0.3\na,37,-32.3,0.45\nb,25,-18.0,0.25\n",
    )
    .unwrap();
    let file = file.to_string_lossy().into_owned();
    let base = [
        "fit",
        &a,
        &b,
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--summary",
    ];
    let mut from_file = base.to_vec();
    from_file.extend(["--calorimetric-file", &file, "--calorimetric-in-fit"]);
    let mut inline = base.to_vec();
    inline.extend([
        "--calorimetric",
        "a:25C:-25.4:0.3,a:37C:-32.3:0.45,b:25C:-18.0:0.25",
        "--calorimetric-in-fit",
    ]);
    let (x, y) = (run(&from_file), run(&inline));
    assert!(x.status.success(), "{}", stderr(&x));
    // The same values read from the file and from the command line give the same output.
    assert_eq!(x.stdout, y.stdout);
    // A cell that is not a number is named by file, line and column.
    let bad = d.join("bad.csv");
    std::fs::write(&bad, "T (°C),ΔH (kJ/mol),u\n25,-25.4,0.3\n37,oops,0.45\n").unwrap();
    let mut args = base.to_vec();
    let bad = bad.to_string_lossy().into_owned();
    args.extend(["--calorimetric-file", &bad]);
    let out = run(&args);
    assert_eq!(out.status.code(), Some(2));
    let e = stderr(&out);
    assert!(
        e.contains("bad.csv") && e.contains("line 3") && e.contains("column 2"),
        "{e}"
    );
}

#[test]
fn joint_json_carries_the_calorimetric_comparisons() {
    let (a, b) = two_files("caljson");
    let out = run(&[
        "fit",
        &a,
        &b,
        "--model",
        "cp",
        "--share",
        "delta_cp",
        "--summary",
        "--json",
        "--calorimetric",
        "b:25C:-18.0:0.25,30C:-20.0:0.5",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    assert_eq!(j["kind"], "joint_fit");
    let cal = j["calorimetric"].as_array().expect("calorimetric array");
    // b's own value, then the value for every series (a, then b): three in series order.
    let series: Vec<&str> = cal.iter().map(|c| c["series"].as_str().unwrap()).collect();
    assert_eq!(series, ["a", "b", "b"]);
    for c in cal {
        // The definitions: d = ΔH_vH − ΔH_cal, z = d / SE(d).
        let d = num(&c["difference"]["value"]);
        assert!(close(
            d,
            num(&c["delta_h_vh"]["value"]) - num(&c["delta_h_cal"]),
            1e-12
        ));
        assert!(close(num(&c["z"]), d / num(&c["difference"]["se"]), 1e-12));
        assert!(c["verdict"]
            .as_str()
            .unwrap()
            .contains("coupled equilibria"));
    }
}

/// A series of two points joins a joint fit when the sharing leaves its own parameters
/// identifiable (issue 12): with ΔH° shared it has ΔS° alone of its own. The numbers are
/// statsmodels' (tests/data/independent/make_two_point_joint.py → two_point_joint.txt,
/// statsmodels 0.15.0 WLS on the block design, scaled SEs). A sharing that leaves it more
/// parameters than temperatures is refused in words naming the series; a single fit of it
/// is still refused (three points are needed for an error estimate).
#[test]
fn two_point_series_join_when_the_sharing_allows() {
    let d = folder("two-point");
    let a = write_csv(
        &d,
        "a2.csv",
        &[283.15, 303.15],
        &[4.6052, 3.912],
        &[0.02, 0.02],
    );
    let b = write_csv(
        &d,
        "b4.csv",
        &[283.15, 293.15, 303.15, 313.15],
        &[5.2983, 4.9416, 4.6052, 4.2485],
        &[0.03, 0.02, 0.025, 0.03],
    );
    let out = run(&["fit", &a, &b, "--share", "delta_h", "--json", "--summary"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let j = json_of(&out);
    let rel = 1e-9; // the project's bar (issue 10), not a reference value
                    // two_point_joint.txt: ΔH° (shared), ΔS° of a2, ΔS° of b4 and their SEs; 3 dof.
    let dh = &j["params"]["delta_h"];
    assert!(close(num(&dh["value"]), -25225.173698857892, rel), "{dh}");
    assert!(close(num(&dh["se"]), 453.64399243294747, rel), "{dh}");
    for (s, (v, se)) in [
        (-50.74096697372801, 1.5511931152403804),
        (-45.011242563311555, 1.528330038517552),
    ]
    .into_iter()
    .enumerate()
    {
        let p = &j["series_params"][s]["params"]["delta_s"];
        assert!(close(num(&p["value"]), v, rel), "{p}");
        assert!(close(num(&p["se"]), se, rel), "{p}");
    }
    assert_eq!(j["fit_statistics"]["joint"]["dof"], 3);
    // The separate fits fit a2 exactly; b4's two residual degrees of freedom carry the
    // test of equality (one column removed by sharing ΔH°).
    assert_eq!(j["equality_test"]["df_num"], 1);
    assert_eq!(j["equality_test"]["df_den"], 2);
    // Clarke–Glew with ΔCp° shared leaves a2 three parameters for two temperatures.
    let out = run(&[
        "fit",
        &a,
        &b,
        "--model",
        "clarke-glew",
        "--share",
        "delta_cp",
    ]);
    assert_eq!(out.status.code(), Some(1), "{}", stderr(&out));
    let e = stderr(&out);
    assert!(
        e.contains("the sharing is singular")
            && e.contains("a2")
            && e.contains("2 distinct temperatures"),
        "{e}"
    );
    // Alone, two points are still too few for a fit with an error estimate.
    let out = run(&["fit", &a]);
    assert!(!out.status.success());
    assert!(
        stderr(&out).contains("at least 3 are needed"),
        "{}",
        stderr(&out)
    );
}
