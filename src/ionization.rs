//! Ionization amplitudes `a_n^ion`: the factor of the harmonic amplitude that describes how the
//! electron leaves channel `n` at the complex ionization time.
//!
//! In the plane-wave strong-field approximation the factor is `E(t_i)·d_n(v_i)` with
//! `d_n(k) = ⟨k|r|ψ_n⟩` (M. Lewenstein et al., PRA 49, 2117 (1994)); it multiplies the continuum
//! kernel of [`crate::dipole`]. The saddle sits where `v_i² = −2 Ip_n`, so the matrix element is
//! needed at a complex momentum: only orbitals whose transform is entire (Gaussians) may be
//! evaluated there (physics notes §1.5, "singular prefactor warning").

use num_complex::Complex64;

use crate::error::{Error, Result, require_positive};
use crate::field::{CVec3, bdot};
use crate::orbital::gaussian_s_dipole;

/// Ionization model of one channel.
#[derive(Clone, Debug, PartialEq)]
pub enum IonizationModel {
    /// A fixed complex amplitude replacing `E(t_i)·d(v_i)` (what-if studies and fits).
    Constant {
        /// The amplitude (a.u.).
        amplitude: Complex64,
    },
    /// Plane-wave SFA with a normalised s-Gaussian orbital of exponent `a` (a.u.).
    Gaussian {
        /// Gaussian exponent a (bohr⁻²).
        exponent: f64,
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
        }
        Ok(())
    }

    /// The factor at an ionization saddle with kinetic momentum `v_ion` and field `e_ion`.
    #[inline]
    pub fn factor(&self, v_ion: &CVec3, e_ion: &CVec3) -> Complex64 {
        match self {
            IonizationModel::Constant { amplitude } => *amplitude,
            // The exponent was validated positive, so the transform cannot fail.
            IonizationModel::Gaussian { exponent } => gaussian_s_dipole(v_ion, *exponent)
                .map_or(Complex64::new(f64::NAN, f64::NAN), |d| bdot(e_ion, &d)),
        }
    }
}

/// Exponent of the single Gaussian closest (least squares) to a Slater 1s function of exponent
/// ζ: `a = 0.270950 ζ²` (STO-1G; W. J. Hehre, R. F. Stewart, J. A. Pople, J. Chem. Phys. 51,
/// 2657 (1969); value from memory). With `ζ = κ = sqrt(2 Ip)` it is the default Gaussian of a
/// channel of ionization potential `ip`.
pub fn sto1g_exponent(ip: f64) -> f64 {
    0.270_950 * 2.0 * ip
}
