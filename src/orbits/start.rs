//! Starting a group of quantum orbits: both members of a short/long pair (or a lone family)
//! converged and physical at one photon energy, from which the tracker continues along Ω.
//!
//! Strategies, tried in order until one succeeds:
//!
//! 1. **Classical pair** — mid-plateau: each member from its classical trajectory (birth `t₀`,
//!    return `t₁`) at the same return energy, with `t_i = t₀ + i·asinh(γ)/ω`,
//!    `γ = ω √(2Ip + v₀²)/|E(t₀)|` (the Keldysh time under the barrier, with the initial
//!    velocity `v₀` the electron needs to return; physics notes §3.1). A start is accepted only
//!    if each member converged near its own seed (`|Re t_r − t₁| < T/4`, `|Re t_i − t₀| < T/8`,
//!    `Re t_i` inside the half cycle's birth window), the two are distinct and the short one has
//!    the shorter excursion (`Re τ`): otherwise the Newton solve has jumped to another family
//!    and the pair would be tracked as one.
//! 2. **Coalescence** — the complex cutoff of the half cycle solved from its classical cutoff
//!    trajectory ([`super::coalescence::solve`]), checked by [`super::coalescence::plausible`],
//!    and split into the two saddles just below `Re Ω_c` by the fold normal form
//!    ([`super::coalescence::split`]). This needs no classical branch besides the peak, so it
//!    also pairs the lone branch of a half cycle at the edge of a pulse with its quantum partner.
//! 3. **Transverse continuation** — for a field that is not linearly polarised (elliptical,
//!    orthogonal two-colour, bicircular): strategies 1–2 on the field projected on the
//!    direction of the field at the half cycle's crest (`A_s = P A + s(1 − P)A` with `s = 0`,
//!    `P` the projector on that direction; the major axis of an elliptical field), then the
//!    pair is continued in `s` from 0 to 1 at fixed Ω with step halving. A strongly elliptical
//!    field needs a large complex transverse drift; continuity in `s` carries the saddles there
//!    from the linear field, where the classical seeds are good.
//! 4. **Lone family** — a classical branch without a partner: the member alone (its partner is
//!    then reported as not started).

use num_complex::Complex64;

use super::airy_branch::ZetaBranch;
use super::coalescence::{self, Coalescence, QUANTUM_SHIFT};
use super::equations::{ChannelPair, evaluate};
use super::families::{self, Branch, ClassicalPeak, DiscoverySettings, FamilyLabel, SeedGroup};
use super::newton::{self, NewtonSettings};
use super::track::{self, GroupState, Member};
use crate::cmath::modulus;
use crate::field::{Field, Mode};

/// Energy fractions of the branch maximum tried as classical start points, in order.
const START_FRACTIONS: [f64; 8] = [0.5, 0.4, 0.6, 0.3, 0.7, 0.25, 0.8, 0.15];

/// How a group was started (diagnostics, reported per family).
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum StartMethod {
    /// Both members from their classical trajectories in mid-plateau.
    ClassicalPair,
    /// Both members from the split of the half cycle's coalescence point.
    Coalescence,
    /// Both members continued from the field's projection on its major axis.
    TransverseContinuation,
    /// One member alone from its classical trajectory.
    Lone,
}

/// A started group: the state, the labels of its members (same order) and how it was found.
pub(crate) struct Started {
    pub state: GroupState,
    pub labels: Vec<FamilyLabel>,
    pub coalescence: Option<Coalescence>,
    /// Whether `coalescence` was continued in the transverse field (checked at `s = 0`).
    pub from_transverse: bool,
    pub method: StartMethod,
}

/// What a start needs besides the group.
#[derive(Clone, Copy)]
pub(crate) struct StartContext<'a> {
    pub field: &'a Field,
    pub pair: ChannelPair,
    pub newton: NewtonSettings,
    /// Energy scale of the residuals (`Up + Ip`).
    pub scale: f64,
}

/// Starts `group` by the strategies of the module documentation.
pub(crate) fn start(ctx: &StartContext<'_>, group: &SeedGroup) -> Option<Started> {
    if let Some(s) = classical_pair(ctx, group) {
        return Some(s);
    }
    let transverse = ctx.field.linear_axis().is_none();
    if transverse
        && let Some(c) = transverse_coalescence(ctx, group)
        && let Some(mut s) = split_start(ctx, &c, group.return_index)
    {
        s.from_transverse = true;
        return Some(s);
    }
    if let Some(peak) = group.peak
        && let Some(s) = from_coalescence(ctx, group, &peak)
    {
        return Some(s);
    }
    if transverse && let Some(s) = transverse_continuation(ctx, group) {
        return Some(s);
    }
    lone(ctx, group)
}

