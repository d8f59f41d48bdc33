//! Explicit bounds on the work of the trajectory stage, estimated before the work starts.
//!
//! The cost of the trajectory stage has three parts, each estimated here from the field and the
//! settings alone:
//!
//! 1. **Birth windows** ([`Field::birth_windows`]): `|E(t)|` sampled 64 times per period of the
//!    fastest mode over the field's time span, plus a golden-section refinement of every extremum
//!    (about 60 evaluations each, at most two extrema per 64 samples). Estimate: `4·n_samples`,
//!    `n_samples = 64·ν_max·duration/(2π)`.
//! 2. **Classical seeds** ([`super::families::discover`]): per birth window, `births_per_crest`
//!    trajectories, each followed for `max_returns + 1` periods of the reference colour at
//!    `samples_per_cycle` samples per period of the fastest mode that moves the electron
//!    ([`crate::classical::sampling_frequency`]), plus a 40-step bisection per return.
//! 3. **Continuation** (the tracker): per seed group, the energy range swept in steps of at most
//!    `max_step·ω`, plus one step per requested energy. A spectrum to 20% past the cutoff spans
//!    about `1.2(3.17 Up + 1.32 Ip)`, so the steps per family grow like `(Up + Ip)/ω`.
//!
//! Ordinary inputs need far less than the limits (a 10 fs pulse at 800 nm: about 10⁵ classical
//! evaluations and 10³ continuation steps per channel pair). Extreme ones — an intensity of
//! 10²⁰ W/cm², a wavelength of 1 mm, an Ip of 10⁸ eV, an 8000 fs pulse — would run for minutes
//! or hours; they are refused with [`Error::WorkLimit`], which states the estimate, the limit and
//! where the work comes from. The default limits correspond to roughly one second each on one
//! core (common practice for an interactive tool; measured with `examples/orbit_sweep.rs` and
//! the extreme cases listed in DEVELOPERS.md, not a published value).

use crate::error::{Error, Result};
use crate::field::Field;

use super::families::DiscoverySettings;

/// Default limit on the field evaluations of the birth-window search.
pub const MAX_WINDOW_EVALUATIONS: f64 = 2.0e7;
/// Default limit on the field evaluations of the classical seed search.
pub const MAX_CLASSICAL_EVALUATIONS: f64 = 2.0e7;
/// Default limit on the continuation steps of one orbit table (all families together).
pub const MAX_CONTINUATION_STEPS: f64 = 1.0e6;
/// Default limit on the number of photon energies of one request (each costs at least one
/// continuation step per family and a row in every output).
pub const MAX_ENERGY_POINTS: f64 = 1.0e6;

/// Limits on the work of the trajectory stage (see the module documentation).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct WorkLimits {
    /// Field evaluations of the birth-window search.
    pub window_evaluations: f64,
    /// Field evaluations of the classical seed search.
    pub classical_evaluations: f64,
    /// Continuation steps of one orbit table.
    pub continuation_steps: f64,
    /// Photon energies of one request.
    pub energy_points: f64,
}

impl Default for WorkLimits {
    fn default() -> Self {
        WorkLimits {
            window_evaluations: MAX_WINDOW_EVALUATIONS,
            classical_evaluations: MAX_CLASSICAL_EVALUATIONS,
            continuation_steps: MAX_CONTINUATION_STEPS,
            energy_points: MAX_ENERGY_POINTS,
        }
    }
}

/// Estimated field evaluations of [`Field::birth_windows`].
pub fn window_evaluations(field: &Field) -> f64 {
    let nu_max = field
        .modes()
        .iter()
        .map(|m| m.frequency)
        .fold(field.omega(), f64::max);
    let (t0, t1) = field.time_span();
    let samples = (t1 - t0) * nu_max / (2.0 * std::f64::consts::PI) * 64.0 + 16.0;
    4.0 * samples
}

/// Estimated field evaluations to follow one classical trajectory to its `max_returns`-th
/// return ([`crate::classical::returns`]).
pub fn evaluations_per_birth(field: &Field, max_returns: u32) -> f64 {
    let search = crate::classical::ReturnSearch::default();
    let ratio = crate::classical::sampling_frequency(field) / field.omega();
    (f64::from(max_returns) + 1.0) * search.samples_per_cycle as f64 * ratio
        + 40.0 * f64::from(max_returns)
}

/// Estimated field evaluations of the classical seed search over `windows` birth windows.
pub fn classical_evaluations(field: &Field, windows: usize, settings: &DiscoverySettings) -> f64 {
    windows as f64
        * settings.births_per_crest.max(8) as f64
        * evaluations_per_birth(field, settings.max_returns)
}

/// Estimated continuation steps of one orbit table: `groups` seed groups, each continued in
/// steps of at most `max_step·ω` from its start — in mid-plateau or just below the cutoff
/// `Ip_rec + 3.17 Up + 0.32 Ip_ion` — down to the recombination threshold `ip_rec` and up to
/// the highest of the photon energies `energies` (a.u.), plus one step per energy. Both
/// sweeps of a group are counted over the whole range `[Ip_rec, max(Ω_max, cutoff)]`.
pub fn continuation_steps(
    field: &Field,
    groups: usize,
    energies: &[f64],
    ip_rec: f64,
    ip_ion: f64,
    max_step: f64,
) -> f64 {
    let hi = energies.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let cutoff = ip_rec + 3.2 * field.ponderomotive_energy() + 0.4 * ip_ion;
    let span = 2.0 * (hi.max(cutoff) - ip_rec).max(0.0);
    let per_group = span / (max_step * field.omega()) + energies.len() as f64 + 50.0;
    groups as f64 * per_group
}

/// `Ok` if `estimated ≤ limit`, else [`Error::WorkLimit`] naming the task and the cause.
pub fn check(task: &str, estimated: f64, limit: f64, unit: &str, reason: &str) -> Result<()> {
    if estimated.is_finite() && estimated <= limit {
        return Ok(());
    }
    Err(Error::WorkLimit {
        task: task.to_string(),
        estimated,
        limit,
        unit: unit.to_string(),
        reason: reason.to_string(),
    })
}

/// Number of points of the grid `first, first + step, …, ≤ last` (as a float, so that an
/// absurd grid is measured before anything is allocated).
pub fn grid_points(first: f64, last: f64, step: f64) -> f64 {
    ((last - first) / step + 1e-9).floor() + 1.0
}

/// Checks a grid of photon energies or orders before it is built: [`Error::WorkLimit`] if it
/// would have more than `limits.energy_points` points (e.g. the default grid to 20% past the
/// cutoff of a 1 mm wavelength, 4 × 10¹⁰ harmonic orders). For drivers that build the grid.
pub fn check_grid(first: f64, last: f64, step: f64, limits: &WorkLimits) -> Result<()> {
    check(
        "photon-energy grid",
        grid_points(first, last, step),
        limits.energy_points,
        "points",
        &format!("from {first:.4e} to {last:.4e} in steps of {step:.4e}"),
    )
}
