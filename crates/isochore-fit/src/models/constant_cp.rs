//! The constant-ΔCp° model: the Clarke–Glew form truncated after ΔCp°, about a reference
//! temperature θ. ΔH° and ΔS° are quoted at θ and vary with T through ΔCp°.
//!
//! ```text
//! ln K = −ΔH°(θ)/(R T) + ΔS°(θ)/R + ΔCp° (θ/T − 1 + ln(T/θ))/R
//! ΔH°(T) = ΔH°(θ) + ΔCp°(T − θ),   ΔS°(T) = ΔS°(θ) + ΔCp° ln(T/θ)
//! ```
//! At T = θ the ΔCp° column and its first derivative vanish, so ΔH°(θ) and ΔS°(θ) keep their
//! meaning.

use super::{Model, ModelSpec, ParamInfo, DELTA_CP, DELTA_H, DELTA_S};
use crate::GAS_CONSTANT;

/// The ln K row at `t_k` with ln(T/θ) = `l` given: the one formula of the model's row,
/// inlined where a solver forms many rows at once (the streaming path of `fast`).
#[inline(always)]
pub(crate) fn row(t_k: f64, theta: f64, l: f64) -> [f64; 3] {
    let r = GAS_CONSTANT;
    [-1.0 / (r * t_k), 1.0 / r, (theta / t_k - 1.0 + l) / r]
}

/// ΔCp° constant over the temperature range.
#[derive(Debug, Clone, Copy)]
pub struct ConstantCp;

static PARAMS: [ParamInfo; 3] = [DELTA_H, DELTA_S, DELTA_CP];

impl ModelSpec for ConstantCp {
    fn key(&self) -> &'static str {
        "cp"
    }
    fn cli_name(&self) -> &'static str {
        "cp"
    }
    fn short_name(&self) -> &'static str {
        "ΔCp°"
    }
    fn describe(&self) -> &'static str {
        "constant ΔCp° (ΔH° and ΔS° vary with T)"
    }
    fn equation(&self) -> &'static str {
        "ln K = −ΔH°(θ)/(R T) + ΔS°(θ)/R + ΔCp°·(θ/T − 1 + ln(T/θ))/R"
    }
    fn assumption(&self) -> &'static str {
        "ΔCp° assumed constant"
    }
    fn evidence_phrase(&self) -> &'static str {
        "curvature"
    }
    fn params(&self) -> &'static [ParamInfo] {
        &PARAMS
    }
    fn extends(&self) -> Option<Model> {
        Some(Model::LINEAR)
    }
    fn delta_h_row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        out.copy_from_slice(&[1.0, 0.0, t_k - theta]);
    }
    fn delta_s_row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        out.copy_from_slice(&[0.0, 1.0, (t_k / theta).ln()]);
    }
    fn delta_cp_row(&self, _t_k: f64, _theta: f64, out: &mut [f64]) {
        out.copy_from_slice(&[0.0, 0.0, 1.0]);
    }
    fn row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        self.row_with_log(t_k, theta, (t_k / theta).ln(), out)
    }
    fn row_with_log(&self, t_k: f64, theta: f64, l: f64, out: &mut [f64]) {
        out.copy_from_slice(&row(t_k, theta, l));
    }
    fn streams(&self) -> bool {
        true
    }
}
