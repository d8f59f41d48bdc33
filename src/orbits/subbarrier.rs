//! The ionization saddle at fixed drift momentum and its sub-barrier action.
//!
//! For a fixed drift (canonical) momentum `p` the ionization time solves
//! `½(p + A(t_i))² + Ip = 0`. The action accumulated under the barrier, from `t_i` down to the
//! real axis,
//!
//! ```text
//! W = ∫_{t_i}^{Re t_i} [½ (p + A)² + Ip] dt = ½p²Δt + p·Δ(∫A) + ½Δ(∫A·A) + Ip Δt,
//! ```
//!
//! gives the tunnelling exponent `|e^{−iW}|² = e^{2 Im W}`. For `p = 0` and a monochromatic
//! linear field at its crest, `t_i = i asinh(γ)/ω` and `2 Im W = −(2κ³/3F) g(γ)` with the
//! Keldysh–PPT function g (A. M. Perelomov, V. S. Popov, M. V. Terent'ev, Sov. Phys. JETP 23,
//! 924 (1966); physics notes §3.1).

use num_complex::Complex64;

use crate::field::{CVec3, Field, bdot};

/// Solves `½(p + A(t))² + Ip = 0` by Newton's method from `guess`; `None` if it does not
/// converge to a relative residual of 1e-14 in 100 iterations.
pub fn ionization_time(
    field: &Field,
    drift: &CVec3,
    ip: f64,
    guess: Complex64,
) -> Option<Complex64> {
    let mut t = guess;
    for _ in 0..100 {
        let p = field.at(t);
        let v = drift + p.a;
        let f = 0.5 * bdot(&v, &v) + ip;
        if f.norm() <= 1e-14 * ip {
            return Some(t);
        }
        let df = -bdot(&v, &p.e);
        if df.norm() == 0.0 || !df.is_finite() {
            return None;
        }
        t -= f / df;
    }
    None
}

/// Sub-barrier action `W` from `t_ion` to `Re t_ion` (closed form of the field integrals).
pub fn sub_barrier_action(field: &Field, drift: &CVec3, ip: f64, t_ion: Complex64) -> Complex64 {
    let end = Complex64::new(t_ion.re, 0.0);
    let (a, b) = (field.at(t_ion), field.at(end));
    let dt = end - t_ion;
    0.5 * bdot(drift, drift) * dt
        + bdot(drift, &(b.int_a - a.int_a))
        + 0.5 * (b.int_a2 - a.int_a2)
        + ip * dt
}
