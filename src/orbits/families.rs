//! Discovery of quantum-orbit families from classical trajectories.
//!
//! For every crest of the field (a local maximum of `|E|`, one per half cycle of a linear
//! monochromatic field) electrons born at rest between the crest and the next reversal of the
//! field are followed classically ([`crate::classical`]). For each return index `k` the return
//! energy as a function of birth time rises to a maximum (the classical cutoff of that return)
//! and falls again: births before the maximum form the *long* branch, births after it the
//! *short* branch. Each branch seeds one quantum-orbit family; the two branches of one crest and
//! return are tracked together because they coalesce at the cutoff.
//!
//! In a pulse a half cycle may have only one branch (the long orbits of the last half cycles
//! would return after the pulse has ended, or the return energy keeps rising up to the end of
//! the window) or none at all (no electron born in it comes back while the field lasts). Such a
//! half cycle still yields a [`SeedGroup`] — with its [`ClassicalPeak`] where some electrons
//! return, with no branch at all otherwise — so that the trajectory stage can find the quantum
//! partner of a lone branch from the coalescence point, or label the missing family with its
//! reason instead of dropping it.

use std::fmt;

use serde::Serialize;

use crate::classical::{ReturnSearch, returns};
use crate::error::Result;
use crate::field::{BirthWindow, Field};

use super::budget::{self, WorkLimits};

/// Short or long member of a pair of quantum orbits.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Branch {
    /// Born after the birth time of the cutoff trajectory: shorter excursion.
    Short,
    /// Born before it: longer excursion.
    Long,
}

/// Stable label of a quantum-orbit family within one half cycle.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct FamilyLabel {
    /// Return index (1 = first return).
    pub return_index: u32,
    /// Short or long member.
    pub branch: Branch,
}

impl fmt::Display for FamilyLabel {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let b = match self.branch {
            Branch::Short => "short",
            Branch::Long => "long",
        };
        if self.return_index == 1 {
            write!(f, "{b}")
        } else {
            write!(f, "return{}-{b}", self.return_index)
        }
    }
}

/// Classical trajectories of one branch, ordered by increasing return energy.
#[derive(Clone, Debug)]
pub struct ClassicalBranch {
    /// Family label.
    pub label: FamilyLabel,
    /// Birth times (a.u.).
    pub births: Vec<f64>,
    /// Return times (a.u.).
    pub returns: Vec<f64>,
    /// Return kinetic energies (a.u.), ascending.
    pub energies: Vec<f64>,
}

impl ClassicalBranch {
    /// Birth and return time of the classical trajectory with return energy `energy`
    /// (linear interpolation), or `None` outside the branch's energy range.
    pub fn at_energy(&self, energy: f64) -> Option<(f64, f64)> {
        let n = self.energies.len();
        if n < 2 || energy < self.energies[0] || energy > self.energies[n - 1] {
            return None;
        }
        let k = self
            .energies
            .partition_point(|&e| e < energy)
            .clamp(1, n - 1);
        let (e0, e1) = (self.energies[k - 1], self.energies[k]);
        let w = if e1 > e0 {
            (energy - e0) / (e1 - e0)
        } else {
            0.0
        };
        let lerp = |v: &[f64]| v[k - 1] + w * (v[k] - v[k - 1]);
        Some((lerp(&self.births), lerp(&self.returns)))
    }

    /// Largest return energy on the branch (a.u.).
    pub fn max_energy(&self) -> f64 {
        self.energies.last().copied().unwrap_or(0.0)
    }
}

/// The most energetic classical return of one half cycle and return index: its classical
/// cutoff.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ClassicalPeak {
    /// Birth time (a.u.).
    pub birth: f64,
    /// Return time (a.u.).
    pub return_time: f64,
    /// Return kinetic energy (a.u.); the half cycle's classical cutoff photon energy is this
    /// plus the recombining channel's Ip.
    pub energy: f64,
    /// Whether the maximum lies inside the run of returning births (a true maximum, where the
    /// long and short branches meet) rather than at its edge (the return energy still rising
    /// where the births stop returning: the pulse ends or the window is cut).
    pub interior: bool,
}

/// The long and short branches of one crest and one return index.
#[derive(Clone, Debug)]
pub struct SeedGroup {
    /// Crest index: 0 is the crest at `t = 0` (periodic) or nearest the pulse centre.
    pub half_cycle: i32,
    /// Time of the crest (a.u.).
    pub crest: f64,
    /// Return index.
    pub return_index: u32,
    /// Branches (long first, then short; either or both may be missing).
    pub branches: Vec<ClassicalBranch>,
    /// The birth window of the crest.
    pub window: BirthWindow,
    /// The classical cutoff of this half cycle and return (None if no electron returns).
    pub peak: Option<ClassicalPeak>,
}

