//! `isochore two-point`: the hand calculation in both directions with propagated
//! uncertainty — ΔH° and ΔS° from two (T, K) pairs, or K at T₂ from (T₁, K₁) and ΔH°.

use crate::cli::TwoPointArgs;
use crate::json::est;
use crate::Failure;
use isochore_fit::two_point::{enthalpy_from_pairs, predict_k, StatePoint};
use isochore_fit::Estimate;
use isochore_report::content::{decimals_for, entropy_unit, num, sig};
use serde_json::json;

fn line(name: &str, e: Estimate, unit: &str, lp: &str) -> String {
    let d = decimals_for(e.se);
    format!(
        "{name} = {} ± {} {unit}   {lp}% CI [{}, {}]",
        num(e.value, d),
        num(e.se, d),
        num(e.ci_low, d),
        num(e.ci_high, d)
    )
}

/// Runs `isochore two-point`.
pub fn run(a: &TwoPointArgs) -> Result<(), Failure> {
    let tu = a.temp_unit.unit();
    let t1 = tu.to_kelvin(a.t1);
    let t2 = tu.to_kelvin(a.t2);
    let u_t = tu.difference_to_kelvin(a.u_t);
    let bad = |e: isochore_fit::Error| Failure::usage(e.to_string());
    if !(a.k1.is_finite() && a.k1 > 0.0) {
        return Err(Failure::usage("--k1 must be a positive number"));
    }
    for (name, v) in [
        ("--u-k1", a.u_k1),
        ("--u-k2", a.u_k2),
        ("--u-t", a.u_t),
        ("--u-delta-h", a.u_delta_h),
    ] {
        if !(v.is_finite() && v >= 0.0) {
            return Err(Failure::usage(format!(
                "{name} must be zero or a positive number"
            )));
        }
    }
    let p1 = StatePoint {
        t_k: t1,
        sigma_t_k: u_t,
        k: a.k1,
        sigma_ln_k: a.u_k1 / a.k1,
    };
    let e = a.energy.unit();
    let ef = e.joules_per_mole();
    let (sf, s_unit) = entropy_unit(e);
    let lp = num(a.level * 100.0, 1).trim_end_matches(".0").to_string();
    if let Some(k2) = a.k2 {
        if !(k2.is_finite() && k2 > 0.0) {
            return Err(Failure::usage("--k2 must be a positive number"));
        }
        let p2 = StatePoint {
            t_k: t2,
            sigma_t_k: u_t,
            k: k2,
            sigma_ln_k: a.u_k2 / k2,
        };
        let r = enthalpy_from_pairs(p1, p2, a.level).map_err(bad)?;
        if a.json {
            let doc = json!({
                "direction": "enthalpy",
                "t1_k": t1, "t2_k": t2, "k1": a.k1, "k2": k2, "level": a.level,
                "delta_h": est(&r.delta_h), "delta_s": est(&r.delta_s),
                "version": env!("CARGO_PKG_VERSION"),
            });
            println!("{}", serde_json::to_string_pretty(&doc).unwrap_or_default());
        } else {
            println!(
                "two-point van 't Hoff: K₁ = {} at {} K, K₂ = {} at {} K (ΔH° assumed constant)",
                sig(a.k1, 5),
                num(t1, 2),
                sig(k2, 5),
                num(t2, 2)
            );
            println!(
                "{}",
                line("ΔH°", r.delta_h.scaled(1.0 / ef), e.symbol(), &lp)
            );
            println!("{}", line("ΔS°", r.delta_s.scaled(1.0 / sf), s_unit, &lp));
        }
        return Ok(());
    }
    let Some(dh) = a.delta_h else {
        return Err(Failure::usage("give --k2 (for ΔH°) or --delta-h (for K₂)"));
    };
    let r = predict_k(p1, t2, u_t, dh * ef, a.u_delta_h * ef, a.level).map_err(bad)?;
    if a.json {
        let doc = json!({
            "direction": "k",
            "t1_k": t1, "t2_k": t2, "k1": a.k1, "delta_h": dh * ef, "level": a.level,
            "ln_k2": est(&r.ln_k2), "k2": est(&r.k2),
            "version": env!("CARGO_PKG_VERSION"),
        });
        println!("{}", serde_json::to_string_pretty(&doc).unwrap_or_default());
    } else {
        println!(
            "two-point van 't Hoff: K₁ = {} at {} K, ΔH° = {} {} (assumed constant), T₂ = {} K",
            sig(a.k1, 5),
            num(t1, 2),
            sig(dh, 5),
            e.symbol(),
            num(t2, 2)
        );
        let k = r.k2;
        println!(
            "K₂ = {} (SE {})   {lp}% CI [{}, {}]",
            sig(k.value, 5),
            sig(k.se, 3),
            sig(k.ci_low, 5),
            sig(k.ci_high, 5)
        );
        println!("{}", line("ln K₂", r.ln_k2, "", &lp));
    }
    Ok(())
}
