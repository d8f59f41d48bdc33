//! The fit file: what is fitted to what (JSON; every object rejects unknown keys, naming them).
//!
//! See `examples/fits/demo-alignment.fit.json` for a complete annotated example and
//! docs/fit-file.md for every key. In short:
//!
//! - `target`: path of a target file (relative to the fit file) or the target inline;
//! - `laser`: the laser as in a laser file (inline) or the path of one;
//! - `setup`: reserved for the detection layer (beam, medium, detector); a fit file that sets
//!   it is refused until that layer exists, so nothing is silently ignored;
//! - `datasets`: measured tables with their columns, x unit, kind (lines or continuous),
//!   uncertainties and `conditions` — values that differ between datasets, written as
//!   addresses (`target.alignment.mean_cos2`, `laser.colours[0].intensity_wcm2`, …; the
//!   addressing scheme of [`crate::address`]);
//! - `parameters`: free parameters, each an address with optional start (default: the value in
//!   the document), bounds and the periodic flag;
//! - `nuisance`: the shared intensity calibration factor and per-dataset backgrounds (the
//!   per-dataset scale is profiled out analytically unless a dataset fixes it);
//! - `fitter`: residual mode, number of starts, Δχ² of the reported minima, profile intervals,
//!   iteration limit, Jacobian differences.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use super::lines::Background;
use super::measured::{Columns, XUnit};
use super::problem::Differences;
use crate::laser::LaserSpec;
use crate::target::TargetSpec;

/// A document given by path or inline.
#[derive(Clone, Debug, PartialEq, Serialize)]
#[serde(untagged)]
pub enum Document<T> {
    /// Path relative to the fit file.
    Path(String),
    /// The document itself.
    Inline(Box<T>),
}

// By hand rather than `untagged`, so that an error inside an inline document keeps its key.
impl<'de, T: serde::de::DeserializeOwned> Deserialize<'de> for Document<T> {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        let v = serde_json::Value::deserialize(d)?;
        match v {
            serde_json::Value::String(s) => Ok(Document::Path(s)),
            other => serde_json::from_value(other)
                .map(|t| Document::Inline(Box::new(t)))
                .map_err(serde::de::Error::custom),
        }
    }
}

/// Residuals compared.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum ResidualMode {
    /// `(ln y − ln(s·m)) / σ_ln` with `σ_ln = σ_y / y` (spectra span decades). Needs positive
    /// yields.
    #[default]
    Log,
    /// `(y − s·m) / σ_y`.
    Linear,
}

/// What the rows of a dataset are.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum DataKind {
    /// One row per harmonic line (its yield).
    #[default]
    Lines,
    /// A continuous spectral density, reduced to line yields by the line windows.
    Continuous,
}

/// The overall scale of a dataset.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize, Default)]
#[serde(rename_all = "kebab-case", deny_unknown_fields)]
pub enum ScaleSpec {
    /// Profiled out analytically (best scale for every parameter vector).
    #[default]
    Profiled,
    /// Fixed at this value (yield units per model unit).
    Fixed(f64),
}

/// One measured dataset.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DatasetSpec {
    /// Label (unique; used in outputs and in `background[LABEL]`).
    pub label: String,
    /// Path of the table (relative to the fit file).
    pub file: String,
    /// Which columns hold what.
    pub columns: Columns,
    /// Unit of the x column.
    pub x_unit: XUnit,
    /// Line yields or a continuous density.
    #[serde(default)]
    pub kind: DataKind,
    /// For continuous data: the harmonic orders whose lines are integrated (default: every odd
    /// order whose whole window lies inside the measured range).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub orders: Option<Vec<f64>>,
    /// For continuous data: half width of the line windows, in orders (default 1).
    #[serde(default = "one")]
    pub window_half_width_orders: f64,
    /// For continuous data: background subtraction.
    #[serde(default)]
    pub background: Background,
    /// Relative uncertainty of every yield, used where the table has no uncertainty column
    /// (without either the residuals are unweighted and s² sets the error scale).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub relative_uncertainty: Option<f64>,
    /// Values of this dataset's conditions, by address (e.g. `"target.alignment.mean_cos2":
    /// 0.7`).
    #[serde(default)]
    pub conditions: BTreeMap<String, f64>,
    /// Overall scale (default profiled).
    #[serde(default)]
    pub scale: ScaleSpec,
}

