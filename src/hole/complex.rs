//! The hole propagator continued to complex times.
//!
//! # Why complex times
//! The saddle-point evaluation of the time integrals of the harmonic amplitude evaluates every
//! slowly varying factor of the integrand at the complex saddle times; the interaction-picture
//! propagator `U_I(t, t − τ)` inside the integral therefore enters as `U_I(t_r, t_i)` at the
//! complex `t_r`, `t_i` (physics notes §4.2–§4.3). The generator
//! `V_I(t) = (V − E(t)·μ)_mn e^{i(Ip_m − Ip_n)t}` is an entire function of `t` (the field is a
//! trigonometric sum), so `U_I` continues analytically and does not depend on the path. We use
//! the contour `t_i → Re t_i` (the sub-barrier leg, where the hole already moves while the
//! electron tunnels), `Re t_i → Re t_r` (the real-time propagator of [`super::HolePropagator`])
//! and `Re t_r → t_r`. Freezing the hole under the barrier, `U_I(Re t_r, Re t_i)`
//! ([`HoleContour::Real`]), is the common-practice shortcut it replaces.
//!
//! # Method
//! With `Ũ(t) = e^{ic(t − t_start)} U_S(t, t_start)` the shifted Schrödinger propagator of
//! [`super::HolePropagator`] (`c` the centre of the `Ip` range) and
//! `L(t) = diag(e^{i(Ip_m − c)t + ic t_start})`, the interaction-picture propagator is
//! `U_I(t₂, t₁) = L(t₂) Ũ(t₂) Ũ(t₁)⁻¹ L(t₁)⁻¹` at any complex times. On the real axis `Ũ` comes
//! from the grid (`Ũ = L⁻¹ W`, Hermite-interpolated); off it, `dŨ/dt = −iH̃(t)Ũ` with
//! `H̃ = diag(Ip − c) + V − E(t)·μ` is integrated along straight segments with the sixth-order
//! Magnus integrator of Blanes, Casas and Ros (BIT 40, 434 (2000); the same formulas as
//! [`super::MagnusScheme::Sixth`], algebraic in the complex step `h`), each step's exponential
//! by scaling and squaring of its Taylor series (general complex matrices: `H̃` is not Hermitian
//! at complex `t`). The inverse `Ũ(t₁)⁻¹` is carried along with the exponentials of `−Ω`.
//! Sub-steps keep `|h|·‖H̃‖_F ≤` [`COMPLEX_STEP_PHASE`].
//!
//! [`ComplexHole::track`] follows a family of saddles along the photon energy: each point is
//! reached from the previous one by a short segment, so a whole family costs about one Magnus
//! step per point; the first point (and any point after a gap) is reached from the real axis.
//!
//! # Accuracy
//! Against SciPy `solve_ivp` along the same contour (`scripts/hole_complex_reference.py`,
//! `tests/hole.rs`): see the tests for the measured figures.

// Index loops mirror the matrix formulas (row i, column j) and unroll for fixed N.
#![allow(clippy::needless_range_loop)]

use nalgebra::{DMatrix, Matrix3};
use num_complex::Complex64;
use serde::Serialize;

use super::error::HoleError;
use super::ion::IonModel;
use super::propagator::HolePropagator;
use super::small::{Mat, identity, mul, zero};
use crate::field::{CVec3, Field};

/// Largest `|h|·‖H̃‖_F` of one sixth-order Magnus step off the real axis.
pub const COMPLEX_STEP_PHASE: f64 = 0.2;

/// Below this `|h|·‖H̃‖_F` a step uses the second-order midpoint rule (its error,
/// `~(|h|‖H̃‖)³ × (relative change of H̃ over the step)`, is then below 1e-13).
const MIDPOINT_PHASE: f64 = 2e-5;

/// Below this `|h|·‖H̃‖_F` a step uses the fourth-order Magnus integrator (two Gauss nodes; local
/// error `~(|h|‖H̃‖)⁵/720 ≤ 4e-10`), above it the sixth-order one.
const FOURTH_ORDER_PHASE: f64 = 0.05;

