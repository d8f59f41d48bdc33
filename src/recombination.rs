//! Recombination vectors `d_m^rec`: the dipole matrix element through which the returning
//! electron recombines into channel `m` and emits.
//!
//! The harmonic amplitude uses `d̄(k) ≡ [d(k*)]*`, the analytic continuation of the complex
//! conjugate of `d(k) = ⟨k|r|ψ⟩` (physics notes §0), evaluated at the complex return momentum
//! `v_r`; on real `k` it is the ordinary `d(k)*`. Every model works in the molecular frame: the
//! caller passes `v_mol = Rᵀ v_lab` and rotates the result back with `R`.

use std::sync::Arc;

use num_complex::Complex64;
use serde::{Deserialize, Serialize};

use crate::error::{Error, Result, require_positive};
use crate::field::{CVec3, bdot};
use crate::ionization::{interpolate_angle, validate_angle_table};
use crate::orbital::{
    Orbital, OrbitalError, PlaneWaveProjection, gaussian_s_dipole, hydrogenic_dipole,
};

/// `d̄(k) = [d(k*)]*` for a dipole function `d` with real coefficients. The 1s dipole has its
/// only pole at `k·k = −2Ip`, which a return saddle (`k·k = 2(Ω − Ip)`) reaches only at Ω = 0;
/// should it ever be hit the value is NaN and the spectrum point is reported as non-finite.
fn conjugate_continuation(
    d: impl Fn(&CVec3) -> std::result::Result<CVec3, OrbitalError>,
    k: &CVec3,
) -> CVec3 {
    d(&k.map(|c| c.conj())).map_or(
        CVec3::from_element(Complex64::new(f64::NAN, f64::NAN)),
        |v| v.map(|c| c.conj()),
    )
}

/// Form of the LCAO dipole matrix element.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize, Serialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum DipoleForm {
    /// `⟨ψ|r|k⟩` (length form, the strong-field approximation's own; origin-dependent).
    #[default]
    Length,
    /// `⟨ψ|p̂|k⟩ = k ψ̃*(k)` (velocity form; the two-centre interference factor separates
    /// exactly, M. Lein et al., PRL 88, 183903 (2002)).
    Velocity,
}

/// Which momentum the recombination dipole is evaluated at.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize, Serialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum ReturnMomentum {
    /// The saddle's return momentum, `k²/2 = Ω − Ip` (energy conservation of the SFA).
    #[default]
    Saddle,
    /// `k²/2 = Ω` along the saddle's direction: the electron's kinetic energy taken equal to
    /// the photon energy, the choice that matched TDSE interference minima best in Lein et al.
    /// (2002) (from memory; physics notes §5.1).
    Photon,
}

/// Recombination model of one channel.
#[derive(Clone, Debug)]
pub enum RecombinationModel {
    /// Hydrogen-like 1s state with the channel's ionization potential.
    Hydrogenic {
        /// Ionization potential defining α = 2 Ip (a.u.).
        ip: f64,
    },
    /// Normalised s-Gaussian of exponent `a` (a.u.) at the origin.
    Gaussian {
        /// Gaussian exponent a (bohr⁻²).
        exponent: f64,
    },
    /// A fixed complex dipole vector (a.u., molecular frame), independent of the momentum.
    Constant {
        /// The vector `d̄` used as it is.
        vector: CVec3,
    },
    /// The channel's Dyson orbital (Cartesian Gaussians on the atoms): analytic transform, so
    /// two- and multi-centre interference comes out exactly.
    Lcao {
        /// The normalised orbital (molecular frame).
        orbital: Arc<Orbital>,
        /// Length or velocity form.
        form: DipoleForm,
        /// Saddle or photon-energy momentum.
        momentum: ReturnMomentum,
    },
    /// A complex dipole tabulated against photon energy and the angle θ between the return
    /// direction k̂ and the molecular z axis: components along k̂ and along the unit vector
    /// perpendicular to k̂ in the plane of k̂ and z (towards +z); bilinear interpolation.
    Table {
        /// Photon energies (a.u.), strictly increasing.
        energies: Vec<f64>,
        /// Angles θ (rad) from 0 to π, strictly increasing.
        angles: Vec<f64>,
        /// Component along k̂, row-major `[energy][angle]`.
        parallel: Vec<Complex64>,
        /// Perpendicular component, row-major `[energy][angle]`.
        perpendicular: Vec<Complex64>,
    },
}

