//! The detection figure: the single-molecule spectrum at the peak intensity and the detected
//! spectrum on one log axis, total and per family (SVG text; the binary writes it).
//!
//! The single-molecule and the detected spectra have different units and scales: each total is
//! normalised to its own maximum and each family to the maximum of its total, so the figure
//! compares shapes and shares: where the medium selects a family, where the filter cuts, how the
//! resolution shapes the lines.

use std::fmt::Write;

/// One curve.
#[derive(Clone, Debug)]
pub struct Curve {
    /// Legend text.
    pub label: String,
    /// Photon energies (eV).
    pub x: Vec<f64>,
    /// Values (any positive scale; normalised to the curve's maximum).
    pub y: Vec<f64>,
    /// Stroke colour (SVG colour).
    pub colour: &'static str,
    /// Dashed (single-molecule) or solid (detected).
    pub dashed: bool,
    /// Index of the curve whose maximum normalises this one (a family is drawn relative to its
    /// total, so that the families' shares stay visible).
    pub scale_with: usize,
}

/// Decades shown below each curve's maximum.
const DECADES: f64 = 8.0;

/// The figure (width 900, height 520).
pub fn detection_figure(title: &str, curves: &[Curve]) -> String {
    let (w, h) = (900.0, 520.0);
    let (left, right, top, bottom) = (70.0, 200.0, 40.0, 50.0);
    let (pw, ph) = (w - left - right, h - top - bottom);
    let xs = curves.iter().flat_map(|c| c.x.iter().copied());
    let (mut x0, mut x1) = (f64::INFINITY, f64::NEG_INFINITY);
    for x in xs {
        if x.is_finite() {
            x0 = x0.min(x);
            x1 = x1.max(x);
        }
    }
    if x1.partial_cmp(&x0) != Some(std::cmp::Ordering::Greater) {
        x0 = 0.0;
        x1 = 1.0;
    }
    let px = |x: f64| left + (x - x0) / (x1 - x0) * pw;
    let py = |l: f64| top + (-l / DECADES).clamp(0.0, 1.0) * ph;
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}" font-family="sans-serif" font-size="12">"#
    );
    let _ = writeln!(s, r#"<rect width="{w}" height="{h}" fill="white"/>"#);
    let _ = writeln!(
        s,
        r#"<text x="{}" y="22" text-anchor="middle" font-size="14">{}</text>"#,
        left + pw / 2.0,
        escape(title)
    );
    let _ = writeln!(
        s,
        r#"<rect x="{left}" y="{top}" width="{pw}" height="{ph}" fill="none" stroke="black"/>"#
    );
    for d in 0..=(DECADES as i32) {
        let y = py(-(d as f64));
        let _ = writeln!(
            s,
            r##"<line x1="{left}" y1="{y}" x2="{}" y2="{y}" stroke="#ddd"/><text x="{}" y="{}" text-anchor="end">{}</text>"##,
            left + pw,
            left - 6.0,
            y + 4.0,
            if d == 0 {
                "1".to_string()
            } else {
                format!(r#"10<tspan dy="-5" font-size="9">−{d}</tspan>"#)
            }
        );
    }
    let step = nice_step((x1 - x0) / 8.0);
    let mut t = (x0 / step).ceil() * step;
    while t <= x1 + 1e-9 {
        let x = px(t);
        let _ = writeln!(
            s,
            r##"<line x1="{x}" y1="{top}" x2="{x}" y2="{}" stroke="#eee"/><text x="{x}" y="{}" text-anchor="middle">{t:.0}</text>"##,
            top + ph,
            top + ph + 16.0
        );
        t += step;
    }
    let _ = writeln!(
        s,
        r#"<text x="{}" y="{}" text-anchor="middle">photon energy (eV)</text>"#,
        left + pw / 2.0,
        h - 12.0
    );
    let _ = writeln!(
        s,
        r#"<text x="18" y="{}" text-anchor="middle" transform="rotate(-90 18 {})">relative to the maximum of each total</text>"#,
        top + ph / 2.0,
        top + ph / 2.0
    );
    for (i, c) in curves.iter().enumerate() {
        let max =
            c.y.iter()
                .copied()
                .filter(|v| v.is_finite())
                .fold(0.0_f64, f64::max);
        if max > 0.0 {
            let mut points = String::new();
            for (x, y) in c.x.iter().zip(&c.y) {
                if x.is_finite() && y.is_finite() {
                    let l = if *y > 0.0 {
                        (y / max).log10()
                    } else {
                        -DECADES
                    };
                    let _ = write!(points, "{:.2},{:.2} ", px(*x), py(l));
                }
            }
            let dash = if c.dashed {
                r#" stroke-dasharray="5,3""#
            } else {
                ""
            };
            let _ = writeln!(
                s,
                r#"<polyline points="{points}" fill="none" stroke="{}" stroke-width="1.3"{dash}/>"#,
                c.colour
            );
        }
        let ly = top + 14.0 + 18.0 * i as f64;
        let lx = left + pw + 12.0;
        let dash = if c.dashed {
            r#" stroke-dasharray="5,3""#
        } else {
            ""
        };
        let _ = writeln!(
            s,
            r#"<line x1="{lx}" y1="{ly}" x2="{}" y2="{ly}" stroke="{}" stroke-width="2"{dash}/><text x="{}" y="{}">{}</text>"#,
            lx + 24.0,
            c.colour,
            lx + 30.0,
            ly + 4.0,
            escape(&c.label)
        );
    }
    s.push_str("</svg>\n");
    s
}

fn nice_step(raw: f64) -> f64 {
    if !(raw > 0.0 && raw.is_finite()) {
        return 1.0;
    }
    let p = 10f64.powf(raw.log10().floor());
    let m = raw / p;
    let k = if m < 1.5 {
        1.0
    } else if m < 3.5 {
        2.0
    } else if m < 7.5 {
        5.0
    } else {
        10.0
    };
    k * p
}

fn escape(t: &str) -> String {
    t.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
}
