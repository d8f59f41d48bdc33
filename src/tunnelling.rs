//! Tunnelling-ionization theory: the Keldysh/PPT exponent function, atomic ADK rates, and the
//! angular structure of molecular tunnelling (MO-ADK) with its Wigner rotation matrices.
//!
//! Everything is in atomic units. `Ip` is the ionization potential of the channel,
//! `κ = √(2 Ip)`, `Z` the charge of the residual ion (`Z_c`), `F > 0` a field strength.
//!
//! # Conventions
//! * Rotations are **active**: [`EulerZyz`] holds the angles of `R = Rz(α) Ry(β) Rz(γ)`, which
//!   maps a vector's components in the molecular frame to its components in the other frame
//!   (`v_lab = R v_mol`). Wigner matrices follow Edmonds / Sakurai:
//!   `D^l_{mm'}(α,β,γ) = ⟨lm| e^{−iαJz} e^{−iβJy} e^{−iγJz} |lm'⟩ = e^{−imα} d^l_{mm'}(β) e^{−im'γ}`,
//!   so that `Y_{lm'}(R⁻¹ r̂) = Σ_m Y_{lm}(r̂) D^l_{mm'}(R)` with Condon–Shortley spherical
//!   harmonics.
//! * Charge of the electron −1, interaction `+E·r` (physics notes §0): in a field `E` the
//!   electron leaves the ion along `−Ê`. The MO-ADK structure factor is evaluated in the *exit
//!   frame*, whose `+z` axis is that exit direction (see [`AsymptoticOrbital`]).
//!
//! # Example
//! ```
//! use holecast::tunnelling::{adk_static_rate, AsymptoticOrbital, AsymptoticTerm};
//! use nalgebra::Vector3;
//! use num_complex::Complex64;
//!
//! // Hydrogen 1s: ADK and MO-ADK (C_0 = 2) both give the Landau–Lifshitz rate 4/F e^{−2/(3F)}.
//! let field = 0.05;
//! let adk = adk_static_rate(0.5, 1.0, 0, 0, field).unwrap();
//! let h1s = AsymptoticOrbital::new(0.5, 1.0, vec![AsymptoticTerm::new(0, 0, Complex64::new(2.0, 0.0))]).unwrap();
//! let mo = h1s.static_rate_for_field(field, Vector3::z()).unwrap();
//! let exact = 4.0 / field * (-2.0 / (3.0 * field)).exp();
//! assert!((adk / exact - 1.0).abs() < 1e-14 && (mo / exact - 1.0).abs() < 1e-14);
//! ```

mod adk;
mod gamma_function;
mod keldysh;
mod molecular;
mod wigner;

pub use adk::{
    adk_angular_factor, adk_coefficient_squared, adk_cycle_averaged_rate, adk_static_rate,
    barrier_suppression_field, effective_principal_quantum_number, linear_cycle_average_factor,
};
pub use gamma_function::{gamma_function, ln_gamma_function};
pub use keldysh::{ppt_g, ppt_g_taylor_coefficient};
pub use molecular::{AsymptoticOrbital, AsymptoticTerm, StructureAmplitudes, mo_adk_q};
pub use wigner::{EulerZyz, wigner_big_d, wigner_small_d};

/// Largest orbital angular momentum `l` accepted by the functions of this module.
///
/// The explicit Wigner-d sum used here keeps its unitarity to ≈ 1e-13 up to this `l`
/// (measured ≤ 1.3e-13; ≤ 1e-14 for l ≤ 4), and all factorials involved are well inside the
/// `f64` range.
pub const MAX_ANGULAR_MOMENTUM: u32 = 12;

/// Invalid input to a tunnelling function. Every message names the parameter, its value and
/// the reason.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum TunnellingError {
    /// A real parameter out of its domain.
    #[error("invalid {name} = {value}: {reason}")]
    InvalidValue {
        /// Name of the parameter.
        name: &'static str,
        /// The rejected value.
        value: f64,
        /// Why it was rejected.
        reason: &'static str,
    },
    /// An angular-momentum pair `(l, m)` out of range.
    #[error("invalid angular momentum ({quantity}) l = {l}, m = {m}: {reason}")]
    InvalidQuantumNumbers {
        /// Which pair was rejected (`"l, m"`, `"l, m'"`, …).
        quantity: &'static str,
        /// Orbital angular momentum.
        l: u32,
        /// Projection.
        m: i32,
        /// Why it was rejected.
        reason: String,
    },
    /// A term of an asymptotic orbital expansion that cannot be used.
    #[error(
        "invalid asymptotic term {index} (l = {l}, m' = {m_prime}, C = {re} + {im}i): {reason}"
    )]
    InvalidTerm {
        /// Position of the term in the list given.
        index: usize,
        /// Its orbital angular momentum.
        l: u32,
        /// Its projection on the molecular axis.
        m_prime: i32,
        /// Real part of its coefficient.
        re: f64,
        /// Imaginary part of its coefficient.
        im: f64,
        /// Why it was rejected.
        reason: String,
    },
    /// An asymptotic orbital without any term.
    #[error("invalid asymptotic orbital: the list of (l, m', C) terms is empty")]
    EmptyOrbital,
    /// A direction vector that is zero or not finite.
    #[error("invalid {name} = ({x}, {y}, {z}): {reason}")]
    InvalidDirection {
        /// Name of the parameter.
        name: &'static str,
        /// x component.
        x: f64,
        /// y component.
        y: f64,
        /// z component.
        z: f64,
        /// Why it was rejected.
        reason: &'static str,
    },
}

impl TunnellingError {
    /// Shorthand for [`TunnellingError::InvalidValue`].
    pub(crate) fn invalid(name: &'static str, value: f64, reason: &'static str) -> Self {
        Self::InvalidValue {
            name,
            value,
            reason,
        }
    }
}

/// Rejects a non-finite or non-positive value.
pub(crate) fn check_positive(name: &'static str, value: f64) -> Result<(), TunnellingError> {
    if !value.is_finite() {
        return Err(TunnellingError::invalid(name, value, "must be finite"));
    }
    if value <= 0.0 {
        return Err(TunnellingError::invalid(name, value, "must be positive"));
    }
    Ok(())
}

/// Checks `l ≤ MAX_ANGULAR_MOMENTUM` and `|m| ≤ l` for the pair named `quantity`.
pub(crate) fn check_l_m(quantity: &'static str, l: u32, m: i32) -> Result<(), TunnellingError> {
    if l > MAX_ANGULAR_MOMENTUM {
        return Err(TunnellingError::InvalidQuantumNumbers {
            quantity,
            l,
            m,
            reason: format!("l exceeds the largest supported value {MAX_ANGULAR_MOMENTUM}"),
        });
    }
    if m.unsigned_abs() > l {
        return Err(TunnellingError::InvalidQuantumNumbers {
            quantity,
            l,
            m,
            reason: "the projection must satisfy |m| ≤ l".to_string(),
        });
    }
    Ok(())
}

/// `n!` as `f64` (exact up to 22!, correctly rounded products beyond; `n ≤ 2·MAX_ANGULAR_MOMENTUM`
/// in this module).
pub(crate) fn factorial(n: u32) -> f64 {
    (2..=n).fold(1.0, |acc, k| acc * f64::from(k))
}
