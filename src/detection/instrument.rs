//! What happens to the harmonic light between the source and the counts: filters, the
//! spectrometer's response, its resolution, the wavelength ↔ energy axes, and line yields.
//!
//! * **Filters** (Beer–Lambert): a table of the transmission `T₀(E)` of a foil of thickness `d₀`
//!   gives `T(E) = T₀(E)^{d/d₀}` for thickness `d`; several filters multiply. The table is
//!   interpolated linearly in E, and energies outside it are an error (no extrapolation).
//! * **Response**: a table of the spectrometer's efficiency vs photon energy (grating, detector),
//!   interpolated linearly, errors outside.
//! * **Quantity**: the source spectrum is the emitted energy density `Ω⁴|D|²` (dipole form,
//!   DESIGN §3); a photon-counting detector sees `Ω³|D|²` (one photon per `Ω`).
//! * **Resolution**: a Gaussian of given FWHM, either in photon energy (constant width in eV) or
//!   in wavelength (constant width in nm, as for a grating spectrometer with a fixed slit). The
//!   wavelength kernel acts on the density per nm; in energy it reads
//!   `K(E, E') = G_λ(λ(E) − λ(E')) |dλ/dE|(E)`, `|dλ/dE| = hc/E²`.
//! * **Axes**: a density per eV becomes a density per nm by `S_λ = S_E |dE/dλ| = S_E E²/(hc)`
//!   (the Jacobian; without it the integrated yield is not conserved), `hc = 1239.84198… eV nm`
//!   from the CODATA 2018 constants of [`crate::units`].
//! * **Lines**: a periodic driver emits lines at `Ω = qω` whose strength is the computed value
//!   at those energies (per optical cycle); a pulse gives a continuous density, taken as linear
//!   between the computed energies. The detected spectrum is the lines (or the density) after
//!   filters and response, convolved with the resolution, on a fine uniform energy grid. The
//!   **line yield** of order q is the detected spectrum integrated over the window
//!   `[(q − w/2) ω, (q + w/2) ω]`, `w` the window in harmonic orders (default 1: neighbouring
//!   windows tile the axis, so the line yields add up to the integrated spectrum inside them).

use crate::error::{Error, Result, require_positive};
use crate::units;

/// `hc` in eV·nm from the CODATA 2018 values used by [`crate::units`].
pub fn hc_ev_nm() -> f64 {
    units::au_to_ev(units::wavelength_nm_to_omega(1.0))
}

/// Wavelength (nm) of a photon of energy `e` (eV), or the energy of a wavelength (the map is its
/// own inverse).
pub fn photon_wavelength_nm(e_ev: f64) -> f64 {
    hc_ev_nm() / e_ev
}

/// A density per eV at energy `e` (eV) as a density per nm: `S_E · E²/(hc)`.
pub fn per_ev_to_per_nm(e_ev: f64, per_ev: f64) -> f64 {
    per_ev * e_ev * e_ev / hc_ev_nm()
}

/// A density per nm at wavelength `l` (nm) as a density per eV: `S_λ · λ²/(hc)`.
pub fn per_nm_to_per_ev(l_nm: f64, per_nm: f64) -> f64 {
    per_nm * l_nm * l_nm / hc_ev_nm()
}

/// `FWHM = 2 sqrt(2 ln 2) σ` of a Gaussian.
pub fn fwhm_to_sigma(fwhm: f64) -> f64 {
    fwhm / (2.0 * (2.0 * std::f64::consts::LN_2).sqrt())
}

fn gaussian(x: f64, sigma: f64) -> f64 {
    (-(x * x) / (2.0 * sigma * sigma)).exp() / (sigma * (2.0 * std::f64::consts::PI).sqrt())
}

/// A table `y(x)`, interpolated linearly, undefined outside its range.
#[derive(Clone, Debug, PartialEq)]
pub struct Table {
    name: String,
    x: Vec<f64>,
    y: Vec<f64>,
}

