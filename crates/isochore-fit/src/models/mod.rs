//! The van 't Hoff models, as data. A model is one type implementing [`ModelSpec`]: its
//! parameters ([`ParamInfo`]), its ln K design row and its thermodynamic functions ΔH°(T),
//! ΔS°(T) and ΔCp°(T) as coefficient rows. Everything downstream — the fit, the per-point
//! diagnostics, derived quantities, the comparison ladder, warnings, the JSON contract and
//! the reports — loops over the parameters and asks the model; nothing matches on which
//! model it is.
//!
//! Every shipped model is linear in its parameters β, so each thermodynamic function at a
//! temperature T is a coefficient row c(T): its value is c·β and its variance cᵀΣc. The ln K
//! row follows from the van 't Hoff relation ln K = −ΔG°/(RT) = −ΔH°/(RT) + ΔS°/R.
//!
//! Adding a model: write one file beside `linear.rs` implementing [`ModelSpec`], add one line
//! to [`Model::all`]'s list, and give it a `const` handle (see DEVELOPERS.md).

pub(crate) mod clarke_glew;
pub(crate) mod constant_cp;
mod linear;

pub use clarke_glew::ClarkeGlew;
pub use constant_cp::ConstantCp;
pub use linear::Linear;

use crate::GAS_CONSTANT;
use serde::{Deserialize, Deserializer, Serialize, Serializer};
use std::fmt;
use std::hash::{Hash, Hasher};

/// The physical kind of a parameter, which fixes its SI unit and how it is shown.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ParamDimension {
    /// An energy per mole (ΔH°), J/mol.
    Energy,
    /// An entropy (ΔS°), J mol⁻¹ K⁻¹.
    Entropy,
    /// A heat capacity (ΔCp°), J mol⁻¹ K⁻¹.
    HeatCapacity,
    /// The temperature slope of a heat capacity (dΔCp°/dT), J mol⁻¹ K⁻².
    HeatCapacitySlope,
}

impl ParamDimension {
    /// The SI unit as text.
    pub fn si_unit(self) -> &'static str {
        match self {
            ParamDimension::Energy => "J/mol",
            ParamDimension::Entropy | ParamDimension::HeatCapacity => "J mol⁻¹ K⁻¹",
            ParamDimension::HeatCapacitySlope => "J mol⁻¹ K⁻²",
        }
    }
}

/// One parameter of a model.
#[derive(Debug, PartialEq, Eq, Hash)]
pub struct ParamInfo {
    /// The machine key in JSON and files: "delta_h", "delta_s", "delta_cp", "delta_cp_slope".
    pub key: &'static str,
    /// The symbol for people: "ΔH°", "ΔS°", "ΔCp°", "dΔCp°/dT".
    pub symbol: &'static str,
    /// Its physical kind (and so its SI unit).
    pub dimension: ParamDimension,
    /// Whether its value is quoted at the reference temperature θ ("ΔH°(θ)"); false for a
    /// parameter that does not depend on T in the model.
    pub at_reference: bool,
}

impl ParamInfo {
    /// The SI unit as text.
    pub fn si_unit(&self) -> &'static str {
        self.dimension.si_unit()
    }
}

/// The parameter ΔH° (at θ where the model lets it vary).
pub const DELTA_H: ParamInfo = ParamInfo {
    key: "delta_h",
    symbol: "ΔH°",
    dimension: ParamDimension::Energy,
    at_reference: true,
};
/// The parameter ΔS° (at θ where the model lets it vary).
pub const DELTA_S: ParamInfo = ParamInfo {
    key: "delta_s",
    symbol: "ΔS°",
    dimension: ParamDimension::Entropy,
    at_reference: true,
};
/// The parameter ΔCp° (at θ where the model lets it vary).
pub const DELTA_CP: ParamInfo = ParamInfo {
    key: "delta_cp",
    symbol: "ΔCp°",
    dimension: ParamDimension::HeatCapacity,
    at_reference: true,
};
/// The parameter dΔCp°/dT.
pub const DELTA_CP_SLOPE: ParamInfo = ParamInfo {
    key: "delta_cp_slope",
    symbol: "dΔCp°/dT",
    dimension: ParamDimension::HeatCapacitySlope,
    at_reference: false,
};

