//! Monte Carlo and bootstrap intervals off the UI thread (issue 13 item 6). For every series
//! whose interval setting is not the delta method, a worker thread prepares the data set and
//! fits it as the command line does (isochore-analysis' `PreparedSet`), then runs
//! `isochore_analysis::intervals::run_intervals_with` with a [`Progress`] the window watches:
//! a progress bar while it runs and a Cancel button that stops it. The numbers are the
//! command line's for the same setting (the same calls); this module only schedules them and
//! asks isochore-fit for the histograms of the draws.
//!
//! A run belongs to one revision of the series and one request: a change of either starts
//! a new run (the old one is stopped). A cancelled run is not started again until the
//! chemist asks ([`IntervalRunner::run_again`]) or changes the series or the setting.

use crate::doc::Entry;
use isochore_analysis::intervals::{run_intervals_with, IntervalChoice, IntervalRequest};
use isochore_analysis::{Overrides, PreparedSet};
use isochore_fit::intervals::{histogram, Histogram, IntervalError, IntervalRun, Progress};
use isochore_fit::VantHoffFit;
use std::collections::HashMap;
use std::sync::mpsc::{channel, Receiver, TryRecvError};
use std::sync::Arc;

/// Bins of each histogram of draws.
pub const HISTOGRAM_BINS: usize = 40;

/// A finished run: the fit it was made on, its intervals and the histograms of its draws.
#[derive(Debug)]
pub struct IntervalOutcome {
    /// What was asked.
    pub request: IntervalRequest,
    /// The fit the draws were made about (the command line's fit of the same data set).
    pub fit: VantHoffFit,
    /// The intervals.
    pub run: IntervalRun,
    /// For the quantities drawn as histograms: the index into `run.quantities` and the
    /// histogram of its draws (SI units, the estimate and the interval's ends in range).
    pub histograms: Vec<(usize, Histogram)>,
}

/// A run in flight.
#[derive(Debug)]
pub struct Job {
    progress: Arc<Progress>,
    total: usize,
    rx: Receiver<Result<IntervalOutcome, String>>,
    /// Start time, seconds of the app clock.
    pub since: f64,
}

impl Job {
    /// Draws done and draws asked for.
    pub fn progress(&self) -> (usize, usize) {
        (self.progress.done().min(self.total), self.total)
    }
}

/// Where the run of a series stands.
#[derive(Debug)]
pub enum RunState {
    /// On its worker thread.
    Running(Job),
    /// Finished.
    Done(Arc<IntervalOutcome>),
    /// Refused, in words (too few points for the bootstrap, no fit, …).
    Failed(String),
    /// Stopped by the chemist; the delta method's intervals stand.
    Cancelled,
}

#[derive(Debug)]
struct Slot {
    rev: u64,
    request: IntervalRequest,
    state: RunState,
}

/// The interval runs of every series.
#[derive(Debug, Default)]
pub struct IntervalRunner {
    slots: HashMap<u64, Slot>,
}

/// The quantities whose draws are drawn as histograms: every parameter (ΔH°, ΔS°, ΔCp° when
/// fitted), ΔG° at θ, T where K = 1 and T where ΔH° = 0 where the fit has them.
pub fn pictured(run: &IntervalRun) -> Vec<usize> {
    use isochore_fit::intervals::QuantityKind;
    run.quantities
        .iter()
        .enumerate()
        .filter(|(_, q)| {
            matches!(q.quantity.kind, QuantityKind::Parameter { .. })
                || matches!(
                    q.quantity.key.as_str(),
                    "delta_g_at_reference" | "t_at_k1" | "t_delta_h_zero"
                )
        })
        .map(|(k, _)| k)
        .collect()
}

/// Prepares, fits and runs `request` on a copy of a data set (what the worker does).
///
/// # Errors
/// The refusal in words; `None` inside when cancelled.
fn work(
    data: &isochore_data::DataSet,
    request: &IntervalRequest,
    progress: &Progress,
) -> Result<IntervalOutcome, Option<String>> {
    let set = PreparedSet::from_data_set(data, &data.source.name, &Overrides::default())
        .map_err(|e| Some(e.to_string()))?;
    let fit = set.fit().map_err(|e| Some(e.to_string()))?;
    let got = match run_intervals_with(&set, &fit, request, progress) {
        Ok(Some(r)) => r,
        Ok(None) => return Err(Some("the delta method draws nothing".into())),
        Err(IntervalError::Cancelled) => return Err(None),
        Err(e) => return Err(Some(e.to_string())),
    };
    let histograms = pictured(&got.run)
        .into_iter()
        .filter_map(|k| {
            let q = &got.run.quantities[k];
            let best = q.best();
            let marks = [best.value, best.ci_low, best.ci_high];
            histogram(&got.draws.of(k), &marks, HISTOGRAM_BINS).map(|h| (k, h))
        })
        .collect();
    Ok(IntervalOutcome {
        request: *request,
        fit,
        run: got.run,
        histograms,
    })
}

