//! Molecular orientation: Euler rotations, orientation quadrature grids and alignment
//! distributions (DESIGN.md §4.7; physics notes §6.2).
//!
//! # Conventions
//!
//! - **Euler angles `(α, β, γ)`, ZYZ, active, molecular frame → lab frame:**
//!   `R(α, β, γ) = R_z(α) R_y(β) R_z(γ)` and `v_lab = R v_mol` ([`euler_rotation`]). The molecular
//!   `z` axis points along `(sin β cos α, sin β sin α, cos β)` in the lab; `β` is the angle between
//!   the molecular axis and the lab `z` axis, which is the polarisation direction of the driving
//!   field and of the aligning pulse.
//! - **Measure:** the isotropic orientation average is
//!   `⟨f⟩ = (1/8π²) ∫_0^{2π} dα ∫_0^π sin β dβ ∫_0^{2π} dγ f(R(α, β, γ))` (Haar measure on SO(3)).
//!   The grids ([`OrientationGrid`]) discretise it with Gauss–Legendre nodes in `cos β` and the
//!   periodic trapezoidal rule in `α` and `γ`, weights summing to 1.
//! - **Alignment:** a distribution `ρ(β)` of the molecular axis about the lab `z` axis
//!   ([`AlignmentDistribution`]), normalised as `∫ ρ dΩ = 2π ∫_0^π ρ(β) sin β dβ = 1`.
//!   [`AlignmentGrid::weighted`] turns a grid into weights `w_i ∝ ρ(β_i) × (grid weight)`,
//!   `Σ w_i = 1`.
//! - **Coherent averaging:** the harmonic fields of the molecules add coherently, so the averaged
//!   dipole is `D(Ω) = Σ_i w_i D(Ω; R_i)` and the spectrum is `|D|²` (physics notes §6.2). The
//!   weights are *amplitude* weights: they multiply the complex dipole of each orientation, and
//!   they are the probabilities of the orientation cells (not their square roots).

mod alignment;
mod euler;
mod exp_cos2;
mod grid;
mod monotone_cubic;
mod panel_quadrature;

pub use alignment::{AlignmentDescription, AlignmentDistribution};
pub use euler::{Orientation, euler_angles, euler_rotation};
pub use exp_cos2::{exp_cos2_mean_cos2, exp_cos2_strength};
pub use grid::{
    AlignmentGrid, MAX_GRID_ORIENTATIONS, OrientationGrid, full_grid, linear_molecule_grid,
};

use crate::special::gauss_legendre::QuadratureError;
use thiserror::Error;

/// Errors from building orientation grids and alignment distributions. Each message names the
/// parameter (the key of the target file where there is one), the value and the reason.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum OrientationError {
    /// A grid size is zero.
    #[error("orientation grid `{name}` = 0: must be at least 1")]
    GridSizeZero {
        /// Name of the size parameter (`n_beta`, `n_alpha`, `n_gamma`).
        name: &'static str,
    },
    /// The grid would hold more orientations than [`MAX_GRID_ORIENTATIONS`].
    #[error(
        "orientation grid n_beta × n_alpha × n_gamma = {n_beta} × {n_alpha} × {n_gamma}: more than \
         the supported {max} orientations"
    )]
    GridTooLarge {
        /// Number of β nodes.
        n_beta: usize,
        /// Number of α nodes.
        n_alpha: usize,
        /// Number of γ nodes.
        n_gamma: usize,
        /// Largest supported number of orientations.
        max: usize,
    },
    /// The Gauss–Legendre rule in `cos β` could not be built.
    #[error("orientation grid `n_beta` = {n_beta}: {source}")]
    BetaRule {
        /// Number of β nodes.
        n_beta: usize,
        /// Why the rule failed.
        #[source]
        source: QuadratureError,
    },
    /// A scalar parameter of an alignment model is out of range.
    #[error("alignment `{key}` = {value}: {reason}")]
    InvalidParameter {
        /// Key of the parameter.
        key: &'static str,
        /// Value given.
        value: f64,
        /// What is required.
        reason: &'static str,
    },
    /// `beta_deg` and `density` have different lengths.
    #[error(
        "alignment table: `beta_deg` has {beta_len} entries but `density` has {density_len}; \
         they must have the same length"
    )]
    TableLengthMismatch {
        /// Length of `beta_deg`.
        beta_len: usize,
        /// Length of `density`.
        density_len: usize,
    },
    /// Fewer than two table points.
    #[error("alignment table: {len} point(s) given; at least 2 are needed")]
    TableTooShort {
        /// Number of points given.
        len: usize,
    },
    /// One table entry is not acceptable.
    #[error("alignment table `{key}`[{index}] = {value}: {reason}")]
    TableEntry {
        /// `beta_deg` or `density`.
        key: &'static str,
        /// Position in the list.
        index: usize,
        /// Value given.
        value: f64,
        /// What is required.
        reason: &'static str,
    },
    /// The table does not span `[0°, 180°]`.
    #[error(
        "alignment table `beta_deg` runs from {first} to {last} degrees: it must start at 0 and \
         end at 180"
    )]
    TableRange {
        /// First angle given.
        first: f64,
        /// Last angle given.
        last: f64,
    },
    /// Every density value is zero.
    #[error(
        "alignment table `density`: all {len} entries are zero; the distribution cannot be normalised"
    )]
    TableAllZero {
        /// Number of entries.
        len: usize,
    },
    /// The distribution is zero at every β node of the grid, so no weights can be formed.
    #[error(
        "alignment distribution is zero at all {n_beta} β nodes of the orientation grid: use a \
         finer grid (larger `n_beta`) or a broader distribution"
    )]
    VanishesOnGrid {
        /// Number of β nodes of the grid.
        n_beta: usize,
    },
    /// The root finder for the exp_cos2 strength failed (not expected for any valid target).
    #[error(
        "alignment `mean_cos2` = {mean_cos2}: no exp_cos2 strength found (bracket [{lower}, \
         {upper}] after {iterations} iterations)"
    )]
    StrengthNotFound {
        /// Target ⟨cos²β⟩.
        mean_cos2: f64,
        /// Lower end of the last bracket.
        lower: f64,
        /// Upper end of the last bracket.
        upper: f64,
        /// Iterations used.
        iterations: usize,
    },
}
