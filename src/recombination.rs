//! Recombination vectors `d_m^rec`: the dipole matrix element through which the returning
//! electron recombines into channel `m` and emits.
//!
//! The harmonic amplitude uses `d̄(k) ≡ [d(k*)]*`, the analytic continuation of the complex
//! conjugate of `d(k) = ⟨k|r|ψ⟩` (physics notes §0), evaluated at the complex return momentum
//! `v_r`; on real `k` it is the ordinary `d(k)*`.

use num_complex::Complex64;

use crate::error::{Error, Result, require_positive};
use crate::field::CVec3;
use crate::orbital::{OrbitalError, gaussian_s_dipole, hydrogenic_dipole};

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

/// Recombination model of one channel.
#[derive(Clone, Debug, PartialEq)]
pub enum RecombinationModel {
    /// Hydrogen-like 1s state with the channel's ionization potential.
    Hydrogenic {
        /// Ionization potential defining α = 2 Ip (a.u.).
        ip: f64,
    },
    /// Normalised s-Gaussian of exponent `a` (a.u.).
    Gaussian {
        /// Gaussian exponent a (bohr⁻²).
        exponent: f64,
    },
    /// A fixed complex dipole vector (a.u.), independent of the momentum.
    Constant {
        /// The vector `d̄` used as it is.
        vector: CVec3,
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
        }
        Ok(())
    }

    /// `d̄(v_r)` at a return saddle with kinetic momentum `v_ret`.
    #[inline]
    pub fn vector(&self, v_ret: &CVec3) -> CVec3 {
        match self {
            RecombinationModel::Hydrogenic { ip } => {
                conjugate_continuation(|k| hydrogenic_dipole(k, *ip), v_ret)
            }
            RecombinationModel::Gaussian { exponent } => {
                conjugate_continuation(|k| gaussian_s_dipole(k, *exponent), v_ret)
            }
            RecombinationModel::Constant { vector } => *vector,
        }
    }
}