impl IntervalRunner {
    /// Starts, collects and stops runs so that each series with a resampling setting has
    /// one for its current revision and setting. With `block`, runs are waited for (tests).
    pub fn update(&mut self, series: &[Entry], now: f64, block: bool) {
        let wanted = |s: &Entry| s.data.settings.intervals.choice != IntervalChoice::Delta;
        self.slots.retain(|id, slot| {
            let keep = series.iter().any(|s| s.id == *id && wanted(s));
            if !keep {
                stop(slot);
            }
            keep
        });
        for s in series.iter().filter(|s| wanted(s)) {
            let request = s.data.settings.intervals;
            if let Some(slot) = self.slots.get_mut(&s.id) {
                if slot.rev == s.rev && slot.request == request {
                    poll(slot, block);
                    continue;
                }
                stop(slot);
            }
            let mut slot = Slot {
                rev: s.rev,
                request,
                state: start(&s.data, request, now),
            };
            poll(&mut slot, block);
            self.slots.insert(s.id, slot);
        }
    }

    /// Where the run of series `id` stands, with the request it is for; `None` when the
    /// series uses the delta method.
    pub fn state(&self, id: u64) -> Option<(&IntervalRequest, &RunState)> {
        self.slots.get(&id).map(|s| (&s.request, &s.state))
    }

    /// Whether the run of `id` belongs to revision `rev` of its series.
    pub fn is_current(&self, id: u64, rev: u64) -> bool {
        self.slots.get(&id).is_some_and(|s| s.rev == rev)
    }

    /// Stops the run of series `id`; the delta method's intervals stand.
    pub fn cancel(&mut self, id: u64) {
        if let Some(slot) = self.slots.get_mut(&id) {
            if matches!(slot.state, RunState::Running(_)) {
                stop(slot);
                slot.state = RunState::Cancelled;
            }
        }
    }

    /// Forgets the run of series `id`, so the next update starts it again.
    pub fn run_again(&mut self, id: u64) {
        if let Some(mut slot) = self.slots.remove(&id) {
            stop(&mut slot);
        }
    }

    /// Whether some run is in flight.
    pub fn any_running(&self) -> bool {
        self.slots
            .values()
            .any(|s| matches!(s.state, RunState::Running(_)))
    }
}

impl Drop for IntervalRunner {
    /// Workers still running are asked to stop when the window goes.
    fn drop(&mut self) {
        for slot in self.slots.values_mut() {
            stop(slot);
        }
    }
}

/// Asks a running worker to stop (it ends at its next block of draws).
fn stop(slot: &mut Slot) {
    if let RunState::Running(job) = &slot.state {
        job.progress.cancel();
    }
}

fn start(data: &isochore_data::DataSet, request: IntervalRequest, now: f64) -> RunState {
    let progress = Arc::new(Progress::new());
    let (tx, rx) = channel();
    let copy = data.clone();
    let watched = Arc::clone(&progress);
    let spawned = std::thread::Builder::new()
        .name("isochore-intervals".into())
        .spawn(move || {
            // Nothing is sent when cancelled: the window has moved on.
            match work(&copy, &request, &watched) {
                Ok(o) => {
                    let _ = tx.send(Ok(o));
                }
                Err(Some(e)) => {
                    let _ = tx.send(Err(e));
                }
                Err(None) => {}
            }
        });
    match spawned {
        Ok(_) => RunState::Running(Job {
            progress,
            total: request.draws,
            rx,
            since: now,
        }),
        Err(e) => RunState::Failed(format!("could not start the run: {e}")),
    }
}

fn poll(slot: &mut Slot, block: bool) {
    let RunState::Running(job) = &slot.state else {
        return;
    };
    let got = if block {
        job.rx.recv().map_err(|_| TryRecvError::Disconnected)
    } else {
        job.rx.try_recv()
    };
    slot.state = match got {
        Ok(Ok(o)) => RunState::Done(Arc::new(o)),
        Ok(Err(e)) => RunState::Failed(e),
        Err(TryRecvError::Empty) => return,
        Err(TryRecvError::Disconnected) => RunState::Failed("the run stopped unexpectedly".into()),
    };
}
