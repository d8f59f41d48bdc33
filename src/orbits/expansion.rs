//! The saddle-point expansion beyond leading order, for a prefactor that varies across a saddle.
//!
//! For `I = ∫∫ g(t) h(t) e^{F(t)} d²t` with `F = iΦ` stationary at `t₀` (`t = (t_r, t_i)`),
//! expanding `F` to fourth and `g h` to second order about `t₀` and integrating the Gaussian
//! moments (covariance `A = (−F'')⁻¹`, Wick's theorem) gives the standard next-order Laplace
//! expansion (R. Wong, *Asymptotic Approximations of Integrals*, Academic Press 1989, ch. IX,
//! from memory; derived here):
//!
//! ```text
//! I ≈ 2π e^{F₀}/√det(−F'') · h · [ g + ½ A_ab g_ab + A_ab g_a h_b/h + ½ A_ab A_cd g_a F_bcd
//!                                    + g·B_h + … ],
//! ```
//!
//! where `B_h` collects the terms of `h` alone and of `F'''²`, `F''''`: the same whatever `g`,
//! the saddle-point error the plain formula already has for a constant `g`. The three `g` terms
//! are the error of treating a *varying* `g` as constant. holecast adds them for `g` the hole
//! propagator `U_I(t_r, t_i)`, whose variation across the saddle (the laser moving the hole on
//! the time scale of the saddle's width) is the largest such error of the multichannel dipole
//! (docs/validation.md), with `h` the spreading factor ([`spreading_log_gradient`]) times the
//! structure prefactor (differentiated by forward differences at the [`Neighbour`]s). `F'''`
//! comes from forward differences of the analytic Hessian ([`super::equations::evaluate`]).
//!
//! The expansion holds away from coalescing saddles; near a caustic `A` grows without bound
//! ([`near_caustic`]). There the multichannel dipole bridges the ratio of the next-order to the
//! leading-order contribution of each family from the points outside the zone (documented in
//! `multichannel::terms`).

use num_complex::Complex64;

use super::Saddle;
use super::equations::{ChannelPair, SaddleEval, evaluate};
use crate::field::{CVec3, Field};

/// Step of the forward differences of the Hessian (a.u. of time), and of the neighbours
/// ([`SaddleExpansion::with_neighbours`]): truncation error of relative order `STEP/|t|`
/// (~10⁻⁵ for the time scales of a saddle, ≳ 10 a.u.), rounding error ~10⁻¹².
pub const STEP: f64 = 1e-4;

/// The saddle's kinematics at `t_r + STEP` or `t_i + STEP` (the other time fixed): what a
/// prefactor needs to be differentiated across the saddle by forward differences.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Neighbour {
    /// Return time.
    pub t_ret: Complex64,
    /// Ionization time.
    pub t_ion: Complex64,
    /// `t_r − t_i`.
    pub tau: Complex64,
    /// Kinetic momentum at the return time (stationary drift momentum of these times).
    pub v_ret: CVec3,
    /// Kinetic momentum at the ionization time.
    pub v_ion: CVec3,
    /// Electric field at the return time.
    pub e_ret: CVec3,
    /// Electric field at the ionization time.
    pub e_ion: CVec3,
}

impl Neighbour {
    /// `s` moved to this neighbour's times (its other fields kept).
    pub fn saddle(&self, s: &Saddle) -> Saddle {
        Saddle {
            t_ret: self.t_ret,
            t_ion: self.t_ion,
            tau: self.tau,
            v_ret: self.v_ret,
            v_ion: self.v_ion,
            e_ret: self.e_ret,
            e_ion: self.e_ion,
            ..*s
        }
    }
}

/// The quantities of the next-order expansion at one saddle.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SaddleExpansion {
    /// `A = (−F'')⁻¹`, indices `(r, i)`.
    pub covariance: [[Complex64; 2]; 2],
    /// `F_rrr, F_rri, F_rii, F_iii` (`F = iΦ`).
    pub third: [Complex64; 4],
}

impl SaddleExpansion {
    /// The expansion at the saddle `(t_ret, t_ion)` of `pair` at photon energy `omega`.
    pub fn at(
        field: &Field,
        pair: ChannelPair,
        omega: f64,
        t_ret: Complex64,
        t_ion: Complex64,
    ) -> Self {
        Self::with_neighbours(field, pair, omega, t_ret, t_ion).0
    }

