//! The driving Gaussian beam (TEM₀₀) near its focus: intensity profile and Gouy phase.
//!
//! With waist `w₀` and Rayleigh length `z_R = π w₀²/λ` (textbook Gaussian-beam optics, e.g.
//! A. E. Siegman, *Lasers*, ch. 17, from memory):
//!
//! ```text
//! I(r, z) = I₀ / (1 + z²/z_R²) · exp(−2 r² / w(z)²),   w(z)² = w₀² (1 + z²/z_R²)
//! E(r = 0, z, t) ∝ Re exp(i (k z − ψ(z)) − i ω t),      ψ(z) = arctan(z / z_R)   (Gouy phase)
//! ```
//!
//! `z > 0` is after the focus (downstream). A beam focused at f-number `N = f/D` (D the 1/e²
//! intensity diameter on the lens) has `w₀ = 2 λ N / π` (same source). Lengths are in bohr.

use crate::error::{Error, Result, require_positive};

/// Speed of light in atomic units, `1/α` (CODATA 2018: α = 7.2973525693e−3).
pub const SPEED_OF_LIGHT_AU: f64 = 137.035_999_084;

/// A Gaussian beam near its focus (lengths in bohr).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct GaussianBeam {
    waist: f64,
    rayleigh: f64,
}

impl GaussianBeam {
    /// A beam of waist `w₀` and Rayleigh length `z_R` (bohr), given independently (the waist
    /// only scales volumes; the Rayleigh length sets the longitudinal profile).
    ///
    /// # Errors
    /// Non-positive or non-finite lengths.
    pub fn new(waist: f64, rayleigh: f64) -> Result<Self> {
        Ok(GaussianBeam {
            waist: require_positive("beam waist", waist)?,
            rayleigh: require_positive("Rayleigh length", rayleigh)?,
        })
    }

    /// The diffraction-limited beam of waist `w₀` (bohr) at angular frequency `ω` (a.u.):
    /// `z_R = π w₀²/λ`, `λ = 2πc/ω`.
    ///
    /// # Errors
    /// Non-positive inputs.
    pub fn from_waist(waist: f64, omega: f64) -> Result<Self> {
        let w = require_positive("beam waist", waist)?;
        let lambda = wavelength(omega)?;
        Self::new(w, std::f64::consts::PI * w * w / lambda)
    }

    /// The diffraction-limited beam of Rayleigh length `z_R` (bohr): `w₀ = sqrt(z_R λ / π)`.
    ///
    /// # Errors
    /// Non-positive inputs.
    pub fn from_rayleigh(rayleigh: f64, omega: f64) -> Result<Self> {
        let z = require_positive("Rayleigh length", rayleigh)?;
        let lambda = wavelength(omega)?;
        Self::new((z * lambda / std::f64::consts::PI).sqrt(), z)
    }

    /// The beam focused at f-number `N`: `w₀ = 2 λ N / π`.
    ///
    /// # Errors
    /// Non-positive inputs.
    pub fn from_f_number(f_number: f64, omega: f64) -> Result<Self> {
        let n = require_positive("f-number", f_number)?;
        let lambda = wavelength(omega)?;
        Self::from_waist(2.0 * lambda * n / std::f64::consts::PI, omega)
    }

    /// Waist `w₀` (bohr).
    pub fn waist(&self) -> f64 {
        self.waist
    }

    /// Rayleigh length `z_R` (bohr).
    pub fn rayleigh(&self) -> f64 {
        self.rayleigh
    }

    /// `w(z)²` (bohr²).
    pub fn width_squared(&self, z: f64) -> f64 {
        let u = z / self.rayleigh;
        self.waist * self.waist * (1.0 + u * u)
    }

    /// On-axis intensity relative to the peak, `1/(1 + z²/z_R²)`.
    pub fn on_axis(&self, z: f64) -> f64 {
        let u = z / self.rayleigh;
        1.0 / (1.0 + u * u)
    }

    /// Intensity relative to the peak at radius `r` and position `z`.
    pub fn relative_intensity(&self, r: f64, z: f64) -> f64 {
        self.on_axis(z) * (-2.0 * r * r / self.width_squared(z)).exp()
    }

    /// Gouy phase `ψ(z) = arctan(z/z_R)` (rad).
    pub fn gouy(&self, z: f64) -> f64 {
        (z / self.rayleigh).atan()
    }

    /// The position `|z|` (bohr) at which the on-axis intensity falls to `x·I₀` (`0 < x ≤ 1`):
    /// `z_R sqrt(1/x − 1)`.
    pub fn axial_reach(&self, x: f64) -> f64 {
        self.rayleigh * (1.0 / x - 1.0).max(0.0).sqrt()
    }
}

/// Vacuum wavelength `2πc/ω` (bohr).
fn wavelength(omega: f64) -> Result<f64> {
    let w = require_positive("driver angular frequency", omega)?;
    let l = 2.0 * std::f64::consts::PI * SPEED_OF_LIGHT_AU / w;
    if !l.is_finite() {
        return Err(Error::invalid("driver wavelength", l, "must be finite"));
    }
    Ok(l)
}
