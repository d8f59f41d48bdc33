//! The next-order saddle-point terms of a varying prefactor (`holecast::orbits::expansion`)
//! against direct numerical integration, and the expansion's third derivatives against the
//! phase itself.

use holecast::laser::LaserSpec;
use holecast::orbits::expansion::{SaddleExpansion, near_caustic, spreading_log_gradient};
use holecast::orbits::{ChannelPair, evaluate};
use num_complex::Complex64;

fn c(x: f64) -> Complex64 {
    Complex64::new(x, 0.0)
}

/// `f(x, y) = −½(x² + xy + 2y²) + c₁x³/6 + c₂x²y/2 + c₃y³/6`: a maximum at the origin with
/// a skewed (cubic) neighbourhood.
const CUBIC: [f64; 3] = [0.7, -0.4, 0.5];

fn f(x: f64, y: f64) -> f64 {
    -0.5 * (x * x + x * y + 2.0 * y * y)
        + CUBIC[0] * x.powi(3) / 6.0
        + CUBIC[1] * x * x * y / 2.0
        + CUBIC[2] * y.powi(3) / 6.0
}

/// `∫∫ g e^{λ f}` over `[−1, 1]²` by the composite Simpson rule (the integrand falls below
/// e^{−λ/5} at the border for the λ used: the box is the whole integral).
fn integral(lambda: f64, g: &dyn Fn(f64, f64) -> f64) -> f64 {
    let n = 1600;
    let h = 2.0 / n as f64;
    let w = |i: usize| {
        if i == 0 || i == n {
            1.0
        } else if i % 2 == 1 {
            4.0
        } else {
            2.0
        }
    };
    let mut sum = 0.0;
    for i in 0..=n {
        let x = -1.0 + i as f64 * h;
        for j in 0..=n {
            let y = -1.0 + j as f64 * h;
            sum += w(i) * w(j) * g(x, y) * (lambda * f(x, y)).exp();
        }
    }
    sum * h * h / 9.0
}

/// The expansion of `e^{λ f}` at the origin: `A = (−λ f'')⁻¹`, `F_abc = λ f_abc`.
fn expansion(lambda: f64) -> SaddleExpansion {
    // −f'' = [[1, ½], [½, 2]].
    let (a, b, d) = (lambda, 0.5 * lambda, 2.0 * lambda);
    let det = a * d - b * b;
    SaddleExpansion {
        covariance: [[c(d / det), c(-b / det)], [c(-b / det), c(a / det)]],
        // f_xxx = c₁, f_xxy = c₂, f_xyy = 0, f_yyy = c₃.
        third: [
            c(lambda * CUBIC[0]),
            c(lambda * CUBIC[1]),
            c(0.0),
            c(lambda * CUBIC[2]),
        ],
    }
}

#[test]
fn next_order_terms_of_a_varying_factor_match_a_numerical_laplace_integral() {
    // I[g h]/I[h] for g = e^{a·x} (the varying factor, g(0) = 1) and h = e^{b·x} (the rest of
    // the prefactor): the Laplace expansion gives 1 + O(1/λ) at leading order and
    // 1 + ½A g'' + A g' h'/h + ½AA g' F''' + O(1/λ²) with the next-order terms (R. Wong,
    // Asymptotic Approximations of Integrals, ch. IX, from memory); the reference is the
    // integral itself by Simpson's rule. Check: the error of the next-order ratio falls as 1/λ²
    // (λ doubled: 3×–5× smaller) and is far below the leading-order error.
    let (ax, ay) = (0.8, -0.6);
    let (bx, by) = (-0.5, 0.9);
    let g = |x: f64, y: f64| (ax * x + ay * y).exp();
    let h = |x: f64, y: f64| (bx * x + by * y).exp();
    let mut errors = Vec::new();
    for lambda in [100.0, 200.0] {
        let exact = integral(lambda, &|x, y| g(x, y) * h(x, y)) / integral(lambda, &h);
        let e = expansion(lambda);
        let first = [c(ax), c(ay)];
        let second = [[c(ax * ax), c(ax * ay)], [c(ax * ay), c(ay * ay)]];
        let companion = [c(bx), c(by)];
        let next = 1.0 + e.prefactor_terms(&first, &second, &companion).re;
        let leading_error = (exact - 1.0).abs();
        let next_error = (exact - next).abs();
        assert!(
            next_error < 0.1 * leading_error,
            "λ = {lambda}: leading {leading_error:e}, next order {next_error:e}"
        );
        eprintln!(
            "λ = {lambda}: leading-order error {leading_error:.3e}, next-order {next_error:.3e}"
        );
        errors.push(next_error);
    }
    let ratio = errors[0] / errors[1];
    assert!((3.0..=5.0).contains(&ratio), "error ratio {ratio}");
}

