//! Independent check path: numerical integration of the strong-field harmonic dipole in time,
//! with the drift-momentum integral done exactly and **no saddle points in time**.
//!
//! # The integral
//!
//! In the conventions of DESIGN §3 (`E = −∂A/∂t`, kinetic momentum `p + A`, amplitude `∝ e^{iΦ}`)
//! the positive-frequency part of the length-gauge SFA dipole of the channel pair `n → m`
//! (ionize into `n`, recombine into `m`; M. Lewenstein et al., PRA 49, 2117 (1994), Eq. (8) in
//! structure; physics notes §1.1 and §4.2) is, for one orientation `R` (molecular → lab),
//!
//! ```text
//! d_mn(t) = (−i) ∫_0^{τ_max} dτ W(τ) (2π/(ε + iτ))^{3/2} · R d̄_m(Rᵀv_r) · [U_I(t, t−τ)]_mn
//!                              · a_n(Rᵀv_i, Rᵀ E(t−τ)) · e^{−i S_kin(t, t−τ) − i Ip_m t + i Ip_n (t−τ)},
//! p_s = −(1/τ) ∫_{t−τ}^{t} A,   v_r = p_s + A(t),   v_i = p_s + A(t−τ),   S_kin = ∫_{t−τ}^{t} ½(p_s + A)².
//! ```
//!
//! The drift-momentum integral has been done before: `S_kin(p) = S_kin(p_s) + ½τ|p − p_s|²`
//! exactly (the action is quadratic in `p`), so the Gaussian integral gives the spreading factor
//! `(2π/(iτ))^{3/2}` with no approximation in the exponent; the structure prefactors are taken
//! at `p_s` (physics notes §1.4). Both paths of holecast share this step. The time integrals are
//! done numerically on real times:
//!
//! ```text
//! D_mn(Ω) = ∫ dt e^{iΩt} d_mn(t),     D(Ω) = Σ_R w_R Σ_mn D_mn(Ω),
//! ```
//!
//! with the orientations and weights of [`crate::multichannel::orientations`], the hole
//! propagator of [`crate::hole`] (interaction picture, at the real times `t` and `t − τ`), the
//! recombination vectors of [`crate::recombination`] and the ionization factors of
//! [`crate::ionization`], all evaluated in the molecular frame (`v_mol = Rᵀ v_lab`). The
//! complex-conjugate term of the dipole expectation (the negative-frequency part, which has no
//! stationary point at Ω > 0) is left out here as it is in the saddle path.
//!
//! ## Windows and regulator
//! * `W(τ)` ([`window::ExcursionWindow`]) is 0 below `τ_start`, rises over a ramp to 1, and
//!   falls over a second ramp to 0 at `τ_max` (`excursion_cycles`). It removes the region
//!   `τ → 0`, where the spreading factor is singular and no harmonic is emitted, and the
//!   returns after `τ_max` (with `τ_max < T`, only first returns remain, as in the saddle path's
//!   default; an end between the short and long excursion times keeps the short trajectories,
//!   within the limits stated below). The default
//!   reproduces the validation of physics notes §1.5: `0.03 T < τ < 0.97 T`.
//! * `ε` is the regulator of the spreading factor. Because `W` vanishes for `τ ≤ τ_start`, the
//!   factor is regular on the whole support for `ε = 0`, which is the default (the saddle path's
//!   default too); `ε > 0` changes the result by a relative `≈ (3/2) ε/τ` (tested).
//! * For a periodic field of period `T`, the birth times are weighted by a smooth partition of
//!   unity `χ(t_i)` ([`window::BirthPartition`]): `χ = 1` over one period, with ramps centred on
//!   a deep minimum of `|E|` ([`crate::field::Field::birth_windows`]) and overlapping the next
//!   copy so that `Σ_k χ(t + kT) = 1`. Since the integrand is periodic under `(t, t_i) → (t + T,
//!   t_i + T)` (the Schrödinger-picture ion propagator `e^{−iIp_m t}[U_I]_mn e^{iIp_n t_i}` of a
//!   periodic Hamiltonian is), `∫ dt e^{iΩt} d_χ(t)` equals the one-period integral
//!   `∫_0^T d(t) e^{iΩt} dt` **exactly at every harmonic line** `Ω = 2πq/T`, on the lattice too.
//!   Between the lines it is the transform of the emission from one period of births, the
//!   analogue of the saddle path's sum over one period of birth windows, smoother than a hard cut
//!   of one period of `t`; but it is not free of artefacts there (see the group delays of
//!   [`quadrature_spectrum`]). For a pulse, births run over the envelope's support.
//! * The windows are real-time windows. On the real axis `|e^{iΦ}| = 1`, and the harmonic
//!   amplitude, exponentially small through `e^{−Im Φ_s}`, emerges from cancellations; a ramp
//!   of a window acts as a source with Fourier content at the frequency `Ip + ½v_i²`, i.e. as
//!   ionization that bypasses tunnelling. Where a ramp lies in a region that carries no saddle
//!   and the integrand is already small (`τ → 0`, `τ → T` for the full window) this background
//!   is negligible (the window tests bound it). A ramp *between* the short and long excursion
//!   times (to keep the short orbits alone) works only when the gap between them is large
//!   compared with `|Im τ_s|` and `1/Ip`: measured, short-only amplitudes agree with the saddle
//!   path's short family to 1–8% at γ = 0.41 (1200 nm, 3×10¹⁴ W/cm², hydrogen-like), but not
//!   at all at γ = 0.75 (800 nm, 2×10¹⁴ W/cm²), where `Im τ_s ≈ 0.15 T` is comparable to the
//!   gap (`docs/validation.md`).
//!
//! ## Discretisation
//! One step `h = T₁/steps_per_cycle` (`T₁` the cycle of the reference colour) serves `t_i` and
//! `τ`, so `t = t_i + τ` is a lattice point too and the field closed forms
//! ([`crate::field::Field::at`] at real time) are evaluated once per lattice time
//! (`lattice.rs`). The τ integral is the trapezoidal rule with the window vanishing at both ends;
//! the t integral is the rectangle rule of a smooth compactly supported integrand
//! (`transform.rs`). With the C^∞ ramps ([`WindowShape::Smooth`], default) both converge faster
//! than any power of `h`; with `sin²` ramps ([`WindowShape::Cosine`]) the τ rule converges as
//! `h⁴` when the ramp ends are lattice points and as `h³` otherwise (Euler–Maclaurin, DLMF
//! §2.10(i)). `tests/quadrature.rs` measures both. The default step
//! ([`automatic_steps_per_cycle`]) resolves the largest frequency of the integrand on real
//! times, `ν_max = max(Ip) + 2 max|A|²` (`½|v|²` with `|v| ≤ |p_s| + |A| ≤ 2 max|A|`), and the
//! highest requested energy, with `h = π/(1.25 ν_max)` (measured relative error ≤ 1e-6 on the
//! plateau of the physics notes §1.5 case, where it gives 176 steps per cycle).
//!
//! The orientation-independent part (the continuum kernel, `kernel.rs`) is computed once; the
//! orientation loop (`integrand.rs`) evaluates the structure factors per point and runs in
//! parallel over fixed chunks of orientations (and, for fewer than four orientations, of birth
//! rows) whose partial sums are added in chunk order, so the result does not depend on the
//! number of threads. `D(Ω)` at the requested energies is a direct sum; [`TimeDipole::fft`] gives
//! the whole spectrum on the FFT grid (both tested against each other).
//!
//! # Stationary-phase limit: what is identical to the saddle path and what is not
//!
//! Write `D_mn(Ω) = ∫dt ∫dτ g(t, τ) e^{iΦ(t, τ)}` with
//! `Φ = Ωt − S_kin(t, t−τ) − Ip_m t + Ip_n (t−τ)` and `g` everything else. With
//! `(t_r, t_i) = (t, t − τ)` (Jacobian `|∂(t_r, t_i)/∂(t, τ)| = 1`) Φ is exactly the phase of
//! [`crate::orbits::equations`]; its stationary points are the saddles of the orbit table, and
//! the Hessian determinant is the same in both variable pairs (it changes by `J² = 1`). The
//! two-dimensional stationary-phase formula gives
//!
//! ```text
//! ∫∫ g e^{iΦ} ≈ Σ_s g(s) · 2π / sqrt(det(−iΦ''_s)) · e^{iΦ_s} = Σ_s g(s) · 2π/sqrt(−det Φ''_s) · e^{iΦ_s},
//! ```
//!
//! since `det(−iΦ'') = (−i)² det Φ''`, with the root on the steepest-descent branch (the one
//! [`crate::orbits`] continues along each family). At a saddle `W = χ = 1` (the saddles lie in
//! the flat parts of the windows) and `ε → 0`, so
//! `g(s) = (−i)(2π/(iτ_s))^{3/2} × structure(s)`, and the sum is
//! `Σ_s K_s · structure(s)` with `K_s = (−i)(2π/(iτ_s))^{3/2} 2π/sqrt(−det Φ''_s) e^{iΦ_s}`, the
//! kernel of [`crate::dipole`].
//!
//! **Identical in both paths:** the field and its closed forms; the stationary drift momentum,
//! the action and the phase Φ (same formula); the spreading factor and its branch; the channel
//! phases `e^{−iIp_m t + iIp_n t_i}`; the recombination and ionization models as functions
//! (`d̄(k) = [d(k*)]*` and `E·d` of Gaussians are analytic, so the continuation of the
//! real-time prefactor to a complex saddle *is* the saddle path's prefactor); the orientation
//! grid, weights and frame conventions; the per-period normalisation of the harmonic lines;
//! dropping the complex-conjugate term.
//!
//! **Different in approximation:**
//! 1. The saddle-point approximation in `(t, τ)` itself: the quadrature keeps all orders in the
//!    variation of the prefactor and of Φ beyond second order (the error of the SPA is of
//!    relative order `ω/Up`, physics notes §1.8).
//! 2. Near a cutoff the saddle path's uniform (Airy) sum replaces the plain sum; the quadrature
//!    needs neither.
//! 3. The hole propagator. The quadrature uses `U_I(t, t−τ)` at the real times of the integrand;
//!    the stationary-phase limit of that is `U_I` continued to the *complex* saddle times. The
//!    saddle path instead uses `U_I(Re t_r, Re t_i)`, the common-practice assumption that the
//!    hole does not move during the sub-barrier part of the path ([`crate::hole`]). For an
//!    uncoupled ion (`U_I = 1`) the two agree exactly; for coupled channels they differ at first
//!    order in `Im t_i · |dU_I/dt|`, which is a difference of models, not of numerics.
//! 4. The quadrature contains non-stationary contributions that no saddle represents (the window
//!    ramps, the region near `τ_start`, births near the field zeros): physically part of the
//!    integral, numerically a small background that the window tests bound.
//! 5. Models that are not analytic in the momentum on the real axis — the `photon` return
//!    momentum of `lcao` (direction of `v_r` flips where `v_r = 0`) and the recombination `table`
//!    (interpolated in the angle of `Re v_r` and in `Ω_loc`, clamped to the table's range) — are
//!    evaluated as they are at real momenta; their stationary-phase limit is not the saddle
//!    path's value.
//!
//! The ionization models `asymptotic` and `table` have no time-domain form: they are functions of
//! the real exit field `E(Re t_i)` (its magnitude and direction), which is not analytic in time
//! (its direction jumps where `E` vanishes, and the asymptotic factor diverges there), and they
//! stand for the result of the ionization-time integral rather than for an integrand. They are
//! rejected with a typed error.
//!
//! # Example
//! ```
//! use holecast::laser::LaserSpec;
//! use holecast::quadrature::{QuadratureSettings, quadrature_spectrum};
//! use holecast::target::TargetSpec;
//!
//! let text = r#"{"name": "model atom", "invented": true, "channels": [{"label": "X",
//!     "ip_ev": 13.6057, "ionization": {"model": "gaussian", "exponent_au": 1.0},
//!     "recombination": {"model": "gaussian", "exponent_au": 1.0}}]}"#;
//! let target = TargetSpec::from_json(text)?.validate()?;
//! let field = LaserSpec::monochromatic(2e14, 800.0).to_field()?;
//! let w = field.omega();
//! let settings = QuadratureSettings { steps_per_cycle: Some(128), ..QuadratureSettings::default() };
//! let s = quadrature_spectrum(&field, &target, &[21.0 * w], &settings, &|_, _| {})?;
//! assert!(s.intensity(0) > 0.0);
//! # Ok::<(), holecast::Error>(())
//! ```

