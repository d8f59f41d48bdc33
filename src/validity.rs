//! Validity warnings: the rules that say when a result lies outside the range the model is
//! built for.
//!
//! The library only computes the warnings (it never prints); the command-line program writes
//! them to standard error and into every JSON output under `warnings`. Each [`Warning`] has a
//! stable code ([`WarningKind`], kebab-case in JSON), a message with the numbers behind it, and
//! advice on what to do. The rules and their thresholds (constants below) are:
//!
//! | code | rule | why |
//! |---|---|---|
//! | `multiphoton-regime` | Keldysh `γ = √(Ip/2Up)` of the lowest-Ip channel above [`MAX_KELDYSH`] | the quantum orbits are built on tunnelling (γ ≲ 1, L. V. Keldysh, Sov. Phys. JETP 20, 1307 (1965)); far above it few harmonics lie above Ip and the saddle-point error, of order ω/Up, is large |
//! | `over-the-barrier` | peak `|E(t)|` above the barrier-suppression field `Ip²/(4Z)` of the lowest-Ip channel ([`crate::tunnelling::barrier_suppression_field`]) | the electron leaves over the barrier; the tunnelling amplitudes do not hold and the ground state empties within a cycle |
//! | `photon-energy-near-ip` | a colour's photon energy above [`NEAR_IP_FRACTION`] of the lowest Ip | fewer than four photons ionize: multiphoton, not tunnelling |
//! | `photon-energy-above-ip` | a colour's photon energy at or above the lowest Ip | one photon ionizes; there is no tunnelling and no plateau |
//! | `ground-state-depletion` | ionized fraction, from the project's ADK rates ([`crate::tunnelling::adk_static_rate`]) integrated over `|E(t)|`, summed over channels, above [`MAX_DEPLETION_PULSE`] over a pulse or [`MAX_DEPLETION_PERIOD`] per period of a continuous field | the model keeps the ground-state amplitude at one (no depletion) |
//! | `weak-colour-amplified` | a mode of frequency ν whose vector potential, continued to the complex ionization time `Im t ≈ asinh(γ)/ω` (PPT), exceeds the strongest mode's: `(|a_ν|/|a₁|) e^{(ν−ω)Im t} >` [`MAX_AMPLIFICATION`] | the saddles are then governed by a colour that is weak on the real axis (a harmonic-300 colour is amplified by about e²⁷⁰): few or no saddles are found and those found depend on it exponentially |
//! | `near-threshold` | photon energies below the highest Ip (channels with no recombination there) or less than one photon above a channel's Ip | the plane-wave continuum ignores the Coulomb attraction that dominates near threshold; below a channel's Ip no orbit recombines into it |
//!
//! The thresholds are common practice with no single published source: γ ≲ 1 marks tunnelling
//! (Keldysh 1965); the barrier-suppression field is the classical estimate (S. Augst et al.,
//! PRL 63, 2212 (1989)); depletion and amplification limits are chosen here and stated.

use serde::Serialize;

use crate::field::{Field, TimeStructure};
use crate::ionization::IonizationModel;
use crate::target::Target;
use crate::tunnelling as adk;
use crate::units;

/// Largest Keldysh parameter of the lowest-Ip channel without a `multiphoton-regime` warning.
pub const MAX_KELDYSH: f64 = 1.5;
/// Photon energy, as a fraction of the lowest Ip, above which `photon-energy-near-ip` is given.
pub const NEAR_IP_FRACTION: f64 = 0.25;
/// Largest ionized fraction over a pulse without a `ground-state-depletion` warning.
pub const MAX_DEPLETION_PULSE: f64 = 0.1;
/// Largest ionized fraction per period of a continuous field without a warning (a ten-cycle
/// pulse at that rate would ionize about 40 %).
pub const MAX_DEPLETION_PERIOD: f64 = 0.05;
/// Largest ratio of a mode's vector potential at the complex ionization time to the strongest
/// mode's without a `weak-colour-amplified` warning.
pub const MAX_AMPLIFICATION: f64 = 1.0;
/// Samples per period of the fastest mode for the depletion integral and the peak field.
const SAMPLES_PER_PERIOD: f64 = 64.0;
/// At most this many field samples (coarser steps beyond: the estimate stays an estimate).
const MAX_SAMPLES: f64 = 2.0e5;

