//! The interaction-picture propagator of one orientation on the grid, and its lookup at arbitrary
//! times.

// Index loops mirror the matrix formulas (row i, column j) and unroll for fixed N.
#![allow(clippy::needless_range_loop)]

use nalgebra::{DMatrix, Matrix3};
use num_complex::Complex64;

use super::error::HoleError;
use super::grid::{Grid, GridTime};
use super::ion::{IonModel, MAX_CHANNELS};
use super::magnus::{ChannelHamiltonian, MagnusScheme};
use super::samples::FieldSamples;
use super::small::{Mat, identity, mul, unitary_exp, zero};

/// Largest allowed entry of `|RᵀR − I|` for the rotation matrix.
pub const ROTATION_TOLERANCE: f64 = 1e-10;

/// Nodes between exact recomputations of the channel phases `e^{i(Ip_m−c)τ}` (which are advanced
/// by multiplication in between; the rounding drift over 64 products is ~1e-14).
const PHASE_REFRESH: usize = 64;

const ZERO: Complex64 = Complex64::new(0.0, 0.0);

/// `U_I(t, t_start)` of one molecular orientation on the grid of a [`FieldSamples`], with element
/// lookup at arbitrary times of the window.
///
/// Holds, for every grid node `t_k`, the matrix `W_k = U_I(t_k, t_start) D` and its time
/// derivative `−i V_I(t_k) W_k`, where `D = diag(e^{i Ip_n t_start})` is a constant diagonal phase
/// that cancels in `U_I(t₂, t₁) = W(t₂) W(t₁)†`. Between nodes, each row of `W(t)` is the Hermite
/// interpolant of degree 7 through the values and derivatives at the four nearest nodes. See the
/// module documentation for the error model.
#[derive(Debug, Clone, PartialEq)]
pub struct HolePropagator {
    channels: usize,
    grid: Grid,
    /// Layout `[row m][node k][2N]`: entries `0..N` hold row `m` of `W_k`, entries `N..2N` the
    /// same row of `h · dW/dt` at `t_k`.
    data: Vec<Complex64>,
}

impl HolePropagator {
    /// Builds the propagator of one orientation with the default (sixth-order) scheme.
    ///
    /// `rotation` is the proper or improper orthogonal matrix `R` that takes molecular-frame
    /// vectors to the lab frame, `v_lab = R v_mol`; the field couples through
    /// `E_lab·μ_lab = (Rᵀ E_lab)·μ_mol`. How `R` relates to Euler angles is the caller's choice
    /// (e.g. `R = R_z(α) R_y(β) R_z(γ)` for active ZYZ angles).
    ///
    /// # Errors
    /// [`HoleError::Rotation`] if `R` has a non-finite entry or `|RᵀR − I|` has an entry above
    /// [`ROTATION_TOLERANCE`].
    pub fn new(
        ion: &IonModel,
        rotation: &Matrix3<f64>,
        samples: &FieldSamples,
    ) -> Result<Self, HoleError> {
        Self::with_scheme(ion, rotation, samples, MagnusScheme::default())
    }

    /// As [`HolePropagator::new`], with a chosen Magnus scheme (the fourth-order one is the
    /// plain reference path; the sixth-order one is the default).
    ///
    /// # Errors
    /// As [`HolePropagator::new`].
    pub fn with_scheme(
        ion: &IonModel,
        rotation: &Matrix3<f64>,
        samples: &FieldSamples,
        scheme: MagnusScheme,
    ) -> Result<Self, HoleError> {
        check_rotation(rotation)?;
        let data = match ion.channels() {
            1 => build::<1>(ion, rotation, samples, scheme),
            2 => build::<2>(ion, rotation, samples, scheme),
            3 => build::<3>(ion, rotation, samples, scheme),
            4 => build::<4>(ion, rotation, samples, scheme),
            5 => build::<5>(ion, rotation, samples, scheme),
            6 => build::<6>(ion, rotation, samples, scheme),
            7 => build::<7>(ion, rotation, samples, scheme),
            8 => build::<8>(ion, rotation, samples, scheme),
            found => {
                return Err(HoleError::ChannelCount {
                    found,
                    max: MAX_CHANNELS,
                });
            }
        };
        Ok(Self {
            channels: ion.channels(),
            grid: samples.grid(),
            data,
        })
    }