mod integrand;
mod kernel;
mod lattice;
mod transform;
pub mod window;

use std::sync::atomic::{AtomicUsize, Ordering};

use nalgebra::Vector3;
use num_complex::Complex64;
use rayon::prelude::*;
use serde::Serialize;

use crate::dipole::SaddleSum;
use crate::error::{Error, Result};
use crate::field::{CVec3, Field};
use crate::hole::{DEFAULT_MAX_STEP, FieldSamples};
use crate::ionization::IonizationModel;
use crate::multichannel::{
    MultichannelSpectrum, PairSpectrum, coupling_components, orientations, propagation_needed,
};
use crate::spectrum::{NEGLIGIBLE, project};
use crate::target::{OrientationGridSpec, Target};
use integrand::{ChannelSides, Context, orientation_sum};
use lattice::Lattice;
use window::ExcursionWindow;
pub use window::WindowShape;

/// The excursion-time window, in cycles `T₁ = 2π/ω₁` of the reference colour (its end is
/// [`QuadratureSettings::excursion_cycles`]).
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct WindowSettings {
    /// `τ_start`: below it `W = 0` (cycles).
    pub start_cycles: f64,
    /// Width of the rising ramp (cycles).
    pub rise_cycles: f64,
    /// Width of the falling ramp that ends at `τ_max` (cycles).
    pub fall_cycles: f64,
    /// Ramp shape.
    pub shape: WindowShape,
}