/// The classical seed `(t_r, t_i)` of the trajectory born at `t0` returning at `t1`.
fn seed(field: &Field, ip_ion: f64, t0: f64, t1: f64) -> (Complex64, Complex64) {
    let omega = field.omega();
    let (a0, e0, b0) = field.real_at(t0);
    let (_, _, b1) = field.real_at(t1);
    let drift = -(b1 - b0) / (t1 - t0);
    let v0 = drift + a0;
    let local = e0.norm().max(1e-300);
    let gamma = omega * (2.0 * ip_ion + v0.norm_squared()).sqrt() / local;
    (
        Complex64::new(t1, 0.0),
        Complex64::new(t0, gamma.asinh() / omega),
    )
}

/// Newton from `(t_r, t_i)`; a member if converged and physical.
fn solve_member(
    ctx: &StartContext<'_>,
    omega: f64,
    t_ret: Complex64,
    t_ion: Complex64,
) -> Option<Member> {
    let out = newton::solve(ctx.field, ctx.pair, omega, t_ret, t_ion, &ctx.newton);
    track::physical_start(&out).ok()?;
    Some(Member::new(
        out.t_ret,
        out.t_ion,
        out.eval,
        out.iterations,
        out.residual,
    ))
}

/// Assembles a started pair from two members (any order) at `omega`: long (larger `Re τ`)
/// first, "−" the member with the larger `Re Φ`, ζ on its principal branch.
fn pair_state(
    mut members: [Member; 2],
    omega: f64,
    return_index: u32,
    coalescence: Option<Coalescence>,
    method: StartMethod,
) -> Started {
    if members[0].eval.tau.re < members[1].eval.tau.re {
        members.swap(0, 1);
    }
    let minus = usize::from(members[0].eval.action.re < members[1].eval.action.re);
    let zeta = ZetaBranch::start(
        track::half_difference(&members[minus], &members[1 - minus]),
        omega,
    );
    let label = |branch| FamilyLabel {
        return_index,
        branch,
    };
    Started {
        state: GroupState {
            omega,
            members: members.to_vec(),
            minus,
            zeta: Some(zeta),
        },
        labels: vec![label(Branch::Long), label(Branch::Short)],
        coalescence,
        from_transverse: false,
        method,
    }
}

/// Whether a member converged from the classical trajectory `(t0, t1)` of `group` belongs to
/// it: return time within T/4 and ionization time within T/8 of the classical ones, and the
/// ionization time inside the group's birth window (within T/32). A solve that lands on the
/// orbit of a neighbouring crest (met at the rising edge of a pulse, where births at the
/// window's edge return) would otherwise be tracked as a member of this half cycle's pair.
fn near_seed(m: &Member, t0: f64, t1: f64, group: &SeedGroup, period: f64) -> bool {
    let slack = period / 32.0;
    (m.t_ret.re - t1).abs() <= 0.25 * period
        && (m.t_ion.re - t0).abs() <= 0.125 * period
        && m.t_ion.re >= group.window.start - slack
        && m.t_ion.re <= group.window.end + slack
}

/// Whether two members are distinct saddles (not one saddle reached twice).
fn distinct(a: &Member, b: &Member, omega_ref: f64) -> bool {
    a.distance(b) > 1e-3 / omega_ref
}

