//! Progress and cancellation of a run, for a caller that runs it off its UI thread: the run
//! adds the draws it has finished to a counter and stops early when asked. The draws are
//! done in blocks of [`BLOCK`]; each draw still reads its own generator stream, so blocks,
//! threads and the counter change nothing in the results.

use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};

/// Draws done between two looks at the cancel flag (and two additions to the counter).
pub const BLOCK: usize = 256;

/// Shared between a run and whoever watches it: draws done so far, and a flag that stops it.
#[derive(Debug, Default)]
pub struct Progress {
    cancel: AtomicBool,
    done: AtomicUsize,
}

impl Progress {
    /// A fresh watcher: nothing done, not cancelled.
    pub fn new() -> Progress {
        Progress::default()
    }

    /// Asks the run to stop; it returns [`super::IntervalError::Cancelled`] soon after (at
    /// the end of the blocks in hand).
    pub fn cancel(&self) {
        self.cancel.store(true, Ordering::Relaxed);
    }

    /// Whether [`Progress::cancel`] was called.
    pub fn is_cancelled(&self) -> bool {
        self.cancel.load(Ordering::Relaxed)
    }

    /// Draws finished so far.
    pub fn done(&self) -> usize {
        self.done.load(Ordering::Relaxed)
    }

    pub(crate) fn add(&self, n: usize) {
        self.done.fetch_add(n, Ordering::Relaxed);
    }
}
