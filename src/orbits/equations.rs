//! The saddle-point equations of the strong-field harmonic amplitude and their derivatives.
//!
//! For ionization into channel `n` (ionization potential `Ip_n`) and recombination into channel
//! `m` (`Ip_m`), with the stationary drift momentum eliminated, the phase of the harmonic
//! amplitude `∝ e^{iΦ}` is
//!
//! ```text
//! Φ(t_r, t_i) = Ω t_r − S(t_r, t_i) − Ip_m t_r + Ip_n t_i,
//! S = ∫_{t_i}^{t_r} ½ (p_s + A)² dt = −(∫A)²/(2τ) + ½ ∫A·A,    p_s = −(1/τ) ∫_{t_i}^{t_r} A dt,
//! ```
//!
//! with `τ = t_r − t_i` (M. Lewenstein et al., PRA 49, 2117 (1994), in the sign conventions of
//! DESIGN §3: `E = −∂A/∂t`, kinetic momentum `k = p + A`). Its stationary points satisfy
//!
//! ```text
//! f₁ = ∂Φ/∂t_i =  ½ v_i² + Ip_n = 0          (tunnelling, v_i = p_s + A(t_i)),
//! f₂ = −∂Φ/∂t_r = ½ v_r² + Ip_m − Ω = 0      (energy at recombination, v_r = p_s + A(t_r)).
//! ```
//!
//! The Hessian of Φ follows from `∂p_s/∂t_r = −v_r/τ` and `∂p_s/∂t_i = +v_i/τ`:
//! `Φ_rr = v_r²/τ + v_r·E_r`, `Φ_ii = v_i²/τ − v_i·E_i`, `Φ_ri = −v_r·v_i/τ`
//! (physics notes §1.5, derived there and checked against finite differences; our test does the
//! same). The linear channel terms do not enter the second derivatives.

use num_complex::Complex64;

use crate::field::{CVec3, Field, bdot};

/// The two ionization potentials of a channel pair: ionize into `ion`, recombine into `rec`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ChannelPair {
    /// Ionization potential of the channel the electron leaves (a.u.).
    pub ip_ion: f64,
    /// Ionization potential of the channel it recombines into (a.u.).
    pub ip_rec: f64,
}

impl ChannelPair {
    /// The diagonal pair of a single channel.
    pub fn single(ip: f64) -> Self {
        ChannelPair {
            ip_ion: ip,
            ip_rec: ip,
        }
    }
}

/// Everything the solver and the amplitude stage need at one point `(t_r, t_i)`.
#[derive(Clone, Copy, Debug)]
pub struct SaddleEval {
    /// Excursion time `τ = t_r − t_i`.
    pub tau: Complex64,
    /// Stationary drift momentum `p_s`.
    pub drift: CVec3,
    /// Kinetic momentum at recombination `v_r = p_s + A(t_r)`.
    pub v_ret: CVec3,
    /// Kinetic momentum at ionization `v_i = p_s + A(t_i)`.
    pub v_ion: CVec3,
    /// Electric field at the return time.
    pub e_ret: CVec3,
    /// Electric field at the ionization time.
    pub e_ion: CVec3,
    /// Residuals `[f₁, f₂]` (a.u. of energy).
    pub residual: [Complex64; 2],
    /// Phase Φ (dimensionless).
    pub action: Complex64,
    /// Hessian of Φ: `[Φ_rr, Φ_ri, Φ_ii]`.
    pub hessian: [Complex64; 3],
}

impl SaddleEval {
    /// Determinant of the Hessian of Φ.
    pub fn det_hessian(&self) -> Complex64 {
        let [rr, ri, ii] = self.hessian;
        rr * ii - ri * ri
    }

    /// Jacobian of `(f₁, f₂)` with respect to `(t_r, t_i)`: `[[Φ_ri, Φ_ii], [−Φ_rr, −Φ_ri]]`.
    pub fn jacobian(&self) -> [[Complex64; 2]; 2] {
        let [rr, ri, ii] = self.hessian;
        [[ri, ii], [-rr, -ri]]
    }
}

/// Evaluates the saddle equations, the phase Φ and its Hessian at `(t_r, t_i)` for photon
/// energy `omega` (a.u.).
#[inline]
pub fn evaluate(
    field: &Field,
    pair: ChannelPair,
    omega: f64,
    t_ret: Complex64,
    t_ion: Complex64,
) -> SaddleEval {
    let r = field.at(t_ret);
    let i = field.at(t_ion);
    let tau = t_ret - t_ion;
    let inv_tau = 1.0 / tau;
    let int_a = r.int_a - i.int_a;
    let drift = -int_a * inv_tau;
    let v_ret = drift + r.a;
    let v_ion = drift + i.a;
    let vr2 = bdot(&v_ret, &v_ret);
    let vi2 = bdot(&v_ion, &v_ion);
    let vrvi = bdot(&v_ret, &v_ion);
    let s = -0.5 * bdot(&int_a, &int_a) * inv_tau + 0.5 * (r.int_a2 - i.int_a2);
    let action = omega * t_ret - s - pair.ip_rec * t_ret + pair.ip_ion * t_ion;
    let f1 = 0.5 * vi2 + pair.ip_ion;
    let f2 = 0.5 * vr2 + pair.ip_rec - omega;
    let phi_rr = vr2 * inv_tau + bdot(&v_ret, &r.e);
    let phi_ii = vi2 * inv_tau - bdot(&v_ion, &i.e);
    let phi_ri = -vrvi * inv_tau;
    SaddleEval {
        tau,
        drift,
        v_ret,
        v_ion,
        e_ret: r.e,
        e_ion: i.e,
        residual: [f1, f2],
        action,
        hessian: [phi_rr, phi_ri, phi_ii],
    }
}