/// What a warning is about (stable codes: kebab-case in JSON).
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum WarningKind {
    /// Keldysh parameter above [`MAX_KELDYSH`].
    MultiphotonRegime,
    /// Peak field above the barrier-suppression field.
    OverTheBarrier,
    /// Photon energy above [`NEAR_IP_FRACTION`] of the lowest Ip.
    PhotonEnergyNearIp,
    /// Photon energy at or above the lowest Ip.
    PhotonEnergyAboveIp,
    /// Ground-state depletion above the limits.
    GroundStateDepletion,
    /// A weak colour dominates the field at complex times.
    WeakColourAmplified,
    /// Photon energies below or just above a channel's threshold.
    NearThreshold,
    /// A target gives a Dyson orbital that none of its models uses.
    UnusedDysonOrbital,
    /// A computation was not done because it exceeds a work limit (`check` only: the other
    /// commands stop with an error).
    WorkLimit,
    /// The cutoff search found no cutoff (the formula is used instead).
    CutoffNotFound,
    /// Some orbit families that should contribute did not converge.
    IncompletePoints,
    /// Every saddle that should contribute failed: the data carry no spectrum.
    AllSaddlesFailed,
    /// Some values came out non-finite (written as null with a status).
    NonFiniteValues,
    /// A figure could not be drawn (the data were written).
    PlotNotDrawn,
}

/// One warning: what, the numbers, and what to do.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Warning {
    /// Stable code.
    pub code: WarningKind,
    /// What was found, with the numbers.
    pub message: String,
    /// What to do about it.
    pub advice: String,
}

impl Warning {
    /// A warning from its parts.
    pub fn new(code: WarningKind, message: impl Into<String>, advice: impl Into<String>) -> Self {
        Warning {
            code,
            message: message.into(),
            advice: advice.into(),
        }
    }
}

impl std::fmt::Display for Warning {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{} (what to do: {})", self.message, self.advice)
    }
}

/// A channel as the rules see it.
#[derive(Clone, Debug, PartialEq)]
pub struct ChannelIp {
    /// Label.
    pub label: String,
    /// Ionization potential (a.u.).
    pub ip: f64,
    /// Charge of the residual ion seen by the electron (1 unless the ionization model says).
    pub charge: f64,
}

/// The channels of a target (charge from the asymptotic model where given, else 1).
pub fn channels_of(target: &Target) -> Vec<ChannelIp> {
    target
        .channels
        .iter()
        .map(|c| ChannelIp {
            label: c.label.clone(),
            ip: c.ip,
            charge: match &c.ionization {
                IonizationModel::Asymptotic { orbital } => orbital.charge(),
                _ => 1.0,
            },
        })
        .collect()
}

/// The field sampled on the real axis: peak `|E|` and the ADK ionization integral.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FieldScan {
    /// Largest `|E(t)|` over the field's time span (a.u.).
    pub peak_field: f64,
    /// `∫ Σ_channels w_ADK(|E(t)|) dt` over the time span (one period of a periodic field).
    pub ionization_integral: f64,
    /// Whether the time span is one period (true) or the whole pulse.
    pub periodic: bool,
}

impl FieldScan {
    /// The ionized fraction `1 − e^{−∫w dt}` over the time span.
    pub fn ionized_fraction(&self) -> f64 {
        -(-self.ionization_integral).exp_m1()
    }
}

/// Samples `|E(t)|` over the field's time span (64 samples per period of the fastest mode, at
/// most 2 × 10⁵ samples) and integrates the static ADK rate of every channel (l = m = 0; the
/// quasi-static, cycle-resolved rate of ADK 1986) by the trapezoidal rule. Rates that cannot be
/// evaluated (e.g. `Γ(2n*)` overflow) count as zero.
pub fn scan_field(field: &Field, channels: &[ChannelIp]) -> FieldScan {
    let (t0, t1) = field.time_span();
    let (peak, integral) = integrate_rates(field, channels, t0, t1);
    FieldScan {
        peak_field: peak,
        ionization_integral: integral,
        periodic: matches!(field.structure(), TimeStructure::Periodic { .. }),
    }
}

