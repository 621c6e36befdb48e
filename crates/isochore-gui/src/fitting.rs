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

use crate::decimate::EnvelopeIndex;
use crate::doc::Entry;
use isochore_fit::{BandPoint, Measurement, VantHoffFit};
use std::sync::Arc;

mod later;
mod prepared;
mod slots;
use later::{complete, plots_of, Deferred, Plots};
use prepared::{Marked, Prepared};
pub use slots::{Fitter, Running};

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
    /// The fit, or the reason there is none, in words. Shared with the worker that makes a
    /// large refit's residual and influence indexes after its estimates are shown.
    pub fit: Result<Arc<VantHoffFit>, String>,
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
    /// The 1-based rows excluded when the points' "included" marks were set, ascending.
    excluded: Vec<usize>,
    /// What the cells gave before the fit, for the next refit while they stay the same.
    prepared: Option<Arc<Prepared>>,
}

impl Analysis {
    /// Gives a large analysis' points back to the prepared points it was made from, for the
    /// next refit to mark again (no copy of them then), when nothing else holds them (the
    /// fit is freed first, as it may hold another reference); the rest is freed.
    fn recycle(self) {
        let Analysis {
            fit,
            measurements,
            prepared,
            excluded,
            ..
        } = self;
        // The fit may hold another reference to the points.
        drop(fit);
        if let (Some(prepared), Ok(points)) = (prepared, Arc::try_unwrap(measurements)) {
            prepared.give_back(Marked { points, excluded });
        }
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
                excluded: Vec::new(),
                prepared: None,
            };
        }
    };
    let prepared = Arc::new(Prepared::new(
        series,
        &points.measurements,
        points.rows,
        points.point_of_row,
    ));
    let marked = Marked {
        points: points.measurements,
        excluded: series.data.excluded_rows(),
    };
    complete(finish(
        series.rev,
        prepared,
        marked,
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
    let from = previous.measurements.clone();
    let from_excluded = previous.excluded.clone();
    Some(move || {
        let marked = prepared.marked(&from, &from_excluded, excluded);
        drop(from);
        finish(rev, prepared, marked, None, defer)
    })
}

/// The fit of `marked` (the points of `prepared` with their current "included" marks) and
/// everything drawn from it. With `defer`, a large data set's model comparison is left out
/// of the fit (`isochore_fit::fit_estimates_first`; nothing else drawn here depends on it),
/// and the residual and influence indexes and the flags (a pass computing every point's
/// diagnostics) are left for later too: both are returned beside the analysis
/// ([`Deferred`]), to be made once the estimates are sent.
fn finish(
    rev: u64,
    prepared: Arc<Prepared>,
    marked: Marked,
    errors_in_t: Option<Result<isochore_fit::errors_in_t::ErrorsInTFit, String>>,
    defer: bool,
) -> (Analysis, Deferred) {
    let Marked {
        points: measurements,
        excluded,
    } = marked;
    // Shared with the fit, which then holds no copy of a large series' points.
    let measurements = Arc::new(measurements);
    let mut pending = None;
    let (fit, remedy) = match &prepared.weighed {
        Err(e) => (Err(e.clone()), Some(Remedy::FitUnweighted)),
        Ok(weighed) => match if defer {
            isochore_fit::fit_estimates_first(&measurements, &weighed.options).map(|(f, p)| {
                pending = p;
                f
            })
        } else {
            isochore_fit::fit_shared(&measurements, &weighed.options)
        } {
            Ok(mut f) => {
                if let Some(note) = weighed.note {
                    f.prepend_warning(isochore_fit::Warning::new(
                        isochore_fit::WarningKind::SettingIgnored,
                        note,
                    ));
                }
                (Ok(Arc::new(f)), None)
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
    let mut deferred = Deferred {
        comparison: pending.map(|p| (p, measurements.clone())),
        plots: None,
    };
    let (plots, plots_pending) = match &fit {
        Ok(f) if prepared.large && defer => {
            deferred.plots = Some((Arc::clone(f), prepared.clone()));
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
        excluded,
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
