//! The Euler Gamma function Γ(x) of a real argument and ln Γ(x) for x > 0.
//!
//! Method (DLMF §5.11, Eq. 5.11.1, and the recurrence DLMF 5.5.1): for `y ≥ 12` the Stirling
//! series
//!
//! `ln Γ(y) = (y − ½) ln y − y + ½ ln 2π + Σ_{k=1}^{8} B_{2k} / (2k (2k − 1) y^{2k−1})`
//!
//! with the Bernoulli numbers `B_{2k}` (DLMF §24.2) is truncated after eight terms; the first
//! omitted term is below 1e-19 for `y ≥ 12`. Smaller positive arguments are shifted up with
//! `Γ(x) = Γ(x + N) / (x (x + 1) ⋯ (x + N − 1))`; negative non-integer arguments use the
//! reflection formula `Γ(x) Γ(1 − x) = π / sin(πx)` (DLMF 5.5.3). The power `y^{y−½}` is
//! evaluated with `powf` (not `exp(… ln y)`) so that no large logarithm is rounded: the
//! relative error of `gamma_function` is a few units in the last place over its whole range
//! (measured ≤ 2e-15 against mpmath 1.3.0 on 27 points in [−180.5, 171.6], see
//! `tests/tunnelling.rs`).

use super::TunnellingError;

/// Stirling-series coefficients `B_{2k} / (2k (2k − 1))`, k = 1…8 (DLMF 5.11.1, 24.2).
const STIRLING_COEFFICIENTS: [f64; 8] = [
    1.0 / 12.0,
    -1.0 / 360.0,
    1.0 / 1260.0,
    -1.0 / 1680.0,
    1.0 / 1188.0,
    -691.0 / 360_360.0,
    1.0 / 156.0,
    -3617.0 / 122_400.0,
];

/// Arguments at or above this value use the Stirling series directly.
const STIRLING_THRESHOLD: f64 = 12.0;

/// `√(2π)`.
const SQRT_TWO_PI: f64 = 2.506_628_274_631_000_5;

/// `½ ln(2π)`.
const HALF_LN_TWO_PI: f64 = 0.918_938_533_204_672_8;

/// Stirling correction `Σ B_{2k}/(2k(2k−1) y^{2k−1})` for `y ≥ 12`.
fn stirling_correction(y: f64) -> f64 {
    let inv = 1.0 / y;
    let inv2 = inv * inv;
    let mut sum = 0.0;
    for &c in STIRLING_COEFFICIENTS.iter().rev() {
        sum = sum * inv2 + c;
    }
    sum * inv
}

/// Γ(y) for `y ≥ 12` (may overflow to +∞ above y ≈ 171.6).
fn gamma_large(y: f64) -> f64 {
    // y^{y − ½} = t², t = y^{y/2 − 1/4}; multiply e^{−y} in between to avoid overflow.
    let t = y.powf(0.5 * y - 0.25);
    let correction = stirling_correction(y).exp();
    (t * (-y).exp()) * t * (SQRT_TWO_PI * correction)
}

/// Γ(x) for finite `x > 0` (may overflow to +∞).
fn gamma_positive(x: f64) -> f64 {
    let mut y = x;
    let mut denominator = 1.0;
    while y < STIRLING_THRESHOLD {
        denominator *= y;
        y += 1.0;
    }
    gamma_large(y) / denominator
}

/// `sin(π x)` with the argument reduced exactly to `[−½, ½]` first, so that it vanishes exactly
/// at the integers and keeps full relative accuracy near them.
fn sin_pi(x: f64) -> f64 {
    // r = x − 2k ∈ [−1, 1], exact in floating point.
    let r = x - 2.0 * (0.5 * x).round();
    let s = if r > 0.5 {
        1.0 - r
    } else if r < -0.5 {
        -1.0 - r
    } else {
        r
    };
    (std::f64::consts::PI * s).sin()
}

/// ln Γ(y) for `y ≥ 12` by the Stirling series (DLMF 5.11.1).
fn ln_gamma_large(y: f64) -> f64 {
    (y - 0.5) * y.ln() - y + HALF_LN_TWO_PI + stirling_correction(y)
}

/// The Gamma function Γ(x) of a real argument (DLMF §5.2.1).
///
/// Valid for every finite `x` except the poles `0, −1, −2, …`; relative accuracy a few units in
/// the last place (measured ≤ 2e-15) where the result is representable. Above `x ≈ 171.62` Γ(x) exceeds
/// the largest `f64` and an error is returned; for large negative `x` the result underflows
/// gracefully towards zero (with the correct sign).
///
/// Method: Stirling series with upward recurrence for `x > 0`, reflection for `x < 0`
/// (see the module documentation).
///
/// # Errors
/// [`TunnellingError::InvalidValue`] for a non-finite `x`, a pole (`x` a non-positive integer)
/// or an overflowing result.
pub fn gamma_function(x: f64) -> Result<f64, TunnellingError> {
    if !x.is_finite() {
        return Err(TunnellingError::invalid(
            "x",
            x,
            "the Gamma function needs a finite argument",
        ));
    }
    if x <= 0.0 && x == x.round() {
        return Err(TunnellingError::invalid(
            "x",
            x,
            "the Gamma function has a pole at every non-positive integer",
        ));
    }
    let value = if x > 0.0 {
        gamma_positive(x)
    } else {
        // Γ(x) = π / (sin(πx) Γ(1 − x)), with 1 − x > 1.
        let reflected = 1.0 - x;
        let sine = sin_pi(x);
        let g = gamma_positive(reflected);
        if g.is_finite() {
            std::f64::consts::PI / (sine * g)
        } else {
            // Γ(1 − x) overflows: go through logarithms; the result is tiny.
            let ln_abs = std::f64::consts::PI.ln() - sine.abs().ln() - ln_gamma_large(reflected);
            ln_abs.exp().copysign(sine)
        }
    };
    if !value.is_finite() {
        return Err(TunnellingError::invalid(
            "x",
            x,
            "Γ(x) exceeds the largest f64 (x must be below about 171.62)",
        ));
    }
    Ok(value)
}

/// Natural logarithm of the Gamma function, `ln Γ(x)`, for finite `x > 0` (DLMF §5.2.1, 5.11.1).
///
/// For `x ≤ 171` it is `ln` of [`gamma_function`] (relative accuracy of Γ carries over as an
/// absolute accuracy ≈ 1e-15 of ln Γ, so near the zeros of ln Γ at x = 1 and x = 2 the
/// *relative* accuracy is lower); above that the Stirling series is used directly, with
/// relative accuracy ≈ 1e-16.
///
/// # Errors
/// [`TunnellingError::InvalidValue`] if `x` is not finite or not positive.
pub fn ln_gamma_function(x: f64) -> Result<f64, TunnellingError> {
    if !x.is_finite() || x <= 0.0 {
        return Err(TunnellingError::invalid(
            "x",
            x,
            "ln Γ(x) is implemented for finite positive arguments only",
        ));
    }
    if x <= 171.0 {
        Ok(gamma_positive(x).ln())
    } else {
        Ok(ln_gamma_large(x))
    }
}
