//! Classical ("simple-man") electron trajectories in the laser field.
//!
//! An electron is born at the origin at time `t₀` and then moves in the laser field alone. In a
//! field polarised along one line it is born at rest and returns where its position crosses
//! zero; in general fields it needs a transverse initial velocity to come back (see
//! [`returns`]). The largest return energy, `3.17 Up` for a monochromatic linear field, reached
//! for birth ≈ 18° and return ≈ 252° after the crest, is the classical cutoff (P. B. Corkum,
//! PRL 71, 1994 (1993); J. L. Krause, K. J. Schafer, K. C. Kulander, PRL 68, 3535 (1992)).
//!
//! These trajectories seed the complex saddle-point solver: they tell it where quantum orbits
//! are and which family (short or long, which return) each belongs to.

use crate::field::{Field, TimeStructure, golden_max};

/// A return of a classical trajectory to the parent ion.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ReturnEvent {
    /// Return time (a.u.).
    pub time: f64,
    /// Kinetic energy at return, `|p + A(t)|²/2` (a.u.).
    pub energy: f64,
    /// Size of the initial velocity `|p + A(t₀)|` needed to return exactly (a.u.; zero for a
    /// field polarised along one line).
    pub initial_speed: f64,
    /// Which return this is (1 = first).
    pub index: usize,
}

/// Settings of the return search.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ReturnSearch {
    /// Largest return index sought.
    pub max_returns: usize,
    /// Samples per period of the fastest mode that moves the electron ([`sampling_frequency`]).
    pub samples_per_cycle: usize,
}

impl Default for ReturnSearch {
    fn default() -> Self {
        ReturnSearch {
            max_returns: 1,
            samples_per_cycle: 32,
        }
    }
}

/// Fastest frequency that moves the electron noticeably: the largest mode frequency `ν_j`
/// whose contribution to the excursion, `|a_j|/ν_j` (the amplitude of `∫A dt`), is at least
/// `10⁻³` of the largest one (never below the reference frequency ω).
///
/// The return condition below depends on the return time only through `∫A`, in which a mode of
/// vector-potential amplitude `a_j` enters as `a_j/ν_j`: a weak high-frequency colour (e.g. the
/// 300th harmonic at 1% intensity, `|a|/ν` ≈ 10⁻⁶ of the fundamental's) does not move the
/// electron and need not be resolved by the sampling, which would otherwise cost `ν_j/ω` times
/// more field evaluations per trajectory.
pub fn sampling_frequency(field: &Field) -> f64 {
    let weight = |m: &crate::field::Mode| m.amplitude.norm() / m.frequency;
    let largest = field.modes().iter().map(weight).fold(0.0, f64::max);
    field
        .modes()
        .iter()
        .filter(|m| weight(m) >= 1e-3 * largest)
        .map(|m| m.frequency)
        .fold(field.omega(), f64::max)
}

/// Returns of the electron born at `t0`, in time order (at most `search.max_returns`).
///
/// For every candidate return time `t₁` the drift momentum `p = −(1/τ)∫_{t₀}^{t₁} A` makes the
/// electron come back exactly; its initial velocity `v₀ = p + A(t₀)` must have no component
/// along the field at birth, `v₀·E(t₀) = 0` (the real-time limit of the tunnelling saddle
/// equation: the electron exits the barrier with zero longitudinal velocity). Each sign change
/// of `v₀·E(t₀)` as a function of `t₁` is a return. For a field polarised along one line this is
/// exactly the born-at-rest return `x(t₁) = 0` of the simple-man model; for elliptical and
/// multi-colour fields it lets the electron start with the transverse velocity it needs.
pub fn returns(field: &Field, t0: f64, search: &ReturnSearch) -> Vec<ReturnEvent> {
    let (a0, e0, b0) = field.real_at(t0);
    if e0.norm_squared() == 0.0 {
        return Vec::new();
    }
    let condition = |t1: f64| {
        let (a1, _, b1) = field.real_at(t1);
        let drift = -(b1 - b0) / (t1 - t0);
        ((drift + a0).dot(&e0), drift, a1)
    };
    let nu_max = sampling_frequency(field);
    let h = 2.0 * std::f64::consts::PI / (nu_max * search.samples_per_cycle as f64);
    let period = 2.0 * std::f64::consts::PI / field.omega();
    let mut horizon = t0 + (search.max_returns as f64 + 1.0) * period;
    if let TimeStructure::Pulse { end, .. } = field.structure() {
        horizon = horizon.min(end);
    }
    let mut events = Vec::new();
    let mut t_prev = t0 + 0.25 * h;
    let mut g_prev = condition(t_prev).0;
    let mut t = t0 + h;
    while t <= horizon && events.len() < search.max_returns {
        let g = condition(t).0;
        if (g_prev > 0.0) != (g > 0.0) {
            let (mut lo, mut hi) = (t_prev, t);
            let positive_lo = g_prev > 0.0;
            for _ in 0..40 {
                let mid = 0.5 * (lo + hi);
                if (condition(mid).0 > 0.0) == positive_lo {
                    lo = mid;
                } else {
                    hi = mid;
                }
                if hi - lo < 1e-9 * h {
                    break;
                }
            }
            let tm = 0.5 * (lo + hi);
            let (_, drift, a1) = condition(tm);
            events.push(ReturnEvent {
                time: tm,
                energy: 0.5 * (drift + a1).norm_squared(),
                initial_speed: (drift + a0).norm(),
                index: events.len() + 1,
            });
        }
        g_prev = g;
        t_prev = t;
        t += h;
    }
    events
}

/// Result of maximising the return energy over birth times.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ClassicalCutoff {
    /// Birth time of the most energetic return (a.u.).
    pub birth: f64,
    /// Its return time (a.u.).
    pub return_time: f64,
    /// Its return kinetic energy (a.u.); the classical cutoff photon energy is this plus Ip.
    pub energy: f64,
}

/// Largest first-return energy for births in `[t_start, t_end]`: a grid scan followed by a
/// golden-section refinement of the best grid point.
pub fn max_return_energy(field: &Field, t_start: f64, t_end: f64) -> Option<ClassicalCutoff> {
    let search = ReturnSearch::default();
    let first = |t: f64| returns(field, t, &search).first().copied();
    let n = 400;
    let h = (t_end - t_start) / n as f64;
    let mut best: Option<(f64, f64)> = None;
    for i in 0..=n {
        let t = t_start + i as f64 * h;
        if let Some(ev) = first(t)
            && best.is_none_or(|b| ev.energy > b.1)
        {
            best = Some((t, ev.energy));
        }
    }
    let (tb, _) = best?;
    let energy = |t: f64| first(t).map_or(f64::NEG_INFINITY, |e| e.energy);
    let lo = (tb - h).max(t_start);
    let hi = (tb + h).min(t_end);
    let birth = golden_max(&energy, lo, hi, 1e-11 * (1.0 + tb.abs()));
    let ev = first(birth)?;
    Some(ClassicalCutoff {
        birth,
        return_time: ev.time,
        energy: ev.energy,
    })
}
