//! Orientation quadrature grids and alignment-weighted grids.

use super::OrientationError;
use super::alignment::AlignmentDistribution;
use super::euler::Orientation;
use crate::special::gauss_legendre::gauss_legendre_angles;
use std::f64::consts::PI;

/// Largest number of orientations a grid may hold (about 100 MB).
pub const MAX_GRID_ORIENTATIONS: usize = 1_000_000;

/// A quadrature rule for the isotropic orientation average, weights summing to 1.
///
/// Two shapes:
/// - [`linear_molecule_grid`]: `β` only (`α = γ = 0`), for a linear molecule in a field linearly
///   polarised along the lab `z` axis;
/// - [`full_grid`]: `β × α × γ`, the product of Gauss–Legendre in `cos β` and the periodic
///   trapezoidal rule in `α` and `γ`.
///
/// Orientations are ordered with `β` ascending, then `α`, then `γ` (innermost): a fixed order, so
/// sums over the grid are deterministic.
#[derive(Debug, Clone, PartialEq)]
pub struct OrientationGrid {
    orientations: Vec<Orientation>,
    n_beta: usize,
    n_alpha: usize,
    n_gamma: usize,
}

/// The `β`-only grid for a linear molecule in a linearly polarised field along the lab `z` axis.
///
/// Nodes: `β_i = arccos x_i` with `x_i` the `n_beta`-point Gauss–Legendre nodes on `[−1, 1]`
/// (β ascending in `(0, π)`), `α = γ = 0`. Weights `w_i = W_i / 2` with `W_i` the Gauss–Legendre
/// weights, i.e. the pieces of `∫_0^π sin β dβ / 2`, so `Σ w_i = 1` and `Σ w_i f(β_i)` is the
/// isotropic average of `f(β)`, exact when `f` is a polynomial of degree `≤ 2 n_beta − 1` in
/// `cos β` (DLMF §3.5(v)).
///
/// Use: the component of the dipole **along** the lab `z` axis does not depend on `α` or `γ` for a
/// linear molecule, so this grid averages it exactly as the full grid would. The components across
/// the polarisation average to zero over `α` (axial symmetry), which this grid does not sample:
/// do not sum them over this grid.
///
/// # Errors
/// [`OrientationError::GridSizeZero`] for `n_beta = 0`; [`OrientationError::BetaRule`] above
/// [`crate::special::gauss_legendre::MAX_NODES`].
pub fn linear_molecule_grid(n_beta: usize) -> Result<OrientationGrid, OrientationError> {
    full_grid(n_beta, 1, 1)
}

/// The product grid for the isotropic average over SO(3),
/// `⟨f⟩ = (1/8π²) ∫_0^{2π} dα ∫_0^π sin β dβ ∫_0^{2π} dγ f`.
///
/// `β`: Gauss–Legendre in `cos β` (`n_beta` nodes, as in [`linear_molecule_grid`]); `α_j = 2πj/n_alpha`,
/// `γ_k = 2πk/n_gamma` (trapezoidal rule, exact for `e^{imα}` with `|m| < n_alpha`); weights
/// `W_i / (2 n_alpha n_gamma)`, `Σ w = 1`.
///
/// Exactness: a Wigner function `D^j_{mk}(α, β, γ) = e^{−imα} d^j_{mk}(β) e^{−ikγ}` gets its
/// exact average `δ_{j0}` when `|m| < n_alpha`, `|k| < n_gamma` and, for `m = k = 0` (where
/// `d^j_{00} = P_j(cos β)`), `j ≤ 2 n_beta − 1`. Products of two rotation-matrix entries have
/// `j, |m|, |k| ≤ 2`, so `n_beta ≥ 2`, `n_alpha ≥ 3`, `n_gamma ≥ 3` average them exactly. For smooth `f`
/// the error falls geometrically in each of the three sizes (Gauss–Legendre and the periodic
/// trapezoidal rule for analytic integrands).
///
/// `n_gamma = 1` (only `γ = 0`) is exact only for quantities that do not depend on `γ`, i.e. are
/// invariant under rotation about the molecular `z` axis (linear molecules, or a symmetric top's
/// axial quantities); `n_alpha = n_gamma = 1` is [`linear_molecule_grid`].
///
/// # Errors
/// [`OrientationError::GridSizeZero`] naming the zero size; [`OrientationError::GridTooLarge`]
/// beyond [`MAX_GRID_ORIENTATIONS`]; [`OrientationError::BetaRule`] if the Gauss–Legendre rule
/// cannot be built.
pub fn full_grid(
    n_beta: usize,
    n_alpha: usize,
    n_gamma: usize,
) -> Result<OrientationGrid, OrientationError> {
    for (name, value) in [
        ("n_beta", n_beta),
        ("n_alpha", n_alpha),
        ("n_gamma", n_gamma),
    ] {
        if value == 0 {
            return Err(OrientationError::GridSizeZero { name });
        }
    }
    let total = n_beta
        .checked_mul(n_alpha)
        .and_then(|p| p.checked_mul(n_gamma))
        .filter(|&t| t <= MAX_GRID_ORIENTATIONS);
    let Some(total) = total else {
        return Err(OrientationError::GridTooLarge {
            n_beta,
            n_alpha,
            n_gamma,
            max: MAX_GRID_ORIENTATIONS,
        });
    };
    let (betas, beta_weights) = gauss_legendre_angles(n_beta)
        .map_err(|source| OrientationError::BetaRule { n_beta, source })?;
    let scale = 1.0 / (2.0 * n_alpha as f64 * n_gamma as f64);
    let mut orientations = Vec::with_capacity(total);
    for (&beta, &beta_weight) in betas.iter().zip(&beta_weights) {
        for j in 0..n_alpha {
            let alpha = 2.0 * PI * j as f64 / n_alpha as f64;
            for k in 0..n_gamma {
                let gamma = 2.0 * PI * k as f64 / n_gamma as f64;
                orientations.push(Orientation::new(alpha, beta, gamma, beta_weight * scale));
            }
        }
    }
    Ok(OrientationGrid {
        orientations,
        n_beta,
        n_alpha,
        n_gamma,
    })
}

