//! The presentation rules every front end shares — the window, the command line's tables
//! and every report format (HTML, PDF, Markdown, CSV, figures): how numbers are written
//! ([`number`]), how units are shown ([`units`], where the ΔS°-unit rule lives), the result
//! and statistic rows built by looping over the fit's parameters ([`rows`]), and model names,
//! equations and thresholds in words ([`model`]), and the one name of each concept
//! ([`names`], the table of DEVELOPERS.md), and K in the quantity the chemist entered
//! ([`quantity`]). No statistics here: every number comes
//! from the fit; flag limits and Cook's-distance contours are asked of `isochore_fit`.

pub mod cautions;
pub mod errors_in_t;
pub mod intervals;
pub mod joint;
pub mod model;
pub mod names;
pub mod number;
pub mod quantity;
pub mod rows;
pub mod units;

pub use model::{
    coefficients_phrase, equation, model_caution, model_description, model_label, model_name,
    thresholds_text, uses_reference,
};
pub use number::{
    decimals_for, diag, fixed, percent, plus_minus, sig, times_ten, times_ten_with, Exponent,
    MISSING,
};
pub use rows::{
    compact_statistics_rows, comparison_rows, covariance_table, covariance_unit,
    critical_distribution, delta_h_zero_row, fitted_params, flag_words, is_absolute, ladder_text,
    level_percent, parameter_rows, result_rows, si_symbol, statistics_rows, step_name,
    step_summary, varies_with_t, ResultRow,
};
pub use units::{
    energy, order, per_kelvin, per_kelvin_squared, show_t, show_t_with, t_difference, unit_of, Unit,
};