impl Table {
    /// A table named `name` (used in errors) with strictly increasing finite `x` and finite,
    /// non-negative `y`, at least two points.
    ///
    /// # Errors
    /// Names the table, the index and the reason.
    pub fn new(name: &str, x: Vec<f64>, y: Vec<f64>) -> Result<Self> {
        if x.len() != y.len() {
            return Err(Error::invalid(
                name,
                format!("{} abscissae and {} values", x.len(), y.len()),
                "the two columns must have the same length",
            ));
        }
        if x.len() < 2 {
            return Err(Error::invalid(
                name,
                format!("{} points", x.len()),
                "a table needs at least two points",
            ));
        }
        for (i, (&a, &b)) in x.iter().zip(&y).enumerate() {
            if !a.is_finite() || !b.is_finite() {
                return Err(Error::invalid(
                    &format!("{name}[{i}]"),
                    format!("({a}, {b})"),
                    "must be finite numbers",
                ));
            }
            if b < 0.0 {
                return Err(Error::invalid(
                    &format!("{name}[{i}]"),
                    b,
                    "must not be negative",
                ));
            }
            if i > 0 && a <= x[i - 1] {
                return Err(Error::invalid(
                    &format!("{name}[{i}]"),
                    a,
                    "the abscissae must increase strictly",
                ));
            }
        }
        Ok(Table {
            name: name.to_string(),
            x,
            y,
        })
    }

    /// The table's name.
    pub fn name(&self) -> &str {
        &self.name
    }

    /// `(first, last)` abscissa.
    pub fn range(&self) -> (f64, f64) {
        (self.x[0], self.x[self.x.len() - 1])
    }

    /// The linear interpolant at `x`, None outside the range.
    pub fn at(&self, x: f64) -> Option<f64> {
        let (a, b) = self.range();
        if !(x >= a && x <= b) {
            return None;
        }
        let n = self.x.len();
        let k = self.x.partition_point(|&v| v < x).clamp(1, n - 1);
        let t = (x - self.x[k - 1]) / (self.x[k] - self.x[k - 1]);
        Some(self.y[k - 1] + (self.y[k] - self.y[k - 1]) * t)
    }

    /// The value at `x` or an error naming the table and its range.
    ///
    /// # Errors
    /// `x` outside the table.
    pub fn require(&self, x: f64, unit: &str) -> Result<f64> {
        self.at(x).ok_or_else(|| {
            let (a, b) = self.range();
            Error::invalid(
                &self.name,
                format!("{x:.4} {unit}"),
                &format!(
                    "the spectrum reaches this value but the table covers only {a} to {b} \
                     {unit}: extend the table (it is not extrapolated)"
                ),
            )
        })
    }
}

/// A filter foil.
#[derive(Clone, Debug, PartialEq)]
pub struct Filter {
    /// Transmission vs photon energy (eV) of a foil of `table_thickness`.
    pub table: Table,
    /// Thickness the table was made for (any length unit, the same as `thickness`).
    pub table_thickness: f64,
    /// Thickness in the beam.
    pub thickness: f64,
}

impl Filter {
    /// `T₀(E)^{d/d₀}` at `e` (eV).
    ///
    /// # Errors
    /// `e` outside the table.
    pub fn transmission(&self, e_ev: f64) -> Result<f64> {
        let t0 = self.table.require(e_ev, "eV")?;
        Ok(t0.powf(self.thickness / self.table_thickness))
    }
}

/// The spectral resolution (Gaussian).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Resolution {
    /// FWHM in photon energy (eV).
    EnergyFwhm(f64),
    /// FWHM in wavelength (nm).
    WavelengthFwhm(f64),
}

impl Resolution {
    /// The kernel `K(E, E')` (per eV at `E`) for a source at `E'` (eV).
    pub fn kernel(&self, e: f64, e_source: f64) -> f64 {
        match *self {
            Resolution::EnergyFwhm(f) => gaussian(e - e_source, fwhm_to_sigma(f)),
            Resolution::WavelengthFwhm(f) => {
                let hc = hc_ev_nm();
                gaussian(hc / e - hc / e_source, fwhm_to_sigma(f)) * hc / (e * e)
            }
        }
    }

