//! The molecular ion in the basis of its channels: ionization potentials, field-free couplings
//! and transition dipoles (molecular frame).

use nalgebra::DMatrix;
use num_complex::Complex64;

use super::error::HoleError;

/// Largest number of channels the propagator supports (its kernels are specialised per size).
pub const MAX_CHANNELS: usize = 8;

/// Relative tolerance of the Hermiticity check: element `(r, c)` passes when
/// `|a_rc − conj(a_cr)| ≤ HERMITICITY_TOLERANCE · max(1, |a_rc|, |a_cr|)` (on the diagonal this
/// reads `2|Im a_rr| ≤ HERMITICITY_TOLERANCE · max(1, |a_rr|)`). The model then keeps the Hermitian
/// part `(a + a†)/2`, so the propagator is unitary to rounding.
pub const HERMITICITY_TOLERANCE: f64 = 1e-10;

/// The ion of one molecule in the basis of its `N` channels (ionic states).
///
/// The channel Hamiltonian is, in atomic units and the length gauge,
/// `H(t)_mn = Ip_m δ_mn + V_mn − E(t)·μ_mn`
/// (e.g. Smirnova et al., Nature 460, 972 (2009), and PNAS 106, 16556 (2009), from memory),
/// with `Ip_n` the ionization potential of channel `n` (energy of ionic state `n` relative to the
/// neutral ground state), `V` the field-free couplings and `μ = (μ_x, μ_y, μ_z)` the dipole
/// matrices between ionic states in the molecular frame. The dipole is taken as given (for
/// electrons of charge −1 it is `μ = −Σ_j r_j` plus nuclear terms on the diagonal), so the
/// coupling to the field is `−E·μ`. A non-zero diagonal of `μ` gives the first-order Stark shift
/// of the channel; a non-zero diagonal of `V` an extra static shift.
#[derive(Debug, Clone, PartialEq)]
pub struct IonModel {
    energies: Vec<f64>,
    coupling: DMatrix<Complex64>,
    dipole: [DMatrix<Complex64>; 3],
}

impl IonModel {
    /// Validates and stores an ion model.
    ///
    /// `energies[n]` is `Ip_n` (a.u.), `coupling` is `V` (a.u., Hermitian `N×N`), `dipole` is
    /// `[μ_x, μ_y, μ_z]` in the molecular frame (a.u., each Hermitian `N×N`).
    ///
    /// # Errors
    /// [`HoleError::ChannelCount`] for zero or more than [`MAX_CHANNELS`] channels,
    /// [`HoleError::Shape`] for a matrix of the wrong size, [`HoleError::NonFiniteEnergy`] /
    /// [`HoleError::NonFiniteElement`] for NaN or infinite entries, and
    /// [`HoleError::NotHermitian`] for a matrix that fails the check of
    /// [`HERMITICITY_TOLERANCE`]; each names the offending element.
    pub fn new(
        energies: Vec<f64>,
        coupling: DMatrix<Complex64>,
        dipole: [DMatrix<Complex64>; 3],
    ) -> Result<Self, HoleError> {
        let n = energies.len();
        if n == 0 || n > MAX_CHANNELS {
            return Err(HoleError::ChannelCount {
                found: n,
                max: MAX_CHANNELS,
            });
        }
        for (index, &value) in energies.iter().enumerate() {
            if !value.is_finite() {
                return Err(HoleError::NonFiniteEnergy { index, value });
            }
        }
        let [dx, dy, dz] = dipole;
        let coupling = hermitian_part("coupling", coupling, n)?;
        let dipole = [
            hermitian_part("dipole_x", dx, n)?,
            hermitian_part("dipole_y", dy, n)?,
            hermitian_part("dipole_z", dz, n)?,
        ];
        Ok(Self {
            energies,
            coupling,
            dipole,
        })
    }

    /// Number of channels `N`.
    pub fn channels(&self) -> usize {
        self.energies.len()
    }

    /// The ionization potentials `Ip_n` (a.u.).
    pub fn energies(&self) -> &[f64] {
        &self.energies
    }

    /// The field-free coupling `V` (Hermitian part of what was given).
    pub fn coupling(&self) -> &DMatrix<Complex64> {
        &self.coupling
    }

    /// The molecular-frame dipoles `[μ_x, μ_y, μ_z]` (Hermitian parts of what was given).
    pub fn dipole(&self) -> &[DMatrix<Complex64>; 3] {
        &self.dipole
    }

    /// True when no term moves the hole between channels: every off-diagonal element of `V`
    /// and of `μ_x, μ_y, μ_z` is exactly zero. Then `U_I` is diagonal for every field and
    /// orientation (its diagonal carries the phases of the diagonal of `V − E·μ`), so the
    /// off-diagonal channel pairs `m ≠ n` contribute nothing. If moreover the diagonals of `V`
    /// and `μ` vanish, `U_I` is the identity.
    pub fn is_uncoupled(&self) -> bool {
        let n = self.channels();
        let zero = Complex64::new(0.0, 0.0);
        std::iter::once(&self.coupling)
            .chain(self.dipole.iter())
            .all(|m| (0..n).all(|r| (0..n).all(|c| r == c || m[(r, c)] == zero)))
    }
}

/// Checks size, finiteness and Hermiticity, and returns the Hermitian part.
fn hermitian_part(
    parameter: &'static str,
    m: DMatrix<Complex64>,
    n: usize,
) -> Result<DMatrix<Complex64>, HoleError> {
    if m.nrows() != n || m.ncols() != n {
        return Err(HoleError::Shape {
            parameter,
            rows: m.nrows(),
            cols: m.ncols(),
            expected: n,
        });
    }
    for row in 0..n {
        for col in 0..n {
            let v = m[(row, col)];
            if !(v.re.is_finite() && v.im.is_finite()) {
                return Err(HoleError::NonFiniteElement {
                    parameter,
                    row,
                    col,
                    re: v.re,
                    im: v.im,
                });
            }
        }
    }
    for row in 0..n {
        for col in row..n {
            let a = m[(row, col)];
            let b = m[(col, row)].conj();
            let difference = (a - b).norm();
            let allowed = HERMITICITY_TOLERANCE * 1.0_f64.max(a.norm()).max(b.norm());
            if difference > allowed {
                return Err(HoleError::NotHermitian {
                    parameter,
                    row,
                    col,
                    re: a.re,
                    im: a.im,
                    conj_re: b.re,
                    conj_im: b.im,
                    difference,
                    allowed,
                });
            }
        }
    }
    let mut h = m.clone();
    for row in 0..n {
        h[(row, row)] = Complex64::new(m[(row, row)].re, 0.0);
        for col in (row + 1)..n {
            let v = (m[(row, col)] + m[(col, row)].conj()) * 0.5;
            h[(row, col)] = v;
            h[(col, row)] = v.conj();
        }
    }
    Ok(h)
}