impl RecombinationModel {
    /// Checks the model's parameters; `key` names it in messages.
    pub fn validate(&self, key: &str) -> Result<()> {
        match self {
            RecombinationModel::Hydrogenic { ip } => {
                require_positive(&format!("{key}.ip"), *ip)?;
            }
            RecombinationModel::Gaussian { exponent } => {
                require_positive(&format!("{key}.exponent_au"), *exponent)?;
            }
            RecombinationModel::Constant { vector } => {
                if vector.iter().any(|c| !c.is_finite()) {
                    return Err(Error::invalid(
                        &format!("{key}.dipole_au"),
                        format!("{vector:?}"),
                        "must be finite",
                    ));
                }
            }
            RecombinationModel::Lcao { .. } => {}
            RecombinationModel::Table {
                energies,
                angles,
                parallel,
                perpendicular,
            } => {
                validate_angle_table(&format!("{key}.theta"), angles, angles.len())?;
                if energies.len() < 2
                    || energies.windows(2).any(|w| w[1] <= w[0])
                    || energies.iter().any(|e| !e.is_finite())
                {
                    return Err(Error::invalid(
                        &format!("{key}.energy_ev"),
                        energies.len(),
                        "needs at least two strictly increasing energies",
                    ));
                }
                let n = energies.len() * angles.len();
                for (name, v) in [
                    ("parallel_au", parallel),
                    ("perpendicular_au", perpendicular),
                ] {
                    if v.len() != n {
                        return Err(Error::invalid(
                            &format!("{key}.{name}"),
                            v.len(),
                            &format!(
                                "needs {} rows of {} values (energies × angles)",
                                energies.len(),
                                angles.len()
                            ),
                        ));
                    }
                    if v.iter().any(|c| !c.is_finite()) {
                        return Err(Error::invalid(
                            &format!("{key}.{name}"),
                            "non-finite entry",
                            "must be finite",
                        ));
                    }
                }
            }
        }
        Ok(())
    }

    /// Whether the vector rotates rigidly with the molecule's orientation only trivially
    /// (isotropic models: the dipole is a function of k alone, parallel to it).
    pub fn is_isotropic(&self) -> bool {
        matches!(
            self,
            RecombinationModel::Hydrogenic { .. } | RecombinationModel::Gaussian { .. }
        )
    }

    /// Photon-energy range (a.u.) a tabulated model covers.
    pub fn energy_range(&self) -> Option<(f64, f64)> {
        match self {
            RecombinationModel::Table { energies, .. } => {
                Some((energies[0], energies[energies.len() - 1]))
            }
            _ => None,
        }
    }

    /// `d̄(v_r)` (molecular frame) at a return saddle with kinetic momentum `v_ret` (molecular
    /// frame) and photon energy `omega`.
    #[inline]
    pub fn vector(&self, v_ret: &CVec3, omega: f64) -> CVec3 {
        match self {
            RecombinationModel::Hydrogenic { ip } => {
                conjugate_continuation(|k| hydrogenic_dipole(k, *ip), v_ret)
            }
            RecombinationModel::Gaussian { exponent } => {
                conjugate_continuation(|k| gaussian_s_dipole(k, *exponent), v_ret)
            }
            RecombinationModel::Constant { vector } => *vector,
            RecombinationModel::Lcao {
                orbital,
                form,
                momentum,
            } => {
                let k = match momentum {
                    ReturnMomentum::Saddle => *v_ret,
                    ReturnMomentum::Photon => {
                        let k2 = bdot(v_ret, v_ret);
                        v_ret * crate::cmath::sqrt(Complex64::new(2.0 * omega, 0.0) / k2)
                    }
                };
                match form {
                    DipoleForm::Length => orbital.dipole_length_recombination(&k),
                    DipoleForm::Velocity => orbital.dipole_velocity_recombination(&k),
                }
            }
            RecombinationModel::Table {
                energies,
                angles,
                parallel,
                perpendicular,
            } => {
                let k = v_ret.map(|c| c.re);
                let n = k.norm();
                if n == 0.0 {
                    return CVec3::from_element(Complex64::new(f64::NAN, f64::NAN));
                }
                let khat = k / n;
                let theta = khat.z.clamp(-1.0, 1.0).acos();
                // Unit vector ⟂ k̂ in the (k̂, z) plane, towards +z; x when k̂ ∥ z.
                let z = nalgebra::Vector3::z();
                let mut perp = z - khat * khat.z;
                if perp.norm() < 1e-12 {
                    perp = nalgebra::Vector3::x();
                }
                let perp = perp.normalize();
                let e = omega.clamp(energies[0], energies[energies.len() - 1]);
                let j = energies
                    .partition_point(|&x| x < e)
                    .clamp(1, energies.len() - 1);
                let w = (e - energies[j - 1]) / (energies[j] - energies[j - 1]);
                let na = angles.len();
                let row = |v: &[Complex64], r: usize| {
                    interpolate_angle(angles, &v[r * na..(r + 1) * na], theta)
                };
                let par = row(parallel, j - 1) * (1.0 - w) + row(parallel, j) * w;
                let per = row(perpendicular, j - 1) * (1.0 - w) + row(perpendicular, j) * w;
                khat.map(|x| par * x) + perp.map(|x| per * x)
            }
        }
    }
}
