//! The one integration-test binary of this crate: each module is a former test file.

mod crash;
mod dataset;
mod fixtures;
mod fuzz;
mod hostile;
mod large;
mod pieces;
mod project;
