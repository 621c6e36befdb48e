//! The one integration-test binary of this package: one module per subject.

mod features;
mod workbench;
