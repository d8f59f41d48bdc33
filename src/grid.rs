//! The default photon-energy grid: which harmonic orders a run computes when the user gives
//! none.
//!
//! # The rule
//!
//! Orders lie on a lattice of exact rationals `n / q` (kept as integers until the end, so
//! that an order is `23.0`, never `23.000000000000004`):
//!
//! - **Periodic fields** of period `T = q·2π/ω₁` emit lines at `Ω = n·2π/T`, i.e. orders `n/q`
//!   (`q = 1` for one colour or ω + 2ω). When the field is half-wave symmetric,
//!   `A(t + T/2) = −A(t)` ([`Field::half_wave_symmetric`]), and the target ensemble is
//!   inversion symmetric ([`inversion_symmetric`]), only odd `n` are allowed (the textbook
//!   selection rule: the dipole then obeys `d(t + T/2) = −d(t)`, so its even Fourier
//!   components vanish), and the grid keeps odd `n` only: odd harmonic orders for one colour.
//!   Otherwise every `n` is kept (ω + 2ω, oriented polar targets).
//! - **Pulses** give a continuous spectrum: orders are multiples of `1/10` of an order.
//!
//! The grid starts at the first lattice order at or above `Ip_max + max(ω₁, Up/4)`:
//!
//! - `Ip_max`, the highest channel ionization potential, so that every channel can recombine
//!   on every row (below a channel's Ip nothing recombines into it);
//! - plus a margin, because near threshold the returning electron is slow and the plane-wave
//!   continuum of the strong-field model, which ignores the ion's Coulomb attraction, is at its
//!   poorest. The margin is at least one photon of the first colour (the `near-threshold`
//!   validity rule of [`crate::validity`], so the default grid never triggers it) and at least
//!   `Up/4`, which leaves out the lowest return energies, about the bottom 8% of the classical
//!   plateau `[Ip, Ip + 3.17 Up]`. Common practice with no single published source; chosen
//!   here so that the grid starts where the model is meant to be used and `--orders` reaches
//!   lower when wanted.
//!
//! It ends at the last lattice order at or below `1.2 × Ω_top`, 20% past the cutoff `Ω_top`
//! given by the caller: the highest channel cutoff of the field for periodic fields. For
//! pulses the caller passes the cutoff of the *continuous* field with the same colours (the
//! pulse's peak), which does not depend on the carrier-envelope phase; the whole pulse grid is
//! then the same for every CEP, so CEP scans line up row by row. `Ip`, `Up` and `ω₁` of a pulse
//! do not depend on its CEP either.

use crate::error::{Error, Result};
use crate::field::{Field, TimeStructure};
use crate::orientation::AlignmentDistribution;
use crate::target::{OrientationGridSpec, Target};
use crate::{ionization::IonizationModel, recombination::RecombinationModel};

/// Lattice denominator of pulse grids: orders are multiples of `1/PULSE_DENOMINATOR`.
pub const PULSE_DENOMINATOR: i64 = 10;

/// Margin above the highest Ip, as a fraction of `Up` (see the module documentation).
pub const MARGIN_UP_FRACTION: f64 = 0.25;

/// How far past the cutoff the default grid reaches (factor on the cutoff photon energy).
pub const PAST_CUTOFF: f64 = 1.2;

/// A default grid: orders `index / denominator` for `index = first, first + stride, …, last`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DefaultGrid {
    /// Lattice denominator `q` (orders are `n/q`).
    pub denominator: i64,
    /// First lattice index `n`.
    pub first: i64,
    /// Last lattice index (`first + k·stride`).
    pub last: i64,
    /// Step between indices (2 when only odd `n` are kept).
    pub stride: i64,
    /// Whether only odd `n` are kept (half-wave symmetric field, inversion-symmetric target).
    pub odd_only: bool,
    /// The lower bound `Ip_max + max(ω₁, Up/4)` (a.u.) the first order is rounded up from.
    pub floor: f64,
    /// The upper bound `1.2 Ω_top` (a.u.) the last order is rounded down from.
    pub ceiling: f64,
}

impl DefaultGrid {
    /// Number of orders.
    pub fn len(&self) -> usize {
        ((self.last - self.first) / self.stride + 1) as usize
    }

    /// Whether the grid is empty (never, for a grid from [`default_grid`]).
    pub fn is_empty(&self) -> bool {
        self.last < self.first
    }

    /// First order, last order and step in orders (for [`crate::orbits::budget::check_grid`]).
    pub fn bounds(&self) -> (f64, f64, f64) {
        let q = self.denominator as f64;
        (
            self.first as f64 / q,
            self.last as f64 / q,
            self.stride as f64 / q,
        )
    }

    /// The orders, each the exact rational `n/q` rounded once to the nearest double.
    pub fn orders(&self) -> Vec<f64> {
        let q = self.denominator as f64;
        (0..self.len() as i64)
            .map(|k| (self.first + k * self.stride) as f64 / q)
            .collect()
    }

    /// One sentence for outputs and messages: the lattice, the bounds and why.
    pub fn rule(&self) -> String {
        let lattice = match (self.odd_only, self.denominator) {
            (true, 1) => "odd harmonic orders (half-wave symmetric field, inversion-symmetric \
                          target: even orders vanish)"
                .to_string(),
            (true, q) => format!(
                "odd multiples of 1/{q} of an order (half-wave symmetric field of period {q} T₁, \
                 inversion-symmetric target)"
            ),
            (false, 1) => "every integer order".to_string(),
            (false, q) if q == PULSE_DENOMINATOR => {
                format!("orders in steps of 1/{q} (pulse: continuous spectrum)")
            }
            (false, q) => format!("every multiple of 1/{q} of an order (period {q} T₁)"),
        };
        format!(
            "{lattice}, from the first at or above Ip_max + max(ω, Up/4) to the last at or below \
             1.2 × the highest cutoff{}",
            if self.denominator == PULSE_DENOMINATOR && !self.odd_only {
                " of the continuous field with the pulse's colours (independent of the CEP)"
            } else {
                ""
            }
        )
    }
}

