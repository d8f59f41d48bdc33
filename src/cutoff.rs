//! Cutoff estimates of a channel in a field: classical, quantum (saddle coalescence) and the
//! Lewenstein formula — for the field as a whole and for each half cycle.
//!
//! Every half cycle of a pulse has its own cutoff: the largest classical return energy of the
//! electrons born in it (P. B. Corkum, PRL 71, 1994 (1993): `3.17 Up` for a monochromatic
//! field) and the complex energy where its short and long saddles coalesce (M. Lewenstein et
//! al., PRA 49, 2117 (1994): `≈ 3.17 Up + 1.32 Ip`). The cutoff of the field is that of its
//! **strongest half cycle** (highest classical cutoff); its quantum cutoff is accepted only if
//! it lies close to that half cycle's classical cutoff plus ≈ 0.32 Ip
//! ([`crate::orbits::coalescence::plausible`]), never the largest coalescence energy found
//! anywhere (a coalescence of other saddles once gave 499 eV for a 3 fs pulse whose classical
//! cutoff is 39 eV).
//!
//! The work is bounded ([`crate::orbits::budget`]): [`try_cutoffs`] returns
//! [`crate::Error::WorkLimit`] for inputs that would take more than about a second (intensity
//! 10²⁰ W/cm², wavelength 1 mm, Ip 10⁸ eV, an 8000 fs pulse, …).

use crate::classical::max_return_energy;
use crate::error::{Error, Result};
use crate::field::Field;
use crate::orbits::families::{self, ClassicalPeak};
use crate::orbits::{
    ChannelPair, Coalescence, HalfCycleCutoff, OrbitSettings, check_work, solve_orbits_seeded,
};

/// Cutoff estimates (photon energies in a.u.).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Cutoffs {
    /// `Ip_rec + max E_return` of the classical first returns over all crests (the strongest
    /// half cycle's classical cutoff).
    pub classical: f64,
    /// `Re Ω_c` of the strongest half cycle, where its coalescence point was found and passed
    /// the check against its classical cutoff.
    pub quantum: Option<f64>,
    /// The coalescence point behind `quantum`.
    pub coalescence: Option<Coalescence>,
    /// `Ip + 3.17 Up`-type formula with the quantum correction, `3.17 Up + 1.32 Ip`
    /// (M. Lewenstein et al., PRA 49, 2117 (1994)), derived for a monochromatic, linearly
    /// polarised, continuous field: None for every other field ([`lewenstein_applies`]), where
    /// the half cycles' own cutoffs are the ones to quote.
    pub lewenstein: Option<f64>,
    /// Crest index of the strongest half cycle (None if no electron returns).
    pub strongest_half_cycle: Option<i32>,
    /// True when [`cutoffs`] could not do the work within the limits: `classical` is then the
    /// monochromatic formula `Ip + 3.17 Up` and `quantum` is None; [`try_cutoffs`] gives the
    /// error with the estimate and the limit.
    pub work_limited: bool,
}

/// The cutoffs of a field and of each of its half cycles.
#[derive(Clone, Debug, PartialEq)]
pub struct CutoffReport {
    /// The field's cutoffs (those of its strongest half cycle).
    pub cutoffs: Cutoffs,
    /// Every first-return half cycle: `(crest index, cutoff)`, in time order.
    pub half_cycles: Vec<(i32, HalfCycleCutoff)>,
}

/// Whether the formula `3.17 Up + 1.32 Ip` (Lewenstein et al. 1994) applies: one colour,
/// linearly polarised, without envelope (a single mode of the vector potential along one
/// axis). Not for elliptical, two-colour or pulsed fields.
pub fn lewenstein_applies(field: &Field) -> bool {
    matches!(
        field.structure(),
        crate::field::TimeStructure::Periodic { .. }
    ) && field.modes().len() == 1
        && field.linear_axis().is_some()
}

/// Classical return maximum over every crest of the field (a.u.), from a dense scan of birth
/// times per crest (400 births and a golden-section refinement; see [`max_return_energy`]).
pub fn classical_return_maximum(field: &Field, settings: &OrbitSettings) -> Option<f64> {
    field
        .birth_windows(settings.discovery.crest_threshold)
        .iter()
        .filter_map(|w| max_return_energy(field, w.start, w.end).map(|r| r.energy))
        .reduce(f64::max)
}