/// How the quadrature does the integral over the drift momentum.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum MomentumIntegral {
    /// Exactly, as a Gaussian moment, where both structure models are Gaussian-type (or
    /// constant); a side with another model is evaluated at the mean momentum of the Gaussian
    /// measure of the other side ([`crate::momentum`]). The reference.
    #[default]
    Exact,
    /// The shortcut shared with the saddle path before: the spreading factor
    /// `(2π/(ε + iτ))^{3/2}` times the structure factors at the stationary momentum `p_s`.
    Stationary,
}

/// Settings of the quadrature.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct QuadratureSettings {
    /// `τ_max`, where the excursion window reaches zero (cycles of the reference colour).
    pub excursion_cycles: f64,
    /// The rest of the excursion window.
    pub window: WindowSettings,
    /// Time steps per cycle of the reference colour; `None` chooses
    /// [`automatic_steps_per_cycle`].
    pub steps_per_cycle: Option<usize>,
    /// Regulator ε of the spreading factor (a.u. of time, ≥ 0).
    pub epsilon: f64,
    /// Half-width of the ramps of the birth partition of a periodic field (cycles).
    pub birth_taper_cycles: f64,
    /// Half-width δ of the group-delay difference, as a fraction of ω; `None` skips group delays.
    pub group_delay_step: Option<f64>,
    /// Largest step of the hole propagator grid (a.u.).
    pub hole_step: f64,
    /// How the drift-momentum integral is done.
    pub momentum: MomentumIntegral,
}