impl OrientationGrid {
    /// The orientations, in the grid's fixed order.
    #[must_use]
    pub fn orientations(&self) -> &[Orientation] {
        &self.orientations
    }

    /// Number of orientations.
    #[must_use]
    pub fn len(&self) -> usize {
        self.orientations.len()
    }

    /// Whether the grid is empty (never, for a grid built by this module).
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.orientations.is_empty()
    }

    /// `(n_beta, n_alpha, n_gamma)`.
    #[must_use]
    pub fn sizes(&self) -> (usize, usize, usize) {
        (self.n_beta, self.n_alpha, self.n_gamma)
    }

    /// The isotropic average `Σ_i w_i f(orientation_i)`, summed in grid order.
    pub fn average(&self, f: impl FnMut(&Orientation) -> f64) -> f64 {
        weighted_sum(&self.orientations, f)
    }
}

/// A grid whose weights carry an alignment distribution: `w_i ∝ ρ(β_i) × (isotropic grid
/// weight)`, normalised to `Σ w_i = 1`.
///
/// **Amplitude weights.** The harmonic fields of the molecules add coherently (physics notes
/// §6.2), so the ensemble dipole is `D(Ω) = Σ_i w_i D(Ω; R_i)` — the weights multiply complex
/// amplitudes — and the spectrum is formed from that sum afterwards. An incoherent estimate would
/// use the same weights on `|D|²`.
///
/// Normalising the discrete sum (rather than using `∫ρ dΩ = 1`) makes `Σ w_i f_i` the ratio of
/// two quadratures of `∫ ρ f dΩ` and `∫ ρ dΩ`: a constant is reproduced exactly, and the error
/// is that of the grid for the smooth function `ρ f`. A sharply peaked `ρ` needs enough β nodes
/// to resolve its width; compare [`AlignmentGrid::mean_cos2`] with
/// [`AlignmentDistribution::mean_cos2`] to check.
#[derive(Debug, Clone, PartialEq)]
pub struct AlignmentGrid {
    orientations: Vec<Orientation>,
    n_beta: usize,
}

impl AlignmentGrid {
    /// Weights `grid` by the distribution `ρ(β)` (copies the orientations).
    ///
    /// # Errors
    /// [`OrientationError::VanishesOnGrid`] if `ρ(β_i) = 0` at every node (a distribution narrower
    /// than the grid spacing, or a table that is zero wherever the grid looks).
    pub fn weighted(
        grid: &OrientationGrid,
        distribution: &AlignmentDistribution,
    ) -> Result<Self, OrientationError> {
        let mut orientations = grid.orientations.clone();
        let mut total = 0.0;
        for orientation in &mut orientations {
            orientation.weight *= distribution.relative_density(orientation.beta);
            total += orientation.weight;
        }
        if !(total > 0.0 && total.is_finite()) {
            return Err(OrientationError::VanishesOnGrid {
                n_beta: grid.n_beta,
            });
        }
        for orientation in &mut orientations {
            orientation.weight /= total;
        }
        Ok(Self {
            orientations,
            n_beta: grid.n_beta,
        })
    }

    /// The orientations with their amplitude weights, in the grid's order.
    #[must_use]
    pub fn orientations(&self) -> &[Orientation] {
        &self.orientations
    }

    /// Number of orientations.
    #[must_use]
    pub fn len(&self) -> usize {
        self.orientations.len()
    }

    /// Whether the grid is empty (never, for a grid built by this module).
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.orientations.is_empty()
    }

    /// The ensemble average `Σ_i w_i f(orientation_i)`, summed in grid order.
    pub fn average(&self, f: impl FnMut(&Orientation) -> f64) -> f64 {
        weighted_sum(&self.orientations, f)
    }

    /// `⟨cos²β⟩` on the grid, `Σ_i w_i cos²β_i`.
    #[must_use]
    pub fn mean_cos2(&self) -> f64 {
        self.average(|o| {
            let c = o.rotation[(2, 2)];
            c * c
        })
    }
}

fn weighted_sum(orientations: &[Orientation], mut f: impl FnMut(&Orientation) -> f64) -> f64 {
    orientations.iter().map(|o| o.weight * f(o)).sum()
}
