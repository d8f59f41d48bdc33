//! Cutoff estimates of a channel in a field: classical, quantum (saddle coalescence) and the
//! Lewenstein formula.

use crate::classical::max_return_energy;
use crate::field::Field;
use crate::orbits::{ChannelPair, Coalescence, OrbitSettings, solve_orbits};

/// Cutoff estimates (photon energies in a.u.).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Cutoffs {
    /// `Ip + max E_return` of the classical first returns over all crests.
    pub classical: f64,
    /// Largest `Re Ω_c` over first-return pairs, where the coalescence solve converged.
    pub quantum: Option<f64>,
    /// The coalescence point behind `quantum`.
    pub coalescence: Option<Coalescence>,
    /// `Ip + 3.17 Up`-type formula with the quantum correction, `3.17 Up + 1.32 Ip`
    /// (M. Lewenstein et al., PRA 49, 2117 (1994)), for a monochromatic linear field.
    pub lewenstein: f64,
}

/// Classical return energy maximum over every crest of the field (a.u.).
pub fn classical_return_maximum(field: &Field, settings: &OrbitSettings) -> Option<f64> {
    field
        .birth_windows(settings.discovery.crest_threshold)
        .iter()
        .filter_map(|w| max_return_energy(field, w.start, w.end).map(|r| r.energy))
        .reduce(f64::max)
}

/// Cutoffs of a channel pair (the recombining channel's Ip sets the photon energy offset).
pub fn cutoffs(field: &Field, pair: ChannelPair, settings: &OrbitSettings) -> Cutoffs {
    let up = field.ponderomotive_energy();
    let e_max = classical_return_maximum(field, settings).unwrap_or(3.17 * up);
    let classical = pair.ip_rec + e_max;
    // Track the first-return pairs from mid-plateau to well past the classical cutoff; the
    // closest approach seeds the coalescence solve.
    let n = 60;
    let lo = pair.ip_rec + 0.5 * e_max;
    let hi = pair.ip_rec + 1.6 * e_max + 0.6 * pair.ip_ion;
    let grid: Vec<f64> = (0..=n)
        .map(|k| lo + (hi - lo) * k as f64 / n as f64)
        .collect();
    let mut settings = *settings;
    settings.discovery.max_returns = 1;
    let coalescence = solve_orbits(field, pair, &grid, &settings)
        .ok()
        .and_then(|table| {
            table
                .pairs
                .iter()
                .filter_map(|p| p.coalescence)
                .filter(|c| c.converged)
                .max_by(|a, b| a.omega.re.total_cmp(&b.omega.re))
        });
    Cutoffs {
        classical,
        quantum: coalescence.map(|c| c.omega.re),
        coalescence,
        lewenstein: 3.17 * up + 1.32 * pair.ip_ion,
    }
}
