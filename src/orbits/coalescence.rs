//! The complex cutoff: the photon energy where the short and long saddles coalesce.
//!
//! Along real Ω the two first-return saddles approach each other near the cutoff but do not
//! meet; they meet at a complex energy Ω_c where, besides the two saddle equations, the Hessian
//! of Φ is singular. We solve the three equations `f₁ = f₂ = det Φ'' = 0` for `(t_r, t_i, Ω)` by
//! Newton's method, seeded from the closest approach seen while tracking the pair or from the
//! classical cutoff trajectory of the half cycle. `Re Ω_c` is the quantum cutoff,
//! `≈ 3.17 Up + 1.32 Ip` for small `Ip/Up` (M. Lewenstein et al., PRA 49, 2117 (1994));
//! physics notes §1.6 tabulate the function `F(Ip/Up)` this definition gives.
//!
//! Every half cycle of a pulse has its own coalescence point ([`HalfCycleCutoff`]). A Newton
//! solve of three equations can also converge to a coalescence of some other pair of saddles
//! (another half cycle, a higher return, a replica of the pulse in the analytic continuation of
//! the trigonometric sum); [`plausible`] accepts a point only if it lies where the half cycle's
//! classical cutoff says the quantum cutoff must be.
//!
//! Near Ω_c the two saddles of the pair are `t_c ± a u` with `u` the null vector of the Hessian
//! and `a² = −2(Ω − Ω_c) u_r / T_uuu` (third derivative of Φ along `u`; [`split`]): the local
//! normal form (a fold) from which a pair can be started where the classical seeds do not give
//! both members.

use num_complex::Complex64;

use super::equations::{ChannelPair, evaluate};
use super::families::ClassicalPeak;
use crate::field::{BirthWindow, Field};

/// The coalescence point of a pair.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Coalescence {
    /// Complex photon energy Ω_c (a.u.).
    pub omega: Complex64,
    /// Return time at coalescence.
    pub t_ret: Complex64,
    /// Ionization time at coalescence.
    pub t_ion: Complex64,
    /// Whether Newton converged.
    pub converged: bool,
    /// Final relative residual (largest of the three equations, each scaled).
    pub residual: f64,
    /// Iterations used.
    pub iterations: u32,
}

fn solve3(m: [[Complex64; 3]; 3], b: [Complex64; 3]) -> Option<[Complex64; 3]> {
    let det = |m: &[[Complex64; 3]; 3]| {
        m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1])
            - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0])
            + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
    };
    let d = det(&m);
    if d.norm() == 0.0 || !d.is_finite() {
        return None;
    }
    let mut x = [Complex64::new(0.0, 0.0); 3];
    for (col, xc) in x.iter_mut().enumerate() {
        let mut mc = m;
        for row in 0..3 {
            mc[row][col] = b[row];
        }
        *xc = det(&mc) / d;
    }
    Some(x)
}

/// Solves for the coalescence point from a guess `(omega, t_ret, t_ion)`; `scale` is the
/// energy scale of the saddle residuals.
pub fn solve(
    field: &Field,
    pair: ChannelPair,
    omega: f64,
    t_ret: Complex64,
    t_ion: Complex64,
    scale: f64,
) -> Coalescence {
    solve_from(field, pair, Complex64::new(omega, 0.0), t_ret, t_ion, scale)
}