impl Default for QuadratureSettings {
    /// The window of physics notes §1.5 (`0.03 T < τ < 0.97 T`, here with a C^∞ rise of 0.1 T
    /// and fall of 0.03 T: the long orbits of the lower plateau return close to `τ = T` and a
    /// wider fall would cut them), ε = 0, automatic step, birth ramps of ±0.05 T, group delays
    /// over `Ω ± 0.001ω` (pulses only, see [`quadrature_spectrum`]).
    fn default() -> Self {
        QuadratureSettings {
            excursion_cycles: 0.97,
            window: WindowSettings {
                start_cycles: 0.03,
                rise_cycles: 0.1,
                fall_cycles: 0.03,
                shape: WindowShape::Smooth,
            },
            steps_per_cycle: None,
            epsilon: 0.0,
            birth_taper_cycles: 0.05,
            group_delay_step: Some(1e-3),
            hole_step: DEFAULT_MAX_STEP,
            momentum: MomentumIntegral::Exact,
        }
    }
}

/// Oversampling of the largest integrand frequency by the automatic step (`h = π/(c ν_max)`).
pub const AUTOMATIC_OVERSAMPLING: f64 = 1.25;

/// Fewest and most steps per cycle accepted.
pub const STEPS_PER_CYCLE_RANGE: (usize, usize) = (16, 100_000);

