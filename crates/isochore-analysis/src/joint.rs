//! Several data sets fitted together, the rule both front ends follow: the data sets must
//! share model, θ, level and the σ convention; the named parameters are shared and every
//! other one is fitted per series ([`fit_joint`]); the test of equality compares that fit
//! with the one where the named parameters are fitted per series too (the separate fits,
//! with one pooled residual variance), and its failure to run is a warning, not a refusal.

use crate::dataset::PreparedSet;
use isochore_fit::calorimetric::CalorimetricValue;
use isochore_fit::global::{
    compensation, exner_test, fit_global, fit_global_with_calorimetric, CalorimetricJointFit,
    CalorimetricObservation, Compensation, CompensationPoint, EqualityTest, ExnerTest, GlobalError,
    GlobalFit,
};
use isochore_fit::{FitOptions, SeriesInput, Sharing, SharingMap};
use std::fmt;

/// A joint fit of several data sets and its test of equality.
#[derive(Debug, Clone)]
pub struct JointAnalysis {
    /// The label of each series, in order (its name, with its file when two share a name).
    pub labels: Vec<String>,
    /// The keys of the shared parameters, in the model's order.
    pub shared: Vec<&'static str>,
    /// The fit with those parameters shared.
    pub fit: GlobalFit,
    /// The shared fit against the separate fits; `None` when it cannot be made (the reason
    /// is among the warnings).
    pub equality: Option<EqualityTest>,
    /// With three or more series, the enthalpy–entropy compensation analysis of the
    /// separate fits (every parameter per series) at θ; `None` otherwise.
    pub compensation: Option<CompensationAnalysis>,
    /// Cautions in words: from reading each data set, from the joint fit, and why the test
    /// of equality or the compensation analysis could not be made.
    pub warnings: Vec<String>,
}

/// The compensation analysis of three or more series.
#[derive(Debug, Clone)]
pub struct CompensationAnalysis {
    /// The series' ΔH° and ΔS° at θ from the separate fits, with their covariances.
    pub points: Vec<CompensationPoint>,
    /// β and the Krug–Hunter–Grieger test against T_hm of all points; `None` when it cannot
    /// be computed (a warning says why).
    pub beta: Option<Compensation>,
    /// Exner's common-intersection test; `None` when it cannot be made.
    pub exner: Option<ExnerTest>,
}

/// Why data sets could not be fitted together.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum JointError {
    /// Fewer than two data sets.
    TooFewSeries {
        /// How many were given.
        given: usize,
    },
    /// No parameter named to share.
    NothingShared,
    /// A data set's options differ from the first's in something a joint fit must share.
    OptionsDiffer {
        /// The first data set's label.
        first: String,
        /// The label of the data set that differs.
        other: String,
        /// What differs, in words.
        what: String,
    },
    /// The fit itself refused (names the series and point where there is one).
    Fit(GlobalError),
}

impl fmt::Display for JointError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            JointError::TooFewSeries { given } => write!(
                f,
                "a joint fit needs at least two series, but {} given; name more files, or a file holding several data sets",
                if *given == 1 { "1 was".to_string() } else { format!("{given} were") }
            ),
            JointError::NothingShared => write!(
                f,
                "no parameter named to share; give one or more parameter keys such as delta_cp or delta_h,delta_cp"
            ),
            JointError::OptionsDiffer { first, other, what } => write!(
                f,
                "series '{other}' cannot be fitted together with '{first}': {what}; fit them with the same settings"
            ),
            JointError::Fit(e) => write!(f, "{e}"),
        }
    }
}

impl std::error::Error for JointError {}

/// A label for each data set: its series name, with its file name when two data sets
/// share a series name.
pub fn series_labels(sets: &[PreparedSet]) -> Vec<String> {
    sets.iter()
        .map(|s| {
            let twins = sets.iter().filter(|o| o.series == s.series).count();
            if twins > 1 && !s.file_name.is_empty() {
                format!("{}: {}", s.file_name, s.series)
            } else {
                s.series.clone()
            }
        })
        .collect()
}

/// What must be the same in every data set of a joint fit, in words, or `None`.
fn options_difference(a: &FitOptions, b: &FitOptions) -> Option<String> {
    if a.model != b.model {
        return Some(format!(
            "the model differs ({} against {})",
            b.model.key(),
            a.model.key()
        ));
    }
    if (a.t_ref_k - b.t_ref_k).abs() > 1e-9 {
        return Some(format!(
            "the reference temperature differs ({} K against {} K)",
            b.t_ref_k, a.t_ref_k
        ));
    }
    if a.weighting != b.weighting {
        return Some(
            "one is weighted by its σ and the other unweighted (a file without σ is fitted unweighted; --unweighted fits every series unweighted)"
                .to_string(),
        );
    }
    if a.convention != b.convention {
        return Some("the σ convention (absolute or scaled) differs".to_string());
    }
    if (a.level - b.level).abs() > 1e-12 {
        return Some(format!(
            "the confidence level differs ({} against {})",
            b.level, a.level
        ));
    }
    None
}

