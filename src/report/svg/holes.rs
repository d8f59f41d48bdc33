//! The hole figure: the hole density matrix that each harmonic samples, against the return
//! delay `Re(t_r − t_i)` of the reference channel's first-return orbits: populations on a log
//! scale (small ones stay visible), coherence moduli (log scale) and coherence phases, each in
//! its own panel. Colour is the channel (or channel pair), the dash is the orbit: short solid,
//! long dashed, in the data and in the legend alike.
//!
//! One half cycle is drawn, the one with the largest ionization weight. Each orbit is drawn
//! only up to its half cycle's cutoff: beyond it the short and long saddles have merged and
//! their delays turn back, which would fold the line onto itself (the rows are in the data
//! files). Points are joined in photon-energy order, never re-sorted.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::canvas::{Frame, decade_ticks, err, linear_ticks, text, text_style};
use super::legend::{self, Entry};
use super::palette::{COLOURS, Dash, INK, LineStyle};
use super::{
    FigureContext, LEGEND_LEFT, LEGEND_WIDTH, PLOT_LEFT, PLOT_RIGHT, WIDTH, draw_title,
    title_height,
};
use crate::multichannel::{HoleDensity, MultichannelSpectrum};
use crate::orbits::Branch;
use crate::units;

const FRAME_H: f64 = 250.0;
const ABOVE: f64 = 34.0;
const BELOW: f64 = 56.0;

/// Populations and coherence moduli below this (10⁻⁶, as the legends say) are not drawn
/// (counted or named in the legend).
pub const SMALLEST_POPULATION: f64 = 1e-6;

/// A curve against delay.
struct Series {
    style: LineStyle,
    label: String,
    pts: Vec<(f64, f64)>,
}

fn style(channel: usize, branch: Branch) -> LineStyle {
    LineStyle {
        colour: COLOURS[channel % COLOURS.len()],
        width: 2,
        dash: match branch {
            Branch::Short => Dash::Solid,
            Branch::Long => Dash::Dashed,
        },
        dots: false,
    }
}