#[test]
fn expansion_third_derivatives_match_the_phase() {
    // F''' from central differences of the analytic Hessian against a fourth-order stencil of
    // the phase itself, at complex times in an 800 nm, 10¹⁴ W/cm² field (consistency of two
    // independent routes to the same derivatives).
    let field = LaserSpec::monochromatic(1e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let pair = ChannelPair::new(0.5, 0.5);
    let omega = 25.0 * w;
    let t_ret = Complex64::new(1.35 * std::f64::consts::PI / w, 0.0);
    let t_ion = Complex64::new(0.3 / w, 12.0);
    let e = SaddleExpansion::at(&field, pair, omega, t_ret, t_ion);
    let phi = |dr: f64, di: f64| evaluate(&field, pair, omega, t_ret + dr, t_ion + di).action;
    let i = Complex64::i();
    let h = 0.05;
    // Φ_rrr by the five-point stencil; the mixed ones from differences of second differences.
    let d3 = |u: (f64, f64)| -> Complex64 {
        (-phi(-2.0 * h * u.0, -2.0 * h * u.1) + 2.0 * phi(-h * u.0, -h * u.1)
            - 2.0 * phi(h * u.0, h * u.1)
            + phi(2.0 * h * u.0, 2.0 * h * u.1))
            / (2.0 * h.powi(3))
    };
    // Directional third derivatives along (1,0), (0,1), (1,1), (1,−1) give all four.
    let drrr = d3((1.0, 0.0));
    let diii = d3((0.0, 1.0));
    let dp = d3((1.0, 1.0)); // rrr + 3rri + 3rii + iii
    let dm = d3((1.0, -1.0)); // rrr − 3rri + 3rii − iii
    let rri = (dp - dm - 2.0 * diii) / 6.0;
    let rii = (dp + dm - 2.0 * drrr) / 6.0;
    let expected = [i * drrr, i * rri, i * rii, i * diii];
    for (k, (got, want)) in e.third.iter().zip(expected).enumerate() {
        let scale = expected.iter().map(|z| z.norm()).fold(0.0, f64::max);
        assert!(
            (got - want).norm() <= 1e-4 * scale,
            "F''' component {k}: {got} vs {want}"
        );
    }
}

#[test]
fn covariance_inverts_the_phase_hessian() {
    let field = LaserSpec::monochromatic(1e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let pair = ChannelPair::new(0.5, 0.6);
    let (tr, ti) = (Complex64::new(60.0, 1.0), Complex64::new(5.0, 14.0));
    let e = SaddleExpansion::at(&field, pair, 30.0 * w, tr, ti);
    let [rr, ri, ii] = evaluate(&field, pair, 30.0 * w, tr, ti).hessian;
    let i = Complex64::i();
    let m = [[-i * rr, -i * ri], [-i * ri, -i * ii]];
    let a = &e.covariance;
    let product = [
        [
            a[0][0] * m[0][0] + a[0][1] * m[1][0],
            a[0][0] * m[0][1] + a[0][1] * m[1][1],
        ],
        [
            a[1][0] * m[0][0] + a[1][1] * m[1][0],
            a[1][0] * m[0][1] + a[1][1] * m[1][1],
        ],
    ];
    for (x, row) in product.iter().enumerate() {
        for (y, p) in row.iter().enumerate() {
            let want = if x == y { 1.0 } else { 0.0 };
            assert!((p - want).norm() < 1e-12, "(A·(−F''))_{x}{y} = {p}");
        }
    }
}

#[test]
fn the_caustic_zone_is_the_unit_disc_of_zeta() {
    assert!(near_caustic(Complex64::new(0.6, 0.6)));
    assert!(!near_caustic(Complex64::new(-0.8, 0.7)));
    assert!(!near_caustic(Complex64::new(2.0, 0.0)));
}

#[test]
fn spreading_gradient_is_the_derivative_of_the_spreading_factor() {
    // d/dt_r ln (ε + w + iτ)^{−3/2} = −(3/2) i/(ε + w + iτ), and the opposite for t_i.
    let tau = Complex64::new(40.0, -3.0);
    let g = spreading_log_gradient(tau, 0.3, 0.1);
    let s = |t: Complex64| (c(0.4) + Complex64::i() * t).powf(-1.5).ln();
    let h = 1e-5;
    let d = (s(tau + h) - s(tau - h)) / (2.0 * h);
    assert!((g[0] - d).norm() < 1e-9 * d.norm());
    assert!((g[1] + d).norm() < 1e-9 * d.norm());
}