    /// The FWHM in eV at energy `e` (eV).
    pub fn energy_width(&self, e: f64) -> f64 {
        match *self {
            Resolution::EnergyFwhm(f) => f,
            Resolution::WavelengthFwhm(f) => f * e * e / hc_ev_nm(),
        }
    }
}

/// What the detector counts.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Quantity {
    /// Photons: `Ω³|D|²`.
    Photons,
    /// Energy: `Ω⁴|D|²`.
    Energy,
}

/// The detector chain.
#[derive(Clone, Debug, PartialEq)]
pub struct Detector {
    /// Filters in the beam.
    pub filters: Vec<Filter>,
    /// Spectrometer efficiency vs photon energy (eV).
    pub response: Option<Table>,
    /// Resolution (None: lines stay lines, densities stay on the model grid's interpolant).
    pub resolution: Option<Resolution>,
    /// What is counted.
    pub quantity: Quantity,
    /// Line window in harmonic orders.
    pub line_window: f64,
    /// Step of the output grid (eV); None: a tenth of the narrowest resolution width.
    pub output_step: Option<f64>,
}

impl Default for Detector {
    /// No filter, flat response, no resolution, photons, window of one order.
    fn default() -> Self {
        Detector {
            filters: Vec::new(),
            response: None,
            resolution: None,
            quantity: Quantity::Photons,
            line_window: 1.0,
            output_step: None,
        }
    }
}

/// How the model spectrum is to be read.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SourceKind {
    /// Lines at the integer harmonic orders of the grid (periodic driver).
    Lines,
    /// A continuous density, linear between the grid's energies (pulse).
    Density,
}

/// The yield of one harmonic line.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LineYield {
    /// Harmonic order q.
    pub order: i64,
    /// Line energy `qω` (eV).
    pub energy_ev: f64,
    /// Detected spectrum integrated over the window.
    pub value: f64,
}

/// The spectrum as the detector records it.
#[derive(Clone, Debug, PartialEq)]
pub struct Detected {
    /// Fine output grid (eV), ascending (empty for lines without resolution).
    pub energy_ev: Vec<f64>,
    /// Density per eV on that grid.
    pub per_ev: Vec<f64>,
    /// Line yields.
    pub lines: Vec<LineYield>,
}

impl Detector {
    /// Transmission × response at `e` (eV).
    ///
    /// # Errors
    /// `e` outside a table.
    pub fn throughput(&self, e_ev: f64) -> Result<f64> {
        let mut t = 1.0;
        for f in &self.filters {
            t *= f.transmission(e_ev)?;
        }
        if let Some(r) = &self.response {
            t *= r.require(e_ev, "eV")?;
        }
        Ok(t)
    }

    /// Checks the chain's numbers.
    ///
    /// # Errors
    /// Non-positive thicknesses, widths, window or step.
    pub fn validate(&self) -> Result<()> {
        for f in &self.filters {
            require_positive(
                &format!("{} table_thickness", f.table.name()),
                f.table_thickness,
            )?;
            require_positive(&format!("{} thickness", f.table.name()), f.thickness)?;
        }
        match self.resolution {
            Some(Resolution::EnergyFwhm(f)) => {
                require_positive("resolution fwhm_ev", f)?;
            }
            Some(Resolution::WavelengthFwhm(f)) => {
                require_positive("resolution fwhm_nm", f)?;
            }
            None => {}
        }
        require_positive("line_window_orders", self.line_window)?;
        if let Some(s) = self.output_step {
            require_positive("output_step_ev", s)?;
        }
        Ok(())
    }