impl SeedGroup {
    /// The family labels of the group: both members of the pair, long first (a missing
    /// classical branch is still a quantum family, found from the coalescence point or labelled
    /// with the reason it is missing).
    pub fn labels(&self) -> [FamilyLabel; 2] {
        [Branch::Long, Branch::Short].map(|branch| FamilyLabel {
            return_index: self.return_index,
            branch,
        })
    }
}

/// Settings of the family discovery.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DiscoverySettings {
    /// Highest return index.
    pub max_returns: u32,
    /// Crests lower than this fraction of the highest are ignored (pulses).
    pub crest_threshold: f64,
    /// Birth times sampled per crest window.
    pub births_per_crest: usize,
}

impl Default for DiscoverySettings {
    fn default() -> Self {
        DiscoverySettings {
            max_returns: 1,
            crest_threshold: 0.3,
            births_per_crest: 96,
        }
    }
}

/// Finds the classical branches of every crest of the field, within the default work limits.
///
/// A field whose search would exceed [`WorkLimits::default`] yields no group; every consumer in
/// the library ([`super::solve_orbits_seeded`]) checks the same estimate first and returns the
/// [`crate::Error::WorkLimit`] error, so that nothing is silently empty. Use [`try_discover`] to
/// get the error here.
pub fn discover(field: &Field, settings: &DiscoverySettings) -> Vec<SeedGroup> {
    try_discover(field, settings, &WorkLimits::default()).unwrap_or_default()
}

/// Checks the work of the birth-window search against `limits` (module [`super::budget`]).
pub fn check_window_work(field: &Field, limits: &WorkLimits) -> Result<()> {
    budget::check(
        "birth windows",
        budget::window_evaluations(field),
        limits.window_evaluations,
        "field evaluations",
        &format!(
            "|E(t)| is sampled 64 times per period of the fastest colour over the field's \
             duration ({:.0} a.u. of time); use a shorter pulse",
            field.time_span().1 - field.time_span().0
        ),
    )
}

/// Checks the work of the classical seed search over `windows` birth windows.
pub fn check_classical_work(
    field: &Field,
    windows: usize,
    settings: &DiscoverySettings,
    limits: &WorkLimits,
) -> Result<()> {
    budget::check(
        "classical seed trajectories",
        budget::classical_evaluations(field, windows, settings),
        limits.classical_evaluations,
        "field evaluations",
        &format!(
            "{windows} half cycles above {:.0}% of the peak field, {} births each, followed \
             for {} periods at about {:.0} field evaluations each; use a shorter pulse or fewer \
             returns",
            100.0 * settings.crest_threshold,
            settings.births_per_crest,
            settings.max_returns + 1,
            budget::evaluations_per_birth(field, settings.max_returns)
        ),
    )
}

/// [`discover`] with explicit work limits: [`crate::Error::WorkLimit`] when the birth-window or
/// classical search would exceed them.
pub fn try_discover(
    field: &Field,
    settings: &DiscoverySettings,
    limits: &WorkLimits,
) -> Result<Vec<SeedGroup>> {
    check_window_work(field, limits)?;
    let windows = field.birth_windows(settings.crest_threshold);
    check_classical_work(field, windows.len(), settings, limits)?;
    Ok(discover_in(field, settings, &windows))
}

