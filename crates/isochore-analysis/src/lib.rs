//! # isochore-analysis
//!
//! The application layer of Isochore, between the data and fit crates and the two front ends
//! (the `vhfit` command line and the desktop window). Data flow one way: bytes →
//! isochore-data → isochore-fit → here → report, window, command line. Every rule both front
//! ends follow lives here once:
//!
//! - [`weighting`]: the weighting a data set gets (no σ at all: unweighted, with a note;
//!   σ in some rows only: refused with the line and column of the first empty cell).
//! - [`files`]: how a project file is recognised, and the names of report files.
//! - [`columns`]: the note naming the columns of a file kept but not used.
//! - [`rows`]: row numbers, 1-based for people, converted to 0-based indices in one place.
//! - [`dataset`]: a file or an [`isochore_data::DataSet`] (the one data-set type, as read
//!   and saved) turned into a [`PreparedSet`] ready to fit (derived, never saved), the
//!   caller's [`Overrides`] laid over the file's settings, and typed refusals that name the
//!   [`Remedy`] (the command line names its flag, the window offers a control).
//! - [`report`]: the report input of a fitted data set, its title and the program line.
//! - [`joint`]: several data sets fitted together with shared parameters, and the test of
//!   equality against the separate fits.
//! - [`calorimetric`]: calorimetric enthalpies kept with a data set, typed in display units
//!   or read from a file, compared with a single or a joint fit's ΔH°(T).
//! - [`json`]: the JSON contract as typed serde structs.
//! - [`pair`]: the inputs of the two-point calculation (u(K) or σ(ln K), one rule).
//!
//! No statistics (isochore-fit), no parsing of files (isochore-data), no drawing
//! (isochore-report, the window), and nothing that knows about command-line flags or widgets.

#![deny(missing_docs)]

pub mod calorimetric;
pub mod columns;
pub mod dataset;
pub mod errors_in_t;
pub mod files;
pub mod intervals;
pub mod joint;
pub mod joint_intervals;
pub mod json;
pub mod origins;
pub mod pair;
pub mod report;
pub mod rows;
pub mod weighting;

pub use columns::unused_columns_note;
pub use dataset::{load, Exclusions, FitFailure, LoadError, Overrides, PreparedSet, Remedy};
pub use files::{is_project_file, ReportStems, PROJECT_SUFFIX};
pub use origins::{Origins, PointOrigin};
pub use pair::KUncertainty;
pub use report::{joint_report_input, joint_report_title, report_input, report_title, VERSION};
pub use rows::RowNumber;
pub use weighting::{SigmaCoverage, Weighed};
