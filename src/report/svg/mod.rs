//! SVG figures, drawn on plotters' SVG backend with axes and legends of our own
//! ([`canvas`], [`legend`]):
//!
//! - [`spectrum_figure`]: the spectrum with its family (per half cycle where the half cycles
//!   differ) and channel-pair contributions, cutoffs, and per family the emission times, the
//!   harmonic phase and the attochirp;
//! - [`hole_figure`]: hole populations (log scale) and coherences (modulus and phase) against
//!   the return delay.
//!
//! Every figure opens with a title block that names the target, every laser parameter
//! (intensity, wavelength, polarization and ellipticity, further colours, CEP, FWHM) and the
//! models, so that two runs never carry the same title. Legends sit in a column beside the
//! data. Curves that are not drawn are named in the legend with the reason. Colours and
//! dashes: [`palette`].

pub mod canvas;
mod holes;
pub mod legend;
pub mod palette;
mod spectrum;
pub mod timing;

pub use holes::hole_figure;
pub use spectrum::spectrum_figure;

use plotters::style::text_anchor::{HPos, VPos};

use canvas::{Area, Drawn, text, text_style, wrap};
use palette::INK;

/// A vertical marker on the spectrum panels.
#[derive(Clone, Debug)]
pub struct Marker {
    /// Legend text.
    pub label: String,
    /// Position (harmonic order).
    pub order: f64,
}

/// The cutoff of one half cycle of the reference channel.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct HalfCycleMark {
    /// Crest (half cycle) index, as in the family columns (`hc`).
    pub half_cycle: i32,
    /// Its cutoff photon energy (a.u.): quantum where found, else classical + 0.32 Ip.
    pub cutoff: f64,
}

/// What a figure needs beyond the spectrum: the title block, the axis conventions and the
/// cutoffs.
#[derive(Clone, Debug, Default)]
pub struct FigureContext {
    /// First line (target and quantity).
    pub title: String,
    /// Further lines: laser, models, method (wrapped to the figure width).
    pub details: Vec<String>,
    /// Photon energy of the first colour (eV), for the photon-energy axis on top.
    pub photon_ev: f64,
    /// Ticks at odd harmonic orders (inversion-symmetric field and target).
    pub odd_orders: bool,
    /// Half cycles differ (periodic field that is not half-wave symmetric, e.g. ω + 2ω):
    /// families are drawn per half cycle, with a cutoff per half cycle.
    pub split_half_cycles: bool,
    /// Half cycles repeat each other (half-wave symmetric field): one stands for all.
    pub half_wave_symmetric: bool,
    /// Vertical markers (cutoffs).
    pub markers: Vec<Marker>,
    /// Cutoff of each half cycle of the reference channel.
    pub half_cycles: Vec<HalfCycleMark>,
    /// Cutoff of the field (a.u.), for half cycles missing from `half_cycles`.
    pub cutoff: Option<f64>,
    /// Ionization potential of the reference channel (a.u.).
    pub ip_reference: f64,
}

impl FigureContext {
    /// Cutoff (a.u.) of half cycle `hc`, or the field's.
    pub fn cutoff_of(&self, hc: i32) -> Option<f64> {
        self.half_cycles
            .iter()
            .find(|h| h.half_cycle == hc)
            .map(|h| h.cutoff)
            .or(self.cutoff)
    }
}

/// Figure width (px).
pub const WIDTH: u32 = 1200;
/// Left edge of the plot frames (px).
const PLOT_LEFT: f64 = 90.0;
/// Right edge of the plot frames (px).
const PLOT_RIGHT: f64 = 810.0;
/// Left edge of the legend column (px).
const LEGEND_LEFT: f64 = 835.0;
/// Width of the legend column (px).
const LEGEND_WIDTH: f64 = 355.0;

/// Lines of the title block (wrapped).
fn title_lines(ctx: &FigureContext) -> (Vec<String>, Vec<String>) {
    let chars = (WIDTH as f64 / 7.6) as usize;
    let title = wrap(&ctx.title, (WIDTH as f64 / 9.5) as usize);
    let details = ctx.details.iter().flat_map(|d| wrap(d, chars)).collect();
    (title, details)
}

/// Height (px) of the title block.
fn title_height(ctx: &FigureContext) -> f64 {
    let (t, d) = title_lines(ctx);
    14.0 + 22.0 * t.len() as f64 + 17.0 * d.len() as f64 + 8.0
}

/// Draws the title block at the top of the figure.
fn draw_title(area: &Area, ctx: &FigureContext) -> Drawn {
    let (t, d) = title_lines(ctx);
    let mut y = 14.0;
    let big = text_style(17, INK, HPos::Left, VPos::Top);
    for l in &t {
        text(area, l, 16.0, y, &big)?;
        y += 22.0;
    }
    let small = text_style(13, INK, HPos::Left, VPos::Top);
    for l in &d {
        text(area, l, 16.0, y, &small)?;
        y += 17.0;
    }
    Ok(())
}
