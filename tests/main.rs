//! The one integration-test binary of this package: one module per subject.

mod calorimetric_cli;
mod cli;
mod columns;
mod delta_h_zero_cli;
mod errors_in_t_cli;
mod headless;
mod hostile_cli;
mod hostile_input;
mod interval_names_cli;
mod intervals_cli;
mod joint_cli;
mod joint_intervals_cli;
mod predict_intervals_cli;
mod project_intervals_cli;
mod promises;
mod two_point;
mod vocabulary;
