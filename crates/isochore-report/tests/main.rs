//! The one integration-test binary of this package: one module per subject.

mod atomic;
mod joint;
mod permissions;
mod render;