    /// Number of channels.
    pub fn channels(&self) -> usize {
        self.channels
    }

    /// The window `(t_start, t_end)` (a.u.) in which times may be looked up.
    pub fn window(&self) -> (f64, f64) {
        (self.grid.t_start, self.grid.t_end)
    }

    /// The grid step (a.u.).
    pub fn step(&self) -> f64 {
        self.grid.step
    }

    /// `[U_I(t2, t1)]_mn`, the amplitude to find the ion in channel `m` at `t2` when it was in
    /// channel `n` at `t1`, in the interaction picture of `H₀ = diag(Ip)`. The Schrödinger-picture
    /// element is `e^{−i Ip_m t2} [U_I]_mn e^{+i Ip_n t1}`. Any order of `t2` and `t1` is allowed
    /// (`U_I(t1, t2) = U_I(t2, t1)†`).
    ///
    /// Cost: two rows interpolated on four nodes and one dot product; no allocation.
    ///
    /// # Errors
    /// [`HoleError::ChannelIndex`] for `m` or `n` not below [`HolePropagator::channels`];
    /// [`HoleError::TimeOutsideWindow`] for a time that is not finite or lies outside the window
    /// (by more than a rounding slack of `1e-12 · max(1, |t_start|, |t_end|)`).
    pub fn element(&self, m: usize, n: usize, t2: f64, t1: f64) -> Result<Complex64, HoleError> {
        self.check_channel("m", m)?;
        self.check_channel("n", n)?;
        let at2 = self.grid.locate("t2", t2)?;
        let at1 = self.grid.locate("t1", t1)?;
        Ok(self.element_unchecked(m, n, &at2, &at1))
    }

    /// As [`HolePropagator::element`], for times already resolved on the grid with
    /// [`FieldSamples::locate`] (which skips the window check and the interpolation weights:
    /// worth it when the same times are looked up for many orientations).
    ///
    /// # Errors
    /// [`HoleError::ChannelIndex`] as for [`HolePropagator::element`];
    /// [`HoleError::GridMismatch`] if a time was resolved on another [`FieldSamples`] grid.
    pub fn element_at(
        &self,
        m: usize,
        n: usize,
        t2: &GridTime,
        t1: &GridTime,
    ) -> Result<Complex64, HoleError> {
        self.check_channel("m", m)?;
        self.check_channel("n", n)?;
        for (parameter, t) in [("t2", t2), ("t1", t1)] {
            if t.grid != self.grid {
                return Err(HoleError::GridMismatch {
                    parameter,
                    time: t.time(),
                    located_start: t.grid.t_start,
                    located_end: t.grid.t_end,
                    located_steps: t.grid.steps,
                    own_start: self.grid.t_start,
                    own_end: self.grid.t_end,
                    own_steps: self.grid.steps,
                });
            }
        }
        Ok(self.element_unchecked(m, n, t2, t1))
    }

    #[inline(always)]
    fn element_unchecked(&self, m: usize, n: usize, t2: &GridTime, t1: &GridTime) -> Complex64 {
        let rows2 = self.stencil(m, t2.first);
        let rows1 = self.stencil(n, t1.first);
        match self.channels {
            1 => dot_rows::<1>(rows2, &t2.weights, rows1, &t1.weights),
            2 => dot_rows::<2>(rows2, &t2.weights, rows1, &t1.weights),
            3 => dot_rows::<3>(rows2, &t2.weights, rows1, &t1.weights),
            4 => dot_rows::<4>(rows2, &t2.weights, rows1, &t1.weights),
            5 => dot_rows::<5>(rows2, &t2.weights, rows1, &t1.weights),
            6 => dot_rows::<6>(rows2, &t2.weights, rows1, &t1.weights),
            7 => dot_rows::<7>(rows2, &t2.weights, rows1, &t1.weights),
            _ => dot_rows::<8>(rows2, &t2.weights, rows1, &t1.weights),
        }
    }

    /// The whole matrix `U_I(t2, t1)` (see [`HolePropagator::element`]).
    ///
    /// # Errors
    /// [`HoleError::TimeOutsideWindow`] as for [`HolePropagator::element`].
    pub fn matrix(&self, t2: f64, t1: f64) -> Result<DMatrix<Complex64>, HoleError> {
        let u2 = self.matrix_from_start("t2", t2)?;
        let u1 = self.matrix_from_start("t1", t1)?;
        Ok(u2 * u1.adjoint())
    }

