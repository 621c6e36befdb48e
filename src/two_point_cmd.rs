//! `vhfit two-point`: the hand calculation in both directions with propagated
//! uncertainty — ΔH° and ΔS° from two (T, K) pairs, or K at T₂ from (T₁, K₁) and ΔH°.
//!
//! Temperatures take a unit suffix (`25C`, `298.15K`, `77F`), else `--temp-unit`, else °C,
//! as `--tref` and `--at` do; each is printed in the unit it was given in (with kelvin
//! beside it), and the output says when °C was assumed. Two temperatures
//! closer than [`isochore_fit::TEMPERATURE_RESOLUTION_K`] (1 mK) are refused.

use crate::cli::{TempArg, TwoPointArgs};
use crate::output::{self, Style};
use crate::Failure;
use isochore_analysis::json::two_point::{EnthalpyJson, KJson, TwoPointInputs};
use isochore_analysis::KUncertainty;
use isochore_fit::two_point::{enthalpy_from_pairs, indistinguishable, predict_k, StatePoint};
use isochore_fit::Estimate;
use isochore_fit::TEMPERATURE_RESOLUTION_K;
use isochore_report::content::{decimals_for, entropy_unit, num, sig};

/// A value with `d` decimals, or in exponent form when fixed decimals would be too long.
fn fixed(v: f64, d: usize) -> String {
    if v.is_finite() && v.abs() >= 1e12 {
        sig(v, 6)
    } else {
        num(v, d)
    }
}

fn line(name: &str, e: Estimate, unit: &str, lp: &str) -> String {
    let d = decimals_for(e.se);
    format!(
        "{name} = {} ± {} {unit}   {lp}% CI [{}, {}]",
        fixed(e.value, d),
        fixed(e.se, d),
        fixed(e.ci_low, d),
        fixed(e.ci_high, d)
    )
}

/// A number as typed (the shortest form that reads back the same), or about six
/// significant digits in exponent form when that would be very long.
fn as_typed(v: f64) -> String {
    if v == 0.0 || (1e-4..1e9).contains(&v.abs()) {
        format!("{v}")
    } else {
        sig(v, 6)
    }
}

/// A temperature as typed, in its unit, with kelvin beside it: "300 °C (573.150 K)".
fn show_temperature(v: f64, unit: TempArg, t_k: f64) -> String {
    let symbol = unit.unit().symbol();
    if unit == TempArg::K {
        format!("{} {symbol}", as_typed(v))
    } else {
        format!("{} {symbol} ({} K)", as_typed(v), fixed(t_k, 3))
    }
}

fn unit_key(unit: TempArg) -> &'static str {
    match unit {
        TempArg::C => "C",
        TempArg::K => "K",
        TempArg::F => "F",
    }
}

