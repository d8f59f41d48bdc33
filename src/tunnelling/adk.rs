//! Atomic tunnelling rates of Ammosov, Delone and Krainov (ADK).
//!
//! M. V. Ammosov, N. B. Delone, V. P. Krainov, Sov. Phys. JETP 64, 1191 (1986) (formulas from
//! memory via the project's physics notes §3.2; the hydrogen limit is checked against the exact
//! weak-field rate of Landau & Lifshitz, *Quantum Mechanics* §77).
//!
//! Notation: `ip` the ionization potential, `κ = √(2 Ip)`, `z` the charge of the residual ion,
//! `n* = Z/κ`, `l* = n* − 1`, `F > 0` the field strength, all in atomic units.

use super::gamma_function::gamma_function;
use super::{TunnellingError, check_l_m, check_positive, factorial};

/// Effective principal quantum number `n* = Z/κ`, `κ = √(2 Ip)` (ADK 1986).
///
/// # Errors
/// [`TunnellingError::InvalidValue`] unless `ip` and `z` are finite and positive.
pub fn effective_principal_quantum_number(ip: f64, z: f64) -> Result<f64, TunnellingError> {
    check_positive("ip", ip)?;
    check_positive("z", z)?;
    Ok(z / (2.0 * ip).sqrt())
}

/// The ADK asymptotic coefficient
/// `C²_{n*l*} = 2^{2n*} / (n* Γ(n* + l* + 1) Γ(n* − l*))` with `l* = n* − 1`
/// (ADK 1986; physics notes §3.2), i.e. `2^{2n*} / (n* Γ(2n*))`.
///
/// It is the squared coefficient of the bound state's tail `C κ^{3/2} (κr)^{n*−1} e^{−κr}`
/// (Hartree's approximation). Hydrogen 1s (n* = 1) gives exactly 4.
///
/// # Errors
/// [`TunnellingError::InvalidValue`] unless `ip` and `z` are finite and positive, or if Γ(2n*)
/// overflows (n* above ≈ 85).
pub fn adk_coefficient_squared(ip: f64, z: f64) -> Result<f64, TunnellingError> {
    coefficient_squared(effective_principal_quantum_number(ip, z)?)
}

/// `C²_{n*l*}` for a given `n* > 0`.
fn coefficient_squared(n_star: f64) -> Result<f64, TunnellingError> {
    let l_star = n_star - 1.0;
    let gamma_plus = gamma_function(n_star + l_star + 1.0)?;
    let gamma_minus = gamma_function(n_star - l_star)?;
    Ok((2.0 * n_star).exp2() / (n_star * gamma_plus * gamma_minus))
}

/// The ADK angular factor `f(l, m) = (2l + 1) (l + |m|)! / (2^{|m|} |m|! (l − |m|)!)`
/// (ADK 1986; physics notes §3.2). `m` is the magnetic quantum number along the field.
///
/// # Errors
/// [`TunnellingError::InvalidQuantumNumbers`] if `|m| > l` or `l` exceeds
/// [`MAX_ANGULAR_MOMENTUM`](super::MAX_ANGULAR_MOMENTUM).
pub fn adk_angular_factor(l: u32, m: i32) -> Result<f64, TunnellingError> {
    check_l_m("l, m", l, m)?;
    let am = m.unsigned_abs();
    let two_l_plus_one = f64::from(2 * l + 1);
    Ok(two_l_plus_one * factorial(l + am)
        / ((f64::from(am)).exp2() * factorial(am) * factorial(l - am)))
}

/// Static-field ADK tunnelling rate (a.u., probability per atomic unit of time)
///
/// `w = C²_{n*l*} f(l, m) Ip (2κ³/F)^{2n* − |m| − 1} exp(−2κ³/(3F))`
///
/// (ADK 1986; physics notes §3.2). For hydrogen 1s (Ip = ½, Z = 1, l = m = 0) this is exactly
/// the weak-field rate `(4/F) e^{−2/(3F)}` of Landau & Lifshitz §77.
///
/// Validity: tunnelling regime (Keldysh parameter γ ≲ 0.5) and fields below the
/// barrier-suppression field `F_BS ≈ Ip²/(4Z)`; the function does not enforce either.
///
/// # Errors
/// [`TunnellingError::InvalidValue`] unless `ip`, `z`, `field` are finite and positive;
/// [`TunnellingError::InvalidQuantumNumbers`] if `|m| > l`.
pub fn adk_static_rate(
    ip: f64,
    z: f64,
    l: u32,
    m: i32,
    field: f64,
) -> Result<f64, TunnellingError> {
    check_positive("field", field)?;
    let n_star = effective_principal_quantum_number(ip, z)?;
    let c2 = coefficient_squared(n_star)?;
    let f_lm = adk_angular_factor(l, m)?;
    let kappa = (2.0 * ip).sqrt();
    let kappa3 = kappa * kappa * kappa;
    let x = 2.0 * kappa3 / field;
    let exponent = 2.0 * n_star - f64::from(m.unsigned_abs()) - 1.0;
    Ok(c2 * f_lm * ip * x.powf(exponent) * (-kappa3 * 2.0 / (3.0 * field)).exp())
}

/// Cycle-averaging factor `√(3F / (π κ³))` that turns a static tunnelling rate at the peak
/// field `F` into its average over one cycle of a linearly polarised field `F cos ωt`
/// (quasi-static limit; ADK 1986, physics notes §3.2).
///
/// # Errors
/// [`TunnellingError::InvalidValue`] unless `ip` and `field` are finite and positive.
pub fn linear_cycle_average_factor(ip: f64, field: f64) -> Result<f64, TunnellingError> {
    check_positive("ip", ip)?;
    check_positive("field", field)?;
    let kappa = (2.0 * ip).sqrt();
    let kappa3 = kappa * kappa * kappa;
    Ok((3.0 * field / (std::f64::consts::PI * kappa3)).sqrt())
}

/// Cycle-averaged ADK rate for linear polarisation with peak field `field`:
/// [`adk_static_rate`] × [`linear_cycle_average_factor`] (ADK 1986; physics notes §3.2).
///
/// # Errors
/// As [`adk_static_rate`].
pub fn adk_cycle_averaged_rate(
    ip: f64,
    z: f64,
    l: u32,
    m: i32,
    field: f64,
) -> Result<f64, TunnellingError> {
    Ok(adk_static_rate(ip, z, l, m, field)? * linear_cycle_average_factor(ip, field)?)
}

/// Barrier-suppression field `F_BS = Ip²/(4Z)` (a.u.): the static field at which the top of the
/// barrier `−Z/r − F r` falls to `−Ip` (classical estimate; S. Augst, D. Strickland,
/// D. D. Meyerhofer, S. L. Chin, J. H. Eberly, PRL 63, 2212 (1989)). Hydrogen: 1/16 a.u.,
/// 1.37 × 10¹⁴ W/cm². Above it the rates of this module do not apply (see
/// [`adk_static_rate`]). Returns NaN unless `ip` and `z` are finite and positive.
pub fn barrier_suppression_field(ip: f64, z: f64) -> f64 {
    if ip.is_finite() && ip > 0.0 && z.is_finite() && z > 0.0 {
        ip * ip / (4.0 * z)
    } else {
        f64::NAN
    }
}