    /// `U_I(t, t_start)` interpolated at `t`.
    fn matrix_from_start(
        &self,
        parameter: &'static str,
        t: f64,
    ) -> Result<DMatrix<Complex64>, HoleError> {
        let at = self.grid.locate(parameter, t)?;
        let (first, w) = (at.first, at.weights);
        let nc = self.channels;
        let stride = 2 * nc;
        let mut u = DMatrix::from_element(nc, nc, ZERO);
        for m in 0..nc {
            let rows = self.stencil(m, first);
            for j in 0..nc {
                let mut a = ZERO;
                for i in 0..4 {
                    let o = i * stride + j;
                    a += rows[o] * w[i] + rows[o + nc] * w[4 + i];
                }
                u[(m, j)] = a;
            }
        }
        Ok(u)
    }

    /// `W(t) = U_I(t, t_start) D` (the stored, Hermite-interpolated matrix; `D` is the constant
    /// diagonal phase `diag(e^{i Ip_n t_start})`) at a located real time, as a fixed-size matrix.
    /// `N` must equal [`HolePropagator::channels`].
    pub(crate) fn w_matrix<const N: usize>(&self, at: &GridTime) -> Mat<N> {
        debug_assert_eq!(N, self.channels);
        let (first, w) = (at.first, at.weights);
        let stride = 2 * N;
        let mut u = zero::<N>();
        for (m, row) in u.iter_mut().enumerate() {
            let rows = self.stencil(m, first);
            for (j, slot) in row.iter_mut().enumerate() {
                let mut a = ZERO;
                for i in 0..4 {
                    let o = i * stride + j;
                    a += rows[o] * w[i] + rows[o + N] * w[4 + i];
                }
                *slot = a;
            }
        }
        u
    }

    /// The grid of the propagator.
    pub(crate) fn grid(&self) -> Grid {
        self.grid
    }

    /// The stored data of row `m` at the four nodes `first..first + 4`.
    #[inline(always)]
    fn stencil(&self, m: usize, first: usize) -> &[Complex64] {
        let stride = 2 * self.channels;
        let start = (m * (self.grid.steps + 1) + first) * stride;
        &self.data[start..start + 4 * stride]
    }

    fn check_channel(&self, parameter: &'static str, value: usize) -> Result<(), HoleError> {
        if value < self.channels {
            Ok(())
        } else {
            Err(HoleError::ChannelIndex {
                parameter,
                value,
                channels: self.channels,
            })
        }
    }
}

/// `Σ_j a_j conj(b_j)` with `a`, `b` the rows interpolated from two four-node stencils
/// (layout of [`HolePropagator`]'s data; `N` is the number of channels, ≤ 8).
#[inline(always)]
fn dot_rows<const N: usize>(
    rows2: &[Complex64],
    w2: &[f64; 8],
    rows1: &[Complex64],
    w1: &[f64; 8],
) -> Complex64 {
    let stride = 2 * N;
    let rows2 = &rows2[..4 * stride];
    let rows1 = &rows1[..4 * stride];
    let mut acc = ZERO;
    for j in 0..N {
        let mut a = ZERO;
        let mut b = ZERO;
        for i in 0..4 {
            let o = i * stride + j;
            a += rows2[o] * w2[i] + rows2[o + N] * w2[4 + i];
            b += rows1[o] * w1[i] + rows1[o + N] * w1[4 + i];
        }
        acc += a * b.conj();
    }
    acc
}

fn check_rotation(r: &Matrix3<f64>) -> Result<(), HoleError> {
    if r.iter().any(|v| !v.is_finite()) {
        return Err(HoleError::Rotation {
            reason: "an entry is not finite",
            deviation: f64::NAN,
            allowed: ROTATION_TOLERANCE,
        });
    }
    let gram = r.transpose() * r - Matrix3::identity();
    let deviation = gram.iter().fold(0.0_f64, |a, v| a.max(v.abs()));
    if deviation > ROTATION_TOLERANCE {
        return Err(HoleError::Rotation {
            reason: "the matrix is not orthogonal",
            deviation,
            allowed: ROTATION_TOLERANCE,
        });
    }
    Ok(())
}