/// Hole figure as SVG text.
///
/// # Errors
/// Text naming the reason when there is no hole data or plotting fails.
pub fn hole_figure(s: &MultichannelSpectrum, ctx: &FigureContext) -> Result<String, String> {
    // The half cycle with the largest ionization weight among first returns.
    let weight =
        |h: &HoleDensity| -> f64 { h.points.iter().flatten().map(|p| p.yield_weight).sum() };
    let first: Vec<&HoleDensity> = s
        .holes
        .iter()
        .filter(|h| h.label.return_index == 1)
        .collect();
    let Some(hc) = first
        .iter()
        .max_by(|a, b| {
            weight(a)
                .total_cmp(&weight(b))
                .then(b.half_cycle.cmp(&a.half_cycle))
        })
        .map(|h| h.half_cycle)
    else {
        return Err("nothing to plot: no hole data".into());
    };
    let cutoff = ctx.cutoff_of(hc);
    let n = s.labels.len();
    let mut pops: Vec<Series> = Vec::new();
    let mut mods: Vec<Series> = Vec::new();
    let mut args: Vec<Series> = Vec::new();
    let mut beyond = 0usize;
    let mut tiny = 0usize;
    let mut families: Vec<&HoleDensity> =
        first.into_iter().filter(|h| h.half_cycle == hc).collect();
    families.sort_by_key(|h| h.label.branch == Branch::Long);
    for h in families {
        let pts: Vec<(f64, &crate::multichannel::HoleSample)> = h
            .points
            .iter()
            .enumerate()
            .filter_map(|(k, p)| p.as_ref().map(|p| (s.energies[k], p)))
            .filter(|(e, _)| {
                let keep = cutoff.is_none_or(|c| *e <= c);
                if !keep {
                    beyond += 1;
                }
                keep
            })
            .map(|(_, p)| (units::au_to_fs(p.t_ret - p.t_ion), p))
            .collect();
        for i in 0..n {
            let v: Vec<(f64, f64)> = pts.iter().map(|(d, p)| (*d, p.rho[(i, i)].re)).collect();
            tiny += v.iter().filter(|p| p.1 < SMALLEST_POPULATION).count();
            pops.push(Series {
                style: style(i, h.label.branch),
                label: format!("{} ({} orbits)", s.labels[i], h.label),
                pts: v,
            });
        }
        let mut c = 0;
        for i in 0..n {
            for j in i + 1..n {
                let st = style(c, h.label.branch);
                let name = format!("ρ_{}{} ({} orbits)", s.labels[i], s.labels[j], h.label);
                mods.push(Series {
                    style: st,
                    label: name.clone(),
                    pts: pts
                        .iter()
                        .map(|(d, p)| (*d, p.rho[(i, j)].norm()))
                        .collect(),
                });
                // The phase of a negligible coherence is rounding noise: a gap.
                let significant = |p: &crate::multichannel::HoleSample| {
                    let c = p.rho[(i, j)].norm();
                    c >= SMALLEST_POPULATION
                        && c >= 1e-3 * (p.rho[(i, i)].re * p.rho[(j, j)].re).abs().sqrt()
                };
                args.push(Series {
                    style: st,
                    label: name,
                    pts: pts
                        .iter()
                        .map(|(d, p)| {
                            let v = if significant(p) {
                                p.rho[(i, j)].arg() / std::f64::consts::PI
                            } else {
                                f64::NAN
                            };
                            (*d, v)
                        })
                        .collect(),
                });
                c += 1;
            }
        }
    }
    let (d0, d1) = pops
        .iter()
        .flat_map(|c| c.pts.iter())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| {
            (a.min(p.0), b.max(p.0))
        });
    if d1.partial_cmp(&d0) != Some(std::cmp::Ordering::Greater) {
        return Err("nothing to plot: no hole data on the plateau".into());
    }
    let pad = 0.02 * (d1 - d0);
    let x = (d0 - pad, d1 + pad);

    let mut notes = vec![Entry::note(format!(
        "half cycle {hc} (largest ionization weight); delay Re(t_r − t_i) of channel {}'s \
         saddles",
        s.labels.get(s.reference).cloned().unwrap_or_default()
    ))];
    if beyond > 0 {
        notes.push(Entry::note(format!(
            "{beyond} points beyond the cutoff{} not drawn: the short and long orbits merge \
             there (they are in holes.json)",
            cutoff
                .map(|c| format!(" H{:.1}", c / s.omega))
                .unwrap_or_default()
        )));
    }
    if tiny > 0 {
        notes.push(Entry::note(format!(
            "{tiny} population values below 10⁻⁶ not drawn"
        )));
    }
    // Curves with nothing on the scale are named in a note instead of the legend.
    let legend_of = |series: &[Series], extra: &[Entry]| -> Vec<Entry> {
        let (shown, empty): (Vec<&Series>, Vec<&Series>) = series.iter().partition(|c| {
            c.pts
                .iter()
                .any(|p| p.1.is_finite() && p.1.abs() >= SMALLEST_POPULATION)
        });
        let mut e: Vec<Entry> = shown
            .iter()
            .map(|c| Entry::line(c.style, c.label.clone()))
            .collect();
        if !empty.is_empty() {
            let names: Vec<String> = empty.iter().map(|c| c.label.clone()).collect();
            e.push(Entry::note(format!(
                "not drawn: {} (below 10⁻⁶ everywhere, zero up to rounding: e.g. forbidden by \
                 the symmetry of the ensemble)",
                names.join(", ")
            )));
        }
        e.extend(extra.iter().cloned());
        e
    };
    let drawable = |c: &Series| {
        c.pts
            .iter()
            .any(|p| p.1.is_finite() && p.1.abs() >= SMALLEST_POPULATION)
    };
    let coherent = mods.iter().any(drawable);
    if !mods.is_empty() && !coherent {
        let names: Vec<String> = mods.iter().map(|c| c.label.clone()).collect();
        notes.push(Entry::note(format!(
            "no coherence panels: {} below 10⁻⁶ everywhere (zero up to rounding, e.g. forbidden \
             by the symmetry of the ensemble)",
            names.join(", ")
        )));
    }
    let pop_legend = legend_of(&pops, &notes);
    let mod_legend = legend_of(&mods, &[]);
    let arg_legend = legend_of(
        &args,
        &[Entry::note(
            "interaction picture, without the Bohr phases e^{−i(Ip_m − Ip_n)t}",
        )],
    );
    let block =
        |e: &[Entry]| (ABOVE + FRAME_H + BELOW).max(legend::height(e, LEGEND_WIDTH) + ABOVE + 10.0);
    let title_h = title_height(ctx);
    let heights = [
        block(&pop_legend),
        if coherent { block(&mod_legend) } else { 0.0 },
        if coherent { block(&arg_legend) } else { 0.0 },
    ];
    let height = (title_h + heights.iter().sum::<f64>() + 10.0).ceil() as u32;

    let mut out = String::new();
    {
        let root = SVGBackend::with_string(&mut out, (WIDTH, height)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        draw_title(&root, ctx)?;
        let mut top = title_h;
        let logs = |series: &[Series]| -> (f64, f64) {
            let lo = series
                .iter()
                .flat_map(|c| c.pts.iter().map(|p| p.1))
                .filter(|v| *v >= SMALLEST_POPULATION)
                .fold(1.0, f64::min);
            (lo.log10().floor().min(-1.0), 0.0)
        };
        let panel = |top: f64,
                     title: &str,
                     series: &[Series],
                     entries: &[Entry],
                     y: (f64, f64),
                     log: bool,
                     ydesc: &str|
         -> Result<(), String> {
            text(
                &root,
                title,
                PLOT_LEFT,
                top + 8.0,
                &text_style(14, INK, HPos::Left, VPos::Top),
            )?;
            let f = Frame {
                left: PLOT_LEFT,
                top: top + ABOVE,
                width: PLOT_RIGHT - PLOT_LEFT,
                height: FRAME_H,
                x,
                y,
            };
            let yticks = if log {
                decade_ticks(y.0, y.1)
            } else {
                linear_ticks(y.0, y.1, 8)
            };
            f.axes(
                &root,
                &linear_ticks(x.0, x.1, 10),
                &yticks,
                "return delay Re(t_r − t_i) (fs)",
                ydesc,
            )?;
            for c in series {
                // Log panels: break at values under the floor; phase panels: break at ±π jumps.
                let mut run: Vec<(f64, f64)> = Vec::new();
                for &(d, v) in &c.pts {
                    let v = if log {
                        if v >= SMALLEST_POPULATION {
                            v.log10()
                        } else {
                            f64::NAN
                        }
                    } else {
                        v
                    };
                    let jump = !log && run.last().is_some_and(|p| (p.1 - v).abs() > 1.0);
                    if !v.is_finite() || jump {
                        f.line(&root, &run, &c.style)?;
                        run.clear();
                    }
                    if v.is_finite() {
                        run.push((d, v));
                    }
                }
                f.line(&root, &run, &c.style)?;
            }
            legend::draw(&root, entries, LEGEND_LEFT, top + ABOVE, LEGEND_WIDTH)
        };
        panel(
            top,
            "hole populations ρ_mm at recombination (log scale)",
            &pops,
            &pop_legend,
            logs(&pops),
            true,
            "population",
        )?;
        top += heights[0];
        if coherent {
            panel(
                top,
                "coherences |ρ_mn| (log scale)",
                &mods,
                &mod_legend,
                logs(&mods),
                true,
                "|ρ_mn|",
            )?;
            top += heights[1];
            panel(
                top,
                "coherence phases arg ρ_mn",
                &args,
                &arg_legend,
                (-1.05, 1.05),
                false,
                "arg ρ_mn (units of π)",
            )?;
        }
        root.present().map_err(err)?;
    }
    Ok(out)
}
