//! Handbook thermochemistry through the whole engine: unit conversion, the van 't Hoff
//! fits, the model comparison and the two-point calculation. Each reference value names its
//! source beside it.

use isochore_fit::two_point::{enthalpy_from_pairs, predict_k, StatePoint};
use isochore_fit::{
    fit, FitOptions, Measurement, Model, QuantityKind, TemperatureUnit, WarningKind, Weighting,
    GAS_CONSTANT,
};

/// pKw of liquid water at 0.1 MPa, 0–60 °C every 5 °C: IAPWS R11-07(2019) (Bandura & Lvov)
/// as implemented by the PyPI package iapws 1.5.5, written by
/// `tests/data/water_pkw/make_pkw.py` into `pkw_iapws.txt`.
fn water() -> Vec<Measurement> {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/water_pkw/pkw_iapws.txt"
    );
    let text = std::fs::read_to_string(path).expect("fixture pkw_iapws.txt is part of the crate");
    text.lines()
        .filter(|l| !l.trim().is_empty() && !l.starts_with('#'))
        .map(|l| {
            let v: Vec<f64> = l.split_whitespace().map(|t| t.parse().unwrap()).collect();
            let t_k = TemperatureUnit::Celsius.to_kelvin(v[0]);
            let ln_k = QuantityKind::PK.to_ln_k(v[2], t_k).unwrap();
            Measurement::new(t_k, ln_k)
        })
        .collect()
}

fn unweighted(model: Model) -> FitOptions {
    FitOptions {
        model,
        weighting: Weighting::Unweighted,
        ..FitOptions::default()
    }
}

#[test]
fn water_fixture_is_the_handbook_curve() {
    let pts = water();
    assert_eq!(pts.len(), 13);
    // pKw(25 °C) = 13.995 (CRC Handbook of Chemistry and Physics, "Ion product of water"
    // table, from memory).
    let at_25 = pts.iter().find(|p| (p.t_k - 298.15).abs() < 1e-9).unwrap();
    let pkw = QuantityKind::PK.from_ln_k(at_25.ln_k, at_25.t_k);
    assert!((pkw - 13.995).abs() < 0.005, "{pkw}");
}

#[test]
fn water_ionisation_enthalpy_and_heat_capacity() {
    let pts = water();
    let cp = fit(&pts, &unweighted(Model::ConstantCp)).unwrap();
    let dh = cp.delta_h().value;
    let dcp = cp.delta_cp().unwrap().value;
    eprintln!(
        "water, ΔCp° model: ΔH°(298.15 K) = {:.3} ± {:.3} kJ/mol, ΔCp° = {:.1} ± {:.1} J/(mol K), {}",
        dh / 1e3,
        cp.delta_h().se / 1e3,
        dcp,
        cp.delta_cp().unwrap().se,
        cp.comparison.as_ref().unwrap().verdict
    );
    // ΔH°(25 °C) of H₂O(l) ⇌ H⁺(aq) + OH⁻(aq) = 55.8 kJ/mol (CODATA key values,
    // ΔfH°(OH⁻, aq) − ΔfH°(H₂O, l) = −230.015 + 285.83; from memory).
    assert!((dh - 55.8e3).abs() < 1e3, "ΔH° = {dh}");
    // ΔCp° ≈ −224 J/(mol K) at 25 °C (NBS tables: Cp°(OH⁻, aq) = −148.5,
    // Cp°(H₂O, l) = 75.3 J/(mol K); from memory). A constant ΔCp° over 0–60 °C averages a
    // ΔCp° that itself varies with T, so only its sign and size are asserted.
    assert!(dcp < -150.0 && dcp > -300.0, "ΔCp° = {dcp}");
    // The curvature is real: the ΔCp° model must win the comparison.
    let c = cp.comparison.as_ref().unwrap();
    assert_eq!(c.preferred, Model::ConstantCp, "{}", c.verdict);
    assert!(c.f_p_value < 1e-6);
    // ΔH°(T) moves with ΔCp°: about 55.8 + 20·ΔCp°/1000 kJ/mol at 45 °C.
    let dh45 = cp.delta_h_at(318.15).value;
    assert!((dh45 - (dh + 20.0 * dcp)).abs() < 1e-6 * dh.abs());

    // The linear model over the whole range is told it ignores the curvature.
    let lin = fit(&pts, &unweighted(Model::Linear)).unwrap();
    assert!(lin
        .warnings
        .iter()
        .any(|w| w.kind == WarningKind::CurvatureIgnored));
    // Over 20–30 °C only, the straight line gives the same ΔH° near 25 °C.
    let near: Vec<Measurement> = pts
        .iter()
        .copied()
        .filter(|p| (p.t_k - 298.15).abs() <= 5.0 + 1e-9)
        .collect();
    assert_eq!(near.len(), 3);
    let lin_near = fit(&near, &unweighted(Model::Linear)).unwrap();
    assert!(
        (lin_near.delta_h().value - 55.8e3).abs() < 1e3,
        "{}",
        lin_near.delta_h().value
    );
}

