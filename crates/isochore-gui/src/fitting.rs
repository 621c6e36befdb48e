//! Runs isochore-fit for each series and keeps the latest result. Small series are fitted
//! in the same frame; large ones on a worker thread, with the previous result kept on
//! screen and a progress note until the new one arrives. The numbers all come from
//! `isochore_fit`; this module only schedules the calls and orders points for drawing.
//!
//! A refit after an exclusion does not start from the cells again: what the cells give
//! before any fit ([`Prepared`]: the converted points, which rows each stands for, the
//! weighting rule's decision, the van 't Hoff plot's index and the points' order by
//! temperature) is kept with the analysis and reused while the cells, the mapping and the
//! settings stay the same; only the points' "included" marks are set again and the fit
//! runs. The analysis is the same, field for field, as one made from the cells (tested).

use crate::decimate::{sort_by_x_then_id, EnvelopeIndex};
use crate::doc::Entry;
use isochore_analysis::weighting::Weighed;
use isochore_data::{ColumnMapping, Replicates, SeriesSettings};
use isochore_fit::{BandPoint, Measurement, VantHoffFit};
use std::collections::HashMap;
use std::sync::mpsc::{channel, Receiver, TryRecvError};
use std::sync::Arc;

mod later;
use later::{complete, plots_of, Deferred, Later, Plots};

/// Series with more rows than this are fitted off the UI thread.
pub const BACKGROUND_ROWS: usize = 20_000;

/// Number of abscissae for the fit line and bands.
pub const BAND_POINTS: usize = 160;

/// Everything the panels show about one series, computed by isochore-fit.
#[derive(Debug)]
pub struct Analysis {
    /// The series revision this was computed from.
    pub rev: u64,
    /// Points on the fitting scale (empty when a row cannot be converted); one per row
    /// unless replicates are averaged. Shared with the worker that completes a large fit's
    /// model comparison after the estimates are shown.
    pub measurements: Arc<Vec<Measurement>>,
    /// 0-based rows of each point.
    pub point_rows: Arc<Vec<Vec<usize>>>,
    /// For each 0-based row, its point.
    pub point_of_row: Arc<Vec<Option<usize>>>,
    /// The fit, or the reason there is none, in words.
    pub fit: Result<VantHoffFit, String>,
    /// The way out the window offers when the fit was refused for a reason the chemist
    /// can settle with a setting (the command line's flags, as controls).
    pub remedy: Option<Remedy>,
    /// Fit line with confidence and prediction bands.
    pub band: Vec<BandPoint>,
    /// The joint (ΔH°, ΔS°) confidence region at the fit's level.
    pub ellipse: Option<Vec<[f64; 2]>>,
    /// The joint ΔH°–ΔG°(T_hm) region, J/mol both (isochore-fit's `h_g_region`).
    pub h_g_region: Option<Vec<[f64; 2]>>,
    /// Large series only (else empty): points by 10³/T with ln K, for decimated drawing
    /// of the van 't Hoff plot.
    pub vh_index: Arc<EnvelopeIndex>,
    /// Large series only: points by T (kelvin) with their residual (residual plot).
    pub resid_index: Arc<EnvelopeIndex>,
    /// Large series only: points with a studentized residual, by leverage (influence view).
    pub infl_index: Arc<EnvelopeIndex>,
    /// For each point, whether it carries a flag (outlier, high leverage, influential), from
    /// the fit's diagnostics: what the plots ring, without computing a point's diagnostics
    /// again in every frame. Empty without a fit.
    pub flagged: Vec<bool>,
    /// Data extent on the van 't Hoff plot: [min 10³/T, max 10³/T, min ln K, max ln K].
    pub extent: Option<[f64; 4]>,
    /// Whether the residual and influence indexes and the flags are still being made: a large
    /// refit shows its estimates first and these follow with the model comparison (until
    /// then the indexes and `flagged` are empty and the diagnostics plots say they follow).
    pub plots_pending: bool,
    /// Cook's-distance contours for the influence view: (D, upper branch points (h, t)) in
    /// the plane of leverage against the externally studentized residual.
    pub cooks_contours: Vec<(f64, Vec<[f64; 2]>)>,
    /// The fit with errors in T, when the series has a thermometer uncertainty or a σ(T)
    /// column (isochore-analysis runs it; `None` otherwise), or why there is none.
    pub errors_in_t: Option<Result<isochore_fit::errors_in_t::ErrorsInTFit, String>>,
    /// What the cells gave before the fit, for the next refit while they stay the same.
    prepared: Option<Arc<Prepared>>,
}

