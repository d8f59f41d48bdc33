//! The orientation-independent continuum kernel of the time-domain dipole on the lattice.
//!
//! For birth row `i` and excursion column `k` (`t_i = t₀ + ih`, `τ = kh`, `t = t_i + τ`):
//!
//! ```text
//! K₀(i, k) = (−i) · h · W(τ) · χ(t_i) · e^{−i S_kin(t, t_i)},
//! S_kin = ∫_{t_i}^{t} ½ (p_s + A)² dt' = −|∫A|²/(2τ) + ½ ∫A·A,   p_s = −(1/τ) ∫_{t_i}^{t} A dt',
//! ```
//!
//! the same closed form of the action as [`crate::orbits::equations::evaluate`] (M. Lewenstein
//! et al., PRA 49, 2117 (1994)), here at real times. `h` is the trapezoidal weight of the τ
//! integral (the window vanishes at both ends, so every weight is `h`), `W` the excursion window
//! and `χ` the birth partition ([`super::window`]). The momentum integral (the spreading factor
//! `(2π/(ε + iτ))^{3/2}` of the shortcut, or the exact Gaussian moment of
//! [`crate::momentum`]) is applied per point by the assembly; [`column_spreading`] holds the
//! shortcut's factor per column, on the principal branch as [`crate::dipole`] takes it (for real
//! `τ > 0` far from the cut). The channel phases
//! `e^{−iIp_m t + iIp_n t_i}` are kept apart (they depend on the channel pair only through one
//! factor per time) and applied by the assembly.

use num_complex::Complex64;
use rayon::prelude::*;

use super::lattice::Lattice;

/// `K₀(i, k)` for every row and column, row-major (`rows × columns`); rows with `χ = 0` are zero.
pub(super) fn continuum_kernel(lattice: &Lattice) -> Vec<Complex64> {
    let cols = lattice.columns();
    let h = lattice.step;
    // Orientation- and row-independent factor of each column: (−i) h W(τ).
    let column: Vec<Complex64> = lattice
        .window
        .iter()
        .map(|&w| Complex64::new(0.0, -h * w))
        .collect();
    let mut out = vec![Complex64::new(0.0, 0.0); lattice.rows * cols];
    out.par_chunks_mut(cols).enumerate().for_each(|(i, row)| {
        let chi = lattice.birth_weight[i];
        if chi == 0.0 {
            return;
        }
        let fi = &lattice.field[i];
        for (c, slot) in row.iter_mut().enumerate() {
            let k = lattice.k_first + c;
            let fj = &lattice.field[i + k];
            let tau = k as f64 * h;
            let int_a = fj.int_a - fi.int_a;
            let s_kin = -0.5 * int_a.norm_squared() / tau + 0.5 * (fj.int_a2 - fi.int_a2);
            *slot = column[c] * (chi * Complex64::cis(-s_kin));
        }
    });
    out
}

/// `ρ = ε + iτ` of every column (the argument of the momentum integral).
pub(super) fn column_rho(lattice: &Lattice, epsilon: f64) -> Vec<Complex64> {
    (0..lattice.columns())
        .map(|c| Complex64::new(epsilon, (lattice.k_first + c) as f64 * lattice.step))
        .collect()
}

/// The shortcut's spreading factor `(2π/(ε + iτ))^{3/2}` of every column.
pub(super) fn column_spreading(rho: &[Complex64]) -> Vec<Complex64> {
    rho.iter()
        .map(|&r| crate::momentum::stationary_spreading(r))
        .collect()
}
