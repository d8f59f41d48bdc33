//! SVG figures (plotters, SVG backend): the spectrum with family and channel-pair
//! contributions, cutoffs and emission times; and the hole populations against delay.

use plotters::coord::Shift;
use plotters::prelude::*;

use super::spectrum::{label_sums, pair_key};
use crate::field::CVec3;
use crate::multichannel::MultichannelSpectrum;
use crate::units;

/// A vertical marker on the spectrum panel.
#[derive(Clone, Debug)]
pub struct Marker {
    /// Legend text.
    pub label: String,
    /// Position (harmonic order).
    pub order: f64,
}

const PALETTE: [RGBColor; 8] = [
    RGBColor(31, 119, 180),
    RGBColor(214, 39, 40),
    RGBColor(44, 160, 44),
    RGBColor(148, 103, 189),
    RGBColor(255, 127, 14),
    RGBColor(140, 86, 75),
    RGBColor(23, 190, 207),
    RGBColor(127, 127, 127),
];

/// A labelled, coloured curve.
type Curve = (String, RGBColor, Vec<(f64, f64)>);

/// A labelled curve with its line style.
type StyledCurve = (String, ShapeStyle, Vec<(f64, f64)>);

fn err<E: std::fmt::Debug>(e: E) -> String {
    format!("plotting failed: {e:?}")
}

fn norm2(v: &CVec3) -> f64 {
    v.iter().map(|c| c.norm_sqr()).sum()
}

/// Draws log-scale curves with values below the floor breaking the line; dots on coarse grids.
fn log_panel(
    area: &DrawingArea<SVGBackend<'_>, Shift>,
    caption: Option<&str>,
    x: (f64, f64),
    curves: &[StyledCurve],
    markers: &[Marker],
    coarse: bool,
    y_desc: &str,
) -> Result<(), String> {
    let ymax = curves
        .iter()
        .flat_map(|c| c.2.iter().map(|p| p.1))
        .filter(|v| v.is_finite() && *v > 0.0)
        .fold(0.0, f64::max);
    if ymax <= 0.0 {
        return Err("nothing to plot: the spectrum is zero everywhere".into());
    }
    // Floor: a third of the smallest value within ten decades of the largest.
    let smallest = curves
        .iter()
        .flat_map(|c| c.2.iter().map(|p| p.1))
        .filter(|v| v.is_finite() && *v >= ymax * 1e-10)
        .fold(ymax, f64::min);
    let ymin = (smallest / 3.0).max(ymax * 1e-10);
    let mut builder = ChartBuilder::on(area);
    if let Some(c) = caption {
        builder.caption(c, ("sans-serif", 18));
    }
    let mut chart = builder
        .margin(12)
        .x_label_area_size(36)
        .y_label_area_size(70)
        .build_cartesian_2d(x.0..x.1, (ymin..ymax * 3.0).log_scale())
        .map_err(err)?;
    chart
        .configure_mesh()
        .x_desc("harmonic order Ω/ω")
        .y_desc(y_desc)
        .y_label_formatter(&|v| format!("{v:.0e}"))
        .draw()
        .map_err(err)?;
    for (label, style, pts) in curves {
        let style = *style;
        let mut runs: Vec<Vec<(f64, f64)>> = vec![Vec::new()];
        // On a fine grid a value below the floor breaks the line; on harmonic lines (coarse
        // grid) it is skipped, so the line joins the allowed harmonics (e.g. the odd ones).
        for &(px, py) in pts {
            if py.is_finite() && py >= ymin {
                if let Some(run) = runs.last_mut() {
                    run.push((px, py));
                }
            } else if !coarse && runs.last().is_some_and(|r| !r.is_empty()) {
                runs.push(Vec::new());
            }
        }
        let mut first = true;
        for run in runs.into_iter().filter(|r| !r.is_empty()) {
            let dots: Vec<_> = if coarse {
                run.iter()
                    .map(|&p| Circle::new(p, 2, style.filled()))
                    .collect()
            } else {
                Vec::new()
            };
            let drawn = chart
                .draw_series(LineSeries::new(run, style))
                .map_err(err)?;
            if first {
                drawn
                    .label(label.clone())
                    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], style));
                first = false;
            }
            chart.draw_series(dots).map_err(err)?;
        }
    }
    for (i, m) in markers.iter().enumerate() {
        let colour = PALETTE[(i + 5) % PALETTE.len()];
        let line = vec![(m.order, ymin), (m.order, ymax * 3.0)];
        chart
            .draw_series(DashedLineSeries::new(line, 6, 4, colour.stroke_width(1)))
            .map_err(err)?
            .label(format!("{} (H{:.1})", m.label, m.order))
            .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], colour));
    }
    chart
        .configure_series_labels()
        .background_style(WHITE.mix(0.8))
        .border_style(BLACK)
        .draw()
        .map_err(err)?;
    Ok(())
}

