//! What a front end asks for: the interval method with its draws and seed. The command
//! line's `--intervals`, `--draws`, `--seed` and `--bootstrap-scheme`, the window's setting
//! and the project file's record are this one type; in a project file it reads
//! `{"method": "bootstrap", "scheme": "wild_rademacher", "draws": 10000, "seed": 1}`, with
//! the JSON output's keys.

use super::{BootstrapScheme, DEFAULT_DRAWS, DEFAULT_SEED};
use serde::{Deserialize, Serialize};

/// Which intervals to give.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", tag = "method", content = "scheme")]
pub enum IntervalChoice {
    /// The fit's own: the delta method (Fieller's for a temperature at a target K).
    #[default]
    Delta,
    /// Parametric Monte Carlo (GUM Supplement 1).
    MonteCarlo,
    /// The bootstrap with this scheme.
    Bootstrap(BootstrapScheme),
}

impl IntervalChoice {
    /// The command-line value: "delta", "monte-carlo", "bootstrap".
    pub fn cli_name(self) -> &'static str {
        match self {
            IntervalChoice::Delta => "delta",
            IntervalChoice::MonteCarlo => "monte-carlo",
            IntervalChoice::Bootstrap(_) => "bootstrap",
        }
    }

    /// The JSON key: "delta", "monte_carlo", "bootstrap".
    pub fn key(self) -> &'static str {
        match self {
            IntervalChoice::Delta => "delta",
            IntervalChoice::MonteCarlo => "monte_carlo",
            IntervalChoice::Bootstrap(_) => "bootstrap",
        }
    }
}

/// The method with its draws and seed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(default)]
pub struct IntervalRequest {
    /// Which method.
    #[serde(flatten)]
    pub choice: IntervalChoice,
    /// Number of draws (ignored by the delta method).
    pub draws: usize,
    /// The seed (ignored by the delta method).
    pub seed: u64,
}

impl Default for IntervalRequest {
    fn default() -> Self {
        IntervalRequest {
            choice: IntervalChoice::Delta,
            draws: DEFAULT_DRAWS,
            seed: DEFAULT_SEED,
        }
    }
}

impl IntervalRequest {
    /// Whether this is the default (the delta method, default draws and seed): a project
    /// file leaves such a request out, so older projects save back as they were.
    pub fn is_default(&self) -> bool {
        *self == IntervalRequest::default()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn requests_are_written_with_the_json_keys_and_read_back() {
        let r = IntervalRequest {
            choice: IntervalChoice::Bootstrap(BootstrapScheme::Wild),
            draws: 5000,
            seed: 7,
        };
        let text = serde_json::to_string(&r).unwrap();
        assert_eq!(
            text,
            r#"{"method":"bootstrap","scheme":"wild_rademacher","draws":5000,"seed":7}"#
        );
        assert_eq!(serde_json::from_str::<IntervalRequest>(&text).unwrap(), r);
        let mc: IntervalRequest =
            serde_json::from_str(r#"{"method":"monte_carlo","draws":200,"seed":3}"#).unwrap();
        assert_eq!(mc.choice, IntervalChoice::MonteCarlo);
        assert_eq!((mc.draws, mc.seed), (200, 3));
        // A field left out takes its default.
        let d: IntervalRequest = serde_json::from_str(r#"{"method":"delta"}"#).unwrap();
        assert!(d.is_default());
        assert!(serde_json::from_str::<IntervalRequest>(r#"{"method":"guess"}"#).is_err());
    }
}
