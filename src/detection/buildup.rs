//! The coherent build-up of each harmonic along the beam axis (a 1-D phase-matching estimate).
//!
//! **What this is and is not.** The harmonic field on the axis at the exit of the medium is the
//! sum of the dipoles along the axis, each with the phase of the driver where it sits and the
//! phase it gathers on the way out. This is the longitudinal phase-matching estimate of
//! P. Balcou, P. Salières, A. L'Huillier, M. Lewenstein, PRA 55, 3204 (1997) restricted to the
//! axis; it is **not** a 3-D propagation: it has no radial structure (no off-axis phase
//! matching, no divergence, no far-field profile), no reshaping of the driver and no depletion of
//! the emitters. Use it to see which families phase-match where the medium sits, not for
//! absolute yields.
//!
//! With the driver `E ∝ Re exp(i(k₁z − ψ(z)) − iωt)` (Gouy phase ψ, [`super::beam`]), a driver
//! delayed by θ/ω gives the dipole `D(Ω) e^{iqθ}` (`q = Ω/ω`, Fourier convention
//! `D(Ω) = ∫ d(t) e^{iΩt} dt`), and the harmonic emitted at `z` reaches the exit with
//! `e^{ik_q(z_end − z)}`. Dropping the constant `e^{ik_q z_end}`:
//!
//! ```text
//! B_f(Ω) = (1/L) ∫_{z₁}^{z₂} dz  D_f(Ω; I(z)) · exp(−i q ψ(z) − i ∫_{z₁}^{z} Δk dz') · exp(−n σ(Ω) (z₂ − z)/2)
//! Δk = k_q − q k₁ = (Ω/c) [ (δ_xuv − δ_ir)(1 − η) − 2π n η (1/Ω² − 1/ω²) ]
//! ```
//!
//! for each family `f` (the intensity-dependent phase of `D_f` is each family's own; the
//! families are added coherently only in the total `B = Σ_f B_f`). `δ_ir`, `δ_xuv` are the
//! refractivities `n − 1` of the neutral gas at the medium's density, `η(I)` the ionized fraction
//! ([`super::plasma`]), `2π n η/ω²` the free-electron term `ω_p²/(2ω²)` with `ω_p² = 4π n_e`
//! (a.u.), `σ` the photoabsorption cross-section (the amplitude decays with half the intensity
//! coefficient). Reported is `|B|²`, normalised so that a perfectly phase-matched medium gives
//! `|D|²` (the absolute on-axis yield is `(nL)²` times it).
//!
//! **Dipoles between intensity samples.** The dipole of each contribution (one family of one
//! channel pair on one half cycle, [`super::families::FamilyDipoles::pieces`]) is computed at a
//! few on-axis intensities ([`axis_intensities`], uniform in I over the medium) and interpolated
//! linearly in I in the logarithm of `|ê·D|`, in the phase `arg(ê·D_f)` unwrapped by linear prediction from
//! the two previous samples, and in the shape `D_f e^{−iφ}/|ê·D_f|`. The largest departure of a
//! phase from its prediction is reported (`phase_check`): above π/2 the samples are too sparse
//! for the family's intensity-dependent phase and the result is flagged.

use std::collections::BTreeMap;

use num_complex::Complex64;

use super::beam::{GaussianBeam, SPEED_OF_LIGHT_AU};
use super::families::{FamilyDipoles, strength};
use super::volume::Medium;
use crate::error::{Error, Result};
use crate::field::CVec3;
use crate::orbits::FamilyLabel;
use crate::special::gauss_legendre::gauss_legendre_interval;
use crate::spectrum::project;

/// Largest number of points along the axis.
pub const MAX_AXIS_POINTS: usize = 4096;

/// Above this departure of an unwrapped phase from its linear prediction (rad), the intensity
/// samples are too sparse for a family's dipole phase.
pub const PHASE_CHECK_LIMIT: f64 = std::f64::consts::FRAC_PI_2;

