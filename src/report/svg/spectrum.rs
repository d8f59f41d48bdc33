//! The spectrum figure: emitted power with its family contributions and cutoffs, the channel
//! pairs (when there are several), then a row per orbit family with its emission times, its
//! harmonic phase and its attochirp ([`super::timing`]).

use std::collections::BTreeMap;

use plotters::prelude::*;

use super::canvas::{Area, Frame, Tick, decade_ticks, linear_ticks, order_ticks, superscript};
use super::legend::{self, Entry};
use super::palette::{Dash, GREY, LineStyle};
use super::{
    FigureContext, LEGEND_LEFT, LEGEND_WIDTH, PLOT_LEFT, PLOT_RIGHT, WIDTH, draw_title,
    title_height,
};
use crate::field::CVec3;
use crate::multichannel::MultichannelSpectrum;
use crate::report::spectrum::label_sums;

/// Values this many decades below a panel's largest are not drawn (their count is noted).
pub const DECADES_SHOWN: f64 = 16.0;

/// A labelled curve of positive values against harmonic order.
pub struct Curve {
    /// Style.
    pub style: LineStyle,
    /// Legend text.
    pub label: String,
    /// (order, value) points in grid order; non-positive or non-finite values are gaps.
    pub pts: Vec<(f64, f64)>,
}

pub(super) fn norm2(v: &CVec3) -> f64 {
    v.iter().map(|c| c.norm_sqr()).sum()
}

/// Layout of one log panel: frame top and height, total height with axes and legend.
const PANEL_HEIGHT: f64 = 330.0;
const ABOVE: f64 = 50.0;
const BELOW: f64 = 56.0;

/// The family curves of the total: one per family label (summed over pairs and half cycles),
/// or per family label and half cycle when half cycles differ.
fn family_curves(s: &MultichannelSpectrum, ctx: &FigureContext, coarse: bool) -> Vec<Curve> {
    let orders: Vec<f64> = s.energies.iter().map(|e| e / s.omega).collect();
    let power = |k: usize, d: &CVec3| s.energies[k].powi(4) * norm2(d);
    let mut out = Vec::new();
    if ctx.split_half_cycles {
        let mut sums: BTreeMap<(String, i32), Vec<Option<CVec3>>> = BTreeMap::new();
        for pair in &s.pairs {
            for c in &pair.families {
                let e = sums
                    .entry((c.label.to_string(), c.half_cycle))
                    .or_insert_with(|| vec![None; s.energies.len()]);
                for (acc, d) in e.iter_mut().zip(&c.dipole) {
                    if let Some(d) = d {
                        *acc = Some(acc.unwrap_or_else(CVec3::zeros) + d);
                    }
                }
            }
        }
        for (i, ((label, hc), v)) in sums.into_iter().enumerate() {
            out.push(Curve {
                style: LineStyle::nth(i).with_dots(coarse),
                label: format!("{label} orbits of half cycle {hc}"),
                pts: (0..orders.len())
                    .filter_map(|k| v[k].map(|d| (orders[k], power(k, &d))))
                    .collect(),
            });
        }
    } else {
        for (i, (label, v)) in label_sums(s).into_iter().enumerate() {
            out.push(Curve {
                style: LineStyle::nth(i).with_dots(coarse),
                label: format!("{label} orbits (every half cycle)"),
                pts: (0..orders.len())
                    .filter_map(|k| v[k].map(|d| (orders[k], power(k, &d))))
                    .collect(),
            });
        }
    }
    out
}

