//! One Magnus step for the channel Hamiltonian of one orientation.
//!
//! The step propagates the Schrödinger equation `i dŨ/dt = H̃(t) Ũ` with the shifted Hamiltonian
//! `H̃(t) = diag(Ip − c) + V − E(t)·μ_lab`, where `c` is the centre of the range of the `Ip`.
//! The shift only multiplies the propagator by the scalar phase `e^{−ic(t−t₀)}`, which the caller
//! takes back out exactly; it halves the norm of the generator. Stepping in the Schrödinger rather
//! than in the interaction picture puts the large constant part `diag(Ip)` into the exponential,
//! where it is treated exactly: the step error then comes only from the slow time dependence of
//! `E(t)` (and its commutators with the static part), not from the fast Bohr phases
//! `e^{i(Ip_m−Ip_n)t}` that the interaction-picture generator carries.

// Index loops mirror the matrix formulas (row i, column j) and unroll for fixed N.
#![allow(clippy::needless_range_loop)]

use super::small::{Mat, combine, commutator_skew, zero};

/// Which Magnus integrator builds the propagator grid.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum MagnusScheme {
    /// Fourth order, two Gauss–Legendre nodes:
    /// `Ω = (h/2)(A₁ + A₂) + (√3 h²/12)[A₂, A₁]` with `A = −iH(t)` at `t_k + (1/2 ∓ √3/6) h`
    /// (Blanes, Casas, Oteo, Ros, Phys. Rep. 470, 151 (2009), §4, from memory; global error
    /// `O(h⁴)`). The plain reference path.
    Fourth,
    /// Sixth order, three Gauss–Legendre nodes `t_k + (1/2 − √15/10, 1/2, 1/2 + √15/10) h`:
    /// with `α₁ = hA₂`, `α₂ = (√15h/3)(A₃ − A₁)`, `α₃ = (10h/3)(A₃ − 2A₂ + A₁)`,
    /// `C₁ = [α₁, α₂]`, `C₂ = −(1/60)[α₁, 2α₃ + C₁]`,
    /// `Ω = α₁ + α₃/12 + (1/240)[−20α₁ − α₃ + C₁, α₂ + C₂]`
    /// (Blanes, Casas, Ros, BIT 40, 434 (2000); from memory, order verified numerically:
    /// the error falls 64-fold per halving of the step). Global error `O(h⁶)`. The default.
    #[default]
    Sixth,
}

const SQRT3: f64 = 1.732_050_807_568_877_2;
const SQRT15: f64 = 3.872_983_346_207_417;

/// Gauss–Legendre nodes of [`MagnusScheme::Fourth`] as fractions of a step.
pub(crate) const FOURTH_NODES: [f64; 2] = [0.5 - SQRT3 / 6.0, 0.5 + SQRT3 / 6.0];
/// Gauss–Legendre nodes of [`MagnusScheme::Sixth`] as fractions of a step.
pub(crate) const SIXTH_NODES: [f64; 3] = [0.5 - SQRT15 / 10.0, 0.5, 0.5 + SQRT15 / 10.0];

/// The Hamiltonian of one orientation in the channel basis, split into its parts.
pub(crate) struct ChannelHamiltonian<const N: usize> {
    /// `diag(Ip − c) + V` (Hermitian).
    pub shifted_static: Mat<N>,
    /// `V` (Hermitian).
    pub coupling: Mat<N>,
    /// `μ` rotated to the lab frame, components x, y, z (Hermitian).
    pub dipole_lab: [Mat<N>; 3],
}

impl<const N: usize> ChannelHamiltonian<N> {
    /// `base − Σ_a e_a μ_a` for a Hermitian `base`, computed on the upper triangle and mirrored,
    /// so the result is Hermitian to the last bit.
    #[inline(always)]
    pub fn hermitian(&self, base: &Mat<N>, e: [f64; 3]) -> Mat<N> {
        let mut m = zero::<N>();
        for i in 0..N {
            for j in i..N {
                let v = base[i][j]
                    - self.dipole_lab[0][i][j] * e[0]
                    - self.dipole_lab[1][i][j] * e[1]
                    - self.dipole_lab[2][i][j] * e[2];
                if i == j {
                    m[i][i].re = v.re;
                } else {
                    m[i][j] = v;
                    m[j][i] = v.conj();
                }
            }
        }
        m
    }

    /// `−i s (B − Σ_a e_a μ_a)` with `B` the shifted static part (if `with_static`) or zero:
    /// exactly anti-Hermitian.
    #[inline(always)]
    fn skew(&self, scale: f64, with_static: bool, e: [f64; 3]) -> Mat<N> {
        let mut m = zero::<N>();
        for i in 0..N {
            for j in i..N {
                let mut v = -(self.dipole_lab[0][i][j] * e[0]
                    + self.dipole_lab[1][i][j] * e[1]
                    + self.dipole_lab[2][i][j] * e[2]);
                if with_static {
                    v += self.shifted_static[i][j];
                }
                if i == j {
                    m[i][i].im = -scale * v.re;
                } else {
                    // −i s v
                    let w = num_complex::Complex64::new(scale * v.im, -scale * v.re);
                    m[i][j] = w;
                    m[j][i] = -w.conj();
                }
            }
        }
        m
    }

    /// The sixth-order Magnus generator of one step of length `h`, from the lab-frame field at
    /// the three nodes [`SIXTH_NODES`].
    #[inline(always)]
    pub fn omega_sixth(&self, h: f64, e: &[[f64; 3]; 3]) -> Mat<N> {
        let [e1, e2, e3] = *e;
        let d1 = [e3[0] - e1[0], e3[1] - e1[1], e3[2] - e1[2]];
        let d2 = [
            e3[0] - 2.0 * e2[0] + e1[0],
            e3[1] - 2.0 * e2[1] + e1[1],
            e3[2] - 2.0 * e2[2] + e1[2],
        ];
        let a1 = self.skew(h, true, e2);
        let a2 = self.skew(SQRT15 * h / 3.0, false, d1);
        let a3 = self.skew(10.0 * h / 3.0, false, d2);
        let c1 = commutator_skew(&a1, &a2);
        // C₂ = −(1/60)[α₁, 2α₃ + C₁]; the factor 1/240 of the last commutator is folded into
        // its right argument.
        let c2_unscaled = commutator_skew(&a1, &combine([(2.0, &a3), (1.0, &c1)]));
        let left = combine([(-20.0, &a1), (-1.0, &a3), (1.0, &c1)]);
        let right = combine([(1.0 / 240.0, &a2), (-1.0 / (60.0 * 240.0), &c2_unscaled)]);
        let c3 = commutator_skew(&left, &right);
        combine([(1.0, &a1), (1.0 / 12.0, &a3), (1.0, &c3)])
    }

    /// The fourth-order Magnus generator of one step of length `h`, from the lab-frame field at
    /// the two nodes [`FOURTH_NODES`].
    #[inline(always)]
    pub fn omega_fourth(&self, h: f64, e: &[[f64; 3]; 2]) -> Mat<N> {
        let a1 = self.skew(1.0, true, e[0]);
        let a2 = self.skew(1.0, true, e[1]);
        let c = commutator_skew(&a2, &a1);
        combine([(0.5 * h, &a1), (0.5 * h, &a2), (SQRT3 * h * h / 12.0, &c)])
    }
}
