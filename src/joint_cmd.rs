//! `vhfit fit A.csv B.csv --share KEYS`: every data set of every file fitted together with
//! the named parameters shared (isochore-analysis' [`fit_joint`]), printed as one readable
//! account — shared and per-series parameters, the joint and separate fits side by side,
//! differences between series, the test of equality in words and the points by series — or
//! as one JSON object.

use crate::cli::FitArgs;
use crate::load::{load, Job};
use crate::output::{self, Style};
use crate::Failure;
use isochore_analysis::joint::{fit_joint, JointAnalysis};
use isochore_analysis::json::joint::write_joint;
use isochore_fit::{Estimate, ParamInfo};
use isochore_report::present::{diag, fixed, flag_words, percent, plus_minus, show_t, unit_of};
use std::io::{self, Write};

/// Runs a joint fit of every data set in `a.files`, sharing `keys`.
pub fn run(a: &FitArgs, keys: &[String]) -> Result<(), Failure> {
    crate::load::reference_temperature(&a.fit).map_err(Failure::usage)?;
    if a.report.is_some() {
        return Err(Failure::usage(
            "--report is not available with --share yet: reports of a joint fit are not written; use --json or the text output",
        ));
    }
    let keys: Vec<String> = keys
        .iter()
        .map(|k| k.trim().to_string())
        .filter(|k| !k.is_empty())
        .collect();
    if keys.is_empty() {
        return Err(Failure::usage(
            "--share needs one or more parameter keys, e.g. --share delta_cp or --share delta_h,delta_cp",
        ));
    }
    let mut sets: Vec<Job> = Vec::new();
    for path in &a.files {
        sets.extend(load(path, &a.fit, false).map_err(Failure::input)?);
    }
    let joint = fit_joint(&sets, &keys).map_err(|e| Failure::input(format!("--share: {e}")))?;
    let style = if a.json { Style::Json } else { Style::Text };
    let mut out = output::stdout(style);
    let io_fail = output::stdout_failure;
    if a.json {
        write_joint(&mut out, &sets, &joint, !a.summary).map_err(io_fail)?;
        out.write_all(b"\n").map_err(io_fail)?;
    } else {
        text(&mut out, &sets, &joint, !a.summary).map_err(io_fail)?;
    }
    out.flush().map_err(io_fail)
}

fn symbol(model: isochore_fit::Model, info: &ParamInfo) -> String {
    if isochore_report::present::varies_with_t(model, info) {
        format!("{}(θ)", info.symbol)
    } else {
        info.symbol.to_string()
    }
}

/// "value ± SE  [low, high]" in the parameter's display unit.
fn shown(info: &ParamInfo, job: &Job, e: Estimate) -> String {
    let u = unit_of(info.dimension, job.energy);
    let e = u.estimate(e);
    let d = isochore_report::present::decimals_for(e.se);
    format!(
        "{}  [{}, {}] {}",
        plus_minus(e.value, e.se),
        fixed(e.ci_low, d),
        fixed(e.ci_high, d),
        u.symbol
    )
}