/// One van 't Hoff model: its parameters, the design row of ln K and its thermodynamic
/// functions as coefficient rows. Every `out` slice has length `params().len()`.
pub trait ModelSpec: Send + Sync + 'static {
    /// The machine key in JSON and project files: "linear", "cp", "clarke_glew".
    fn key(&self) -> &'static str;
    /// The name on the command line (`--model`): "linear", "cp", "clarke-glew".
    fn cli_name(&self) -> &'static str;
    /// A short name for sentences: "linear", "constant-ΔCp°", "Clarke–Glew".
    fn short_name(&self) -> &'static str;
    /// A plain description for people.
    fn describe(&self) -> &'static str;
    /// The equation of ln K as text, for the methods section of reports.
    fn equation(&self) -> &'static str;
    /// What the model assumes about the heat capacity, for extrapolation warnings:
    /// "ΔCp° assumed zero".
    fn assumption(&self) -> &'static str;
    /// The parameters in design-column order.
    fn params(&self) -> &'static [ParamInfo];
    /// The model this one extends by one or more parameters (its leading columns are that
    /// model's), for the comparison ladder; `None` for the simplest.
    fn extends(&self) -> Option<Model>;
    /// ΔH°(T) = c·β: writes c.
    fn delta_h_row(&self, t_k: f64, theta: f64, out: &mut [f64]);
    /// ΔS°(T) = c·β: writes c.
    fn delta_s_row(&self, t_k: f64, theta: f64, out: &mut [f64]);
    /// ΔCp°(T) = c·β: writes c.
    fn delta_cp_row(&self, t_k: f64, theta: f64, out: &mut [f64]);
    /// The ln K design row x(T), ln K = x·β. The default is −ΔH° row/(RT) + ΔS° row/R; a
    /// model may write a better-conditioned form of the same function.
    fn row(&self, t_k: f64, theta: f64, out: &mut [f64]) {
        let p = out.len();
        let mut h = vec![0.0; p];
        let mut s = vec![0.0; p];
        self.delta_h_row(t_k, theta, &mut h);
        self.delta_s_row(t_k, theta, &mut s);
        for j in 0..p {
            out[j] = -h[j] / (GAS_CONSTANT * t_k) + s[j] / GAS_CONSTANT;
        }
    }
    /// [`ModelSpec::row`] with ln(T/θ) given (`ln_t_theta`, computed by the caller as
    /// `(t_k / theta).ln()`), so a solver that forms the same row many times takes the
    /// logarithm once. The default ignores it and calls [`ModelSpec::row`]; a model whose
    /// row uses ln(T/θ) writes its row here, so both give the same bits.
    fn row_with_log(&self, t_k: f64, theta: f64, _ln_t_theta: f64, out: &mut [f64]) {
        self.row(t_k, theta, out)
    }
    /// The temperature where ln K = `ln_k`, in closed form where the model has one;
    /// `None` lets the caller search numerically. `Some(None)` says there is no root.
    fn solve_ln_k(&self, _beta: &[f64], _theta: f64, _ln_k: f64) -> Option<Option<f64>> {
        None
    }
    /// What the model adds over the one it extends, for the comparison's verdict ("no
    /// evidence of curvature").
    fn evidence_phrase(&self) -> &'static str {
        "the extra term"
    }
    /// Whether the streaming solver (which computes the leading columns of the
    /// constant-ΔCp° design) can fit this model. Default false: the general solver fits it.
    fn streams(&self) -> bool {
        false
    }
}