/// Which end of a segment's propagator is wanted.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Direction {
    /// `T(b ← a)`.
    Forward,
    /// `T(b ← a)⁻¹`.
    Backward,
}

/// Where the hole propagator of a saddle is evaluated.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum HoleContour {
    /// `U_I(t_r, t_i)` at the complex saddle times (the default; module documentation).
    #[default]
    Complex,
    /// `U_I(Re t_r, Re t_i)`: the hole frozen during the sub-barrier part of the path (the
    /// common-practice shortcut, kept for comparison).
    Real,
}

/// Propagator matrices along a sequence of saddle-time pairs: `N × N` row-major per entry, NaN
/// where the entry had no times.
#[derive(Clone, Debug)]
pub struct HoleTrack {
    channels: usize,
    values: Vec<Complex64>,
}

impl HoleTrack {
    /// `[U_I(t₂, t₁)]_mn` of entry `k`.
    #[inline]
    pub fn element(&self, k: usize, m: usize, n: usize) -> Complex64 {
        let c = self.channels;
        self.values[(k * c + m) * c + n]
    }

    /// Number of entries.
    pub fn len(&self) -> usize {
        self.values.len() / (self.channels * self.channels).max(1)
    }

    /// Whether there are no entries.
    pub fn is_empty(&self) -> bool {
        self.values.is_empty()
    }

    /// A track made of given matrices (None: NaN entries), e.g. evaluated one by one.
    pub fn from_matrices(channels: usize, matrices: &[Option<DMatrix<Complex64>>]) -> Self {
        let nan = Complex64::new(f64::NAN, f64::NAN);
        let mut values = Vec::with_capacity(matrices.len() * channels * channels);
        for m in matrices {
            for r in 0..channels {
                for c in 0..channels {
                    values.push(m.as_ref().map_or(nan, |m| m[(r, c)]));
                }
            }
        }
        HoleTrack { channels, values }
    }

    /// The whole matrix of entry `k`.
    pub fn matrix(&self, k: usize) -> DMatrix<Complex64> {
        let c = self.channels;
        DMatrix::from_fn(c, c, |m, n| self.element(k, m, n))
    }
}

/// The propagator of one orientation, continued to complex times.
pub struct ComplexHole<'a> {
    inner: Box<dyn Continuation + Send + Sync + 'a>,
}

impl std::fmt::Debug for ComplexHole<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("ComplexHole").finish_non_exhaustive()
    }
}

