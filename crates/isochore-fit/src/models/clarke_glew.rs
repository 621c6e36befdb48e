//! The Clarke–Glew form with a heat capacity linear in temperature, about a reference
//! temperature θ: ΔCp°(T) = ΔCp°(θ) + (dΔCp°/dT)(T − θ).
//!
//! ```text
//! ln K = −ΔH°(θ)/(R T) + ΔS°(θ)/R + ΔCp°(θ) (θ/T − 1 + ln(T/θ))/R
//!        + (dΔCp°/dT) (θ/2)(T/θ − θ/T − 2 ln(T/θ))/R
//! ΔH°(T) = ΔH°(θ) + ΔCp°(θ)(T − θ) + (dΔCp°/dT)(T − θ)²/2
//! ΔS°(T) = ΔS°(θ) + ΔCp°(θ) ln(T/θ) + (dΔCp°/dT)(T − θ − θ ln(T/θ))
//! ```
//! (Clarke and Glew, Trans. Faraday Soc. 62, 539 (1966), truncated after the first
//! temperature derivative of ΔCp°.) The last column and its first two derivatives vanish at
//! T = θ, so the first three parameters keep their meaning at θ.

use super::{Model, ModelSpec, ParamInfo, DELTA_CP, DELTA_CP_SLOPE, DELTA_H, DELTA_S};
use crate::GAS_CONSTANT;

/// The ln K row at `t_k` with ln(T/θ) = `l` given: the one formula of the model's row, inlined
/// where a solver forms many rows at once (the streamed χ² of `least_squares`).
#[inline(always)]
pub(crate) fn row(t_k: f64, theta: f64, l: f64) -> [f64; 4] {
    let r = GAS_CONSTANT;
    [
        -1.0 / (r * t_k),
        1.0 / r,
        (theta / t_k - 1.0 + l) / r,
        0.5 * theta * (t_k / theta - theta / t_k - 2.0 * l) / r,
    ]
}

/// ΔCp° linear in T (the Clarke–Glew form to first order in dΔCp°/dT).
#[derive(Debug, Clone, Copy)]
pub struct ClarkeGlew;

static PARAMS: [ParamInfo; 4] = [DELTA_H, DELTA_S, DELTA_CP, DELTA_CP_SLOPE];

impl ModelSpec for ClarkeGlew {
    fn key(&self) -> &'static str {
        "clarke_glew"
    }
    fn cli_name(&self) -> &'static str {
        "clarke-glew"
    }
    fn short_name(&self) -> &'static str {
        "Clarke–Glew"
    }
    fn describe(&self) -> &'static str {
        "Clarke–Glew (ΔCp° varies linearly with T)"
    }
    fn equation(&self) -> &'static str {
        "ln K = −ΔH°(θ)/(R T) + ΔS°(θ)/R + ΔCp°(θ)·(θ/T − 1 + ln(T/θ))/R + (dΔCp°/dT)·(θ/2)(T/θ − θ/T − 2 ln(T/θ))/R"
    }
    fn assumption(&self) -> &'static str {
        "ΔCp° assumed linear in T"
    }
    fn evidence_phrase(&self) -> &'static str {
        "a temperature-dependent ΔCp°"
    }
    fn params(&self) -> &'static [ParamInfo] {
        &PARAMS
    }
    fn extends(&self) -> Option<Model> {
        Some(Model::CONSTANT_CP)
    }
    fn delta_h_row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        let d = t_k - theta;
        out.copy_from_slice(&[1.0, 0.0, d, 0.5 * d * d]);
    }
    fn delta_s_row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        let l = (t_k / theta).ln();
        out.copy_from_slice(&[0.0, 1.0, l, t_k - theta - theta * l]);
    }
    fn delta_cp_row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        out.copy_from_slice(&[0.0, 0.0, 1.0, t_k - theta]);
    }
    fn row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        self.row_with_log(t_k, theta, (t_k / theta).ln(), out)
    }
    fn row_with_log(&self, t_k: f64, theta: f64, l: f64, out: &mut [f64]) {
        out.copy_from_slice(&row(t_k, theta, l));
    }
}
