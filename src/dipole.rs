//! Continuum kernels of the saddle-point harmonic amplitude, plain and uniform.
//!
//! The amplitude of one saddle `s` of a channel pair `n → m` factorises into an
//! orientation-independent *continuum kernel* and a *structure prefactor*:
//!
//! ```text
//! D_s = K_s · d̄_m(v_r) · U_mn · a_n(v_i, E(t_i)),
//! K_s = (−i) · (2π/(ε + iτ))^{3/2} · 2π/sqrt(−det Φ'') · e^{iΦ}
//! ```
//!
//! (physics notes §1.5 and §4.2, derived there and checked against a direct quadrature of the
//! Lewenstein integral). `(2π/(ε+iτ))^{3/2}` is the wave-packet spreading factor on its
//! principal branch (at physical saddles Im τ < 0, far from the cut), `2π/sqrt(−det Φ'')` the
//! Gaussian factor of the `(t_r, t_i)` integration with the square root continued along the
//! family from its principal value in the plateau, and Φ the phase of
//! [`crate::orbits::equations`]. `D` is the Fourier transform `∫ ⟨r⟩(t) e^{iΩt} dt` of the
//! dipole expectation over the saddles supplied (one period of a periodic field, all half
//! cycles of a pulse).
//!
//! Near a cutoff the two saddles of a pair coalesce and `K_s` diverges. The uniform (Airy)
//! approximation of Chester, Friedman and Ursell (Proc. Camb. Phil. Soc. 53, 599 (1957)), as
//! applied to strong-field integrals by C. Figueira de Morisson Faria, H. Schomerus and
//! W. Becker (PRA 66, 043413 (2002)), replaces the pair's two kernels by
//!
//! ```text
//! K̃₊ = K₊ e^{+i(Δ−π/4)} · √π ζ^{1/4} [Ai(−ζ) − i ζ^{−1/2} Ai′(−ζ)],
//! K̃₋ = K₋ e^{−i(Δ−π/4)} · √π ζ^{1/4} [Ai(−ζ) + i ζ^{−1/2} Ai′(−ζ)],
//! ```
//!
//! with `Δ = (Φ₋ − Φ₊)/2 = (2/3)ζ^{3/2}` (physics notes §2.3, derived there and checked against
//! an exact Bessel integral and an HHG quadrature across the cutoff; DLMF §36.12). Far from the
//! cutoff `K̃± → K±` by the Airy asymptotics (DLMF §9.7), so the uniform sum joins the plain one
//! inside the plateau, stays finite through the cutoff and decays beyond it. Each piece
//! multiplies its own saddle's prefactor, so the uniform sum is also split by family.
//!
//! In the plain sum, beyond a pair's cutoff (Re ζ < 0) only the member with the larger Im Φ
//! (the exponentially decaying one) is kept, as for Ai(x) at x > 0; right at the cutoff the
//! two are comparable and the plain sum is not valid there.

use num_complex::Complex64;
use serde::Serialize;

use crate::orbits::{OrbitTable, Saddle};
use crate::special::airy::airy;

/// How the saddles of a pair are summed.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum SaddleSum {
    /// Uniform (Airy) approximation for every coalescing pair.
    #[default]
    Uniform,
    /// Plain sum of saddle-point contributions (physical member only beyond the cutoff).
    Plain,
}

/// How a kernel value was obtained.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum KernelKind {
    /// Uniform piece of a coalescing pair.
    Uniform,
    /// Plain saddle-point kernel.
    Plain,
    /// Plain kernel because the uniform formula was unavailable (partner failed).
    PlainFallback,
    /// Excluded: the unphysical (growing) member beyond the cutoff in the plain sum.
    Excluded,
    /// The saddle failed; no contribution.
    Failed,
}

/// Kernel of one family at one energy.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Kernel {
    /// `K` or `K̃` (zero when excluded or failed).
    pub value: Complex64,
    /// How it was obtained.
    pub kind: KernelKind,
}

/// Kernels of every family (outer) at every energy (inner) of a table.
#[derive(Clone, Debug)]
pub struct Kernels {
    /// `values[f][k]` for family `f` at energy index `k`.
    pub values: Vec<Vec<Kernel>>,
}

fn spreading_and_gauss(s: &Saddle, epsilon: f64) -> Complex64 {
    let two_pi = 2.0 * std::f64::consts::PI;
    // With Gaussian structure in the phase the momentum integral's width adds to ε + iτ.
    let w = two_pi / (Complex64::new(epsilon + s.width, 0.0) + Complex64::i() * s.tau);
    // Principal root (Re(ε + iτ + w) > 0 on physical saddles, so w stays off the cut).
    let spreading = w * crate::cmath::sqrt(w);
    Complex64::new(0.0, -1.0) * spreading * (two_pi / s.hessian_root)
}

/// Plain continuum kernel `K_s` of one saddle; `epsilon` is the regulator of the spreading
/// factor (0 for saddle-point work).
pub fn continuum_kernel(s: &Saddle, epsilon: f64) -> Complex64 {
    spreading_and_gauss(s, epsilon) * (Complex64::i() * s.action).exp()
}

