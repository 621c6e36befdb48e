//! Per-point diagnostics of a weighted fit: fitted value, residuals, leverage, studentized
//! residuals, Cook's distance, DFFITS, and flags against stated thresholds.
//!
//! Weighted diagnostics are the ordinary ones of the √w-scaled problem (√w·y on √w·X).
//! Excluded points get a predicted value and a prediction-standardised residual instead.

use crate::least_squares::LinearFit;
use crate::measurement::Measurement;
use crate::model::FitOptions;
use crate::vant_hoff::Solved;
use nalgebra::DMatrix;
use serde::{Deserialize, Serialize};

/// One reason a point is flagged.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum FlagKind {
    /// |externally studentized residual| above the threshold (for an excluded point, the
    /// prediction-standardised residual).
    Outlier,
    /// Leverage above factor × p/n.
    HighLeverage,
    /// Cook's distance above factor / n.
    Influential,
}

/// The set of flags on a point. Serialised as a list such as `["outlier", "influential"]`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(into = "Vec<FlagKind>", from = "Vec<FlagKind>")]
pub struct Flags {
    /// Outlier candidate.
    pub outlier: bool,
    /// High leverage.
    pub high_leverage: bool,
    /// Influential.
    pub influential: bool,
}

impl Flags {
    /// Whether any flag is set.
    pub fn any(self) -> bool {
        self.outlier || self.high_leverage || self.influential
    }

    /// The flags set, in a fixed order.
    pub fn kinds(self) -> Vec<FlagKind> {
        let mut v = Vec::new();
        if self.outlier {
            v.push(FlagKind::Outlier);
        }
        if self.high_leverage {
            v.push(FlagKind::HighLeverage);
        }
        if self.influential {
            v.push(FlagKind::Influential);
        }
        v
    }
}

impl From<Flags> for Vec<FlagKind> {
    fn from(f: Flags) -> Self {
        f.kinds()
    }
}

impl From<Vec<FlagKind>> for Flags {
    fn from(v: Vec<FlagKind>) -> Self {
        Flags {
            outlier: v.contains(&FlagKind::Outlier),
            high_leverage: v.contains(&FlagKind::HighLeverage),
            influential: v.contains(&FlagKind::Influential),
        }
    }
}

/// Diagnostics of one point.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PointDiagnostics {
    /// 0-based index into the input slice.
    pub index: usize,
    /// Temperature, K.
    pub t_k: f64,
    /// Measured ln K.
    pub ln_k: f64,
    /// σ(ln K) used for the weight; `None` in an unweighted fit.
    pub sigma_ln_k: Option<f64>,
    /// Whether the point took part in the fit.
    pub used: bool,
    /// Fitted (predicted) ln K at the point's temperature.
    pub fitted: f64,
    /// Residual ln K − fitted.
    pub residual: f64,
    /// √w × residual.
    pub weighted_residual: f64,
    /// Leverage hᵢ = wᵢ xᵢᵀ(XᵀWX)⁻¹xᵢ (for an excluded point, the leverage it would have
    /// relative to the fitted points).
    pub leverage: f64,
    /// Internally studentized residual rᵢ/(s√(1 − hᵢ)); used points only.
    pub student_int: Option<f64>,
    /// Externally studentized residual rᵢ/(s₍ᵢ₎√(1 − hᵢ)); used points only.
    pub student_ext: Option<f64>,
    /// Cook's distance rᵢ² hᵢ / (p s² (1 − hᵢ)²); used points only.
    pub cooks_d: Option<f64>,
    /// DFFITS = tᵢ √(hᵢ/(1 − hᵢ)); used points only.
    pub dffits: Option<f64>,
    /// Standard deviation of (ln K − fitted) for a new, independent measurement at this
    /// point: √(variance scale/wᵢ + xᵢᵀ Cov xᵢ). A point without σ in a weighted fit (an
    /// excluded one) takes the typical weight n/Σw of the used points.
    pub prediction_se: f64,
    /// For an excluded point, residual / prediction_se: how many prediction standard
    /// deviations off it sits. `None` for used points.
    pub prediction_residual: Option<f64>,
    /// Flags raised against the thresholds.
    pub flags: Flags,
}