impl<'a> ComplexHole<'a> {
    /// The continuation of `real` (built from `ion` with `rotation` on samples of `field`) into
    /// the complex plane. `field` must be the field whose real samples built `real`.
    ///
    /// # Errors
    /// [`HoleError::ChannelCount`] if `ion` and `real` disagree on the number of channels.
    pub fn new(
        ion: &IonModel,
        rotation: &Matrix3<f64>,
        field: &'a Field,
        real: &'a HolePropagator,
    ) -> Result<Self, HoleError> {
        if ion.channels() != real.channels() {
            return Err(HoleError::ChannelCount {
                found: ion.channels(),
                max: real.channels(),
            });
        }
        let inner: Box<dyn Continuation + Send + Sync + 'a> = match ion.channels() {
            1 => Box::new(Generator::<1>::new(ion, rotation, field, real)),
            2 => Box::new(Generator::<2>::new(ion, rotation, field, real)),
            3 => Box::new(Generator::<3>::new(ion, rotation, field, real)),
            4 => Box::new(Generator::<4>::new(ion, rotation, field, real)),
            5 => Box::new(Generator::<5>::new(ion, rotation, field, real)),
            6 => Box::new(Generator::<6>::new(ion, rotation, field, real)),
            7 => Box::new(Generator::<7>::new(ion, rotation, field, real)),
            8 => Box::new(Generator::<8>::new(ion, rotation, field, real)),
            found => {
                return Err(HoleError::ChannelCount {
                    found,
                    max: super::MAX_CHANNELS,
                });
            }
        };
        Ok(ComplexHole { inner })
    }

    /// `U_I(t₂, t₁)` at complex times, each leg integrated from the real axis (the plain,
    /// direct evaluation).
    ///
    /// # Errors
    /// [`HoleError::TimeOutsideWindow`] if `Re t₂` or `Re t₁` lies outside the real grid.
    pub fn matrix(&self, t2: Complex64, t1: Complex64) -> Result<DMatrix<Complex64>, HoleError> {
        let track = self.inner.track(&[Some((t2, t1))], &[0])?;
        Ok(track.matrix(0))
    }

    /// Derivatives of `[U_I(t₂, t₁)]_mn` with respect to the two times at entry `k` of a track
    /// made by this propagator at the times `(t₂, t₁)` of that entry.
    pub fn derivatives(
        &self,
        track: &HoleTrack,
        k: usize,
        m: usize,
        n: usize,
        t2: Complex64,
        t1: Complex64,
    ) -> ElementDerivatives {
        self.inner.derivatives(track, k, m, n, t2, t1)
    }

    /// `U_I(t₂ᵏ, t₁ᵏ)` for every entry `k` of `times` (None: no saddle there), visiting the
    /// entries in the sequence `order` (a permutation of the indices, e.g. by increasing photon
    /// energy): each entry is reached from the previous one along a straight segment, the first
    /// one and any one after a gap from the real axis.
    ///
    /// # Errors
    /// [`HoleError::TimeOutsideWindow`] if the real part of a time lies outside the real grid.
    pub fn track(
        &self,
        times: &[Option<(Complex64, Complex64)>],
        order: &[usize],
    ) -> Result<HoleTrack, HoleError> {
        self.inner.track(times, order)
    }
}

trait Continuation {
    fn track(
        &self,
        times: &[Option<(Complex64, Complex64)>],
        order: &[usize],
    ) -> Result<HoleTrack, HoleError>;

    fn derivatives(
        &self,
        u: &HoleTrack,
        k: usize,
        m: usize,
        n: usize,
        t2: Complex64,
        t1: Complex64,
    ) -> ElementDerivatives;
}

/// `[U_I(t₂, t₁)]_mn` and its first and second derivatives with respect to the two times, from
/// `∂U/∂t₂ = −iV_I(t₂)U`, `∂U/∂t₁ = iU V_I(t₁)` (so `∂²U/∂t₂² = (−iV̇_I(t₂) − V_I(t₂)²)U`,
/// `∂²U/∂t₁² = U(iV̇_I(t₁) − V_I(t₁)²)`, `∂²U/∂t₂∂t₁ = V_I(t₂) U V_I(t₁)`), all at complex times.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ElementDerivatives {
    /// `U_mn`.
    pub value: Complex64,
    /// `[∂U_mn/∂t₂, ∂U_mn/∂t₁]`.
    pub first: [Complex64; 2],
    /// `[[∂²/∂t₂², ∂²/∂t₂∂t₁], [∂²/∂t₁∂t₂, ∂²/∂t₁²]]` of `U_mn`.
    pub second: [[Complex64; 2]; 2],
}

/// The generator of one orientation with its real-axis propagator.
struct Generator<'a, const N: usize> {
    /// `diag(Ip − c) + V`.
    statics: Mat<N>,
    /// `μ` in the lab frame.
    dipole: [Mat<N>; 3],
    /// Components of `μ` that are not identically zero.
    active: Vec<usize>,
    /// `‖diag(Ip − c) + V‖_F` and `‖μ_a‖_F`.
    static_norm: f64,
    dipole_norm: [f64; 3],
    /// `Ip_m − c`.
    shifted: [f64; N],
    /// `c`, the centre of the Ip range.
    centre: f64,
    /// Per field mode `(ν, 2ν‖a‖)`: `|E(t)| ≤ Σ 2ν‖a‖ cosh(ν Im t)` at complex `t`.
    mode_bounds: Vec<(f64, f64)>,
    field: &'a Field,
    real: &'a HolePropagator,
}

