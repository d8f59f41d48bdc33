//! Monotone piecewise-cubic Hermite interpolation (PCHIP) for tabulated alignment densities.
//!
//! Slopes by Fritsch & Butland's weighted harmonic mean (F. N. Fritsch and J. Butland, SIAM J.
//! Sci. Stat. Comput. 5, 300 (1984)) with the three-point end formula limited as in Fritsch &
//! Carlson (SIAM J. Numer. Anal. 17, 238 (1980)) as in Moler, *Numerical Computing with MATLAB*
//! §3.6 (references from memory); this is the rule of SciPy's
//! `PchipInterpolator`, which the tests use as the reference. Each cubic piece is monotone
//! between its two data values, so non-negative data give a non-negative interpolant — the
//! property an alignment density needs. Two points give the straight line.

/// A PCHIP interpolant through `(x_k, y_k)`, `x` strictly increasing, at least two points.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct MonotoneCubic {
    x: Vec<f64>,
    y: Vec<f64>,
    slope: Vec<f64>,
}

impl MonotoneCubic {
    /// Number of nodes.
    pub(super) fn len(&self) -> usize {
        self.x.len()
    }

    /// Builds the interpolant. The caller guarantees `x.len() == y.len() ≥ 2`, finite values and
    /// strictly increasing `x`; for anything else the interpolant is unspecified (but building
    /// and evaluating it never panics).
    pub(super) fn new(x: Vec<f64>, y: Vec<f64>) -> Self {
        let n = x.len().min(y.len());
        let mut slope = vec![0.0; n];
        if n >= 2 {
            let h: Vec<f64> = x.windows(2).map(|p| p[1] - p[0]).collect();
            let secant: Vec<f64> = (0..n - 1).map(|k| (y[k + 1] - y[k]) / h[k]).collect();
            if n == 2 {
                slope[0] = secant[0];
                slope[1] = secant[0];
            } else {
                for k in 1..n - 1 {
                    let (m0, m1) = (secant[k - 1], secant[k]);
                    if m0 == 0.0 || m1 == 0.0 || (m0 > 0.0) != (m1 > 0.0) {
                        slope[k] = 0.0;
                    } else {
                        let w1 = 2.0 * h[k] + h[k - 1];
                        let w2 = h[k] + 2.0 * h[k - 1];
                        slope[k] = (w1 + w2) / (w1 / m0 + w2 / m1);
                    }
                }
                slope[0] = end_slope(h[0], h[1], secant[0], secant[1]);
                slope[n - 1] = end_slope(h[n - 2], h[n - 3], secant[n - 2], secant[n - 3]);
            }
        }
        Self { x, y, slope }
    }

    /// Value at `t`; outside `[x_0, x_last]` the end value is held. NaN gives NaN.
    pub(super) fn value(&self, t: f64) -> f64 {
        let n = self.slope.len();
        if n == 0 || t.is_nan() {
            return f64::NAN;
        }
        if t <= self.x[0] {
            return self.y[0];
        }
        if t >= self.x[n - 1] {
            return self.y[n - 1];
        }
        // Interval k with x_k ≤ t < x_{k+1}.
        let k = self
            .x
            .partition_point(|&xk| xk <= t)
            .saturating_sub(1)
            .min(n - 2);
        let h = self.x[k + 1] - self.x[k];
        let s = (t - self.x[k]) / h;
        let s2 = s * s;
        let s3 = s2 * s;
        let h00 = 2.0 * s3 - 3.0 * s2 + 1.0;
        let h10 = s3 - 2.0 * s2 + s;
        let h01 = -2.0 * s3 + 3.0 * s2;
        let h11 = s3 - s2;
        h00 * self.y[k]
            + h10 * h * self.slope[k]
            + h01 * self.y[k + 1]
            + h11 * h * self.slope[k + 1]
    }

    /// The interpolation nodes.
    pub(super) fn nodes(&self) -> &[f64] {
        &self.x
    }
}

/// Three-point end slope, set to zero if its sign differs from the first secant and limited to
/// three times that secant when the first two secants differ in sign (SciPy's `_edge_case`).
fn end_slope(h0: f64, h1: f64, m0: f64, m1: f64) -> f64 {
    let d = ((2.0 * h0 + h1) * m0 - h0 * m1) / (h0 + h1);
    if sign(d) != sign(m0) {
        0.0
    } else if sign(m0) != sign(m1) && d.abs() > 3.0 * m0.abs() {
        3.0 * m0
    } else {
        d
    }
}

/// `numpy.sign`: −1, 0 or 1.
fn sign(v: f64) -> i8 {
    if v > 0.0 {
        1
    } else if v < 0.0 {
        -1
    } else {
        0
    }
}