fn to_mat<const N: usize>(m: &DMatrix<Complex64>) -> Mat<N> {
    let mut out = zero::<N>();
    for (i, row) in out.iter_mut().enumerate() {
        for (j, v) in row.iter_mut().enumerate() {
            *v = m[(i, j)];
        }
    }
    out
}

/// Propagates over the grid and stores `W_k` and `h dW/dt` at every node.
///
/// Steps `Ũ(t_{k+1}) = e^{Ω_k} Ũ(t_k)` for the shifted Schrödinger propagator
/// `Ũ(t) = e^{ic(t−t_start)} U_S(t, t_start)` (see [`super::magnus`]). Since
/// `U_I(t, t_start) = e^{iH₀t} U_S(t, t_start) e^{−iH₀t_start}`, one has `W_k = L_k Ũ(t_k)` with
/// `L_k = diag(e^{i Ip_m t_k − ic(t_k − t_start)})`, and `dW/dt = −i L_k (V − E(t_k)·μ) Ũ(t_k)`.
fn build<const N: usize>(
    ion: &IonModel,
    rotation: &Matrix3<f64>,
    samples: &FieldSamples,
    scheme: MagnusScheme,
) -> Vec<Complex64> {
    let ip = ion.energies();
    let lowest = ip.iter().copied().fold(f64::INFINITY, f64::min);
    let highest = ip.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let centre = 0.5 * (lowest + highest);

    let coupling = to_mat::<N>(ion.coupling());
    let mol = ion.dipole();
    let mol = [
        to_mat::<N>(&mol[0]),
        to_mat::<N>(&mol[1]),
        to_mat::<N>(&mol[2]),
    ];
    let mut dipole_lab = [zero::<N>(); 3];
    for (a, lab) in dipole_lab.iter_mut().enumerate() {
        for i in 0..N {
            for j in 0..N {
                lab[i][j] = mol[0][i][j] * rotation[(a, 0)]
                    + mol[1][i][j] * rotation[(a, 1)]
                    + mol[2][i][j] * rotation[(a, 2)];
            }
        }
    }
    let mut shifted_static = coupling;
    for i in 0..N {
        shifted_static[i][i].re += ip[i] - centre;
    }
    let ham = ChannelHamiltonian {
        shifted_static,
        coupling,
        dipole_lab,
    };

    let n = samples.steps();
    let nodes = n + 1;
    let h = samples.step();
    let t_start = samples.t_start();
    let stride = 2 * N;
    let mut data = vec![ZERO; N * nodes * stride];

    let start_phase: [Complex64; N] = std::array::from_fn(|m| Complex64::cis(ip[m] * t_start));
    let step_phase: [Complex64; N] = std::array::from_fn(|m| Complex64::cis((ip[m] - centre) * h));
    let mut left = start_phase;
    let minus_i_h = Complex64::new(0.0, -h);

    let node_fields = samples.node_fields();
    let sixth = samples.sixth_fields();
    let fourth = samples.fourth_fields();
    let omega = |k: usize| match scheme {
        MagnusScheme::Sixth => ham.omega_sixth(h, &sixth[k]),
        MagnusScheme::Fourth => ham.omega_fourth(h, &fourth[k]),
    };
    let mut u: Mat<N> = identity::<N>();
    for k in 0..nodes {
        if k % PHASE_REFRESH == 0 {
            let tau = k as f64 * h;
            for m in 0..N {
                left[m] = start_phase[m] * Complex64::cis((ip[m] - centre) * tau);
            }
        }
        let g = ham.hermitian(&ham.coupling, node_fields[k]);
        let gu = mul(&g, &u);
        for m in 0..N {
            let base = (m * nodes + k) * stride;
            let out = &mut data[base..base + stride];
            let lm = left[m];
            let lm_d = lm * minus_i_h;
            for j in 0..N {
                out[j] = lm * u[m][j];
                out[N + j] = lm_d * gu[m][j];
            }
        }
        if k < n {
            u = mul(&unitary_exp(&omega(k)), &u);
            for m in 0..N {
                left[m] *= step_phase[m];
            }
        }
    }
    data
}