/// [`solve`] from a complex energy guess (e.g. the coalescence point of a neighbouring field
/// in a continuation).
pub fn solve_from(
    field: &Field,
    pair: ChannelPair,
    omega: Complex64,
    t_ret: Complex64,
    t_ion: Complex64,
    scale: f64,
) -> Coalescence {
    let mut x = [t_ret, t_ion, omega];
    let h = 1e-5 / field.omega();
    // Ω enters Φ linearly, so the Hessian (and its determinant) do not depend on Ω and the
    // saddle equations are evaluated at complex Ω by shifting the recombining channel's Ip.
    let eval_at = |x: &[Complex64; 3]| {
        let p = ChannelPair {
            ip_rec: 0.0,
            ..pair
        };
        let e = evaluate(field, p, 0.0, x[0], x[1]);
        let f2 = e.residual[1] + pair.ip_rec - x[2];
        (e, [e.residual[0], f2, e.det_hessian()])
    };
    let mut iterations = 0;
    let mut residual = f64::INFINITY;
    let mut converged = false;
    for _ in 0..60 {
        let (e, f) = eval_at(&x);
        let [rr, ri, ii] = e.hessian;
        let hscale = (rr * ii).norm() + (ri * ri).norm();
        residual = (f[0].norm() / scale)
            .max(f[1].norm() / scale)
            .max(f[2].norm() / hscale.max(1e-300));
        if !residual.is_finite() {
            break;
        }
        if residual < 1e-11 {
            converged = true;
            break;
        }
        let ddet = |k: usize| {
            let mut a = x;
            let mut b = x;
            a[k] += h;
            b[k] -= h;
            (eval_at(&a).1[2] - eval_at(&b).1[2]) / (2.0 * h)
        };
        let zero = Complex64::new(0.0, 0.0);
        let jac = [
            [ri, ii, zero],
            [-rr, -ri, Complex64::new(-1.0, 0.0)],
            [ddet(0), ddet(1), zero],
        ];
        let Some(dx) = solve3(jac, f) else { break };
        let largest = dx[0].norm().max(dx[1].norm());
        let s = if largest > 0.3 / field.omega() {
            0.3 / field.omega() / largest
        } else {
            1.0
        };
        for k in 0..3 {
            x[k] -= dx[k] * s;
        }
        iterations += 1;
    }
    Coalescence {
        omega: x[2],
        t_ret: x[0],
        t_ion: x[1],
        converged,
        residual,
        iterations,
    }
}

/// The quantum correction of the cutoff over the classical `Ip + E_max`, in units of the
/// ionizing channel's Ip: `F(0) − 1 ≈ 0.32` (Lewenstein et al. 1994; physics notes §1.6 give
/// F(x) falling from 1.3234 at x = Ip/Up = 0.01 to ≈ 1.23 at x = 5).
pub const QUANTUM_SHIFT: f64 = 0.32;

/// The cutoff of one half cycle (crest) and return index, classical and quantum.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct HalfCycleCutoff {
    /// The classical cutoff trajectory of the half cycle (largest return energy), if any
    /// electron born in it returns.
    pub classical: Option<ClassicalPeak>,
    /// `Ip_rec + E_max`: the classical cutoff photon energy (a.u.).
    pub classical_energy: Option<f64>,
    /// The coalescence point, when one was found and passed [`plausible`]: `Re Ω_c` is the half
    /// cycle's quantum cutoff.
    pub quantum: Option<Coalescence>,
    /// A coalescence point that converged but was rejected by [`plausible`] (kept for
    /// diagnostics; never used as a cutoff).
    pub rejected: Option<Coalescence>,
}

impl HalfCycleCutoff {
    /// The half cycle's cutoff photon energy (a.u.): `Re Ω_c` if known, else the classical
    /// cutoff plus the quantum shift `0.32 Ip_ion` (Lewenstein et al. 1994).
    pub fn estimate(&self, pair: ChannelPair) -> Option<f64> {
        self.quantum.map(|c| c.omega.re).or_else(|| {
            self.classical_energy
                .map(|e| e + QUANTUM_SHIFT * pair.ip_ion)
        })
    }
}

