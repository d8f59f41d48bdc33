//! The time lattice of the quadrature and the field sampled on it.
//!
//! One uniform step `h` serves both integration variables: birth times `t_i = t₀ + i h`,
//! excursion times `τ_k = k h`, hence emission times `t = t_i + τ_k = t₀ + (i + k) h` are lattice
//! points too, and `A`, `E`, `∫A`, `∫A·A` are evaluated once per lattice point (closed forms of
//! [`crate::field::Field::at`] at real time) for every `(t, τ)` pair of the double integral.

use nalgebra::Vector3;
use num_complex::Complex64;

use super::window::{BirthPartition, ExcursionWindow};
use crate::error::{Error, Result};
use crate::field::{Field, TimeStructure};

/// Largest number of `(t_i, τ)` points accepted (memory guard: 16 bytes are stored per point).
pub const MAX_POINTS: usize = 100_000_000;

/// Real field quantities at one lattice time.
#[derive(Clone, Copy, Debug)]
pub(super) struct FieldSample {
    pub a: Vector3<f64>,
    pub e: Vector3<f64>,
    pub int_a: Vector3<f64>,
    pub int_a2: f64,
}

/// The lattice: birth rows, excursion columns and the field at every lattice time.
#[derive(Clone, Debug)]
pub(super) struct Lattice {
    /// First lattice time `t₀` (a.u.).
    pub origin: f64,
    /// Step `h` (a.u.).
    pub step: f64,
    /// Number of birth rows `i = 0..rows`.
    pub rows: usize,
    /// Birth weight `χ(t_i)` per row (1 for pulses).
    pub birth_weight: Vec<f64>,
    /// First excursion index with `W(τ_k) > 0`.
    pub k_first: usize,
    /// `W(τ_k)` for `k = k_first..=k_last`.
    pub window: Vec<f64>,
    /// Field at lattice index `j = 0..rows + k_last`.
    pub field: Vec<FieldSample>,
    /// Period of the field, if periodic.
    pub period: Option<f64>,
}

impl Lattice {
    /// Number of excursion columns.
    pub fn columns(&self) -> usize {
        self.window.len()
    }

    /// Number of emission times `t_j` (lattice points that can carry a dipole).
    pub fn emission_points(&self) -> usize {
        self.field.len()
    }

    /// Lattice time of index `j`.
    #[inline]
    pub fn time(&self, j: usize) -> f64 {
        self.origin + j as f64 * self.step
    }

    /// Builds the lattice for `field` with `steps_per_cycle` steps per cycle of the reference
    /// colour, the excursion window `window` and, for a periodic field, the birth-partition ramp
    /// half-width `taper` (a.u.).
    pub fn new(
        field: &Field,
        steps_per_cycle: usize,
        window: &ExcursionWindow,
        taper: f64,
        shape: super::window::WindowShape,
    ) -> Result<Lattice> {
        let cycle = 2.0 * std::f64::consts::PI / field.omega();
        let h = cycle / steps_per_cycle as f64;
        let k_first = (window.start / h).floor() as usize + 1;
        let k_last = ((window.end / h).ceil() as usize).saturating_sub(1);
        if k_last < k_first {
            return Err(Error::invalid(
                "quadrature steps per cycle",
                steps_per_cycle,
                "the excursion window holds no lattice point: use more steps per cycle",
            ));
        }
        let window_values: Vec<f64> = (k_first..=k_last)
            .map(|k| window.value(k as f64 * h))
            .collect();
        let (origin, rows, birth_weight, period, clamp) = match field.structure() {
            TimeStructure::Periodic { period } => {
                let first = field
                    .birth_windows(0.0)
                    .iter()
                    .map(|w| w.start)
                    .fold(f64::INFINITY, f64::min);
                let first = if first.is_finite() { first } else { 0.0 };
                let cycles = (period / cycle).round() as usize;
                let taper_steps = ((taper / h).round() as usize).max(1);
                let w = taper_steps as f64 * h;
                let origin = first - w;
                let rows = cycles * steps_per_cycle + 2 * taper_steps + 1;
                let partition = BirthPartition {
                    first,
                    period: (cycles * steps_per_cycle) as f64 * h,
                    half_width: w,
                    shape,
                };
                let weights = (0..rows)
                    .map(|i| partition.value(origin + i as f64 * h))
                    .collect();
                (origin, rows, weights, Some(period), None)
            }
            TimeStructure::Pulse { start, end } => {
                let rows = ((end - start) / h).ceil() as usize + 1;
                (start, rows, vec![1.0; rows], None, Some((start, end)))
            }
        };
        let points = rows.saturating_mul(window_values.len());
        if points > MAX_POINTS {
            return Err(Error::invalid(
                "quadrature grid",
                format!(
                    "{rows} birth times × {} excursion times",
                    window_values.len()
                ),
                &format!(
                    "more than the {MAX_POINTS} points allowed; use fewer steps per cycle or a \
                     shorter excursion window"
                ),
            ));
        }
        let sample = |t: f64| -> FieldSample {
            let at = |t: f64| {
                let p = field.at(Complex64::new(t, 0.0));
                FieldSample {
                    a: p.a.map(|c| c.re),
                    e: p.e.map(|c| c.re),
                    int_a: p.int_a.map(|c| c.re),
                    int_a2: p.int_a2.re,
                }
            };
            match clamp {
                // Outside a pulse's envelope A = E = 0 and the integrals keep their edge values.
                Some((start, end)) if t < start || t > end => {
                    let edge = at(if t < start { start } else { end });
                    FieldSample {
                        a: Vector3::zeros(),
                        e: Vector3::zeros(),
                        ..edge
                    }
                }
                _ => at(t),
            }
        };
        let field_samples: Vec<FieldSample> = (0..rows + k_last)
            .map(|j| sample(origin + j as f64 * h))
            .collect();
        if field_samples.iter().any(|s| {
            !(s.a
                .iter()
                .chain(s.e.iter())
                .chain(s.int_a.iter())
                .all(|x| x.is_finite())
                && s.int_a2.is_finite())
        }) {
            return Err(Error::Numerical(
                "quadrature: the field is not finite on the time lattice".into(),
            ));
        }
        Ok(Lattice {
            origin,
            step: h,
            rows,
            birth_weight,
            k_first,
            window: window_values,
            field: field_samples,
            period,
        })
    }
}
