//! End-to-end checks of `vhfit fit --calorimetric T:ΔH:u` (issue 12): the JSON carries the
//! library's ΔH°(T) at each calorimetric temperature, the difference's SE follows the
//! propagation rule, the text says the caution in words, and a malformed item is a usage
//! error (exit 2).
//!
//! Test inputs: the invented binding demo shipped in assets/demo.

use super::cli::{close, demo, json_of, library_fit, run};
use isochore_fit::{FitOptions, Model};

#[test]
fn calorimetric_json_follows_the_library() {
    let path = demo("binding_qx7_halo2.csv");
    let out = run(&[
        "fit",
        &path,
        "--model",
        "cp",
        "--calorimetric",
        "25C:-40:0.5,310.15K:-45:1",
        "--json",
        "--summary",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let j = json_of(&out);
    let fit = library_fit(
        &path,
        &[],
        FitOptions {
            model: Model::CONSTANT_CP,
            ..FitOptions::default()
        },
    );
    let c = j["calorimetric"].as_array().expect("a calorimetric array");
    assert_eq!(c.len(), 2);
    for (x, (t, h, u)) in c
        .iter()
        .zip([(298.15, -40e3, 500.0), (310.15, -45e3, 1000.0)])
    {
        let vh = fit.delta_h_at(t);
        assert!(close(x["t_k"].as_f64().unwrap(), t, 1e-12));
        assert!(close(x["delta_h_cal"].as_f64().unwrap(), h, 1e-12));
        assert!(close(
            x["delta_h_vh"]["value"].as_f64().unwrap(),
            vh.value,
            1e-9
        ));
        let se = (vh.se * vh.se + u * u).sqrt();
        assert!(close(x["difference"]["se"].as_f64().unwrap(), se, 1e-9));
        assert!(close(x["ratio"].as_f64().unwrap(), vh.value / h, 1e-9));
        assert!(x["verdict"]
            .as_str()
            .unwrap()
            .contains("coupled equilibria"));
    }
    // The single fit's own fields are still there.
    assert_eq!(j["model"], "cp");
    assert!(j["params"]["delta_h"]["value"].is_number());
}

#[test]
fn calorimetric_text_and_refusals() {
    let path = demo("binding_qx7_halo2.csv");
    let out = run(&["fit", &path, "--calorimetric", "25C:-40:0.5"]);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("calorimetric ΔH° compared with the van 't Hoff ΔH°"),
        "{text}"
    );
    assert!(text.contains("Fieller"), "{text}");
    for bad in ["25C:-40", "25C:x:1", "25C:-40:-1", "0K:-40:1"] {
        let out = run(&["fit", &path, "--calorimetric", bad]);
        assert_eq!(out.status.code(), Some(2), "{bad}");
    }
}

/// With --report the single fit's report has a "Calorimetric ΔH°" section whose ΔH_vH and
/// ΔH_cal cells are the text output's numbers, each verdict and the caution in words.
#[test]
fn calorimetric_values_appear_in_the_single_report() {
    let path = demo("binding_qx7_halo2.csv");
    let dir = std::env::temp_dir().join(format!("isochore-cal-report-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let md = dir.join("one.md");
    let md_s = md.to_string_lossy().into_owned();
    let args = ["fit", &path, "--calorimetric", "25C:-40:0.5,35C:-47:0.8"];
    let text = String::from_utf8(run(&args).stdout).unwrap();
    let mut with_report = args.to_vec();
    with_report.extend(["--report", &md_s]);
    let out = run(&with_report);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let report = std::fs::read_to_string(&md).unwrap();
    let section = report
        .split("## Calorimetric ΔH°")
        .nth(1)
        .unwrap_or_else(|| panic!("no calorimetric section in\n{report}"));
    // "ΔH_vH = a ± b kJ/mol, ΔH_cal = c ± d kJ/mol" of each text line, in the table.
    let lines: Vec<&str> = text.lines().filter(|l| l.contains("ΔH_vH = ")).collect();
    assert_eq!(lines.len(), 2, "{text}");
    for l in lines {
        let vh = l
            .split("ΔH_vH = ")
            .nth(1)
            .unwrap()
            .split(" kJ/mol")
            .next()
            .unwrap();
        let cal = l
            .split("ΔH_cal = ")
            .nth(1)
            .unwrap()
            .split(" kJ/mol")
            .next()
            .unwrap();
        assert!(
            section.lines().any(|r| r.contains(vh) && r.contains(cal)),
            "{vh} / {cal} not in\n{section}"
        );
    }
    assert!(section.contains("Fieller"), "{section}");
    assert!(section.contains("coupled equilibria"), "{section}");
    // Without calorimetric values, no such section.
    let plain = dir.join("plain.md");
    let out = run(&["fit", &path, "--report", &plain.to_string_lossy()]);
    assert!(out.status.success());
    assert!(!std::fs::read_to_string(&plain)
        .unwrap()
        .contains("Calorimetric ΔH°"));
}
