//! Spectral quantities shared by every dipole path: family contributions, harmonic phases and
//! group delays.
//!
//! For a periodic field the saddles of one full period (every crest, so both half cycles of a
//! linear field) are summed; at `Ω = qω` this is the amplitude of harmonic line `q` per cycle,
//! and between lines it is the single-cycle transform (DESIGN §4.8). For a pulse every crest
//! above the discovery threshold is summed, giving a continuous `D(Ω)`. The dipole itself is
//! assembled by [`crate::multichannel`] (one channel is a one-channel target,
//! [`crate::target::Target::one_channel`]).
//!
//! Per energy a spectrum reports `|D|²`, the emitted power `Ω⁴|D|²` (dipole form, arbitrary
//! overall constant), the harmonic phase `arg(ê·D)` of the component along the driving
//! polarization `ê`, and the group delay `dφ/dΩ` ([`GroupDelays`]). For one saddle the
//! stationary-phase identity gives `dφ/dΩ ≈ Re t_r` (physics notes §6.3); the two are reported
//! separately so that a user can see where the prefactors move the emission time.
//!
//! # Group delays from the saddle's own phase ([`GroupDelays::Tangent`])
//! A family's contribution at one orientation is `P(Ω) e^{iΦ(Ω)}`, with `Φ` taken along the
//! family (the saddle moves with Ω along the orbit tangent). Because the saddle is stationary,
//! the total derivative of its phase is the partial one,
//! `dΦ/dΩ = ∂Φ/∂Ω + Φ_r t_r' + Φ_i t_i' = ∂Φ/∂Ω = t_r` (exact; with Gaussian structure in the
//! phase too, since `Ω` enters `F` only through `iΩ t_r`). This is the fast part: `Re Φ` turns by
//! `Re t_r ≈ 50–150` rad per unit of Ω. What remains, `R(Ω) = D_f(Ω) e^{−iΦ_f(Ω)}` (the
//! orientation-averaged prefactors: spreading, Gaussian and Airy factors, structure, hole, the
//! next-order terms, and for structure in the phase the small shift of each shell's saddle from
//! the plain one `Φ_f`), varies on the scale of the prefactors. Its complex log-derivative is
//! taken across the requested energy grid by the derivative of the quadratic through three
//! neighbouring energies (centred where both neighbours exist, one-sided at the ends of a
//! family, two-point if only one neighbour is usable), so that
//!
//! ```text
//! d ln D_f/dΩ = i t_r + d ln R/dΩ,    dφ/dΩ = Im(d ln D_f/dΩ),
//! ```
//!
//! and for a sum of families `dφ/dΩ = Im(Σ_f D_f · d ln D_f/dΩ / Σ_f D_f)`. No saddle is solved
//! away from the requested energies. **Approximation:** the derivative of `R` is a finite
//! difference over the grid spacing Δ (error `O(Δ²)` in the prefactors' phase slope, where the
//! difference over `Ω ± δ` has `O(δ²)` with `δ = 0.001ω`); the exponential part is exact. Where
//! the grid does not resolve `R` (`|Δ ln R|` above [`RESOLVED_STEP`] between neighbours, e.g.
//! near a zero of the orientation-averaged family amplitude, where the phase jumps), the energy
//! is marked and [`crate::multichannel::refine_group_delays`] recomputes its delays by the
//! difference over `Ω ± δ`; grids coarser than [`TANGENT_MAX_SPACING`] use the difference
//! throughout ([`effective_group_delays`]). The difference with [`GroupDelays::Difference`] is measured in
//! `tests/group_delay.rs`.

use nalgebra::Vector3;
use num_complex::Complex64;
use serde::Serialize;

use crate::dipole::KernelKind;
use crate::error::{Error, Result};
use crate::field::CVec3;
use crate::orbits::FamilyLabel;

