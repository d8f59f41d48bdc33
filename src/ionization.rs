//! Ionization amplitudes `a_n^ion`: the factor of the harmonic amplitude that describes how the
//! electron leaves channel `n` at the complex ionization time.
//!
//! Every model is evaluated in the molecular frame: the caller rotates the lab vectors with
//! `v_mol = Rᵀ v_lab`. In the plane-wave strong-field approximation the factor is
//! `E(t_i)·d_n(v_i)` with `d_n(k) = ⟨k|r|ψ_n⟩` (M. Lewenstein et al., PRA 49, 2117 (1994)); it
//! multiplies the continuum kernel of [`crate::dipole`]. The saddle sits where `v_i² = −2 Ip_n`,
//! so the matrix element is needed at a complex momentum: only orbitals whose transform is
//! entire (Gaussians) may be evaluated there (physics notes §1.5, "singular prefactor warning");
//! for orbitals with the correct Coulomb tail the `asymptotic` model replaces the factor.

use std::sync::Arc;

use nalgebra::Vector3;
use num_complex::Complex64;

use crate::error::{Error, Result, require_positive};
use crate::field::{CVec3, bdot};
use crate::orbital::{Orbital, PlaneWaveProjection, gaussian_s_dipole};
use crate::tunnelling::AsymptoticOrbital;

/// Ionization model of one channel.
#[derive(Clone, Debug)]
pub enum IonizationModel {
    /// A fixed complex amplitude replacing `E(t_i)·d(v_i)` (what-if studies and fits).
    Constant {
        /// The amplitude (a.u.).
        amplitude: Complex64,
    },
    /// Plane-wave SFA with a normalised s-Gaussian at the origin, exponent `a` (a.u.).
    Gaussian {
        /// Gaussian exponent a (bohr⁻²).
        exponent: f64,
    },
    /// Plane-wave SFA, length form, with the channel's Dyson orbital (Cartesian Gaussians):
    /// `E(t_i)·d(v_i)`.
    Orbital {
        /// The normalised Dyson orbital (molecular frame).
        orbital: Arc<Orbital>,
    },
    /// Molecular tunnelling theory (X. M. Tong, Z. X. Zhao, C. D. Lin, PRA 66, 033402 (2002))
    /// with the PPT/ADK Coulomb factor. The factor is the signed square root of the MO-ADK
    /// static-rate prefactor at the field strength `F = |E(Re t_i)|` of the exit time,
    ///
    /// ```text
    /// a_n = B_n(0; Ê) · κ^{1/2 − Z/κ} · (2κ³/F)^{Z/κ − 1/2},
    /// ```
    ///
    /// with `B(0; Ê)` the leading (m = 0) structure factor for the field direction Ê in the
    /// molecular frame (electron leaving along −Ê). The tunnelling exponent `e^{−2κ³/3F}` is
    /// not included: it comes from Im Φ of the complex action. The remaining factors of the
    /// continuum kernel are the same as for the other models, so relative yields between
    /// channels and orientations follow MO-ADK while the absolute scale is model-dependent.
    Asymptotic {
        /// Asymptotic coefficients, Ip and residual charge.
        orbital: AsymptoticOrbital,
    },
    /// A complex amplitude tabulated against the angle β between the molecular z axis and the
    /// field at the exit time (linear interpolation in β).
    Table {
        /// Angles β (rad), strictly increasing, covering [0, π].
        beta: Vec<f64>,
        /// Amplitudes at those angles.
        amplitude: Vec<Complex64>,
    },
}

impl IonizationModel {
    /// Checks the model's parameters; `key` names it in messages.
    pub fn validate(&self, key: &str) -> Result<()> {
        match self {
            IonizationModel::Constant { amplitude } => {
                if !amplitude.is_finite() {
                    return Err(Error::invalid(
                        &format!("{key}.amplitude"),
                        amplitude,
                        "must be finite",
                    ));
                }
            }
            IonizationModel::Gaussian { exponent } => {
                require_positive(&format!("{key}.exponent_au"), *exponent)?;
            }
            IonizationModel::Orbital { .. } | IonizationModel::Asymptotic { .. } => {}
            IonizationModel::Table { beta, amplitude } => {
                validate_angle_table(key, beta, amplitude.len())?;
                if amplitude.iter().any(|a| !a.is_finite()) {
                    return Err(Error::invalid(
                        &format!("{key}.amplitude"),
                        "non-finite entry",
                        "must be finite",
                    ));
                }
            }
        }
        Ok(())
    }

    /// Whether the factor is the same for every orientation of the molecule.
    pub fn is_isotropic(&self) -> bool {
        matches!(
            self,
            IonizationModel::Constant { .. } | IonizationModel::Gaussian { .. }
        )
    }

    /// The factor at an ionization saddle: kinetic momentum `v_ion` and field `e_ion` at the
    /// complex time, and the real field `e_exit` at `Re t_i`, all in the molecular frame.
    #[inline]
    pub fn factor(&self, v_ion: &CVec3, e_ion: &CVec3, e_exit: &Vector3<f64>) -> Complex64 {
        let nan = Complex64::new(f64::NAN, f64::NAN);
        match self {
            IonizationModel::Constant { amplitude } => *amplitude,
            // The exponent was validated positive, so the transform cannot fail.
            IonizationModel::Gaussian { exponent } => {
                gaussian_s_dipole(v_ion, *exponent).map_or(nan, |d| bdot(e_ion, &d))
            }
            IonizationModel::Orbital { orbital } => bdot(e_ion, &orbital.dipole_length(v_ion)),
            IonizationModel::Asymptotic { orbital } => {
                let f = e_exit.norm();
                match orbital.leading_amplitude_for_field(*e_exit) {
                    Ok(b) => b * asymptotic_radial(orbital.kappa(), orbital.charge(), f),
                    Err(_) => nan,
                }
            }
            IonizationModel::Table { beta, amplitude } => {
                let n = e_exit.norm();
                if n == 0.0 {
                    return nan;
                }
                let angle = (e_exit.z / n).clamp(-1.0, 1.0).acos();
                interpolate_angle(beta, amplitude, angle)
            }
        }
    }
}

