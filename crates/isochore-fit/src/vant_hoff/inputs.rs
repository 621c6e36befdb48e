//! Validation and preparation of the input, shared by both engines: [`check_inputs`]
//! checks every point and option once, before any arithmetic, in the order the errors are
//! reported; [`prepare`] collects the used points, their weights and ln K; [`design`] builds
//! the design matrix of a model on them for the general solver.

use crate::error::Error;
use crate::measurement::Measurement;
use crate::model::{
    is_plausible_temperature, FitOptions, Model, SigmaConvention, Weighting,
    TEMPERATURE_RESOLUTION_K,
};
use nalgebra::DMatrix;

/// Internal: validated points ready for a model: which are used, their weights and ln K.
pub(crate) struct Prepared {
    pub(crate) used: Vec<usize>,
    pub(crate) weights: Option<Vec<f64>>,
    pub(crate) y: Vec<f64>,
}

/// Checks points and options for `model` in one pass, before any arithmetic: every value
/// valid ([`Measurement::validate`]); every temperature plausible unless
/// [`FitOptions::allow_extreme_temperatures`]; enough used points; enough distinct
/// temperatures at [`TEMPERATURE_RESOLUTION_K`] — p for a model with p parameters and p + 1
/// for an error estimate from the scatter (p under absolute σ, whose errors come from σ);
/// and, for a weighted fit, a σ on every used point whose weight 1/σ² is a normal number.
///
/// # Errors
/// In this order: the first invalid or implausible point, [`Error::TooFewPoints`],
/// [`Error::SingleTemperature`], [`Error::TooFewTemperatures`], then the first used point
/// with [`Error::MissingSigma`] or [`Error::SigmaOutOfRange`].
pub(crate) fn check_inputs(
    points: &[Measurement],
    options: &FitOptions,
    model: Model,
) -> Result<(), Error> {
    options.validate()?;
    let p = model.n_params();
    let weighted = options.weighting == Weighting::InverseVariance;
    let needed = needed_points(options, model);
    let mut used = 0usize;
    let mut seen: Vec<f64> = Vec::with_capacity(needed);
    let mut sigma_fault: Option<Error> = None;
    for (i, pt) in points.iter().enumerate() {
        pt.validate(i)?;
        if !options.allow_extreme_temperatures && !is_plausible_temperature(pt.t_k) {
            return Err(Error::ImplausibleTemperature {
                index: Some(i),
                kelvin: pt.t_k,
            });
        }
        if !pt.included {
            continue;
        }
        used += 1;
        if seen.len() < needed
            && seen
                .iter()
                .all(|s| (pt.t_k - s).abs() >= TEMPERATURE_RESOLUTION_K)
        {
            seen.push(pt.t_k);
        }
        if weighted && sigma_fault.is_none() {
            match pt.sigma_ln_k {
                None => sigma_fault = Some(Error::MissingSigma { index: i }),
                Some(s) if !(1.0 / (s * s)).is_normal() => {
                    sigma_fault = Some(Error::SigmaOutOfRange {
                        index: Some(i),
                        value: s,
                    })
                }
                Some(_) => {}
            }
        }
    }
    counts_suffice(used, seen.len(), needed, p)?;
    match sigma_fault {
        Some(e) => Err(e),
        None => Ok(()),
    }
}

/// How many used points and distinct temperatures [`check_inputs`] asks of `model`.
fn needed_points(options: &FitOptions, model: Model) -> usize {
    let p = model.n_params();
    let weighted = options.weighting == Weighting::InverseVariance;
    if weighted && options.convention == SigmaConvention::Absolute {
        p
    } else {
        p + 1
    }
}

/// The checks of [`check_inputs`] on the counts alone, for points whose values it has
/// already passed with the same options for another model (a large fit's second thread):
/// enough used points and distinct temperatures for `model`.
///
/// # Errors
/// [`Error::TooFewPoints`], [`Error::SingleTemperature`] or [`Error::TooFewTemperatures`],
/// as [`check_inputs`] gives them.
pub(crate) fn check_counts(
    points: &[Measurement],
    options: &FitOptions,
    model: Model,
) -> Result<(), Error> {
    let used = points.iter().filter(|pt| pt.included).count();
    check_counts_of_used(points, used, options, model)
}

/// [`check_counts`] when the number of used points is known (a solver's first pass counted
/// them): no pass to count them again.
pub(crate) fn check_counts_of_used(
    points: &[Measurement],
    used: usize,
    options: &FitOptions,
    model: Model,
) -> Result<(), Error> {
    let needed = needed_points(options, model);
    let distinct = crate::model::count_distinct_temperatures(
        points.iter().filter(|pt| pt.included).map(|pt| pt.t_k),
        needed,
    );
    counts_suffice(used, distinct, needed, model.n_params())
}

/// The checks of [`check_inputs`] on the counts: `used` points with `distinct`
/// temperatures, `needed` of each for a model of `p` parameters.
fn counts_suffice(used: usize, distinct: usize, needed: usize, p: usize) -> Result<(), Error> {
    if used < needed {
        return Err(Error::TooFewPoints {
            available: used,
            needed,
        });
    }
    if distinct == 1 {
        return Err(Error::SingleTemperature);
    }
    if distinct < needed {
        return Err(Error::TooFewTemperatures {
            distinct,
            needed,
            parameters: p,
            points: used,
        });
    }
    Ok(())
}

/// Validates points and options for `model` and collects the used points and weights.
pub(crate) fn prepare(
    points: &[Measurement],
    options: &FitOptions,
    model: Model,
) -> Result<Prepared, Error> {
    check_inputs(points, options, model)?;
    let used: Vec<usize> = (0..points.len()).filter(|&i| points[i].included).collect();
    let weights = match options.weighting {
        Weighting::Unweighted => None,
        Weighting::InverseVariance => {
            let mut w = Vec::with_capacity(used.len());
            for &i in &used {
                match points[i].sigma_ln_k {
                    Some(s) => w.push(1.0 / (s * s)),
                    None => return Err(Error::MissingSigma { index: i }),
                }
            }
            Some(w)
        }
    };
    let y: Vec<f64> = used.iter().map(|&i| points[i].ln_k).collect();
    Ok(Prepared { used, weights, y })
}

/// The design matrix of `model` on the used points (each row computed once).
pub(crate) fn design(
    points: &[Measurement],
    used: &[usize],
    model: Model,
    theta: f64,
) -> DMatrix<f64> {
    let n = used.len();
    let p = model.n_params();
    let mut x = DMatrix::zeros(n, p);
    let mut row = vec![0.0; p];
    for (r, &i) in used.iter().enumerate() {
        model.row_into(points[i].t_k, theta, &mut row);
        for (c, v) in row.iter().enumerate() {
            x[(r, c)] = *v;
        }
    }
    x
}