/// What decides how a series' cells convert and are weighted: while it is the same, the
/// converted points of [`Prepared`] still hold (an exclusion changes none of it).
#[derive(Debug, Clone, PartialEq)]
struct PrepKey {
    cells_rev: u64,
    n_rows: usize,
    sha256: String,
    mapping: ColumnMapping,
    decimal_comma: bool,
    settings: SeriesSettings,
}

impl PrepKey {
    fn of(series: &Entry) -> PrepKey {
        let d = &series.data;
        PrepKey {
            cells_rev: series.cells_rev,
            n_rows: series.n_rows(),
            sha256: d.source.sha256.clone(),
            mapping: d.mapping.clone(),
            decimal_comma: d.decimal_comma,
            settings: d.settings,
        }
    }
}

/// What a series' cells give before any fit, kept for the refits that follow an exclusion.
struct Prepared {
    key: PrepKey,
    /// The converted points, "included" as they were when converted.
    measurements: Vec<Measurement>,
    point_rows: Arc<Vec<Vec<usize>>>,
    point_of_row: Arc<Vec<Option<usize>>>,
    /// The weighting rule's decision (isochore-analysis), or its refusal in words.
    weighed: Result<Weighed, String>,
    vh_index: Arc<EnvelopeIndex>,
    extent: Option<[f64; 4]>,
    /// Large series only: the points with a finite temperature, by T and then index (the
    /// residual plot's order, which no refit changes).
    t_order: Vec<u32>,
    large: bool,
}

/// Only the key: the rest is shown by the analysis' own fields, and the points' "included"
/// marks are those of the conversion, not of the analysis.
impl std::fmt::Debug for Prepared {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Prepared")
            .field("key", &self.key)
            .finish_non_exhaustive()
    }
}

impl Prepared {
    fn new(series: &Entry, points: crate::doc::Points) -> Prepared {
        let measurements = points.measurements;
        // The weighting rule the command line follows, from isochore-analysis: no σ at all
        // is fitted with equal weights (and says so among the fit's cautions); σ in some rows
        // and an empty σ cell in another is refused with the line and column of that cell,
        // never fitted silently, and fitting unweighted is the way out.
        let weighed = isochore_analysis::weighting::for_data_set(&series.data, *series.options())
            .map_err(|e| e.to_string());
        let large = measurements.len() > crate::panels::vh_plot::DECIMATE_ABOVE;
        let vh_index = if large {
            EnvelopeIndex::new(
                measurements
                    .iter()
                    .enumerate()
                    .map(|(k, m)| (k as u32, 1e3 / m.t_k, m.ln_k)),
            )
        } else {
            EnvelopeIndex::default()
        };
        let t_order = if large {
            let mut order: Vec<(u32, f64, f64)> = measurements
                .iter()
                .enumerate()
                .filter(|(_, m)| m.t_k.is_finite())
                .map(|(k, m)| (k as u32, m.t_k, 0.0))
                .collect();
            sort_by_x_then_id(&mut order);
            order.into_iter().map(|p| p.0).collect()
        } else {
            Vec::new()
        };
        let extent = measurements.iter().fold(None, |acc: Option<[f64; 4]>, m| {
            let x = 1e3 / m.t_k;
            Some(match acc {
                None => [x, x, m.ln_k, m.ln_k],
                Some([a, b, c, d]) => [a.min(x), b.max(x), c.min(m.ln_k), d.max(m.ln_k)],
            })
        });
        Prepared {
            key: PrepKey::of(series),
            measurements,
            point_rows: Arc::new(points.rows),
            point_of_row: Arc::new(points.point_of_row),
            weighed,
            vh_index: Arc::new(vh_index),
            extent,
            t_order,
            large,
        }
    }

    /// Whether a refit of `series` may start from these points: the same cells, mapping and
    /// settings, each point one row (replicates averaged regroup when a row is excluded), and
    /// no fit with errors in T (made by isochore-analysis from the data set itself).
    fn serves(&self, series: &Entry) -> bool {
        let d = &series.data;
        d.settings.replicates == Replicates::Keep
            && d.settings.thermometer_uncertainty_k.is_none()
            && d.mapping.temperature_uncertainty.is_none()
            && self.point_rows.iter().all(|r| r.len() == 1)
            && self.key == PrepKey::of(series)
    }

