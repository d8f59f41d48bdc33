//! Euler rotations (ZYZ, active, molecular frame → lab frame) and the [`Orientation`] record.

use nalgebra::{Matrix3, Vector3};

/// Rotation matrix `R(α, β, γ) = R_z(α) R_y(β) R_z(γ)` taking molecular-frame components to lab
/// components, `v_lab = R v_mol`.
///
/// Convention: ZYZ Euler angles, active rotations. Read on fixed lab axes: turn the molecule by
/// `γ` about `z`, then by `β` about `y`, then by `α` about `z`; read on moving axes: `α` about
/// `z`, `β` about the new `y′`, `γ` about the new `z″`. This is the convention of Rose,
/// *Elementary Theory of Angular Momentum* (1957) and Varshalovich, Moskalev & Khersonskii,
/// *Quantum Theory of Angular Momentum* §1.4 (from memory), and the same matrix as SciPy's
/// `Rotation.from_euler("ZYZ", [α, β, γ]).as_matrix()` (checked in `tests/orientation.rs`). With
/// `R_z(φ) = [[cos φ, −sin φ, 0], [sin φ, cos φ, 0], [0, 0, 1]]` and
/// `R_y(β) = [[cos β, 0, sin β], [0, 1, 0], [−sin β, 0, cos β]]`,
/// the third column — the molecular `z` axis seen from the lab — is
/// `(sin β cos α, sin β sin α, cos β)`. Any real angles are accepted; non-finite angles give NaN
/// entries.
#[must_use]
pub fn euler_rotation(alpha: f64, beta: f64, gamma: f64) -> Matrix3<f64> {
    let (sa, ca) = alpha.sin_cos();
    let (sb, cb) = beta.sin_cos();
    let (sg, cg) = gamma.sin_cos();
    Matrix3::new(
        ca * cb * cg - sa * sg,
        -ca * cb * sg - sa * cg,
        ca * sb,
        sa * cb * cg + ca * sg,
        -sa * cb * sg + ca * cg,
        sa * sb,
        -sb * cg,
        sb * sg,
        cb,
    )
}

/// Below this `sin β` the Euler angles are degenerate (gimbal lock) and `γ` is set to zero.
const GIMBAL_LOCK_SIN_BETA: f64 = 1e-14;

/// ZYZ Euler angles `(α, β, γ)` of a rotation matrix, the inverse of [`euler_rotation`].
///
/// Ranges: `α, γ ∈ (−π, π]`, `β ∈ [0, π]`. When `sin β < 1e-14` only `α + γ` (at `β = 0`) or
/// `α − γ` (at `β = π`) is defined; then `γ = 0` and `α` carries the whole angle. The input is
/// assumed to be a proper rotation (orthogonal, determinant +1); nothing checks it, and for other
/// matrices the result is unspecified but finite for finite input.
#[must_use]
pub fn euler_angles(rotation: &Matrix3<f64>) -> (f64, f64, f64) {
    let r = rotation;
    let sin_beta = r[(0, 2)].hypot(r[(1, 2)]);
    let beta = sin_beta.atan2(r[(2, 2)]);
    if sin_beta >= GIMBAL_LOCK_SIN_BETA {
        let alpha = r[(1, 2)].atan2(r[(0, 2)]);
        let gamma = r[(2, 1)].atan2(-r[(2, 0)]);
        (alpha, beta, gamma)
    } else if r[(2, 2)] > 0.0 {
        // R = R_z(α + γ): the upper-left block is a plane rotation.
        let alpha = (r[(1, 0)] - r[(0, 1)]).atan2(r[(0, 0)] + r[(1, 1)]);
        (alpha, beta, 0.0)
    } else {
        // R = R_z(α − γ) diag(−1, 1, −1).
        let alpha = (-(r[(1, 0)] + r[(0, 1)])).atan2(r[(1, 1)] - r[(0, 0)]);
        (alpha, beta, 0.0)
    }
}

/// One molecular orientation with its quadrature weight.
///
/// `rotation` is [`euler_rotation`]`(alpha, beta, gamma)` (molecular → lab). In a grid the weights
/// sum to 1 (see [`crate::orientation::OrientationGrid`] and
/// [`crate::orientation::AlignmentGrid`] for what they mean).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Orientation {
    /// Euler angle `α` (rad): azimuth of the molecular axis about the lab `z` axis.
    pub alpha: f64,
    /// Euler angle `β` (rad): angle between the molecular `z` axis and the lab `z` axis.
    pub beta: f64,
    /// Euler angle `γ` (rad): rotation about the molecular `z` axis.
    pub gamma: f64,
    /// Quadrature weight.
    pub weight: f64,
    /// `R(α, β, γ)`, molecular → lab.
    pub rotation: Matrix3<f64>,
}

impl Orientation {
    /// An orientation with its rotation matrix computed from the angles.
    #[must_use]
    pub fn new(alpha: f64, beta: f64, gamma: f64, weight: f64) -> Self {
        Self {
            alpha,
            beta,
            gamma,
            weight,
            rotation: euler_rotation(alpha, beta, gamma),
        }
    }

    /// Lab components of a vector given in the molecular frame: `R v_mol`.
    #[must_use]
    pub fn to_lab(&self, molecular: &Vector3<f64>) -> Vector3<f64> {
        self.rotation * molecular
    }

    /// Molecular-frame components of a vector given in the lab: `Rᵀ v_lab` (`R` is orthogonal).
    #[must_use]
    pub fn to_molecular(&self, lab: &Vector3<f64>) -> Vector3<f64> {
        self.rotation.tr_mul(lab)
    }

    /// The molecular `z` axis in the lab, `(sin β cos α, sin β sin α, cos β)`.
    #[must_use]
    pub fn molecular_axis(&self) -> Vector3<f64> {
        self.rotation.column(2).into_owned()
    }
}
