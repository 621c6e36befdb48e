//! The command line's side of a fit with errors in T (`--sigma-t`, or a σ(T) column chosen
//! with `--column sigma-t=COLUMN`): the fit itself is isochore-analysis' (which calls
//! isochore-fit), its JSON is `isochore_analysis::json::errors_in_t`; here is only the
//! readable block printed after the fit in K only, saying which method made the numbers and
//! how far allowing for σ(T) moves them.

use crate::load::{hint, Job};
use isochore_analysis::json;
use isochore_fit::calorimetric::CalorimetricComparison;
use isochore_fit::errors_in_t::ErrorsInTFit;
use isochore_fit::intervals::IntervalRun;
use isochore_fit::VantHoffFit;
use isochore_report::present::{errors_in_t, names};
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
/// in T, beside the intervals of a Monte Carlo or bootstrap `run` and the `calorimetric`
/// comparisons when there are (a run and comparisons together: both, the comparisons
/// staying the delta method's); otherwise exactly the document of the run, of the
/// comparisons, or of the plain fit, byte for byte as before.
///
/// # Errors
/// The writer's.
#[allow(clippy::too_many_arguments)]
pub fn write_json(
    out: &mut impl Write,
    job: &Job,
    fit: &VantHoffFit,
    errors_in_t: Option<&ErrorsInTFit>,
    run: Option<&IntervalRun>,
    calorimetric: Option<&[CalorimetricComparison]>,
    source: Option<&str>,
    with_points: bool,
) -> io::Result<()> {
    match (errors_in_t, run, calorimetric) {
        (Some(f), None, None) => {
            json::errors_in_t::write_fit_with_errors_in_t(out, job, fit, f, source, with_points)
        }
        (Some(f), r, c) => json::errors_in_t::write_fit_with_additions(
            out,
            job,
            fit,
            source,
            with_points,
            r,
            c,
            Some(f),
        ),
        (None, Some(r), Some(c)) => json::errors_in_t::write_fit_with_additions(
            out,
            job,
            fit,
            source,
            with_points,
            Some(r),
            Some(c),
            None,
        ),
        (None, None, Some(c)) => {
            json::calorimetric::write_fit_with_calorimetric(out, job, fit, source, with_points, c)
        }
        (None, Some(r), None) => {
            json::intervals::write_fit_with_intervals(out, job, fit, source, with_points, r)
        }
        (None, None, None) => json::write_fit(out, job, fit, source, with_points),
    }
}

/// The readable block: the parameters with errors in T beside the fit in K only, S and its
/// degrees of freedom, the comparison in words, and (with `points`) each point's adjusted T,
/// its residuals in T and ln K and its share of S. The lines are isochore-report's
/// (`present::errors_in_t`), the same the reports show.
///
/// # Errors
/// The writer's.
pub fn text(w: &mut impl Write, job: &Job, f: &ErrorsInTFit, points: bool) -> io::Result<()> {
    writeln!(w)?;
    writeln!(w, "{}:", errors_in_t::heading_line(f))?;
    for r in errors_in_t::parameter_rows(f, job.energy) {
        let (with, k_only) = r.plus_minus();
        writeln!(
            w,
            "  {:<10} {:>22} {}   ({}: {})",
            r.symbol,
            with,
            r.unit,
            names::K_ONLY,
            k_only
        )?;
    }
    writeln!(w, "  {}", errors_in_t::sum_line(f))?;
    writeln!(w, "  {}", f.comparison())?;
    if points {
        let line = |c: &[&str]| {
            format!(
                "  {:>5}  {:>12}  {:>8}  {:>12}  {:>10}  {:>13}  {:>8}",
                c[0], c[1], c[2], c[3], c[4], c[5], c[6]
            )
        };
        writeln!(w, "{}", line(&errors_in_t::POINT_HEADER))?;
        let rows = job.rows.iter().map(|o| o.row.get());
        for c in errors_in_t::point_rows(f, rows, job.temperature) {
            let c: Vec<&str> = c.iter().map(String::as_str).collect();
            writeln!(w, "{}", line(&c))?;
        }
    }
    Ok(())
}
