//! The intensity grid of the focal-volume average: Gauss–Radau in `ln I`, fixed node at the
//! medium's peak intensity.
//!
//! The incoherent yield is `S(Ω) = n ∫_{x_min}^{x_max} |dV/dx| |D(Ω; x I₀)|² dx`. In
//! `u = ln(x/x_max)` the weight `x |dV/dx|` is flat for a thin slab and varies as a power for
//! the other media, while `|D|²` of a plateau harmonic grows roughly as a power of I and turns on
//! steeply where the harmonic enters the plateau; a rule in `u` therefore treats all intensities
//! alike. Gauss–Radau (the `n`-point rule with one node fixed at an end; exact for polynomials of
//! degree `2n − 2`; M. Abramowitz, I. A. Stegun, *Handbook of Mathematical Functions*, 25.4.31,
//! from memory) puts that node at `x_max`, where the highest harmonics are made: with one sample
//! the average is the single-molecule spectrum at the medium's peak intensity, which is the
//! thin-slab limit. Where the density vanishes at the peak as a square root (the unbounded
//! medium, a slab that contains the focus: the volume above `x` shrinks to the focal point), a
//! Radau rule in `u` converges only algebraically (measured: error ∝ N⁻³); there the rule is
//! Gauss–Legendre in `v = sqrt(−u)`, which makes the integrand smooth (`du = −2v dv` cancels
//! the `sqrt(−u)`). A slab that contains the focus keeps kinks where the volume above `x`
//! reaches its edges (algebraic convergence, measured in docs/detection.md). The lower end
//! `x_min = f·x_max` (the user's fraction `f`) truncates the integral; the share of the lowest
//! sample is reported ([`super::incoherent::VolumeAverage::lowest_sample_share`]).
//!
//! Nodes on `[−1, 1]` with the fixed node at `−1`: the other `n − 1` are the zeros of
//! `(P_{n−1}(x) + P_n(x))/(1 + x)`; weights `2/n²` at `−1` and `(1 − x_i)/(n² P_{n−1}(x_i)²)`
//! elsewhere (same source). Found by Newton's method from the Chebyshev–Radau points
//! `−cos(2πk/(2n − 1))`; checked against the closed forms for n = 2, 3 and polynomial exactness
//! in the tests.

use super::beam::GaussianBeam;
use super::volume::Medium;
use crate::error::{Error, Result};

/// Largest number of intensity samples accepted (each sample is a full single-molecule run).
pub const MAX_SAMPLES: usize = 256;

/// `P_{n−1}(x)` and `P_n(x)` by the three-term recurrence (DLMF Table 18.9.1).
fn legendre_pair(n: usize, x: f64) -> (f64, f64) {
    let (mut p0, mut p1) = (1.0, x);
    if n == 0 {
        return (0.0, 1.0);
    }
    for k in 1..n {
        let p2 = ((2 * k + 1) as f64 * x * p1 - k as f64 * p0) / (k + 1) as f64;
        p0 = p1;
        p1 = p2;
    }
    (p0, p1)
}

