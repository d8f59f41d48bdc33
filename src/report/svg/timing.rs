//! One row per orbit family of the reference channel: emission times `Re t_r` with the
//! family's own group delays `dφ/dΩ`, the harmonic phase with its linear part removed, and the
//! attochirp.
//!
//! **Attochirp.** The slope `d(Re t_r)/dΩ` of the emission time against photon energy, in
//! as/eV, from a least-squares straight line over the plateau of the strongest half cycle:
//! the grid energies from the first up to `Ip + 0.8 (Ω_c − Ip)`, with `Ω_c` that half cycle's
//! cutoff, which leaves out the bend of the emission time near the cutoff (Mairesse et al.,
//! Science 302, 1540 (2003), and Kazamias and Balcou, PRA 69, 063416 (2004), measure it as
//! this slope, from memory). Positive for short orbits, negative for long ones.
//!
//! **Which half cycles.** A half-wave symmetric field repeats every half cycle with the
//! opposite sign: the strongest one stands for all. Other periodic fields (ω + 2ω): every half
//! cycle. Pulses: the strongest half cycles, at most [`MAX_PULSE_HALF_CYCLES`] and each with at
//! least [`PULSE_SHARE`] of the strongest one's peak power; the others are counted in the
//! legend.
//!
//! **Group delays.** Only per family (where one saddle dominates, `dφ/dΩ` is its `Re t_r`, a
//! check); points outside the emission-time range, near the cutoff where the uniform sum mixes
//! the two orbits, are counted, not drawn. The total's group delay, which jumps wherever half
//! cycles or families interfere destructively, is in the data files only.

use plotters::style::text_anchor::{HPos, VPos};

use super::canvas::{Area, Drawn, Frame, linear_ticks, order_ticks, text, text_style};
use super::legend::{self, Entry, Mark};
use super::palette::{Dash, INK, LineStyle};
use super::spectrum::norm2;
use super::{FigureContext, LEGEND_LEFT, LEGEND_WIDTH, PLOT_LEFT, PLOT_RIGHT};
use crate::multichannel::MultichannelSpectrum;
use crate::spectrum::{Contribution, project};
use crate::units;

/// At most this many half cycles per family are drawn for a pulse.
pub const MAX_PULSE_HALF_CYCLES: usize = 4;
/// A pulse's half cycle is drawn when its family's peak power is at least this share of the
/// strongest half cycle's.
pub const PULSE_SHARE: f64 = 0.01;
/// The plateau fit runs to `Ip + PLATEAU_FRACTION (Ω_c − Ip)`.
pub const PLATEAU_FRACTION: f64 = 0.8;
/// At most this many group-delay circles per curve (fine grids are thinned evenly).
pub const MAX_CIRCLES: usize = 45;

const ROW_FRAME: f64 = 220.0;
const ABOVE: f64 = 34.0;
const BELOW: f64 = 56.0;
const GAP: f64 = 95.0;

/// A least-squares line `y = a + b x`.
fn fit(pts: &[(f64, f64)]) -> Option<(f64, f64)> {
    let n = pts.len() as f64;
    if pts.len() < 3 {
        return None;
    }
    let (sx, sy) = pts.iter().fold((0.0, 0.0), |(a, b), p| (a + p.0, b + p.1));
    let (mx, my) = (sx / n, sy / n);
    let sxx: f64 = pts.iter().map(|p| (p.0 - mx).powi(2)).sum();
    let sxy: f64 = pts.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum();
    (sxx > 0.0).then(|| {
        let b = sxy / sxx;
        (my - b * mx, b)
    })
}

/// Attochirp (as/eV) from `(photon energy eV, Re t_r fs)` points.
pub fn attochirp(points_ev_fs: &[(f64, f64)]) -> Option<f64> {
    let as_pts: Vec<(f64, f64)> = points_ev_fs.iter().map(|p| (p.0, 1e3 * p.1)).collect();
    fit(&as_pts).map(|(_, b)| b)
}

/// One half cycle of one family.
struct Member {
    half_cycle: i32,
    style: LineStyle,
    /// (order, Re t_r fs).
    times: Vec<(f64, f64)>,
    /// (order, dφ/dΩ fs).
    delays: Vec<(f64, f64)>,
    /// (order, φ − linear fit) rad, in runs.
    phase: Vec<(f64, f64)>,
}

/// One family's row.
pub(super) struct FamilyRow {
    label: String,
    members: Vec<Member>,
    /// Fit line over the plateau: (order range, (a, b) in fs vs order).
    fit_line: Option<((f64, f64), (f64, f64))>,
    entries: Vec<Entry>,
    time_range: (f64, f64),
    phase_range: (f64, f64),
}

