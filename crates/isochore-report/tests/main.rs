//! The one integration-test binary of this package: one module per subject.

mod atomic;
mod calorimetric;
mod errors_in_t;
mod joint;
mod permissions;
mod render;
mod report_set;