/// What every point's diagnostics share: the fit's sizes, variance, covariance and thresholds.
#[derive(Debug, Clone)]
pub(crate) struct PointContext {
    pub(crate) p: usize,
    /// Residual degrees of freedom n − p.
    pub(crate) dof: f64,
    pub(crate) s2: f64,
    /// 1/s.
    pub(crate) inv_s: f64,
    /// 1/(n − p − 1).
    pub(crate) inv_dof_less_one: f64,
    pub(crate) variance_scale: f64,
    /// Scaled and unscaled covariance, p×p row-major.
    pub(crate) cov: Vec<f64>,
    pub(crate) unscaled_cov: Vec<f64>,
    pub(crate) beta: Vec<f64>,
    pub(crate) weighted: bool,
    /// 1/w of a point with no σ of its own: Σw/n of the used points inverted (1 unweighted).
    pub(crate) typical_inv_w: f64,
    pub(crate) outlier: f64,
    pub(crate) leverage_limit: f64,
    pub(crate) cooks_limit: f64,
}

impl PointContext {
    /// The context of the solved fit `lin` (its used points, coefficients and unscaled
    /// covariance) with covariance `cov` (scaled), s², the covariance multiplier, and
    /// `typical_w` = Σw/n, the weight given to a point without σ (1 unweighted). Both engines
    /// build their diagnostics on it.
    pub(crate) fn new(
        lin: &LinearFit,
        cov: &DMatrix<f64>,
        s2: f64,
        variance_scale: f64,
        weighted: bool,
        typical_w: f64,
        th: crate::model::FlagThresholds,
    ) -> Self {
        let beta = &lin.coefficients;
        let unscaled_cov = &lin.unscaled_covariance;
        let p = beta.len();
        let n = lin.n as f64;
        let dof = n - p as f64;
        // The same limits the front ends draw (isochore_fit::influence::FlagLimits).
        let limits = crate::influence::FlagLimits::new(th, p, lin.n);
        let mut c = vec![0.0; p * p];
        let mut u = vec![0.0; p * p];
        let b = beta.clone();
        for a in 0..p {
            for k in 0..p {
                c[a * p + k] = cov[(a, k)];
                u[a * p + k] = unscaled_cov[(a, k)];
            }
        }
        PointContext {
            p,
            dof,
            s2,
            inv_s: 1.0 / s2.sqrt(),
            inv_dof_less_one: 1.0 / (dof - 1.0),
            variance_scale,
            cov: c,
            unscaled_cov: u,
            beta: b,
            weighted,
            typical_inv_w: 1.0 / typical_w,
            outlier: limits.studentized,
            leverage_limit: limits.leverage,
            cooks_limit: limits.cooks_d,
        }
    }
}

/// xᵀ M x over the first p entries of x, M p×p row-major.
#[inline]
pub(crate) fn quadratic(m: &[f64], x: &[f64], p: usize) -> f64 {
    let mut q = 0.0;
    for a in 0..p {
        let mut r = 0.0;
        for b in 0..p {
            r += m[a * p + b] * x[b];
        }
        q += x[a] * r;
    }
    q
}

