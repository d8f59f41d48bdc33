//! Smooth windows of the quadrature: the excursion-time window `W(τ)` and the birth-time
//! partition `χ(t_i)` of a periodic field.
//!
//! Both are built from a monotone step `s(x)` that is 0 for `x ≤ 0`, 1 for `x ≥ 1` and satisfies
//! `s(x) + s(1 − x) = 1` (so two overlapping copies add up to one exactly):
//!
//! * [`WindowShape::Cosine`]: `s(x) = sin²(πx/2)`, continuous with its first derivative only
//!   (the second derivative jumps at the ends of the ramp). With the ramp ends on the time
//!   lattice the trapezoidal rule then converges as `h⁴` (Euler–Maclaurin: the first odd
//!   derivative of the integrand that jumps is the third; DLMF §2.10(i)); off the lattice the
//!   jump of the second derivative gives `h³`.
//! * [`WindowShape::Smooth`]: `s(x) = e^{−1/x} / (e^{−1/x} + e^{−1/(1−x)})`, the standard
//!   C^∞ step of partitions of unity (common practice in analysis, e.g. L. Hörmander, *The
//!   Analysis of Linear Partial Differential Operators I*, §1.4; from memory). Every derivative
//!   vanishes at both ends of the ramp, so the trapezoidal rule converges faster than any power
//!   of `h` and the window's edges add no algebraic tail to the spectrum.

use serde::Serialize;

/// Shape of the ramps of a window.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum WindowShape {
    /// `sin²` ramps (C¹).
    Cosine,
    /// C^∞ ramps built from `e^{−1/x}`.
    #[default]
    Smooth,
}

impl WindowShape {
    /// The step `s(x)`: 0 for `x ≤ 0`, 1 for `x ≥ 1`, monotone, `s(x) + s(1 − x) = 1`.
    #[inline]
    pub fn step(self, x: f64) -> f64 {
        if x <= 0.0 {
            return 0.0;
        }
        if x >= 1.0 {
            return 1.0;
        }
        match self {
            WindowShape::Cosine => {
                let s = (0.5 * std::f64::consts::PI * x).sin();
                s * s
            }
            WindowShape::Smooth => {
                // e^{−1/x} / (e^{−1/x} + e^{−1/(1−x)}) = 1 / (1 + e^{1/x − 1/(1−x)}).
                let u = 1.0 / x - 1.0 / (1.0 - x);
                if u > 700.0 {
                    0.0
                } else {
                    1.0 / (1.0 + u.exp())
                }
            }
        }
    }
}

/// The excursion-time window `W(τ)`: 0 below `start`, rising over `[start, start + rise]`, 1 up
/// to `end − fall`, falling to 0 at `end` (all in a.u. of time).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ExcursionWindow {
    /// Where the window starts to rise (a.u.).
    pub start: f64,
    /// Width of the rising ramp (a.u.).
    pub rise: f64,
    /// Width of the falling ramp (a.u.).
    pub fall: f64,
    /// Where the window reaches zero again: the largest excursion time `τ_max` (a.u.).
    pub end: f64,
    /// Shape of both ramps.
    pub shape: WindowShape,
}

impl ExcursionWindow {
    /// `W(τ)`.
    #[inline]
    pub fn value(&self, tau: f64) -> f64 {
        let up = self.shape.step((tau - self.start) / self.rise);
        let down = self.shape.step((self.end - tau) / self.fall);
        up * down
    }
}

/// The birth-time partition `χ(t_i)` of a periodic field of period `T`: rises over
/// `[t_a − w, t_a + w]`, is 1 up to `t_a + T − w` and falls over `[t_a + T − w, t_a + T + w]`,
/// so that `Σ_k χ(t + kT) = 1` for every `t` (the falling ramp of one copy and the rising ramp of
/// the next add up to one because `s(x) + s(1 − x) = 1`).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BirthPartition {
    /// Centre `t_a` of the first ramp (a deep minimum of |E|).
    pub first: f64,
    /// Period `T` (a.u.).
    pub period: f64,
    /// Half-width `w` of the ramps (a.u.).
    pub half_width: f64,
    /// Ramp shape.
    pub shape: WindowShape,
}

impl BirthPartition {
    /// `χ(t)`.
    #[inline]
    pub fn value(&self, t: f64) -> f64 {
        let w2 = 2.0 * self.half_width;
        let up = self.shape.step((t - self.first + self.half_width) / w2);
        let down = 1.0
            - self
                .shape
                .step((t - self.first - self.period + self.half_width) / w2);
        up * down
    }
}
