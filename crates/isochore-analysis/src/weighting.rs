//! The weighting a data set gets: one rule for the command line and the window.
//!
//! - Equal weights asked for: every σ is ignored and nothing is checked.
//! - Weights 1/σ² asked for (the default):
//!   - every row gives σ: weighted;
//!   - no row gives σ (no σ column, or a σ column whose every cell is empty): there is
//!     nothing to weight by, so the fit is unweighted, its intervals come from the scatter,
//!     and a note says so — what a chemist expects of a file without uncertainties;
//!   - σ in some rows and an empty σ cell in another: refused, with the line and column of
//!     the first empty cell (isochore-data's `MissingSigma`), since fitting such a file
//!     either way would silently drop information; fitting unweighted is the way out.

use isochore_data::{DataSet, Import};
use isochore_fit::{FitOptions, Weighting};

/// The note given when inverse-variance weights were asked for but the data set gives no
/// uncertainty at all.
pub const NO_SIGMA_NOTE: &str =
    "the file gives no uncertainties, so the fit is unweighted and intervals come from the scatter";

/// How many rows of a data set give σ(ln K).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SigmaCoverage {
    /// Every row gives σ.
    Every,
    /// No row gives σ (no σ column, or every σ cell empty).
    None,
    /// Some rows give σ and another row has an empty σ cell.
    Partial,
}

impl SigmaCoverage {
    /// The coverage of a list of σ values (`None` for an empty cell).
    pub fn of(sigmas: impl IntoIterator<Item = Option<f64>>) -> SigmaCoverage {
        let (mut some, mut none) = (false, false);
        for s in sigmas {
            match s {
                Some(_) => some = true,
                None => none = true,
            }
            if some && none {
                return SigmaCoverage::Partial;
            }
        }
        if some {
            SigmaCoverage::Every
        } else {
            SigmaCoverage::None
        }
    }
}

/// The fit options a data set is fitted with, and the note that goes with them.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Weighed {
    /// The options asked for, with the weighting the rule gives.
    pub options: FitOptions,
    /// Why the weighting differs from what was asked, when it does.
    pub note: Option<&'static str>,
}

/// The rule (see the module documentation). `Err(())` is the refusal of a data set with σ
/// in some rows only; the callers below turn it into isochore-data's message naming the
/// line and column.
fn decide(requested: FitOptions, coverage: impl FnOnce() -> SigmaCoverage) -> Result<Weighed, ()> {
    if requested.weighting == Weighting::Unweighted {
        return Ok(Weighed {
            options: requested,
            note: None,
        });
    }
    match coverage() {
        SigmaCoverage::Every => Ok(Weighed {
            options: requested,
            note: None,
        }),
        SigmaCoverage::None => Ok(Weighed {
            options: FitOptions {
                weighting: Weighting::Unweighted,
                ..requested
            },
            note: Some(NO_SIGMA_NOTE),
        }),
        SigmaCoverage::Partial => Err(()),
    }
}

/// The rule for a data set (of a project, of the window's document, or read from a file).
///
/// # Errors
/// isochore-data's `MissingSigma` (line and column of the first empty σ cell), or its
/// message for a cell that no longer converts.
pub fn for_data_set(
    series: &DataSet,
    requested: FitOptions,
) -> Result<Weighed, isochore_data::Error> {
    let mut fault = None;
    let weighed = decide(requested, || {
        if series.mapping.uncertainty.is_none() {
            return SigmaCoverage::None;
        }
        match series.converted() {
            Ok(rows) => SigmaCoverage::of(rows.iter().map(|r| r.sigma_ln_k())),
            Err(e) => {
                fault = Some(e);
                SigmaCoverage::Every
            }
        }
    });
    if let Some(e) = fault {
        return Err(e);
    }
    weighed.map_err(|()| match series.check_sigma() {
        Err(e) => e,
        Ok(()) => isochore_data::Error::MissingSigma {
            file: series.source.name.clone(),
            series: series.name.clone(),
            line: 0,
            column: series.mapping.uncertainty.map_or(0, |u| u.column + 1),
            header: String::new(),
        },
    })
}

/// The rule for data set `index` of a freshly read file. A file where any data set has σ
/// in some rows only is refused as a whole, as its reading is.
///
/// # Errors
/// isochore-data's `MissingSigma` (line and column of the first empty σ cell).
pub fn for_import(
    import: &Import,
    index: usize,
    requested: FitOptions,
) -> Result<Weighed, isochore_data::Error> {
    if requested.weighting == Weighting::InverseVariance {
        import.check_sigma()?;
    }
    let weighed = decide(requested, || {
        if import.mapping.uncertainty.is_none() {
            return SigmaCoverage::None;
        }
        import.series.get(index).map_or(SigmaCoverage::None, |s| {
            s.converted().map_or(SigmaCoverage::None, |rows| {
                SigmaCoverage::of(rows.iter().map(|r| r.sigma_ln_k()))
            })
        })
    });
    // check_sigma above has refused every partial data set already.
    Ok(weighed.unwrap_or(Weighed {
        options: requested,
        note: None,
    }))
}