    /// Applies the chain to a source spectrum `values` (emitted energy density `Ω⁴|D|²` or the
    /// equivalent combination) at `energies_ev`, with the driver's photon energy `omega_ev`.
    ///
    /// # Errors
    /// Table ranges, invalid settings, a grid that is not ascending.
    pub fn apply(
        &self,
        energies_ev: &[f64],
        values: &[f64],
        kind: SourceKind,
        omega_ev: f64,
    ) -> Result<Detected> {
        self.validate()?;
        if energies_ev.len() != values.len() || energies_ev.windows(2).any(|w| w[1] <= w[0]) {
            return Err(Error::Inconsistent(
                "detector: the energies must ascend and match the values".into(),
            ));
        }
        let mut weights = Vec::with_capacity(values.len());
        for (&e, &v) in energies_ev.iter().zip(values) {
            let counted = match self.quantity {
                Quantity::Energy => v,
                Quantity::Photons => v / units::ev_to_au(e),
            };
            weights.push(counted * self.throughput(e)?);
        }
        let half = 0.5 * self.line_window;
        let orders = || {
            let (lo, hi) = (
                energies_ev[0] / omega_ev,
                energies_ev[energies_ev.len() - 1] / omega_ev,
            );
            (lo.ceil() as i64)..=(hi.floor() as i64)
        };
        match kind {
            SourceKind::Lines => {
                let lines: Vec<(f64, f64)> = energies_ev
                    .iter()
                    .zip(&weights)
                    .filter(|(e, _)| {
                        let q = *e / omega_ev;
                        (q - q.round()).abs() < 1e-6
                    })
                    .map(|(e, w)| (*e, *w))
                    .collect();
                let Some(res) = self.resolution else {
                    // Lines stay lines: each window holds the lines inside it.
                    let lines = orders()
                        .map(|q| {
                            let (a, b) =
                                ((q as f64 - half) * omega_ev, (q as f64 + half) * omega_ev);
                            LineYield {
                                order: q,
                                energy_ev: q as f64 * omega_ev,
                                value: lines
                                    .iter()
                                    .filter(|(e, _)| *e >= a && *e < b)
                                    .map(|(_, w)| w)
                                    .sum(),
                            }
                        })
                        .collect();
                    return Ok(Detected {
                        energy_ev: Vec::new(),
                        per_ev: Vec::new(),
                        lines,
                    });
                };
                let grid = self.output_grid(energies_ev, res)?;
                let per_ev = grid
                    .iter()
                    .map(|&e| lines.iter().map(|(s, w)| w * res.kernel(e, *s)).sum())
                    .collect::<Vec<f64>>();
                let lines = window_yields(&grid, &per_ev, orders(), omega_ev, half);
                Ok(Detected {
                    energy_ev: grid,
                    per_ev,
                    lines,
                })
            }
            SourceKind::Density => {
                let (grid, per_ev) = match self.resolution {
                    None => {
                        let grid = self.output_grid_plain(energies_ev)?;
                        let d: Vec<f64> = grid
                            .iter()
                            .map(|&e| linear(energies_ev, &weights, e))
                            .collect();
                        (grid, d)
                    }
                    Some(res) => {
                        let grid = self.output_grid(energies_ev, res)?;
                        // Source density sampled finely (16 sub-intervals per model interval,
                        // trapezoid weights: exact for the piecewise-linear source up to the
                        // kernel's variation across a sub-interval).
                        let mut src = Vec::new();
                        for k in 0..energies_ev.len() - 1 {
                            let (a, b) = (energies_ev[k], energies_ev[k + 1]);
                            for m in 0..16 {
                                let t0 = m as f64 / 16.0;
                                let t1 = (m + 1) as f64 / 16.0;
                                let (e0, e1) = (a + (b - a) * t0, a + (b - a) * t1);
                                let (v0, v1) = (
                                    weights[k] + (weights[k + 1] - weights[k]) * t0,
                                    weights[k] + (weights[k + 1] - weights[k]) * t1,
                                );
                                src.push((e0, 0.5 * v0 * (e1 - e0)));
                                src.push((e1, 0.5 * v1 * (e1 - e0)));
                            }
                        }
                        let d: Vec<f64> = grid
                            .iter()
                            .map(|&e| src.iter().map(|(s, w)| w * res.kernel(e, *s)).sum())
                            .collect();
                        (grid, d)
                    }
                };
                let lines = window_yields(&grid, &per_ev, orders(), omega_ev, half);
                Ok(Detected {
                    energy_ev: grid,
                    per_ev,
                    lines,
                })
            }
        }
    }