impl<'a, const N: usize> Generator<'a, N> {
    fn new(
        ion: &IonModel,
        rotation: &Matrix3<f64>,
        field: &'a Field,
        real: &'a HolePropagator,
    ) -> Self {
        let ip = ion.energies();
        let lowest = ip.iter().copied().fold(f64::INFINITY, f64::min);
        let highest = ip.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let centre = 0.5 * (lowest + highest);
        let to_mat = |m: &DMatrix<Complex64>| -> Mat<N> {
            let mut out = zero::<N>();
            for i in 0..N {
                for j in 0..N {
                    out[i][j] = m[(i, j)];
                }
            }
            out
        };
        let mut statics = to_mat(ion.coupling());
        let mut shifted = [0.0; N];
        for i in 0..N {
            shifted[i] = ip[i] - centre;
            statics[i][i] += Complex64::new(shifted[i], 0.0);
        }
        let mol = ion.dipole().clone().map(|m| to_mat(&m));
        let mut dipole = [zero::<N>(); 3];
        for (a, lab) in dipole.iter_mut().enumerate() {
            for i in 0..N {
                for j in 0..N {
                    lab[i][j] = mol[0][i][j] * rotation[(a, 0)]
                        + mol[1][i][j] * rotation[(a, 1)]
                        + mol[2][i][j] * rotation[(a, 2)];
                }
            }
        }
        let frob = |m: &Mat<N>| m.iter().flatten().map(|z| z.norm_sqr()).sum::<f64>().sqrt();
        let dipole_norm = [frob(&dipole[0]), frob(&dipole[1]), frob(&dipole[2])];
        let active = (0..3).filter(|&a| dipole_norm[a] > 0.0).collect();
        Generator {
            static_norm: frob(&statics),
            statics,
            dipole,
            active,
            dipole_norm,
            shifted,
            centre,
            mode_bounds: field
                .modes()
                .iter()
                .map(|m| (m.frequency, 2.0 * m.frequency * m.amplitude.norm()))
                .collect(),
            field,
            real,
        }
    }

    /// `H̃(t) = diag(Ip − c) + V − E(t)·μ` at complex `t`.
    #[inline(always)]
    fn hamiltonian(&self, e: &CVec3) -> Mat<N> {
        let mut h = self.statics;
        for &a in &self.active {
            let ea = e[a];
            for i in 0..N {
                for j in 0..N {
                    h[i][j] -= self.dipole[a][i][j] * ea;
                }
            }
        }
        h
    }

    /// A bound of `‖H̃(t)‖_F` over a straight segment whose largest `|Im t|` is `imag`, from the
    /// field's modes (no field evaluation): `‖S‖ + Σ_a ‖μ_a‖ Σ_k 2ν_k‖a_k‖ cosh(ν_k imag)`.
    #[inline(always)]
    fn norm_bound(&self, imag: f64) -> f64 {
        let e: f64 = self
            .mode_bounds
            .iter()
            .map(|&(nu, amp)| amp * (nu * imag).cosh())
            .sum();
        self.static_norm + e * self.dipole_norm.iter().sum::<f64>()
    }

    /// The Magnus generator `Ω` of one step from `t` by `h` (`e^{Ω}` advances `Ũ`): midpoint
    /// rule, fourth or sixth order by the step's phase `|h|·‖H̃‖`.
    #[inline(always)]
    fn omega(&self, t: Complex64, h: Complex64, phase: f64) -> Mat<N> {
        let mi = Complex64::new(0.0, -1.0);
        if phase <= MIDPOINT_PHASE {
            let (e, _) = self.field.electric_and_rate(t + 0.5 * h);
            scale(&self.hamiltonian(&e), mi * h)
        } else if phase <= FOURTH_ORDER_PHASE {
            // Ω = (B₁ + B₂)/2 + (√3/12)[B₂, B₁], B = −ih H̃ at t + (1/2 ∓ √3/6)h (Blanes, Casas,
            // Oteo, Ros, Phys. Rep. 470, 151 (2009), from memory; see MagnusScheme::Fourth).
            const SQRT3: f64 = 1.732_050_807_568_877_2;
            let (e1, _) = self.field.electric_and_rate(t + h * (0.5 - SQRT3 / 6.0));
            let (e2, _) = self.field.electric_and_rate(t + h * (0.5 + SQRT3 / 6.0));
            let b1 = scale(&self.hamiltonian(&e1), mi * h);
            let b2 = scale(&self.hamiltonian(&e2), mi * h);
            let c = commutator(&b2, &b1);
            let mut out = zero::<N>();
            for i in 0..N {
                for j in 0..N {
                    out[i][j] = 0.5 * (b1[i][j] + b2[i][j]) + c[i][j] * (SQRT3 / 12.0);
                }
            }
            out
        } else {
            self.omega_sixth(t, h)
        }
    }

