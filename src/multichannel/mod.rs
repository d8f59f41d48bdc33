//! The multichannel harmonic dipole of a molecule, averaged over orientations, with the hole
//! dynamics it encodes.
//!
//! For a molecule with ionic channels `n = 1…N` the dipole is a coherent sum over channel pairs
//! and quantum orbits (O. Smirnova et al., Nature 460, 972 (2009); physics notes §4.1–§4.2):
//!
//! ```text
//! D(Ω) = Σ_R w_R Σ_{m,n} Σ_s K_s^{mn} · R d̄_m(Rᵀv_r) · [U_I(Re t_r, Re t_i)]_mn · a_n(Rᵀv_i, Rᵀ E_i)
//! ```
//!
//! with `K_s^{mn}` the continuum kernel of saddle `s` of pair `n → m` (ionize into `n`, recombine
//! into `m`; [`crate::dipole`]), `U_I` the hole propagator in the interaction picture
//! ([`crate::hole`]), `d̄_m` and `a_n` the structure models ([`crate::recombination`],
//! [`crate::ionization`]) evaluated in the molecular frame, and `w_R` the orientation weights
//! (alignment distribution × quadrature; the harmonic field adds coherently over orientations).
//!
//! The work splits as DESIGN §2 asks: [`trajectory_stage`] solves one orbit table per coupled
//! channel pair (pairs with equal energies share a table) and computes the kernels once;
//! [`assemble`] runs the orientation loop in parallel (rayon) over fixed chunks whose partial
//! sums are added in chunk order, so the result does not depend on the number of threads.
//! Channel pairs that no coupling connects carry `U_mn = 0` and are not solved.

mod assemble;
mod holes;
mod stage;

pub use assemble::{
    HoleDensity, HoleSample, MultichannelSpectrum, PairSpectrum, assemble, assemble_serial,
    orientations,
};
pub use stage::{
    PairStage, TrajectoryStage, coupling_components, propagation_needed, trajectory_stage,
};

use crate::dipole::SaddleSum;
use crate::hole::DEFAULT_MAX_STEP;
use crate::orbits::OrbitSettings;

/// Settings of a multichannel calculation.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MultichannelSettings {
    /// Uniform or plain saddle sum.
    pub sum: SaddleSum,
    /// Regulator ε of the spreading factor (0 for saddle-point work).
    pub epsilon: f64,
    /// Trajectory-stage settings.
    pub orbits: OrbitSettings,
    /// Half-width δ of the group-delay difference, as a fraction of ω; `None` skips group delays.
    pub group_delay_step: Option<f64>,
    /// Largest step of the hole propagator grid (a.u.).
    pub hole_step: f64,
    /// Use the factorised structure evaluation for linearly polarised fields (one evaluation per
    /// channel, energy and sign instead of per saddle); `false` forces the per-saddle path.
    pub linear_fast_path: bool,
}

impl Default for MultichannelSettings {
    fn default() -> Self {
        MultichannelSettings {
            sum: SaddleSum::Uniform,
            epsilon: 0.0,
            orbits: OrbitSettings::default(),
            group_delay_step: Some(1e-3),
            hole_step: DEFAULT_MAX_STEP,
            linear_fast_path: true,
        }
    }
}