/// A van 't Hoff model: a small copyable handle on a [`ModelSpec`]. Two handles are equal
/// when their keys are; it is written to JSON and files as its key.
#[derive(Clone, Copy)]
pub struct Model(&'static dyn ModelSpec);

static SHIPPED: [Model; 3] = [Model::LINEAR, Model::CONSTANT_CP, Model::CLARKE_GLEW];

impl Model {
    /// ΔH° and ΔS° constant: ln K linear in 1/T.
    pub const LINEAR: Model = Model(&Linear);
    /// ΔCp° constant; ΔH° and ΔS° quoted at θ.
    pub const CONSTANT_CP: Model = Model(&ConstantCp);
    /// The Clarke–Glew form with ΔCp° linear in T.
    pub const CLARKE_GLEW: Model = Model(&ClarkeGlew);

    /// A handle on any model, for instance one defined in a test.
    pub const fn new(spec: &'static dyn ModelSpec) -> Model {
        Model(spec)
    }

    /// The shipped models, simplest first (the comparison ladder).
    pub fn all() -> &'static [Model] {
        &SHIPPED
    }

    /// The shipped model with this key or command-line name.
    pub fn from_key(key: &str) -> Option<Model> {
        SHIPPED
            .iter()
            .copied()
            .find(|m| m.key() == key || m.cli_name() == key)
    }

    /// The model's specification.
    pub fn spec(self) -> &'static dyn ModelSpec {
        self.0
    }

    /// See [`ModelSpec::key`].
    pub fn key(self) -> &'static str {
        self.0.key()
    }
    /// See [`ModelSpec::cli_name`].
    pub fn cli_name(self) -> &'static str {
        self.0.cli_name()
    }
    /// See [`ModelSpec::short_name`].
    pub fn short_name(self) -> &'static str {
        self.0.short_name()
    }
    /// See [`ModelSpec::describe`].
    pub fn describe(self) -> &'static str {
        self.0.describe()
    }
    /// See [`ModelSpec::equation`].
    pub fn equation(self) -> &'static str {
        self.0.equation()
    }
    /// See [`ModelSpec::assumption`].
    pub fn assumption(self) -> &'static str {
        self.0.assumption()
    }
    /// See [`ModelSpec::params`].
    pub fn params(self) -> &'static [ParamInfo] {
        self.0.params()
    }
    /// Number of fitted parameters.
    pub fn n_params(self) -> usize {
        self.0.params().len()
    }
    /// See [`ModelSpec::extends`].
    pub fn extends(self) -> Option<Model> {
        self.0.extends()
    }
    /// See [`ModelSpec::streams`].
    pub fn streams(self) -> bool {
        self.0.streams()
    }
    /// Whether the model lets ΔCp° be non-zero: its ΔCp°(T) row is not zero about a
    /// reference temperature (so a model whose ΔH°(T) varies through a parameter of another
    /// kind counts too).
    pub fn has_heat_capacity(self) -> bool {
        let theta = crate::model::DEFAULT_REFERENCE_K;
        [0.9, 1.0, 1.1].iter().any(|f| {
            self.delta_cp_row(theta * f, theta)
                .iter()
                .any(|c| *c != 0.0)
        })
    }

    /// Writes the ln K design row at `t_k` into `out` (length [`Model::n_params`]).
    pub fn row_into(self, t_k: f64, theta: f64, out: &mut [f64]) {
        self.0.row(t_k, theta, out)
    }
    /// See [`ModelSpec::row_with_log`]: the row with ln(T/θ) = `(t_k / theta).ln()` given.
    pub fn row_with_log_into(self, t_k: f64, theta: f64, ln_t_theta: f64, out: &mut [f64]) {
        self.0.row_with_log(t_k, theta, ln_t_theta, out)
    }
    /// The ln K design row as a vector.
    pub fn row(self, t_k: f64, theta: f64) -> Vec<f64> {
        let mut v = vec![0.0; self.n_params()];
        self.0.row(t_k, theta, &mut v);
        v
    }
    /// Writes the ΔH°(T) coefficient row at `t_k` into `out` (length [`Model::n_params`]).
    pub fn delta_h_row_into(self, t_k: f64, theta: f64, out: &mut [f64]) {
        self.0.delta_h_row(t_k, theta, out)
    }
    /// The ΔH°(T) coefficient row as a vector.
    pub fn delta_h_row(self, t_k: f64, theta: f64) -> Vec<f64> {
        let mut v = vec![0.0; self.n_params()];
        self.0.delta_h_row(t_k, theta, &mut v);
        v
    }
    /// The ΔS°(T) coefficient row as a vector.
    pub fn delta_s_row(self, t_k: f64, theta: f64) -> Vec<f64> {
        let mut v = vec![0.0; self.n_params()];
        self.0.delta_s_row(t_k, theta, &mut v);
        v
    }
    /// The ΔG°(T) = ΔH°(T) − T ΔS°(T) coefficient row as a vector.
    pub fn delta_g_row(self, t_k: f64, theta: f64) -> Vec<f64> {
        let h = self.delta_h_row(t_k, theta);
        let s = self.delta_s_row(t_k, theta);
        h.iter().zip(&s).map(|(h, s)| h - t_k * s).collect()
    }
    /// The ΔCp°(T) coefficient row as a vector.
    pub fn delta_cp_row(self, t_k: f64, theta: f64) -> Vec<f64> {
        let mut v = vec![0.0; self.n_params()];
        self.0.delta_cp_row(t_k, theta, &mut v);
        v
    }

    /// The ladder of nested models this one belongs to, simplest first: down through
    /// [`Model::extends`] to the simplest, then up through the shipped models that extend
    /// the largest found.
    pub fn ladder(self) -> Vec<Model> {
        let mut down = vec![self];
        while let Some(m) = down.last().and_then(|m| m.extends()) {
            if down.contains(&m) || down.len() > 16 {
                break;
            }
            down.push(m);
        }
        down.reverse();
        loop {
            let top = *down.last().unwrap_or(&self);
            match SHIPPED.iter().find(|m| m.extends() == Some(top)) {
                Some(&next) if !down.contains(&next) && down.len() <= 16 => down.push(next),
                _ => break,
            }
        }
        down
    }
}

