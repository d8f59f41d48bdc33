//! A plotting frame drawn by hand on a plotters SVG area: data → pixel mapping, axes with
//! exactly the ticks we choose (odd harmonic orders, powers of ten), a secondary axis on top,
//! polylines clipped to the frame and dashed in pixel space, dots and text.
//!
//! Log-scale panels pass `log10` of their values: the frame itself is linear.

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::palette::{GREY, INK, LineStyle};

/// The drawing area of a figure (pixel coordinates).
pub type Area<'a, 'b> = DrawingArea<SVGBackend<'a>, Shift>;

/// A drawing result with the error as text.
pub type Drawn = Result<(), String>;

/// Turns a plotters error into text.
pub fn err<E: std::fmt::Debug>(e: E) -> String {
    format!("plotting failed: {e:?}")
}

/// Font family of every text.
pub const FONT: &str = "sans-serif";

/// A tick: position (data units) and label (empty: a minor tick without label).
pub type Tick = (f64, String);

/// A rectangle of the figure with data ranges on both axes.
#[derive(Clone, Copy, Debug)]
pub struct Frame {
    /// Left edge (px).
    pub left: f64,
    /// Top edge (px).
    pub top: f64,
    /// Width (px).
    pub width: f64,
    /// Height (px).
    pub height: f64,
    /// Data range along x.
    pub x: (f64, f64),
    /// Data range along y.
    pub y: (f64, f64),
}

/// Text style anchored at `h`, `v`.
pub fn text_style(size: u32, colour: RGBColor, h: HPos, v: VPos) -> TextStyle<'static> {
    TextStyle {
        font: (FONT, size).into_font(),
        color: colour.to_backend_color(),
        pos: Pos::new(h, v),
    }
}

/// Draws `text` at pixel `(x, y)`.
pub fn text(area: &Area, s: &str, x: f64, y: f64, style: &TextStyle) -> Drawn {
    area.draw(&Text::new(
        s.to_string(),
        (x as i32, y as i32),
        style.clone(),
    ))
    .map_err(err)
}

/// Splits `s` into lines of at most `width` characters at spaces.
pub fn wrap(s: &str, width: usize) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    let mut line = String::new();
    for word in s.split(' ') {
        if !line.is_empty() && line.chars().count() + 1 + word.chars().count() > width {
            out.push(std::mem::take(&mut line));
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        out.push(line);
    }
    out
}

impl Frame {
    /// Pixel x of data x.
    pub fn px(&self, x: f64) -> f64 {
        self.left + (x - self.x.0) / (self.x.1 - self.x.0) * self.width
    }

    /// Pixel y of data y.
    pub fn py(&self, y: f64) -> f64 {
        self.top + self.height - (y - self.y.0) / (self.y.1 - self.y.0) * self.height
    }

    fn right(&self) -> f64 {
        self.left + self.width
    }

    fn bottom(&self) -> f64 {
        self.top + self.height
    }

    /// Frame box, grid lines at the labelled ticks, ticks and their labels, axis titles.
    pub fn axes(
        &self,
        area: &Area,
        xticks: &[Tick],
        yticks: &[Tick],
        xdesc: &str,
        ydesc: &str,
    ) -> Drawn {
        let grid = RGBColor(0xDD, 0xDD, 0xDD);
        let label = text_style(12, INK, HPos::Center, VPos::Top);
        for (x, l) in xticks {
            if *x < self.x.0 - 1e-9 || *x > self.x.1 + 1e-9 {
                continue;
            }
            let px = self.px(*x) as i32;
            if !l.is_empty() {
                area.draw(&PathElement::new(
                    vec![(px, self.top as i32), (px, self.bottom() as i32)],
                    grid.stroke_width(1),
                ))
                .map_err(err)?;
                text(area, l, px as f64, self.bottom() + 6.0, &label)?;
            }
            let len = if l.is_empty() { 3 } else { 6 };
            area.draw(&PathElement::new(
                vec![(px, self.bottom() as i32), (px, self.bottom() as i32 - len)],
                INK.stroke_width(1),
            ))
            .map_err(err)?;
        }
        let ylabel = text_style(12, INK, HPos::Right, VPos::Center);
        for (y, l) in yticks {
            if *y < self.y.0 - 1e-9 || *y > self.y.1 + 1e-9 {
                continue;
            }
            let py = self.py(*y) as i32;
            if !l.is_empty() {
                area.draw(&PathElement::new(
                    vec![(self.left as i32, py), (self.right() as i32, py)],
                    grid.stroke_width(1),
                ))
                .map_err(err)?;
                text(area, l, self.left - 7.0, py as f64, &ylabel)?;
            }
            let len = if l.is_empty() { 3 } else { 6 };
            area.draw(&PathElement::new(
                vec![(self.left as i32, py), (self.left as i32 + len, py)],
                INK.stroke_width(1),
            ))
            .map_err(err)?;
        }
        area.draw(&Rectangle::new(
            [
                (self.left as i32, self.top as i32),
                (self.right() as i32, self.bottom() as i32),
            ],
            INK.stroke_width(1),
        ))
        .map_err(err)?;
        text(
            area,
            xdesc,
            self.left + 0.5 * self.width,
            self.bottom() + 24.0,
            &text_style(13, INK, HPos::Center, VPos::Top),
        )?;
        let ystyle =
            text_style(13, INK, HPos::Center, VPos::Bottom).transform(FontTransform::Rotate270);
        text(
            area,
            ydesc,
            self.left - 58.0,
            self.top + 0.5 * self.height,
            &ystyle,
        )?;
        Ok(())
    }