fn one() -> f64 {
    1.0
}

/// A free parameter of the model, by address.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ParameterSpec {
    /// Address of the value ([`crate::address`]).
    pub address: String,
    /// Start value (default: the value in the document).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub start: Option<f64>,
    /// Lower bound (default none).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub lower: Option<f64>,
    /// Upper bound (default none).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub upper: Option<f64>,
    /// Periodic quantity: `lower` and `upper` are one period.
    #[serde(default)]
    pub periodic: bool,
}

/// A nuisance parameter's start and bounds.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RangeSpec {
    /// Start value.
    pub start: f64,
    /// Lower bound.
    pub lower: f64,
    /// Upper bound.
    pub upper: f64,
}

/// Nuisance parameters beyond the profiled scales.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, Default)]
#[serde(deny_unknown_fields)]
pub struct NuisanceSpec {
    /// Factor multiplying every colour's intensity in every dataset (a shared calibration).
    /// Free parameter named `intensity_calibration`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub intensity_calibration: Option<RangeSpec>,
    /// A constant background added to the model line yields of each dataset, as a fraction of
    /// that dataset's mean model yield (so that the scale still factors out). Free parameters
    /// named `background[LABEL]`, one per dataset.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub background: Option<RangeSpec>,
}

/// Fitter settings.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FitterSpec {
    /// Residuals (default log).
    #[serde(default)]
    pub residuals: ResidualMode,
    /// Number of starts: the given start, then Halton points inside the bounds (default 1).
    #[serde(default = "default_starts")]
    pub starts: usize,
    /// Distinct minima within this Δχ² of the best are reported (default 4).
    #[serde(default = "default_delta")]
    pub minima_delta_chi2: f64,
    /// Addresses (or nuisance names) of parameters that get profile-likelihood intervals.
    #[serde(default)]
    pub profile: Vec<String>,
    /// Iteration limit per start (default 100).
    #[serde(default = "default_iterations")]
    pub max_iterations: u64,
    /// Jacobian differences (default forward: one model evaluation per parameter).
    #[serde(default = "default_differences")]
    pub differences: Differences,
}

fn default_starts() -> usize {
    1
}
fn default_delta() -> f64 {
    4.0
}
fn default_iterations() -> u64 {
    100
}
fn default_differences() -> Differences {
    Differences::Forward
}

impl Default for FitterSpec {
    fn default() -> Self {
        FitterSpec {
            residuals: ResidualMode::Log,
            starts: default_starts(),
            minima_delta_chi2: default_delta(),
            profile: Vec::new(),
            max_iterations: default_iterations(),
            differences: default_differences(),
        }
    }
}

/// A fit file.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FitSpec {
    /// What the fit is for.
    #[serde(default)]
    pub description: String,
    /// The target (path or inline).
    pub target: Document<TargetSpec>,
    /// The laser (path or inline).
    pub laser: Document<LaserSpec>,
    /// Reserved for the detection layer; must be absent.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub setup: Option<serde_json::Value>,
    /// The measured datasets.
    pub datasets: Vec<DatasetSpec>,
    /// The free model parameters.
    pub parameters: Vec<ParameterSpec>,
    /// Nuisance parameters.
    #[serde(default)]
    pub nuisance: NuisanceSpec,
    /// Fitter settings.
    #[serde(default)]
    pub fitter: FitterSpec,
}

impl FitSpec {
    /// Reads a fit file's text; errors name the key (serde's message with line and column).
    pub fn from_json(text: &str) -> Result<FitSpec, super::FitError> {
        serde_json::from_str(text).map_err(|e| super::FitError::Setup(e.to_string()))
    }
}