/// Unwrapped phase of a contribution along the grid, steered by its emission time: each step
/// adds the predicted increment `½(τ_k + τ_{k+1}) ΔΩ` (`τ = Re t_r`) plus the measured difference from it
/// wrapped to `(−π, π]`. Also returns the orders where that difference exceeds π/2 (a jump the
/// orbit does not predict: a sign change of the dipole, such as a structural minimum).
fn unwrapped_phase(s: &MultichannelSpectrum, con: &Contribution) -> (Vec<Option<f64>>, Vec<f64>) {
    let mut out: Vec<Option<f64>> = vec![None; s.energies.len()];
    let mut jumps = Vec::new();
    let mut prev: Option<(usize, f64)> = None;
    for (k, slot) in out.iter_mut().enumerate() {
        let Some(d) = con.dipole[k].filter(|d| norm2(d) > 0.0) else {
            prev = None;
            continue;
        };
        let raw = project(&s.axis, &d).arg();
        let value = match prev {
            None => raw,
            Some((j, pj)) => {
                // Re t_r is the smooth part of dφ/dΩ (the saddle's own clock); the family's
                // group delay also carries the structure's phase, which spikes where the
                // dipole changes sign, so it would hide exactly the steps worth showing.
                let slope = |i: usize| con.emission_time[i].or(con.group_delay[i]);
                let predicted = match (slope(j), slope(k)) {
                    (Some(a), Some(b)) => 0.5 * (a + b) * (s.energies[k] - s.energies[j]),
                    _ => 0.0,
                };
                let target = pj + predicted;
                let turns = ((target - raw) / std::f64::consts::TAU).round();
                let value = raw + turns * std::f64::consts::TAU;
                if (value - target).abs() > 0.5 * std::f64::consts::PI {
                    jumps.push(s.energies[k] / s.omega);
                }
                value
            }
        };
        *slot = Some(value);
        prev = Some((k, value));
    }
    (out, jumps)
}

