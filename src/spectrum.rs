//! Spectral quantities shared by every dipole path: family contributions, harmonic phases and
//! group delays.
//!
//! For a periodic field the saddles of one full period (every crest, so both half cycles of a
//! linear field) are summed; at `Ω = qω` this is the amplitude of harmonic line `q` per cycle,
//! and between lines it is the single-cycle transform (DESIGN §4.8). For a pulse every crest
//! above the discovery threshold is summed, giving a continuous `D(Ω)`. The dipole itself is
//! assembled by [`crate::multichannel`] (one channel is a one-channel target,
//! [`crate::target::Target::one_channel`]).
//!
//! Per energy a spectrum reports `|D|²`, the emitted power `Ω⁴|D|²` (dipole form, arbitrary
//! overall constant), the harmonic phase `arg(ê·D)` of the component along the driving
//! polarization `ê`, and the group delay `dφ/dΩ` computed by a central difference over
//! `Ω ± δ` with freshly solved saddles at both ends. For one saddle the stationary-phase identity
//! gives `dφ/dΩ ≈ Re t_r` (physics notes §6.3); the two are reported separately so that a user
//! can see where the prefactors move the emission time.

use nalgebra::Vector3;
use num_complex::Complex64;

use crate::dipole::KernelKind;
use crate::error::{Error, Result};
use crate::field::CVec3;
use crate::orbits::FamilyLabel;

/// The contribution of one quantum-orbit family.
#[derive(Clone, Debug)]
pub struct Contribution {
    /// Family label.
    pub label: FamilyLabel,
    /// Crest (half cycle) index.
    pub half_cycle: i32,
    /// Dipole vector per energy (None where the saddle failed).
    pub dipole: Vec<Option<CVec3>>,
    /// How its kernel was obtained, per energy.
    pub kind: Vec<KernelKind>,
    /// `dφ/dΩ` of this contribution alone (a.u.), where available.
    pub group_delay: Vec<Option<f64>>,
    /// `Re t_r` of the saddle (a.u.), where solved.
    pub emission_time: Vec<Option<f64>>,
    /// Whether the family was summed, excluded, absent or failed, per energy
    /// ([`crate::status::FamilyStatus`]).
    pub status: Vec<crate::status::FamilyStatus>,
}

/// Harmonic phases `arg(ê·D)` (rad) of a dipole series; `None` where `|ê·D|` is below
/// [`NEGLIGIBLE`] times the series' largest (the phase of rounding noise is meaningless, e.g. at
/// the even harmonics of a centrosymmetric target).
pub fn phases(total: &[CVec3], axis: &Vector3<f64>) -> Vec<Option<f64>> {
    let values: Vec<Complex64> = total.iter().map(|d| project(axis, d)).collect();
    let largest = values.iter().map(|d| d.norm()).fold(0.0, f64::max);
    values
        .iter()
        .map(|d| (largest > 0.0 && d.norm() >= NEGLIGIBLE * largest).then(|| d.arg()))
        .collect()
}

/// The solved grid for group delays: `Ω − δ, Ω, Ω + δ` for every requested energy with
/// `δ = step·ω`, or the energies themselves when `step` is None. Returns (stride, δ, grid).
pub fn group_delay_grid(
    energies: &[f64],
    step: Option<f64>,
    omega: f64,
) -> Result<(usize, Option<f64>, Vec<f64>)> {
    match step {
        Some(step) => {
            if !(step.is_finite() && step > 0.0 && step < 0.5) {
                return Err(Error::invalid(
                    "group-delay step",
                    step,
                    "must lie in (0, 0.5) harmonic orders",
                ));
            }
            let d = step * omega;
            let mut g = Vec::with_capacity(3 * energies.len());
            for &e in energies {
                g.extend([e - d, e, e + d]);
            }
            Ok((3, Some(d), g))
        }
        None => Ok((1, None, energies.to_vec())),
    }
}

/// Below this fraction of the spectrum's largest `|ê·D|` a phase is not meaningful (e.g. the
/// even harmonics of a centrosymmetric target, which cancel to rounding); group delays are then
/// not reported.
pub const NEGLIGIBLE: f64 = 1e-9;

/// `ê·D` for a real unit vector ê.
pub fn project(axis: &Vector3<f64>, d: &CVec3) -> Complex64 {
    d.x * axis.x + d.y * axis.y + d.z * axis.z
}

/// `dφ/dΩ` by a central difference of the phase from values at `Ω − δ`, `Ω` and `Ω + δ`;
/// None when any modulus is at or below `floor` (a phase of noise) or a value is not finite.
pub fn phase_derivative(
    lo: Complex64,
    hi: Complex64,
    centre: Complex64,
    delta: f64,
    floor: f64,
) -> Option<f64> {
    if lo.norm().min(hi.norm()).min(centre.norm()) <= floor || !lo.is_finite() || !hi.is_finite() {
        return None;
    }
    Some((hi / lo).arg() / (2.0 * delta))
}
