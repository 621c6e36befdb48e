//! The one integration-test binary of isochore-analysis: each module tests one rule the two
//! front ends share.

mod common;
mod json_contract;
mod loading;
mod report_input;
mod weighting;