/// Optional propagation effects of the medium.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Propagation {
    /// `n − 1` of the neutral gas at the driver's frequency, at the medium's density.
    pub ir_refractivity: f64,
    /// `n − 1` of the neutral gas at the harmonics, at the medium's density.
    pub xuv_refractivity: f64,
    /// Ionized fraction at each axis intensity sample (None: no free electrons).
    pub ionized_fraction: Option<Vec<f64>>,
    /// Photoabsorption cross-section per energy (bohr²) (None: no absorption).
    pub cross_section: Option<Vec<f64>>,
}

/// The on-axis intensities (relative to the peak) at which the dipoles are computed for the
/// build-up: `n` values uniform in I from the lowest to the highest on-axis intensity of the
/// medium, ascending (one value for a thin slab or `n = 1`: the highest).
///
/// # Errors
/// The unbounded medium (no axis length), `n = 0`.
pub fn axis_intensities(beam: &GaussianBeam, medium: &Medium, n: usize) -> Result<Vec<f64>> {
    medium.validate()?;
    if matches!(medium, Medium::Unbounded) {
        return Err(Error::invalid(
            "medium",
            "unbounded",
            "the on-axis build-up needs a medium of finite length (a slab or a thin slab)",
        ));
    }
    if n == 0 || n > super::intensity_rule::MAX_SAMPLES {
        return Err(Error::invalid(
            "number of intensity samples",
            n,
            &format!(
                "must be between 1 and {}",
                super::intensity_rule::MAX_SAMPLES
            ),
        ));
    }
    let (lo, hi) = (medium.axis_low(beam), medium.peak(beam));
    if n == 1 || matches!(medium, Medium::ThinSlab { .. }) || hi - lo <= 1e-15 * hi {
        return Ok(vec![hi]);
    }
    Ok((0..n)
        .map(|j| {
            if j == n - 1 {
                hi
            } else {
                lo + (hi - lo) * j as f64 / (n - 1) as f64
            }
        })
        .collect())
}

/// The positions (bohr) and weights along the axis: Gauss–Legendre over a slab, the centre with
/// the thickness as weight for a thin slab.
///
/// # Errors
/// The unbounded medium; a point count outside 1..=[`MAX_AXIS_POINTS`].
pub fn axis_points(medium: &Medium, n: usize) -> Result<(Vec<f64>, Vec<f64>)> {
    if n == 0 || n > MAX_AXIS_POINTS {
        return Err(Error::invalid(
            "number of axis points",
            n,
            &format!("must be between 1 and {MAX_AXIS_POINTS}"),
        ));
    }
    match *medium {
        Medium::Unbounded => Err(Error::invalid(
            "medium",
            "unbounded",
            "the on-axis build-up needs a medium of finite length (a slab or a thin slab)",
        )),
        Medium::ThinSlab {
            position,
            thickness,
        } => Ok((vec![position], vec![thickness])),
        Medium::Slab { start, end } => gauss_legendre_interval(n, start, end)
            .map_err(|e| Error::Numerical(format!("axis points: {e}"))),
    }
}

/// A family's dipole at one energy as a function of the relative intensity.
///
/// Between two samples where `ê·D` is non-zero: linear in I in `ln|ê·D|`, in the unwrapped phase
/// and in the shape `D e^{−iφ}/|ê·D|`. An interval with a zero end (a contribution that is
/// absent or excluded at some intensities, e.g. above its cutoff) is interpolated linearly in
/// the complex vector, and the phase chain restarts after it.
#[derive(Clone, Debug)]
pub struct DipoleInterpolant {
    x: Vec<f64>,
    values: Vec<CVec3>,
    /// Per sample: (ln|ê·D|, unwrapped phase, shape), None where `ê·D` vanishes.
    polar: Vec<Option<(f64, f64, CVec3)>>,
    /// Largest departure of an unwrapped phase from its linear prediction (rad), or of the
    /// first step of a chain from zero; 0 with fewer than two samples.
    pub phase_check: f64,
}

/// The branch of `phase` nearest to `target`.
fn nearest_branch(phase: f64, target: f64) -> f64 {
    let tau = 2.0 * std::f64::consts::PI;
    phase + tau * ((target - phase) / tau).round()
}

