//! The one integration-test binary of this package: one module per subject.

mod export_guard;
mod features;
mod ways_out;
mod workbench;