/// Spectrum figure as SVG text: total with short/long contributions and cutoffs; the
/// channel-pair contributions with their incoherent sum (when there is more than one pair); the
/// emission times of the reference channel's families and the group delay of the total.
pub fn spectrum_figure(
    s: &MultichannelSpectrum,
    markers: &[Marker],
    title: &str,
) -> Result<String, String> {
    let orders: Vec<f64> = s.energies.iter().map(|e| e / s.omega).collect();
    let n = orders.len();
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
    let bold = BLACK.stroke_width(2);

    let mut family_curves = vec![("total".to_string(), bold, total.clone())];
    for (i, (label, v)) in label_sums(s).into_iter().enumerate() {
        let pts = (0..n)
            .filter_map(|k| v[k].map(|d| (orders[k], power(k, &d))))
            .collect();
        family_curves.push((label, PALETTE[i % PALETTE.len()].stroke_width(1), pts));
    }
    let largest = total.iter().map(|p| p.1).fold(0.0, f64::max);
    let mut pair_curves = vec![("total (coherent)".to_string(), bold, total)];
    if s.pairs.len() > 1 {
        let incoherent = (0..n)
            .map(|k| {
                (
                    orders[k],
                    s.pairs.iter().map(|p| power(k, &p.dipole[k])).sum(),
                )
            })
            .collect();
        pair_curves.push((
            "sum of pair intensities (no interference)".into(),
            RGBColor(127, 127, 127).stroke_width(1),
            incoherent,
        ));
        let mut shown = 0;
        for (p, pair) in s.pairs.iter().enumerate() {
            let pts: Vec<(f64, f64)> = (0..n)
                .map(|k| (orders[k], power(k, &pair.dipole[k])))
                .collect();
            let peak = pts.iter().map(|q| q.1).fold(0.0, f64::max);
            if peak < 1e-4 * largest || shown >= 7 {
                continue;
            }
            pair_curves.push((
                format!(
                    "{} (ionized in {}, recombined into {})",
                    pair_key(s, p),
                    s.labels[pair.ion],
                    s.labels[pair.rec]
                ),
                PALETTE[shown % PALETTE.len()].stroke_width(1),
                pts,
            ));
            shown += 1;
        }
    }
    let three = s.pairs.len() > 1;
    let mut text = String::new();
    {
        let height = if three { 1300 } else { 900 };
        let root = SVGBackend::with_string(&mut text, (900, height)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let (top, rest) = root.split_vertically(480);
        log_panel(
            &top,
            Some(title),
            x,
            &family_curves,
            markers,
            coarse,
            "emitted power Ω⁴|D|² (arb. units)",
        )?;
        let times_area = if three {
            let (mid, bottom) = rest.split_vertically(420);
            log_panel(
                &mid,
                None,
                x,
                &pair_curves,
                &[],
                coarse,
                "Ω⁴|D_pair|² (arb. units)",
            )?;
            bottom
        } else {
            rest
        };
        time_panel(&times_area, s, &orders, x)?;
        root.present().map_err(err)?;
    }
    Ok(text)
}

/// Emission times of the reference channel's families and the total's group delay.
fn time_panel(
    area: &DrawingArea<SVGBackend<'_>, Shift>,
    s: &MultichannelSpectrum,
    orders: &[f64],
    x: (f64, f64),
) -> Result<(), String> {
    let reference = s
        .pairs
        .iter()
        .find(|p| p.ion == s.reference && p.rec == s.reference);
    let mut labels: Vec<String> = Vec::new();
    let mut times: Vec<Curve> = Vec::new();
    if let Some(pair) = reference {
        for con in &pair.families {
            let pts: Vec<(f64, f64)> = (0..orders.len())
                .filter_map(|k| {
                    let physical = con.dipole[k].is_some_and(|d| norm2(&d) > 0.0);
                    con.emission_time[k]
                        .filter(|_| physical)
                        .map(|t| (orders[k], units::au_to_fs(t)))
                })
                .collect();
            let label = con.label.to_string();
            if !labels.contains(&label) {
                labels.push(label.clone());
            }
            let i = labels.iter().position(|l| *l == label).unwrap_or(0);
            if !pts.is_empty() {
                times.push((label, PALETTE[i % PALETTE.len()], pts));
            }
        }
    }
    let delay: Vec<(f64, f64)> = (0..orders.len())
        .filter_map(|k| s.group_delay[k].map(|t| (orders[k], units::au_to_fs(t))))
        .collect();
    let all = times
        .iter()
        .flat_map(|(_, _, p)| p.iter())
        .chain(delay.iter());
    let (t0, t1) = all.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), q| {
        (a.min(q.1), b.max(q.1))
    });
    if t1 <= t0 {
        return Ok(());
    }
    let pad = 0.05 * (t1 - t0);
    let mut chart = ChartBuilder::on(area)
        .margin(12)
        .x_label_area_size(36)
        .y_label_area_size(70)
        .build_cartesian_2d(x.0..x.1, (t0 - pad)..(t1 + pad))
        .map_err(err)?;
    chart
        .configure_mesh()
        .x_desc("harmonic order Ω/ω")
        .y_desc("emission time (fs after the crest at t = 0)")
        .draw()
        .map_err(err)?;
    let reference_label = s.labels.get(s.reference).cloned().unwrap_or_default();
    let mut seen = std::collections::BTreeSet::new();
    for (label, colour, pts) in &times {
        let colour = *colour;
        let drawn = chart
            .draw_series(LineSeries::new(pts.clone(), colour.stroke_width(1)))
            .map_err(err)?;
        if seen.insert(label.clone()) {
            drawn
                .label(format!(
                    "{label}: Re t_r, channel {reference_label} (each half cycle)"
                ))
                .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], colour));
        }
    }
    if !delay.is_empty() {
        chart
            .draw_series(
                delay
                    .iter()
                    .map(|&(x, y)| Circle::new((x, y), 2, BLACK.filled())),
            )
            .map_err(err)?
            .label("group delay dφ/dΩ of the total")
            .legend(|(x, y)| Circle::new((x + 10, y), 2, BLACK.filled()));
    }
    chart
        .configure_series_labels()
        .background_style(WHITE.mix(0.8))
        .border_style(BLACK)
        .draw()
        .map_err(err)?;
    Ok(())
}