impl DipoleInterpolant {
    /// Builds the interpolant from samples at ascending relative intensities `x`.
    pub fn new(axis: &nalgebra::Vector3<f64>, x: &[f64], values: &[CVec3]) -> Self {
        let mut polar: Vec<Option<(f64, f64, CVec3)>> = Vec::with_capacity(x.len());
        let mut check = 0.0_f64;
        for (j, d) in values.iter().enumerate() {
            let p = project(axis, d);
            if !(p.norm() > 0.0 && p.is_finite()) {
                polar.push(None);
                continue;
            }
            let raw = p.arg();
            let previous = |k: usize| -> Option<f64> {
                j.checked_sub(k)
                    .and_then(|i| polar.get(i).copied().flatten())
                    .map(|t| t.1)
            };
            let phase = match (previous(1), previous(2)) {
                (Some(p1), Some(p2)) => {
                    let slope = (p1 - p2) / (x[j - 1] - x[j - 2]);
                    let predicted = p1 + slope * (x[j] - x[j - 1]);
                    let ph = nearest_branch(raw, predicted);
                    check = check.max((ph - predicted).abs());
                    ph
                }
                (Some(p1), None) => {
                    let ph = nearest_branch(raw, p1);
                    check = check.max((ph - p1).abs());
                    ph
                }
                _ => raw,
            };
            let shape = d * Complex64::from_polar(1.0 / p.norm(), -phase);
            polar.push(Some((p.norm().ln(), phase, shape)));
        }
        DipoleInterpolant {
            x: x.to_vec(),
            values: values.to_vec(),
            polar,
            phase_check: check,
        }
    }

    /// The dipole at relative intensity `x` (clamped to the sampled range), and its phase
    /// `arg(ê·D)` continued along the samples (None on an interval with a zero end).
    pub fn at(&self, x: f64) -> (CVec3, Option<f64>) {
        let n = self.x.len();
        if n == 1 {
            return (self.values[0], self.polar[0].map(|p| p.1));
        }
        let k = self.x.partition_point(|&v| v < x).clamp(1, n - 1);
        let t = ((x - self.x[k - 1]) / (self.x[k] - self.x[k - 1])).clamp(0.0, 1.0);
        let lerp = |a: f64, b: f64| a + (b - a) * t;
        match (self.polar[k - 1], self.polar[k]) {
            (Some((la, pa, sa)), Some((lb, pb, sb))) => {
                let ph = lerp(pa, pb);
                let s = sa + (sb - sa) * Complex64::new(t, 0.0);
                (s * Complex64::from_polar(lerp(la, lb).exp(), ph), Some(ph))
            }
            _ => (
                self.values[k - 1] + (self.values[k] - self.values[k - 1]) * Complex64::new(t, 0.0),
                None,
            ),
        }
    }
}

/// The inputs of one build-up.
#[derive(Clone, Debug)]
pub struct AxisBuildUpInput<'a> {
    /// The driving beam.
    pub beam: GaussianBeam,
    /// The medium (slab or thin slab).
    pub medium: Medium,
    /// Number density of the emitters (bohr⁻³).
    pub density: f64,
    /// Driver angular frequency ω (a.u.).
    pub omega: f64,
    /// Photon energies Ω (a.u.).
    pub energies: &'a [f64],
    /// Ascending relative on-axis intensities of the samples ([`axis_intensities`]).
    pub intensities: &'a [f64],
    /// The dipoles at those intensities.
    pub dipoles: &'a [FamilyDipoles],
    /// Points along the axis (Gauss–Legendre nodes over a slab).
    pub axis_points: usize,
    /// Dispersion and absorption.
    pub propagation: &'a Propagation,
}

/// The on-axis build-up, total and per family.
#[derive(Clone, Debug, PartialEq)]
pub struct AxisBuildUp {
    /// `|B|²` per energy (normalised: `|D|²` for perfect phase matching).
    pub total: Vec<f64>,
    /// `|B_f|²` per family label.
    pub families: BTreeMap<FamilyLabel, Vec<f64>>,
    /// Largest phase check per family over the energies (rad; see [`DipoleInterpolant`]),
    /// counted where a contribution reaches 1e−6 of the energy's largest |D|², with the
    /// harmonic order where it occurs.
    pub phase_check: BTreeMap<FamilyLabel, (f64, f64)>,
    /// Largest change of a family's total phase between neighbouring axis points (rad) over
    /// families and energies: above π/2 the axis points do not resolve the phase.
    pub axis_phase_step: f64,
    /// Number of samples whose row is incomplete, per energy.
    pub incomplete_samples: Vec<usize>,
    /// Medium length `L` (bohr; the thickness of a thin slab).
    pub length: f64,
}

