//! The scan map (`scan.svg`): log₁₀ of the yield as a colour map of the grid (harmonic order or
//! photon energy) against the first axis, with a colour bar; a panel for the total and, where
//! the points have them, one for the short and one for the long first-return orbits (each the
//! incoherent sum of that family over channel pairs and half cycles). Other axes are held at
//! their first value (said in the title). The colour map is viridis (perceptually uniform and
//! readable with the common colour-vision deficiencies); cells without a value are grey.

use plotters::prelude::*;
use plotters::style::colors::colormaps::ViridisRGB;

use super::arrays::dimension_names;
use super::definition::Combine;
use super::point::{PointOutcome, PointSpectrum};
use super::record::ScanResult;

/// Decades shown below the largest yield of a panel.
pub const DECADES: f64 = 8.0;

const MISSING: RGBColor = RGBColor(190, 190, 190);

fn err<E: std::fmt::Debug>(e: E) -> String {
    format!("plotting failed: {e:?}")
}

/// A tick label: three significant digits, in exponent form for large or small numbers.
fn tick(v: &f64) -> String {
    let a = v.abs();
    if a != 0.0 && !(1e-2..1e4).contains(&a) {
        format!("{v:.2e}")
    } else {
        format!("{:.3}", v)
            .trim_end_matches('0')
            .trim_end_matches('.')
            .to_string()
    }
}

/// One panel: a title and the values `[x][grid]` (None = no value).
struct Panel {
    title: String,
    values: Vec<Vec<Option<f64>>>,
}

fn total(s: &PointSpectrum) -> Vec<Option<f64>> {
    s.yield_au.clone()
}

fn family_sum(s: &PointSpectrum, label: &str) -> Vec<Option<f64>> {
    let n = s.yield_au.len();
    let mut out = vec![None; n];
    for f in s
        .families
        .iter()
        .filter(|f| f.family.rsplit_once("_hc").map(|(l, _)| l) == Some(label))
    {
        for (k, v) in f.yield_au.iter().enumerate().take(n) {
            if let Some(v) = v {
                out[k] = Some(out[k].unwrap_or(0.0) + v);
            }
        }
    }
    out
}

/// Cell edges around sorted-or-not centres: midpoints, with the end cells mirrored.
fn edges(centres: &[f64]) -> Vec<(f64, f64)> {
    let n = centres.len();
    (0..n)
        .map(|i| {
            let left = if i > 0 {
                0.5 * (centres[i - 1] + centres[i])
            } else if n > 1 {
                centres[0] - 0.5 * (centres[1] - centres[0])
            } else {
                centres[0] - 0.5
            };
            let right = if i + 1 < n {
                0.5 * (centres[i] + centres[i + 1])
            } else if n > 1 {
                centres[n - 1] + 0.5 * (centres[n - 1] - centres[n - 2])
            } else {
                centres[0] + 0.5
            };
            (left.min(right), left.max(right))
        })
        .collect()
}