    /// A second x axis along the top edge: `ticks` in the secondary unit, `to_primary` maps
    /// them to the frame's x.
    pub fn top_axis(
        &self,
        area: &Area,
        ticks: &[Tick],
        to_primary: impl Fn(f64) -> f64,
        desc: &str,
    ) -> Drawn {
        let label = text_style(12, INK, HPos::Center, VPos::Bottom);
        for (v, l) in ticks {
            let x = to_primary(*v);
            if x < self.x.0 - 1e-9 || x > self.x.1 + 1e-9 {
                continue;
            }
            let px = self.px(x) as i32;
            let len = if l.is_empty() { 3 } else { 6 };
            area.draw(&PathElement::new(
                vec![(px, self.top as i32), (px, self.top as i32 + len)],
                INK.stroke_width(1),
            ))
            .map_err(err)?;
            if !l.is_empty() {
                text(area, l, px as f64, self.top - 4.0, &label)?;
            }
        }
        text(
            area,
            desc,
            self.left + 0.5 * self.width,
            self.top - 20.0,
            &text_style(13, INK, HPos::Center, VPos::Bottom),
        )
    }

    /// Clips the segment `a → b` (pixels) to the frame (Liang–Barsky).
    fn clip(&self, a: (f64, f64), b: (f64, f64)) -> Option<((f64, f64), (f64, f64))> {
        let (dx, dy) = (b.0 - a.0, b.1 - a.1);
        let mut t0: f64 = 0.0;
        let mut t1: f64 = 1.0;
        for (p, q) in [
            (-dx, a.0 - self.left),
            (dx, self.right() - a.0),
            (-dy, a.1 - self.top),
            (dy, self.bottom() - a.1),
        ] {
            if p == 0.0 {
                if q < 0.0 {
                    return None;
                }
            } else {
                let r = q / p;
                if p < 0.0 {
                    t0 = t0.max(r);
                } else {
                    t1 = t1.min(r);
                }
            }
        }
        (t0 <= t1).then_some((
            (a.0 + t0 * dx, a.1 + t0 * dy),
            (a.0 + t1 * dx, a.1 + t1 * dy),
        ))
    }

    /// Draws one unbroken run of data points with `style` (clipped to the frame, dashed in
    /// pixel space), and dots at the points inside the frame when the style asks for them.
    pub fn line(&self, area: &Area, pts: &[(f64, f64)], style: &LineStyle) -> Drawn {
        let pixels: Vec<(f64, f64)> = pts
            .iter()
            .filter(|p| p.0.is_finite() && p.1.is_finite())
            .map(|&(x, y)| (self.px(x), self.py(y)))
            .collect();
        let stroke = style.colour.stroke_width(style.width);
        let pattern = style.dash.pattern();
        let mut phase = 0.0;
        let mut piece: Vec<(i32, i32)> = Vec::new();
        let flush = |piece: &mut Vec<(i32, i32)>| -> Drawn {
            if piece.len() > 1 {
                area.draw(&PathElement::new(std::mem::take(piece), stroke))
                    .map_err(err)?;
            }
            piece.clear();
            Ok(())
        };
        for w in pixels.windows(2) {
            let Some((a, b)) = self.clip(w[0], w[1]) else {
                flush(&mut piece)?;
                continue;
            };
            if pattern.is_empty() {
                let pa = (a.0.round() as i32, a.1.round() as i32);
                if piece.last() != Some(&pa) {
                    flush(&mut piece)?;
                    piece.push(pa);
                }
                piece.push((b.0.round() as i32, b.1.round() as i32));
                if b != w[1] {
                    flush(&mut piece)?;
                }
                continue;
            }
            // Dashes: walk along the segment, switching on and off by the pattern.
            let len = ((b.0 - a.0).powi(2) + (b.1 - a.1).powi(2)).sqrt();
            let total: f64 = pattern.iter().sum();
            let mut s = 0.0;
            while s < len {
                let within = phase % total;
                let (mut acc, mut k) = (0.0, 0);
                while acc + pattern[k] <= within {
                    acc += pattern[k];
                    k += 1;
                }
                let step = (acc + pattern[k] - within).min(len - s);
                if k % 2 == 0 {
                    let p = |u: f64| {
                        (
                            (a.0 + (b.0 - a.0) * u / len).round() as i32,
                            (a.1 + (b.1 - a.1) * u / len).round() as i32,
                        )
                    };
                    area.draw(&PathElement::new(vec![p(s), p(s + step)], stroke))
                        .map_err(err)?;
                }
                s += step;
                phase += step;
            }
        }
        flush(&mut piece)?;
        if style.dots {
            for &(x, y) in &pixels {
                if x >= self.left && x <= self.right() && y >= self.top && y <= self.bottom() {
                    area.draw(&Circle::new(
                        (x.round() as i32, y.round() as i32),
                        3,
                        style.colour.filled(),
                    ))
                    .map_err(err)?;
                }
            }
        }
        Ok(())
    }