/// Spectrum figure as SVG text.
///
/// # Errors
/// Text naming the reason when there is nothing to draw or plotting fails.
pub fn spectrum_figure(s: &MultichannelSpectrum, ctx: &FigureContext) -> Result<String, String> {
    let orders: Vec<f64> = s.energies.iter().map(|e| e / s.omega).collect();
    let n = orders.len();
    if n == 0 {
        return Err("nothing to plot: no photon energy".into());
    }
    let power = |k: usize, v: &CVec3| s.energies[k].powi(4) * norm2(v);
    let (x0, x1) = orders
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &q| {
            (a.min(q), b.max(q))
        });
    let x = if x1 > x0 {
        (x0, x1)
    } else {
        (x0 - 1.0, x0 + 1.0)
    };
    let coarse = orders.windows(2).all(|w| w[1] - w[0] >= 0.5);
    let total: Vec<(f64, f64)> = (0..n).map(|k| (orders[k], power(k, &s.total[k]))).collect();
    if !total.iter().any(|p| p.1 > 0.0 && p.1.is_finite()) {
        return Err("nothing to plot: the spectrum is zero everywhere".into());
    }

    let mut top_curves = vec![Curve {
        style: LineStyle::total().with_dots(coarse),
        label: "total (coherent sum)".into(),
        pts: total.clone(),
    }];
    top_curves.extend(family_curves(s, ctx, coarse));
    let markers: Vec<(LineStyle, String, f64)> = ctx
        .markers
        .iter()
        .enumerate()
        .map(|(i, m)| {
            (
                LineStyle {
                    colour: GREY,
                    width: 1,
                    // The first marker (classical cutoff) dashed, the others in turn.
                    dash: [Dash::Dashed, Dash::DashDot, Dash::Dotted, Dash::Solid][i % 4],
                    dots: false,
                },
                format!(
                    "{}: H{:.1} ({:.1} eV)",
                    m.label,
                    m.order,
                    m.order * ctx.photon_ev
                ),
                m.order,
            )
        })
        .collect();

    let several = s.pairs.len() > 1;
    let mut pair_curves = Vec::new();
    if several {
        pair_curves.push(Curve {
            style: LineStyle::total().with_dots(coarse),
            label: "total (coherent sum over pairs)".into(),
            pts: total.clone(),
        });
        pair_curves.push(Curve {
            style: LineStyle::reference().with_dots(coarse),
            label: "sum of the pairs' powers (what the channels would give without \
                    interfering)"
                .into(),
            pts: (0..n)
                .map(|k| {
                    (
                        orders[k],
                        s.pairs.iter().map(|p| power(k, &p.dipole[k])).sum(),
                    )
                })
                .collect(),
        });
        for (p, pair) in s.pairs.iter().enumerate() {
            pair_curves.push(Curve {
                style: LineStyle::nth(p).with_dots(coarse),
                label: format!(
                    "{}→{}: ionized in {}, recombined into {}",
                    s.labels[pair.ion], s.labels[pair.rec], s.labels[pair.ion], s.labels[pair.rec]
                ),
                pts: (0..n)
                    .map(|k| (orders[k], power(k, &pair.dipole[k])))
                    .collect(),
            });
        }
    }

    // Heights: title, panels (each at least as tall as its legend), family rows.
    let rows = super::timing::family_rows(s, ctx, x)?;
    let top_legend = legend_entries(&top_curves, &markers, x);
    let pair_legend = legend_entries(&pair_curves, &[], x);
    let title_h = title_height(ctx);
    let panel_h = |entries: &[Entry]| {
        (ABOVE + PANEL_HEIGHT + BELOW).max(legend::height(entries, LEGEND_WIDTH) + 20.0)
    };
    let h_top = panel_h(&top_legend.0);
    let h_pairs = if several {
        panel_h(&pair_legend.0)
    } else {
        0.0
    };
    let h_rows: f64 = rows.iter().map(|r| r.height()).sum();
    let height = (title_h + h_top + h_pairs + h_rows + 10.0).ceil() as u32;

    let mut text = String::new();
    {
        let root = SVGBackend::with_string(&mut text, (WIDTH, height)).into_drawing_area();
        root.fill(&WHITE).map_err(super::canvas::err)?;
        draw_title(&root, ctx)?;
        let mut y = title_h;
        log_panel(
            &root,
            y,
            ctx,
            x,
            &top_curves,
            &markers,
            &top_legend,
            "emitted power Ω⁴|D|² (arb. units)",
        )?;
        y += h_top;
        if several {
            log_panel(
                &root,
                y,
                ctx,
                x,
                &pair_curves,
                &[],
                &pair_legend,
                "Ω⁴|D_pair|² of each channel pair (arb. units)",
            )?;
            y += h_pairs;
        }
        for row in &rows {
            row.draw(&root, y, ctx, x)?;
            y += row.height();
        }
        root.present().map_err(super::canvas::err)?;
    }
    Ok(text)
}

/// The y range (log10) of a set of curves: from the decade below the smallest value within
/// [`DECADES_SHOWN`] of the largest to the decade above the largest.
fn log_range(curves: &[Curve]) -> Option<(f64, f64)> {
    let logs: Vec<f64> = curves
        .iter()
        .flat_map(|c| c.pts.iter().map(|p| p.1))
        .filter(|v| v.is_finite() && *v > 0.0)
        .map(f64::log10)
        .collect();
    let hi = logs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if !hi.is_finite() {
        return None;
    }
    let lo = logs
        .iter()
        .copied()
        .filter(|l| *l >= hi - DECADES_SHOWN)
        .fold(hi, f64::min);
    let (mut a, mut b) = (lo.floor(), hi.ceil());
    if b - hi < 0.15 {
        b += 1.0;
    }
    if lo - a < 0.15 {
        a -= 1.0;
    }
    Some((a, b))
}

