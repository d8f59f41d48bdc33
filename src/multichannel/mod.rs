//! The multichannel harmonic dipole of a molecule, averaged over orientations, with the hole
//! dynamics it encodes.
//!
//! For a molecule with ionic channels `n = 1…N` the dipole is a coherent sum over channel pairs
//! and quantum orbits (O. Smirnova et al., Nature 460, 972 (2009); physics notes §4.1–§4.2):
//!
//! ```text
//! D(Ω) = Σ_R w_R Σ_{m,n} Σ_s K_s^{mn} · R d̄_m(Rᵀv_r) · [U_I(t_r, t_i)]_mn · a_n(Rᵀv_i, Rᵀ E_i)
//! ```
//!
//! with `K_s^{mn}` the continuum kernel of saddle `s` of pair `n → m` (ionize into `n`, recombine
//! into `m`; [`crate::dipole`]), `U_I` the hole propagator in the interaction picture at the
//! complex saddle times ([`crate::hole`]; [`HoleContour`] selects the real-time shortcut
//! `U_I(Re t_r, Re t_i)` instead), `d̄_m` and `a_n` the structure models
//! ([`crate::recombination`], [`crate::ionization`]) evaluated in the molecular frame, and `w_R`
//! the orientation weights (alignment distribution × quadrature; the harmonic field adds
//! coherently over orientations).
//!
//! **Structure in the phase.** For Gaussian-type models (`gaussian`, `orbital`, `lcao`) the
//! Gaussian and centre factors of a side can be taken into the phase
//! ([`StructurePlacement::Phase`]; [`crate::orbits::equations`], [`crate::momentum`]): every
//! shell of that side then has its own saddles, which depend on the orientation through the
//! lab-frame centres; the polynomial parts of the shells stay in the prefactor as exact Gaussian
//! moments. A side left in the prefactor is evaluated at the saddle's momenta, as above.
//!
//! The work splits as DESIGN §2 asks: [`trajectory_stage`] solves one orbit table per coupled
//! channel pair (pairs with equal energies share a table) and computes the kernels once;
//! [`assemble`] groups the orientations into classes that see the same molecule-frame physics
//! (for a linearly polarised field, those with the same field direction `Rᵀê` in the molecular
//! frame: the Euler angle about the field drops out), computes each class once — structured
//! saddles, hole propagators, prefactors — and adds it, rotated, for every orientation of the
//! class. Classes run in parallel (rayon) over fixed chunks whose partial sums are added in chunk
//! order, so the result does not depend on the number of threads. Channel pairs that no coupling
//! connects carry `U_mn = 0` and are not solved.

mod assemble;
mod classes;
mod holes;
mod refine;
mod stage;
mod terms;

pub use assemble::{
    HoleDensity, HoleSample, MultichannelSpectrum, PairSpectrum, assemble, assemble_serial,
    orientations,
};
pub use refine::{REFINE_STEP, refine_group_delays};
pub use stage::{
    ChannelStructure, PairStage, TrajectoryStage, coupling_components, propagation_needed,
    trajectory_stage,
};

use serde::Serialize;

use crate::dipole::SaddleSum;
use crate::hole::DEFAULT_MAX_STEP;
pub use crate::hole::HoleContour;
use crate::orbits::OrbitSettings;
pub use crate::spectrum::GroupDelays;

/// Where the Gaussian structure factors of one side (ionization or recombination) go.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum StructurePlacement {
    /// Into the phase of the saddle problem, shell by shell (Gaussian-type models only; other
    /// models stay in the prefactor).
    Phase,
    /// In the prefactor, evaluated at the saddle (the plain saddle-point treatment).
    Prefactor,
    /// For the recombination side: into the phase where the ionizing channel's Gaussian is in
    /// the phase too, in the prefactor otherwise. Measured against the exact quadrature
    /// (docs/validation.md), the recombination Gaussian in the phase improves the dipole only
    /// together with the ionization one (a Gaussian atom with α = 0.27 at 1200 nm, 3×10¹⁴ W/cm²:
    /// short-orbit |D|² off by 0.266 decades with the recombination side alone in the phase,
    /// 0.248 with neither, 0.030 with the ionization side alone, 0.005 with both). For the
    /// ionization side it means the same as `Phase`.
    Auto,
}

