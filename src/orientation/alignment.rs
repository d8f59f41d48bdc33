//! Alignment distributions `ρ(β)` of the molecular axis about the lab `z` axis, and their
//! description in target files.

use super::OrientationError;
use super::exp_cos2;
use super::monotone_cubic::MonotoneCubic;
use super::panel_quadrature::integrate_pair;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// Relative accuracy of the quadratures behind [`AlignmentDistribution::mean_cos2`] and the
/// normalisation of tables.
const QUADRATURE_TOLERANCE: f64 = 1e-14;

/// Largest accepted exponent `n` of `cos^{2n} β`.
const MAX_POWER_N: f64 = 1e300;

/// An axially symmetric distribution `ρ(β)` of the molecular `z` axis, `β` being its angle to the
/// lab `z` axis (the polarisation of the aligning pulse), normalised on the unit sphere:
/// `∫ ρ dΩ = 2π ∫_0^π ρ(β) sin β dβ = 1` (physics notes §6.2).
///
/// Models:
/// - isotropic, `ρ = 1/(4π)`, `⟨cos²β⟩ = 1/3`;
/// - `cos2n`: `ρ ∝ cos^{2n} β`, real `n ≥ 0`, `⟨cos²β⟩ = (2n+1)/(2n+3)` (notes §6.2, derived:
///   `∫_0^1 x^{2n+2} dx / ∫_0^1 x^{2n} dx`);
/// - `exp_cos2`: `ρ ∝ exp(a cos²β)`, real `a`, every `⟨cos²β⟩ ∈ (0, 1)` (see
///   [`crate::orientation::exp_cos2_mean_cos2`]); `a < 0` favours the plane perpendicular to
///   the polarisation;
/// - `table`: values on `β` nodes from 0° to 180°, interpolated by monotone piecewise-cubic
///   Hermite interpolation (PCHIP, Fritsch–Carlson/Fritsch–Butland, as SciPy's
///   `PchipInterpolator`), which keeps non-negative data non-negative, and normalised by
///   quadrature.
#[derive(Debug, Clone, PartialEq)]
pub struct AlignmentDistribution {
    model: Model,
}

#[derive(Debug, Clone, PartialEq)]
enum Model {
    Isotropic,
    Cos2n {
        power_n: f64,
    },
    ExpCos2 {
        strength: f64,
        /// `∫_0^1 g dx` for the scaled density `g` of `exp_cos2::scaled_density`.
        scaled_partition: f64,
    },
    Table {
        interpolant: MonotoneCubic,
        /// `2π ∫_0^π ρ_table(β) sin β dβ`.
        sphere_integral: f64,
    },
}

impl AlignmentDistribution {
    /// The isotropic distribution, `ρ = 1/(4π)`.
    #[must_use]
    pub fn isotropic() -> Self {
        Self {
            model: Model::Isotropic,
        }
    }

    /// `ρ(β) = (2n+1)/(4π) · cos^{2n} β`, `n ≥ 0` real (`n = 0` is isotropic).
    ///
    /// # Errors
    /// [`OrientationError::InvalidParameter`] (key `power_n`) unless `0 ≤ n ≤ 1e300` (beyond that
    /// `2n + 1` approaches the largest double; such a distribution is a delta function anyway).
    pub fn cos2n(power_n: f64) -> Result<Self, OrientationError> {
        if !(0.0..=MAX_POWER_N).contains(&power_n) {
            return Err(OrientationError::InvalidParameter {
                key: "power_n",
                value: power_n,
                reason: "must be a number from 0 to 1e300",
            });
        }
        Ok(Self {
            model: Model::Cos2n { power_n },
        })
    }

    /// `ρ(β) ∝ exp(a cos²β)` with strength `a` (any finite real; `a = 0` is isotropic).
    ///
    /// # Errors
    /// [`OrientationError::InvalidParameter`] (key `strength`) for non-finite `a`.
    pub fn exp_cos2(strength: f64) -> Result<Self, OrientationError> {
        if !strength.is_finite() {
            return Err(OrientationError::InvalidParameter {
                key: "strength",
                value: strength,
                reason: "must be a finite number",
            });
        }
        let moments = exp_cos2::moments(strength);
        Ok(Self {
            model: Model::ExpCos2 {
                strength,
                scaled_partition: moments.scaled_partition,
            },
        })
    }

