//! The linear van 't Hoff model: ΔH° and ΔS° independent of temperature, so ln K is linear
//! in 1/T.
//!
//! ```text
//! ln K = −ΔH°/(R T) + ΔS°/R              columns: −1/(RT), 1/R
//! ```

use super::{Model, ModelSpec, ParamInfo, DELTA_H, DELTA_S};
use crate::GAS_CONSTANT;

/// ΔH° and ΔS° constant over the temperature range.
#[derive(Debug, Clone, Copy)]
pub struct Linear;

static PARAMS: [ParamInfo; 2] = [DELTA_H, DELTA_S];

impl ModelSpec for Linear {
    fn key(&self) -> &'static str {
        "linear"
    }
    fn cli_name(&self) -> &'static str {
        "linear"
    }
    fn short_name(&self) -> &'static str {
        "linear"
    }
    fn describe(&self) -> &'static str {
        "linear van 't Hoff (constant ΔH° and ΔS°)"
    }
    fn equation(&self) -> &'static str {
        "ln K = −ΔH°/(R T) + ΔS°/R"
    }
    fn assumption(&self) -> &'static str {
        "ΔCp° assumed zero"
    }
    fn params(&self) -> &'static [ParamInfo] {
        &PARAMS
    }
    fn extends(&self) -> Option<Model> {
        None
    }
    fn delta_h_row(&self, _t_k: f64, _theta: f64, out: &mut [f64]) {
        out.copy_from_slice(&[1.0, 0.0]);
    }
    fn delta_s_row(&self, _t_k: f64, _theta: f64, out: &mut [f64]) {
        out.copy_from_slice(&[0.0, 1.0]);
    }
    fn delta_cp_row(&self, _t_k: f64, _theta: f64, out: &mut [f64]) {
        out.copy_from_slice(&[0.0, 0.0]);
    }
    fn row(&self, t_k: f64, _theta: f64, out: &mut [f64]) {
        out[0] = -1.0 / (GAS_CONSTANT * t_k);
        out[1] = 1.0 / GAS_CONSTANT;
    }
    /// T* = ΔH°/(ΔS° − R ln K), when positive.
    fn solve_ln_k(&self, beta: &[f64], _theta: f64, ln_k: f64) -> Option<Option<f64>> {
        let t = beta[0] / (beta[1] - GAS_CONSTANT * ln_k);
        Some((t.is_finite() && t > 0.0).then_some(t))
    }
    fn streams(&self) -> bool {
        true
    }
}