/// The peak of `|E(t)|` and the integral of the summed static ADK rates of `channels` over
/// `[t0, t1]` (the sampling and rule of [`scan_field`]); also used for the ionized fraction of
/// the detection layer's free-electron dispersion.
pub fn integrate_rates(field: &Field, channels: &[ChannelIp], t0: f64, t1: f64) -> (f64, f64) {
    let nu_max = field
        .modes()
        .iter()
        .map(|m| m.frequency)
        .fold(field.omega(), f64::max);
    let span = t1 - t0;
    let wanted = span * nu_max / (2.0 * std::f64::consts::PI) * SAMPLES_PER_PERIOD;
    let n = if wanted.is_finite() {
        wanted.clamp(16.0, MAX_SAMPLES) as usize
    } else {
        MAX_SAMPLES as usize
    };
    let dt = span / n as f64;
    let rate = |f: f64| -> f64 {
        if f.is_nan() || f <= 0.0 {
            return 0.0;
        }
        channels
            .iter()
            .map(|c| {
                adk::adk_static_rate(c.ip, c.charge, 0, 0, f)
                    .ok()
                    .filter(|w| w.is_finite())
                    .unwrap_or(0.0)
            })
            .sum()
    };
    let mut peak = 0.0_f64;
    let mut integral = 0.0;
    for k in 0..=n {
        let t = t0 + dt * k as f64;
        let e = field.electric_real(t).norm();
        peak = peak.max(e);
        let weight = if k == 0 || k == n { 0.5 } else { 1.0 };
        integral += weight * rate(e) * dt;
    }
    (peak, integral)
}

fn lowest(channels: &[ChannelIp]) -> Option<&ChannelIp> {
    channels.iter().min_by(|a, b| a.ip.total_cmp(&b.ip))
}

fn ev(x: f64) -> String {
    let v = units::au_to_ev(x);
    if v.abs() >= 1e6 || (v != 0.0 && v.abs() < 1e-3) {
        format!("{v:.4e} eV")
    } else {
        format!("{v:.4} eV")
    }
}

/// Warnings that follow from the field and the channels alone (rules in the module
/// documentation), in the order of [`WarningKind`].
pub fn field_warnings(field: &Field, channels: &[ChannelIp]) -> Vec<Warning> {
    let mut out = Vec::new();
    let Some(reference) = lowest(channels) else {
        return out;
    };
    let omega = field.omega();
    let up = field.ponderomotive_energy();
    let gamma = units::keldysh(reference.ip, up);
    if gamma > MAX_KELDYSH {
        out.push(Warning::new(
            WarningKind::MultiphotonRegime,
            format!(
                "Keldysh parameter γ = {gamma:.4e} for channel {} (Ip {}, Up {}) is above {MAX_KELDYSH}: \
                 ionization is in the multiphoton regime, where the quantum-orbit model is not \
                 built to work (saddle-point error of order ω/Up = {:.3})",
                reference.label,
                ev(reference.ip),
                ev(up),
                omega / up
            ),
            "raise the intensity or the wavelength until γ ≤ 1.5, or read the result as \
             qualitative",
        ));
    }
    let scan = scan_field(field, channels);
    let f_bs = adk::barrier_suppression_field(reference.ip, reference.charge);
    if scan.peak_field > f_bs {
        let i_bs = units::peak_field_to_intensity(f_bs);
        out.push(Warning::new(
            WarningKind::OverTheBarrier,
            format!(
                "the peak field {:.4} a.u. exceeds the barrier-suppression field Ip²/(4Z) = {f_bs:.4} a.u. \
                 of channel {} (linear intensity {i_bs:.3e} W/cm²): the electron leaves over the \
                 barrier, which the tunnelling amplitudes do not describe",
                scan.peak_field, reference.label
            ),
            format!("lower the intensity below {i_bs:.3e} W/cm² for quantitative results"),
        ));
    }
    let photon = field
        .modes()
        .iter()
        .map(|m| m.frequency)
        .fold(omega, f64::max);
    if photon >= reference.ip {
        out.push(Warning::new(
            WarningKind::PhotonEnergyAboveIp,
            format!(
                "a photon energy of the field ({}) is at or above the ionization potential of \
                 channel {} ({}): one photon ionizes, there is no tunnelling and no plateau",
                ev(photon),
                reference.label,
                ev(reference.ip)
            ),
            "use a driving wavelength whose photons are well below Ip (the model is for \
             infrared and visible drivers)",
        ));
    } else if photon > NEAR_IP_FRACTION * reference.ip {
        out.push(Warning::new(
            WarningKind::PhotonEnergyNearIp,
            format!(
                "a photon energy of the field ({}) exceeds a quarter of the ionization potential \
                 of channel {} ({}): ionization by a few photons is not tunnelling",
                ev(photon),
                reference.label,
                ev(reference.ip)
            ),
            "use a longer driving wavelength, or read the result as qualitative",
        ));
    }
    let fraction = scan.ionized_fraction();
    let (limit, over) = if scan.periodic {
        (MAX_DEPLETION_PERIOD, "per period of the continuous field")
    } else {
        (MAX_DEPLETION_PULSE, "over the pulse")
    };
    if fraction > limit {
        out.push(Warning::new(
            WarningKind::GroundStateDepletion,
            format!(
                "the ADK rates of the channels integrated over |E(t)| ionize {:.1} % of the \
                 ground state {over} (limit {:.0} %); the model keeps the ground state full, so \
                 the harmonic yield is overestimated",
                100.0 * fraction,
                100.0 * limit
            ),
            "lower the intensity (or shorten the pulse), or scale the yield by the remaining \
             ground-state population yourself",
        ));
    }
    if let Some(w) = amplification_warning(field, gamma) {
        out.push(w);
    }
    out
}