/// Sums the dipoles along the axis (formula in the module documentation).
///
/// # Errors
/// Inconsistent inputs (sample and dipole counts, energy grids, table lengths), an unbounded
/// medium, a non-positive density.
pub fn axis_build_up(input: &AxisBuildUpInput<'_>) -> Result<AxisBuildUp> {
    let AxisBuildUpInput {
        beam,
        medium,
        density,
        omega,
        energies,
        intensities,
        dipoles,
        axis_points: n_axis,
        propagation,
    } = input;
    crate::error::require_positive("medium density", *density)?;
    let ne = energies.len();
    if intensities.is_empty()
        || intensities.len() != dipoles.len()
        || dipoles.iter().any(|d| d.len() != ne)
        || intensities.windows(2).any(|w| w[1] <= w[0])
    {
        return Err(Error::Inconsistent(format!(
            "axis build-up: {} ascending intensity samples and {} dipole sets on {} energies \
             expected to match",
            intensities.len(),
            dipoles.len(),
            ne
        )));
    }
    if let Some(f) = &propagation.ionized_fraction
        && f.len() != intensities.len()
    {
        return Err(Error::Inconsistent(
            "axis build-up: one ionized fraction per intensity sample expected".into(),
        ));
    }
    if let Some(s) = &propagation.cross_section
        && s.len() != ne
    {
        return Err(Error::Inconsistent(
            "axis build-up: one cross-section per energy expected".into(),
        ));
    }
    let (z, w) = axis_points(medium, *n_axis)?;
    let (z_start, z_end, length) = match *medium {
        Medium::Slab { start, end } => (start, end, end - start),
        Medium::ThinSlab {
            position,
            thickness,
        } => (
            position - 0.5 * thickness,
            position + 0.5 * thickness,
            thickness,
        ),
        Medium::Unbounded => unreachable!("rejected by axis_points"),
    };
    let x_at: Vec<f64> = z.iter().map(|&zz| beam.on_axis(zz)).collect();
    let eta = |x: f64| -> f64 {
        match &propagation.ionized_fraction {
            None => 0.0,
            Some(f) => {
                if f.len() == 1 {
                    return f[0];
                }
                let k = intensities
                    .partition_point(|&v| v < x)
                    .clamp(1, f.len() - 1);
                let t = ((x - intensities[k - 1]) / (intensities[k] - intensities[k - 1]))
                    .clamp(0.0, 1.0);
                f[k - 1] + (f[k] - f[k - 1]) * t
            }
        }
    };
    // H(z) = ∫_{z₁}^{z} η dz' (8-point Gauss–Legendre per node; η is smooth along z).
    let (g8, gw8) = crate::special::gauss_legendre::gauss_legendre(8)
        .map_err(|e| Error::Numerical(format!("axis build-up: {e}")))?;
    let cumulative_eta: Vec<f64> = z
        .iter()
        .map(|&zz| {
            if propagation.ionized_fraction.is_none() || zz <= z_start {
                return 0.0;
            }
            let (a, b) = (z_start, zz);
            g8.iter()
                .zip(&gw8)
                .map(|(t, wt)| {
                    let s = 0.5 * (a + b) + 0.5 * (b - a) * t;
                    0.5 * (b - a) * wt * eta(beam.on_axis(s))
                })
                .sum()
        })
        .collect();
    let labels: Vec<FamilyLabel> = {
        let mut l: Vec<FamilyLabel> = dipoles
            .iter()
            .flat_map(|d| d.families.keys().copied())
            .collect();
        l.sort();
        l.dedup();
        l
    };
    let axis = dipoles[0].axis;
    let c = SPEED_OF_LIGHT_AU;
    let mut total = vec![0.0; ne];
    let mut families: BTreeMap<FamilyLabel, Vec<f64>> =
        labels.iter().map(|l| (*l, vec![0.0; ne])).collect();
    let mut phase_check: BTreeMap<FamilyLabel, (f64, f64)> =
        labels.iter().map(|l| (*l, (0.0, 0.0))).collect();
    let mut axis_step = 0.0_f64;
    let zero = vec![CVec3::zeros(); ne];
    // Largest |D|² of any sample and piece (or label) per energy, for the phase check.
    let scale: Vec<f64> = (0..ne)
        .map(|k| {
            dipoles
                .iter()
                .flat_map(|d| {
                    d.pieces
                        .values()
                        .chain(d.families.values())
                        .map(move |v| strength(&v[k]))
                })
                .fold(0.0, f64::max)
        })
        .collect();
    for k in 0..ne {
        let big = energies[k];
        let q = big / omega;
        let sigma = propagation.cross_section.as_ref().map_or(0.0, |s| s[k]);
        // Propagation phase and amplitude factor at each axis point.
        let factor: Vec<(Complex64, f64)> = z
            .iter()
            .zip(&cumulative_eta)
            .map(|(&zz, &h)| {
                let neutral = (zz - z_start) - h;
                let dk_integral = big / c
                    * ((propagation.xuv_refractivity - propagation.ir_refractivity) * neutral
                        - 2.0
                            * std::f64::consts::PI
                            * density
                            * (1.0 / (big * big) - 1.0 / (omega * omega))
                            * h);
                let phase = -q * beam.gouy(zz) - dk_integral;
                let amplitude = (-0.5 * density * sigma * (z_end - zz)).exp();
                (Complex64::from_polar(amplitude, phase), phase)
            })
            .collect();
        let mut sum_total = CVec3::zeros();
        for label in &labels {
            // The label's pieces (or the label's sum where no pieces are given).
            let keys: Vec<Option<super::families::PieceKey>> = {
                let mut keys: Vec<super::families::PieceKey> = dipoles
                    .iter()
                    .flat_map(|d| d.pieces.keys().filter(|p| p.0 == *label).copied())
                    .collect();
                keys.sort();
                keys.dedup();
                if keys.is_empty() {
                    vec![None]
                } else {
                    keys.into_iter().map(Some).collect()
                }
            };
            let mut b = CVec3::zeros();
            for key in keys {
                let values: Vec<CVec3> = dipoles
                    .iter()
                    .map(|d| match key {
                        Some(p) => d.pieces.get(&p).unwrap_or(&zero)[k],
                        None => d.families.get(label).unwrap_or(&zero)[k],
                    })
                    .collect();
                let interp = DipoleInterpolant::new(&axis, intensities, &values);
                // The check counts where the contribution matters: at least 1e-3 of the
                // largest dipole of this energy in amplitude (1e-6 in intensity).
                let largest = values.iter().map(strength).fold(0.0, f64::max);
                if largest >= 1e-6 * scale[k]
                    && let Some(p) = phase_check.get_mut(label)
                    && interp.phase_check > p.0
                {
                    *p = (interp.phase_check, q);
                }
                let mut previous: Option<f64> = None;
                for ((&xx, &wt), (f, propagation_phase)) in x_at.iter().zip(&w).zip(&factor) {
                    let (d, ph) = interp.at(xx);
                    b += d * (f * (wt / length));
                    if let Some(ph) = ph {
                        // Both parts are continuous (unwrapped) along the axis.
                        let total_phase = ph + propagation_phase;
                        if let Some(prev) = previous {
                            axis_step = axis_step.max((total_phase - prev).abs());
                        }
                        previous = Some(total_phase);
                    }
                }
            }
            if let Some(v) = families.get_mut(label) {
                v[k] = strength(&b);
            }
            sum_total += b;
        }
        total[k] = strength(&sum_total);
    }
    let incomplete_samples = (0..ne)
        .map(|k| dipoles.iter().filter(|d| !d.complete[k]).count())
        .collect();
    Ok(AxisBuildUp {
        total,
        families,
        phase_check,
        axis_phase_step: axis_step,
        incomplete_samples,
        length,
    })
}
