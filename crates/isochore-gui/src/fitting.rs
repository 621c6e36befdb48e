//! Runs isochore-fit for each series and keeps the latest result. Small series are fitted
//! in the same frame; large ones on a worker thread, with the previous result kept on
//! screen and a progress note until the new one arrives. The numbers all come from
//! `isochore_fit`; this module only schedules the calls and orders points for drawing.

use crate::decimate::EnvelopeIndex;
use crate::doc::Entry;
use isochore_fit::{BandPoint, Measurement, VantHoffFit};
use std::collections::HashMap;
use std::sync::mpsc::{channel, Receiver, TryRecvError};
use std::sync::Arc;

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
    /// unless replicates are averaged.
    pub measurements: Vec<Measurement>,
    /// 0-based rows of each point.
    pub point_rows: Vec<Vec<usize>>,
    /// For each 0-based row, its point.
    pub point_of_row: Vec<Option<usize>>,
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
    pub vh_index: EnvelopeIndex,
    /// Large series only: points by T (kelvin) with their residual (residual plot).
    pub resid_index: EnvelopeIndex,
    /// Large series only: points with a studentized residual, by leverage (influence view).
    pub infl_index: EnvelopeIndex,
    /// Data extent on the van 't Hoff plot: [min 10³/T, max 10³/T, min ln K, max ln K].
    pub extent: Option<[f64; 4]>,
    /// Cook's-distance contours for the influence view: (D, upper branch points (h, t)) in
    /// the plane of leverage against the externally studentized residual.
    pub cooks_contours: Vec<(f64, Vec<[f64; 2]>)>,
    /// The fit with errors in T, when the series has a thermometer uncertainty or a σ(T)
    /// column (isochore-analysis runs it; `None` otherwise), or why there is none.
    pub errors_in_t: Option<Result<isochore_fit::errors_in_t::ErrorsInTFit, String>>,
}

/// A setting that settles why a fit was refused, offered beside the message: the
/// application layer's rule, shared with the command line (which names the flag).
pub use isochore_analysis::Remedy;

/// Fits one series (pure: the same series gives the same analysis).
pub fn analyse(series: &Entry) -> Analysis {
    let rev = series.rev;
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
                rev,
                measurements: Vec::new(),
                point_rows: Vec::new(),
                point_of_row: Vec::new(),
                fit: Err(e),
                remedy,
                band: Vec::new(),
                ellipse: None,
                h_g_region: None,
                vh_index: EnvelopeIndex::default(),
                resid_index: EnvelopeIndex::default(),
                infl_index: EnvelopeIndex::default(),
                extent: None,
                cooks_contours: Vec::new(),
                errors_in_t: None,
            };
        }
    };
    let measurements = points.measurements;
    // The weighting rule the command line follows, from isochore-analysis: no σ at all is
    // fitted with equal weights (and says so among the fit's cautions); σ in some rows and an
    // empty σ cell in another is refused with the line and column of that cell, never fitted
    // silently, and fitting unweighted is the way out.
    let (fit, remedy) =
        match isochore_analysis::weighting::for_data_set(&series.data, *series.options()) {
            Err(e) => (Err(e.to_string()), Some(Remedy::FitUnweighted)),
            Ok(weighed) => match isochore_fit::fit(&measurements, &weighed.options) {
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
    let (resid_index, infl_index) = match &fit {
        Ok(f) if large => (
            EnvelopeIndex::new(
                f.points()
                    .iter()
                    .map(|d| (d.index as u32, d.t_k, d.residual)),
            ),
            EnvelopeIndex::new(f.points().iter().filter_map(|d| {
                isochore_fit::influence::influence_coordinates(d)
                    .map(|[h, t]| (d.index as u32, h, t))
            })),
        ),
        _ => (EnvelopeIndex::default(), EnvelopeIndex::default()),
    };
    let extent = measurements.iter().fold(None, |acc: Option<[f64; 4]>, m| {
        let x = 1e3 / m.t_k;
        Some(match acc {
            None => [x, x, m.ln_k, m.ln_k],
            Some([a, b, c, d]) => [a.min(x), b.max(x), c.min(m.ln_k), d.max(m.ln_k)],
        })
    });
    Analysis {
        rev,
        extent,
        measurements,
        point_rows: points.rows,
        point_of_row: points.point_of_row,
        fit,
        remedy,
        band,
        ellipse,
        h_g_region,
        vh_index,
        resid_index,
        infl_index,
        cooks_contours: contours,
        errors_in_t: errors_in_t_of(series),
    }
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

#[derive(Default)]
struct Slot {
    current: Option<Arc<Analysis>>,
    pending: Option<(u64, Receiver<Analysis>, f64)>,
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
                        slot.current = Some(Arc::new(a));
                        slot.pending = None;
                    }
                    Err(TryRecvError::Empty) => {}
                    // The worker died: forget it, and the fit is started again below.
                    Err(TryRecvError::Disconnected) => slot.pending = None,
                }
            }
            let up_to_date = slot.current.as_ref().is_some_and(|a| a.rev == s.rev);
            let in_flight = slot.pending.as_ref().is_some_and(|p| p.0 == s.rev);
            if up_to_date || in_flight {
                continue;
            }
            if s.n_rows() <= BACKGROUND_ROWS {
                slot.current = Some(Arc::new(analyse(s)));
                slot.pending = None;
            } else {
                let (tx, rx) = channel();
                let copy = s.clone();
                let spawned = std::thread::Builder::new()
                    .name("isochore-fit".into())
                    .spawn(move || {
                        let _ = tx.send(analyse(&copy));
                    });
                match spawned {
                    Ok(_) => slot.pending = Some((s.rev, rx, now)),
                    Err(_) => slot.current = Some(Arc::new(analyse(s))),
                }
                if block {
                    if let Some((_, rx, _)) = &slot.pending {
                        if let Ok(a) = rx.recv() {
                            slot.current = Some(Arc::new(a));
                        }
                    }
                    slot.pending = None;
                }
            }
        }
    }

    /// The latest analysis of a series (possibly of an older revision while a fit runs).
    pub fn get(&self, id: u64) -> Option<Arc<Analysis>> {
        self.slots.get(&id).and_then(|s| s.current.clone())
    }

    /// Fits in flight.
    pub fn running(&self, series: &[Entry]) -> Vec<Running> {
        self.slots
            .iter()
            .filter_map(|(id, slot)| {
                slot.pending.as_ref().map(|(_, _, since)| Running {
                    series: *id,
                    rows: series
                        .iter()
                        .find(|s| s.id == *id)
                        .map_or(0, |s| s.n_rows()),
                    since: *since,
                })
            })
            .collect()
    }
}