/// `weak-colour-amplified`: the largest `ln[(|a_ν|/|a_max|) e^{(ν−ν_max)τ}]` over the modes,
/// with `τ = asinh(γ)/ω` the imaginary part of the ionization time at a crest of a linear
/// monochromatic field (PPT; M. Lewenstein et al., PRA 49, 2117 (1994)).
fn amplification_warning(field: &Field, gamma: f64) -> Option<Warning> {
    let omega = field.omega();
    let tau = gamma.asinh() / omega;
    if !tau.is_finite() {
        return None;
    }
    let norm =
        |m: &crate::field::Mode| m.amplitude.iter().map(|c| c.norm_sqr()).sum::<f64>().sqrt();
    let strongest = field
        .modes()
        .iter()
        .max_by(|a, b| norm(a).total_cmp(&norm(b)))?;
    let a_max = norm(strongest);
    if a_max.is_nan() || a_max <= 0.0 {
        return None;
    }
    let (log_ratio, nu) = field
        .modes()
        .iter()
        .filter(|m| norm(m) > 0.0)
        .map(|m| {
            (
                (norm(m) / a_max).ln() + (m.frequency - strongest.frequency) * tau,
                m.frequency,
            )
        })
        .max_by(|a, b| a.0.total_cmp(&b.0))?;
    (log_ratio > MAX_AMPLIFICATION.ln()).then(|| {
        Warning::new(
            WarningKind::WeakColourAmplified,
            format!(
                "the field's component at {:.2} ω, continued to the complex ionization time \
                 (Im t ≈ {:.1} a.u.), is e^{:.1} times the strongest component: the quantum orbits \
                 are governed by a colour that is weak on the real axis; saddles may be missing \
                 and those found depend on it exponentially",
                nu / omega,
                tau,
                log_ratio
            ),
            "check the result against --method quadrature, or leave out the high-frequency \
             colour (it matters only if it is not weak)",
        )
    })
}

/// Largest tunnelling exponent accepted by [`check_representable`]: `e^{−700} ≈ 10⁻³⁰⁴`, the
/// edge of double precision.
pub const MAX_TUNNELLING_EXPONENT: f64 = 700.0;