/// The rows of the reference channel's families.
pub(super) fn family_rows(
    s: &MultichannelSpectrum,
    ctx: &FigureContext,
    _x: (f64, f64),
) -> Result<Vec<FamilyRow>, String> {
    let Some(pair) = s
        .pairs
        .iter()
        .find(|p| p.ion == s.reference && p.rec == s.reference)
    else {
        return Ok(Vec::new());
    };
    let reference = s.labels.get(s.reference).cloned().unwrap_or_default();
    let orders: Vec<f64> = s.energies.iter().map(|e| e / s.omega).collect();
    let mut labels: Vec<crate::orbits::FamilyLabel> = Vec::new();
    for c in &pair.families {
        if !labels.contains(&c.label) {
            labels.push(c.label);
        }
    }
    labels.sort_by_key(|l| (l.return_index, l.branch == crate::orbits::Branch::Long));
    let pulse = !ctx.split_half_cycles && !ctx.half_wave_symmetric;
    let mut rows = Vec::new();
    for label in labels {
        let mut members: Vec<(&Contribution, f64)> = pair
            .families
            .iter()
            .filter(|c| c.label == label)
            .map(|c| {
                let peak = (0..orders.len())
                    .filter_map(|k| c.dipole[k].map(|d| s.energies[k].powi(4) * norm2(&d)))
                    .fold(0.0, f64::max);
                (c, peak)
            })
            .filter(|m| m.1 > 0.0)
            .collect();
        if members.is_empty() {
            continue;
        }
        members.sort_by(|a, b| {
            b.1.total_cmp(&a.1)
                .then(a.0.half_cycle.cmp(&b.0.half_cycle))
        });
        let strongest = members[0].1;
        let total_members = members.len();
        let mut entries = Vec::new();
        let mut note = None;
        if ctx.half_wave_symmetric {
            members.truncate(1);
            if total_members > 1 {
                note = Some(format!(
                    "the other half cycle repeats half cycle {} a half period later with the \
                     opposite sign (half-wave symmetric field)",
                    members[0].0.half_cycle
                ));
            }
        } else if pulse {
            members.retain(|m| m.1 >= PULSE_SHARE * strongest);
            members.truncate(MAX_PULSE_HALF_CYCLES);
            let left = total_members - members.len();
            if left > 0 {
                note = Some(format!(
                    "{left} weaker half cycles not drawn (at most {MAX_PULSE_HALF_CYCLES}, each \
                     with at least {:.0}% of the strongest one's peak power; all are in the \
                     data files)",
                    100.0 * PULSE_SHARE
                ));
            }
        }
        members.sort_by_key(|m| m.0.half_cycle);
        let strongest_hc = pair
            .families
            .iter()
            .filter(|c| c.label == label)
            .max_by(|a, b| {
                let p = |c: &Contribution| {
                    (0..orders.len())
                        .filter_map(|k| c.dipole[k].map(|d| s.energies[k].powi(4) * norm2(&d)))
                        .fold(0.0, f64::max)
                };
                p(a).total_cmp(&p(b))
            })
            .map(|c| c.half_cycle)
            .unwrap_or(0);
        // Plateau of the strongest half cycle.
        let plateau_top = ctx
            .cutoff_of(strongest_hc)
            .map(|c| ctx.ip_reference + PLATEAU_FRACTION * (c - ctx.ip_reference));
        let mut built = Vec::new();
        let mut fit_line = None;
        let mut clipped = 0usize;
        let mut attochirp_text = None;
        let mut jump_notes: Vec<(String, Vec<i32>)> = Vec::new();
        let mut circle_stride = 1;
        for (j, (con, _)) in members.iter().enumerate() {
            let style = LineStyle::nth(j).with_dots(false);
            let physical = |k: usize| con.dipole[k].is_some_and(|d| norm2(&d) > 0.0);
            let times: Vec<(f64, f64)> = (0..orders.len())
                .filter(|&k| physical(k))
                .filter_map(|k| con.emission_time[k].map(|t| (orders[k], units::au_to_fs(t))))
                .collect();
            let every = orders.len().div_ceil(MAX_CIRCLES).max(1);
            circle_stride = every;
            let delays: Vec<(f64, f64)> = (0..orders.len())
                .filter(|&k| physical(k) && k % every == 0)
                .filter_map(|k| con.group_delay[k].map(|t| (orders[k], units::au_to_fs(t))))
                .collect();
            let (phase, jumps) = unwrapped_phase(s, con);
            if !jumps.is_empty() {
                let list: Vec<String> = jumps.iter().map(|q| format!("H{q:.1}")).collect();
                let list = list.join(", ");
                match jump_notes.iter_mut().find(|(l, _)| *l == list) {
                    Some((_, hcs)) => hcs.push(con.half_cycle),
                    None => jump_notes.push((list, vec![con.half_cycle])),
                }
            }
            let in_plateau = |k: usize| plateau_top.is_none_or(|top| s.energies[k] <= top);
            // Linear part of the phase over the plateau (rad vs a.u. energy).
            let lin = fit(&(0..orders.len())
                .filter(|&k| in_plateau(k))
                .filter_map(|k| phase[k].map(|p| (s.energies[k], p)))
                .collect::<Vec<_>>());
            let residual: Vec<(f64, f64)> = match lin {
                Some((a, b)) => (0..orders.len())
                    .filter_map(|k| phase[k].map(|p| (orders[k], p - a - b * s.energies[k])))
                    .collect(),
                None => Vec::new(),
            };
            if con.half_cycle == strongest_hc {
                let pts: Vec<(f64, f64)> = (0..orders.len())
                    .filter(|&k| physical(k) && in_plateau(k))
                    .filter_map(|k| {
                        con.emission_time[k]
                            .map(|t| (units::au_to_ev(s.energies[k]), units::au_to_fs(t)))
                    })
                    .collect();
                let ev = units::au_to_ev(s.omega);
                match fit(&pts).zip(attochirp(&pts)) {
                    Some(((a, b), chirp)) => {
                        let (e0, e1) = pts
                            .iter()
                            .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), p| {
                                (l.min(p.0), h.max(p.0))
                            });
                        // In orders: t = a + b ev·q.
                        fit_line = Some(((e0 / ev, e1 / ev), (a, b * ev)));
                        attochirp_text = Some(format!(
                            "attochirp {:+.1} as/eV: slope of a straight line fitted to Re t_r of \
                             half cycle {} over H{:.1}–H{:.1} ({:.1}–{:.1} eV; the plateau up to \
                             Ip + {PLATEAU_FRACTION}(Ω_c − Ip))",
                            chirp,
                            con.half_cycle,
                            e0 / ev,
                            e1 / ev,
                            e0,
                            e1
                        ));
                    }
                    None => {
                        attochirp_text = Some(format!(
                            "attochirp: fewer than 3 plateau points of half cycle {} (refine the \
                             grid with --orders)",
                            con.half_cycle
                        ))
                    }
                }
            }
            built.push(Member {
                half_cycle: con.half_cycle,
                style,
                times,
                delays,
                phase: residual,
            });
        }
        // Ranges from the emission times only; group delays outside are counted.
        let (t0, t1) = built
            .iter()
            .flat_map(|m| m.times.iter())
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| {
                (a.min(p.1), b.max(p.1))
            });
        if !t0.is_finite() {
            continue;
        }
        let pad = 0.06 * (t1 - t0).max(0.05);
        let time_range = (t0 - pad, t1 + pad);
        for m in &built {
            clipped += m
                .delays
                .iter()
                .filter(|p| p.1 < time_range.0 || p.1 > time_range.1)
                .count();
        }
        let (p0, p1) = built
            .iter()
            .flat_map(|m| m.phase.iter())
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| {
                (a.min(p.1), b.max(p.1))
            });
        let phase_range = if p0.is_finite() {
            let pad = 0.06 * (p1 - p0).max(0.1);
            (p0 - pad, p1 + pad)
        } else {
            (-1.0, 1.0)
        };
        for m in &built {
            entries.push(Entry::line(
                m.style,
                format!(
                    "half cycle {}: Re t_r (line), dφ/dΩ (circles)",
                    m.half_cycle
                ),
            ));
        }
        if circle_stride > 1 {
            entries.push(Entry::note(format!(
                "circles at every {circle_stride}th grid point (at most {MAX_CIRCLES} per curve)"
            )));
        }
        if fit_line.is_some() {
            entries.push(Entry::line(
                fit_style(),
                "straight-line fit over the plateau".to_string(),
            ));
        }
        if let Some(t) = attochirp_text {
            entries.push(Entry {
                mark: Mark::Note,
                label: t,
            });
        }
        if clipped > 0 {
            entries.push(Entry::note(format!(
                "{clipped} group delay{} outside the emission-time range not drawn (near the \
                 cutoff, where the uniform sum mixes both orbits)",
                if clipped == 1 { "" } else { "s" }
            )));
        }
        for (list, hcs) in jump_notes {
            let hcs: Vec<String> = hcs.iter().map(i32::to_string).collect();
            entries.push(Entry::note(format!(
                "half cycle {}: phase steps over π/2 that Re t_r does not predict at {list} — a \
                 sign change of the dipole, e.g. a structural minimum (each step is ambiguous by \
                 2π)",
                hcs.join(", ")
            )));
        }
        if let Some(n) = note {
            entries.push(Entry::note(n));
        }
        rows.push(FamilyRow {
            label: format!("{label} orbits, channel {reference} (ionized and recombined)"),
            members: built,
            fit_line,
            entries,
            time_range,
            phase_range,
        });
    }
    Ok(rows)
}

