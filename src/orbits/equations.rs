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
//!
//! # Gaussian structure in the phase
//! A Gaussian-type structure factor (one shell of centre `C` and exponent `α`, [`GaussianTerm`])
//! carries `e^{−k²/4α ∓ ik·C}`, which near the complex ionization time varies as fast as the
//! action. Taken into the phase, the drift-momentum integral stays Gaussian and exact
//! ([`crate::momentum`]): with `q_i = 1/4α` (ionization shell, centre `C_i`), `q_r = 1/4β`
//! (recombination shell, centre `C_r`; zeros for a side left in the prefactor),
//!
//! ```text
//! F(t_r, t_i) = iΦ₀ − i v_i·C_i − q_i v_i² + i v_r·C_r − q_r v_r² + B·B/4λ,
//! λ = iτ/2 + q_i + q_r,   B = 2q_i v_i + 2q_r v_r + i(C_i − C_r),
//! ```
//!
//! is the exponent after the momentum integral (`Φ₀` the phase above, `v` at `p_s`), stationary
//! at the momentum `p* = p_s − B/2λ`. The saddle equations `∂F = 0` become, with
//! `k = p* + A` (envelope theorem; derived here, checked against finite differences in
//! `tests/saddles.rs`),
//!
//! ```text
//! f₁ = ½k_i² + Ip_n + E_i·C_i − 2i q_i k_i·E_i = 0,
//! f₂ = ½k_r² + Ip_m − Ω + E_r·C_r + 2i q_r k_r·E_r = 0:
//! ```
//!
//! the centre acts like a Stark shift `E·C` of the ionization potential and the exponent adds an
//! imaginary term (for two-centre molecules cf. M. Chirilă and M. Lein, PRA 73, 023410 (2006);
//! C. Figueira de Morisson Faria, PRA 76, 043407 (2007)). Each shell pair has its own saddles.
//! The phase reported is `Φ = −iF` (so the amplitude keeps its `e^{iΦ}` form), its Hessian
//! `Φ'' = −iF''` with
//!
//! ```text
//! F_ab = G_ab + G_ap·G_pb/2λ,   G_ii = −ik_i·E_i + 2q_i(k_i·Ė_i − E_i²) + iĖ_i·C_i,
//! G_rr = ik_r·E_r + 2q_r(k_r·Ė_r − E_r²) − iĖ_r·C_r,   G_ri = 0,
//! G_pi = ik_i + 2q_i E_i,   G_pr = −ik_r + 2q_r E_r,
//! ```
//!
//! and the spreading factor of the amplitude becomes `(2π/(ε + iτ + w))^{3/2}`,
//! `w = 2q_i + 2q_r` ([`SaddleEval::width`]). Without structure every formula reduces to the
//! plain ones (`F = iΦ₀`, `p* = p_s`).

use nalgebra::Vector3;
use num_complex::Complex64;

use crate::field::{CVec3, Field, bdot};

/// One Gaussian shell of a structure factor taken into the phase.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct GaussianTerm {
    /// `1/(4α)` (bohr²).
    pub quarter: f64,
    /// Centre in the lab frame (bohr).
    pub centre: Vector3<f64>,
}

/// The Gaussian factors in the phase of a saddle problem (none: the plain problem).
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct PhaseStructure {
    /// The ionization shell, if its Gaussian is in the phase.
    pub ion: Option<GaussianTerm>,
    /// The recombination shell, if its Gaussian is in the phase.
    pub rec: Option<GaussianTerm>,
}

impl PhaseStructure {
    /// Whether nothing is in the phase.
    pub fn is_plain(&self) -> bool {
        self.ion.is_none() && self.rec.is_none()
    }
}

/// The saddle problem of a channel pair: ionize into `ion`, recombine into `rec`, with
/// optional Gaussian structure in the phase.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ChannelPair {
    /// Ionization potential of the channel the electron leaves (a.u.).
    pub ip_ion: f64,
    /// Ionization potential of the channel it recombines into (a.u.).
    pub ip_rec: f64,
    /// Gaussian structure in the phase (module documentation).
    pub structure: PhaseStructure,
}

impl ChannelPair {
    /// The diagonal pair of a single channel.
    pub fn single(ip: f64) -> Self {
        ChannelPair::new(ip, ip)
    }

    /// The pair `ion → rec` without structure in the phase.
    pub fn new(ip_ion: f64, ip_rec: f64) -> Self {
        ChannelPair {
            ip_ion,
            ip_rec,
            structure: PhaseStructure::default(),
        }
    }
}