    /// Sixth-order Magnus generator for `dU/ds = −i h H̃(t + sh) U`, `s ∈ [0, 1]`
    /// (Blanes, Casas and Ros, BIT 40, 434 (2000); see [`super::MagnusScheme::Sixth`]).
    fn omega_sixth(&self, t: Complex64, h: Complex64) -> Mat<N> {
        const SQRT15: f64 = 3.872_983_346_207_417;
        let nodes = [0.5 - SQRT15 / 10.0, 0.5, 0.5 + SQRT15 / 10.0];
        let mi = Complex64::new(0.0, -1.0);
        let hs: [Mat<N>; 3] = std::array::from_fn(|k| {
            let (e, _) = self.field.electric_and_rate(t + h * nodes[k]);
            self.hamiltonian(&e)
        });
        // α₁ = h A₂, α₂ = (√15 h/3)(A₃ − A₁), α₃ = (10h/3)(A₃ − 2A₂ + A₁), A = −iH̃.
        let mut a1 = zero::<N>();
        let mut a2 = zero::<N>();
        let mut a3 = zero::<N>();
        let c1h = mi * h;
        let c2h = mi * h * (SQRT15 / 3.0);
        let c3h = mi * h * (10.0 / 3.0);
        for i in 0..N {
            for j in 0..N {
                a1[i][j] = c1h * hs[1][i][j];
                a2[i][j] = c2h * (hs[2][i][j] - hs[0][i][j]);
                a3[i][j] = c3h * (hs[2][i][j] - 2.0 * hs[1][i][j] + hs[0][i][j]);
            }
        }
        let c1 = commutator(&a1, &a2);
        let mut inner = zero::<N>();
        for i in 0..N {
            for j in 0..N {
                inner[i][j] = 2.0 * a3[i][j] + c1[i][j];
            }
        }
        let c2 = commutator(&a1, &inner);
        let mut left = zero::<N>();
        let mut right = zero::<N>();
        for i in 0..N {
            for j in 0..N {
                left[i][j] = -20.0 * a1[i][j] - a3[i][j] + c1[i][j];
                right[i][j] = a2[i][j] * (1.0 / 240.0) - c2[i][j] * (1.0 / (60.0 * 240.0));
            }
        }
        let c3 = commutator(&left, &right);
        let mut out = zero::<N>();
        for i in 0..N {
            for j in 0..N {
                out[i][j] = a1[i][j] + a3[i][j] * (1.0 / 12.0) + c3[i][j];
            }
        }
        out
    }

    /// The propagator `T` of `dŨ/dt = −iH̃Ũ` along the segment `a → b`, or its inverse
    /// (the product of the steps' `e^{−Ω}` in reverse order).
    fn segment(&self, a: Complex64, b: Complex64, direction: Direction) -> Mat<N> {
        let d = b - a;
        let length = d.norm();
        if length == 0.0 {
            return identity::<N>();
        }
        let nu = self.norm_bound(a.im.abs().max(b.im.abs()));
        let n = ((length * nu) / COMPLEX_STEP_PHASE).ceil().max(1.0);
        let steps = n as usize;
        let h = d / n;
        let phase = h.norm() * nu;
        let mut out = identity::<N>();
        for k in 0..steps {
            let omega = self.omega(a + h * k as f64, h, phase);
            match direction {
                Direction::Forward => out = mul(&expm(&omega), &out),
                Direction::Backward => {
                    out = mul(&out, &expm(&scale(&omega, Complex64::new(-1.0, 0.0))))
                }
            }
        }
        out
    }

