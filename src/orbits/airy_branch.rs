//! The Airy variable ζ of a coalescing pair of saddles, on a branch continued along a scan.
//!
//! For two saddles with phases Φ₋ and Φ₊ (e^{iΦ} convention; "−" has the larger Re Φ where the
//! saddles are real and well separated), the cubic map of Chester, Friedman and Ursell gives
//! `Δ = (Φ₋ − Φ₊)/2 = (2/3) ζ^{3/2}`, so `ζ³ = (3Δ/2)²` (physics notes §2.3; DLMF §36.12). ζ is
//! analytic along a scan and passes close to zero at a cutoff; of the three cube roots the one
//! continuing the previous values is taken:
//! - at the start (Δ real-positive-like, far from the cutoff) the principal root;
//! - afterwards the root nearest the linear extrapolation of the previous two values, and the
//!   step is refused when that choice is not clearly separated from the next-nearest root;
//! - `√ζ` is the square root with `(2/3)(√ζ)³ = Δ`;
//! - `ζ^{1/4}`: principal at the start, then the sign nearest its previous value.

use num_complex::Complex64;

use crate::cmath::modulus;

/// ζ and its roots at one point of a scan.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ZetaBranch {
    /// ζ.
    pub zeta: Complex64,
    /// √ζ with `(2/3)(√ζ)³ = Δ`.
    pub sqrt: Complex64,
    /// ζ^{1/4}, continued.
    pub quarter: Complex64,
    /// The scan parameter of this point and the previous (parameter, ζ), for extrapolation.
    parameter: f64,
    previous: Option<(f64, Complex64)>,
}

pub(crate) fn sqrt_matching(zeta: Complex64, delta: Complex64) -> Complex64 {
    let s = crate::cmath::sqrt(zeta);
    let c = 2.0 / 3.0 * s * s * s;
    if modulus(c - delta) <= modulus(-c - delta) {
        s
    } else {
        -s
    }
}

impl ZetaBranch {
    /// Principal branches at the start of a scan, at parameter value `parameter`.
    pub fn start(delta: Complex64, parameter: f64) -> Self {
        let zeta = (1.5 * delta).powf(2.0 / 3.0);
        let sqrt = sqrt_matching(zeta, delta);
        ZetaBranch {
            zeta,
            sqrt,
            quarter: sqrt.sqrt(),
            parameter,
            previous: None,
        }
    }

    /// The branch at a new point (parameter `parameter`, half phase difference `delta`), or
    /// `None` when the continuation is ambiguous (the step was too long).
    pub fn advance(&self, delta: Complex64, parameter: f64) -> Option<Self> {
        let w = (1.5 * delta) * (1.5 * delta);
        // A step of (almost) zero length — the continuation landing again on an energy it has
        // just visited — carries no information for the extrapolation: it must neither be
        // extrapolated over nor become the previous point, or the next extrapolation divides by
        // it (a step of 1.6e-14 relative once scaled the guess by 6e13 and picked a wrong cube
        // root beyond the cutoff; tests/quadrature.rs, uniform across the cutoff).
        let tiny = 1e-9 * self.parameter.abs().max(parameter.abs());
        let degenerate = (parameter - self.parameter).abs() <= tiny;
        let guess = match self.previous {
            Some((p, z)) if !degenerate && (self.parameter - p).abs() > tiny => {
                self.zeta + (self.zeta - z) * ((parameter - self.parameter) / (self.parameter - p))
            }
            _ => self.zeta,
        };
        let r = modulus(w).cbrt();
        let first = Complex64::from_polar(r, w.arg() / 3.0);
        // The other two cube roots: multiply by the cube roots of unity e^{±2πi/3}.
        let unity = Complex64::new(-0.5, 0.5 * 3f64.sqrt());
        // The nearest root and the distance of the next nearest (no sort: three candidates).
        let roots = [first, first * unity, first * unity.conj()].map(|z| (modulus(z - guess), z));
        let mut best = 0;
        for j in 1..3 {
            if roots[j].0.total_cmp(&roots[best].0).is_lt() {
                best = j;
            }
        }
        let second = (0..3)
            .filter(|&j| j != best)
            .map(|j| roots[j].0)
            .fold(f64::INFINITY, f64::min);
        if roots[best].0 > 0.5 * second {
            return None;
        }
        let zeta = roots[best].1;
        let sqrt = sqrt_matching(zeta, delta);
        let q = crate::cmath::sqrt(sqrt);
        let quarter = if modulus(q - self.quarter) <= modulus(-q - self.quarter) {
            q
        } else {
            -q
        };
        Some(ZetaBranch {
            zeta,
            sqrt,
            quarter,
            parameter,
            previous: if degenerate {
                self.previous
            } else {
                Some((self.parameter, self.zeta))
            },
        })
    }
}
