//! The one integration-test binary of this crate: each module is a former test file.

mod bca_scipy;
mod calorimetric;
mod calorimetric_joint;
mod clarke_glew;
mod common;
mod compensation;
mod errors_in_t;
mod extension;
mod fieller;
mod garbage_in;
mod global;
mod global_combos;
mod global_exact;
mod global_region;
mod handbook;
mod hostile;
mod interval_coverage;
mod intervals;
mod intervals_errors_in_t;
mod known_answers;
mod known_sigma;
mod nist_strd;
mod properties;
mod regressions;
mod water_pair;
mod weighted_reference;
