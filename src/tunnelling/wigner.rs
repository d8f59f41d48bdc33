//! Euler angles (ZYZ) and Wigner rotation matrices `d^l_{mm'}(β)`, `D^l_{mm'}(α, β, γ)`.
//!
//! Convention (A. R. Edmonds, *Angular Momentum in Quantum Mechanics* (1957), Ch. 4;
//! J. J. Sakurai, *Modern Quantum Mechanics*, §3.8–3.9; DLMF §34 uses the same phases):
//! the rotation `R(α, β, γ) = Rz(α) Ry(β) Rz(γ)` is **active**, and
//!
//! `D^l_{mm'}(α, β, γ) = ⟨l m| e^{−iαJz} e^{−iβJy} e^{−iγJz} |l m'⟩ = e^{−imα} d^l_{mm'}(β) e^{−im'γ}`,
//!
//! `d^l_{mm'}(β) = Σ_k (−1)^{k−m'+m} √((l+m')!(l−m')!(l+m)!(l−m)!)
//!                 / ((l+m'−k)! k! (l−k−m)! (k−m'+m)!) · cos(β/2)^{2l−2k+m'−m} sin(β/2)^{2k−m'+m}`
//!
//! (Wigner's explicit formula, Sakurai Eq. 3.8.33 with his `(m', m)` → our `(m, m')`). Hence
//! `d^1_{10} = −sin β/√2`, `d^1_{01} = +sin β/√2`, `d^1_{11} = (1 + cos β)/2`,
//! `d^2_{00} = P_2(cos β)`, and a spherical harmonic rotated actively by `R` is
//! `Y_{lm'}(R⁻¹ r̂) = Σ_m Y_{lm}(r̂) D^l_{mm'}(R)`.

use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;

use super::{TunnellingError, check_l_m, factorial};

/// Euler angles (radians) of the active rotation `R = Rz(α) Ry(β) Rz(γ)` (ZYZ convention).
///
/// Used throughout as "molecular frame → other frame": `v_other = R v_mol`, i.e. the columns of
/// `R` are the molecular axes written in the other frame. `β` is the angle between the two `z`
/// axes. The angles are stored as given (no reduction to a standard range).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EulerZyz {
    alpha: f64,
    beta: f64,
    gamma: f64,
}

impl EulerZyz {
    /// Euler angles `(α, β, γ)` in radians.
    ///
    /// # Errors
    /// [`TunnellingError::InvalidValue`] if an angle is not finite.
    pub fn new(alpha: f64, beta: f64, gamma: f64) -> Result<Self, TunnellingError> {
        for (name, value) in [("alpha", alpha), ("beta", beta), ("gamma", gamma)] {
            if !value.is_finite() {
                return Err(TunnellingError::invalid(
                    name,
                    value,
                    "an Euler angle must be finite",
                ));
            }
        }
        Ok(Self { alpha, beta, gamma })
    }

    /// First angle α (rotation about the final `z` axis), radians.
    pub fn alpha(&self) -> f64 {
        self.alpha
    }

    /// Second angle β (rotation about `y`; angle between the two `z` axes), radians.
    pub fn beta(&self) -> f64 {
        self.beta
    }

    /// Third angle γ (rotation about the initial `z` axis), radians.
    pub fn gamma(&self) -> f64 {
        self.gamma
    }

    /// The rotation matrix `Rz(α) Ry(β) Rz(γ)` (active; `v_other = R v_mol`).
    pub fn rotation_matrix(&self) -> Matrix3<f64> {
        let (sa, ca) = self.alpha.sin_cos();
        let (sb, cb) = self.beta.sin_cos();
        let (sg, cg) = self.gamma.sin_cos();
        let rz_a = Matrix3::new(ca, -sa, 0.0, sa, ca, 0.0, 0.0, 0.0, 1.0);
        let ry_b = Matrix3::new(cb, 0.0, sb, 0.0, 1.0, 0.0, -sb, 0.0, cb);
        let rz_g = Matrix3::new(cg, -sg, 0.0, sg, cg, 0.0, 0.0, 0.0, 1.0);
        rz_a * ry_b * rz_g
    }

    /// Euler angles of the inverse rotation `R⁻¹ = Rz(−γ) Ry(−β) Rz(−α)`, written with the same
    /// β: `(π − γ, β, π − α)` (uses `Ry(−β) = Rz(π) Ry(β) Rz(−π)`).
    pub fn inverse(&self) -> Self {
        use std::f64::consts::PI;
        Self {
            alpha: PI - self.gamma,
            beta: self.beta,
            gamma: PI - self.alpha,
        }
    }