/// The PPT tunnelling exponent `(2κ³/3F) g(γ)` of a channel of ionization potential `ip` in a
/// field of peak strength `f` and frequency `omega` (A. M. Perelomov, V. S. Popov,
/// M. V. Terent'ev, Sov. Phys. JETP 23, 924 (1966); [`crate::tunnelling::ppt_g`]): the
/// ionization probability is `∝ e^{−exponent}`.
pub fn tunnelling_exponent(ip: f64, f: f64, omega: f64) -> f64 {
    let kappa = (2.0 * ip).sqrt();
    let gamma = omega * kappa / f;
    let g = crate::tunnelling::ppt_g(gamma).unwrap_or(f64::INFINITY);
    2.0 * kappa.powi(3) / (3.0 * f) * g
}

/// An error when a channel's ionization amplitude would underflow double precision: its PPT
/// tunnelling exponent exceeds [`MAX_TUNNELLING_EXPONENT`]. No harmonic of such a channel is
/// representable (its amplitude is below 10⁻³⁰⁴ and its products overflow or vanish), so the
/// run is refused rather than filled with zeros or non-finite numbers.
pub fn check_representable(field: &Field, channels: &[ChannelIp]) -> crate::Result<()> {
    let f = scan_field(field, &[]).peak_field;
    for c in channels {
        let x = tunnelling_exponent(c.ip, f, field.omega());
        if x.is_nan() || x > MAX_TUNNELLING_EXPONENT {
            return Err(crate::Error::Inconsistent(format!(
                "channel {} (Ip {}) in a peak field of {f:.4e} a.u.: the tunnelling exponent \
                 (2κ³/3F)·g(γ) = {x:.4e} exceeds {MAX_TUNNELLING_EXPONENT}, so its ionization \
                 amplitude (e^-{x:.3e}) is below what double precision holds: no harmonic of \
                 this channel is computable (raise the intensity, or check the Ip)",
                c.label,
                ev(c.ip)
            )));
        }
    }
    Ok(())
}

/// Orders of a sorted list of photon energies as a range text, e.g. `H9–H11 (3 energies)`.
fn order_range(energies: &[f64], omega: f64) -> String {
    match energies {
        [] => String::new(),
        [e] => format!("H{:.2}", e / omega),
        [first, .., last] => format!(
            "H{:.2}–H{:.2} ({} energies)",
            first / omega,
            last / omega,
            energies.len()
        ),
    }
}

/// `near-threshold`: photon energies (a.u.) of the grid below the highest channel Ip, or less
/// than one photon (ω of the first colour) above a channel's Ip.
pub fn grid_warnings(field: &Field, channels: &[ChannelIp], energies: &[f64]) -> Vec<Warning> {
    let omega = field.omega();
    let mut sorted: Vec<f64> = energies.iter().copied().filter(|e| e.is_finite()).collect();
    sorted.sort_by(f64::total_cmp);
    let mut parts = Vec::new();
    let mut first_good: f64 = 0.0;
    for c in channels {
        let below: Vec<f64> = sorted.iter().copied().filter(|&e| e < c.ip).collect();
        let near: Vec<f64> = sorted
            .iter()
            .copied()
            .filter(|&e| e >= c.ip && e < c.ip + omega)
            .collect();
        if !below.is_empty() {
            parts.push(format!(
                "{} below the ionization potential of channel {} ({}: nothing recombines into \
                 it there)",
                order_range(&below, omega),
                c.label,
                ev(c.ip)
            ));
        }
        if !near.is_empty() {
            parts.push(format!(
                "{} within one photon above the threshold of channel {}",
                order_range(&near, omega),
                c.label
            ));
        }
        if !below.is_empty() || !near.is_empty() {
            first_good = first_good.max(c.ip + omega);
        }
    }
    if parts.is_empty() {
        return Vec::new();
    }
    vec![Warning::new(
        WarningKind::NearThreshold,
        format!(
            "{}; near threshold the plane-wave continuum ignores the Coulomb attraction of the ion",
            parts.join("; ")
        ),
        format!(
            "read the spectrum from H{:.1} ({}) up, where every channel is more than one photon \
             above its threshold",
            first_good / omega,
            ev(first_good)
        ),
    )]
}