    /// The points with the "included" marks of the sorted 1-based rows `excluded`, as
    /// isochore-data marks them (a point is left out when its row is excluded).
    fn measurements_excluding(&self, excluded: &[usize]) -> Vec<Measurement> {
        let mut out = self.measurements.clone();
        for (m, rows) in out.iter_mut().zip(self.point_rows.iter()) {
            m.included = !rows
                .iter()
                .any(|&r| excluded.binary_search(&(r + 1)).is_ok());
        }
        out
    }
}

/// A setting that settles why a fit was refused, offered beside the message: the
/// application layer's rule, shared with the command line (which names the flag).
pub use isochore_analysis::Remedy;

/// Fits one series (pure: the same series gives the same analysis).
pub fn analyse(series: &Entry) -> Analysis {
    let points = match series.points() {
        Ok(p) => p,
        Err(e) => {
            // Only on this error path is the series converted a second time, to tell a
            // refusal the chemist can confirm from one to correct.
            let remedy = series
                .data
                .converted()
                .err()
                .and_then(|d| Remedy::for_data(&d));
            return Analysis {
                rev: series.rev,
                measurements: Arc::default(),
                point_rows: Arc::default(),
                point_of_row: Arc::default(),
                fit: Err(e),
                remedy,
                band: Vec::new(),
                ellipse: None,
                h_g_region: None,
                vh_index: Arc::default(),
                resid_index: Arc::default(),
                infl_index: Arc::default(),
                flagged: Vec::new(),
                plots_pending: false,
                extent: None,
                cooks_contours: Vec::new(),
                errors_in_t: None,
                prepared: None,
            };
        }
    };
    let prepared = Arc::new(Prepared::new(series, points));
    let measurements = prepared.measurements.clone();
    complete(finish(
        series.rev,
        prepared,
        measurements,
        errors_in_t_of(series),
        false,
    ))
}

/// Refits `series` from the points `previous` was made from, when they still hold (only
/// exclusions changed): the same analysis as [`analyse`] gives, without converting the
/// cells again. `None` when the cells, mapping or settings changed since.
pub fn reanalyse(series: &Entry, previous: &Analysis) -> Option<Analysis> {
    refit_job(series, previous, false).map(|job| complete(job()))
}

/// The work of [`reanalyse`], ready to run on another thread (it holds no reference to the
/// series). With `defer`, a large data set's model comparison is left for later: the
/// analysis comes with what it still needs.
fn refit_job(
    series: &Entry,
    previous: &Analysis,
    defer: bool,
) -> Option<impl FnOnce() -> (Analysis, Deferred) + Send> {
    let prepared = previous.prepared.clone()?;
    if !prepared.serves(series) {
        return None;
    }
    let excluded = series.data.excluded_rows();
    let rev = series.rev;
    Some(move || {
        let m = prepared.measurements_excluding(&excluded);
        finish(rev, prepared, m, None, defer)
    })
}