/// Strategy 1: both members from classical seeds in mid-plateau.
fn classical_pair(ctx: &StartContext<'_>, group: &SeedGroup) -> Option<Started> {
    let [long, short] =
        [Branch::Long, Branch::Short].map(|b| group.branches.iter().find(|x| x.label.branch == b));
    let (long, short) = (long?, short?);
    let e_max = long.max_energy().max(short.max_energy());
    let w = ctx.field.omega();
    let period = 2.0 * std::f64::consts::PI / w;
    for frac in START_FRACTIONS {
        let kinetic = frac * e_max;
        let omega = ctx.pair.ip_rec + kinetic;
        let mut members = Vec::with_capacity(2);
        for b in [long, short] {
            let Some((t0, t1)) = b.at_energy(kinetic) else {
                break;
            };
            let (sr, si) = seed(ctx.field, ctx.pair.ip_ion, t0, t1);
            let Some(m) = solve_member(ctx, omega, sr, si) else {
                break;
            };
            if !near_seed(&m, t0, t1, group, period) {
                break;
            }
            members.push(m);
        }
        let [l, s] = members.as_slice() else {
            continue;
        };
        if !distinct(l, s, w) || l.eval.tau.re <= s.eval.tau.re {
            continue;
        }
        return Some(pair_state(
            [*l, *s],
            omega,
            group.return_index,
            None,
            StartMethod::ClassicalPair,
        ));
    }
    None
}

/// The coalescence point of `group` found from its classical cutoff trajectory: first from the
/// classical seed itself, then (for weak half cycles, whose returning births lie far from the
/// crest) from a small set of seeds between the birth and the crest, with `Im t_i` from the
/// Keldysh time at the crest and the return time within ±T/8 of the classical one. Returns the
/// accepted point ([`coalescence::plausible`]; the one whose times lie nearest the classical
/// ones if several are) and the first converged point that was rejected.
pub(crate) fn find_coalescence(
    ctx: &StartContext<'_>,
    group: &SeedGroup,
    peak: &ClassicalPeak,
) -> (Option<Coalescence>, Option<Coalescence>) {
    let w = ctx.field.omega();
    let period = 2.0 * std::f64::consts::PI / w;
    let expected = ctx.pair.ip_rec + peak.energy + QUANTUM_SHIFT * ctx.pair.ip_ion;
    let solve = |t_r: Complex64, t_i: Complex64, guess: f64| {
        coalescence::solve(ctx.field, ctx.pair, guess, t_r, t_i, ctx.scale)
    };
    let ok = |c: &Coalescence| {
        coalescence::plausible(c, ctx.pair, peak, &group.window, w, pulse_span(ctx.field))
    };
    let (t_r, t_i) = seed(ctx.field, ctx.pair.ip_ion, peak.birth, peak.return_time);
    let first = solve(t_r, t_i, expected);
    if ok(&first) {
        return (Some(first), None);
    }
    let mut rejected = first.converged.then_some(first);
    let crest_field = group.window.crest_field.max(1e-300);
    let gamma = w * (2.0 * ctx.pair.ip_ion).sqrt() / crest_field;
    let im = gamma.asinh() / w;
    let distance =
        |c: &Coalescence| (c.t_ret.re - peak.return_time).abs() + (c.t_ion.re - peak.birth).abs();
    let mut best: Option<Coalescence> = None;
    for fraction in [1.0, 0.5, 0.0] {
        let t_ion = Complex64::new(group.crest + fraction * (peak.birth - group.crest), im);
        for shift in [0.0, -0.125, 0.125] {
            let t_ret = Complex64::new(peak.return_time + shift * period, 0.0);
            for guess in [expected, ctx.pair.ip_rec + peak.energy] {
                let c = solve(t_ret, t_ion, guess);
                if ok(&c) {
                    if best.is_none_or(|b| distance(&c) < distance(&b)) {
                        best = Some(c);
                    }
                } else if c.converged && rejected.is_none() {
                    rejected = Some(c);
                }
            }
        }
    }
    (best, rejected)
}

/// Strategy 2: the pair split from the half cycle's coalescence point.
fn from_coalescence(
    ctx: &StartContext<'_>,
    group: &SeedGroup,
    peak: &ClassicalPeak,
) -> Option<Started> {
    let (c, _) = find_coalescence(ctx, group, peak);
    split_start(ctx, &c?, group.return_index)
}

