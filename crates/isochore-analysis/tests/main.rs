//! The one integration-test binary of isochore-analysis: each module tests one rule the two
//! front ends share.

mod common;
mod json_contract;
mod json_stream;
mod loading;
mod report_input;
mod weighting;
