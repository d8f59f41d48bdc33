//! Focal-volume densities `|dV/dI|`: how much of the medium sees each intensity.
//!
//! Intensities are relative to the beam's peak, `x = I/I₀ ∈ (0, 1]`, so the densities below are
//! `|dV/dx| = I₀ |dV/dI|` (bohr³). Derivations (physics notes §6.1, derived and checked
//! numerically there; the unbounded-volume formula is the one used by S. Augst et al.,
//! JOSA B 8, 858 (1991), from memory): in the plane `z` the area where `I > x I₀` is the disc
//! `r² < (w(z)²/2) ln(x_z/x)` with `x_z = 1/(1 + z²/z_R²)` the on-axis value there, so
//!
//! ```text
//! dA/dx = π w(z)² / (2x)                       (0 < x ≤ x_z; zero above)
//! thin slab of thickness L at z:  |dV/dx| = L π w(z)² / (2x)
//! slab [z₁, z₂]:                  |dV/dx| = π w₀²/(2x) [z + z³/(3 z_R²)] over [z₁, z₂] ∩ [−z_R β, z_R β]
//! unbounded:                      |dV/dx| = (π w₀² z_R / 3) (1 + 2x) sqrt(1 − x) / x^{5/2}
//! ```
//!
//! with `β = sqrt(1/x − 1)`; the last is the slab over all z (the two agree: tests). The volume
//! above `x` of the unbounded medium is `V(x) = π w₀² z_R [4β/3 + 2β³/9 − (4/3) arctan β]`.

use super::beam::GaussianBeam;
use crate::error::{Error, Result, require_finite, require_positive};

/// Where the emitters are, along the beam axis (transversely unbounded).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Medium {
    /// A uniform medium filling all space.
    Unbounded,
    /// A slab whose thickness is small against `z_R` (the intensity does not change across it),
    /// centred at `position` (bohr; `> 0` after the focus).
    ThinSlab {
        /// Centre (bohr).
        position: f64,
        /// Thickness (bohr).
        thickness: f64,
    },
    /// A slab from `start` to `end` (bohr) along the axis (a gas jet or cell of uniform density).
    Slab {
        /// Upstream edge (bohr).
        start: f64,
        /// Downstream edge (bohr), `> start`.
        end: f64,
    },
}

impl Medium {
    /// A slab of `length` centred at `position` (bohr).
    ///
    /// # Errors
    /// Non-finite position, non-positive length.
    pub fn slab(position: f64, length: f64) -> Result<Medium> {
        let p = require_finite("medium position", position)?;
        let l = require_positive("medium length", length)?;
        Ok(Medium::Slab {
            start: p - 0.5 * l,
            end: p + 0.5 * l,
        })
    }

    /// Checks the geometry.
    ///
    /// # Errors
    /// Non-finite values, non-positive thickness, `end ≤ start`.
    pub fn validate(&self) -> Result<()> {
        match *self {
            Medium::Unbounded => Ok(()),
            Medium::ThinSlab {
                position,
                thickness,
            } => {
                require_finite("medium position", position)?;
                require_positive("medium thickness", thickness)?;
                Ok(())
            }
            Medium::Slab { start, end } => {
                require_finite("medium start", start)?;
                require_finite("medium end", end)?;
                if end <= start {
                    return Err(Error::invalid(
                        "medium end",
                        end,
                        "must lie after the start of the slab",
                    ));
                }
                Ok(())
            }
        }
    }

    /// The highest relative intensity in the medium (on axis, nearest the focus).
    pub fn peak(&self, beam: &GaussianBeam) -> f64 {
        match *self {
            Medium::Unbounded => 1.0,
            Medium::ThinSlab { position, .. } => beam.on_axis(position),
            Medium::Slab { start, end } => {
                if start <= 0.0 && end >= 0.0 {
                    1.0
                } else {
                    beam.on_axis(start).max(beam.on_axis(end))
                }
            }
        }
    }

    /// The lowest on-axis relative intensity in the medium (0 for the unbounded medium).
    pub fn axis_low(&self, beam: &GaussianBeam) -> f64 {
        match *self {
            Medium::Unbounded => 0.0,
            Medium::ThinSlab { position, .. } => beam.on_axis(position),
            Medium::Slab { start, end } => beam.on_axis(start).min(beam.on_axis(end)),
        }
    }

    /// `|dV/dx|` at relative intensity `x` (bohr³ per unit relative intensity); zero outside
    /// `(0, peak]`.
    pub fn density(&self, beam: &GaussianBeam, x: f64) -> f64 {
        if !(x > 0.0 && x <= 1.0) {
            return 0.0;
        }
        let (w0, zr) = (beam.waist(), beam.rayleigh());
        let pi = std::f64::consts::PI;
        match *self {
            Medium::Unbounded => {
                pi * w0 * w0 * zr / 3.0 * (1.0 + 2.0 * x) * (1.0 - x).sqrt() / x.powf(2.5)
            }
            Medium::ThinSlab {
                position,
                thickness,
            } => {
                if x > beam.on_axis(position) {
                    0.0
                } else {
                    thickness * pi * beam.width_squared(position) / (2.0 * x)
                }
            }
            Medium::Slab { start, end } => {
                let reach = beam.axial_reach(x);
                let (a, b) = (start.max(-reach), end.min(reach));
                if b <= a {
                    return 0.0;
                }
                let g = |z: f64| z + z * z * z / (3.0 * zr * zr);
                pi * w0 * w0 / (2.0 * x) * (g(b) - g(a))
            }
        }
    }

    /// The volume of the unbounded medium above relative intensity `x`,
    /// `π w₀² z_R [4β/3 + 2β³/9 − (4/3) arctan β]`, `β = sqrt(1/x − 1)` (bohr³).
    pub fn unbounded_volume_above(beam: &GaussianBeam, x: f64) -> f64 {
        let b = (1.0 / x - 1.0).max(0.0).sqrt();
        std::f64::consts::PI
            * beam.waist()
            * beam.waist()
            * beam.rayleigh()
            * (4.0 * b / 3.0 + 2.0 * b * b * b / 9.0 - 4.0 / 3.0 * b.atan())
    }
}