impl QuadratureSettings {
    /// Checks every setting; the error names the setting, its value and the reason.
    pub fn validate(&self) -> Result<()> {
        let finite_nonneg = |name: &str, v: f64| -> Result<()> {
            if !(v.is_finite() && v >= 0.0) {
                return Err(Error::invalid(
                    name,
                    v,
                    "must be a finite non-negative number",
                ));
            }
            Ok(())
        };
        let w = &self.window;
        finite_nonneg("quadrature window start (cycles)", w.start_cycles)?;
        crate::error::require_positive("quadrature window rise (cycles)", w.rise_cycles)?;
        crate::error::require_positive("quadrature window fall (cycles)", w.fall_cycles)?;
        crate::error::require_positive("excursion cycles", self.excursion_cycles)?;
        if self.excursion_cycles > 8.0 {
            return Err(Error::invalid(
                "excursion cycles",
                self.excursion_cycles,
                "must be at most 8 cycles",
            ));
        }
        if w.start_cycles + w.rise_cycles > self.excursion_cycles - w.fall_cycles {
            return Err(Error::invalid(
                "excursion cycles",
                self.excursion_cycles,
                &format!(
                    "must be at least window start + rise + fall = {} cycles (the window \
                     would have no flat part)",
                    w.start_cycles + w.rise_cycles + w.fall_cycles
                ),
            ));
        }
        if let Some(n) = self.steps_per_cycle {
            let (lo, hi) = STEPS_PER_CYCLE_RANGE;
            if !(lo..=hi).contains(&n) {
                return Err(Error::invalid(
                    "quadrature steps per cycle",
                    n,
                    &format!("must lie between {lo} and {hi}"),
                ));
            }
        }
        finite_nonneg("quadrature regulator epsilon (a.u.)", self.epsilon)?;
        let b = self.birth_taper_cycles;
        if !(b.is_finite() && b > 0.0 && b <= 0.25) {
            return Err(Error::invalid(
                "birth taper (cycles)",
                b,
                "must lie in (0, 0.25] cycles",
            ));
        }
        if let Some(step) = self.group_delay_step
            && !(step.is_finite() && step > 0.0 && step < 0.5)
        {
            return Err(Error::invalid(
                "group-delay step",
                step,
                "must lie in (0, 0.5) harmonic orders",
            ));
        }
        crate::error::require_positive("hole propagator step (a.u.)", self.hole_step)?;
        Ok(())
    }
}

/// Rejects targets with an ionization model that has no time-domain form (see the module
/// documentation): `asymptotic` and `table`.
pub fn check_models(target: &Target) -> Result<()> {
    for c in &target.channels {
        let why = match c.ionization {
            IonizationModel::Asymptotic { .. } => {
                "has no time-domain form: the asymptotic (MO-ADK) amplitude is a tunnelling \
                 amplitude that already contains the ionization-time integral, and it depends on \
                 the real exit field |E(Re t_i)|, which is not analytic in time and makes it \
                 diverge where the field vanishes; use the orbital or gaussian model for the \
                 quadrature"
            }
            IonizationModel::Table { .. } => {
                "has no time-domain form: the tabulated amplitude is keyed to the direction of \
                 the real exit field E(Re t_i), which jumps where the field vanishes, and stands \
                 for the result of the ionization-time integral; use the orbital, gaussian or \
                 constant model for the quadrature"
            }
            _ => continue,
        };
        let model = match c.ionization {
            IonizationModel::Asymptotic { .. } => "asymptotic",
            _ => "table",
        };
        return Err(Error::invalid(
            &format!("channel {} ionization model", c.label),
            model,
            why,
        ));
    }
    Ok(())
}

/// The default step: `steps_per_cycle = ⌈1.25 ν_max T₁/π⌉` rounded up to a multiple of 16, with
/// `ν_max = max(max_n Ip_n + 2 max_t |A(t)|², largest energy)` (the module documentation says
/// why), `max|A|` sampled on 64 points per cycle of the fastest mode.
pub fn automatic_steps_per_cycle(field: &Field, target: &Target, energies: &[f64]) -> usize {
    let (t0, t1) = field.time_span();
    let nu_fast = field
        .modes()
        .iter()
        .map(|m| m.frequency)
        .fold(field.omega(), f64::max);
    let samples = (((t1 - t0) * nu_fast / (2.0 * std::f64::consts::PI)) * 64.0).ceil() as usize;
    let samples = samples.clamp(64, 1_000_000);
    let a_max = (0..=samples)
        .map(|k| {
            let t = t0 + (t1 - t0) * k as f64 / samples as f64;
            field.real_at(t).0.norm()
        })
        .fold(0.0, f64::max);
    let ip_max = target.channels.iter().map(|c| c.ip).fold(0.0, f64::max);
    let e_max = energies
        .iter()
        .copied()
        .filter(|e| e.is_finite())
        .fold(0.0, f64::max);
    let nu = (ip_max + 2.0 * a_max * a_max).max(e_max);
    let cycle = 2.0 * std::f64::consts::PI / field.omega();
    let n = (AUTOMATIC_OVERSAMPLING * nu * cycle / std::f64::consts::PI).ceil() as usize;
    let (lo, hi) = STEPS_PER_CYCLE_RANGE;
    (n.div_ceil(16) * 16).clamp(lo.max(64), hi)
}

