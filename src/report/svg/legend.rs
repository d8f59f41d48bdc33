//! Legends drawn beside the data, never on it: each entry shows the very style its curve is
//! drawn with (same colour, width, dash and dots), so legend and data cannot disagree.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::canvas::{Area, Drawn, Frame, err, text, text_style, wrap};
use super::palette::{GREY, INK, LineStyle};

/// What an entry shows in front of its text.
#[derive(Clone, Debug)]
pub enum Mark {
    /// A line sample in the curve's style.
    Line(LineStyle),
    /// Open circles (scattered points).
    Dots(RGBColor),
    /// No sample: a note (grey text), e.g. what was left out and why.
    Note,
}

/// One legend entry.
#[derive(Clone, Debug)]
pub struct Entry {
    /// Sample.
    pub mark: Mark,
    /// Text.
    pub label: String,
}

impl Entry {
    /// A line entry.
    pub fn line(style: LineStyle, label: impl Into<String>) -> Self {
        Entry {
            mark: Mark::Line(style),
            label: label.into(),
        }
    }

    /// A note entry.
    pub fn note(label: impl Into<String>) -> Self {
        Entry {
            mark: Mark::Note,
            label: label.into(),
        }
    }
}

/// Characters per legend line at 12 px in a column `width` px wide (after the sample).
fn chars_per_line(width: f64) -> usize {
    (((width - 44.0) / 6.6).floor() as usize).max(12)
}

/// Height (px) the entries need in a column `width` px wide.
pub fn height(entries: &[Entry], width: f64) -> f64 {
    entries
        .iter()
        .map(|e| 15.0 * wrap(&e.label, chars_per_line(width)).len() as f64 + 4.0)
        .sum()
}

/// Draws the entries top-down from `(left, top)` in a column `width` px wide.
pub fn draw(area: &Area, entries: &[Entry], left: f64, top: f64, width: f64) -> Drawn {
    let mut y = top;
    let per_line = chars_per_line(width);
    // A frame whose data coordinates are pixels, to draw samples with the curves' own code.
    let sample_frame = Frame {
        left,
        top: 0.0,
        width: 40.0,
        height: 10_000.0,
        x: (left, left + 40.0),
        y: (10_000.0, 0.0),
    };
    for e in entries {
        let lines = wrap(&e.label, per_line);
        let mid = y + 7.5;
        let colour = match &e.mark {
            Mark::Line(style) => {
                let mut s = *style;
                s.dots = false;
                sample_frame.line(area, &[(left + 2.0, mid), (left + 34.0, mid)], &s)?;
                if style.dots {
                    area.draw(&Circle::new(
                        ((left + 18.0) as i32, mid as i32),
                        3,
                        style.colour.filled(),
                    ))
                    .map_err(err)?;
                }
                INK
            }
            Mark::Dots(c) => {
                for dx in [8.0, 18.0, 28.0] {
                    area.draw(&Circle::new(
                        ((left + dx) as i32, mid as i32),
                        3,
                        ShapeStyle::from(c).stroke_width(1),
                    ))
                    .map_err(err)?;
                }
                INK
            }
            Mark::Note => GREY,
        };
        let x = if matches!(e.mark, Mark::Note) {
            left
        } else {
            left + 42.0
        };
        let style = text_style(12, colour, HPos::Left, VPos::Center);
        for (k, l) in lines.iter().enumerate() {
            text(area, l, x, mid + 15.0 * k as f64, &style)?;
        }
        y += 15.0 * lines.len() as f64 + 4.0;
    }
    Ok(())
}
