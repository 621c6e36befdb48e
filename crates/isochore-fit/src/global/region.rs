//! What a figure of a joint fit needs from the fit: the fitted ln K of one series at any
//! temperature ([`GlobalFit::ln_k_at`]) and the joint confidence region of two linear
//! functions of one series' parameters — ΔH° with ΔS° at one temperature
//! ([`GlobalFit::h_s_region`]), ΔH° at one temperature with ΔG° at another
//! ([`GlobalFit::h_g_region`]) — as closed polygons, with the radius a single fit's
//! ellipse uses.

use super::result::GlobalFit;
use crate::error::Error;
use crate::model::{check_level, SigmaConvention};
use crate::stats::{chi2_quantile, f_quantile};
use crate::vant_hoff::Estimate;

/// Vertices of a region polygon are kept within 8 ..= this many.
pub const MAX_REGION_VERTICES: usize = 2000;

impl GlobalFit {
    /// The fitted ln K of series `s` at `t_k`, with its SE and confidence interval from the
    /// joint covariance (the line the series follows under the fit's sharing); `None` for
    /// an unknown series.
    pub fn ln_k_at(&self, s: usize, t_k: f64) -> Option<Estimate> {
        let row = self.options.model.row(t_k, self.options.t_ref_k);
        self.linear_estimate(&self.spread(s, &row)?)
    }

    /// The joint confidence region at `level` of ΔH°(T) and ΔS°(T) of series `s`, as
    /// `n_vertices` points (J/mol, J mol⁻¹ K⁻¹). See [`GlobalFit::h_g_region`] for the
    /// radius.
    ///
    /// # Errors
    /// As [`GlobalFit::h_g_region`].
    pub fn h_s_region(
        &self,
        s: usize,
        t_k: f64,
        level: f64,
        n_vertices: usize,
    ) -> Result<Vec<[f64; 2]>, Error> {
        let theta = self.options.t_ref_k;
        let model = self.options.model;
        self.region(
            s,
            &model.delta_h_row(t_k, theta),
            &model.delta_s_row(t_k, theta),
            level,
            n_vertices,
        )
    }

    /// The joint confidence region at `level` of ΔH°(`t_h_k`) and ΔG°(`t_g_k`) of series
    /// `s`, as `n_vertices` points (J/mol for both).
    ///
    /// # Formula
    /// ```text
    /// (v − v̂)ᵀ Σ₂⁻¹ (v − v̂) ≤ 2 F(level; 2, n − p)   (scaled)   or   χ²(level; 2)   (absolute σ)
    /// ```
    /// with Σ₂ the 2×2 covariance of the two functions from the joint covariance, the
    /// radius of a single fit's ΔH°–ΔS° ellipse (`VantHoffFit::ellipse`).
    ///
    /// # Errors
    /// [`Error::InvalidLevel`]; [`Error::NoSolution`] for an unknown series or a degenerate
    /// covariance.
    pub fn h_g_region(
        &self,
        s: usize,
        t_h_k: f64,
        t_g_k: f64,
        level: f64,
        n_vertices: usize,
    ) -> Result<Vec<[f64; 2]>, Error> {
        let theta = self.options.t_ref_k;
        let model = self.options.model;
        self.region(
            s,
            &model.delta_h_row(t_h_k, theta),
            &model.delta_g_row(t_g_k, theta),
            level,
            n_vertices,
        )
    }

    /// The region of the model coefficient rows `a` and `b` of series `s`.
    fn region(
        &self,
        s: usize,
        a: &[f64],
        b: &[f64],
        level: f64,
        n_vertices: usize,
    ) -> Result<Vec<[f64; 2]>, Error> {
        check_level(level)?;
        let unknown = || Error::NoSolution(format!("series {} is not in the fit", s + 1));
        let ca = self.spread(s, a).ok_or_else(unknown)?;
        let cb = self.spread(s, b).ok_or_else(unknown)?;
        let (ea, eb) = (
            self.linear_estimate(&ca).ok_or_else(unknown)?,
            self.linear_estimate(&cb).ok_or_else(unknown)?,
        );
        let radius2 = if self.options.convention == SigmaConvention::Absolute && self.weighted {
            chi2_quantile(level, 2.0)
        } else {
            2.0 * f_quantile(level, 2.0, self.dof as f64)
        };
        let (vaa, vab, vbb) = (
            self.cross_covariance(&ca, &ca),
            self.cross_covariance(&ca, &cb),
            self.cross_covariance(&cb, &cb),
        );
        // Cholesky of [[vaa, vab], [vab, vbb]].
        let l11 = vaa.sqrt();
        let l21 = vab / l11;
        let l22_sq = vbb - l21 * l21;
        if !(radius2.is_finite() && l11 > 0.0 && l22_sq >= 0.0) {
            return Err(Error::NoSolution(
                "the covariance of the two quantities is degenerate; no confidence region can be drawn".into(),
            ));
        }
        let (l22, r) = (l22_sq.sqrt(), radius2.sqrt());
        let n = n_vertices.clamp(8, MAX_REGION_VERTICES);
        Ok((0..n)
            .map(|i| {
                let ang = std::f64::consts::TAU * i as f64 / n as f64;
                let (u, v) = (r * ang.cos(), r * ang.sin());
                [ea.value + l11 * u, eb.value + l21 * u + l22 * v]
            })
            .collect())
    }
}