/// Fits `sets` together with the parameters `shared` (JSON keys) shared by all series and
/// every other parameter per series, under the first data set's options; then tests the
/// shared parameters' equality against the separate fits.
///
/// # Errors
/// [`JointError::TooFewSeries`], [`JointError::NothingShared`],
/// [`JointError::OptionsDiffer`], and any refusal of the fit ([`JointError::Fit`]: an
/// unknown key, a series with too few points for the sharing, a singular sharing, …).
pub fn fit_joint(sets: &[PreparedSet], shared: &[String]) -> Result<JointAnalysis, JointError> {
    if sets.len() < 2 {
        return Err(JointError::TooFewSeries { given: sets.len() });
    }
    if shared.is_empty() {
        return Err(JointError::NothingShared);
    }
    let labels = series_labels(sets);
    let options = sets[0].options;
    for (i, s) in sets.iter().enumerate().skip(1) {
        if let Some(what) = options_difference(&options, &s.options) {
            return Err(JointError::OptionsDiffer {
                first: labels[0].clone(),
                other: labels[i].clone(),
                what,
            });
        }
    }
    let sharing = sharing_of(shared);
    let inputs = inputs_of(sets, &labels);
    let fit = fit_global(&inputs, &sharing, &options).map_err(JointError::Fit)?;
    let shared_keys: Vec<&'static str> = options
        .model
        .params()
        .iter()
        .filter(|p| fit.sharing_of(p.key) == Some(Sharing::Shared))
        .map(|p| p.key)
        .collect();
    let mut warnings = Vec::new();
    for (s, l) in sets.iter().zip(&labels) {
        warnings.extend(s.warnings.iter().map(|w| format!("{l}: {w}")));
    }
    warnings.extend(fit.warnings().iter().cloned());
    let full = fit_global(&inputs, &SharingMap::per_series(), &options);
    let equality = match full.and_then(|full| EqualityTest::between(fit.clone(), full)) {
        Ok(t) => Some(t),
        Err(e) => {
            warnings.push(format!(
                "no test of equality: the separate fits cannot be made ({e})"
            ));
            None
        }
    };
    let compensation = match (&equality, sets.len() >= 3) {
        (Some(t), true) => {
            let full = t.full();
            let points = CompensationPoint::from_fit(full, options.t_ref_k);
            let beta = compensation(&points, full.t_harmonic_all_k(), options.level)
                .map_err(|e| warnings.push(format!("no compensation temperature: {e}")))
                .ok();
            let exner = exner_test(&inputs, options.weighting, options.level)
                .map_err(|e| warnings.push(format!("no common-intersection test: {e}")))
                .ok();
            Some(CompensationAnalysis {
                points,
                beta,
                exner,
            })
        }
        _ => None,
    };
    Ok(JointAnalysis {
        labels,
        shared: shared_keys,
        fit,
        equality,
        compensation,
        warnings,
    })
}

/// The sharing that shares the parameters `shared` (JSON keys) and fits every other one
/// per series.
fn sharing_of<S: AsRef<str>>(shared: &[S]) -> SharingMap {
    let mut sharing = SharingMap::per_series();
    for key in shared {
        sharing.set(key.as_ref(), Sharing::Shared);
    }
    sharing
}

fn inputs_of<'a>(sets: &'a [PreparedSet], labels: &'a [String]) -> Vec<SeriesInput<'a>> {
    sets.iter()
        .zip(labels)
        .map(|(s, l)| SeriesInput::new(l, &s.measurements))
        .collect()
}

/// The joint fit of `joint` again, with the calorimetric values as observations of each
/// series' ΔH°(T) (weight 1/u², beside the ln K points weighted by 1/σ(ln K)²): the same
/// series, model, options and sharing. `values[s]` holds the values of series s (empty, or
/// shorter than the series, where there are none).
///
/// # Errors
/// isochore-fit's refusal (`fit_global_with_calorimetric`): an unweighted fit, no value at
/// all, a value with u = 0, a sharing the extra rows do not make identifiable.
pub fn fit_with_calorimetric(
    sets: &[PreparedSet],
    joint: &JointAnalysis,
    values: &[Vec<CalorimetricValue>],
) -> Result<CalorimetricJointFit, GlobalError> {
    let obs: Vec<CalorimetricObservation> = values
        .iter()
        .enumerate()
        .take(sets.len())
        .flat_map(|(series, vs)| {
            vs.iter()
                .map(move |&value| CalorimetricObservation { series, value })
        })
        .collect();
    let inputs = inputs_of(sets, &joint.labels);
    fit_global_with_calorimetric(
        &inputs,
        &sharing_of(&joint.shared),
        joint.fit.options(),
        &obs,
    )
}