/// Whether a coalescence point belongs to the half cycle with classical cutoff `peak` (birth
/// window `window`) of the channel pair `pair`: converged; `Im t_i > 0` and `Re τ > 0`;
/// `Re Ω_c > 0` and within `0.5 Ip_ion + 0.25 E_max + ω` of the
/// expected `Ip_rec + E_max + 0.32 Ip_ion`; the ionization time within a quarter period of the
/// window and the return time within a quarter period of the classical one.
///
/// For a pulse (`span` = its start and end) the coalescing orbit must ionize and return inside
/// it: the trigonometric sum that represents the pulse repeats it outside, and saddles there
/// (which the three-equation Newton solve can reach from a half cycle near the end) belong to
/// that replica, not to the pulse.
///
/// `Re Ω_c` may lie below the recombination threshold `Ip_rec`: a weak half cycle whose
/// electrons return with almost no energy coalesces there, and every photon energy above the
/// threshold is then past its cutoff.
///
/// The tolerance covers the slow decrease of `F(Ip/Up)` (physics notes §1.6: 1.32 → 1.23 over
/// Ip/Up = 0 … 5) and the larger shifts of weak half cycles of pulses. A point that fails is a
/// coalescence of other saddles: the 499 eV "cutoff" once reported for a 3 fs pulse with a
/// classical cutoff of 39 eV was one.
///
/// The check is made for fields polarised along one line. In a field with a transverse
/// component the classical cutoff (of an electron that must start with a real transverse
/// velocity to return) falls with the ellipticity while the quantum one hardly does — the
/// quantum orbit takes a complex transverse momentum instead (at 800 nm, 1.5 × 10¹⁴ W/cm²,
/// hydrogen: classical 34 → 25 eV and quantum 41 → 40 eV from ε = 0.6 to 0.9) — so there the
/// coalescence point is continued from the field's projection on its major axis, where this
/// check holds (`start::transverse_coalescence`).
pub fn plausible(
    c: &Coalescence,
    pair: ChannelPair,
    peak: &ClassicalPeak,
    window: &BirthWindow,
    omega: f64,
    span: Option<(f64, f64)>,
) -> bool {
    let quarter = 0.5 * std::f64::consts::PI / omega;
    let expected = pair.ip_rec + peak.energy + QUANTUM_SHIFT * pair.ip_ion;
    let tolerance = 0.5 * pair.ip_ion + 0.25 * peak.energy + omega;
    let inside = match span {
        Some((start, end)) => c.t_ion.re >= start && c.t_ret.re <= end,
        None => true,
    };
    inside
        && c.converged
        && c.t_ion.im > 0.0
        && (c.t_ret - c.t_ion).re > 0.0
        && c.omega.re > 0.0
        && (c.omega.re - expected).abs() <= tolerance
        && c.t_ion.re >= window.start - quarter
        && c.t_ion.re <= window.end + quarter
        && (c.t_ret.re - peak.return_time).abs() <= quarter
}

/// First guesses `[(t_r, t_i); 2]` of the two saddles of the pair that coalesces at `c`, at the
/// real photon energy `omega` near `Re Ω_c`.
///
/// With `g = ∇Φ` in `(t_r, t_i)` and `∂g/∂Ω = (1, 0)` (Φ contains `Ω t_r`), expanding about the
/// coalescence point gives `g(t_c + s; Ω) ≈ (Ω − Ω_c) e_r + H s + ½ T[s, s]`. The Hessian `H`
/// is symmetric and singular there, with null vector `u`; projecting on `u` leaves
/// `(Ω − Ω_c) u_r + ½ a² T_uuu = 0` for `s = a u`, so `a = ±√(−2(Ω − Ω_c) u_r/T_uuu)` (the
/// fold, the simplest of the normal forms of DLMF §36.2). `T_uuu = d/dη [uᵀ H(t_c + η u) u]`
/// is taken by a central difference.
pub fn split(
    field: &Field,
    pair: ChannelPair,
    c: &Coalescence,
    omega: f64,
) -> [(Complex64, Complex64); 2] {
    let at = |t_r: Complex64, t_i: Complex64| evaluate(field, pair, omega, t_r, t_i).hessian;
    let [rr, ri, ii] = at(c.t_ret, c.t_ion);
    let u1 = [ri, -rr];
    let u2 = [ii, -ri];
    let norm = |u: &[Complex64; 2]| (u[0].norm_sqr() + u[1].norm_sqr()).sqrt();
    let u = if norm(&u1) >= norm(&u2) { u1 } else { u2 };
    let n = norm(&u);
    if n == 0.0 || !n.is_finite() {
        return [(c.t_ret, c.t_ion); 2];
    }
    let u = [u[0] / n, u[1] / n];
    let quad = |eta: f64| {
        let [rr, ri, ii] = at(c.t_ret + u[0] * eta, c.t_ion + u[1] * eta);
        u[0] * u[0] * rr + 2.0 * u[0] * u[1] * ri + u[1] * u[1] * ii
    };
    let h = 1e-3 / field.omega();
    let t3 = (quad(h) - quad(-h)) / (2.0 * h);
    let a = crate::cmath::sqrt(-2.0 * (Complex64::new(omega, 0.0) - c.omega) * u[0] / t3);
    [
        (c.t_ret + a * u[0], c.t_ion + a * u[1]),
        (c.t_ret - a * u[0], c.t_ion - a * u[1]),
    ]
}