    /// Dots (no line) at the points inside the frame.
    pub fn dots(&self, area: &Area, pts: &[(f64, f64)], colour: RGBColor, radius: u32) -> Drawn {
        for &(x, y) in pts {
            let (px, py) = (self.px(x), self.py(y));
            if x.is_finite()
                && y.is_finite()
                && px >= self.left
                && px <= self.right()
                && py >= self.top
                && py <= self.bottom()
            {
                area.draw(&Circle::new(
                    (px.round() as i32, py.round() as i32),
                    radius,
                    ShapeStyle::from(&colour).stroke_width(1),
                ))
                .map_err(err)?;
            }
        }
        Ok(())
    }

    /// A vertical line across the frame at data `x`.
    pub fn vline(&self, area: &Area, x: f64, style: &LineStyle) -> Drawn {
        self.line(area, &[(x, self.y.0), (x, self.y.1)], style)
    }

    /// A note inside the frame's top-left corner (grey, small).
    pub fn corner_note(&self, area: &Area, s: &str) -> Drawn {
        text(
            area,
            s,
            self.left + 6.0,
            self.top + 5.0,
            &text_style(11, GREY, HPos::Left, VPos::Top),
        )
    }
}

/// Unicode superscript of an integer (`-12` → `⁻¹²`).
pub fn superscript(n: i64) -> String {
    n.to_string()
        .chars()
        .map(|c| match c {
            '-' => '⁻',
            '0' => '⁰',
            '1' => '¹',
            '2' => '²',
            '3' => '³',
            '4' => '⁴',
            '5' => '⁵',
            '6' => '⁶',
            '7' => '⁷',
            '8' => '⁸',
            _ => '⁹',
        })
        .collect()
}

/// Decade ticks of a log10 range `[lo, hi]` (both integers): labels `10ⁿ` on every `k`-th
/// decade (at most 9 labels), minor ticks on the others.
pub fn decade_ticks(lo: f64, hi: f64) -> Vec<Tick> {
    let (a, b) = (lo.floor() as i64, hi.ceil() as i64);
    let span = (b - a).max(1);
    let every = [1, 2, 3, 4, 5, 10, 20]
        .into_iter()
        .find(|k| span / k <= 8)
        .unwrap_or(50);
    (a..=b)
        .map(|n| {
            let label = if n.rem_euclid(every) == 0 {
                format!("10{}", superscript(n))
            } else {
                String::new()
            };
            (n as f64, label)
        })
        .collect()
}

/// Nice linear ticks (steps 1, 2, 2.5 or 5 × 10ᵏ), about `n` of them, labelled with the
/// digits the step needs.
pub fn linear_ticks(lo: f64, hi: f64, n: usize) -> Vec<Tick> {
    if hi.partial_cmp(&lo) != Some(std::cmp::Ordering::Greater) {
        return vec![(lo, format!("{lo}"))];
    }
    let raw = (hi - lo) / n.max(1) as f64;
    let mag = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 2.5, 5.0, 10.0]
        .into_iter()
        .map(|m| m * mag)
        .find(|s| *s >= raw)
        .unwrap_or(10.0 * mag);
    let digits = (-(step.log10().floor()) as i64 + i64::from((step / mag - 2.5).abs() < 1e-9))
        .clamp(0, 6) as usize;
    let first = (lo / step).ceil() as i64;
    let last = (hi / step).floor() as i64;
    (first..=last)
        .map(|k| {
            let v = k as f64 * step;
            let v = if v.abs() < 1e-12 * step { 0.0 } else { v };
            (v, format!("{v:.digits$}"))
        })
        .collect()
}

/// Harmonic-order ticks over `[x0, x1]`: with `odd`, labelled ticks at odd orders `1 + k·s`
/// (`s` = 2, 4, 6, 10, 20, 40, 100, …, at most 16 labels) and minor ticks at the other odd
/// orders when they are not too dense; otherwise nice integer ticks.
pub fn order_ticks(x0: f64, x1: f64, odd: bool) -> Vec<Tick> {
    if !odd {
        return linear_ticks(x0, x1, 10);
    }
    let span = x1 - x0;
    let s = [2.0, 4.0, 6.0, 10.0, 20.0, 40.0, 100.0, 200.0, 400.0, 1000.0]
        .into_iter()
        .find(|s| span / s <= 16.0)
        .unwrap_or(2000.0);
    let mut out = Vec::new();
    let first = ((x0 - 1.0) / 2.0).ceil() as i64;
    let last = ((x1 - 1.0) / 2.0).floor() as i64;
    let minor = span <= 120.0;
    for k in first..=last {
        let q = (2 * k + 1) as f64;
        if ((q - 1.0) / s).fract().abs() < 1e-9 {
            out.push((q, format!("{q:.0}")));
        } else if minor {
            out.push((q, String::new()));
        }
    }
    out
}
