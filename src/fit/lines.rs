//! Line yields from continuous spectra, with the same windows as the model.
//!
//! [`line_window`] is the one definition of the spectral window of a harmonic line: photon
//! energies within `half_width_orders · ħω` of the line centre `qħω`. Until the detection layer
//! provides its own windows (with the spectrometer response), this function is the one to swap.
//! The model's line yield is the emitted power at the line centre (a harmonic line of a periodic
//! field is a delta function in Ω whose weight is `Ω⁴|D(qω)|²`); the measured one is the
//! integral of the measured density per unit photon energy over the window (trapezoidal rule on
//! the measured points inside it, after the axis Jacobian of [`super::measured`]).
//!
//! Background subtraction ([`Background::Edges`]): the straight line through the density at the
//! two window edges (linearly interpolated from the measured points) is subtracted before the
//! integral — a common practice for isolated lines, with no source beyond that.

use serde::{Deserialize, Serialize};

use super::FitError;
use super::measured::{XUnit, density_jacobian, energy};

/// The window of line `order` (a.u. of photon energy), for first-colour photon energy `omega`.
pub fn line_window(order: f64, omega: f64, half_width_orders: f64) -> (f64, f64) {
    (
        (order - half_width_orders) * omega,
        (order + half_width_orders) * omega,
    )
}

/// Background treatment of continuous spectra.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum Background {
    /// None.
    #[default]
    None,
    /// Subtract the straight line through the density at the window edges.
    Edges,
}

/// Integrates a measured density (per unit `unit` at `x`) over the window of each line in
/// `orders`. Returns the line yields and, where uncertainties are given, their propagated
/// uncertainties (the trapezoidal weights applied to independent point errors). `source` names
/// the dataset in errors.
#[allow(clippy::too_many_arguments)]
pub fn integrate_lines(
    x: &[f64],
    density: &[f64],
    sigma: Option<&[f64]>,
    unit: XUnit,
    omega: f64,
    orders: &[f64],
    half_width_orders: f64,
    background: Background,
    source: &str,
) -> Result<(Vec<f64>, Option<Vec<f64>>), FitError> {
    // Points on the energy axis, densities per a.u., sorted by energy.
    let mut pts: Vec<(f64, f64, f64)> = x
        .iter()
        .enumerate()
        .map(|(i, &v)| {
            let j = density_jacobian(v, unit, omega);
            (
                energy(v, unit, omega),
                density[i] * j,
                sigma.map(|s| s[i] * j).unwrap_or(0.0),
            )
        })
        .collect();
    pts.sort_by(|a, b| a.0.total_cmp(&b.0));
    let interp = |e: f64| -> Option<f64> {
        let k = pts.partition_point(|p| p.0 < e);
        if k == 0 || k >= pts.len() {
            return None;
        }
        let (a, b) = (pts[k - 1], pts[k]);
        Some(a.1 + (b.1 - a.1) * (e - a.0) / (b.0 - a.0))
    };
    let mut yields = Vec::with_capacity(orders.len());
    let mut errors = Vec::with_capacity(orders.len());
    for &q in orders {
        let (lo, hi) = line_window(q, omega, half_width_orders);
        let inside: Vec<&(f64, f64, f64)> = pts.iter().filter(|p| p.0 >= lo && p.0 <= hi).collect();
        if inside.len() < 2 {
            return Err(FitError::Data(format!(
                "{source}: the window of line {q} ({:.3}..{:.3} eV) holds {} measured point(s); \
                 at least 2 are needed",
                crate::units::au_to_ev(lo),
                crate::units::au_to_ev(hi),
                inside.len()
            )));
        }
        let base = match background {
            Background::None => None,
            Background::Edges => {
                let (Some(a), Some(b)) = (interp(lo), interp(hi)) else {
                    return Err(FitError::Data(format!(
                        "{source}: line {q}: the window edges lie outside the measured range, so \
                         the edge background cannot be taken"
                    )));
                };
                Some((a, b))
            }
        };
        let mut total = 0.0;
        let mut var = 0.0;
        for w in inside.windows(2) {
            let (a, b) = (w[0], w[1]);
            let h = b.0 - a.0;
            let bg = |e: f64| match base {
                Some((ya, yb)) => ya + (yb - ya) * (e - lo) / (hi - lo),
                None => 0.0,
            };
            total += 0.5 * h * ((a.1 - bg(a.0)) + (b.1 - bg(b.0)));
            var += 0.25 * h * h * (a.2 * a.2 + b.2 * b.2);
        }
        yields.push(total);
        errors.push(var.sqrt());
    }
    Ok((yields, sigma.map(|_| errors)))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gaussian_lines_on_a_linear_background_integrate_to_their_weight() {
        // Gaussian line of weight 2 (per order axis) at H15 on a sloping background, sampled
        // per 0.01 order: the edge background removes the slope; the integral over ±1 order
        // holds erf(1/(√2·0.15)) ≈ 1 of the weight (mathematics).
        let omega = 0.057;
        let xs: Vec<f64> = (0..400).map(|i| 13.0 + i as f64 * 0.01).collect();
        let w = 0.15;
        let d: Vec<f64> = xs
            .iter()
            .map(|&q| {
                2.0 * (-(q - 15.0).powi(2) / (2.0 * w * w)).exp()
                    / (w * (2.0 * std::f64::consts::PI).sqrt())
                    + 0.3
                    + 0.05 * q
            })
            .collect();
        let (y, _) = integrate_lines(
            &xs,
            &d,
            None,
            XUnit::Order,
            omega,
            &[15.0],
            1.0,
            Background::Edges,
            "test",
        )
        .unwrap();
        // Per a.u. of energy, integrated over energy: the same number as per order over orders.
        assert!((y[0] - 2.0).abs() < 2e-3, "{}", y[0]);
    }
}