    /// The `exp(a cos²β)` distribution with the given `⟨cos²β⟩`, `a` found by
    /// [`crate::orientation::exp_cos2_strength`].
    ///
    /// # Errors
    /// [`OrientationError::InvalidParameter`] (key `mean_cos2`) unless `0 < mean_cos2 < 1`.
    pub fn exp_cos2_from_mean_cos2(mean_cos2: f64) -> Result<Self, OrientationError> {
        Self::exp_cos2(exp_cos2::exp_cos2_strength(mean_cos2)?)
    }

    /// A tabulated density: `beta_deg` in degrees, strictly increasing from exactly 0 to exactly
    /// 180, and `density` values (any positive scale; they are normalised here).
    ///
    /// # Errors
    /// Typed errors naming the key (`beta_deg` or `density`), the index and the value for: length
    /// mismatch, fewer than 2 points, non-finite entries, angles not strictly increasing or not
    /// spanning `[0°, 180°]`, negative densities, all densities zero.
    pub fn table_from_degrees(beta_deg: &[f64], density: &[f64]) -> Result<Self, OrientationError> {
        if beta_deg.len() != density.len() {
            return Err(OrientationError::TableLengthMismatch {
                beta_len: beta_deg.len(),
                density_len: density.len(),
            });
        }
        if beta_deg.len() < 2 {
            return Err(OrientationError::TableTooShort {
                len: beta_deg.len(),
            });
        }
        for (index, &value) in beta_deg.iter().enumerate() {
            if !value.is_finite() {
                return Err(table_entry("beta_deg", index, value, "must be finite"));
            }
            if index > 0 && value <= beta_deg[index - 1] {
                return Err(table_entry(
                    "beta_deg",
                    index,
                    value,
                    "angles must be strictly increasing",
                ));
            }
        }
        let (first, last) = (beta_deg[0], beta_deg[beta_deg.len() - 1]);
        if first != 0.0 || last != 180.0 {
            return Err(OrientationError::TableRange { first, last });
        }
        for (index, &value) in density.iter().enumerate() {
            if !value.is_finite() {
                return Err(table_entry("density", index, value, "must be finite"));
            }
            if value < 0.0 {
                return Err(table_entry("density", index, value, "must be ≥ 0"));
            }
        }
        if density.iter().all(|&v| v == 0.0) {
            return Err(OrientationError::TableAllZero { len: density.len() });
        }
        let beta: Vec<f64> = beta_deg.iter().map(|d| d.to_radians()).collect();
        let mut breakpoints = beta.clone();
        // Exact end points, whatever to_radians rounded 180° to.
        breakpoints[0] = 0.0;
        let last_index = breakpoints.len() - 1;
        breakpoints[last_index] = PI;
        let interpolant = MonotoneCubic::new(beta, density.to_vec());
        let [integral, _] = integrate_pair(
            |b| [interpolant.value(b) * b.sin(), 0.0],
            &breakpoints,
            QUADRATURE_TOLERANCE,
        );
        Ok(Self {
            model: Model::Table {
                interpolant,
                sphere_integral: 2.0 * PI * integral,
            },
        })
    }

    /// The model in words, with its parameters (for the provenance of an output).
    #[must_use]
    pub fn describe(&self) -> String {
        match &self.model {
            Model::Isotropic => "isotropic".into(),
            Model::Cos2n { power_n } => format!("cos2n: rho ∝ cos^(2n) beta, n = {power_n}"),
            Model::ExpCos2 { strength, .. } => {
                format!("exp_cos2: rho ∝ exp(a cos² beta), a = {strength}")
            }
            Model::Table { interpolant, .. } => format!(
                "table: rho(beta) from {} tabulated angles, monotone cubic interpolation",
                interpolant.len()
            ),
        }
    }

    /// The normalised density `ρ(β)` (per steradian of the molecular-axis direction), for
    /// `β ∈ [0, π]` (rad). Analytic models accept any real `β` (they depend on `cos β`); a table
    /// holds its end values outside `[0, π]`. NaN gives NaN.
    #[must_use]
    pub fn density(&self, beta: f64) -> f64 {
        let four_pi = 4.0 * PI;
        match &self.model {
            Model::Isotropic => 1.0 / four_pi,
            Model::Cos2n { power_n } => {
                (2.0 * power_n + 1.0) / four_pi * self.relative_density(beta)
            }
            Model::ExpCos2 {
                scaled_partition, ..
            } => self.relative_density(beta) / (four_pi * scaled_partition),
            Model::Table {
                sphere_integral, ..
            } => self.relative_density(beta) / sphere_integral,
        }
    }