/// The contribution of one quantum-orbit family.
#[derive(Clone, Debug)]
pub struct Contribution {
    /// Family label.
    pub label: FamilyLabel,
    /// Crest (half cycle) index.
    pub half_cycle: i32,
    /// Dipole vector per energy (None where the saddle failed).
    pub dipole: Vec<Option<CVec3>>,
    /// How its kernel was obtained, per energy.
    pub kind: Vec<KernelKind>,
    /// `dφ/dΩ` of this contribution alone (a.u.), where available.
    pub group_delay: Vec<Option<f64>>,
    /// `Re t_r` of the saddle (a.u.), where solved.
    pub emission_time: Vec<Option<f64>>,
    /// Whether the family was summed, excluded, absent or failed, per energy
    /// ([`crate::status::FamilyStatus`]).
    pub status: Vec<crate::status::FamilyStatus>,
}

/// Harmonic phases `arg(ê·D)` (rad) of a dipole series; `None` where `|ê·D|` is below
/// [`NEGLIGIBLE`] times the series' largest (the phase of rounding noise is meaningless, e.g. at
/// the even harmonics of a centrosymmetric target).
pub fn phases(total: &[CVec3], axis: &Vector3<f64>) -> Vec<Option<f64>> {
    let values: Vec<Complex64> = total.iter().map(|d| project(axis, d)).collect();
    let largest = values.iter().map(|d| d.norm()).fold(0.0, f64::max);
    values
        .iter()
        .map(|d| (largest > 0.0 && d.norm() >= NEGLIGIBLE * largest).then(|| d.arg()))
        .collect()
}

/// How the group delays `dφ/dΩ` of a spectrum are computed.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum GroupDelays {
    /// Not computed.
    Skip,
    /// From each saddle's own phase slope `∂Φ/∂Ω = t_r` (exact) and the slope of the remaining
    /// prefactor across the requested grid (module documentation): no extra saddles.
    Tangent,
    /// Central difference over `Ω ± δ`, `δ = step·ω` (`step` in harmonic orders), with every
    /// saddle solved again at both ends (three times the work of the spectrum itself).
    Difference {
        /// `δ/ω`, in `(0, 0.5)`.
        step: f64,
    },
}

/// Largest spacing of an energy grid (in harmonic orders) on which [`GroupDelays::Tangent`] is
/// used; on coarser grids the prefactors are seldom resolved (measured on the demo triatomics at
/// 1.5×10¹⁴ W/cm², 800 nm: every energy of H9–H39 at Δq = 1 unresolved for the linear one, 25
/// of 31 for the bent one; 64 and 20 of 301 at Δq = 0.1), so the difference is used directly.
pub const TANGENT_MAX_SPACING: f64 = 0.25;

/// The group-delay method actually used on `energies`: [`GroupDelays::Tangent`] becomes the
/// difference over `Ω ± 0.001ω` on a grid coarser than [`TANGENT_MAX_SPACING`] or with fewer
/// than three energies.
pub fn effective_group_delays(energies: &[f64], method: GroupDelays, omega: f64) -> GroupDelays {
    if method != GroupDelays::Tangent {
        return method;
    }
    let coarse = energies.len() < 3
        || energies
            .windows(2)
            .any(|w| (w[1] - w[0]).abs() > TANGENT_MAX_SPACING * omega);
    if coarse {
        GroupDelays::Difference { step: 1e-3 }
    } else {
        method
    }
}

/// The solved grid for group delays: `Ω − δ, Ω, Ω + δ` for every requested energy with
/// `δ = step·ω` ([`GroupDelays::Difference`]), or the energies themselves otherwise.
/// Returns (stride, δ, grid).
pub fn group_delay_grid(
    energies: &[f64],
    method: GroupDelays,
    omega: f64,
) -> Result<(usize, Option<f64>, Vec<f64>)> {
    match method {
        GroupDelays::Difference { step } => {
            if !(step.is_finite() && step > 0.0 && step < 0.5) {
                return Err(Error::invalid(
                    "group-delay step",
                    step,
                    "must lie in (0, 0.5) harmonic orders",
                ));
            }
            let d = step * omega;
            let mut g = Vec::with_capacity(3 * energies.len());
            for &e in energies {
                g.extend([e - d, e, e + d]);
            }
            Ok((3, Some(d), g))
        }
        GroupDelays::Skip | GroupDelays::Tangent => Ok((1, None, energies.to_vec())),
    }
}