/// The fit of `measurements` (the points of `prepared` with their current "included"
/// marks) and everything drawn from it. With `defer`, a large data set's model comparison
/// is left out of the fit (`isochore_fit::fit_estimates_first`; nothing else drawn here
/// depends on it) and made on a thread of its own, and the residual and influence indexes
/// and the flags (a pass computing every point's diagnostics) are left for later too: both
/// are returned beside the analysis ([`Deferred`]).
fn finish(
    rev: u64,
    prepared: Arc<Prepared>,
    measurements: Vec<Measurement>,
    errors_in_t: Option<Result<isochore_fit::errors_in_t::ErrorsInTFit, String>>,
    defer: bool,
) -> (Analysis, Deferred) {
    let mut pending = None;
    let (fit, remedy) = match &prepared.weighed {
        Err(e) => (Err(e.clone()), Some(Remedy::FitUnweighted)),
        Ok(weighed) => match if defer {
            isochore_fit::fit_estimates_first(&measurements, &weighed.options).map(|(f, p)| {
                pending = p;
                f
            })
        } else {
            isochore_fit::fit(&measurements, &weighed.options)
        } {
            Ok(mut f) => {
                if let Some(note) = weighed.note {
                    f.prepend_warning(isochore_fit::Warning::new(
                        isochore_fit::WarningKind::SettingIgnored,
                        note,
                    ));
                }
                (Ok(f), None)
            }
            Err(e) => (Err(e.to_string()), Remedy::for_fit(&e)),
        },
    };
    let measurements = Arc::new(measurements);
    // Without a thread the comparison is not made: the fit stays without it.
    let comparing = pending.and_then(|p: isochore_fit::PendingComparison| {
        let points = measurements.clone();
        std::thread::Builder::new()
            .name("isochore-compare".into())
            .spawn(move || p.run(&points))
            .ok()
    });
    let (band, ellipse, h_g_region, contours) = match &fit {
        Ok(f) => {
            let band = f.band_grid(BAND_POINTS, 0.08);
            let ellipse = f.ellipse(f.options().level, 120).ok();
            let h_g_region = f.h_g_region(f.options().level, 120).ok();
            let p = f.model().n_params();
            // At the limit the points are flagged against, and at D = 1, as in the reports.
            let contours = isochore_fit::influence::FlagLimits::of(f)
                .contour_levels()
                .iter()
                .map(|&d| {
                    (
                        d,
                        isochore_fit::influence::cooks_contour_external(
                            d,
                            p,
                            f.dof(),
                            0.01,
                            0.99,
                            80,
                        ),
                    )
                })
                .collect();
            (band, ellipse, h_g_region, contours)
        }
        Err(_) => (Vec::new(), None, None, Vec::new()),
    };
    let mut deferred = Deferred {
        comparing,
        plots: None,
    };
    let (plots, plots_pending) = match &fit {
        Ok(f) if prepared.large && defer => {
            deferred.plots = Some((f.clone(), prepared.clone()));
            (None, true)
        }
        Ok(f) if prepared.large => (Some(plots_of(f, &prepared)), false),
        Ok(f) => {
            let mut flagged = vec![false; measurements.len()];
            for k in f.flagged_points() {
                if let Some(slot) = flagged.get_mut(k) {
                    *slot = true;
                }
            }
            (
                Some(Plots {
                    resid_index: EnvelopeIndex::default(),
                    infl_index: EnvelopeIndex::default(),
                    flagged,
                }),
                false,
            )
        }
        Err(_) => (None, false),
    };
    let plots = plots.unwrap_or(Plots {
        resid_index: EnvelopeIndex::default(),
        infl_index: EnvelopeIndex::default(),
        flagged: Vec::new(),
    });
    let analysis = Analysis {
        rev,
        extent: prepared.extent,
        measurements,
        point_rows: prepared.point_rows.clone(),
        point_of_row: prepared.point_of_row.clone(),
        fit,
        remedy,
        band,
        ellipse,
        h_g_region,
        vh_index: prepared.vh_index.clone(),
        resid_index: Arc::new(plots.resid_index),
        infl_index: Arc::new(plots.infl_index),
        flagged: plots.flagged,
        plots_pending,
        cooks_contours: contours,
        errors_in_t,
        prepared: Some(prepared),
    };
    (analysis, deferred)
}

/// The fit with errors in T of a series that has σ(T) (the thermometer uncertainty setting
/// or a σ(T) column), made by isochore-analysis as the command line makes it.
fn errors_in_t_of(
    series: &Entry,
) -> Option<Result<isochore_fit::errors_in_t::ErrorsInTFit, String>> {
    let d = &series.data;
    if d.settings.thermometer_uncertainty_k.is_none() && d.mapping.temperature_uncertainty.is_none()
    {
        return None;
    }
    let o = isochore_analysis::Overrides::default();
    match isochore_analysis::PreparedSet::from_data_set(d, &d.source.name, &o) {
        Ok(set) => set
            .fit_errors_in_t()
            .map(|r| r.map_err(|e| e.error.to_string())),
        Err(e) => Some(Err(e.to_string())),
    }
}

/// Puts `new` in the slot. A large series' previous analysis (hundreds of megabytes at 10⁶
/// points) is freed on a thread of its own, not in the frame that receives the new one.
fn replace(slot: &mut Option<Arc<Analysis>>, new: Analysis) {
    if let Some(old) = slot.replace(Arc::new(new)) {
        if old.measurements.len() > BACKGROUND_ROWS {
            let freed = std::thread::Builder::new()
                .name("isochore-free".into())
                .spawn(move || drop(old));
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
                    .is_some_and(|a| a.fit.as_ref().is_ok_and(|f| f.comparison_pending()))
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
