//! # isochore-data
//!
//! Measurements in, projects saved: tolerant import of the K–T files a lab actually writes,
//! column recognition from header names and units, per-cell validation with file, line
//! and column, replicates, several data sets per file, size limits, project files saved
//! atomically, and CSV export. No statistics (those are in `isochore-fit`) and no GUI.
//!
//! ## Brief overview
//! - [`import_path`] / [`import_bytes`] / [`import_text`] with [`ImportOptions`] return an
//!   [`Import`]: the detected [`Delimiter`] and decimal mark, the headers, the
//!   [`ColumnMapping`] (inspectable, overridable through [`ImportOptions::mapping`]), one
//!   [`DataSet`] per data set with its accepted [`Row`]s, and the [`RejectedRow`]s with
//!   reasons. Whole-file faults are an [`Error`].
//! - [`DataSet`] is the one data-set type: what an import returns, what a project saves
//!   (cells as typed, mapping, [`SeriesSettings`], [`Exclusion`]s, notes, whether shown)
//!   and what the window edits. [`DataSet::measurements`] and [`DataSet::points`] give
//!   `isochore_fit::Measurement`s, exclusions and replicate averaging applied.
//! - [`Project`] holds data sets and notes; [`Project::save_atomic`] and [`Project::load`].
//! - [`export_csv`] writes a data set back as CSV that the importer reads.
//!
//! ```
//! use isochore_data::{import_text, ImportOptions, Project};
//! let text = "T (°C);pKa;u(pKa)\n10;7,60;0,01\n20;7,45;0,01\n30;7,31;0,01\n";
//! let import = import_text("pasted", text, &ImportOptions::default()).unwrap();
//! assert!(import.decimal_comma);
//! let data = import.series[0].measurements().unwrap();
//! assert_eq!(data.len(), 3);
//! assert!((data[0].t_k - 283.15).abs() < 1e-12);
//! let mut project = Project::from_import(&import);
//! project.series[0].exclude(2, "bubble in the cell", "2026-12-01T21:00:00Z").unwrap();
//! assert!(!project.series[0].measurements().unwrap()[1].included);
//! ```

#![deny(missing_docs)]

mod assign;
pub mod atomic;
pub mod calorimetric;
pub mod dataset;
mod edit;
pub mod error;
pub mod export;
mod header;
pub mod import;
pub mod mapping;
pub mod project;
mod text;

pub use assign::{ColumnChoice, ColumnRef, COLUMN_ROLES};
pub use calorimetric::SavedCalorimetric;
pub use dataset::{DataSet, Exclusion, RawRow, SeriesSettings};
pub use error::{Error, RejectedRow, RowProblem, ACCEPTED_HEADERS};
pub use export::{export_csv, quantity_header};
pub use import::{
    import_bytes, import_path, import_path_rows, import_text, sha256_hex, DecimalMark, Import,
    ImportOptions, Point, Replicates, Row, SourceInfo,
};
pub use mapping::{
    ColumnMapping, QuantityColumn, TemperatureColumn, UncertaintyColumn, UncertaintyKind,
};
pub use project::{Project, MAX_PROJECT_BYTES, SCHEMA_VERSION};
pub use text::Delimiter;

/// Re-exported unit types from `isochore-fit`, as used in mappings and settings.
pub use isochore_fit::{ConcentrationUnit, EnergyUnit, QuantityKind, TemperatureUnit};