/// How far the saddle-point expansion goes for the hole propagator, which varies across each
/// saddle (the laser moves the hole on the time scale of the saddle's width).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum HoleExpansion {
    /// `U_I` at the saddle only (the plain saddle-point treatment).
    Leading,
    /// Plus the next-order terms of `U_I` ([`crate::orbits::expansion`]): its curvature across
    /// the saddle and its slope against the skew of the phase, the spreading factor and the
    /// structure prefactor. Only with the hole at complex times; switched off smoothly near a
    /// caustic. Measured against the exact quadrature at 1200 nm, 2×10¹⁴ W/cm²
    /// (tests/validation.rs): three channels with structure-free models and couplings that
    /// move the hole, plateau rms of log₁₀|D|² 0.096 decade at leading order, 0.011 with these
    /// terms; the coupled diatomic along the field, 0.107 and 0.027 (docs/validation.md for all
    /// cases).
    NextOrder,
}

/// The spectrum of `target` in `field` at photon energies `energies` (a.u.): the trajectory
/// stage and the orientation-averaged assembly in one call (the factorised linear-field path
/// as set in `settings`; no progress reports). One-channel atoms use it too
/// ([`crate::target::Target::one_channel`]).
///
/// # Errors
/// Those of [`trajectory_stage`] and [`assemble`].
///
/// Group delays the grid does not resolve are recomputed by difference
/// ([`refine_group_delays`]).
pub fn spectrum(
    field: &crate::field::Field,
    target: &crate::target::Target,
    energies: &[f64],
    settings: &MultichannelSettings,
) -> crate::error::Result<MultichannelSpectrum> {
    let stage = trajectory_stage(field, target, energies, settings)?;
    let mut s = assemble(field, target, &stage, settings.linear_fast_path, &|_, _| {})?;
    refine_group_delays(field, target, settings, settings.linear_fast_path, &mut s)?;
    Ok(s)
}

/// Settings of a multichannel calculation.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MultichannelSettings {
    /// Uniform or plain saddle sum.
    pub sum: SaddleSum,
    /// Regulator ε of the spreading factor (0 for saddle-point work).
    pub epsilon: f64,
    /// Trajectory-stage settings.
    pub orbits: OrbitSettings,
    /// How group delays are computed ([`GroupDelays`]; skipped with [`GroupDelays::Skip`]).
    pub group_delays: GroupDelays,
    /// Largest step of the hole propagator grid (a.u.).
    pub hole_step: f64,
    /// Use the factorised structure evaluation for linearly polarised fields (one evaluation per
    /// channel, energy and sign instead of per saddle); `false` forces the per-saddle path.
    pub linear_fast_path: bool,
    /// Where the hole propagator of each saddle is evaluated.
    pub hole_contour: HoleContour,
    /// Where the ionization side's Gaussian structure goes.
    pub ionization_structure: StructurePlacement,
    /// Where the recombination side's Gaussian structure goes.
    pub recombination_structure: StructurePlacement,
    /// Saddle-point order of the hole propagator (with [`HoleContour::Complex`]).
    pub hole_expansion: HoleExpansion,
}

impl Default for MultichannelSettings {
    fn default() -> Self {
        MultichannelSettings {
            sum: SaddleSum::Uniform,
            epsilon: 0.0,
            orbits: OrbitSettings::default(),
            group_delays: GroupDelays::Tangent,
            hole_step: DEFAULT_MAX_STEP,
            linear_fast_path: true,
            hole_contour: HoleContour::Complex,
            ionization_structure: StructurePlacement::Phase,
            recombination_structure: StructurePlacement::Auto,
            hole_expansion: HoleExpansion::NextOrder,
        }
    }
}
