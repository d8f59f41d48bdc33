//! SVG figures (plotters, SVG backend): a log-scale spectrum with family contributions and
//! cutoffs marked, and the emission times of each family below it.

use std::collections::BTreeMap;

use plotters::prelude::*;

use crate::field::CVec3;
use crate::spectrum::Spectrum;
use crate::units;

/// A vertical marker on the spectrum panel.
#[derive(Clone, Debug)]
pub struct Marker {
    /// Legend text.
    pub label: String,
    /// Position (harmonic order).
    pub order: f64,
}

const PALETTE: [RGBColor; 6] = [
    RGBColor(31, 119, 180),
    RGBColor(214, 39, 40),
    RGBColor(44, 160, 44),
    RGBColor(148, 103, 189),
    RGBColor(140, 86, 75),
    RGBColor(127, 127, 127),
];

/// A labelled, coloured curve.
type Curve = (String, RGBColor, Vec<(f64, f64)>);

fn err<E: std::fmt::Debug>(e: E) -> String {
    format!("plotting failed: {e:?}")
}

fn norm2(v: &CVec3) -> f64 {
    v.iter().map(|c| c.norm_sqr()).sum()
}

/// Spectrum figure as SVG text.
pub fn spectrum_figure(s: &Spectrum, markers: &[Marker], title: &str) -> Result<String, String> {
    let orders: Vec<f64> = s.energies.iter().map(|e| e / s.omega).collect();
    let power = |k: usize, v: &CVec3| s.energies[k].powi(4) * norm2(v);
    let mut labels: BTreeMap<String, Vec<usize>> = BTreeMap::new();
    for (c, con) in s.contributions.iter().enumerate() {
        labels.entry(con.label.to_string()).or_default().push(c);
    }
    let mut series: Vec<(String, Vec<(f64, f64)>)> = Vec::new();
    series.push((
        "total".into(),
        (0..orders.len())
            .map(|k| (orders[k], power(k, &s.total[k])))
            .collect(),
    ));
    for (label, members) in &labels {
        let pts = (0..orders.len())
            .filter_map(|k| {
                let mut sum = CVec3::zeros();
                let mut any = false;
                for &c in members {
                    if let Some(v) = s.contributions[c].dipole[k] {
                        sum += v;
                        any = true;
                    }
                }
                any.then(|| (orders[k], power(k, &sum)))
            })
            .collect();
        series.push((label.clone(), pts));
    }
    let ymax = series
        .iter()
        .flat_map(|(_, p)| p.iter().map(|q| q.1))
        .filter(|v| v.is_finite() && *v > 0.0)
        .fold(0.0, f64::max);
    if ymax <= 0.0 {
        return Err("nothing to plot: the spectrum is zero everywhere".into());
    }
    let ymin = ymax * 1e-10;
    // A coarse grid (harmonic lines of a periodic field) also gets a dot per point.
    let coarse = orders.windows(2).all(|w| w[1] - w[0] >= 0.5);
    let (x0, x1) = orders
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &q| {
            (a.min(q), b.max(q))
        });
    let (x0, x1) = if x1 > x0 {
        (x0, x1)
    } else {
        (x0 - 1.0, x0 + 1.0)
    };

    let mut text = String::new();
    {
        let root = SVGBackend::with_string(&mut text, (900, 900)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let (top, bottom) = root.split_vertically(540);
        let mut chart = ChartBuilder::on(&top)
            .caption(title, ("sans-serif", 20))
            .margin(12)
            .x_label_area_size(40)
            .y_label_area_size(70)
            .build_cartesian_2d(x0..x1, (ymin..ymax * 3.0).log_scale())
            .map_err(err)?;
        chart
            .configure_mesh()
            .x_desc("harmonic order Ω/ω")
            .y_desc("emitted power Ω⁴|D|² (arb. units)")
            .y_label_formatter(&|v| format!("{v:.0e}"))
            .draw()
            .map_err(err)?;
        for (i, (label, pts)) in series.iter().enumerate() {
            let colour = if i == 0 {
                BLACK
            } else {
                PALETTE[(i - 1) % PALETTE.len()]
            };
            let style = if i == 0 {
                colour.stroke_width(2)
            } else {
                colour.stroke_width(1)
            };
            // Values below the axis floor break the line instead of being clipped to it.
            let mut runs: Vec<Vec<(f64, f64)>> = vec![Vec::new()];
            for &(x, y) in pts {
                if y.is_finite() && y >= ymin {
                    if let Some(run) = runs.last_mut() {
                        run.push((x, y));
                    }
                } else if runs.last().is_some_and(|r| !r.is_empty()) {
                    runs.push(Vec::new());
                }
            }
            let mut first = true;
            for run in runs.into_iter().filter(|r| !r.is_empty()) {
                let dots = if coarse {
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
            let colour = PALETTE[(i + 2) % PALETTE.len()];
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

        // Emission times (Re t_r) per family, coloured by label as in the panel above (one
        // legend entry per label), and the group delay of the total.
        let label_colour: BTreeMap<String, RGBColor> = labels
            .keys()
            .enumerate()
            .map(|(i, l)| (l.clone(), PALETTE[i % PALETTE.len()]))
            .collect();
        let mut times: Vec<Curve> = Vec::new();
        for con in &s.contributions {
            let pts: Vec<(f64, f64)> = (0..orders.len())
                .filter_map(|k| {
                    let physical = con.dipole[k].is_some_and(|d| norm2(&d) > 0.0);
                    con.emission_time[k]
                        .filter(|_| physical)
                        .map(|t| (orders[k], units::au_to_fs(t)))
                })
                .collect();
            let label = con.label.to_string();
            let colour = label_colour.get(&label).copied().unwrap_or(BLACK);
            if !pts.is_empty() {
                times.push((label, colour, pts));
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
        if t1 > t0 {
            let pad = 0.05 * (t1 - t0);
            let mut chart = ChartBuilder::on(&bottom)
                .margin(12)
                .x_label_area_size(40)
                .y_label_area_size(70)
                .build_cartesian_2d(x0..x1, (t0 - pad)..(t1 + pad))
                .map_err(err)?;
            chart
                .configure_mesh()
                .x_desc("harmonic order Ω/ω")
                .y_desc("emission time Re t_r (fs after the crest at t = 0)")
                .draw()
                .map_err(err)?;
            let mut seen = std::collections::BTreeSet::new();
            for (label, colour, pts) in &times {
                let colour = *colour;
                let drawn = chart
                    .draw_series(LineSeries::new(pts.clone(), colour.stroke_width(1)))
                    .map_err(err)?;
                if seen.insert(label.clone()) {
                    drawn
                        .label(format!("{label}: Re t_r (each half cycle)"))
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
        }
        root.present().map_err(err)?;
    }
    Ok(text)
}