fn fit_style() -> LineStyle {
    LineStyle {
        colour: INK,
        width: 1,
        dash: Dash::Dashed,
        dots: false,
    }
}

impl FamilyRow {
    /// Height of the row (px): the frames or the legend, whichever is taller.
    pub(super) fn height(&self) -> f64 {
        (ABOVE + ROW_FRAME + BELOW).max(legend::height(&self.entries, LEGEND_WIDTH) + ABOVE + 10.0)
    }

    /// Draws the row with its top at `top`.
    pub(super) fn draw(&self, root: &Area, top: f64, ctx: &FigureContext, x: (f64, f64)) -> Drawn {
        let half = 0.5 * (PLOT_RIGHT - PLOT_LEFT - GAP);
        text(
            root,
            &self.label,
            PLOT_LEFT,
            top + 8.0,
            &text_style(14, INK, HPos::Left, VPos::Top),
        )?;
        let times = Frame {
            left: PLOT_LEFT,
            top: top + ABOVE,
            width: half,
            height: ROW_FRAME,
            x,
            y: self.time_range,
        };
        times.axes(
            root,
            &order_ticks(x.0, x.1, ctx.odd_orders)
                .into_iter()
                .filter(|t| !t.1.is_empty())
                .collect::<Vec<_>>(),
            &linear_ticks(self.time_range.0, self.time_range.1, 6),
            "harmonic order Ω/ω",
            "emission time (fs from t = 0)",
        )?;
        let phase = Frame {
            left: PLOT_LEFT + half + GAP,
            top: top + ABOVE,
            width: half,
            height: ROW_FRAME,
            x,
            y: self.phase_range,
        };
        phase.axes(
            root,
            &order_ticks(x.0, x.1, ctx.odd_orders)
                .into_iter()
                .filter(|t| !t.1.is_empty())
                .collect::<Vec<_>>(),
            &linear_ticks(self.phase_range.0, self.phase_range.1, 6),
            "harmonic order Ω/ω",
            "phase − linear fit (rad)",
        )?;
        for m in &self.members {
            times.line(root, &m.times, &m.style)?;
            times.dots(root, &m.delays, m.style.colour, 3)?;
            phase.line(root, &m.phase, &m.style)?;
        }
        if let Some(((q0, q1), (a, b))) = self.fit_line {
            times.line(root, &[(q0, a + b * q0), (q1, a + b * q1)], &fit_style())?;
        }
        legend::draw(root, &self.entries, LEGEND_LEFT, top + ABOVE, LEGEND_WIDTH)
    }
}