/// Below this fraction of the spectrum's largest `|ê·D|` a phase is not meaningful (e.g. the
/// even harmonics of a centrosymmetric target, which cancel to rounding); group delays are then
/// not reported.
pub const NEGLIGIBLE: f64 = 1e-9;

/// `ê·D` for a real unit vector ê.
pub fn project(axis: &Vector3<f64>, d: &CVec3) -> Complex64 {
    d.x * axis.x + d.y * axis.y + d.z * axis.z
}

/// `dφ/dΩ` by a central difference of the phase from values at `Ω − δ`, `Ω` and `Ω + δ`;
/// None when any modulus is at or below `floor` (a phase of noise) or a value is not finite.
pub fn phase_derivative(
    lo: Complex64,
    hi: Complex64,
    centre: Complex64,
    delta: f64,
    floor: f64,
) -> Option<f64> {
    if lo.norm().min(hi.norm()).min(centre.norm()) <= floor || !lo.is_finite() || !hi.is_finite() {
        return None;
    }
    Some((hi / lo).arg() / (2.0 * delta))
}

/// Largest change of `ln R` (modulus and phase together, `|Δ ln R|`) between an energy and a
/// neighbour used for its derivative: beyond it the grid does not resolve the prefactors (e.g.
/// near a zero of the orientation-averaged family amplitude, where the phase turns by up to π
/// between grid points) and the derivative is marked unresolved. For `ln R ≈ ln(Ω − Ω₀)` near a
/// zero at distance η from the real axis, the three-point slope then errs by about
/// `(Δ/η)²/3 ≲ 1.3 %` (derived from the Taylor series).
pub const RESOLVED_STEP: f64 = 0.2;

/// The log-derivative of one family at one energy ([`tangent_log_derivatives`]).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum LogDerivative {
    /// `d ln v/dΩ`.
    Value(Complex64),
    /// The grid does not resolve the prefactors there ([`RESOLVED_STEP`]).
    Unresolved,
    /// No value (zero or non-finite dipole, missing saddle, no usable neighbour).
    Missing,
}

impl LogDerivative {
    /// The value, if resolved.
    pub fn value(self) -> Option<Complex64> {
        match self {
            LogDerivative::Value(l) => Some(l),
            _ => None,
        }
    }
}