impl Default for Model {
    fn default() -> Self {
        Model::LINEAR
    }
}

impl PartialEq for Model {
    fn eq(&self, other: &Self) -> bool {
        self.key() == other.key()
    }
}

impl Eq for Model {}

impl Hash for Model {
    fn hash<H: Hasher>(&self, state: &mut H) {
        self.key().hash(state)
    }
}

impl fmt::Debug for Model {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "Model({})", self.key())
    }
}

impl fmt::Display for Model {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.describe())
    }
}

impl Serialize for Model {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.key())
    }
}

impl<'de> Deserialize<'de> for Model {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        let key = String::deserialize(d)?;
        Model::from_key(&key).ok_or_else(|| {
            let known: Vec<&str> = SHIPPED.iter().map(|m| m.key()).collect();
            serde::de::Error::custom(format!(
                "unknown model \"{key}\" (known: {})",
                known.join(", ")
            ))
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// ln K row = −ΔH° row/(RT) + ΔS° row/R for every shipped model (the van 't Hoff
    /// relation ln K = −ΔG°/RT), whatever form its `row` is written in.
    #[test]
    fn rows_agree_with_the_thermodynamic_functions() {
        for &m in Model::all() {
            for &t in &[250.0, 298.15, 310.0, 360.0] {
                let theta = 298.15;
                let x = m.row(t, theta);
                let h = m.delta_h_row(t, theta);
                let s = m.delta_s_row(t, theta);
                for j in 0..m.n_params() {
                    let want = -h[j] / (GAS_CONSTANT * t) + s[j] / GAS_CONSTANT;
                    assert!(
                        (x[j] - want).abs() <= 1e-12 * want.abs().max(1e-3),
                        "{m:?} {j}"
                    );
                }
            }
        }
    }

    /// d ln K/dT = ΔH°(T)/(RT²) and dΔH°/dT = ΔCp°(T) (Kirchhoff), by central differences.
    #[test]
    fn derivatives_obey_van_t_hoff_and_kirchhoff() {
        let beta = [-25e3, -40.0, -300.0, 2.5];
        for &m in Model::all() {
            let p = m.n_params();
            let theta = 300.0;
            let dot = |v: Vec<f64>| v.iter().zip(&beta[..p]).map(|(a, b)| a * b).sum::<f64>();
            for &t in &[280.0, 300.0, 330.0] {
                let e = 1e-3;
                let dlnk = (dot(m.row(t + e, theta)) - dot(m.row(t - e, theta))) / (2.0 * e);
                let dh = dot(m.delta_h_row(t, theta));
                assert!((dlnk - dh / (GAS_CONSTANT * t * t)).abs() < 1e-6 * dlnk.abs());
                let ddh = (dot(m.delta_h_row(t + e, theta)) - dot(m.delta_h_row(t - e, theta)))
                    / (2.0 * e);
                let cp = dot(m.delta_cp_row(t, theta));
                assert!((ddh - cp).abs() < 1e-5 * (1.0 + cp.abs()), "{m:?} at {t}");
            }
        }
    }

    #[test]
    fn keys_round_trip_and_the_ladder_is_nested() {
        for &m in Model::all() {
            assert_eq!(Model::from_key(m.key()), Some(m));
            assert_eq!(Model::from_key(m.cli_name()), Some(m));
            let json = serde_json::to_string(&m).unwrap();
            assert_eq!(serde_json::from_str::<Model>(&json).unwrap(), m);
            assert_eq!(m.ladder(), Model::all());
            if let Some(smaller) = m.extends() {
                let p = smaller.n_params();
                assert_eq!(&m.params()[..p], smaller.params());
            }
        }
        assert!(serde_json::from_str::<Model>("\"quartic\"").is_err());
    }
}
