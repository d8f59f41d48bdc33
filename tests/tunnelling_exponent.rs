//! Tunnelling exponent: twice the imaginary part of the sub-barrier action at the ionization
//! saddle equals the PPT exponent (Perelomov, Popov, Terent'ev, Sov. Phys. JETP 23, 924 (1966);
//! identity derived in physics notes §3.1).

use holecast::field::{CVec3, Colour, Envelope, Field, Polarization};
use holecast::orbits::subbarrier::{ionization_time, sub_barrier_action};
use num_complex::Complex64;

/// PPT: 2 Im W = −(2κ³/3F) g(γ), g(γ) = (3/2γ)[(1 + 1/(2γ²)) asinh γ − sqrt(1+γ²)/(2γ)].
fn ppt_exponent(ip: f64, f: f64, gamma: f64) -> f64 {
    let kappa = (2.0 * ip).sqrt();
    let g = 1.5 / gamma
        * ((1.0 + 0.5 / (gamma * gamma)) * gamma.asinh()
            - (1.0 + gamma * gamma).sqrt() / (2.0 * gamma));
    -(2.0 * kappa.powi(3) / (3.0 * f)) * g
}

fn field(f: f64, w: f64) -> Field {
    Field::new(
        &[Colour {
            omega: w,
            peak_field: f,
            phase: 0.0,
            polarization: Polarization::Linear { angle: 0.0 },
        }],
        Envelope::Continuous,
    )
    .unwrap()
}

#[test]
fn sub_barrier_action_gives_the_ppt_exponent() {
    let (ip, w): (f64, f64) = (0.5, 0.057);
    let kappa = (2.0 * ip).sqrt();
    for &gamma in &[0.3, 0.7, 1.0, 2.0] {
        let f = w * kappa / gamma;
        let fl = field(f, w);
        let p = CVec3::zeros();
        // Start away from the exact answer t_i = i asinh(γ)/ω so that the solver does the work.
        let guess = Complex64::new(0.05 / w, 1.2 * gamma.asinh() / w);
        let t = ionization_time(&fl, &p, ip, guess).expect("converges");
        assert!((t - Complex64::new(0.0, gamma.asinh() / w)).norm() < 1e-9 / w);
        let w_action = sub_barrier_action(&fl, &p, ip, t);
        let lhs = 2.0 * w_action.im;
        let rhs = ppt_exponent(ip, f, gamma);
        assert!(
            (lhs / rhs - 1.0).abs() < 1e-8,
            "γ = {gamma}: {lhs} vs {rhs}"
        );
    }
    // The notes' worked value: Ip = 0.5, F = 0.05, ω = 0.057 (γ = 1.14): |2 Im W| = 12.065995134939.
    let fl = field(0.05, 0.057);
    let g: f64 = 0.057 / 0.05;
    let t = ionization_time(
        &fl,
        &CVec3::zeros(),
        0.5,
        Complex64::new(0.0, g.asinh() / 0.057),
    )
    .unwrap();
    let lhs = 2.0 * sub_barrier_action(&fl, &CVec3::zeros(), 0.5, t).im;
    assert!((lhs.abs() - 12.065_995_134_939).abs() < 1e-9, "{lhs}");
}

#[test]
fn ppt_exponent_agrees_with_the_tunnelling_module() {
    // The same g(γ) from the library's PPT function (tested separately against mpmath).
    for &gamma in &[0.3, 0.7, 1.0, 2.0] {
        let g = holecast::tunnelling::ppt_g(gamma).unwrap();
        let f = 0.057 / gamma;
        assert!((ppt_exponent(0.5, f, gamma) / (-(2.0 / (3.0 * f)) * g) - 1.0).abs() < 1e-13);
    }
}