/// Hole populations against the return delay for the families of half cycle 0 (short solid,
/// long dashed), one colour per channel.
pub fn hole_figure(s: &MultichannelSpectrum, title: &str) -> Result<String, String> {
    // (legend, channel index, dashed, points)
    type HoleCurve = (String, usize, bool, Vec<(f64, f64)>);
    let mut curves: Vec<HoleCurve> = Vec::new();
    for h in s
        .holes
        .iter()
        .filter(|h| h.half_cycle == 0 && h.label.return_index == 1)
    {
        let dashed = h.label.branch == crate::orbits::Branch::Long;
        for (i, label) in s.labels.iter().enumerate() {
            let mut pts: Vec<(f64, f64)> = h
                .points
                .iter()
                .filter_map(|p| {
                    p.as_ref()
                        .map(|p| (units::au_to_fs(p.t_ret - p.t_ion), p.rho[(i, i)].re))
                })
                .collect();
            pts.sort_by(|a, b| a.0.total_cmp(&b.0));
            curves.push((format!("{label} ({})", h.label), i, dashed, pts));
        }
    }
    let (d0, d1) = curves
        .iter()
        .flat_map(|c| c.3.iter())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| {
            (a.min(p.0), b.max(p.0))
        });
    if d1 <= d0 {
        return Err("nothing to plot: no hole data".into());
    }
    let mut text = String::new();
    {
        let root = SVGBackend::with_string(&mut text, (900, 560)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let mut chart = ChartBuilder::on(&root)
            .caption(title, ("sans-serif", 18))
            .margin(12)
            .x_label_area_size(40)
            .y_label_area_size(60)
            .build_cartesian_2d(d0..d1, 0.0..1.05)
            .map_err(err)?;
        chart
            .configure_mesh()
            .x_desc("return delay Re(t_r − t_i) (fs)")
            .y_desc("hole population at recombination")
            .draw()
            .map_err(err)?;
        for (label, i, dashed, pts) in curves {
            let colour = PALETTE[i % PALETTE.len()];
            let style = colour.stroke_width(2);
            if dashed {
                chart
                    .draw_series(DashedLineSeries::new(pts, 6, 4, style))
                    .map_err(err)?
                    .label(label)
                    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], style));
            } else {
                chart
                    .draw_series(LineSeries::new(pts, style))
                    .map_err(err)?
                    .label(label)
                    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], style));
            }
        }
        chart
            .configure_series_labels()
            .background_style(WHITE.mix(0.8))
            .border_style(BLACK)
            .draw()
            .map_err(err)?;
        root.present().map_err(err)?;
    }
    Ok(text)
}
