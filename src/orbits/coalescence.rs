//! The complex cutoff: the photon energy where the short and long saddles coalesce.
//!
//! Along real Ω the two first-return saddles approach each other near the cutoff but do not
//! meet; they meet at a complex energy Ω_c where, besides the two saddle equations, the Hessian
//! of Φ is singular. We solve the three equations `f₁ = f₂ = det Φ'' = 0` for `(t_r, t_i, Ω)` by
//! Newton's method, seeded from the closest approach seen while tracking the pair. `Re Ω_c` is
//! the quantum cutoff, `≈ 3.17 Up + 1.32 Ip` for small `Ip/Up` (M. Lewenstein et al., PRA 49,
//! 2117 (1994)); physics notes §1.6 tabulate the function `F(Ip/Up)` this definition gives.

use num_complex::Complex64;

use super::equations::{ChannelPair, evaluate};
use crate::field::Field;

/// The coalescence point of a pair.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Coalescence {
    /// Complex photon energy Ω_c (a.u.).
    pub omega: Complex64,
    /// Return time at coalescence.
    pub t_ret: Complex64,
    /// Ionization time at coalescence.
    pub t_ion: Complex64,
    /// Whether Newton converged.
    pub converged: bool,
    /// Final relative residual (largest of the three equations, each scaled).
    pub residual: f64,
    /// Iterations used.
    pub iterations: u32,
}

fn solve3(m: [[Complex64; 3]; 3], b: [Complex64; 3]) -> Option<[Complex64; 3]> {
    let det = |m: &[[Complex64; 3]; 3]| {
        m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1])
            - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0])
            + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
    };
    let d = det(&m);
    if d.norm() == 0.0 || !d.is_finite() {
        return None;
    }
    let mut x = [Complex64::new(0.0, 0.0); 3];
    for (col, xc) in x.iter_mut().enumerate() {
        let mut mc = m;
        for row in 0..3 {
            mc[row][col] = b[row];
        }
        *xc = det(&mc) / d;
    }
    Some(x)
}

/// Solves for the coalescence point from a guess `(omega, t_ret, t_ion)`; `scale` is the
/// energy scale of the saddle residuals.
pub fn solve(
    field: &Field,
    pair: ChannelPair,
    omega: f64,
    t_ret: Complex64,
    t_ion: Complex64,
    scale: f64,
) -> Coalescence {
    let mut x = [t_ret, t_ion, Complex64::new(omega, 0.0)];
    let h = 1e-5 / field.omega();
    // Ω enters Φ linearly, so the Hessian (and its determinant) do not depend on Ω and the
    // saddle equations are evaluated at complex Ω by shifting the recombining channel's Ip.
    let eval_at = |x: &[Complex64; 3]| {
        let p = ChannelPair {
            ip_rec: 0.0,
            ..pair
        };
        let e = evaluate(field, p, 0.0, x[0], x[1]);
        let f2 = e.residual[1] + pair.ip_rec - x[2];
        (e, [e.residual[0], f2, e.det_hessian()])
    };
    let mut iterations = 0;
    let mut residual = f64::INFINITY;
    let mut converged = false;
    for _ in 0..60 {
        let (e, f) = eval_at(&x);
        let [rr, ri, ii] = e.hessian;
        let hscale = (rr * ii).norm() + (ri * ri).norm();
        residual = (f[0].norm() / scale)
            .max(f[1].norm() / scale)
            .max(f[2].norm() / hscale.max(1e-300));
        if !residual.is_finite() {
            break;
        }
        if residual < 1e-11 {
            converged = true;
            break;
        }
        let ddet = |k: usize| {
            let mut a = x;
            let mut b = x;
            a[k] += h;
            b[k] -= h;
            (eval_at(&a).1[2] - eval_at(&b).1[2]) / (2.0 * h)
        };
        let zero = Complex64::new(0.0, 0.0);
        let jac = [
            [ri, ii, zero],
            [-rr, -ri, Complex64::new(-1.0, 0.0)],
            [ddet(0), ddet(1), zero],
        ];
        let Some(dx) = solve3(jac, f) else { break };
        let largest = dx[0].norm().max(dx[1].norm());
        let s = if largest > 0.3 / field.omega() {
            0.3 / field.omega() / largest
        } else {
            1.0
        };
        for k in 0..3 {
            x[k] -= dx[k] * s;
        }
        iterations += 1;
    }
    Coalescence {
        omega: x[2],
        t_ret: x[0],
        t_ion: x[1],
        converged,
        residual,
        iterations,
    }
}
