//! What a large refit leaves for after its estimates are shown (issue 14): the model
//! comparison, on a thread of its own, and the residual and influence indexes with the
//! points' flags, a pass computing every point's diagnostics. They are put into the
//! analysis together; then it is the analysis a whole fit gives, every field.

use super::{Analysis, Prepared};
use crate::decimate::{sort_by_x_then_id, EnvelopeIndex};
use isochore_fit::{CompletedComparison, VantHoffFit};
use std::sync::Arc;

/// A large fit's model comparison, being made on a thread of its own.
pub(super) type Comparing = std::thread::JoinHandle<CompletedComparison>;

/// What a large refit leaves for after its estimates are shown: the model comparison
/// (already running on a thread of its own) and the residual and influence indexes with
/// the flags (made by [`Deferred::run`], on the worker, from a copy of the fit).
#[derive(Default)]
pub(super) struct Deferred {
    pub(super) comparing: Option<Comparing>,
    pub(super) plots: Option<(VantHoffFit, Arc<Prepared>)>,
}

/// The residual and influence indexes and the points' flags of a large fit.
pub(super) struct Plots {
    pub(super) resid_index: EnvelopeIndex,
    pub(super) infl_index: EnvelopeIndex,
    pub(super) flagged: Vec<bool>,
}

/// What [`Deferred::run`] gives, to be put into the analysis ([`Later::apply`]).
pub(super) struct Later {
    comparison: Option<CompletedComparison>,
    plots: Option<Plots>,
}

impl Deferred {
    pub(super) fn is_empty(&self) -> bool {
        self.comparing.is_none() && self.plots.is_none()
    }

    /// Makes the plots' indexes (while the comparison runs) and waits for the comparison.
    pub(super) fn run(self) -> Later {
        let plots = self.plots.map(|(f, prepared)| plots_of(&f, &prepared));
        let comparison = self.comparing.and_then(|h| h.join().ok());
        Later { comparison, plots }
    }
}

impl Later {
    /// Puts the comparison and the plots' indexes into `analysis`: then it is the analysis
    /// a whole fit gives.
    pub(super) fn apply(self, analysis: &mut Analysis) {
        if let Some(done) = self.comparison {
            if let Ok(f) = &mut analysis.fit {
                f.complete_comparison(done);
            }
        }
        if let Some(p) = self.plots {
            analysis.resid_index = Arc::new(p.resid_index);
            analysis.infl_index = Arc::new(p.infl_index);
            analysis.flagged = p.flagged;
            analysis.plots_pending = false;
        }
    }
}

/// The analysis with what was left for later in place.
pub(super) fn complete((mut analysis, deferred): (Analysis, Deferred)) -> Analysis {
    deferred.run().apply(&mut analysis);
    analysis
}

/// A large fit's residual and influence indexes and its points' flags, from one pass over
/// the points' diagnostics, each computed as it is reached and none kept (`points_iter`):
/// a million records (168 MB) are never made; the panels compute the few they draw the
/// same way (`VantHoffFit::point`).
pub(super) fn plots_of(f: &VantHoffFit, prepared: &Prepared) -> Plots {
    let n = prepared.measurements.len();
    let mut flagged = vec![false; n];
    let mut t_residual = vec![[f64::NAN; 2]; n];
    let mut influence = Vec::with_capacity(n);
    for d in f.points_iter() {
        if let Some(slot) = t_residual.get_mut(d.index) {
            *slot = [d.t_k, d.residual];
        }
        if let Some(slot) = flagged.get_mut(d.index) {
            *slot = d.flags.any();
        }
        if let Some([h, t]) = isochore_fit::influence::influence_coordinates(&d) {
            if h.is_finite() && t.is_finite() {
                influence.push((d.index as u32, h, t));
            }
        }
    }
    let resid_index = EnvelopeIndex::from_sorted(
        prepared
            .t_order
            .iter()
            .filter_map(|&k| t_residual.get(k as usize).map(|&[t, r]| (k, t, r))),
    );
    // The points arrive by index, so the radix sort applies.
    sort_by_x_then_id(&mut influence);
    Plots {
        resid_index,
        infl_index: EnvelopeIndex::from_sorted(influence),
        flagged,
    }
}