/// Whether two curves have the same points within 0.1% (relative) at every order.
fn coincide(a: &Curve, b: &Curve) -> bool {
    a.pts.len() == b.pts.len()
        && a.pts
            .iter()
            .zip(&b.pts)
            .all(|(p, q)| p.0 == q.0 && (p.1 - q.1).abs() <= 1e-3 * p.1.abs().max(q.1.abs()))
}

/// Legend entries of a log panel (curves, markers, and notes on what is not drawn), and the
/// y range.
fn legend_entries(
    curves: &[Curve],
    markers: &[(LineStyle, String, f64)],
    x: (f64, f64),
) -> (Vec<Entry>, Option<(f64, f64)>) {
    let range = log_range(curves);
    let mut entries = Vec::new();
    let mut hidden = Vec::new();
    let mut clipped = 0usize;
    let mut drawn: Vec<&Curve> = Vec::new();
    for c in curves {
        let floor = range.map_or(f64::INFINITY, |r| 10f64.powf(r.0));
        let shown = c
            .pts
            .iter()
            .filter(|p| p.1.is_finite() && p.1 >= floor)
            .count();
        clipped += c.pts.len() - shown;
        if shown == 0 {
            hidden.push(c.label.clone());
        } else {
            entries.push(Entry::line(c.style, c.label.clone()));
            if let Some(twin) = drawn.iter().find(|d| coincide(d, c)) {
                entries.push(Entry::note(format!(
                    "the line above coincides with \"{}\" (within 0.1% everywhere): drawn on \
                     top of each other",
                    twin.label
                )));
            }
            drawn.push(c);
        }
    }
    for (style, label, at) in markers {
        if *at >= x.0 && *at <= x.1 {
            entries.push(Entry::line(*style, label.clone()));
        } else {
            entries.push(Entry::note(format!("{label}: outside the computed range")));
        }
    }
    if let Some((lo, _)) = range {
        if clipped > 0 {
            entries.push(Entry::note(format!(
                "{clipped} point{} below 10{} (zero, or more than {DECADES_SHOWN:.0} decades under \
                 the largest value) are not drawn: the lines join their neighbours on harmonic \
                 lines and break on continuous spectra",
                if clipped == 1 { "" } else { "s" },
                superscript(lo as i64)
            )));
        }
    }
    if !hidden.is_empty() {
        entries.push(Entry::note(format!(
            "not drawn (no value on the scale): {}",
            hidden.join("; ")
        )));
    }
    (entries, range)
}

/// One log-scale panel with the photon-energy axis on top and its legend beside it.
#[allow(clippy::too_many_arguments)]
fn log_panel(
    root: &Area,
    top: f64,
    ctx: &FigureContext,
    x: (f64, f64),
    curves: &[Curve],
    markers: &[(LineStyle, String, f64)],
    legend_and_range: &(Vec<Entry>, Option<(f64, f64)>),
    ydesc: &str,
) -> Result<(), String> {
    let (entries, range) = legend_and_range;
    let Some((lo, hi)) = *range else {
        return Err("nothing to plot: no positive value".into());
    };
    let frame = Frame {
        left: PLOT_LEFT,
        top: top + ABOVE,
        width: PLOT_RIGHT - PLOT_LEFT,
        height: PANEL_HEIGHT,
        x,
        y: (lo, hi),
    };
    frame.axes(
        root,
        &order_ticks(x.0, x.1, ctx.odd_orders),
        &decade_ticks(lo, hi),
        "harmonic order Ω/ω",
        ydesc,
    )?;
    if ctx.photon_ev > 0.0 {
        let e: Vec<Tick> = linear_ticks(x.0 * ctx.photon_ev, x.1 * ctx.photon_ev, 10);
        let ev = ctx.photon_ev;
        frame.top_axis(root, &e, |v| v / ev, "photon energy (eV)")?;
    }
    let floor = 10f64.powf(lo);
    let coarse_skip = curves.iter().any(|c| c.style.dots);
    for c in curves.iter().rev() {
        // Values under the floor: skipped on harmonic lines (the line joins the allowed
        // harmonics), a gap on continuous spectra.
        let mut run: Vec<(f64, f64)> = Vec::new();
        for &(px, v) in &c.pts {
            if v.is_finite() && v >= floor {
                run.push((px, v.log10()));
            } else if !coarse_skip && !run.is_empty() {
                frame.line(root, &run, &c.style)?;
                run.clear();
            }
        }
        if !run.is_empty() {
            frame.line(root, &run, &c.style)?;
        }
    }
    for (style, _, at) in markers {
        if *at >= x.0 && *at <= x.1 {
            frame.vline(root, *at, style)?;
        }
    }
    legend::draw(root, entries, LEGEND_LEFT, top + ABOVE, LEGEND_WIDTH)
}