/// Cutoffs of a channel pair (the recombining channel's Ip sets the photon energy offset),
/// for the field and for each half cycle, within the work limits of `settings`.
pub fn half_cycle_cutoffs(
    field: &Field,
    pair: ChannelPair,
    settings: &OrbitSettings,
) -> Result<CutoffReport> {
    crate::error::require_positive("ionization potential (ionizing channel)", pair.ip_ion)?;
    crate::error::require_positive("ionization potential (recombining channel)", pair.ip_rec)?;
    let up = field.ponderomotive_energy();
    let mut discovery = settings.discovery;
    discovery.max_returns = 1;
    let groups = families::try_discover(field, &discovery, &settings.limits)?;
    let strongest: Option<(i32, ClassicalPeak)> = groups
        .iter()
        .filter_map(|g| g.peak.map(|p| (g.half_cycle, p)))
        .max_by(|a, b| a.1.energy.total_cmp(&b.1.energy));
    let Some((_, peak)) = strongest else {
        return Err(Error::Numerical(
            "no classical electron trajectory returns in this field: no cutoff".into(),
        ));
    };
    let e_max = peak.energy;
    let classical = pair.ip_rec + e_max;
    // Track the first-return pairs from mid-plateau to well past the classical cutoff; the
    // closest approach of the strongest half cycle seeds its coalescence solve, the others
    // start from their own classical cutoff trajectories.
    let n = 60;
    let lo = pair.ip_rec + 0.5 * e_max;
    let hi = pair.ip_rec + 1.6 * e_max + 0.6 * pair.ip_ion;
    let grid: Vec<f64> = (0..=n)
        .map(|k| lo + (hi - lo) * k as f64 / n as f64)
        .collect();
    let mut orbit_settings = *settings;
    orbit_settings.discovery = discovery;
    check_work(field, pair, &grid, &orbit_settings)?;
    let table = solve_orbits_seeded(field, pair, &grid, &orbit_settings, &groups)?;
    let half_cycles: Vec<(i32, HalfCycleCutoff)> = table
        .half_cycle_cutoffs()
        .into_iter()
        .map(|(h, _, c)| (h, c))
        .collect();
    let top = table.strongest_half_cycle();
    let coalescence = top.and_then(|(_, c)| c.quantum);
    Ok(CutoffReport {
        cutoffs: Cutoffs {
            classical,
            quantum: coalescence.map(|c| c.omega.re),
            coalescence,
            lewenstein: lewenstein_applies(field).then_some(3.17 * up + 1.32 * pair.ip_ion),
            strongest_half_cycle: top.map(|(h, _)| h),
            work_limited: false,
        },
        half_cycles,
    })
}

/// Cutoffs of a channel pair, or [`Error::WorkLimit`] when the work would exceed the limits
/// of `settings` (and any other error of the trajectory stage).
pub fn try_cutoffs(field: &Field, pair: ChannelPair, settings: &OrbitSettings) -> Result<Cutoffs> {
    half_cycle_cutoffs(field, pair, settings).map(|r| r.cutoffs)
}

/// Cutoffs of a channel pair; never fails. Where [`try_cutoffs`] fails, `classical` is the
/// monochromatic formula `Ip_rec + 3.17 Up` (Corkum 1993), `quantum` is None and
/// `work_limited` says whether the cause was the work limit: use [`try_cutoffs`] to report
/// why.
pub fn cutoffs(field: &Field, pair: ChannelPair, settings: &OrbitSettings) -> Cutoffs {
    let up = field.ponderomotive_energy();
    try_cutoffs(field, pair, settings).unwrap_or_else(|e| Cutoffs {
        classical: pair.ip_rec + 3.173_136_566_7 * up,
        quantum: None,
        coalescence: None,
        lewenstein: lewenstein_applies(field).then_some(3.17 * up + 1.32 * pair.ip_ion),
        strongest_half_cycle: None,
        work_limited: matches!(e, Error::WorkLimit { .. }),
    })
}