/// The two members near `Re Ω_c` from a (checked) coalescence point: just below it, or, when
/// the coalescence lies at or below the recombination threshold (a weak half cycle: every
/// photon energy above Ip is beyond its cutoff), just above the threshold. Started beyond the
/// cutoff, the pair has no plateau from which the Airy variable ζ could be continued: it is
/// then tracked without ζ and summed by the plain saddle sum with the Stokes rule.
pub(crate) fn split_start(
    ctx: &StartContext<'_>,
    c: &Coalescence,
    return_index: u32,
) -> Option<Started> {
    let w = ctx.field.omega();
    let gap = c.omega.re - ctx.pair.ip_rec;
    for factor in [1.0, 2.0, 4.0, 0.5, 8.0] {
        let base = factor * (0.5 * w).max(4.0 * c.omega.im.abs());
        let omega = if gap > 0.0 {
            c.omega.re - (base.max(0.05 * gap)).min(0.5 * gap)
        } else {
            ctx.pair.ip_rec + 0.25 * factor * (0.5 * w).min(base)
        };
        let [g1, g2] = coalescence::split(ctx.field, ctx.pair, c, omega);
        let (Some(a), Some(b)) = (
            solve_member(ctx, omega, g1.0, g1.1),
            solve_member(ctx, omega, g2.0, g2.1),
        ) else {
            continue;
        };
        let guess_gap = modulus(g1.0 - g2.0).max(modulus(g1.1 - g2.1));
        if !distinct(&a, &b, w) || a.distance(&b) < 0.2 * guess_gap {
            continue;
        }
        let mut started = pair_state(
            [a, b],
            omega,
            return_index,
            Some(*c),
            StartMethod::Coalescence,
        );
        if gap <= 0.0 {
            started.state.zeta = None;
        }
        return Some(started);
    }
    None
}

/// The direction of the field at the crest of `group` (the axis of its linear projection).
fn crest_axis(field: &Field, group: &SeedGroup) -> nalgebra::Vector3<f64> {
    let e = field.real_at(group.crest).1;
    let n = e.norm();
    if n > 0.0 { e / n } else { field.axis() }
}

/// The field with its components across `axis` scaled by `s`:
/// `A_s = P A + s(1 − P) A`, `P = ê êᵀ`.
fn transverse_scaled(field: &Field, s: f64, axis: &nalgebra::Vector3<f64>) -> Option<Field> {
    let axis = axis.map(|x| Complex64::new(x, 0.0));
    let modes: Vec<Mode> = field
        .modes()
        .iter()
        .map(|m| {
            let along = axis * crate::field::bdot(&axis, &m.amplitude);
            Mode {
                frequency: m.frequency,
                amplitude: along + (m.amplitude - along) * Complex64::new(s, 0.0),
            }
        })
        .collect();
    Field::from_modes(
        modes,
        field.omega(),
        field.structure(),
        field.axis(),
        field.ponderomotive_energy(),
        field.peak_field(),
    )
    .ok()
}

/// The group of the field's projection on the crest direction of `group` that matches it
/// (same return index, crest within a quarter period), with that projected field.
///
/// The axis is the direction of the field at the group's own crest, not a global one: for an
/// elliptical field it is the major axis; for a field whose lobes point in different
/// directions (a bicircular field) each lobe is projected on itself, so lobes related by a
/// symmetry of the field are continued alike.
fn projected_group(group: &SeedGroup, field: &Field) -> Option<(Field, SeedGroup)> {
    let period = 2.0 * std::f64::consts::PI / field.omega();
    let base = transverse_scaled(field, 0.0, &crest_axis(field, group))?;
    let settings = DiscoverySettings {
        max_returns: group.return_index,
        crest_threshold: 0.0,
        ..DiscoverySettings::default()
    };
    let window = base
        .birth_windows(0.0)
        .into_iter()
        .min_by(|a, b| {
            (a.crest - group.crest)
                .abs()
                .total_cmp(&(b.crest - group.crest).abs())
        })
        .filter(|w| (w.crest - group.crest).abs() < 0.25 * period)?;
    let matching = families::discover_in(&base, &settings, &[window])
        .into_iter()
        .find(|g| g.return_index == group.return_index)?;
    Some((base, matching))
}