    /// `ρ(β)` up to a constant factor, scaled so that it cannot overflow (at most 1 for the
    /// analytic models, the tabulated values for a table). This is what the grid weights use.
    #[must_use]
    pub fn relative_density(&self, beta: f64) -> f64 {
        match &self.model {
            Model::Isotropic => {
                if beta.is_nan() {
                    f64::NAN
                } else {
                    1.0
                }
            }
            Model::Cos2n { power_n } => {
                let c = beta.cos();
                (c * c).powf(*power_n)
            }
            Model::ExpCos2 { strength, .. } => {
                let (s, c) = beta.sin_cos();
                exp_cos2::scaled_density(*strength, c, s)
            }
            Model::Table { interpolant, .. } => interpolant.value(beta),
        }
    }

    /// `⟨cos²β⟩ = ∫ ρ cos²β dΩ`, computed by adaptive Gauss–Legendre quadrature (relative accuracy
    /// `1e-14`) of the density itself — independent of the closed forms.
    ///
    /// Analytic models are even in `x = cos β` and are integrated over `x ∈ [0, 1]`. Sharp ones
    /// are integrated in a stretched variable with panels doubling in width away from the peak,
    /// so that any width is resolved without underflow: `x = 1 − s/N` with `N = 2n + 1` for
    /// `cos^{2n}` and `N = a` for `exp(a cos²β)`, `a > 1` (peak at `β = 0, π`); `x = t/√|a|` for
    /// `a < −1` (peak at `β = π/2`). A table is integrated in `β` with its nodes as panel ends.
    #[must_use]
    pub fn mean_cos2(&self) -> f64 {
        match &self.model {
            Model::Isotropic => {
                let [norm, moment] =
                    integrate_pair(|x| [1.0, x * x], &[0.0, 1.0], QUADRATURE_TOLERANCE);
                moment / norm
            }
            Model::Cos2n { power_n } => {
                let n = *power_n;
                let scale = 2.0 * n + 1.0;
                // x^{2n} = exp(2n ln(1 − s/N)); n = 0 is the constant 1 (also at x = 0).
                peaked_at_one(scale, |s| {
                    if n == 0.0 {
                        1.0
                    } else {
                        (2.0 * n * (-s / scale).ln_1p()).exp()
                    }
                })
            }
            Model::ExpCos2 { strength, .. } => {
                let a = *strength;
                if a > 1.0 {
                    // a (1 − x²) = s (2 − s/a)
                    peaked_at_one(a, |s| (-s * (2.0 - s / a)).exp())
                } else if a < -1.0 {
                    let b = -a;
                    let root = b.sqrt();
                    let [norm, moment] = integrate_pair(
                        |t| {
                            let g = (-t * t).exp();
                            [g, g * t * t]
                        },
                        &doubling_panels(root),
                        QUADRATURE_TOLERANCE,
                    );
                    moment / norm / b
                } else {
                    let [norm, moment] = integrate_pair(
                        |x| {
                            let g = exp_cos2::scaled_density(a, x, (1.0 - x * x).sqrt());
                            [g, g * x * x]
                        },
                        &[0.0, 1.0],
                        QUADRATURE_TOLERANCE,
                    );
                    moment / norm
                }
            }
            Model::Table { interpolant, .. } => {
                let mut breakpoints = interpolant.nodes().to_vec();
                breakpoints[0] = 0.0;
                let last = breakpoints.len() - 1;
                breakpoints[last] = PI;
                let [norm, moment] = integrate_pair(
                    |b| {
                        let (s, c) = b.sin_cos();
                        let g = interpolant.value(b) * s;
                        [g, g * c * c]
                    },
                    &breakpoints,
                    QUADRATURE_TOLERANCE,
                );
                moment / norm
            }
        }
    }

