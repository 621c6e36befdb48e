//! The one integration-test binary of this package: one module per subject.

mod atomic;
mod permissions;
mod render;