impl IonizationModel {
    /// Orientation-dependent part of the factor in a field linearly polarised along ê.
    ///
    /// There `E(t_i) = e ê`, `v_i = ±iκ ê` exactly (`v_i² = −κ²`, both along ê) and
    /// `E(Re t_i) = ±F ê`, so every model factorises as
    /// `factor = linear_angular(Rᵀê, sign of Im(ê·v_i), sign of ê·E(Re t_i)) × linear_scalar(…)`
    /// with an orientation-independent scalar. The assembly evaluates the angular part once per
    /// channel, sign pair and orientation instead of once per saddle; `tests/multichannel.rs`
    /// checks it against [`IonizationModel::factor`].
    pub fn linear_angular(
        &self,
        axis_mol: &Vector3<f64>,
        v_sign: f64,
        e_sign: f64,
        kappa: f64,
    ) -> Complex64 {
        let axis = axis_mol.map(|x| Complex64::new(x, 0.0));
        match self {
            IonizationModel::Constant { amplitude } => *amplitude,
            IonizationModel::Gaussian { .. } | IonizationModel::Orbital { .. } => {
                // E = ê (unit scalar), v = ±iκ ê.
                let v = axis * Complex64::new(0.0, v_sign * kappa);
                self.factor(&v, &axis, axis_mol)
            }
            IonizationModel::Asymptotic { orbital } => orbital
                .leading_amplitude_for_field(axis_mol * e_sign)
                .unwrap_or(Complex64::new(f64::NAN, f64::NAN)),
            IonizationModel::Table { .. } => self.factor(&axis, &axis, &(axis_mol * e_sign)),
        }
    }

    /// Orientation-independent part of the factor in a linearly polarised field (see
    /// [`IonizationModel::linear_angular`]): `e = ê·E(t_i)` for the plane-wave models, the radial
    /// factor at `F = |E(Re t_i)|` for the asymptotic model, 1 otherwise.
    pub fn linear_scalar(&self, e_along: Complex64, exit_field: f64) -> Complex64 {
        match self {
            IonizationModel::Gaussian { .. } | IonizationModel::Orbital { .. } => e_along,
            IonizationModel::Asymptotic { orbital } => Complex64::new(
                asymptotic_radial(orbital.kappa(), orbital.charge(), exit_field),
                0.0,
            ),
            IonizationModel::Constant { .. } | IonizationModel::Table { .. } => {
                Complex64::new(1.0, 0.0)
            }
        }
    }
}

/// `κ^{1/2 − Z/κ} (2κ³/F)^{Z/κ − 1/2}`: the square root of the m = 0 radial factor of the
/// MO-ADK static rate without its exponential (Tong, Zhao, Lin 2002; physics notes §3.4).
pub fn asymptotic_radial(kappa: f64, charge: f64, field: f64) -> f64 {
    let n = charge / kappa;
    kappa.powf(0.5 - n) * (2.0 * kappa.powi(3) / field).powf(n - 0.5)
}

/// Checks a table over angles in [0, π] with `values` entries.
pub(crate) fn validate_angle_table(key: &str, beta: &[f64], values: usize) -> Result<()> {
    if beta.len() < 2 {
        return Err(Error::invalid(
            &format!("{key}.beta_deg"),
            beta.len(),
            "needs at least two angles",
        ));
    }
    if beta.len() != values {
        return Err(Error::invalid(
            &format!("{key}.beta_deg"),
            format!("{} angles for {values} values", beta.len()),
            "needs one value per angle",
        ));
    }
    if beta.windows(2).any(|w| w[1] <= w[0] || w[1].is_nan()) || beta.iter().any(|b| !b.is_finite())
    {
        return Err(Error::invalid(
            &format!("{key}.beta_deg"),
            "not strictly increasing",
            "angles must increase strictly",
        ));
    }
    let tol = 1e-9;
    if beta[0].abs() > tol || (beta[beta.len() - 1] - std::f64::consts::PI).abs() > tol {
        return Err(Error::invalid(
            &format!("{key}.beta_deg"),
            format!(
                "{}..{}",
                beta[0].to_degrees(),
                beta[beta.len() - 1].to_degrees()
            ),
            "must run from 0 to 180 degrees",
        ));
    }
    Ok(())
}

/// Linear interpolation of a complex table over angles.
pub(crate) fn interpolate_angle(beta: &[f64], values: &[Complex64], angle: f64) -> Complex64 {
    let n = beta.len();
    let k = beta.partition_point(|&b| b < angle).clamp(1, n - 1);
    let (b0, b1) = (beta[k - 1], beta[k]);
    let w = ((angle - b0) / (b1 - b0)).clamp(0.0, 1.0);
    values[k - 1] * (1.0 - w) + values[k] * w
}

/// Exponent of the single Gaussian closest (least squares) to a Slater 1s function of exponent
/// ζ: `a = 0.270950 ζ²` (STO-1G; W. J. Hehre, R. F. Stewart, J. A. Pople, J. Chem. Phys. 51,
/// 2657 (1969); value from memory). With `ζ = κ = sqrt(2 Ip)` it is the default Gaussian of a
/// channel of ionization potential `ip`.
pub fn sto1g_exponent(ip: f64) -> f64 {
    0.270_950 * 2.0 * ip
}