/// The readable account of a joint fit.
fn text(w: &mut impl Write, sets: &[Job], j: &JointAnalysis, points: bool) -> io::Result<()> {
    let fit = &j.fit;
    let first = &sets[0];
    let tu = first.temperature;
    let params = fit.model().params();
    let shared: Vec<String> = params
        .iter()
        .filter(|p| j.shared.contains(&p.key))
        .map(|p| symbol(fit.model(), p))
        .collect();
    writeln!(
        w,
        "joint fit of {} series — model: {}; shared: {}; θ = {}; {}% intervals",
        sets.len(),
        fit.model().describe(),
        shared.join(", "),
        show_t(fit.options().t_ref_k, tu),
        percent(fit.options().level)
    )?;
    for (s, set) in sets.iter().enumerate() {
        let (lo, hi) = fit.t_range_k(s).unwrap_or((f64::NAN, f64::NAN));
        writeln!(
            w,
            "  series {} “{}” ({}): {} used, {} to {}, T_hm = {}",
            s + 1,
            j.labels[s],
            set.source,
            fit.points(s)
                .map_or(0, |p| p.iter().filter(|d| d.used).count()),
            show_t(lo, tu),
            show_t(hi, tu),
            show_t(fit.t_harmonic_k(s).unwrap_or(f64::NAN), tu)
        )?;
    }
    writeln!(w)?;
    writeln!(w, "shared parameters (joint fit):")?;
    for info in params.iter().filter(|p| j.shared.contains(&p.key)) {
        if let Some(e) = fit.shared(info.key) {
            writeln!(
                w,
                "  {:<10} {}",
                symbol(fit.model(), info),
                shown(info, first, e)
            )?;
        }
    }
    writeln!(w)?;
    writeln!(
        w,
        "per-series parameters: joint fit | separate fits (every parameter per series)"
    )?;
    for (s, label) in j.labels.iter().enumerate() {
        for info in params {
            let joint = if j.shared.contains(&info.key) {
                "(shared)".to_string()
            } else {
                fit.estimate(info.key, s)
                    .map_or_else(String::new, |e| shown(info, first, e))
            };
            let separate = j
                .equality
                .as_ref()
                .and_then(|t| t.full().estimate(info.key, s))
                .map_or_else(|| "—".to_string(), |e| shown(info, first, e));
            writeln!(
                w,
                "  {:<10} {:<16} {:<44} | {}",
                symbol(fit.model(), info),
                label,
                joint,
                separate
            )?;
        }
    }
    let diffs = fit.differences();
    if !diffs.is_empty() {
        writeln!(w)?;
        writeln!(
            w,
            "differences between series (joint fit, interval from the joint covariance):"
        )?;
        for d in diffs {
            let Some(info) = params.iter().find(|p| p.key == d.key) else {
                continue;
            };
            writeln!(
                w,
                "  {:<10} {} − {}: {}",
                symbol(fit.model(), info),
                j.labels[d.a],
                j.labels[d.b],
                shown(info, first, d.estimate)
            )?;
        }
    }
    writeln!(w)?;
    writeln!(w, "fit statistics       joint fit        separate fits")?;
    let sep = j.equality.as_ref().map(|t| t.full());
    let row = |name: &str, a: String, b: Option<String>| {
        format!(
            "  {:<18} {:<16} {}",
            name,
            a,
            b.unwrap_or_else(|| "—".into())
        )
    };
    writeln!(
        w,
        "{}",
        row(
            "parameters",
            fit.n_params().to_string(),
            sep.map(|f| f.n_params().to_string())
        )
    )?;
    writeln!(
        w,
        "{}",
        row(
            "degrees of freedom",
            fit.dof().to_string(),
            sep.map(|f| f.dof().to_string())
        )
    )?;
    writeln!(
        w,
        "{}",
        row(
            "χ²",
            fixed(fit.statistics().chi2, 4),
            sep.map(|f| fixed(f.statistics().chi2, 4))
        )
    )?;
    let aicc =
        |f: &isochore_fit::GlobalFit| f.statistics().aicc.map_or("—".into(), |v| fixed(v, 2));
    writeln!(w, "{}", row("AICc", aicc(fit), sep.map(aicc)))?;
    writeln!(w)?;
    match &j.equality {
        Some(t) => writeln!(w, "test of equality: {}", t.verdict())?,
        None => writeln!(w, "test of equality: not possible (see the warnings)")?,
    }
    if let Some(c) = &j.compensation {
        writeln!(w)?;
        writeln!(
            w,
            "enthalpy–entropy compensation (separate fits, ΔH° and ΔS° at θ):"
        )?;
        if let Some(b) = &c.beta {
            writeln!(w, "  {}", b.verdict)?;
        }
        if let Some(e) = &c.exner {
            writeln!(w, "  {}", e.verdict)?;
        }
    }
    if points {
        writeln!(w)?;
        writeln!(
            w,
            "points by series (externally studentized residual t, leverage h, Cook's D):"
        )?;
        for (s, set) in sets.iter().enumerate() {
            let Some(diags) = fit.points(s) else { continue };
            writeln!(w, "  series {} “{}”", s + 1, j.labels[s])?;
            for (o, d) in set.rows.iter().zip(diags) {
                writeln!(
                    w,
                    "    row {:>4}  {}  ln K {:>10}  residual {:>9}  t {:>7}  h {:>6}  D {:>6}{}{}",
                    o.row.to_string(),
                    show_t(d.t_k, tu),
                    fixed(d.ln_k, 4),
                    fixed(d.residual, 4),
                    d.student_ext.map_or("—".into(), |v| fixed(v, 2)),
                    diag(d.leverage),
                    d.cooks_d.map_or("—".into(), diag),
                    if d.used { "" } else { "  (excluded)" },
                    if d.flags.any() {
                        format!("  {}", flag_words(d.flags))
                    } else {
                        String::new()
                    }
                )?;
            }
        }
    }
    if !j.warnings.is_empty() {
        writeln!(w)?;
        writeln!(w, "warnings:")?;
        for x in &j.warnings {
            writeln!(w, "  - {x}")?;
        }
    }
    Ok(())
}