#[test]
fn dinitrogen_tetroxide_dissociation_two_point() {
    // N₂O₄(g) ⇌ 2 NO₂(g) at 298.15 K from NBS tables of chemical thermodynamic properties
    // (Wagman et al., 1982; from memory): ΔfH°(NO₂, g) = 33.18, ΔfH°(N₂O₄, g) = 9.16,
    // ΔfG°(NO₂, g) = 51.31, ΔfG°(N₂O₄, g) = 97.89 kJ/mol.
    let dh: f64 = (2.0 * 33.18 - 9.16) * 1e3;
    let dg: f64 = (2.0 * 51.31 - 97.89) * 1e3;
    assert!((dh - 57.2e3).abs() < 1.0);
    let k298 = QuantityKind::DeltaG(isochore_fit::EnergyUnit::JoulePerMole)
        .to_ln_k(dg, 298.15)
        .unwrap()
        .exp();
    // K(298.15 K) ≈ 0.15 (issue 2, from the same table).
    assert!((k298 - 0.148).abs() < 0.002, "K298 = {k298}");
    let k = predict_k(StatePoint::exact(298.15, k298), 350.0, 0.0, dh, 2e3, 0.95).unwrap();
    // K(350 K) ≈ 4.6 (issue 2); with exactly these table values the hand formula gives
    // 0.1484·exp(57200/R·(1/298.15 − 1/350)) = 4.53.
    eprintln!(
        "N₂O₄ ⇌ 2 NO₂: K(298.15 K) = {k298:.4}, K(350 K) = {:.3} (95 % {:.2}–{:.2})",
        k.k2.value, k.k2.ci_low, k.k2.ci_high
    );
    assert!((k.k2.value - 4.6).abs() < 0.15, "K350 = {}", k.k2.value);
    let by_hand = k298 * (dh / GAS_CONSTANT * (1.0 / 298.15 - 1.0 / 350.0)).exp();
    assert!((k.k2.value - by_hand).abs() < 1e-12 * by_hand);
    // σ(ΔH°) = 2 kJ/mol gives σ(ln K₂) = σ(ΔH°)/R·(1/298.15 − 1/350).
    let want_se = 2e3 / GAS_CONSTANT * (1.0 / 298.15 - 1.0 / 350.0);
    assert!((k.ln_k2.se - want_se).abs() < 1e-12);
    assert!(k.k2.ci_low < k.k2.value && k.k2.value < k.k2.ci_high);
    // And back: the two pairs return ΔH°.
    let back = enthalpy_from_pairs(
        StatePoint::exact(298.15, k298),
        StatePoint::exact(350.0, k.k2.value),
        0.95,
    )
    .unwrap();
    assert!((back.delta_h.value - dh).abs() < 1e-6 * dh);
}

#[test]
fn tris_buffer_ionisation_enthalpy() {
    // Tris: pKa(25 °C) = 8.07 and dpKa/dT = −0.028 K⁻¹ (common practice for buffer tables).
    let pts: Vec<Measurement> = [5.0, 15.0, 25.0, 37.0, 45.0]
        .iter()
        .map(|&t_c| {
            let t_k = TemperatureUnit::Celsius.to_kelvin(t_c);
            let pka = 8.07 - 0.028 * (t_k - 298.15);
            Measurement::new(t_k, QuantityKind::PK.to_ln_k(pka, t_k).unwrap())
        })
        .collect();
    let f = fit(&pts, &unweighted(Model::Linear)).unwrap();
    let dh = f.delta_h().value;
    eprintln!("Tris: ionisation ΔH° = {:.2} kJ/mol", dh / 1e3);
    // ΔH° = R T² ln 10 · 0.028 ≈ 47.7 kJ/mol at 25 °C; the calorimetric value is 47.4 kJ/mol
    // (Goldberg, Kishore & Lennen, J. Phys. Chem. Ref. Data 31 (2002) 231; from memory).
    let slope_rule = GAS_CONSTANT * 298.15f64.powi(2) * std::f64::consts::LN_10 * 0.028;
    assert!((dh - slope_rule).abs() < 1.5e3, "{dh} vs {slope_rule}");
    assert!((dh - 47e3).abs() < 1.5e3, "{dh}");
}