/// Everything the solver and the amplitude stage need at one point `(t_r, t_i)`.
#[derive(Clone, Copy, Debug)]
pub struct SaddleEval {
    /// Excursion time `τ = t_r − t_i`.
    pub tau: Complex64,
    /// Stationary drift momentum `p_s` (`p*` with structure in the phase).
    pub drift: CVec3,
    /// Kinetic momentum at recombination `v_r = p_s + A(t_r)` (`p* + A(t_r)`).
    pub v_ret: CVec3,
    /// Kinetic momentum at ionization `v_i = p_s + A(t_i)` (`p* + A(t_i)`).
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
    /// `w = 2q_i + 2q_r` of the structure in the phase (0 for the plain problem): the spreading
    /// factor is `(2π/(ε + iτ + w))^{3/2}`.
    pub width: f64,
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
    if !pair.structure.is_plain() {
        return evaluate_structured(field, pair, omega, t_ret, t_ion);
    }
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
        width: 0.0,
    }
}

/// [`evaluate`] with Gaussian structure in the phase (module documentation).
fn evaluate_structured(
    field: &Field,
    pair: ChannelPair,
    omega: f64,
    t_ret: Complex64,
    t_ion: Complex64,
) -> SaddleEval {
    let i = Complex64::i();
    let zero = Vector3::zeros();
    let (qi, ci) = pair
        .structure
        .ion
        .map_or((0.0, zero), |g| (g.quarter, g.centre));
    let (qr, cr) = pair
        .structure
        .rec
        .map_or((0.0, zero), |g| (g.quarter, g.centre));
    let ci = ci.map(|x| Complex64::new(x, 0.0));
    let cr = cr.map(|x| Complex64::new(x, 0.0));
    let r = field.at(t_ret);
    let s = field.at(t_ion);
    let (_, de_r) = field.electric_and_rate(t_ret);
    let (_, de_i) = field.electric_and_rate(t_ion);
    let tau = t_ret - t_ion;
    let inv_tau = 1.0 / tau;
    let int_a = r.int_a - s.int_a;
    let p_s = -int_a * inv_tau;
    let v_r = p_s + r.a;
    let v_i = p_s + s.a;
    let s0 = -0.5 * bdot(&int_a, &int_a) * inv_tau + 0.5 * (r.int_a2 - s.int_a2);
    let phi0 = omega * t_ret - s0 - pair.ip_rec * t_ret + pair.ip_ion * t_ion;
    let lambda = 0.5 * i * tau + qi + qr;
    let inv_2l = 0.5 / lambda;
    let b =
        v_i * Complex64::new(2.0 * qi, 0.0) + v_r * Complex64::new(2.0 * qr, 0.0) + (ci - cr) * i;
    let c0 =
        -i * bdot(&v_i, &ci) - qi * bdot(&v_i, &v_i) + i * bdot(&v_r, &cr) - qr * bdot(&v_r, &v_r);
    let f = i * phi0 + c0 + 0.5 * bdot(&b, &b) * inv_2l;
    let mu = -b * inv_2l;
    let k_i = v_i + mu;
    let k_r = v_r + mu;
    let (e_i, e_r) = (s.e, r.e);
    let kie = bdot(&k_i, &e_i);
    let kre = bdot(&k_r, &e_r);
    let f1 = 0.5 * bdot(&k_i, &k_i) + pair.ip_ion + bdot(&e_i, &ci) - 2.0 * i * qi * kie;
    let f2 = 0.5 * bdot(&k_r, &k_r) + pair.ip_rec - omega + bdot(&e_r, &cr) + 2.0 * i * qr * kre;
    let g_ii = -i * kie + 2.0 * qi * (bdot(&k_i, &de_i) - bdot(&e_i, &e_i)) + i * bdot(&de_i, &ci);
    let g_rr = i * kre + 2.0 * qr * (bdot(&k_r, &de_r) - bdot(&e_r, &e_r)) - i * bdot(&de_r, &cr);
    let g_pi = k_i * i + e_i * Complex64::new(2.0 * qi, 0.0);
    let g_pr = k_r * (-i) + e_r * Complex64::new(2.0 * qr, 0.0);
    let h_ii = g_ii + bdot(&g_pi, &g_pi) * inv_2l;
    let h_rr = g_rr + bdot(&g_pr, &g_pr) * inv_2l;
    let h_ri = bdot(&g_pr, &g_pi) * inv_2l;
    SaddleEval {
        tau,
        drift: p_s + mu,
        v_ret: k_r,
        v_ion: k_i,
        e_ret: e_r,
        e_ion: e_i,
        residual: [f1, f2],
        action: -i * f,
        hessian: [-i * h_rr, -i * h_ri, -i * h_ii],
        width: 2.0 * (qi + qr),
    }
}