/// The orientation-averaged time-domain dipole `d_mn(t_j)` on the lattice, per channel pair.
#[derive(Clone, Debug)]
pub struct TimeDipole {
    /// First lattice time `t₀` (a.u.).
    pub origin: f64,
    /// Lattice step `h` (a.u.).
    pub step: f64,
    /// Steps per cycle of the reference colour used.
    pub steps_per_cycle: usize,
    /// Period of the field (None for a pulse).
    pub period: Option<f64>,
    /// `(ion, rec)` of every coupled pair: diagonal pairs first in channel order, then the
    /// others (the order of [`crate::multichannel::trajectory_stage`]).
    pub pairs: Vec<(usize, usize)>,
    /// `d_mn(t_j)` per pair (lab frame, including `e^{−iIp_m t}`), `j = 0…N−1`.
    pub values: Vec<Vec<CVec3>>,
    /// Number of `(t_i, τ)` points of the double integral (per orientation).
    pub points: usize,
    /// Number of orientations summed.
    pub orientations: usize,
}

/// The whole spectrum on the FFT grid.
#[derive(Clone, Debug)]
pub struct FftSpectrum {
    /// Frequencies `Ω_k = 2πk/(M h)`, `k = 0…M/2` (a.u.).
    pub frequencies: Vec<f64>,
    /// `D_mn(Ω_k)` per pair (outer) and frequency (inner).
    pub pairs: Vec<Vec<CVec3>>,
}

impl TimeDipole {
    /// Lattice time of index `j` (a.u.).
    pub fn time(&self, j: usize) -> f64 {
        self.origin + j as f64 * self.step
    }

    /// `d(t_j)` summed over pairs.
    pub fn total(&self) -> Vec<CVec3> {
        let n = self.values.first().map_or(0, Vec::len);
        let mut out = vec![CVec3::zeros(); n];
        for pair in &self.values {
            for (o, d) in out.iter_mut().zip(pair) {
                *o += d;
            }
        }
        out
    }

    /// `D_mn(Ω)` per pair (outer) at every energy (inner) by direct summation.
    pub fn transform(&self, energies: &[f64]) -> Vec<Vec<CVec3>> {
        self.values
            .iter()
            .map(|v| transform::direct(self.origin, self.step, v, energies))
            .collect()
    }

    /// FFT length: for a periodic field the smallest multiple of the period's steps that holds
    /// the series (the harmonic lines are then grid frequencies); for a pulse the next power of
    /// two of twice the series length (zero padding for a finer grid).
    pub fn fft_length(&self) -> usize {
        let n = self.values.first().map_or(0, Vec::len).max(1);
        match self.period {
            Some(period) => {
                let per = ((period / self.step).round() as usize).max(1);
                n.div_ceil(per) * per
            }
            None => (2 * n).next_power_of_two(),
        }
    }

    /// The spectrum of every pair on the FFT grid (see [`TimeDipole::fft_length`]).
    pub fn fft(&self) -> FftSpectrum {
        let length = self.fft_length();
        let mut frequencies = Vec::new();
        let pairs = self
            .values
            .iter()
            .map(|v| {
                let (f, d) = transform::fft(self.origin, self.step, v, length);
                frequencies = f;
                d
            })
            .collect();
        FftSpectrum { frequencies, pairs }
    }
}

/// The coupled channel pairs `(ion, rec)` in the order of the trajectory stage.
fn channel_pairs(target: &Target) -> Vec<(usize, usize)> {
    let components = coupling_components(target);
    let n = target.channels.len();
    let mut list: Vec<(usize, usize)> = (0..n).map(|i| (i, i)).collect();
    for a in 0..n {
        for b in 0..n {
            if a != b && components[a] == components[b] {
                list.push((a, b));
            }
        }
    }
    list
}