/// Runs `vhfit two-point`.
pub fn run(a: &TwoPointArgs) -> Result<(), Failure> {
    // One rule for temperatures on the command line: a unit suffix (25C, 298.15K), else
    // --temp-unit, else °C (and the output says so). Each is printed in its own unit.
    let unit1 = a.t1.unit.or(a.temp_unit).unwrap_or(TempArg::C);
    let unit2 = a.t2.unit.or(a.temp_unit).unwrap_or(TempArg::C);
    let assumed = a.temp_unit.is_none() && (a.t1.unit.is_none() || a.t2.unit.is_none());
    let unit = unit1;
    let tu = unit.unit();
    let t1 = tu.to_kelvin(a.t1.value);
    let t2 = unit2.unit().to_kelvin(a.t2.value);
    let u_t = tu.difference_to_kelvin(a.u_t);
    let assumed_note = if assumed {
        "temperatures read as °C, the default; give --temp-unit K or F for other units"
    } else {
        ""
    };
    let bad = |e: isochore_fit::Error| {
        let m = e.to_string();
        Failure::usage(if assumed {
            format!("{m}; {assumed_note}")
        } else {
            m
        })
    };
    if !(a.k1.is_finite() && a.k1 > 0.0) {
        return Err(Failure::usage("--k1 must be a positive number"));
    }
    // Each K with u(K) or σ(ln K), one rule for the window and the command line.
    let uncertainty = |u: Option<f64>, sigma: Option<f64>| match sigma {
        Some(s) => (KUncertainty::OfLnK(s), "--sigma-ln-k"),
        None => (KUncertainty::OfK(u.unwrap_or(0.0)), "--u-k"),
    };
    let (unc1, flag1) = uncertainty(a.u_k1, a.sigma_ln_k1);
    let (unc2, flag2) = uncertainty(a.u_k2, a.sigma_ln_k2);
    let sigma_ln_k = |unc: KUncertainty, flag: &str, k: f64| {
        unc.sigma_ln_k(k)
            .map_err(|e| Failure::usage(format!("{flag}: {e}")))
    };
    let sigma1 = sigma_ln_k(unc1, &format!("{flag1}1"), a.k1)?;
    for (name, v) in [("--u-t", a.u_t), ("--u-delta-h", a.u_delta_h)] {
        if !(v.is_finite() && v >= 0.0) {
            return Err(Failure::usage(format!(
                "{name} must be zero or a positive number"
            )));
        }
    }
    for (name, v, k, tu) in [
        ("--t1", a.t1.value, t1, tu),
        ("--t2", a.t2.value, t2, unit2.unit()),
    ] {
        if !(k.is_finite() && k > 0.0) {
            return Err(Failure::usage(format!(
                "{name} {} {} is not a temperature above absolute zero{}",
                output::short(v),
                tu.symbol(),
                if assumed {
                    format!("; {assumed_note}")
                } else {
                    String::new()
                }
            )));
        }
    }
    let p1 = StatePoint {
        t_k: t1,
        sigma_t_k: u_t,
        k: a.k1,
        sigma_ln_k: sigma1,
    };
    let e = a.energy.unit();
    let ef = e.joules_per_mole();
    let (sf, s_unit) = entropy_unit(e);
    let lp = num(a.level * 100.0, 1).trim_end_matches(".0").to_string();
    let t1_text = show_temperature(a.t1.value, unit1, t1);
    let t2_text = show_temperature(a.t2.value, unit2, t2);
    let mut text = String::new();
    let inputs = TwoPointInputs {
        t1_k: t1,
        t2_k: t2,
        k1: a.k1,
        level: a.level,
        // Both in the unit of T₁ (the one `temp_unit` names).
        t1: a.t1.value,
        t2: if unit2 == unit1 {
            a.t2.value
        } else {
            tu.from_kelvin(t2)
        },
        temp_unit: unit_key(unit),
        temp_unit_assumed: assumed,
    };
    let doc = if let Some(k2) = a.k2 {
        if !(k2.is_finite() && k2 > 0.0) {
            return Err(Failure::usage("--k2 must be a positive number"));
        }
        if indistinguishable(t1, t2) {
            return Err(Failure::usage(format!(
                "T₁ = {t1_text} and T₂ = {t2_text} differ by less than the temperature resolution of {} K (1 mK); ΔH° cannot be found from two temperatures that close — give temperatures further apart{}",
                TEMPERATURE_RESOLUTION_K,
                if assumed { format!("; {assumed_note}") } else { String::new() }
            )));
        }
        let p2 = StatePoint {
            t_k: t2,
            sigma_t_k: u_t,
            k: k2,
            sigma_ln_k: sigma_ln_k(unc2, &format!("{flag2}2"), k2)?,
        };
        let r = enthalpy_from_pairs(p1, p2, a.level).map_err(bad)?;
        text.push_str(&format!(
            "two-point van 't Hoff: K₁ = {} at {t1_text}, K₂ = {} at {t2_text} (ΔH° assumed constant)\n",
            sig(a.k1, 5),
            sig(k2, 5),
        ));
        text.push_str(&line("ΔH°", r.delta_h.scaled(1.0 / ef), e.symbol(), &lp));
        text.push('\n');
        text.push_str(&line("ΔS°", r.delta_s.scaled(1.0 / sf), s_unit, &lp));
        text.push('\n');
        serde_json::to_string_pretty(&EnthalpyJson::new(inputs, k2, &r.delta_h, &r.delta_s))
    } else {
        let Some(dh) = a.delta_h else {
            return Err(Failure::usage("give --k2 (for ΔH°) or --delta-h (for K₂)"));
        };
        let r = predict_k(p1, t2, u_t, dh * ef, a.u_delta_h * ef, a.level).map_err(bad)?;
        text.push_str(&format!(
            "two-point van 't Hoff: K₁ = {} at {t1_text}, ΔH° = {} {} (assumed constant), T₂ = {t2_text}\n",
            sig(a.k1, 5),
            sig(dh, 5),
            e.symbol(),
        ));
        let k = r.k2;
        text.push_str(&format!(
            "K₂ = {} (SE {})   {lp}% CI [{}, {}]\n",
            sig(k.value, 5),
            sig(k.se, 3),
            sig(k.ci_low, 5),
            sig(k.ci_high, 5)
        ));
        text.push_str(&line("ln K₂", r.ln_k2, "", &lp));
        text.push('\n');
        serde_json::to_string_pretty(&KJson::new(inputs, dh * ef, &r.ln_k2, &r.k2))
    };
    if a.json {
        let mut out = output::stdout(Style::Json);
        use std::io::Write;
        let doc = doc.map_err(|e| output::stdout_failure(e.into()))?;
        out.write_all(doc.as_bytes())
            .and_then(|()| out.write_all(b"\n"))
            .and_then(|()| out.flush())
            .map_err(output::stdout_failure)
    } else {
        if assumed {
            text.push_str(&format!("note: {assumed_note}\n"));
        }
        output::print(&text)
    }
}
