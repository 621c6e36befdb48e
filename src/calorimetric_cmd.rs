//! `vhfit fit --calorimetric [SERIES:]T:ΔH:u[,…]`: calorimetric enthalpies read from the command line
//! (temperature with an optional unit suffix, else --temp-unit; ΔH and u in the --energy
//! unit, default kJ/mol) and compared with each fit's van 't Hoff ΔH°(T)
//! (isochore-fit's [`compare_calorimetric`]), written as text or JSON. With `--share` a
//! value may name its series (`PX-13:25C:-45.1:0.5`) and is compared with that series' ΔH°(T)
//! in the joint fit.

use crate::cli::{parse_temperature, FitArgs};
use crate::load::Job;
use isochore_fit::calorimetric::{compare_calorimetric, CalorimetricComparison, CalorimetricValue};
use isochore_fit::global::{CalorimetricJointFit, GlobalError, GlobalFit};
use isochore_fit::{EnergyUnit, VantHoffFit};
use isochore_report::present::{energy, fixed, plus_minus, show_t};
use std::io::{self, Write};

/// One item of `--calorimetric`: the series it names (`SERIES:T:ΔH:u`, with `--share`),
/// or `None` for every series (`T:ΔH:u`), and the value in SI.
pub type Tagged = (Option<String>, CalorimetricValue);

/// The calorimetric values of `--calorimetric`, in SI, or `None` when not given. Every
/// value applies to every fit; a value naming a series is refused here (it is for
/// `--share`, see [`tagged`]).
///
/// # Errors
/// A usage message naming the item that is not `T:ΔH:u`.
pub fn values(a: &FitArgs) -> Result<Option<Vec<CalorimetricValue>>, String> {
    let Some(items) = tagged(a)? else {
        return Ok(None);
    };
    let mut out = Vec::with_capacity(items.len());
    for (series, v) in items {
        if let Some(name) = series {
            return Err(format!(
                "--calorimetric: a value of series '{name}' (a series name before the temperature, or a series column in --calorimetric-file) is for a joint fit (--share); without it, give temperature:ΔH:u and the value is compared with every series"
            ));
        }
        out.push(v);
    }
    Ok(Some(out))
}

/// The items of `--calorimetric`, each `T:ΔH:u` (every series) or `SERIES:T:ΔH:u` (the
/// series of that name; the name is everything before the last three fields, so it may
/// hold a colon), in SI; `None` when the option is not given.
///
/// # Errors
/// A usage message naming the item that is not `[SERIES:]T:ΔH:u`.
pub fn tagged(a: &FitArgs) -> Result<Option<Vec<Tagged>>, String> {
    let from_file: Vec<Tagged> = match &a.calorimetric_file {
        Some(path) => isochore_data::calorimetric::read_calorimetric(path)
            .map_err(|e| format!("--calorimetric-file: {e}"))?
            .into_iter()
            .map(|r| {
                (
                    r.series,
                    CalorimetricValue {
                        t_k: r.t_k,
                        delta_h: r.delta_h,
                        u: r.u,
                    },
                )
            })
            .collect(),
        None => Vec::new(),
    };
    let Some(items) = &a.calorimetric else {
        return Ok((!from_file.is_empty()).then_some(from_file));
    };
    let unit = a
        .fit
        .energy
        .map_or(EnergyUnit::KilojoulePerMole, |e| e.unit());
    let jpm = unit.joules_per_mole();
    let mut out = Vec::new();
    for item in items.iter().map(|s| s.trim()).filter(|s| !s.is_empty()) {
        let mut parts: Vec<&str> = item.rsplitn(4, ':').collect();
        parts.reverse();
        let bad = || {
            format!(
                "--calorimetric '{item}': give temperature:ΔH:u, e.g. 37C:-28.4:0.5, or with --share series:temperature:ΔH:u, e.g. PX-13:25C:-45.1:0.5 (ΔH and u in {}, u ≥ 0)",
                unit.symbol()
            )
        };
        let (series, fields) = match parts.len() {
            3 => (None, &parts[..]),
            4 if !parts[0].trim().is_empty() => (Some(parts[0].trim().to_string()), &parts[1..]),
            _ => return Err(bad()),
        };
        let t_k = parse_temperature(fields[0])?.kelvin(a.fit.temp_unit, "--calorimetric")?;
        let h: f64 = fields[1].trim().parse().map_err(|_| bad())?;
        let u: f64 = fields[2].trim().parse().map_err(|_| bad())?;
        if !(h.is_finite() && u.is_finite() && u >= 0.0) {
            return Err(bad());
        }
        out.push((
            series,
            CalorimetricValue {
                t_k,
                delta_h: h * jpm,
                u: u * jpm,
            },
        ));
    }
    if out.is_empty() {
        return Err(
            "--calorimetric needs at least one temperature:ΔH:u, e.g. 37C:-28.4:0.5".into(),
        );
    }
    out.extend(from_file);
    Ok(Some(out))
}

