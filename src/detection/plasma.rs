//! The ionized fraction that sets the free-electron dispersion of the medium.
//!
//! The fraction of molecules ionized by the time the harmonics are made, taken at the centre of
//! the pulse (`t = 0`, where the envelope peaks and the emission is strongest):
//!
//! ```text
//! η = 1 − exp(−∫_{t_start}^{0} Σ_n w_ADK,n(|E(t)|) dt)
//! ```
//!
//! with the project's static ADK rates of every channel (l = m = 0; M. V. Ammosov, N. B. Delone,
//! V. P. Krainov, Sov. Phys. JETP 64, 1191 (1986); [`crate::tunnelling::adk_static_rate`]),
//! the same cycle-resolved integral as the depletion check of [`crate::validity`] but stopped at
//! the centre. A continuous (periodic) field has no start: the fraction is then undefined and
//! the caller must give a pulse.

use crate::error::{Error, Result};
use crate::field::{Field, TimeStructure};
use crate::validity::ChannelIp;

/// The ionized fraction at the centre of the pulse `field` (formula in the module docs).
///
/// # Errors
/// A periodic field (no pulse to integrate over).
pub fn ionized_fraction_at_centre(field: &Field, channels: &[ChannelIp]) -> Result<f64> {
    let TimeStructure::Pulse { start, .. } = field.structure() else {
        return Err(Error::invalid(
            "free_electrons",
            "true",
            "the ionized fraction is integrated over the pulse: give the laser a pulse envelope \
             (a continuous field has no start)",
        ));
    };
    let end = 0.0_f64;
    if start >= end {
        return Ok(0.0);
    }
    let (_, integral) = crate::validity::integrate_rates(field, channels, start, end);
    Ok(-(-integral).exp_m1())
}