/// Diagnostics of point `i` with design row `x` (its first p entries are used). `used`
/// carries (leverage, residual, fitted value, √w) for a point that took part in the fit.
pub(crate) fn diagnose_one(
    ctx: &PointContext,
    i: usize,
    m: &Measurement,
    x: &[f64],
    used: Option<(f64, f64, f64, f64)>,
) -> PointDiagnostics {
    let p = ctx.p;
    let dof = ctx.dof;
    let good = |v: f64| v.is_finite().then_some(v);
    let sigma_ln_k = if ctx.weighted { m.sigma_ln_k } else { None };
    // 1/w = σ², or that of a typical used point when the point has none.
    let inv_w = sigma_ln_k.map_or(ctx.typical_inv_w, |s| s * s);
    let quad = quadratic(&ctx.cov, x, p);
    let prediction_se = (ctx.variance_scale * inv_w + quad).sqrt();
    let mut d = PointDiagnostics {
        index: i,
        t_k: m.t_k,
        ln_k: m.ln_k,
        sigma_ln_k,
        used: m.included,
        fitted: 0.0,
        residual: 0.0,
        weighted_residual: 0.0,
        leverage: 0.0,
        student_int: None,
        student_ext: None,
        cooks_d: None,
        dffits: None,
        prediction_se,
        prediction_residual: None,
        flags: Flags::default(),
    };
    if let Some((h, e, fitted, sw)) = used {
        let rw = sw * e;
        d.fitted = fitted;
        d.residual = e;
        d.weighted_residual = rw;
        d.leverage = h;
        let one_minus_h = 1.0 - h;
        if dof >= 1.0 && ctx.s2 > 0.0 && one_minus_h > 1e-10 {
            // r/√(1 − h): the residual scaled to unit variance but for s.
            let rq = rw / one_minus_h.sqrt();
            let t_int = rq * ctx.inv_s;
            d.student_int = good(t_int);
            let cook = t_int * t_int * h / (p as f64 * one_minus_h);
            d.cooks_d = good(cook);
            if dof >= 2.0 {
                let s2_i = (dof * ctx.s2 - rq * rq) * ctx.inv_dof_less_one;
                if s2_i > 0.0 {
                    let t_ext = rq / s2_i.sqrt();
                    d.student_ext = good(t_ext);
                    d.dffits = good(t_ext * (h / one_minus_h).sqrt());
                }
            }
        }
        d.flags.outlier = d.student_ext.is_some_and(|t| t.abs() > ctx.outlier);
        d.flags.high_leverage = h > ctx.leverage_limit;
        d.flags.influential = d.cooks_d.is_some_and(|c| c > ctx.cooks_limit);
    } else {
        let fitted: f64 = (0..p).map(|a| x[a] * ctx.beta[a]).sum();
        let e = m.ln_k - fitted;
        let sw = (1.0 / inv_w).sqrt();
        d.fitted = fitted;
        d.residual = e;
        d.weighted_residual = sw * e;
        d.leverage = quadratic(&ctx.unscaled_cov, x, p) / inv_w;
        let z = e / prediction_se;
        d.prediction_residual = good(z);
        d.flags.outlier = d.prediction_residual.is_some_and(|z| z.abs() > ctx.outlier);
    }
    d
}

/// The per-point diagnostics a fit keeps: records written once (the general solver's, whose
/// leverages come from its QR), or computed on demand from the points themselves
/// (the streaming path: see [`crate::fast`]), materialised into records only when a caller
/// asks for the whole slice.
#[derive(Clone)]
pub(crate) enum PointStore {
    /// Records computed with the fit.
    Kept(Vec<PointDiagnostics>),
    /// Computed when asked for; `cache` holds the records once the slice was asked for.
    OnDemand {
        /// The points and what their diagnostics share.
        points: Box<crate::fast::OnDemand>,
        /// The records, once made.
        cache: std::sync::OnceLock<Vec<PointDiagnostics>>,
        /// Indices of the points carrying any flag, found by the fit's own pass over the
        /// points (so counting them makes no record again).
        flagged: Vec<usize>,
    },
}

impl PointStore {
    /// Number of points (used and excluded).
    pub(crate) fn len(&self) -> usize {
        match self {
            PointStore::Kept(v) => v.len(),
            PointStore::OnDemand { points, .. } => points.len(),
        }
    }

