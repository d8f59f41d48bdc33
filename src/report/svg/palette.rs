//! Colours and line styles shared by every figure of the tool.
//!
//! The colours are the eight-colour palette of M. Okabe and K. Ito, "Color Universal Design
//! (CUD): how to make figures and presentations that are friendly to colorblind people" (2008),
//! as recommended by B. Wong, Nature Methods 8, 441 (2011): distinguishable for the common
//! forms of colour blindness. Colours alone do not survive greyscale printing, so every curve
//! also has its own dash pattern, and consecutive styles change both colour and dash: style `i`
//! takes colour `i mod 6` and dash `i mod 4`, twelve distinct combinations. Black (solid, thick)
//! is kept for totals; the palette's yellow is left out (too light on white).
//!
//! The same colours, in the same order, are used by `scripts/validation_report.py`
//! (`OKABE_ITO` there).

use plotters::style::RGBColor;

/// Okabe–Ito colours in the order styles use them: blue, vermillion, bluish green, reddish
/// purple, orange, sky blue.
pub const COLOURS: [RGBColor; 6] = [
    RGBColor(0x00, 0x72, 0xB2),
    RGBColor(0xD5, 0x5E, 0x00),
    RGBColor(0x00, 0x9E, 0x73),
    RGBColor(0xCC, 0x79, 0xA7),
    RGBColor(0xE6, 0x9F, 0x00),
    RGBColor(0x56, 0xB4, 0xE9),
];

/// Black, for totals.
pub const INK: RGBColor = RGBColor(0, 0, 0);

/// Grey, for reference curves (incoherent sums) and notes.
pub const GREY: RGBColor = RGBColor(0x70, 0x70, 0x70);

/// Dash pattern of a line.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Dash {
    /// Continuous.
    Solid,
    /// 7 px on, 4 px off.
    Dashed,
    /// 2 px on, 3 px off.
    Dotted,
    /// 9 px on, 3 off, 2 on, 3 off.
    DashDot,
}

impl Dash {
    /// On/off lengths in pixels (empty for solid).
    pub fn pattern(self) -> &'static [f64] {
        match self {
            Dash::Solid => &[],
            Dash::Dashed => &[7.0, 4.0],
            Dash::Dotted => &[2.0, 3.0],
            Dash::DashDot => &[9.0, 3.0, 2.0, 3.0],
        }
    }
}

const DASHES: [Dash; 4] = [Dash::Solid, Dash::Dashed, Dash::Dotted, Dash::DashDot];

/// How a curve is drawn.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LineStyle {
    /// Colour.
    pub colour: RGBColor,
    /// Width in pixels.
    pub width: u32,
    /// Dash pattern.
    pub dash: Dash,
    /// Whether the data points get a dot (coarse grids: harmonic lines).
    pub dots: bool,
}

impl LineStyle {
    /// The `i`-th style of the cycle (colour `i mod 6`, dash `i mod 4`).
    pub fn nth(i: usize) -> Self {
        LineStyle {
            colour: COLOURS[i % COLOURS.len()],
            width: 2,
            dash: DASHES[i % DASHES.len()],
            dots: false,
        }
    }

    /// The thick black solid line of a total.
    pub fn total() -> Self {
        LineStyle {
            colour: INK,
            width: 3,
            dash: Dash::Solid,
            dots: false,
        }
    }

    /// A thin grey reference line.
    pub fn reference() -> Self {
        LineStyle {
            colour: GREY,
            width: 2,
            dash: Dash::Dashed,
            dots: false,
        }
    }

    /// The same style with another dash.
    pub fn with_dash(self, dash: Dash) -> Self {
        LineStyle { dash, ..self }
    }

    /// The same style with dots at the data points.
    pub fn with_dots(self, dots: bool) -> Self {
        LineStyle { dots, ..self }
    }
}
