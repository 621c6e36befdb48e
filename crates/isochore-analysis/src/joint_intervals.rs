//! Resampled intervals of a joint fit (`vhfit fit A.csv B.csv --share KEYS --intervals
//! monte-carlo|bootstrap`): the request both front ends make, run on the data sets and
//! their [`JointAnalysis`] by isochore-fit's `joint_monte_carlo` and `joint_bootstrap`
//! (each draw refits the whole block design).

use crate::dataset::PreparedSet;
use crate::joint::JointAnalysis;
use isochore_fit::intervals::{
    joint_bootstrap, joint_monte_carlo, IntervalChoice, IntervalError, IntervalOptions,
    IntervalRequest, JointRun, Progress,
};
use isochore_fit::SeriesInput;

/// Runs the requested method on the joint fit of `sets` (the data sets `joint` was fitted
/// from, in order); `None` for the delta method, whose intervals are the fit's own.
///
/// # Errors
/// The run's refusal ([`IntervalError`]: draws out of range, too few points for the
/// bootstrap, case resampling, …).
pub fn run_joint_intervals(
    sets: &[PreparedSet],
    joint: &JointAnalysis,
    request: &IntervalRequest,
) -> Result<Option<JointRun>, IntervalError> {
    run_joint_intervals_with(sets, joint, request, &Progress::new())
}

/// [`run_joint_intervals`] watched by `progress` (draws done; stops when cancelled).
///
/// # Errors
/// As [`run_joint_intervals`], and [`IntervalError::Cancelled`].
pub fn run_joint_intervals_with(
    sets: &[PreparedSet],
    joint: &JointAnalysis,
    request: &IntervalRequest,
    progress: &Progress,
) -> Result<Option<JointRun>, IntervalError> {
    let options = IntervalOptions {
        draws: request.draws,
        seed: request.seed,
        ..IntervalOptions::default()
    };
    let inputs: Vec<SeriesInput<'_>> = sets
        .iter()
        .zip(&joint.labels)
        .map(|(s, l)| SeriesInput::new(l, &s.measurements))
        .collect();
    match request.choice {
        IntervalChoice::Delta => Ok(None),
        IntervalChoice::MonteCarlo => {
            joint_monte_carlo(&inputs, &joint.fit, &options, progress).map(Some)
        }
        IntervalChoice::Bootstrap(scheme) => {
            joint_bootstrap(&inputs, &joint.fit, scheme, &options, progress).map(Some)
        }
    }
}