/// Complex log-derivatives `d ln v/dΩ` of one family's projected dipole `v` (per energy of
/// `energies`) from the saddle's own phase (module documentation, [`GroupDelays::Tangent`]):
/// `saddles[k]` is `(t_r, Φ)` of the family's plain saddle at energy `k`. Missing where `v` is
/// zero or not finite, the saddle is missing, or no neighbouring energy is usable; unresolved
/// where `ln R` changes by more than [`RESOLVED_STEP`] towards a neighbour used: its phase only
/// when `phase_only` (a family's own delay needs only `Im d ln R/dΩ`), else modulus and phase
/// (sums of families weigh the members by their moduli too).
pub fn tangent_log_derivatives(
    energies: &[f64],
    values: &[Complex64],
    saddles: &[Option<(Complex64, Complex64)>],
    phase_only: bool,
) -> Vec<LogDerivative> {
    let n = energies.len();
    // ln R = ln v − iΦ: the modulus part ln|v| + Im Φ and the phase arg v − Re Φ (mod 2π).
    let residual: Vec<Option<(f64, f64)>> = (0..n)
        .map(|k| {
            let v = values[k];
            let (_, phi) = saddles[k]?;
            let m = v.norm();
            (m > 0.0 && v.is_finite() && phi.is_finite())
                .then(|| (m.ln() + phi.im, wrap(v.arg() - phi.re)))
        })
        .collect();
    (0..n)
        .map(|k| {
            let derivative = || -> Option<LogDerivative> {
                let (t_ret, _) = saddles[k]?;
                let (m0, a0) = residual[k]?;
                let usable = |j: usize| residual[j];
                // Neighbours: both sides if possible, else two on one side, else one.
                let before = (k >= 1).then(|| k - 1).filter(|&j| usable(j).is_some());
                let after = (k + 1 < n)
                    .then_some(k + 1)
                    .filter(|&j| usable(j).is_some());
                let picks: Vec<usize> = match (before, after) {
                    (Some(a), Some(b)) => vec![a, b],
                    (None, Some(b)) => {
                        let c = b + 1;
                        if c < n && usable(c).is_some() {
                            vec![b, c]
                        } else {
                            vec![b]
                        }
                    }
                    (Some(a), None) => {
                        if a >= 1 && usable(a - 1).is_some() {
                            vec![a, a - 1]
                        } else {
                            vec![a]
                        }
                    }
                    (None, None) => return None,
                };
                // Values relative to point k, the phase unwrapped outwards from k.
                let mut rel = Vec::with_capacity(2);
                let (mut prev_j, mut prev_a) = (k, a0);
                let mut acc = 0.0;
                for &j in &picks {
                    let (m, a) = usable(j)?;
                    if (j > k) != (prev_j > k) && prev_j != k {
                        // The other side: unwrap from k again.
                        acc = 0.0;
                        prev_a = a0;
                    }
                    acc += wrap(a - prev_a);
                    rel.push((energies[j] - energies[k], m - m0, acc));
                    prev_j = j;
                    prev_a = a;
                }
                // Each step between neighbouring points must be resolved (the far point of a
                // one-sided pair is checked against the near one).
                let mut last = (0.0, 0.0);
                for &(_, dm, da) in &rel {
                    let step = if phase_only {
                        (da - last.1).abs()
                    } else {
                        Complex64::new(dm - last.0, da - last.1).norm()
                    };
                    if step > RESOLVED_STEP || !step.is_finite() {
                        return Some(LogDerivative::Unresolved);
                    }
                    if rel.len() == 2 && (rel[0].0 > 0.0) != (rel[1].0 > 0.0) {
                        // Centred: both steps start at k.
                        last = (0.0, 0.0);
                    } else {
                        last = (dm, da);
                    }
                }
                let slope = match rel.as_slice() {
                    [(h, dm, da)] => Complex64::new(dm / h, da / h),
                    [(h1, m1, a1), (h2, m2, a2)] => {
                        // Derivative at 0 of the quadratic through (0, 0), (h1, y1), (h2, y2).
                        let c1 = -h2 / (h1 * (h1 - h2));
                        let c2 = -h1 / (h2 * (h2 - h1));
                        Complex64::new(c1 * m1 + c2 * m2, c1 * a1 + c2 * a2)
                    }
                    _ => return None,
                };
                let l = Complex64::i() * t_ret + slope;
                l.is_finite().then_some(LogDerivative::Value(l))
            };
            derivative().unwrap_or(LogDerivative::Missing)
        })
        .collect()
}

/// `dφ/dΩ` of a sum of families from their values `v_f` and log-derivatives `L_f`:
/// `Im(Σ v_f L_f / Σ v_f)`. None when the sum's modulus is at or below `floor` or a family that
/// contributes has no log-derivative.
pub fn sum_delay(parts: &[(Complex64, Option<Complex64>)], floor: f64) -> Option<f64> {
    let mut sum = Complex64::new(0.0, 0.0);
    let mut slope = Complex64::new(0.0, 0.0);
    for &(v, l) in parts {
        if v.norm() == 0.0 {
            continue;
        }
        sum += v;
        slope += v * l?;
    }
    (sum.norm() > floor && sum.is_finite()).then(|| (slope / sum).im)
}

/// An angle reduced to `(−π, π]`.
fn wrap(a: f64) -> f64 {
    let two_pi = 2.0 * std::f64::consts::PI;
    let r = a.rem_euclid(two_pi);
    if r > std::f64::consts::PI {
        r - two_pi
    } else {
        r
    }
}
