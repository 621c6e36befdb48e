//! Handbook thermochemistry through the whole engine: unit conversion, the van 't Hoff
//! fits, the model comparison and the two-point calculation. Each reference value names its
//! source beside it.

use crate::common::{iapws_water as water, unweighted};
use isochore_fit::two_point::{enthalpy_from_pairs, predict_k, StatePoint};
use isochore_fit::{fit, Measurement, Model, QuantityKind, TemperatureUnit, WarningKind};

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
    let cp = fit(&pts, &unweighted(Model::CONSTANT_CP)).unwrap();
    let dh = cp.delta_h().value;
    let dcp = cp.delta_cp().unwrap().value;
    eprintln!(
        "water, ΔCp° model: ΔH°(298.15 K) = {:.3} ± {:.3} kJ/mol, ΔCp° = {:.1} ± {:.1} J/(mol K), {}",
        dh / 1e3,
        cp.delta_h().se / 1e3,
        dcp,
        cp.delta_cp().unwrap().se,
        cp.comparison().unwrap().verdict
    );
    // The same fit done independently: statsmodels 0.15.0 OLS in the basis 1, 1/T, ln T
    // (tests/data/independent/make_independent.py → independent.txt). Same data, same
    // model, so only rounding may differ.
    assert!(
        (dh - 56514.4092113292).abs() < 1e-9 * dh.abs(),
        "ΔH° = {dh}"
    );
    assert!(
        (dcp - -216.549019424277).abs() < 1e-9 * dcp.abs(),
        "ΔCp° = {dcp}"
    );
    // Against the formulation itself: ΔH°(25 °C) = 56.377 kJ/mol and ΔCp°(25 °C) =
    // −217.4 J/(mol K) by central differences of IAPWS R11-07 (iapws 1.5.5, same script).
    // A constant ΔCp° over 0–60 °C averages a ΔCp° that runs from −283 to −193 J/(mol K) in
    // the formulation; that model error is +0.24 % in ΔH° and +0.4 % in ΔCp° here, so the
    // bands are 0.5 % and 2 %. (For scale: the calorimetric ΔH° is 55.8 kJ/mol, CODATA key
    // values ΔfH°(OH⁻, aq) − ΔfH°(H₂O, l) = −230.015 + 285.830; from memory.)
    assert!((dh - 56377.3).abs() < 0.005 * 56377.3, "ΔH° = {dh}");
    assert!((dcp - -217.44).abs() < 0.02 * 217.44, "ΔCp° = {dcp}");
    // The curvature is real: the ΔCp° model must beat the linear one. The formulation's
    // ΔCp° itself runs from −283 to −193 J/(mol K) over the range (above), so the next step
    // of the ladder, a ΔCp° linear in T (Clarke–Glew), is supported too.
    let c = cp.comparison().unwrap();
    assert!(c.steps[0].supported && c.f_p_value < 1e-6, "{}", c.verdict);
    assert_eq!(c.steps[1].larger, Model::CLARKE_GLEW);
    assert!(c.steps[1].supported, "{}", c.verdict);
    assert_eq!(c.preferred, Model::CLARKE_GLEW, "{}", c.verdict);
    // ΔH°(45 °C) from the library against R (c·T − b) of the statsmodels basis at 318.15 K
    // (independent.txt).
    let dh45 = cp.delta_h_at(318.15).value;
    assert!(
        (dh45 - 52183.4288228437).abs() < 1e-9 * dh45.abs(),
        "{dh45}"
    );

    // The linear model over the whole range is told it ignores the curvature.
    let lin = fit(&pts, &unweighted(Model::LINEAR)).unwrap();
    assert!(lin
        .warnings()
        .iter()
        .any(|w| w.kind == WarningKind::CurvatureIgnored));
    // Over 20–30 °C only, the straight line gives the same ΔH° near 25 °C.
    let near: Vec<Measurement> = pts
        .iter()
        .copied()
        .filter(|p| (p.t_k - 298.15).abs() <= 5.0 + 1e-9)
        .collect();
    assert_eq!(near.len(), 3);
    let lin_near = fit(&near, &unweighted(Model::LINEAR))
        .unwrap()
        .delta_h()
        .value;
    // statsmodels OLS on the same three points (independent.txt); and the secant over
    // 20–30 °C is within 0.05 % of the formulation's ΔH°(25 °C) = 56.377 kJ/mol above.
    assert!(
        (lin_near - 56398.3773519847).abs() < 1e-9 * lin_near,
        "{lin_near}"
    );
    assert!((lin_near - 56377.3).abs() < 5e-4 * 56377.3, "{lin_near}");
}