/// The lattice of a field: `(denominator q, odd_only)`.
fn lattice(field: &Field, target: &Target) -> (i64, bool) {
    match field.structure() {
        TimeStructure::Periodic { period } => {
            // q = T ω₁ / 2π is an integer ≤ 12 by construction of periodic fields.
            let q = (period * field.omega() / (2.0 * std::f64::consts::PI))
                .round()
                .max(1.0) as i64;
            (
                q,
                field.half_wave_symmetric() && inversion_symmetric(target),
            )
        }
        TimeStructure::Pulse { .. } => (PULSE_DENOMINATOR, false),
    }
}

/// The default grid of `field` and `target`, ending 20% past `cutoff` (a.u.; see the module
/// documentation for what the caller passes for pulses).
///
/// # Errors
/// [`Error::InvalidParameter`] when `cutoff` is not a positive finite number or the target has
/// no channel.
pub fn default_grid(field: &Field, target: &Target, cutoff: f64) -> Result<DefaultGrid> {
    if !(cutoff.is_finite() && cutoff > 0.0) {
        return Err(Error::invalid(
            "cutoff of the default grid",
            cutoff,
            "must be a positive photon energy",
        ));
    }
    let ip_max = target
        .channels
        .iter()
        .map(|c| c.ip)
        .reduce(f64::max)
        .ok_or_else(|| Error::invalid("channels", "[]", "at least one channel is required"))?;
    let omega = field.omega();
    let (q, odd_only) = lattice(field, target);
    let floor = ip_max + omega.max(MARGIN_UP_FRACTION * field.ponderomotive_energy());
    let ceiling = PAST_CUTOFF * cutoff;
    let qf = q as f64;
    let mut first = (floor / omega * qf - 1e-9).ceil() as i64;
    if odd_only && first % 2 == 0 {
        first += 1;
    }
    let stride = if odd_only { 2 } else { 1 };
    let top = (ceiling / omega * qf + 1e-9).floor() as i64;
    let last = if top < first {
        first + stride
    } else {
        first + (top - first) / stride * stride
    };
    Ok(DefaultGrid {
        denominator: q,
        first,
        last,
        stride,
        odd_only,
        floor,
        ceiling,
    })
}

/// Whether the target, as summed over its orientation grid, is symmetric under inversion, so
/// that a half-wave symmetric field gives odd harmonics only. True when either
///
/// - the grid averages over orientations (`axis` or `full`) with an alignment density that is
///   even about β = π/2, `ρ(π − β) = ρ(β)` (aligned, not oriented), and, for the full grid, an
///   even number of α nodes and an even number of γ nodes or a single one: then the grid is
///   invariant under the rotation by π about the lab y axis, which maps `(α, β, γ)` to
///   `(π − α, π − β, γ + π)` and reverses the polarization plane (z, x), so the average of
///   the response to `−E` is minus the average of the response to `E`; or
/// - the orientation is fixed, every channel uses models centred at the origin with s
///   symmetry (ionization `gaussian` or `constant`, recombination `hydrogenic` or `gaussian`),
///   and no transition dipole couples the channels: an atom-like target with inversion
///   symmetry of its own.
///
/// Every other target (a fixed molecule, tabulated or constant-vector models, an oriented
/// distribution) is treated as possibly polar and keeps the even orders in the default grid.
pub fn inversion_symmetric(target: &Target) -> bool {
    match target.orientations {
        OrientationGridSpec::Axis(_) => even_about_right_angle(&target.alignment),
        OrientationGridSpec::Full(_, alpha, gamma) => {
            even_about_right_angle(&target.alignment)
                && alpha % 2 == 0
                && (gamma == 1 || gamma % 2 == 0)
        }
        OrientationGridSpec::Fixed(_) => {
            let s_models = target.channels.iter().all(|c| {
                matches!(
                    c.ionization,
                    IonizationModel::Gaussian { .. } | IonizationModel::Constant { .. }
                ) && matches!(
                    c.recombination,
                    RecombinationModel::Hydrogenic { .. } | RecombinationModel::Gaussian { .. }
                )
            });
            let uncoupled = target
                .ion
                .dipole()
                .iter()
                .all(|m| m.iter().all(|z| z.norm() == 0.0));
            s_models && (target.channels.len() == 1 || uncoupled)
        }
    }
}

/// `ρ(π − β) = ρ(β)` at 181 angles to 1e-12 (relative to the largest density).
fn even_about_right_angle(a: &AlignmentDistribution) -> bool {
    let n = 180;
    let values: Vec<(f64, f64)> = (0..=n)
        .map(|k| {
            let beta = std::f64::consts::PI * k as f64 / n as f64;
            (
                a.relative_density(beta),
                a.relative_density(std::f64::consts::PI - beta),
            )
        })
        .collect();
    let largest = values.iter().map(|v| v.0.abs()).fold(0.0, f64::max);
    values
        .iter()
        .all(|(x, y)| (x - y).abs() <= 1e-12 * largest.max(f64::MIN_POSITIVE))
}
