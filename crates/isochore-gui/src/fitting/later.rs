//! What a large refit leaves for after its estimates are shown (issue 14): the model
//! comparison, on a thread of its own, and the residual and influence indexes with the
//! points' flags, a pass computing every point's diagnostics. Both start once the estimates
//! are sent, so nothing competes with them for the processor until then. They are put into
//! the analysis together; then it is the analysis a whole fit gives, every field.

use super::{Analysis, Prepared};
use crate::decimate::{sort_by_x_then_id, EnvelopeIndex};
use isochore_fit::{CompletedComparison, Measurement, PendingComparison, VantHoffFit};
use std::sync::Arc;

/// What a large refit leaves for after its estimates are shown: the model comparison (with
/// the points it is made on) and the residual and influence indexes with the flags (from
/// the fit the analysis shows, shared), both made by [`Deferred::run`].
#[derive(Default)]
pub(super) struct Deferred {
    pub(super) comparison: Option<(PendingComparison, Arc<Vec<Measurement>>)>,
    pub(super) plots: Option<(Arc<VantHoffFit>, Arc<Prepared>)>,
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
        self.comparison.is_none() && self.plots.is_none()
    }

    /// Starts the comparison on a thread of its own, makes the plots' indexes meanwhile and
    /// waits for the comparison. The shared fit is let go before returning, so the analysis
    /// holds the only one when the comparison is put in ([`Later::apply`]).
    pub(super) fn run(self) -> Later {
        let comparing = self.comparison.map(|(pending, points)| {
            let spawned = std::thread::Builder::new()
                .name("isochore-compare".into())
                .spawn({
                    let points = points.clone();
                    move || pending.run_lean(&points)
                });
            (spawned, points)
        });
        let plots = self.plots.map(|(f, prepared)| plots_of(&f, &prepared));
        let comparison = comparing.and_then(|(spawned, _points)| match spawned {
            Ok(h) => h.join().ok(),
            // Without a thread the comparison is not made: the fit stays without it.
            Err(_) => None,
        });
        Later { comparison, plots }
    }
}

impl Later {
    /// Puts the comparison and the plots' indexes into `analysis`: then it is the analysis
    /// a whole fit gives.
    pub(super) fn apply(self, analysis: &mut Analysis) {
        if let Some(done) = self.comparison {
            if let Ok(f) = &mut analysis.fit {
                // The worker let its share go: no copy is made here.
                Arc::make_mut(f).complete_comparison(done);
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
    let n = prepared.n_points;
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