    /// `Ũ(t)` (forward) or `Ũ(t)⁻¹` (backward) at complex `t`, from the grid at `Re t` and the
    /// vertical leg.
    fn leave_axis(&self, t: Complex64, direction: Direction) -> Result<Mat<N>, HoleError> {
        let at = self.real.grid().locate("t", t.re)?;
        let w = self.real.w_matrix::<N>(&at);
        // Ũ(x) = L(x)⁻¹ W(x): row m divided by e^{i(Ip_m − c)x + ic t_start}.
        let (t_start, _) = self.real.window();
        let centre_phase = self.centre_phase(t_start);
        let mut u = w;
        for m in 0..N {
            let l = Complex64::cis(self.shifted[m] * t.re) * centre_phase;
            let inv = l.conj();
            for j in 0..N {
                u[m][j] *= inv;
            }
        }
        // Ũ(x) is unitary: its inverse is the adjoint.
        let mut u_inv = zero::<N>();
        for i in 0..N {
            for j in 0..N {
                u_inv[i][j] = u[j][i].conj();
            }
        }
        let x = Complex64::new(t.re, 0.0);
        match direction {
            Direction::Forward => Ok(mul(&self.segment(x, t, Direction::Forward), &u)),
            Direction::Backward => Ok(mul(&u_inv, &self.segment(x, t, Direction::Backward))),
        }
    }

    /// `e^{ic t_start}`.
    fn centre_phase(&self, t_start: f64) -> Complex64 {
        Complex64::cis(self.centre * t_start)
    }

    /// `L_m(t) = e^{i(Ip_m − c)t + ic t_start}`.
    #[inline(always)]
    fn left(&self, m: usize, t: Complex64, centre_phase: Complex64) -> Complex64 {
        (Complex64::i() * self.shifted[m] * t).exp() * centre_phase
    }
}

impl<const N: usize> Generator<'_, N> {
    /// `V_I(t)` and `dV_I/dt` at complex `t`: `V_I,mn = (V − E(t)·μ)_mn e^{i(Ip_m − Ip_n)t}`.
    fn interaction(&self, t: Complex64) -> (Mat<N>, Mat<N>) {
        let (e, de) = self.field.electric_and_rate(t);
        let mut v = self.statics;
        for i in 0..N {
            v[i][i] -= Complex64::new(self.shifted[i], 0.0);
        }
        let mut dv = zero::<N>();
        for &a in &self.active {
            for i in 0..N {
                for j in 0..N {
                    v[i][j] -= self.dipole[a][i][j] * e[a];
                    dv[i][j] -= self.dipole[a][i][j] * de[a];
                }
            }
        }
        let phase: [Complex64; N] =
            std::array::from_fn(|m| (Complex64::i() * self.shifted[m] * t).exp());
        for i in 0..N {
            for j in 0..N {
                let p = phase[i] / phase[j];
                let bohr = Complex64::new(0.0, self.shifted[i] - self.shifted[j]);
                v[i][j] *= p;
                dv[i][j] = dv[i][j] * p + bohr * v[i][j];
            }
        }
        (v, dv)
    }
}

