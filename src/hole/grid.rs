//! The uniform time grid of a field sampling, and times resolved on it for the lookup.

use super::error::HoleError;

/// A uniform grid `t_k = t_start + k·step`, `k = 0..=steps` (the last node is `t_end`).
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Grid {
    pub t_start: f64,
    pub t_end: f64,
    pub step: f64,
    pub steps: usize,
}

impl Grid {
    /// Resolves `t` (named `parameter` in errors) to its four-node stencil and weights.
    #[inline(always)]
    pub fn locate(&self, parameter: &'static str, t: f64) -> Result<GridTime, HoleError> {
        let slack = 1e-12 * self.t_start.abs().max(self.t_end.abs()).max(1.0);
        if !(t >= self.t_start - slack && t <= self.t_end + slack) {
            return Err(HoleError::TimeOutsideWindow {
                parameter,
                value: t,
                t_start: self.t_start,
                t_end: self.t_end,
            });
        }
        let x = (t - self.t_start) / self.step;
        let n = self.steps;
        // x is finite and ≥ −slack/step here; the cast truncates toward zero (= floor for
        // x ≥ 0) and saturates small negatives to 0. n ≥ 3, so the stencil fits.
        let k = (x as usize).min(n - 1);
        let first = k.saturating_sub(1).min(n - 3);
        Ok(GridTime {
            time: t,
            first,
            weights: hermite_weights(x - first as f64),
            grid: *self,
        })
    }
}

/// A time resolved on the grid of a [`super::FieldSamples`]: the four grid nodes and the
/// interpolation weights that a lookup at this time uses.
///
/// Every orientation of a calculation shares one grid and looks up the same times, so
/// resolving each time once with [`super::FieldSamples::locate`] and passing it to
/// [`super::HolePropagator::element_at`] saves that work for all the other orientations.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct GridTime {
    time: f64,
    pub(crate) first: usize,
    pub(crate) weights: [f64; 8],
    pub(crate) grid: Grid,
}

impl GridTime {
    /// The time (a.u.).
    pub fn time(&self) -> f64 {
        self.time
    }
}

/// Weights of the Hermite interpolant on the nodes `0, 1, 2, 3` at `s`: the interpolant is
/// `Σ_i f_i H_i(s) + f'_i K_i(s)` with `H_i = [1 − 2 ℓ_i'(i)(s − i)] ℓ_i(s)²`,
/// `K_i = (s − i) ℓ_i(s)²` and `ℓ_i` the cubic Lagrange basis (textbook Hermite interpolation;
/// common practice). Its error is `f⁽⁸⁾(ξ)/8! · Π_i (s − i)²` (in units of the step).
#[inline(always)]
fn hermite_weights(s: f64) -> [f64; 8] {
    let d0 = s;
    let d1 = s - 1.0;
    let d2 = s - 2.0;
    let d3 = s - 3.0;
    let l0 = d1 * d2 * d3 * (-1.0 / 6.0);
    let l1 = d0 * d2 * d3 * 0.5;
    let l2 = d0 * d1 * d3 * (-0.5);
    let l3 = d0 * d1 * d2 * (1.0 / 6.0);
    let (q0, q1, q2, q3) = (l0 * l0, l1 * l1, l2 * l2, l3 * l3);
    // ℓ_i'(i) = Σ_{j≠i} 1/(i − j): −11/6, −1/2, 1/2, 11/6.
    [
        (1.0 + (11.0 / 3.0) * d0) * q0,
        (1.0 + d1) * q1,
        (1.0 - d2) * q2,
        (1.0 - (11.0 / 3.0) * d3) * q3,
        d0 * q0,
        d1 * q1,
        d2 * q2,
        d3 * q3,
    ]
}

#[cfg(test)]
mod tests {
    use super::hermite_weights;

    #[test]
    fn hermite_weights_reproduce_polynomials_of_degree_seven() {
        // Mathematics: Hermite interpolation on 4 nodes with values and first derivatives is
        // exact for polynomials of degree ≤ 7.
        let f = |s: f64| 0.3 - 1.1 * s + 0.7 * s.powi(3) - 0.05 * s.powi(6) + 0.004 * s.powi(7);
        let df = |s: f64| -1.1 + 2.1 * s * s - 0.3 * s.powi(5) + 0.028 * s.powi(6);
        for k in 0..=30 {
            let s = k as f64 * 0.1;
            let w = hermite_weights(s);
            let p: f64 = (0..4)
                .map(|i| w[i] * f(i as f64) + w[4 + i] * df(i as f64))
                .sum();
            assert!((p - f(s)).abs() < 1e-13, "s = {s}: {p} vs {}", f(s));
        }
    }
}
