//! Fourier transforms of the time-domain dipole: a direct sum at chosen energies and an FFT on
//! the whole frequency grid.
//!
//! The dipole is known on the lattice `t_j = t₀ + jh`, `j = 0…N−1`, and vanishes smoothly at both
//! ends (birth partition and excursion window), so the rectangle rule
//!
//! ```text
//! D(Ω) = ∫ d(t) e^{iΩt} dt ≈ h Σ_j d(t_j) e^{iΩ t_j}
//! ```
//!
//! is the trapezoidal rule of a smooth compactly supported integrand and converges faster than any
//! power of `h` (for the C^∞ windows) as long as `h` resolves the dipole's frequencies. On the FFT
//! grid `Ω_k = 2πk/(Mh)` (length `M ≥ N`, zero padded) the sum is
//! `D(Ω_k) = h e^{iΩ_k t₀} Σ_j d_j e^{+2πi jk/M}`: an unnormalised *inverse* discrete Fourier
//! transform in the convention of `rustfft` (`X_k = Σ_j x_j e^{+2πi jk/M}`), because the project's
//! transform carries `e^{+iΩt}` (DESIGN §3).

use num_complex::Complex64;
use rustfft::FftPlanner;

use crate::field::CVec3;

/// `h Σ_j d_j e^{iΩ t_j}` at every energy (outer) for one series `d`.
pub(super) fn direct(origin: f64, step: f64, series: &[CVec3], energies: &[f64]) -> Vec<CVec3> {
    energies
        .iter()
        .map(|&omega| {
            let mut sum = CVec3::zeros();
            for (j, d) in series.iter().enumerate() {
                let phase = Complex64::cis(omega * (origin + j as f64 * step));
                sum += d * phase;
            }
            sum * Complex64::new(step, 0.0)
        })
        .collect()
}

/// The FFT of one series on a grid of `length ≥ series.len()` points: `(Ω_k, D(Ω_k))` for
/// `k = 0…length/2` (the non-negative frequencies).
pub(super) fn fft(
    origin: f64,
    step: f64,
    series: &[CVec3],
    length: usize,
) -> (Vec<f64>, Vec<CVec3>) {
    let mut planner = FftPlanner::<f64>::new();
    let plan = planner.plan_fft_inverse(length);
    let half = length / 2 + 1;
    let dw = 2.0 * std::f64::consts::PI / (length as f64 * step);
    let mut out = vec![CVec3::zeros(); half];
    let mut buffer = vec![Complex64::new(0.0, 0.0); length];
    for component in 0..3 {
        for (b, d) in buffer
            .iter_mut()
            .zip(series.iter().chain(std::iter::repeat(&CVec3::zeros())))
        {
            *b = d[component];
        }
        plan.process(&mut buffer);
        for (k, slot) in out.iter_mut().enumerate() {
            let omega = k as f64 * dw;
            slot[component] = buffer[k] * Complex64::cis(omega * origin) * step;
        }
    }
    let frequencies = (0..half).map(|k| k as f64 * dw).collect();
    (frequencies, out)
}