    /// The strength `a` if this is an `exp_cos2` distribution.
    #[must_use]
    pub fn exp_cos2_strength(&self) -> Option<f64> {
        match &self.model {
            Model::ExpCos2 { strength, .. } => Some(*strength),
            _ => None,
        }
    }
}

fn table_entry(
    key: &'static str,
    index: usize,
    value: f64,
    reason: &'static str,
) -> OrientationError {
    OrientationError::TableEntry {
        key,
        index,
        value,
        reason,
    }
}

/// `⟨x²⟩` for a density `g(x)` on `[0, 1]` peaked at `x = 1` with width `~1/scale`, written in
/// `s = scale · (1 − x) ∈ [0, scale]` (the Jacobian cancels in the ratio).
fn peaked_at_one(scale: f64, g_of_s: impl Fn(f64) -> f64) -> f64 {
    let [norm, moment] = integrate_pair(
        |s| {
            let g = g_of_s(s);
            let x = 1.0 - s / scale;
            [g, g * x * x]
        },
        &doubling_panels(scale),
        QUADRATURE_TOLERANCE,
    );
    moment / norm
}

/// Panel ends `0, 1, 2, 4, 8, …, end` (just `0, end` for `end ≤ 1`).
fn doubling_panels(end: f64) -> Vec<f64> {
    let mut points = vec![0.0];
    let mut next = 1.0;
    while next < end {
        points.push(next);
        next *= 2.0;
    }
    points.push(end);
    points
}

/// Description of an alignment distribution as written in a target file (JSON), selected by the
/// key `model`. Unknown keys are rejected, and the error names them.
///
/// ```json
/// {"model": "isotropic"}
/// {"model": "cos2n", "power_n": 1}
/// {"model": "exp_cos2", "mean_cos2": 0.6}
/// {"model": "table", "beta_deg": [0, 45, 90, 135, 180], "density": [1, 0.6, 0.2, 0.6, 1]}
/// ```
///
/// The isotropic variant is an empty struct variant on purpose: serde's internally tagged unit
/// variants accept unknown keys silently even under `deny_unknown_fields` (checked in the tests).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "model", deny_unknown_fields)]
pub enum AlignmentDescription {
    /// `{"model": "isotropic"}`: no alignment.
    #[serde(rename = "isotropic")]
    Isotropic {},
    /// `{"model": "cos2n", "power_n": n}`: `ρ ∝ cos^{2n} β`, `n ≥ 0` real.
    #[serde(rename = "cos2n")]
    Cos2n {
        /// The exponent `n` of `cos^{2n} β`.
        power_n: f64,
    },
    /// `{"model": "exp_cos2", "mean_cos2": m}`: `ρ ∝ exp(a cos²β)` with `⟨cos²β⟩ = m ∈ (0, 1)`.
    #[serde(rename = "exp_cos2")]
    ExpCos2 {
        /// Target `⟨cos²β⟩`.
        mean_cos2: f64,
    },
    /// `{"model": "table", "beta_deg": [...], "density": [...]}`: tabulated `ρ(β)`.
    #[serde(rename = "table")]
    Table {
        /// Angles in degrees, strictly increasing from 0 to 180.
        beta_deg: Vec<f64>,
        /// Density values (non-negative, any scale).
        density: Vec<f64>,
    },
}

impl Default for AlignmentDescription {
    fn default() -> Self {
        Self::Isotropic {}
    }
}

impl AlignmentDescription {
    /// Validates the description and builds the distribution.
    ///
    /// # Errors
    /// The errors of the corresponding [`AlignmentDistribution`] constructor.
    pub fn build(&self) -> Result<AlignmentDistribution, OrientationError> {
        match self {
            Self::Isotropic {} => Ok(AlignmentDistribution::isotropic()),
            Self::Cos2n { power_n } => AlignmentDistribution::cos2n(*power_n),
            Self::ExpCos2 { mean_cos2 } => {
                AlignmentDistribution::exp_cos2_from_mean_cos2(*mean_cos2)
            }
            Self::Table { beta_deg, density } => {
                AlignmentDistribution::table_from_degrees(beta_deg, density)
            }
        }
    }
}

impl TryFrom<&AlignmentDescription> for AlignmentDistribution {
    type Error = OrientationError;

    fn try_from(description: &AlignmentDescription) -> Result<Self, Self::Error> {
        description.build()
    }
}
