//! The ionic (hole) propagator: how the laser moves the hole between the ion's channels while
//! the electron travels.
//!
//! # Physics
//! In the basis of its `N` channels (ionic states) the ion has, in atomic units and the length
//! gauge, `H(t)_mn = Ip_m δ_mn + V_mn − E(t)·μ_mn` ([`IonModel`]; electron charge −1, `μ` taken
//! as given). The harmonic amplitude needs the propagator in the interaction picture of
//! `H₀ = diag(Ip)`,
//!
//! `V_I(t)_mn = (V − E(t)·μ)_mn e^{i(Ip_m − Ip_n)t}`,  `i dU_I/dt = V_I(t) U_I`,
//!
//! because the fast phases of the Schrödinger propagator
//! `U_mn(t₂, t₁) = e^{−i Ip_m t₂} [U_I(t₂, t₁)]_mn e^{+i Ip_n t₁}` are already part of the
//! saddle-point phase of each channel pair (Smirnova et al., Nature 460, 972 (2009); from memory).
//! The element `[U_I(Re t_r, Re t_i)]_mn` is then the amplitude that a hole created in channel
//! `n` at ionization is found in channel `m` at recombination. Taking the real parts of the
//! complex saddle times is common practice: the hole is assumed not to move during the
//! sub-barrier part of the path (Smirnova et al. 2009; from memory).
//!
//! # Frames
//! `μ` is given in the molecular frame, the field in the lab frame. The caller passes, per
//! orientation, the orthogonal matrix `R` that takes molecular vectors to lab vectors,
//! `v_lab = R v_mol`; this module only uses `E·μ = (Rᵀ E_lab)·μ_mol` (it rotates the dipoles once,
//! `μ_lab,a = Σ_b R_ab μ_mol,b`). How `R` is built from Euler angles is the orientation module's
//! business; the tests use the active ZYZ form `R = R_z(α) R_y(β) R_z(γ)`.
//!
//! # Method
//! * [`FieldSamples`] evaluates the lab-frame field once, for all orientations, on a uniform grid
//!   of step `h ≤ max_step` ([`DEFAULT_MAX_STEP`] = 0.12 a.u.).
//! * [`HolePropagator::new`] rotates the dipoles and steps the Schrödinger equation of the
//!   shifted Hamiltonian `H − c` (`c` = centre of the `Ip` range) with the sixth-order Magnus
//!   integrator of Blanes, Casas and Ros ([`MagnusScheme::Sixth`]). Stepping in the Schrödinger
//!   picture puts `diag(Ip)` inside the exponential, where it is exact; the interaction-picture
//!   generator would carry the Bohr phases `e^{i(Ip_m − Ip_n)t}` into the step error (measured:
//!   ten times larger error at the same step). Each step's exponential is a diagonal Padé
//!   approximant, unitary to rounding for any anti-Hermitian generator and within ~1e-16 of the
//!   exact exponential (degree chosen from the norm, Higham 2005).
//! * At every node it stores `U_I(t_k, t_start)` (the Bohr phases are put back exactly) and
//!   `dU_I/dt = −i V_I U_I`, both up to the same constant diagonal phase on the right, which
//!   cancels in `U_I(t₂, t₁) = U_I(t₂, t_start) U_I(t₁, t_start)†`.
//! * A lookup interpolates row `m` at `t₂` and row `n` at `t₁` with the degree-7 Hermite
//!   polynomial through values and derivatives at the four nearest nodes, and takes their dot
//!   product ([`HolePropagator::element`]; [`HolePropagator::element_at`] with times resolved
//!   once by [`FieldSamples::locate`]).
//!
//! # Error model
//! Three parts, all measured against SciPy (`scripts/hole_reference.py`, `tests/hole.rs`):
//! * **Integration**: global error `≈ K · (t_end − t_start) · h⁶`. `K` grows with the norms of
//!   `diag(Ip) − c + V` and of `E·μ` and with the field's frequency. For the worst case the
//!   default step is specified for — `Ip` differences up to 1 a.u., dipole elements up to 3 a.u.,
//!   `|E| ≤ 0.1 a.u.` with Fourier components up to `2ω` at 800 nm — twelve random models gave
//!   `K ≤ 2e-8` a.u.: at `h = 0.12` the error over a 4-cycle (441 a.u.) window was ≤ 2.6e-11.
//!   Typical models (Ip spread 0.3 a.u., dipoles ~1 a.u., 0.05 a.u. field) have `K ≈ 1e-11`.
//!   Halving the step divides this error by 64.
//! * **Interpolation**: `f⁽⁸⁾(ξ)/8! · Π_i (t − t_i)²`, i.e. at most ~`8e-6 (νh)⁸` times the
//!   amplitude of the oscillating part, with `ν` the largest frequency in `U_I` (≈ the largest
//!   `|Ip_m − λ_j|`, `λ_j` the eigenvalues of `H`; ≤ 1.5 a.u. in the worst case). Measured: the
//!   unitarity defect at off-grid times is ≤ 5e-13 at `h = 0.15` in the worst case.
//! * **Rounding**: the exponentials are unitary to ~1e-16 each; over ~3000 steps the drift is
//!   ~3e-14 (measured with zero coupling, where `U_I = 1` exactly).
//!
//! So at the default step the lookup error is ≤ 1e-10 (worst case, 4 cycles); for stronger or
//! faster couplings pass a smaller `max_step` (error ∝ h⁶).
//!
//! # Cost
//! Per orientation, three channels, 3 cycles at 800 nm, default step (2758 steps): about
//! 0.9–1.0 ms of CPU time to build (~330 ns per step), 50–70 ns per
//! [`HolePropagator::element`] and 35–45 ns per [`HolePropagator::element_at`], measured on a
//! shared two-core machine (`benches/hole.rs`). No allocation after the build. Sampling the
//! field ([`FieldSamples::new`]) is done once for all orientations (~0.2 ms here).
//!
//! # Example
//! ```
//! use holecast::hole::{DEFAULT_MAX_STEP, FieldSamples, HolePropagator, IonModel};
//! use nalgebra::{DMatrix, Matrix3, Vector3};
//! use num_complex::Complex64;
//!
//! // Two channels 0.1 a.u. apart, coupled by μ_z = 1 a.u., in a resonant field of 0.005 a.u.
//! let zero = DMatrix::from_element(2, 2, Complex64::new(0.0, 0.0));
//! let mut mu_z = zero.clone();
//! mu_z[(0, 1)] = Complex64::new(1.0, 0.0);
//! mu_z[(1, 0)] = Complex64::new(1.0, 0.0);
//! let ion = IonModel::new(vec![0.5, 0.6], zero.clone(), [zero.clone(), zero, mu_z])?;
//! let field = |t: f64| Vector3::new(0.0, 0.0, 0.005 * (0.1 * t).cos());
//! let samples = FieldSamples::new(&field, 0.0, 700.0, DEFAULT_MAX_STEP)?;
//! let hole = HolePropagator::new(&ion, &Matrix3::identity(), &samples)?;
//! // After half a Rabi period, π/(μF) = 628.3 a.u., the hole has moved to channel 1.
//! let moved = hole.element(1, 0, 628.3185, 0.0)?.norm_sqr();
//! assert!((moved - 0.999844).abs() < 1e-5);
//! # Ok::<(), holecast::hole::HoleError>(())
//! ```

mod complex;
mod error;
mod grid;
mod ion;
mod magnus;
mod propagator;
mod samples;
mod small;

pub use complex::{COMPLEX_STEP_PHASE, ComplexHole, ElementDerivatives, HoleContour, HoleTrack};
pub use error::HoleError;
pub use grid::GridTime;
pub use ion::{HERMITICITY_TOLERANCE, IonModel, MAX_CHANNELS};
pub use magnus::MagnusScheme;
pub use propagator::{HolePropagator, ROTATION_TOLERANCE};
pub use samples::{DEFAULT_MAX_STEP, FieldSamples, MAX_STEPS};
