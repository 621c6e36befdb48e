//! The one integration-test binary of this package: one module per subject.

mod cli;
mod headless;
mod hostile_cli;
mod hostile_input;
mod promises;
