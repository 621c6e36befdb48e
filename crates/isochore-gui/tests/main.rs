//! The one integration-test binary of this package: one module per subject.

mod delta_h_zero_view;
mod errors_in_t_view;
mod export;
mod export_guard;
mod features;
mod intervals_view;
mod joint_view;
mod plots;
mod refit;
mod shared_rules;
mod small_screen;
mod walkthrough;
mod ways_out;
mod workbench;
