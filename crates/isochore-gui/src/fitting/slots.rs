//! The latest analysis of every series and the fits in flight ([`Fitter`]): small series
//! are fitted in the frame, large ones on a worker thread whose estimates arrive first and
//! whose model comparison and plots' indexes follow.

use super::later::Later;
use super::{analyse, complete, refit_job, Analysis, Deferred, BACKGROUND_ROWS};
use crate::doc::Entry;
use std::collections::HashMap;
use std::sync::mpsc::{channel, Receiver, TryRecvError};
use std::sync::Arc;

/// Puts `new` in the slot. A large series' previous analysis (hundreds of megabytes at 10⁶
/// points) is freed on a thread of its own, not in the frame that receives the new one, and
/// its points are given back for the next refit's marks ([`Analysis::recycle`]).
fn replace(slot: &mut Option<Arc<Analysis>>, new: Analysis) {
    if let Some(old) = slot.replace(Arc::new(new)) {
        if old.measurements.len() > BACKGROUND_ROWS {
            let freed = std::thread::Builder::new()
                .name("isochore-free".into())
                .spawn(move || {
                    if let Ok(old) = Arc::try_unwrap(old) {
                        old.recycle();
                    }
                });
            // Without a thread it is freed here, as before.
            drop(freed);
        }
    }
}

#[derive(Default)]
struct Slot {
    current: Option<Arc<Analysis>>,
    pending: Option<(u64, Receiver<Analysis>, f64)>,
    /// The model comparison and the plots' indexes of a large refit, made after its
    /// estimates were shown: the revision they belong to, and the worker's answer to come
    /// (`Err`) or come (`Ok`, kept until the analysis can be changed: no panel holding it).
    completing: Option<(u64, Result<Later, Receiver<Later>>)>,
    /// When the fit whose comparison is awaited started (the app's clock).
    completing_since: f64,
}

impl Slot {
    /// Puts a finished comparison and the plots' indexes into the current analysis of their
    /// revision; waits for the worker when `block`.
    fn complete(&mut self, block: bool) {
        let Some((rev, state)) = self.completing.take() else {
            return;
        };
        let done = match state {
            Ok(done) => done,
            Err(rx) => {
                let got = if block {
                    rx.recv().map_err(|_| TryRecvError::Disconnected)
                } else {
                    rx.try_recv()
                };
                match got {
                    Ok(done) => done,
                    Err(TryRecvError::Empty) => {
                        self.completing = Some((rev, Err(rx)));
                        return;
                    }
                    // The worker died: the fit stays without its comparison.
                    Err(TryRecvError::Disconnected) => return,
                }
            }
        };
        match self.current.as_mut() {
            Some(a) if a.rev == rev => match Arc::get_mut(a) {
                Some(a) => done.apply(a),
                // A panel still holds it: next time.
                None => self.completing = Some((rev, Ok(done))),
            },
            // Another revision replaced it: the comparison is of no use.
            _ => {}
        }
    }
}

/// The latest analysis of every series, and the fits in flight.
#[derive(Default)]
pub struct Fitter {
    slots: HashMap<u64, Slot>,
}

/// A fit that is running: which series, how many rows, since when.
#[derive(Debug, Clone)]
pub struct Running {
    /// Series id.
    pub series: u64,
    /// Rows being fitted.
    pub rows: usize,
    /// Start time in seconds (the app's clock).
    pub since: f64,
}