/// The values of `items` that apply to the series labelled `label` (or named `name`):
/// those naming no series and those naming it.
pub fn values_for(items: &[Tagged], label: &str, name: &str) -> Vec<CalorimetricValue> {
    items
        .iter()
        .filter(|(s, _)| s.as_deref().is_none_or(|s| s == label || s == name))
        .map(|(_, v)| *v)
        .collect()
}

/// The comparisons for one fit, the error naming the series.
pub fn compare(
    job: &Job,
    fit: &VantHoffFit,
    values: &[CalorimetricValue],
) -> Result<Vec<CalorimetricComparison>, String> {
    compare_calorimetric(fit, values).map_err(|e| {
        format!(
            "{}: series '{}': --calorimetric: {e}",
            job.source, job.series
        )
    })
}

/// The readable block of one fit's comparisons.
pub fn text(w: &mut impl Write, job: &Job, c: &[CalorimetricComparison]) -> io::Result<()> {
    let heading = format!(
        "calorimetric ΔH° compared with the van 't Hoff ΔH° — series “{}”:",
        job.series
    );
    lines(w, job, &heading, c)
}

/// The comparisons under `heading`, one line each with its verdict (the text of a single
/// fit's and of a joint fit's comparisons).
pub fn lines(
    w: &mut impl Write,
    job: &Job,
    heading: &str,
    c: &[CalorimetricComparison],
) -> io::Result<()> {
    let u = energy(job.energy);
    writeln!(w)?;
    writeln!(w, "{heading}")?;
    for x in c {
        let vh = u.estimate(x.van_t_hoff);
        let d = u.estimate(x.difference);
        writeln!(
            w,
            "  at {}: ΔH_vH = {} {sym}, ΔH_cal = {} {sym}, difference = {} {sym}, z = {}",
            show_t(x.calorimetric.t_k, job.temperature),
            plus_minus(vh.value, vh.se),
            plus_minus(
                u.from_si(x.calorimetric.delta_h),
                u.from_si(x.calorimetric.u)
            ),
            plus_minus(d.value, d.se),
            fixed(x.z, 2),
            sym = u.symbol
        )?;
        writeln!(w, "    {}", x.verdict)?;
    }
    Ok(())
}

/// A fit with the calorimetric values as observations of ΔH°(T) (`constrained`, or its
/// refusal, printed in words) under `heading`: each parameter, shared ones once under
/// "(shared)", beside the same parameter of `alone`, the fit of ln K alone, then χ² and the
/// degrees of freedom. The joint fit's block and a single series' alike; `job` gives the
/// display units, `labels` the series.
pub fn constrained_lines(
    w: &mut impl Write,
    job: &Job,
    heading: &str,
    labels: &[String],
    alone: &GlobalFit,
    constrained: Result<&CalorimetricJointFit, &GlobalError>,
) -> io::Result<()> {
    use crate::joint_cmd::{shown, symbol};
    writeln!(w)?;
    writeln!(w, "{heading}")?;
    let fit = match constrained {
        Ok(f) => f,
        Err(e) => {
            writeln!(w, "  not fitted: {e}")?;
            return Ok(());
        }
    };
    let model = alone.model();
    for info in model.params() {
        let shared = alone.shared(info.key).is_some();
        let series: Vec<usize> = if shared {
            vec![0]
        } else {
            (0..labels.len()).collect()
        };
        for s in series {
            let who = if shared {
                "(shared)".to_string()
            } else {
                labels[s].clone()
            };
            let with = fit
                .estimate(info.key, s)
                .map_or_else(|| "—".to_string(), |e| shown(info, job, e));
            let ln_k_only = alone
                .estimate(info.key, s)
                .map_or_else(|| "—".to_string(), |e| shown(info, job, e));
            writeln!(
                w,
                "  {:<10} {:<16} {:<44} | {}",
                symbol(model, info),
                who,
                with,
                ln_k_only
            )?;
        }
    }
    writeln!(
        w,
        "  {}",
        isochore_report::present::joint::constrained_summary(fit)
    )
}

/// A single series fitted with its calorimetric values as observations of ΔH°(T)
/// (isochore-analysis' `fit_single_with_calorimetric`, `--calorimetric-in-fit` without
/// `--share`), beside its fit of ln K alone; a refusal in words.
pub fn single_fit_text(
    w: &mut impl Write,
    job: &Job,
    fitted: &Result<(GlobalFit, CalorimetricJointFit), GlobalError>,
) -> io::Result<()> {
    let heading = format!(
        "{} | ln K alone — series “{}”:",
        isochore_report::present::joint::SINGLE_CONSTRAINED_FIT,
        job.series
    );
    let labels = [job.series.clone()];
    match fitted {
        Ok((alone, with)) => constrained_lines(w, job, &heading, &labels, alone, Ok(with)),
        Err(e) => {
            writeln!(w)?;
            writeln!(w, "{heading}")?;
            writeln!(w, "  not fitted: {e}")
        }
    }
}