/// Uniform-approximation weights of a coalescing pair: returns `(w₋, w₊)` such that the pair's
/// integral is `G₋ w₋ + G₊ w₊`, where `G±` are the two saddles' plain contributions *without*
/// their exponentials `e^{iΦ±}`:
///
/// ```text
/// w₊ = e^{iΦ̄ − iπ/4} √π ζ^{1/4} [Ai(−ζ) − i ζ^{−1/2} Ai′(−ζ)],
/// w₋ = e^{iΦ̄ + iπ/4} √π ζ^{1/4} [Ai(−ζ) + i ζ^{−1/2} Ai′(−ζ)],    Φ̄ = (Φ₋ + Φ₊)/2.
/// ```
///
/// This is the form of physics notes §2.3 (`a = M₊e^{i(Δ−π/4)}`, `b = M₋e^{−i(Δ−π/4)}`) with
/// `e^{iΦ±}e^{±iΔ} = e^{iΦ̄}` taken exactly, so that neither exponential can overflow beyond the
/// cutoff where one saddle grows and the other decays.
pub fn uniform_weights(
    phi_minus: Complex64,
    phi_plus: Complex64,
    zeta: Complex64,
    zeta_sqrt: Complex64,
    zeta_quarter: Complex64,
) -> (Complex64, Complex64) {
    let mean = 0.5 * (phi_minus + phi_plus);
    let (ai, aip) = airy(-zeta);
    let c = std::f64::consts::PI.sqrt() * zeta_quarter;
    let t = Complex64::i() * aip / zeta_sqrt;
    let quarter = std::f64::consts::FRAC_PI_4;
    let w_plus = (Complex64::i() * (mean - quarter)).exp() * c * (ai - t);
    let w_minus = (Complex64::i() * (mean + quarter)).exp() * c * (ai + t);
    (w_minus, w_plus)
}

/// The uniform kernels `(K̃₋, K̃₊)` of a pair at one energy (module documentation).
pub fn uniform_pair(
    minus: &Saddle,
    plus: &Saddle,
    zeta: Complex64,
    zeta_sqrt: Complex64,
    zeta_quarter: Complex64,
    epsilon: f64,
) -> (Complex64, Complex64) {
    let (w_minus, w_plus) =
        uniform_weights(minus.action, plus.action, zeta, zeta_sqrt, zeta_quarter);
    (
        spreading_and_gauss(minus, epsilon) * w_minus,
        spreading_and_gauss(plus, epsilon) * w_plus,
    )
}

/// Kernels of every family of `table` for the chosen summation.
pub fn kernels(table: &OrbitTable, sum: SaddleSum, epsilon: f64) -> Kernels {
    let n = table.energies.len();
    let failed = Kernel {
        value: Complex64::new(0.0, 0.0),
        kind: KernelKind::Failed,
    };
    let mut values = vec![vec![failed; n]; table.families.len()];
    // The spreading and Gaussian factors of every solved saddle, computed once (the uniform
    // kernels below reuse them).
    let mut factors = vec![vec![Complex64::new(0.0, 0.0); n]; table.families.len()];
    for (f, (family, row)) in table.families.iter().zip(values.iter_mut()).enumerate() {
        for (k, (point, slot)) in family.points.iter().zip(row.iter_mut()).enumerate() {
            if let Some(s) = point.saddle() {
                let g = spreading_and_gauss(s, epsilon);
                factors[f][k] = g;
                *slot = if table.is_physical(f, k) {
                    Kernel {
                        value: g * (Complex64::i() * s.action).exp(),
                        kind: KernelKind::Plain,
                    }
                } else {
                    Kernel {
                        value: Complex64::new(0.0, 0.0),
                        kind: KernelKind::Excluded,
                    }
                };
            }
        }
    }
    if sum == SaddleSum::Uniform {
        for pair in &table.pairs {
            for (k, point) in pair.points.iter().enumerate() {
                let m = table.families[pair.minus].points[k].saddle();
                let p = table.families[pair.plus].points[k].saddle();
                let inside = table.inside_pulse(pair.minus, k) && table.inside_pulse(pair.plus, k);
                match (m, p, point) {
                    (Some(m), Some(p), Some(pp)) if inside => {
                        let (w_minus, w_plus) = uniform_weights(
                            m.action,
                            p.action,
                            pp.zeta,
                            pp.zeta_sqrt,
                            pp.zeta_quarter,
                        );
                        let km = factors[pair.minus][k] * w_minus;
                        let kp = factors[pair.plus][k] * w_plus;
                        values[pair.minus][k] = Kernel {
                            value: km,
                            kind: KernelKind::Uniform,
                        };
                        values[pair.plus][k] = Kernel {
                            value: kp,
                            kind: KernelKind::Uniform,
                        };
                    }
                    _ => {
                        for f in [pair.minus, pair.plus] {
                            if values[f][k].kind == KernelKind::Plain {
                                values[f][k].kind = KernelKind::PlainFallback;
                            }
                        }
                    }
                }
            }
        }
    }
    Kernels { values }
}
