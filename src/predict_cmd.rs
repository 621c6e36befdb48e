//! `vhfit predict`: fits the file, then gives ln K, K, ΔG°, ΔH° and ΔS° at each asked
//! temperature with confidence and prediction intervals, warns when a temperature lies
//! outside the measured range, and optionally finds the temperature for a target K. With
//! `--intervals monte-carlo|bootstrap` (or, without `--intervals`, the method a project
//! records for the series), K and ΔG° at each temperature and the temperature
//! for the target K also get that method's interval (text: the table of `vhfit fit`'s
//! intervals block; JSON: `method` on each, and an `intervals` record).

use crate::cli::PredictArgs;
use crate::fit_cmd::fit_job;
use crate::load::{load, Job};
use crate::output::{self, Style};
use crate::Failure;
use isochore_analysis::json::predict::PredictJson;
use isochore_fit::intervals::IntervalRun;
use isochore_fit::{QuantityKind, VantHoffFit};
use isochore_report::content::{decimals_for, entropy_unit, num, show_t, sig};
use isochore_report::present::{quantity, times_ten};
use std::io::Write;

/// Runs `vhfit predict`.
pub fn run(a: &PredictArgs) -> Result<(), Failure> {
    let temps_k: Vec<f64> =
        a.at.iter()
            .map(|t| t.kelvin(a.fit.temp_unit, "--at"))
            .collect::<Result<_, _>>()
            .map_err(Failure::usage)?;
    crate::load::reference_temperature(&a.fit).map_err(Failure::usage)?;
    // Temperatures are printed in the unit they were typed in (the first --at's suffix),
    // else in --temp-unit.
    let unit =
        a.at.first()
            .and_then(|t| t.unit)
            .unwrap_or(a.fit.temp_unit)
            .unit();
    if let Some(k) = a.for_k {
        if !(k.is_finite() && k > 0.0) {
            return Err(Failure::usage("--for-k must be a positive number"));
        }
    }
    // Without --intervals, the method each series of a project records.
    let flags = crate::intervals_cmd::Flags::of_predict(a);
    let given = crate::intervals_cmd::request_for(flags, std::slice::from_ref(&a.file))
        .map_err(Failure::usage)?;
    let jobs = load(&a.file, &a.fit, false).map_err(Failure::input)?;
    let mut fits: Vec<(Job, VantHoffFit, Option<f64>)> = Vec::new();
    let mut runs: Vec<Option<IntervalRun>> = Vec::new();
    for job in jobs {
        let fit = fit_job(&job).map_err(Failure::input)?;
        let for_k = target_k(a, &job)?;
        // With --intervals monte-carlo|bootstrap: K and ΔG° at each temperature and T at
        // the target K resampled (a refusal is a usage error, as for `vhfit fit`).
        let targets: Vec<f64> = for_k.into_iter().collect();
        let request =
            crate::intervals_cmd::for_job(flags, false, &given, &job).map_err(Failure::usage)?;
        runs.push(
            crate::intervals_cmd::run_at(&job, &fit, &request, &temps_k, &targets)
                .map_err(Failure::usage)?,
        );
        fits.push((job, fit, for_k));
    }
    let mut out = output::stdout(if a.json { Style::Json } else { Style::Text });
    let io = output::stdout_failure;
    if a.json {
        let docs: Vec<PredictJson> = fits
            .iter()
            .zip(&runs)
            .map(|((job, fit, for_k), run)| {
                let mut doc = PredictJson::new(job, fit, &temps_k, *for_k, |t| {
                    format!("at {} K", sig(t, 6))
                });
                if let Some(r) = run {
                    doc.apply_run(r);
                }
                doc
            })
            .collect();
        let written = match docs.as_slice() {
            [one] => serde_json::to_writer_pretty(&mut out, one),
            several => serde_json::to_writer_pretty(&mut out, several),
        };
        written.map_err(|e| io(e.into()))?;
        writeln!(out).map_err(io)?;
        return out.flush().map_err(io);
    }
    for ((job, fit, for_k), run) in fits.iter().zip(&runs) {
        let e = job.energy;
        let ef = e.joules_per_mole();
        let (sf, s_unit) = entropy_unit(e);
        let lp = num(fit.options().level * 100.0, 1)
            .trim_end_matches(".0")
            .to_string();
        let symbol = quantity::quantity_symbol(job.quantity, &job.quantity_header);
        writeln!(
            out,
            "{} — series “{}” ({} model, measured {} to {})",
            job.source,
            job.series,
            fit.model().key(),
            show_t(fit.t_min_k(), unit),
            show_t(fit.t_max_k(), unit)
        )
        .map_err(io)?;
        for &t in &temps_k {
            let p = fit.predict(t).map_err(|e| Failure::input(e.to_string()))?;
            writeln!(out, "at {} ({} K):", show_t(t, unit), num(t, 2)).map_err(io)?;
            writeln!(
                out,
                "  K     = {}   {lp}% CI [{}, {}]   {lp}% PI [{}, {}]",
                times_ten(p.k.value, 4),
                times_ten(p.k.ci.low, 4),
                times_ten(p.k.ci.high, 4),
                times_ten(p.k.pi.low, 4),
                times_ten(p.k.pi.high, 4)
            )
            .map_err(io)?;
            // The quantity the file gave, when it is not K or ln K (shown above).
            if !matches!(job.quantity, QuantityKind::K | QuantityKind::LnK) {
                let pi = quantity::from_ln_k(
                    job.quantity,
                    p.ln_k.value,
                    (p.ln_k.pi.low, p.ln_k.pi.high),
                    t,
                );
                let unit = quantity::quantity_unit(job.quantity);
                writeln!(
                    out,
                    "  {}   {lp}% PI [{}, {}]{}{unit}",
                    quantity::quantity_with_interval(
                        job.quantity,
                        &symbol,
                        p.ln_k.value,
                        (p.ln_k.ci.low, p.ln_k.ci.high),
                        t,
                        &lp
                    ),
                    quantity::write_quantity(job.quantity, pi.1),
                    quantity::write_quantity(job.quantity, pi.2),
                    if unit.is_empty() { "" } else { " " },
                )
                .map_err(io)?;
            }
            let d = decimals_for(p.ln_k.se);
            writeln!(
                out,
                "  ln K  = {} ± {}   CI [{}, {}]   PI [{}, {}]",
                num(p.ln_k.value, d),
                num(p.ln_k.se, d),
                num(p.ln_k.ci.low, d),
                num(p.ln_k.ci.high, d),
                num(p.ln_k.pi.low, d),
                num(p.ln_k.pi.high, d)
            )
            .map_err(io)?;
            for (name, est, f, u) in [
                ("ΔG°", p.delta_g, ef, e.symbol()),
                ("ΔH°", p.delta_h, ef, e.symbol()),
                ("ΔS°", p.delta_s, sf, s_unit),
            ] {
                let x = est.scaled(1.0 / f);
                let d = decimals_for(x.se);
                writeln!(
                    out,
                    "  {name}   = {} ± {} {u}   CI [{}, {}]",
                    num(x.value, d),
                    num(x.se, d),
                    num(x.ci_low, d),
                    num(x.ci_high, d)
                )
                .map_err(io)?;
            }
            if let Some(w) = &p.warning {
                writeln!(out, "  warning: {w}").map_err(io)?;
            }
        }
        if let Some(k) = *for_k {
            // "K_d = 10.00 nM (K = 1.000 × 10⁸)": the target also in the file's quantity.
            let target = if matches!(job.quantity, QuantityKind::K | QuantityKind::DeltaG(_)) {
                format!("K = {}", times_ten(k, 4))
            } else {
                let unit = quantity::quantity_unit(job.quantity);
                format!(
                    "{symbol} = {}{}{unit} (K = {})",
                    quantity::write_quantity(job.quantity, job.quantity.from_ln_k(k.ln(), 298.15)),
                    if unit.is_empty() { "" } else { " " },
                    times_ten(k, 4)
                )
            };
            match fit.temperature_for_k(k) {
                Ok(t) => {
                    writeln!(
                        out,
                        "temperature where {target}: {} (SE {} K; {lp}% CI {} to {}){}",
                        show_t(t.value, unit),
                        num(t.se, 2),
                        show_t(t.ci_low, unit),
                        show_t(t.ci_high, unit),
                        if fit.is_extrapolation(t.value) {
                            " — outside the measured range: an extrapolation"
                        } else {
                            ""
                        }
                    )
                    .map_err(io)?;
                }
                Err(e) => writeln!(out, "temperature where {target}: {e}").map_err(io)?,
            }
        }
        for w in job
            .warnings
            .iter()
            .chain(fit.warnings().iter().map(|w| &w.message))
        {
            writeln!(out, "warning: {w}").map_err(io)?;
        }
        // The resampled intervals, beside the delta method's (the same block as `vhfit fit`).
        if let Some(r) = run {
            crate::intervals_cmd::text(&mut out, job, fit, r).map_err(io)?;
        }
    }
    out.flush().map_err(io)
}

/// The target K of `--for-k`, or of `--for-value` read in the file's own quantity (a K_d
/// in its column's unit, a pKa, a log K) and turned into K by the importer's rule.
fn target_k(a: &PredictArgs, job: &Job) -> Result<Option<f64>, Failure> {
    let Some(v) = a.for_value else {
        return Ok(a.for_k);
    };
    if let QuantityKind::DeltaG(_) = job.quantity {
        return Err(Failure::usage(
            "--for-value cannot be used with a ΔG° file: a ΔG° target is a different K at \
             each temperature; give the target as --for-k",
        ));
    }
    // T only matters for ΔG°, refused above.
    job.quantity
        .to_ln_k(v, 298.15)
        .map(|ln_k| Some(ln_k.exp()))
        .ok()
        .filter(|k| k.is_some_and(|k| k.is_finite() && k > 0.0))
        .ok_or_else(|| {
            Failure::usage(format!(
                "--for-value {v} is not a possible {} (it must give a positive, finite K)",
                quantity::quantity_symbol(job.quantity, &job.quantity_header)
            ))
        })
}