/// The coalescence point of `group` in a field with a transverse component, continued in the
/// transverse fraction `s` (`A_s = P A + s(1 − P)A`) from the projection on the major axis
/// (`s = 0`), where it is found from the classical cutoff and checked against it
/// ([`coalescence::plausible`]). Steps in `s` start at 1/8 and are halved (down to 10⁻⁴) when
/// the solve does not converge or moves either time by more than T/10 or Ω by more than
/// `(Up + Ip)/10`; the end point must ionize after the crest's window opens, return after it
/// ionizes and (for a pulse) lie inside the pulse.
pub(crate) fn transverse_coalescence(
    ctx: &StartContext<'_>,
    group: &SeedGroup,
) -> Option<Coalescence> {
    let period = 2.0 * std::f64::consts::PI / ctx.field.omega();
    let axis = crest_axis(ctx.field, group);
    let (base, matching) = projected_group(group, ctx.field)?;
    let base_ctx = StartContext {
        field: &base,
        ..*ctx
    };
    let (found, _) = find_coalescence(&base_ctx, &matching, &matching.peak?);
    let mut c = found?;
    let (mut s, mut h) = (0.0f64, 0.125f64);
    while s < 1.0 {
        if h < 1e-4 {
            return None;
        }
        let next = (s + h).min(1.0);
        let field = transverse_scaled(ctx.field, next, &axis)?;
        let n = coalescence::solve_from(&field, ctx.pair, c.omega, c.t_ret, c.t_ion, ctx.scale);
        let moved = modulus(n.t_ret - c.t_ret).max(modulus(n.t_ion - c.t_ion));
        if n.converged && moved < 0.1 * period && modulus(n.omega - c.omega) < 0.1 * ctx.scale {
            c = n;
            s = next;
            h = (1.5 * h).min(0.125);
        } else {
            h *= 0.5;
        }
    }
    let inside = pulse_span(ctx.field).is_none_or(|(a, b)| c.t_ion.re >= a && c.t_ret.re <= b);
    (c.t_ion.im > 0.0 && (c.t_ret - c.t_ion).re > 0.0 && c.omega.re > 0.0 && inside).then_some(c)
}

/// Strategy 3: start on the field's projection on its major axis and continue in the
/// transverse fraction `s` from 0 to 1 at fixed Ω.
fn transverse_continuation(ctx: &StartContext<'_>, group: &SeedGroup) -> Option<Started> {
    let w = ctx.field.omega();
    let axis = crest_axis(ctx.field, group);
    let (base, matching) = projected_group(group, ctx.field)?;
    let matching = &matching;
    let base_ctx = StartContext {
        field: &base,
        ..*ctx
    };
    let started = classical_pair(&base_ctx, matching).or_else(|| {
        matching
            .peak
            .and_then(|p| from_coalescence(&base_ctx, matching, &p))
    })?;
    let omega = started.state.omega;
    let mut times: Vec<(Complex64, Complex64)> = started
        .state
        .members
        .iter()
        .map(|m| (m.t_ret, m.t_ion))
        .collect();
    let (mut s, mut h) = (0.0f64, 0.125f64);
    let mut steps = 0;
    while s < 1.0 {
        steps += 1;
        if steps > 4000 || h < 1e-5 {
            return None;
        }
        let next = (s + h).min(1.0);
        let field = if next == 1.0 {
            ctx.field.clone()
        } else {
            transverse_scaled(ctx.field, next, &axis)?
        };
        let step_ctx = StartContext {
            field: &field,
            ..*ctx
        };
        let separation = modulus(times[0].0 - times[1].0).max(modulus(times[0].1 - times[1].1));
        let moved: Option<Vec<(Complex64, Complex64)>> = times
            .iter()
            .map(|&(r, i)| {
                let m = solve_member(&step_ctx, omega, r, i)?;
                let shift = modulus(m.t_ret - r).max(modulus(m.t_ion - i));
                (shift < 0.25 * separation).then_some((m.t_ret, m.t_ion))
            })
            .collect();
        match moved {
            Some(t) => {
                times = t;
                s = next;
                h = (1.5 * h).min(0.125);
            }
            None => h *= 0.5,
        }
    }
    let members: Vec<Member> = times
        .iter()
        .map(|&(r, i)| {
            let e = evaluate(ctx.field, ctx.pair, omega, r, i);
            Member::new(r, i, e, 0, newton::relative_residual(&e, ctx.scale))
        })
        .collect();
    let [a, b] = [members[0], members[1]];
    if !distinct(&a, &b, w) {
        return None;
    }
    Some(pair_state(
        [a, b],
        omega,
        group.return_index,
        None,
        StartMethod::TransverseContinuation,
    ))
}