impl<const N: usize> Continuation for Generator<'_, N> {
    fn derivatives(
        &self,
        u: &HoleTrack,
        k: usize,
        m: usize,
        n: usize,
        t2: Complex64,
        t1: Complex64,
    ) -> ElementDerivatives {
        let i = Complex64::i();
        let um: Mat<N> = std::array::from_fn(|r| std::array::from_fn(|c| u.element(k, r, c)));
        let (v2, dv2) = self.interaction(t2);
        let (v1, dv1) = self.interaction(t1);
        // Row m of V₂, V₂² and V̇₂; column n of V₁, V₁² and V̇₁.
        let row = |a: &Mat<N>| -> [Complex64; N] { a[m] };
        let col = |a: &Mat<N>| -> [Complex64; N] { std::array::from_fn(|r| a[r][n]) };
        let v2sq = mul(&v2, &v2);
        let v1sq = mul(&v1, &v1);
        // (x U y)_mn for a row x (of the left factor) and a column y (of the right factor).
        let sandwich = |x: &[Complex64; N], y: &[Complex64; N]| -> Complex64 {
            let mut s = Complex64::new(0.0, 0.0);
            for a in 0..N {
                if x[a] == Complex64::new(0.0, 0.0) {
                    continue;
                }
                for b in 0..N {
                    s += x[a] * um[a][b] * y[b];
                }
            }
            s
        };
        let unit_row: [Complex64; N] =
            std::array::from_fn(|a| Complex64::new(f64::from(u8::from(a == m)), 0.0));
        let unit_col: [Complex64; N] =
            std::array::from_fn(|a| Complex64::new(f64::from(u8::from(a == n)), 0.0));
        let value = um[m][n];
        let d2 = -i * sandwich(&row(&v2), &unit_col);
        let d1 = i * sandwich(&unit_row, &col(&v1));
        let rr = sandwich(&row(&dv2), &unit_col) * (-i) - sandwich(&row(&v2sq), &unit_col);
        let ii = sandwich(&unit_row, &col(&dv1)) * i - sandwich(&unit_row, &col(&v1sq));
        let ri = sandwich(&row(&v2), &col(&v1));
        ElementDerivatives {
            value,
            first: [d2, d1],
            second: [[rr, ri], [ri, ii]],
        }
    }

    fn track(
        &self,
        times: &[Option<(Complex64, Complex64)>],
        order: &[usize],
    ) -> Result<HoleTrack, HoleError> {
        let nan = Complex64::new(f64::NAN, f64::NAN);
        let mut values = vec![nan; times.len() * N * N];
        let (t_start, _) = self.real.window();
        let cp = self.centre_phase(t_start);
        // (t_r, Ũ(t_r), t_i, Ũ(t_i)⁻¹) of the previous entry.
        let mut state: Option<(Complex64, Mat<N>, Complex64, Mat<N>)> = None;
        for &k in order {
            let Some((t2, t1)) = times.get(k).copied().flatten() else {
                state = None;
                continue;
            };
            let (u2, g1) = match state {
                None => (
                    self.leave_axis(t2, Direction::Forward)?,
                    self.leave_axis(t1, Direction::Backward)?,
                ),
                Some((p2, u2, p1, g1)) => (
                    mul(&self.segment(p2, t2, Direction::Forward), &u2),
                    mul(&g1, &self.segment(p1, t1, Direction::Backward)),
                ),
            };
            let core = mul(&u2, &g1);
            for m in 0..N {
                let lm = self.left(m, t2, cp);
                for n in 0..N {
                    let ln = self.left(n, t1, cp);
                    values[(k * N + m) * N + n] = lm * core[m][n] / ln;
                }
            }
            state = Some((t2, u2, t1, g1));
        }
        Ok(HoleTrack {
            channels: N,
            values,
        })
    }
}

/// `s x` for a complex scalar.
#[inline(always)]
fn scale<const N: usize>(x: &Mat<N>, s: Complex64) -> Mat<N> {
    let mut out = *x;
    for row in out.iter_mut() {
        for v in row.iter_mut() {
            *v *= s;
        }
    }
    out
}

/// `[x, y] = xy − yx`.
#[inline(always)]
fn commutator<const N: usize>(x: &Mat<N>, y: &Mat<N>) -> Mat<N> {
    let a = mul(x, y);
    let b = mul(y, x);
    let mut c = zero::<N>();
    for i in 0..N {
        for j in 0..N {
            c[i][j] = a[i][j] - b[i][j];
        }
    }
    c
}