    /// For `R` the molecular → lab rotation: the lab `z` axis written in the molecular frame,
    /// `Rᵀ ẑ = (−sin β cos γ, sin β sin γ, cos β)`. With the field along lab `z`, this is the
    /// `field_direction` expected by [`AsymptoticOrbital`](super::AsymptoticOrbital)'s
    /// `…_for_field` methods.
    pub fn lab_z_in_molecular_frame(&self) -> Vector3<f64> {
        let (sb, cb) = self.beta.sin_cos();
        let (sg, cg) = self.gamma.sin_cos();
        Vector3::new(-sb * cg, sb * sg, cb)
    }

    /// For `R` the molecular → lab rotation and the electric field along **+lab z**: the Euler
    /// angles of the molecular → *exit frame* rotation used by
    /// [`AsymptoticOrbital::structure_factor_in_frame`](super::AsymptoticOrbital::structure_factor_in_frame).
    ///
    /// The electron leaves along −z_lab; the exit frame chosen here is the lab frame turned by
    /// π about lab `x` (axes `x_lab, −y_lab, −z_lab`), i.e. `Rx(π) R`, whose Euler angles are
    /// `(−α, π − β, γ − π)`. Another choice of the exit frame's `x` axis changes `B(m)` only
    /// by a phase `e^{−imδ}`.
    pub fn exit_frame_for_field_along_lab_z(&self) -> Self {
        use std::f64::consts::PI;
        Self {
            alpha: -self.alpha,
            beta: PI - self.beta,
            gamma: self.gamma - PI,
        }
    }
}

/// One term `coefficient · cos(β/2)^cos_power · sin(β/2)^sin_power` of Wigner's explicit sum.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct WignerTerm {
    pub(crate) coefficient: f64,
    pub(crate) cos_power: usize,
    pub(crate) sin_power: usize,
}

/// Calls `visit` with each term of Wigner's explicit sum for `d^l_{m m'}` (module docs).
/// The caller has checked `|m|, |m'| ≤ l ≤ MAX_ANGULAR_MOMENTUM`.
pub(crate) fn for_each_wigner_term(
    l: u32,
    m: i32,
    m_prime: i32,
    mut visit: impl FnMut(WignerTerm),
) {
    let l = i64::from(l);
    let (a, b) = (i64::from(m), i64::from(m_prime));
    let fact = |n: i64| factorial(u32::try_from(n).unwrap_or(0));
    let root = (fact(l + b) * fact(l - b) * fact(l + a) * fact(l - a)).sqrt();
    let k_min = (b - a).max(0);
    let k_max = (l + b).min(l - a);
    for k in k_min..=k_max {
        let sign = if (k - b + a).rem_euclid(2) == 0 {
            1.0
        } else {
            -1.0
        };
        let denominator = fact(l + b - k) * fact(k) * fact(l - k - a) * fact(k - b + a);
        visit(WignerTerm {
            coefficient: sign * root / denominator,
            cos_power: usize::try_from(2 * l - 2 * k + b - a).unwrap_or(0),
            sin_power: usize::try_from(2 * k - b + a).unwrap_or(0),
        });
    }
}

/// Wigner's small d-matrix element `d^l_{mm'}(β)` (Edmonds/Sakurai sign convention; see the
/// module documentation for the formula). Valid for any real β; absolute error ≈ 1e-15 for
/// `l ≤ 4` and ≤ 2e-14 up to `l = MAX_ANGULAR_MOMENTUM` (measured against mpmath).
///
/// # Errors
/// [`TunnellingError::InvalidQuantumNumbers`] if `|m| > l`, `|m'| > l` or `l` is too large;
/// [`TunnellingError::InvalidValue`] if `beta` is not finite.
pub fn wigner_small_d(l: u32, m: i32, m_prime: i32, beta: f64) -> Result<f64, TunnellingError> {
    check_l_m("l, m", l, m)?;
    check_l_m("l, m'", l, m_prime)?;
    if !beta.is_finite() {
        return Err(TunnellingError::invalid(
            "beta",
            beta,
            "the rotation angle must be finite",
        ));
    }
    let (s, c) = (0.5 * beta).sin_cos();
    let mut sum = 0.0;
    for_each_wigner_term(l, m, m_prime, |t| {
        sum += t.coefficient * c.powi(t.cos_power as i32) * s.powi(t.sin_power as i32);
    });
    Ok(sum)
}

/// Wigner's D-matrix element `D^l_{mm'}(α, β, γ) = e^{−imα} d^l_{mm'}(β) e^{−im'γ}`
/// for the active rotation `Rz(α) Ry(β) Rz(γ)` (Edmonds Eq. 4.1.12; Sakurai Eq. 3.9.33).
///
/// # Errors
/// As [`wigner_small_d`].
pub fn wigner_big_d(
    l: u32,
    m: i32,
    m_prime: i32,
    angles: &EulerZyz,
) -> Result<Complex64, TunnellingError> {
    let d = wigner_small_d(l, m, m_prime, angles.beta)?;
    let phase = -(f64::from(m) * angles.alpha + f64::from(m_prime) * angles.gamma);
    Ok(Complex64::from_polar(d, phase))
}
