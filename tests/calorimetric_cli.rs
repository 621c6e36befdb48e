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