    /// Uniform grid covering the model range widened by three resolution widths.
    fn output_grid(&self, energies_ev: &[f64], res: Resolution) -> Result<Vec<f64>> {
        let (lo, hi) = (energies_ev[0], energies_ev[energies_ev.len() - 1]);
        let narrowest = res.energy_width(lo).min(res.energy_width(hi));
        let widest = res.energy_width(lo).max(res.energy_width(hi));
        let step = self.output_step.unwrap_or(narrowest / 10.0);
        let (a, b) = ((lo - 3.0 * widest).max(0.5 * lo), hi + 3.0 * widest);
        uniform(a, b, step)
    }

    /// Uniform grid over the model range (no resolution).
    fn output_grid_plain(&self, energies_ev: &[f64]) -> Result<Vec<f64>> {
        let (lo, hi) = (energies_ev[0], energies_ev[energies_ev.len() - 1]);
        let finest = energies_ev
            .windows(2)
            .map(|w| w[1] - w[0])
            .fold(f64::INFINITY, f64::min);
        let step = self.output_step.unwrap_or(finest / 4.0);
        uniform(lo, hi, step)
    }
}

/// Largest output grid.
pub const MAX_OUTPUT_POINTS: usize = 200_000;

fn uniform(a: f64, b: f64, step: f64) -> Result<Vec<f64>> {
    let n = ((b - a) / step).ceil();
    if !(n.is_finite() && n >= 1.0 && n < MAX_OUTPUT_POINTS as f64) {
        return Err(Error::invalid(
            "output_step_ev",
            step,
            &format!(
                "the output grid from {a:.3} to {b:.3} eV would have {n} points (limit \
                 {MAX_OUTPUT_POINTS}): use a larger step or a wider resolution"
            ),
        ));
    }
    let n = n as usize;
    Ok((0..=n).map(|k| a + (b - a) * k as f64 / n as f64).collect())
}

/// Linear interpolation of `(x, y)` at `t` (0 outside).
fn linear(x: &[f64], y: &[f64], t: f64) -> f64 {
    let n = x.len();
    if n == 0 || t < x[0] || t > x[n - 1] {
        return 0.0;
    }
    if n == 1 {
        return y[0];
    }
    let k = x.partition_point(|&v| v < t).clamp(1, n - 1);
    let s = (t - x[k - 1]) / (x[k] - x[k - 1]);
    y[k - 1] + (y[k] - y[k - 1]) * s
}

/// `∫_a^b` of the piecewise-linear function `(x, y)` (exact for it).
pub fn integrate_linear(x: &[f64], y: &[f64], a: f64, b: f64) -> f64 {
    let n = x.len();
    if n < 2 || b <= a {
        return 0.0;
    }
    let (a, b) = (a.max(x[0]), b.min(x[n - 1]));
    if b <= a {
        return 0.0;
    }
    let mut sum = 0.0;
    for k in 0..n - 1 {
        let (l, r) = (x[k].max(a), x[k + 1].min(b));
        if r > l {
            sum += 0.5 * (linear(x, y, l) + linear(x, y, r)) * (r - l);
        }
    }
    sum
}

fn window_yields(
    grid: &[f64],
    per_ev: &[f64],
    orders: std::ops::RangeInclusive<i64>,
    omega_ev: f64,
    half: f64,
) -> Vec<LineYield> {
    orders
        .map(|q| LineYield {
            order: q,
            energy_ev: q as f64 * omega_ev,
            value: integrate_linear(
                grid,
                per_ev,
                (q as f64 - half) * omega_ev,
                (q as f64 + half) * omega_ev,
            ),
        })
        .collect()
}
