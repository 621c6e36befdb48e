//! The two-point calculation on the command line takes what the window takes (issue 11,
//! "the two-point calculation"): each K with u(K) or σ(ln K), and prints temperatures in the
//! unit they were given in.

use crate::cli::{json_of, run};
use std::process::Output;

fn two_point(extra: &[&str]) -> Output {
    let mut args = vec![
        "two-point",
        "--t1",
        "25",
        "--k1",
        "1.0e6",
        "--t2",
        "37",
        "--k2",
        "4.0e5",
    ];
    args.extend_from_slice(extra);
    run(&args)
}

#[test]
fn u_of_k_and_sigma_of_ln_k_give_the_same_result() {
    // By hand (the two-point van 't Hoff equation with first-order propagation, computed
    // offline with python's math module; R = 8.314462618 J/(mol·K), CODATA 2018):
    // T₁ = 298.15 K, T₂ = 310.15 K, K₂/K₁ = 0.4, σ(ln K) = 0.05 for both:
    // ΔH° = R ln(K₂/K₁)/(1/T₁ − 1/T₂) = −58 707.398 J/mol,
    // SE = R √(σ₁² + σ₂²)/|1/T₁ − 1/T₂| = 4 530.483 J/mol.
    let by_sigma = two_point(&["--sigma-ln-k1", "0.05", "--sigma-ln-k2", "0.05", "--json"]);
    // u(K) = σ(ln K)·K: 5 × 10⁴ on 10⁶ and 2 × 10⁴ on 4 × 10⁵.
    let by_u = two_point(&["--u-k1", "5.0e4", "--u-k2", "2.0e4", "--json"]);
    let mixed = two_point(&["--u-k1", "5.0e4", "--sigma-ln-k2", "0.05", "--json"]);
    for out in [&by_sigma, &by_u, &mixed] {
        assert_eq!(
            out.status.code(),
            Some(0),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let j = json_of(out);
        let dh = j["delta_h"]["value"].as_f64().unwrap();
        let se = j["delta_h"]["se"].as_f64().unwrap();
        assert!((dh - -58_707.398).abs() < 1e-3, "{dh}");
        assert!((se - 4_530.483).abs() < 1e-3, "{se}");
    }
    // One way per K: both is a usage error naming the flags.
    let out = two_point(&["--u-k1", "5.0e4", "--sigma-ln-k1", "0.05"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("--u-k1") && err.contains("--sigma-ln-k1"),
        "{err}"
    );
    let out = two_point(&["--sigma-ln-k2", "-0.05"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("--sigma-ln-k2") && err.contains("σ(ln K)"),
        "{err}"
    );
}

#[test]
fn temperatures_are_printed_in_the_unit_given() {
    let out = run(&[
        "two-point",
        "--t1",
        "298.15",
        "--k1",
        "1.0e6",
        "--t2",
        "310.15",
        "--k2",
        "4.0e5",
        "--temp-unit",
        "K",
    ]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert_eq!(out.status.code(), Some(0), "{text}");
    assert!(
        text.contains("at 298.15 K") && text.contains("at 310.15 K"),
        "{text}"
    );
    assert!(!text.contains("°C"), "{text}");
    let out = run(&[
        "two-point",
        "--t1",
        "77",
        "--k1",
        "1.0e6",
        "--t2",
        "98.6",
        "--k2",
        "4.0e5",
        "--temp-unit",
        "F",
    ]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert_eq!(out.status.code(), Some(0), "{text}");
    assert!(
        text.contains("at 77 °F") && text.contains("at 98.6 °F"),
        "{text}"
    );
}

#[test]
fn each_temperature_takes_a_unit_suffix_and_is_printed_in_it() {
    let out = run(&[
        "two-point",
        "--t1",
        "25C",
        "--k1",
        "1.0e6",
        "--t2",
        "310.15K",
        "--k2",
        "4.0e5",
        "--sigma-ln-k1",
        "0.05",
        "--sigma-ln-k2",
        "0.05",
    ]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{text}{}",
        String::from_utf8_lossy(&out.stderr)
    );
    // 25 °C = 298.15 K (the definition of the Celsius scale).
    assert!(text.contains("at 25 °C (298.150 K)"), "{text}");
    assert!(text.contains("at 310.15 K"), "{text}");
    assert!(
        !text.contains("read as °C"),
        "both units were given: {text}"
    );
    // The same ΔH° as with both temperatures in one unit (by hand above: −58.71 kJ/mol).
    assert!(
        text.contains("ΔH° = -58.7") || text.contains("ΔH° = −58.7"),
        "{text}"
    );
}