/// The seed groups of the given birth windows only (e.g. the one window of a field derived
/// from another, whose crest is known).
pub(crate) fn discover_in(
    field: &Field,
    settings: &DiscoverySettings,
    windows: &[BirthWindow],
) -> Vec<SeedGroup> {
    let search = ReturnSearch {
        max_returns: settings.max_returns as usize,
        ..ReturnSearch::default()
    };
    let mut groups: Vec<SeedGroup> = Vec::new();
    let half_period = match field.structure() {
        crate::field::TimeStructure::Periodic { period } if field.half_wave_symmetric() => {
            Some(0.5 * period)
        }
        _ => None,
    };
    for (j, w) in windows.iter().enumerate() {
        // With A(t + T/2) = −A(t) the trajectories of the second half cycle are those of the
        // first shifted by T/2 (x → −x, same energies): reuse them.
        if let (Some(half), Some(first)) = (half_period, windows.first())
            && j > 0
            && ((w.crest - first.crest) - half).abs() < 1e-5 * half
        {
            let shifted: Vec<SeedGroup> = groups
                .iter()
                .filter(|g| g.half_cycle == first.index)
                .map(|g| SeedGroup {
                    half_cycle: w.index,
                    crest: w.crest,
                    return_index: g.return_index,
                    window: *w,
                    peak: g.peak.map(|p| ClassicalPeak {
                        birth: p.birth + half,
                        return_time: p.return_time + half,
                        ..p
                    }),
                    branches: g
                        .branches
                        .iter()
                        .map(|b| ClassicalBranch {
                            label: b.label,
                            births: b.births.iter().map(|t| t + half).collect(),
                            returns: b.returns.iter().map(|t| t + half).collect(),
                            energies: b.energies.clone(),
                        })
                        .collect(),
                })
                .collect();
            groups.extend(shifted);
            continue;
        }
        let n = settings.births_per_crest.max(8);
        let births: Vec<f64> = (0..n)
            .map(|i| w.start + (w.end - w.start) * (i as f64 + 0.5) / n as f64)
            .collect();
        let events: Vec<_> = births.iter().map(|&t| returns(field, t, &search)).collect();
        for k in 1..=settings.max_returns {
            let (branches, peak) = split_branches(field, &search, &births, &events, k);
            groups.push(SeedGroup {
                half_cycle: w.index,
                crest: w.crest,
                return_index: k,
                window: *w,
                peak,
                branches,
            });
        }
    }
    groups
}

/// Splits the births with a `k`-th return into long and short branches at the largest return
/// energy of the longest contiguous run, and refines that maximum (the classical peak) by a
/// golden-section search between the neighbouring births.
fn split_branches(
    field: &Field,
    search: &ReturnSearch,
    births: &[f64],
    events: &[Vec<crate::classical::ReturnEvent>],
    k: u32,
) -> (Vec<ClassicalBranch>, Option<ClassicalPeak>) {
    let at = |i: usize| events[i].iter().find(|e| e.index == k as usize);
    // Longest contiguous run of births that have a k-th return.
    let (mut best, mut start) = ((0, 0), None);
    for i in 0..=births.len() {
        let has = i < births.len() && at(i).is_some();
        match (has, start) {
            (true, None) => start = Some(i),
            (false, Some(s)) => {
                if i - s > best.1 - best.0 {
                    best = (s, i);
                }
                start = None;
            }
            _ => {}
        }
    }
    let (lo, hi) = best;
    if hi - lo < 2 {
        return (Vec::new(), None);
    }
    let energy = |i: usize| at(i).map_or(0.0, |e| e.energy);
    let peak = (lo..hi)
        .max_by(|&a, &b| energy(a).total_cmp(&energy(b)))
        .unwrap_or(lo);
    let interior = peak > lo && peak + 1 < hi;
    let Some(&at_peak) = at(peak) else {
        return (Vec::new(), None);
    };
    let refined = {
        let kth = |t: f64| {
            returns(field, t, search)
                .into_iter()
                .find(|e| e.index == k as usize)
        };
        let a = births[peak.saturating_sub(1).max(lo)];
        let b = births[(peak + 1).min(hi - 1)];
        let e_of = |t: f64| kth(t).map_or(f64::NEG_INFINITY, |e| e.energy);
        // The return energy is quadratic about its maximum: a birth time to 10⁻⁵ of the
        // bracket gives the energy to ~10⁻¹⁰ relative, far below what the seeds need.
        let t = crate::field::golden_max(&e_of, a, b, 1e-5 * (b - a).abs().max(1e-12));
        match kth(t) {
            Some(e) if e.energy >= at_peak.energy => (t, e),
            _ => (births[peak], at_peak),
        }
    };
    let classical_peak = Some(ClassicalPeak {
        birth: refined.0,
        return_time: refined.1.time,
        energy: refined.1.energy,
        interior,
    });
    if hi - lo < 6 {
        return (Vec::new(), classical_peak);
    }
    let mut out = Vec::new();
    let make = |idx: Vec<usize>, branch: Branch| {
        let mut pts: Vec<(f64, f64, f64)> = idx
            .into_iter()
            .filter_map(|i| at(i).map(|e| (births[i], e.time, e.energy)))
            .collect();
        pts.sort_by(|a, b| a.2.total_cmp(&b.2));
        ClassicalBranch {
            label: FamilyLabel {
                return_index: k,
                branch,
            },
            births: pts.iter().map(|p| p.0).collect(),
            returns: pts.iter().map(|p| p.1).collect(),
            energies: pts.iter().map(|p| p.2).collect(),
        }
    };
    if peak + 1 - lo >= 3 {
        out.push(make((lo..=peak).collect(), Branch::Long));
    }
    if hi - peak >= 3 {
        out.push(make((peak..hi).collect(), Branch::Short));
    }
    (out, classical_peak)
}