    /// The expansion and the neighbours `[t_r + STEP, t_i + STEP]` (from the same
    /// evaluations).
    pub fn with_neighbours(
        field: &Field,
        pair: ChannelPair,
        omega: f64,
        t_ret: Complex64,
        t_ion: Complex64,
    ) -> (Self, [Neighbour; 2]) {
        let i = Complex64::i();
        let at = |dr: f64, di: f64| evaluate(field, pair, omega, t_ret + dr, t_ion + di);
        let centre = at(0.0, 0.0).hessian;
        let [rr, ri, ii] = centre;
        // F'' = iΦ''; −F'' = −iΦ''.
        let m = [[-i * rr, -i * ri], [-i * ri, -i * ii]];
        let det = m[0][0] * m[1][1] - m[0][1] * m[1][0];
        let covariance = [
            [m[1][1] / det, -m[0][1] / det],
            [-m[1][0] / det, m[0][0] / det],
        ];
        let shifts = [(STEP, 0.0), (0.0, STEP)];
        let evals: [SaddleEval; 2] = shifts.map(|(dr, di)| at(dr, di));
        let d = |a: Complex64, b: Complex64| i * (a - b) / STEP;
        let h = |k: usize| evals[k].hessian;
        let third = [
            d(h(0)[0], centre[0]),
            d(h(0)[1], centre[1]),
            d(h(0)[2], centre[2]),
            d(h(1)[2], centre[2]),
        ];
        let neighbours = std::array::from_fn(|k| {
            let (dr, di) = shifts[k];
            let e = &evals[k];
            Neighbour {
                t_ret: t_ret + dr,
                t_ion: t_ion + di,
                tau: e.tau,
                v_ret: e.v_ret,
                v_ion: e.v_ion,
                e_ret: e.e_ret,
                e_ion: e.e_ion,
            }
        });
        (SaddleExpansion { covariance, third }, neighbours)
    }

    /// `F_abc` with indices in {0 = r, 1 = i} (symmetric).
    #[inline]
    fn f3(&self, a: usize, b: usize, c: usize) -> Complex64 {
        self.third[a + b + c]
    }

    /// The next-order terms of a factor `g` of the prefactor that varies across the saddle,
    /// `½ A_ab g_ab + A_ab g_a h_b/h + ½ A_ab A_cd g_a F_bcd`, given its first derivatives
    /// `first = [g_r, g_i]`, second derivatives `second`, and the logarithmic gradient
    /// `companion = h'/h` of the rest `h` of the prefactor (the cross term of `(g h)''`; the
    /// terms of `h` alone are the constant-`g` error the leading order keeps).
    pub fn prefactor_terms(
        &self,
        first: &[Complex64; 2],
        second: &[[Complex64; 2]; 2],
        companion: &[Complex64; 2],
    ) -> Complex64 {
        let a = &self.covariance;
        let mut out = Complex64::new(0.0, 0.0);
        for x in 0..2 {
            for y in 0..2 {
                out += a[x][y] * (0.5 * second[x][y] + first[x] * companion[y]);
            }
        }
        for x in 0..2 {
            for y in 0..2 {
                let axy = a[x][y] * first[x];
                for (z, row) in a.iter().enumerate() {
                    for (w, azw) in row.iter().enumerate() {
                        out += 0.5 * axy * azw * self.f3(y, z, w);
                    }
                }
            }
        }
        out
    }
}

/// `h'/h = [∂_r, ∂_i] ln (ε + w + iτ)^{−3/2}` of the spreading factor of a saddle
/// (`τ = t_r − t_i`; `w` the width of Gaussian structure in the phase, `ε` the regulator).
pub fn spreading_log_gradient(tau: Complex64, width: f64, epsilon: f64) -> [Complex64; 2] {
    let d = -1.5 * Complex64::i() / (Complex64::new(epsilon + width, 0.0) + Complex64::i() * tau);
    [d, -d]
}

/// Half-width of the zone about a caustic where the expansion is not used: `|ζ| < 1` for the
/// pair's Airy variable ζ.
///
/// A measured choice. Over the harmonics from `Ip + 2.5 Up` to 20 % past the cutoff law of six
/// coupled cases (the demo triatomic with orbital models along the field at 800 nm, 3×10¹⁴ and
/// 1200 nm, 2×10¹⁴ W/cm²; the coupled diatomic along the field at 800 nm, 2×10¹⁴ and 1200 nm,
/// 3×10¹⁴; three structure-free channels at 1200 nm, 2×10¹⁴ and 800 nm, 3×10¹⁴), the rms of
/// Δlog₁₀|D|² against the quadrature with the zone bridged is 0.053, 0.041, 0.067, 0.023,
/// 0.016, 0.027 decade for a half-width 0.7; 0.049, 0.041, 0.072, 0.023, 0.014, 0.034 for 1;
/// 0.046, 0.040, 0.077, 0.021, 0.024, 0.052 for 1.5; 0.060, 0.037, 0.098, 0.019, 0.019, 0.043
/// for 2. Without the expansion's terms in the zone and no bridge (a smooth switch between
/// `|ζ|` = ½ and 1) the first case gives 0.153, with the switch between 1 and 2, 0.230.
pub const CAUSTIC_ZONE: f64 = 1.0;

/// Whether a saddle whose pair has Airy variable `zeta` lies in the zone about the pair's
/// caustic where `A` is too large for the expansion ([`CAUSTIC_ZONE`]).
pub fn near_caustic(zeta: Complex64) -> bool {
    zeta.norm() < CAUSTIC_ZONE
}