#[test]
fn dinitrogen_tetroxide_dissociation_two_point() {
    // N₂O₄(g) ⇌ 2 NO₂(g) at 298.15 K from NBS tables of chemical thermodynamic properties
    // (Wagman et al., 1982; from memory): ΔfH°(NO₂, g) = 33.18, ΔfH°(N₂O₄, g) = 9.16,
    // ΔfG°(NO₂, g) = 51.31, ΔfG°(N₂O₄, g) = 97.89 kJ/mol, so ΔrH° = 57.20 and
    // ΔrG° = 4.73 kJ/mol (Hess's law; the inputs of the library, not results).
    let dh = 57.20e3;
    let dg = 4.73e3;
    // Every expected number below is from scipy 1.17.1 / numpy 2.4.6 with R = 8.314462618
    // J/(mol K) (CODATA 2018): tests/data/independent/make_independent.py → independent.txt.
    // K = exp(−ΔG°/RT) through the library's ΔG° unit conversion.
    let k298 = QuantityKind::DeltaG(isochore_fit::EnergyUnit::JoulePerMole)
        .to_ln_k(dg, 298.15)
        .unwrap()
        .exp();
    assert!((k298 - 0.148367866558727).abs() < 1e-12, "K298 = {k298}");
    let k = predict_k(StatePoint::exact(298.15, k298), 350.0, 0.0, dh, 2e3, 0.95).unwrap();
    eprintln!(
        "N₂O₄ ⇌ 2 NO₂: K(298.15 K) = {k298:.4}, K(350 K) = {:.3} (95 % {:.2}–{:.2})",
        k.k2.value, k.k2.ci_low, k.k2.ci_high
    );
    // K(350 K) by the integrated van 't Hoff equation with constant ΔH° (its definition).
    assert!(
        (k.k2.value - 4.52772850772038).abs() < 1e-12 * 4.53,
        "K350 = {}",
        k.k2.value
    );
    // σ(ΔH°) = 2 kJ/mol: ln K₂ is linear in ΔH°, so σ(ln K₂) = σ(ΔH°)/R·(1/298.15 − 1/350)
    // exactly, and the 95 % interval is exp(ln K₂ ± z₀.₉₇₅ σ) with scipy's normal quantile.
    assert!(
        (k.ln_k2.se - 0.119520310660124).abs() < 1e-12,
        "{}",
        k.ln_k2.se
    );
    assert!(
        (k.k2.ci_low - 3.58215608048073).abs() < 1e-8,
        "{}",
        k.k2.ci_low
    );
    assert!(
        (k.k2.ci_high - 5.72290123016434).abs() < 1e-8,
        "{}",
        k.k2.ci_high
    );
    // And back: the two pairs return ΔH°.
    let back = enthalpy_from_pairs(
        StatePoint::exact(298.15, 0.148367866558727),
        StatePoint::exact(350.0, 4.52772850772038),
        0.95,
    )
    .unwrap();
    assert!(
        (back.delta_h.value - dh).abs() < 1e-9 * dh,
        "{}",
        back.delta_h.value
    );
}

#[test]
fn tris_buffer_ionisation_enthalpy() {
    // Tris buffer tables: pKa(25 °C) = 8.07 and dpKa/dT = −0.028 K⁻¹ (the values printed
    // in biochemistry buffer tables and suppliers' data sheets; from memory).
    let pts: Vec<Measurement> = [5.0, 15.0, 25.0, 37.0, 45.0]
        .iter()
        .map(|&t_c| {
            let t_k = TemperatureUnit::Celsius.to_kelvin(t_c);
            let pka = 8.07 - 0.028 * (t_k - 298.15);
            Measurement::new(t_k, QuantityKind::PK.to_ln_k(pka, t_k).unwrap())
        })
        .collect();
    let f = fit(&pts, &unweighted(Model::LINEAR)).unwrap();
    let dh = f.delta_h().value;
    eprintln!("Tris: ionisation ΔH° = {:.2} kJ/mol", dh / 1e3);
    // statsmodels 0.15.0 OLS of the same ln K on 1/T gives 47.450073 kJ/mol
    // (tests/data/independent/make_independent.py → independent.txt).
    assert!((dh - 47450.0734722113).abs() < 1e-9 * dh, "{dh}");
    // The calorimetric value: ΔrH°(298.15 K) = 47.45 kJ/mol (Goldberg, Kishore & Lennen,
    // J. Phys. Chem. Ref. Data 31 (2002) 231, selected values; from memory). The table's
    // −0.028 K⁻¹ has two significant figures (±0.0005 K⁻¹, ±1.8 %), so ±0.85 kJ/mol.
    assert!((dh - 47.45e3).abs() < 0.85e3, "{dh}");
}