/// The `n`-point Gauss–Radau rule on `[−1, 1]` with the node `−1` fixed: `(nodes, weights)`,
/// nodes ascending (the first is `−1`).
///
/// # Errors
/// `n = 0`, `n >` [`MAX_SAMPLES`], or a node that Newton's method does not converge to.
pub fn gauss_radau(n: usize) -> Result<(Vec<f64>, Vec<f64>)> {
    if n == 0 || n > MAX_SAMPLES {
        return Err(Error::invalid(
            "number of intensity samples",
            n,
            &format!("must be between 1 and {MAX_SAMPLES}"),
        ));
    }
    let nf = n as f64;
    let mut nodes = vec![-1.0];
    let mut weights = vec![2.0 / (nf * nf)];
    for k in 1..n {
        let mut x = -(2.0 * std::f64::consts::PI * k as f64 / (2.0 * nf - 1.0)).cos();
        let mut converged = false;
        for _ in 0..100 {
            // f = P_{n−1} + P_n; derivative from (1 − x²) P_m' = m (P_{m−1} − x P_m).
            let (a, b) = legendre_pair(n, x);
            let (c, _) = legendre_pair(n - 1, x);
            let f = a + b;
            let da = (nf - 1.0) * (c - x * a) / (1.0 - x * x);
            let db = nf * (a - x * b) / (1.0 - x * x);
            let step = f / (da + db);
            x -= step;
            if step.abs() < 1e-15 {
                converged = true;
                break;
            }
        }
        if !converged || !x.is_finite() || x <= -1.0 || x >= 1.0 {
            return Err(Error::Numerical(format!(
                "Gauss–Radau node {k} of {n} did not converge"
            )));
        }
        let (a, _) = legendre_pair(n, x);
        nodes.push(x);
        weights.push((1.0 - x) / (nf * nf * a * a));
    }
    Ok((nodes, weights))
}

/// The user's intensity rule.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct IntensityRule {
    /// Number of samples (single-molecule runs).
    pub samples: usize,
    /// Lowest sampled intensity as a fraction of the medium's peak, in (0, 1).
    pub lowest_fraction: f64,
}

impl Default for IntensityRule {
    /// 16 samples down to a tenth of the peak (convergence measured in docs/detection.md).
    fn default() -> Self {
        IntensityRule {
            samples: 16,
            lowest_fraction: 0.1,
        }
    }
}

/// One intensity sample of the focal-volume average.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct IntensitySample {
    /// Intensity relative to the beam's peak `I₀`.
    pub relative: f64,
    /// Quadrature weight: `w_i (Δu/2) x_i |dV/dx|(x_i)` (bohr³), so that
    /// `Σ weight·f(x_i) ≈ ∫ |dV/dx| f(x) dx` over `[x_min, x_max]`.
    pub weight: f64,
}

/// The samples of `rule` for `medium` in `beam`, highest intensity first (rule in the module
/// documentation).
///
/// # Errors
/// An invalid rule (sample count, fraction outside (0, 1)) or medium.
pub fn intensity_samples(
    beam: &GaussianBeam,
    medium: &Medium,
    rule: &IntensityRule,
) -> Result<Vec<IntensitySample>> {
    medium.validate()?;
    let f = rule.lowest_fraction;
    if !(f > 0.0 && f < 1.0) {
        return Err(Error::invalid(
            "lowest intensity fraction",
            f,
            "must lie strictly between 0 and 1",
        ));
    }
    let top = medium.peak(beam);
    let span = -f.ln(); // u = ln(x/x_max) runs from −span (x_min) to 0 (x_max)
    if medium.density(beam, top) > 0.0 {
        // Finite density at the peak: Gauss–Radau in u, fixed node at u = 0.
        let (nodes, weights) = gauss_radau(rule.samples)?;
        Ok(nodes
            .iter()
            .zip(&weights)
            .map(|(&t, &w)| {
                // t = −1 ↦ u = 0 (peak), t = +1 ↦ u = −span.
                let u = -0.5 * (1.0 + t) * span;
                let x = top * u.exp();
                IntensitySample {
                    relative: x,
                    weight: w * 0.5 * span * x * medium.density(beam, x),
                }
            })
            .collect())
    } else {
        // Square-root edge at the peak: Gauss–Legendre in v = sqrt(−u).
        let (nodes, weights) =
            crate::special::gauss_legendre::gauss_legendre_interval(rule.samples, 0.0, span.sqrt())
                .map_err(|e| Error::Numerical(format!("intensity rule: {e}")))?;
        Ok(nodes
            .iter()
            .zip(&weights)
            .map(|(&v, &w)| {
                let x = top * (-v * v).exp();
                IntensitySample {
                    relative: x,
                    weight: w * 2.0 * v * x * medium.density(beam, x),
                }
            })
            .collect())
    }
}