/// The SVG text of the map of a complete scan.
///
/// # Errors
/// A plotting failure (the data files are written regardless).
pub fn map(result: &ScanResult) -> Result<String, String> {
    let d = &result.definition;
    let first = &d.axes[0];
    // The points along the first axis with every other axis at its first value.
    let stride: usize = match d.combine {
        Combine::Product => d.axes[1..].iter().map(|a| a.values.len()).product(),
        Combine::Zip => 1,
    };
    let line: Vec<&super::record::PointRecord> = (0..first.values.len())
        .map(|i| &result.points[i * stride])
        .collect();
    let log_axis = first.values.iter().all(|v| *v > 0.0) && {
        let (lo, hi) = first
            .values
            .iter()
            .fold((f64::INFINITY, 0.0_f64), |(a, b), v| (a.min(*v), b.max(*v)));
        hi / lo > 20.0
    };
    let xs: Vec<f64> = first
        .values
        .iter()
        .map(|v| if log_axis { v.log10() } else { *v })
        .collect();
    let x_label = if log_axis {
        format!("log10({} / {})", first.column_name(), first.unit)
    } else {
        format!("{} ({})", first.column_name(), first.unit)
    };
    let y_label = match d.grid {
        super::grid::GridKind::Order => "harmonic order".to_string(),
        super::grid::GridKind::EnergyEv => "photon energy (eV)".to_string(),
    };
    let pick = |f: &dyn Fn(&PointSpectrum) -> Vec<Option<f64>>| -> Vec<Vec<Option<f64>>> {
        line.iter()
            .map(|p| match &p.outcome {
                PointOutcome::Computed { spectrum, .. } => f(spectrum),
                PointOutcome::Failed { .. } => vec![None; d.grid_values.len()],
            })
            .collect()
    };
    let mut panels = vec![Panel {
        title: "total |D|²".into(),
        values: pick(&total),
    }];
    for label in ["short", "long"] {
        let v = pick(&|s| family_sum(s, label));
        if v.iter().flatten().any(|x| x.is_some()) {
            panels.push(Panel {
                title: format!("{label} orbits (sum over channel pairs and half cycles)"),
                values: v,
            });
        }
    }
    let held: Vec<String> = d.axes[1..]
        .iter()
        .filter(|_| d.combine == Combine::Product)
        .map(|a| format!("{} = {} {}", a.column_name(), tick(&a.values[0]), a.unit))
        .collect();
    let title = format!(
        "{} — log10 yield vs {}{}",
        d.target.name,
        dimension_names(d)[0],
        if held.is_empty() {
            String::new()
        } else {
            format!(" ({})", held.join(", "))
        }
    );
    let panel_h = 420u32;
    let height = 60 + panel_h * panels.len() as u32;
    let mut text = String::new();
    {
        let root = SVGBackend::with_string(&mut text, (960, height)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let (top, body) = root.split_vertically(60);
        top.draw(&Text::new(
            title,
            (20, 20),
            ("sans-serif", 20).into_font().color(&BLACK),
        ))
        .map_err(err)?;
        let areas = body.split_evenly((panels.len(), 1));
        let xe = edges(&xs);
        let ye = edges(&d.grid_values);
        let x_range = xe.first().map(|e| e.0).unwrap_or(0.0)..xe.last().map(|e| e.1).unwrap_or(1.0);
        let (x0, x1) = (
            x_range.start.min(x_range.end),
            x_range.start.max(x_range.end),
        );
        let y0 = ye.first().map(|e| e.0).unwrap_or(0.0);
        let y1 = ye.last().map(|e| e.1).unwrap_or(1.0);
        for (panel, area) in panels.iter().zip(areas.iter()) {
            let logs: Vec<Vec<Option<f64>>> = panel
                .values
                .iter()
                .map(|col| {
                    col.iter()
                        .map(|v| v.filter(|v| *v > 0.0).map(f64::log10))
                        .collect()
                })
                .collect();
            let top_value = logs
                .iter()
                .flatten()
                .flatten()
                .fold(f64::NEG_INFINITY, |a, b| a.max(*b));
            let (lo, hi) = if top_value.is_finite() {
                (top_value - DECADES, top_value)
            } else {
                (0.0, 1.0)
            };
            let (plot, bar) = area.split_horizontally(820);
            let mut chart = ChartBuilder::on(&plot)
                .caption(&panel.title, ("sans-serif", 16))
                .margin(10)
                .x_label_area_size(40)
                .y_label_area_size(60)
                .build_cartesian_2d(x0..x1, y0..y1)
                .map_err(err)?;
            chart
                .configure_mesh()
                .disable_mesh()
                .x_label_formatter(&tick)
                .x_desc(x_label.as_str())
                .y_desc(y_label.as_str())
                .draw()
                .map_err(err)?;
            let ye = &ye;
            chart
                .draw_series(logs.iter().enumerate().flat_map(|(i, col)| {
                    let (xl, xr) = xe[i];
                    col.iter().enumerate().map(move |(k, v)| {
                        let colour = match v {
                            Some(v) => ViridisRGB::get_color_normalized(v.clamp(lo, hi), lo, hi),
                            None => MISSING,
                        };
                        Rectangle::new([(xl, ye[k].0), (xr, ye[k].1)], colour.filled())
                    })
                }))
                .map_err(err)?;
            // Colour bar.
            let mut cb = ChartBuilder::on(&bar)
                .margin_top(40)
                .margin_bottom(50)
                .margin_right(10)
                .y_label_area_size(50)
                .build_cartesian_2d(0.0..1.0, lo..hi)
                .map_err(err)?;
            cb.configure_mesh()
                .disable_mesh()
                .disable_x_axis()
                .y_desc("log10 |D|² (a.u.)")
                .draw()
                .map_err(err)?;
            let steps = 100;
            cb.draw_series((0..steps).map(|j| {
                let a = lo + (hi - lo) * j as f64 / steps as f64;
                let b = lo + (hi - lo) * (j + 1) as f64 / steps as f64;
                Rectangle::new(
                    [(0.0, a), (1.0, b)],
                    ViridisRGB::get_color_normalized(0.5 * (a + b), lo, hi).filled(),
                )
            }))
            .map_err(err)?;
        }
        root.draw(&Text::new(
            "grey: no value (point failed, below threshold or family absent)",
            (20, 42),
            ("sans-serif", 12).into_font().color(&RGBColor(90, 90, 90)),
        ))
        .map_err(err)?;
        root.present().map_err(err)?;
    }
    Ok(text)
}