/// `e^x` of a general complex matrix: scaling and squaring of the Taylor series (C. Moler and
/// C. Van Loan, SIAM Rev. 45, 3 (2003), method 3, from memory). `x` is scaled by `2^{−s}` to a
/// 1-norm bound `θ ≤ 1/4` (bounded with `|re| + |im|`); the Taylor degree `d ≤ 12` is the
/// smallest with `θ^{d+1}/(d+1)! ≤ 1e-17`, evaluated by the Paterson–Stockmeyer scheme in
/// powers of `y³` (Higham, *Functions of Matrices*, SIAM 2008, §4.2, from memory): four
/// matrix products up to degree 8.
fn expm<const N: usize>(x: &Mat<N>) -> Mat<N> {
    let mut norm = 0.0_f64;
    for j in 0..N {
        let mut s = 0.0;
        for row in x.iter() {
            s += row[j].re.abs() + row[j].im.abs();
        }
        norm = norm.max(s);
    }
    if !norm.is_finite() {
        return [[Complex64::new(f64::NAN, f64::NAN); N]; N];
    }
    let mut squarings = 0u32;
    let mut theta = norm;
    while theta > 0.25 {
        theta *= 0.5;
        squarings += 1;
    }
    let y = if squarings == 0 {
        *x
    } else {
        scale(x, Complex64::new(0.5f64.powi(squarings as i32), 0.0))
    };
    let mut degree = 1usize;
    let mut term = theta;
    while degree < 12 {
        term *= theta / (degree + 1) as f64;
        if term <= 1e-17 {
            break;
        }
        degree += 1;
    }
    // Taylor coefficients 1/k!.
    let mut c = [0.0f64; 13];
    c[0] = 1.0;
    for k in 1..=degree {
        c[k] = c[k - 1] / k as f64;
    }
    let y2 = mul(&y, &y);
    let y3 = mul(&y2, &y);
    // p(y) = Σ_j (c_{3j} + c_{3j+1} y + c_{3j+2} y²) (y³)^j, Horner in y³.
    let blocks = degree / 3 + 1;
    let block = |j: usize| -> Mat<N> {
        let mut b = zero::<N>();
        for r in 0..N {
            for col in 0..N {
                let mut v = y[r][col] * c.get(3 * j + 1).copied().unwrap_or(0.0)
                    + y2[r][col] * c.get(3 * j + 2).copied().unwrap_or(0.0);
                if r == col {
                    v += Complex64::new(c[3 * j], 0.0);
                }
                b[r][col] = v;
            }
        }
        b
    };
    let mut r = block(blocks - 1);
    for j in (0..blocks - 1).rev() {
        let mut t = mul(&y3, &r);
        let b = block(j);
        for i in 0..N {
            for k in 0..N {
                t[i][k] += b[i][k];
            }
        }
        r = t;
    }
    for _ in 0..squarings {
        r = mul(&r, &r);
    }
    r
}

#[cfg(test)]
mod tests {
    use super::{expm, mul};
    use num_complex::Complex64;

    #[test]
    fn matrix_exponential_inverts_and_matches_a_diagonalisable_case() {
        // Mathematics: e^{x} e^{−x} = 1; for x = P diag(λ) P⁻¹, e^{x} = P diag(e^{λ}) P⁻¹.
        let c = Complex64::new;
        // x = [[a, b], [0, d]] (upper triangular): e^x = [[e^a, b (e^a − e^d)/(a − d)], [0, e^d]].
        let (a, b, d) = (c(0.3, -1.7), c(-0.8, 0.4), c(-1.1, 2.5));
        let x = [[a, b], [c(0.0, 0.0), d]];
        let e = expm(&x);
        let expected = [
            [a.exp(), b * (a.exp() - d.exp()) / (a - d)],
            [c(0.0, 0.0), d.exp()],
        ];
        for i in 0..2 {
            for j in 0..2 {
                assert!((e[i][j] - expected[i][j]).norm() < 1e-14, "{i}{j}");
            }
        }
        let minus = [[-a, -b], [c(0.0, 0.0), -d]];
        let p = mul(&e, &expm(&minus));
        assert!((p[0][0] - 1.0).norm() < 1e-14 && p[0][1].norm() < 1e-14);
    }
}
