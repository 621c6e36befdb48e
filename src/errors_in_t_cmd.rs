//! The command line's side of a fit with errors in T (`--sigma-t`, or a σ(T) column chosen
//! with `--column sigma-t=COLUMN`): the fit itself is isochore-analysis' (which calls
//! isochore-fit), its JSON is `isochore_analysis::json::errors_in_t`; here is only the
//! readable block printed after the fit in K only, saying which method made the numbers and
//! how far allowing for σ(T) moves them.

use crate::load::{hint, Job};
use isochore_analysis::json;
use isochore_fit::errors_in_t::ErrorsInTFit;
use isochore_fit::VantHoffFit;
use isochore_report::present::{fixed, names, plus_minus, show_t, sig, unit_of};
use std::io::{self, Write};

/// The fit with errors in T of `job`, when it has σ(T); a refusal is added to `failures`
/// (with the flag that settles it) and gives `None`.
pub fn fit(job: &Job, failures: &mut Vec<String>) -> Option<ErrorsInTFit> {
    match job.fit_errors_in_t()? {
        Ok(f) => Some(f),
        Err(e) => {
            failures.push(format!(
                "{e}{} ({} left out)",
                hint(e.remedy()),
                names::ERRORS_IN_T
            ));
            None
        }
    }
}

/// Writes the JSON of one fit: with the `errors_in_t` block when there is a fit with errors
/// in T, else exactly the plain fit's document.
///
/// # Errors
/// The writer's.
pub fn write_json(
    out: &mut impl Write,
    job: &Job,
    fit: &VantHoffFit,
    errors_in_t: Option<&ErrorsInTFit>,
    source: Option<&str>,
    with_points: bool,
) -> io::Result<()> {
    match errors_in_t {
        Some(f) => {
            json::errors_in_t::write_fit_with_errors_in_t(out, job, fit, f, source, with_points)
        }
        None => json::write_fit(out, job, fit, source, with_points),
    }
}

/// The readable block: the parameters with errors in T beside the fit in K only, S and its
/// degrees of freedom, the comparison in words, and (with `points`) each point's adjusted T,
/// its residuals in T and ln K and its share of S.
///
/// # Errors
/// The writer's.
pub fn text(w: &mut impl Write, job: &Job, f: &ErrorsInTFit, points: bool) -> io::Result<()> {
    writeln!(w)?;
    writeln!(
        w,
        "{} — {} (numbers by {}; {}):",
        names::ERRORS_IN_T,
        f.sigma_t().describe(),
        names::errors_in_t_method(f.method()),
        names::sigma_convention(f.convention())
    )?;
    for (p, k) in f.params().iter().zip(f.k_only().params()) {
        let u = unit_of(p.info.dimension, job.energy);
        let e = u.estimate(p.estimate);
        let ko = u.estimate(k.estimate);
        writeln!(
            w,
            "  {:<10} {:>22} {}   ({}: {})",
            p.info.symbol,
            plus_minus(e.value, e.se),
            u.symbol,
            names::K_ONLY,
            plus_minus(ko.value, ko.se)
        )?;
    }
    writeln!(
        w,
        "  S = {} on {} degrees of freedom (reduced χ² {})",
        sig(f.chi2(), 5),
        f.dof(),
        sig(f.reduced_chi2(), 4)
    )?;
    writeln!(w, "  {}", f.comparison())?;
    if points {
        writeln!(
            w,
            "  {:>5}  {:>12}  {:>8}  {:>12}  {:>10}  {:>13}  {:>8}",
            "row",
            "T",
            names::SIGMA_T,
            names::ADJUSTED_T,
            "T − T*",
            "ln K − f(T*)",
            "share"
        )?;
        let total = f.chi2();
        for (o, p) in job.rows.iter().zip(f.points()) {
            let share = if p.used && total > 0.0 {
                format!("{} %", fixed(100.0 * p.chi2_contribution / total, 1))
            } else if p.used {
                "0 %".to_string()
            } else {
                names::EXCLUDED.to_string()
            };
            writeln!(
                w,
                "  {:>5}  {:>12}  {:>8}  {:>12}  {:>10}  {:>13}  {:>8}",
                o.row.to_string(),
                show_t(p.t_k, job.temperature),
                format!("{} K", sig(p.sigma_t_k, 3)),
                show_t(p.t_adjusted_k, job.temperature),
                format!("{} K", sig(p.residual_t_k, 3)),
                sig(p.residual_ln_k, 3),
                share
            )?;
        }
    }
    Ok(())
}