    /// Every record, made now if they were computed on demand.
    pub(crate) fn slice(&self) -> &[PointDiagnostics] {
        match self {
            PointStore::Kept(v) => v,
            PointStore::OnDemand { points, cache, .. } => cache.get_or_init(|| {
                let mut v = Vec::with_capacity(points.len());
                points.for_each(0..points.len(), &mut |d| v.push(d));
                v
            }),
        }
    }

    /// The diagnostics of point `i`, without making the others.
    pub(crate) fn get(&self, i: usize) -> Option<PointDiagnostics> {
        match self {
            PointStore::Kept(v) => v.get(i).cloned(),
            PointStore::OnDemand { points, cache, .. } => match cache.get() {
                Some(v) => v.get(i).cloned(),
                None => points.point(i),
            },
        }
    }

    /// Indices of the points carrying any flag, in order.
    pub(crate) fn flagged(&self) -> Vec<usize> {
        if let PointStore::OnDemand { flagged, .. } = self {
            return flagged.clone();
        }
        let mut out = Vec::new();
        self.for_each(&mut |d| {
            if d.flags.any() {
                out.push(d.index);
            }
        });
        out
    }

    /// Calls `f` with the diagnostics of every point in order, without keeping them.
    pub(crate) fn for_each(&self, f: &mut dyn FnMut(PointDiagnostics)) {
        self.for_each_in(0..self.len(), f);
    }

    /// Calls `f` with the diagnostics of the points in `range`, in order.
    fn for_each_in(&self, range: std::ops::Range<usize>, f: &mut dyn FnMut(PointDiagnostics)) {
        match self {
            PointStore::Kept(v) => v[range].iter().cloned().for_each(f),
            PointStore::OnDemand { points, cache, .. } => match cache.get() {
                Some(v) => v[range].iter().cloned().for_each(f),
                None => points.for_each(range, f),
            },
        }
    }
}

/// The diagnostics of a fit's points in order, each made as it is reached (see
/// `VantHoffFit::points_iter`): [`PointIter::CHUNK`] at a time, none kept.
pub struct PointIter<'a> {
    store: &'a PointStore,
    next: usize,
    buf: std::vec::IntoIter<PointDiagnostics>,
}

impl<'a> PointIter<'a> {
    /// Points made at a time (about 170 kB of records, within the cache).
    const CHUNK: usize = 1024;

    pub(crate) fn new(store: &'a PointStore) -> Self {
        PointIter {
            store,
            next: 0,
            buf: Vec::new().into_iter(),
        }
    }
}

impl Iterator for PointIter<'_> {
    type Item = PointDiagnostics;

    fn next(&mut self) -> Option<PointDiagnostics> {
        if let Some(d) = self.buf.next() {
            return Some(d);
        }
        let len = self.store.len();
        if self.next >= len {
            return None;
        }
        let end = (self.next + Self::CHUNK).min(len);
        let mut v = Vec::with_capacity(end - self.next);
        self.store.for_each_in(self.next..end, &mut |d| v.push(d));
        self.next = end;
        self.buf = v.into_iter();
        self.buf.next()
    }

    fn size_hint(&self) -> (usize, Option<usize>) {
        let n = self.store.len() - self.next + self.buf.len();
        (n, Some(n))
    }
}

impl ExactSizeIterator for PointIter<'_> {}

/// Written as the list of records, as a `Vec<PointDiagnostics>` is.
impl std::fmt::Debug for PointStore {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let mut list = f.debug_list();
        self.for_each(&mut |d| {
            list.entry(&d);
        });
        list.finish()
    }
}

/// Serialised as the list of records, as a `Vec<PointDiagnostics>` is.
impl Serialize for PointStore {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeSeq;
        let mut seq = s.serialize_seq(Some(self.len()))?;
        let mut err = None;
        self.for_each(&mut |d| {
            if err.is_none() {
                err = seq.serialize_element(&d).err();
            }
        });
        match err {
            Some(e) => Err(e),
            None => seq.end(),
        }
    }
}