/// Computes the orientation-averaged time-domain dipole. `energies` (a.u.) only enter the
/// automatic step; `progress` is called with the number of work items (chunks of orientations
/// or of birth rows) done and their total.
pub fn time_dipole(
    field: &Field,
    target: &Target,
    energies: &[f64],
    settings: &QuadratureSettings,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<TimeDipole> {
    settings.validate()?;
    check_models(target)?;
    let cycle = 2.0 * std::f64::consts::PI / field.omega();
    let spc = settings
        .steps_per_cycle
        .unwrap_or_else(|| automatic_steps_per_cycle(field, target, energies));
    let w = &settings.window;
    let window = ExcursionWindow {
        start: w.start_cycles * cycle,
        rise: w.rise_cycles * cycle,
        fall: w.fall_cycles * cycle,
        end: settings.excursion_cycles * cycle,
        shape: w.shape,
    };
    let lattice = Lattice::new(
        field,
        spc,
        &window,
        settings.birth_taper_cycles * cycle,
        w.shape,
    )?;
    let kernel = kernel::continuum_kernel(&lattice);
    let rho = kernel::column_rho(&lattice, settings.epsilon);
    let spreading = kernel::column_spreading(&rho);
    let sides = ChannelSides::of(target);
    let pairs = channel_pairs(target);
    let birth_phase: Vec<Vec<Complex64>> = target
        .channels
        .iter()
        .map(|c| {
            (0..lattice.rows)
                .map(|i| Complex64::cis(c.ip * lattice.time(i)))
                .collect()
        })
        .collect();
    let nt = lattice.emission_points();
    let hole_samples = if propagation_needed(target) {
        let field_at = |t: f64| field.electric_real(t);
        Some(
            FieldSamples::new(
                &field_at,
                lattice.time(0) - 1.0,
                lattice.time(nt - 1) + 1.0,
                settings.hole_step,
            )
            .map_err(|e| Error::Numerical(format!("hole propagator grid: {e}")))?,
        )
    } else {
        None
    };
    let ctx = Context {
        target,
        lattice: &lattice,
        kernel: &kernel,
        rho: &rho,
        spreading: &spreading,
        momentum: settings.momentum,
        sides: &sides,
        pairs: &pairs,
        birth_phase: &birth_phase,
        hole_samples: hole_samples.as_ref(),
    };
    let list = orientations(target, field)?;
    // Fixed work items (independent of the thread count): chunks of orientations, and for
    // fewer than four orientations also chunks of birth rows.
    let row_chunks = if list.len() < 4 { 8 } else { 1 };
    let rows_per = lattice.rows.div_ceil(row_chunks);
    let orient_per = list.len().div_ceil(8).max(1);
    let mut items = Vec::new();
    for os in list.chunks(orient_per) {
        for r in 0..row_chunks {
            let lo = (r * rows_per).min(lattice.rows);
            let hi = ((r + 1) * rows_per).min(lattice.rows);
            items.push((os, lo..hi));
        }
    }
    let total = items.len();
    let done = AtomicUsize::new(0);
    let partial: Vec<Result<Vec<Vec<CVec3>>>> = items
        .par_iter()
        .map(|(os, rows)| {
            let mut acc = vec![vec![CVec3::zeros(); nt]; pairs.len()];
            for o in os.iter() {
                let part = orientation_sum(&ctx, o, rows.clone())?;
                for (a, b) in acc.iter_mut().zip(&part) {
                    for (x, y) in a.iter_mut().zip(b) {
                        *x += y;
                    }
                }
            }
            progress(done.fetch_add(1, Ordering::Relaxed) + 1, total);
            Ok(acc)
        })
        .collect();
    let mut values = vec![vec![CVec3::zeros(); nt]; pairs.len()];
    for p in partial {
        for (a, b) in values.iter_mut().zip(&p?) {
            for (x, y) in a.iter_mut().zip(b) {
                *x += y;
            }
        }
    }
    let axis_grid = matches!(target.orientations, OrientationGridSpec::Axis(_));
    for (p, &(_, m)) in pairs.iter().enumerate() {
        let ip = target.channels[m].ip;
        for (j, d) in values[p].iter_mut().enumerate() {
            *d *= Complex64::cis(-ip * lattice.time(j));
            // A β-only grid samples α = 0 only: the components across the lab z axis average
            // to zero over α and are removed (as the saddle path does).
            if axis_grid {
                d.x = Complex64::new(0.0, 0.0);
                d.y = Complex64::new(0.0, 0.0);
            }
        }
    }
    Ok(TimeDipole {
        origin: lattice.origin,
        step: lattice.step,
        steps_per_cycle: spc,
        period: lattice.period,
        pairs,
        values,
        points: lattice.rows * lattice.columns(),
        orientations: list.len(),
    })
}

/// The harmonic spectrum by quadrature at photon energies `energies` (a.u.), as a
/// [`MultichannelSpectrum`] so that the report writers apply unchanged: `pairs` filled (dipole
/// and, if asked, group delay per pair), `families` and `holes` empty (no saddles), `complete`
/// true everywhere, `sum` set to its default (it has no meaning for a quadrature; callers record
/// the method themselves).
///
/// Group delays (if `group_delay_step` is set) are central differences of the direct transform
/// over `Ω ± δ`, `δ = group_delay_step · ω`, with the floor of [`NEGLIGIBLE`], **for pulses
/// only**. For a periodic field they are `None`: only the harmonic lines are properties of the
/// periodic dipole; between the lines the transform depends on how the births are cut into one
/// period, and on real times any such cut acts as a source that bypasses the tunnelling
/// suppression (|e^{iΦ}| = 1 on the real axis), adding a background to `D(Ω ± δ)` that is not
/// exponentially small (measured: errors of hundreds of attoseconds at 1200 nm,
/// 3×10¹⁴ W/cm²). Emission times of a periodic field are taken from differences of line phases
/// instead, `(φ_{q+1} − φ_{q−1})/(2ω)`, which are exact for both paths (`docs/validation.md`).
///
/// # Errors
/// Invalid settings; an ionization model without a time-domain form ([`check_models`]);
/// non-finite energies; orientation-grid, hole-propagator or non-finite-integrand failures
/// (typed, naming the value and the reason).
pub fn quadrature_spectrum(
    field: &Field,
    target: &Target,
    energies: &[f64],
    settings: &QuadratureSettings,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<MultichannelSpectrum> {
    if let Some(e) = energies.iter().find(|e| !e.is_finite()) {
        return Err(Error::invalid(
            "photon energy (a.u.)",
            e,
            "must be a finite number",
        ));
    }
    let omega = field.omega();
    let delta = settings.group_delay_step.map(|s| s * omega);
    let mut grid = Vec::with_capacity(3 * energies.len());
    for &e in energies {
        match delta {
            Some(d) => grid.extend([e - d, e, e + d]),
            None => grid.push(e),
        }
    }
    let dipole = time_dipole(field, target, &grid, settings, progress)?;
    let stride = if delta.is_some() { 3 } else { 1 };
    let central = |k: usize| k * stride + stride / 2;
    let per_pair = dipole.transform(&grid);
    let n = energies.len();
    let mut total_grid = vec![CVec3::zeros(); grid.len()];
    for values in &per_pair {
        for (t, d) in total_grid.iter_mut().zip(values) {
            *t += d;
        }
    }
    let axis = field.axis();
    let largest = (0..n)
        .map(|k| project(&axis, &total_grid[central(k)]).norm())
        .fold(0.0, f64::max);
    let floor = NEGLIGIBLE * largest;
    let pulse = dipole.period.is_none();
    let delay = |v: &[CVec3], k: usize| -> Option<f64> {
        let d = delta.filter(|_| pulse)?;
        let i = central(k);
        crate::spectrum::phase_derivative(
            project(&axis, &v[i - 1]),
            project(&axis, &v[i + 1]),
            project(&axis, &v[i]),
            d,
            floor,
        )
    };
    let pairs = dipole
        .pairs
        .iter()
        .zip(&per_pair)
        .map(|(&(ion, rec), values)| PairSpectrum {
            ion,
            rec,
            dipole: (0..n).map(|k| values[central(k)]).collect(),
            group_delay: (0..n).map(|k| delay(values, k)).collect(),
            families: Vec::new(),
        })
        .collect();
    let reference = target
        .channels
        .iter()
        .enumerate()
        .min_by(|a, b| a.1.ip.total_cmp(&b.1.ip))
        .map_or(0, |(i, _)| i);
    Ok(MultichannelSpectrum {
        omega,
        energies: energies.to_vec(),
        axis,
        transverse: Vector3::new(axis.z, 0.0, -axis.x),
        sum: SaddleSum::default(),
        labels: target.channels.iter().map(|c| c.label.clone()).collect(),
        total: (0..n).map(|k| total_grid[central(k)]).collect(),
        group_delay: (0..n).map(|k| delay(&total_grid, k)).collect(),
        complete: vec![true; n],
        status: vec![crate::status::RowStatus::Complete; n],
        pairs,
        unresolved_group_delays: Vec::new(),
        orientations: dipole.orientations,
        holes: Vec::new(),
        reference,
    })
}
