//! The one integration-test binary of this package: one module per subject.

mod cli;
mod promises;
mod hostile_cli;