impl Fitter {
    /// Brings every series up to date: starts fits for changed series and collects
    /// finished background fits. `now` is the app clock in seconds. When `block` is set,
    /// background fits are waited for (tests and benchmarks).
    pub fn update(&mut self, series: &[Entry], now: f64, block: bool) {
        self.slots
            .retain(|id, _| series.iter().any(|s| s.id == *id));
        for s in series {
            let slot = self.slots.entry(s.id).or_default();
            if let Some((_, rx, _)) = &slot.pending {
                let got = if block {
                    rx.recv().map_err(|_| TryRecvError::Disconnected)
                } else {
                    rx.try_recv()
                };
                match got {
                    Ok(a) => {
                        replace(&mut slot.current, a);
                        slot.pending = None;
                        slot.complete(block);
                    }
                    Err(TryRecvError::Empty) => {}
                    // The worker died: forget it, and the fit is started again below.
                    Err(TryRecvError::Disconnected) => slot.pending = None,
                }
            }
            slot.complete(block);
            let up_to_date = slot.current.as_ref().is_some_and(|a| a.rev == s.rev);
            let in_flight = slot.pending.as_ref().is_some_and(|p| p.0 == s.rev);
            if up_to_date || in_flight {
                continue;
            }
            // After an exclusion the previous analysis' converted points still hold: the
            // refit starts from them (no copy of the series, no conversion of its cells).
            if s.n_rows() <= BACKGROUND_ROWS {
                let job = slot.current.as_ref().and_then(|a| refit_job(s, a, false));
                let a = match job {
                    Some(job) => complete(job()),
                    None => analyse(s),
                };
                replace(&mut slot.current, a);
                slot.pending = None;
            } else {
                // A refit shows its estimates as soon as they are drawn; the model
                // comparison, made meanwhile on a thread of its own, follows (the same
                // numbers as a whole fit).
                let job = slot.current.as_ref().and_then(|a| refit_job(s, a, true));
                let (tx, rx) = channel();
                let (done_tx, done_rx) = channel();
                let work: Box<dyn FnOnce() -> (Analysis, Deferred) + Send> = match job {
                    Some(job) => Box::new(job),
                    None => {
                        let copy = s.clone();
                        Box::new(move || (analyse(&copy), Deferred::default()))
                    }
                };
                let spawned = std::thread::Builder::new()
                    .name("isochore-fit".into())
                    .spawn(move || {
                        let (a, deferred) = work();
                        let _ = tx.send(a);
                        if !deferred.is_empty() {
                            let _ = done_tx.send(deferred.run());
                        }
                    });
                match spawned {
                    Ok(_) => {
                        slot.pending = Some((s.rev, rx, now));
                        slot.completing = Some((s.rev, Err(done_rx)));
                        slot.completing_since = now;
                    }
                    Err(_) => replace(&mut slot.current, analyse(s)),
                }
                if block {
                    if let Some((_, rx, _)) = &slot.pending {
                        if let Ok(a) = rx.recv() {
                            replace(&mut slot.current, a);
                        }
                    }
                    slot.pending = None;
                    slot.complete(true);
                }
            }
        }
    }

    /// The latest analysis of a series (possibly of an older revision while a fit runs).
    pub fn get(&self, id: u64) -> Option<Arc<Analysis>> {
        self.slots.get(&id).and_then(|s| s.current.clone())
    }

    /// Whether the series' current analysis still waits for its model comparison (a
    /// large refit shows its estimates first): a report made now would lack it.
    pub fn comparison_pending(&self, id: u64) -> bool {
        self.slots.get(&id).is_some_and(|s| {
            s.completing.is_some()
                && s.current
                    .as_ref()
                    .is_some_and(|a| a.fit.as_deref().is_ok_and(|f| f.comparison_pending()))
        })
    }

    /// Fits in flight.
    pub fn running(&self, series: &[Entry]) -> Vec<Running> {
        self.slots
            .iter()
            .filter_map(|(id, slot)| {
                // A fit is running until its comparison is in place too.
                let since = match (&slot.pending, &slot.completing) {
                    (Some((_, _, since)), _) => Some(*since),
                    (None, Some(_)) => Some(slot.completing_since),
                    (None, None) => None,
                };
                since.map(|since| Running {
                    series: *id,
                    rows: series
                        .iter()
                        .find(|s| s.id == *id)
                        .map_or(0, |s| s.n_rows()),
                    since,
                })
            })
            .collect()
    }
}