/// What the warnings need from the diagnostics, gathered while they are made.
#[derive(Debug, Default)]
pub(crate) struct DiagnosticsSummary {
    /// The first point whose fitted value, residual, leverage or prediction SE is not
    /// finite: (index, temperature).
    pub(crate) first_bad: Option<(usize, f64)>,
    /// Used points carrying any flag (an excluded point keeps its flags for the table,
    /// but the caution asks the chemist to inspect only what the fit still uses).
    pub(crate) flagged: usize,
    /// Whether a used point has leverage 1 (to 1e-10).
    pub(crate) leverage_one: bool,
    /// Points seen with a number that is not finite (an absent one aside).
    pub(crate) not_finite: usize,
}

impl DiagnosticsSummary {
    /// The summary of the points of `self` followed by those of `later`: the same as one
    /// summary noting them all in that order.
    pub(crate) fn then(self, later: DiagnosticsSummary) -> DiagnosticsSummary {
        DiagnosticsSummary {
            first_bad: self.first_bad.or(later.first_bad),
            flagged: self.flagged + later.flagged,
            leverage_one: self.leverage_one | later.leverage_one,
            not_finite: self.not_finite + later.not_finite,
        }
    }

    /// Takes one point into account.
    #[inline]
    pub(crate) fn note(&mut self, d: &PointDiagnostics) {
        if self.first_bad.is_none()
            && !(d.fitted.is_finite()
                && d.residual.is_finite()
                && d.leverage.is_finite()
                && d.prediction_se.is_finite())
        {
            self.first_bad = Some((d.index, d.t_k));
        }
        self.flagged += usize::from(d.used && d.flags.any());
        self.leverage_one |= d.used && d.leverage >= 1.0 - 1e-10;
        let opt = |v: Option<f64>| v.is_none_or(f64::is_finite);
        let all_finite = [d.t_k, d.ln_k, d.fitted, d.residual, d.weighted_residual]
            .iter()
            .chain(&[d.leverage, d.prediction_se])
            .all(|v| v.is_finite())
            && [
                d.sigma_ln_k,
                d.student_int,
                d.student_ext,
                d.cooks_d,
                d.dffits,
                d.prediction_residual,
            ]
            .into_iter()
            .all(opt);
        self.not_finite += usize::from(!all_finite);
    }
}

/// Computes diagnostics for every point (used and excluded).
pub(crate) fn diagnose_points(
    points: &[Measurement],
    solved: &Solved,
    options: &FitOptions,
    cov: &DMatrix<f64>,
    variance_scale: f64,
    s2: f64,
) -> Vec<PointDiagnostics> {
    let lin = &solved.lin;
    let n = lin.n as f64;
    let theta = options.t_ref_k;
    let mut position = vec![usize::MAX; points.len()];
    for (r, &i) in solved.used.iter().enumerate() {
        position[i] = r;
    }
    // Weight of a point with no σ of its own (an excluded point in a weighted fit): that of
    // a typical used point, 1/σ̄² with σ̄² = n/Σw (1 when unweighted).
    let typical_w = solved
        .weights
        .as_ref()
        .map_or(1.0, |w| w.iter().sum::<f64>() / n);
    let ctx = PointContext::new(
        lin,
        cov,
        s2,
        variance_scale,
        solved.weights.is_some(),
        typical_w,
        options.thresholds,
    );
    let mut row = vec![0.0; lin.p];
    points
        .iter()
        .enumerate()
        .map(|(i, m)| {
            options.model.row_into(m.t_k, theta, &mut row);
            let r = position[i];
            let used = (r != usize::MAX).then(|| {
                let sw = solved.weights.as_ref().map_or(1.0, |w| w[r].sqrt());
                (lin.leverages[r], lin.residuals[r], lin.fitted[r], sw)
            });
            diagnose_one(&ctx, i, m, &row, used)
        })
        .collect()
}