/// Strategy 4: one classical branch alone.
fn lone(ctx: &StartContext<'_>, group: &SeedGroup) -> Option<Started> {
    let period = 2.0 * std::f64::consts::PI / ctx.field.omega();
    for b in &group.branches {
        for frac in START_FRACTIONS {
            let kinetic = frac * b.max_energy();
            let omega = ctx.pair.ip_rec + kinetic;
            let Some((t0, t1)) = b.at_energy(kinetic) else {
                continue;
            };
            let (sr, si) = seed(ctx.field, ctx.pair.ip_ion, t0, t1);
            let Some(m) = solve_member(ctx, omega, sr, si) else {
                continue;
            };
            if !near_seed(&m, t0, t1, group, period) {
                continue;
            }
            return Some(Started {
                state: GroupState {
                    omega,
                    members: vec![m],
                    minus: 0,
                    zeta: None,
                },
                labels: vec![b.label],
                coalescence: None,
                from_transverse: false,
                method: StartMethod::Lone,
            });
        }
    }
    None
}

/// The start and end of a pulse (None for a periodic field).
fn pulse_span(field: &Field) -> Option<(f64, f64)> {
    match field.structure() {
        crate::field::TimeStructure::Pulse { start, end } => Some((start, end)),
        crate::field::TimeStructure::Periodic { .. } => None,
    }
}

#[cfg(test)]
mod tests {
    //! The fallback strategies, which the sweep of `examples/orbit_sweep` never needs (the
    //! classical pair or the coalescence point always start first there), checked directly:
    //! each must land on the saddles that the other strategies find.
    use super::*;
    use crate::field::{Colour, Envelope, Polarization};

    fn elliptical(eps: f64) -> Field {
        Field::new(
            &[Colour {
                omega: 0.057,
                peak_field: 0.065,
                phase: 0.0,
                polarization: Polarization::Elliptical {
                    ellipticity: eps,
                    major_axis: 0.0,
                },
            }],
            Envelope::Continuous,
        )
        .unwrap()
    }

    fn context(field: &Field, pair: ChannelPair) -> StartContext<'_> {
        let scale = field.ponderomotive_energy() + pair.ip_ion;
        StartContext {
            field,
            pair,
            newton: NewtonSettings {
                tolerance: 1e-11,
                max_iterations: 60,
                energy_scale: scale,
                max_step: 0.5 / field.omega(),
            },
            scale,
        }
    }

    /// The long and short saddles of the table of `field` at `omega`, half cycle 0.
    fn tracked(field: &Field, pair: ChannelPair, omega: f64) -> Vec<(Complex64, Complex64)> {
        let t = super::super::solve_orbits(field, pair, &[omega], &Default::default()).unwrap();
        t.families
            .iter()
            .filter(|f| f.half_cycle == 0)
            .map(|f| {
                let s = f.points[0].saddle().unwrap();
                (s.t_ret, s.t_ion)
            })
            .collect()
    }

    #[test]
    fn transverse_continuation_lands_on_the_tracked_pair() {
        for eps in [0.4, 0.8] {
            let field = elliptical(eps);
            let pair = ChannelPair::single(0.5);
            let ctx = context(&field, pair);
            let groups = families::discover(&field, &DiscoverySettings::default());
            let group = groups.iter().find(|g| g.half_cycle == 0).unwrap();
            let s = transverse_continuation(&ctx, group).expect("continued");
            assert_eq!(s.method, StartMethod::TransverseContinuation);
            let reference = tracked(&field, pair, s.state.omega);
            for (m, label) in s.state.members.iter().zip(&s.labels) {
                assert!(newton::relative_residual(&m.eval, ctx.scale) < 1e-9);
                let slot = usize::from(label.branch == Branch::Short);
                let (r, i) = reference[slot];
                assert!(
                    modulus(m.t_ret - r).max(modulus(m.t_ion - i)) < 1e-6,
                    "ε = {eps}, {label}"
                );
            }
        }
    }

    #[test]
    fn lone_start_lands_on_its_family() {
        let field = elliptical(0.0);
        let pair = ChannelPair::single(0.5);
        let ctx = context(&field, pair);
        let groups = families::discover(&field, &DiscoverySettings::default());
        let mut group = groups.iter().find(|g| g.half_cycle == 0).unwrap().clone();
        group.branches.retain(|b| b.label.branch == Branch::Short);
        let s = lone(&ctx, &group).expect("lone start");
        assert_eq!(s.labels[0].branch, Branch::Short);
        let m = &s.state.members[0];
        let (r, i) = tracked(&field, pair, s.state.omega)[1];
        assert!(modulus(m.t_ret - r).max(modulus(m.t_ion - i)) < 1e-6);
    }
}
