//! Tests of the hole propagator at complex times (`holecast::hole::ComplexHole`).
//!
//! Sources: SciPy `solve_ivp` (DOP853) along the same complex contour, written by
//! `scripts/hole_complex_reference.py` into `tests/data/hole_complex_contour.json` (versions and
//! the reference's own error estimate are recorded there); the closed form
//! `U_I(t₂, t₁) = e^{−iV(t₂ − t₁)}` for degenerate channels with a constant coupling (textbook
//! two-level quantum mechanics).

use holecast::field::{Field, Mode, TimeStructure};
use holecast::hole::{ComplexHole, FieldSamples, HolePropagator, IonModel};
use nalgebra::{DMatrix, Matrix3, Vector3};
use num_complex::Complex64;
use serde::Deserialize;

type CMat = Vec<Vec<[f64; 2]>>;

#[derive(Deserialize)]
struct Reference {
    cases: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    name: String,
    ionization_potentials: Vec<f64>,
    coupling: Vec<Vec<f64>>,
    dipole_z: Vec<Vec<f64>>,
    field_amplitude: f64,
    angular_frequency: f64,
    t_ionization: [f64; 2],
    t_return: [f64; 2],
    u_interaction_complex_contour: CMat,
    u_interaction_real_shortcut: CMat,
    u_interaction_ionization_leg: CMat,
    u_interaction_return_leg: CMat,
    error_estimate: f64,
}

fn reference() -> Reference {
    serde_json::from_str(include_str!("data/hole_complex_contour.json")).unwrap()
}

fn c(re: f64, im: f64) -> Complex64 {
    Complex64::new(re, im)
}

fn cmat(v: &CMat) -> DMatrix<Complex64> {
    DMatrix::from_fn(v.len(), v[0].len(), |i, j| c(v[i][j][0], v[i][j][1]))
}

fn rmat(v: &[Vec<f64>]) -> DMatrix<Complex64> {
    DMatrix::from_fn(v.len(), v[0].len(), |i, j| c(v[i][j], 0.0))
}

/// `E_z(t) = F cos ωt`: `A_z = −(F/ω) sin ωt = a e^{−iωt} + c.c.` with `a = −iF/(2ω)`.
fn cosine_field(f: f64, w: f64) -> Field {
    let amplitude = Vector3::new(c(0.0, 0.0), c(0.0, 0.0), c(0.0, -f / (2.0 * w)));
    Field::from_modes(
        vec![Mode {
            frequency: w,
            amplitude,
        }],
        w,
        TimeStructure::Periodic {
            period: 2.0 * std::f64::consts::PI / w,
        },
        Vector3::z(),
        f * f / (4.0 * w * w),
        f.max(1e-300),
    )
    .unwrap()
}

struct Built {
    ion: IonModel,
    field: Field,
    prop: HolePropagator,
}

fn build(case: &Case, window: (f64, f64)) -> Built {
    let n = case.ionization_potentials.len();
    let zero = DMatrix::from_element(n, n, c(0.0, 0.0));
    let ion = IonModel::new(
        case.ionization_potentials.clone(),
        rmat(&case.coupling),
        [zero.clone(), zero, rmat(&case.dipole_z)],
    )
    .unwrap();
    // A zero amplitude is not a valid mode: use a negligible field for the field-free case.
    let f = if case.field_amplitude == 0.0 {
        1e-300
    } else {
        case.field_amplitude
    };
    let field = cosine_field(f, case.angular_frequency);
    let at = |t: f64| field.electric_real(t);
    let samples = FieldSamples::new(&at, window.0, window.1, 0.05).unwrap();
    let prop = HolePropagator::new(&ion, &Matrix3::identity(), &samples).unwrap();
    Built { ion, field, prop }
}

fn max_rel(a: &DMatrix<Complex64>, b: &DMatrix<Complex64>) -> f64 {
    let scale = b.iter().fold(0.0_f64, |m, z| m.max(z.norm()));
    (a - b).iter().fold(0.0_f64, |m, z| m.max(z.norm())) / scale
}

#[test]
fn complex_contour_matches_scipy_along_the_same_path() {
    // Target of the issue: agreement with SciPy solve_ivp along the parametrised contour to 1e-8
    // (relative to the largest element), for the whole contour and each leg.
    for case in reference().cases {
        let ti = c(case.t_ionization[0], case.t_ionization[1]);
        let tr = c(case.t_return[0], case.t_return[1]);
        let b = build(&case, (ti.re - 5.0, tr.re + 5.0));
        let hole = ComplexHole::new(&b.ion, &Matrix3::identity(), &b.field, &b.prop).unwrap();
        let full = hole.matrix(tr, ti).unwrap();
        let e_full = max_rel(&full, &cmat(&case.u_interaction_complex_contour));
        let leg_i = hole.matrix(c(ti.re, 0.0), ti).unwrap();
        let e_leg_i = max_rel(&leg_i, &cmat(&case.u_interaction_ionization_leg));
        let leg_r = hole.matrix(tr, c(tr.re, 0.0)).unwrap();
        let e_leg_r = max_rel(&leg_r, &cmat(&case.u_interaction_return_leg));
        let real = hole.matrix(c(tr.re, 0.0), c(ti.re, 0.0)).unwrap();
        let e_real = max_rel(&real, &cmat(&case.u_interaction_real_shortcut));
        println!(
            "{}: contour {e_full:.1e}, ionization leg {e_leg_i:.1e}, return leg {e_leg_r:.1e}, \
             real {e_real:.1e} (reference error {:.1e})",
            case.name, case.error_estimate
        );
        for (what, e) in [
            ("contour", e_full),
            ("ionization leg", e_leg_i),
            ("return leg", e_leg_r),
            ("real shortcut", e_real),
        ] {
            assert!(e < 1e-8, "{}: {what} off by {e:e}", case.name);
        }
    }
}

#[test]
fn degenerate_channels_with_a_constant_coupling_follow_the_closed_form() {
    // Textbook: for H = Ip·1 + V with V = [[0, v], [v, 0]] the interaction-picture propagator is
    // e^{−iV(t₂−t₁)} = cos(vτ) 1 − i sin(vτ) σ_x, τ = t₂ − t₁, for complex times too.
    let v = 0.02;
    let ion = IonModel::new(
        vec![0.5, 0.5],
        DMatrix::from_row_slice(2, 2, &[c(0.0, 0.0), c(v, 0.0), c(v, 0.0), c(0.0, 0.0)]),
        [
            DMatrix::from_element(2, 2, c(0.0, 0.0)),
            DMatrix::from_element(2, 2, c(0.0, 0.0)),
            DMatrix::from_element(2, 2, c(0.0, 0.0)),
        ],
    )
    .unwrap();
    let field = cosine_field(0.05, 0.057);
    let at = |t: f64| field.electric_real(t);
    let samples = FieldSamples::new(&at, -10.0, 200.0, 0.12).unwrap();
    let prop = HolePropagator::new(&ion, &Matrix3::identity(), &samples).unwrap();
    let hole = ComplexHole::new(&ion, &Matrix3::identity(), &field, &prop).unwrap();
    for (t2, t1) in [
        (c(120.0, -1.0), c(3.0, 14.0)),
        (c(50.0, 2.0), c(-5.0, 20.0)),
    ] {
        let u = hole.matrix(t2, t1).unwrap();
        let tau = t2 - t1;
        let (cs, sn) = ((v * tau).cos(), (v * tau).sin());
        let expected =
            DMatrix::from_row_slice(2, 2, &[cs, c(0.0, -1.0) * sn, c(0.0, -1.0) * sn, cs]);
        let e = max_rel(&u, &expected);
        assert!(e < 1e-12, "{t2} ← {t1}: {e:e}");
    }
}

#[test]
fn continuation_along_a_family_equals_the_direct_evaluation() {
    // Slow and obvious beside fast (STYLE.md): tracking a sequence of nearby saddle times by
    // short segments must give the same matrices as integrating each from the real axis.
    let case = &reference().cases[2];
    let b = build(case, (-20.0, 160.0));
    let hole = ComplexHole::new(&b.ion, &Matrix3::identity(), &b.field, &b.prop).unwrap();
    let w = case.angular_frequency;
    let times: Vec<Option<(Complex64, Complex64)>> = (0..60)
        .map(|k| {
            if k == 30 {
                return None; // a gap restarts from the real axis
            }
            let s = k as f64 / 59.0;
            let ti = c(0.2 + 0.4 * s, 1.0 - 0.3 * s) / w;
            let tr = c(3.0 + 2.0 * s, -0.08 + 0.1 * s) / w;
            Some((tr, ti))
        })
        .collect();
    let order: Vec<usize> = (0..times.len()).collect();
    let track = hole.track(&times, &order).unwrap();
    let mut worst = 0.0_f64;
    for (k, t) in times.iter().enumerate() {
        match t {
            Some((tr, ti)) => {
                let direct = hole.matrix(*tr, *ti).unwrap();
                worst = worst.max(max_rel(&track.matrix(k), &direct));
            }
            None => assert!(track.element(k, 0, 0).is_nan()),
        }
    }
    assert!(worst < 1e-10, "track vs direct: {worst:e}");
}

#[test]
fn on_the_real_axis_the_continuation_is_the_real_time_propagator() {
    // Consistency: at real times the continuation adds nothing to the grid propagator.
    let case = &reference().cases[4];
    let b = build(case, (-20.0, 160.0));
    let hole = ComplexHole::new(&b.ion, &Matrix3::identity(), &b.field, &b.prop).unwrap();
    for (t2, t1) in [(73.1, 5.2), (140.0, -3.0), (10.0, 90.0)] {
        let u = hole.matrix(c(t2, 0.0), c(t1, 0.0)).unwrap();
        let r = b.prop.matrix(t2, t1).unwrap();
        assert!(max_rel(&u, &r) < 1e-13, "{t2}, {t1}");
    }
}

#[test]
fn element_derivatives_match_finite_differences_at_complex_times() {
    // ∂U/∂t₂ = −iV_I(t₂)U, ∂U/∂t₁ = iUV_I(t₁) and their second derivatives (derived from the
    // equation of motion) against central differences of the directly evaluated propagator.
    let case = &reference().cases[4];
    let b = build(case, (-20.0, 160.0));
    let hole = ComplexHole::new(&b.ion, &Matrix3::identity(), &b.field, &b.prop).unwrap();
    let (t2, t1) = (c(60.0, -0.8), c(8.0, 13.0));
    let track = hole.track(&[Some((t2, t1))], &[0]).unwrap();
    let h = 1e-3;
    let u = |a: Complex64, b: Complex64| hole.matrix(a, b).unwrap();
    for (m, n) in [(0, 0), (1, 0), (2, 1), (0, 2)] {
        let d = hole.derivatives(&track, 0, m, n, t2, t1);
        let e = |x: DMatrix<Complex64>| x[(m, n)];
        let f2 = (e(u(t2 + h, t1)) - e(u(t2 - h, t1))) / (2.0 * h);
        let f1 = (e(u(t2, t1 + h)) - e(u(t2, t1 - h))) / (2.0 * h);
        let f22 = (e(u(t2 + h, t1)) - 2.0 * e(u(t2, t1)) + e(u(t2 - h, t1))) / (h * h);
        let f11 = (e(u(t2, t1 + h)) - 2.0 * e(u(t2, t1)) + e(u(t2, t1 - h))) / (h * h);
        let f21 = (e(u(t2 + h, t1 + h)) - e(u(t2 + h, t1 - h)) - e(u(t2 - h, t1 + h))
            + e(u(t2 - h, t1 - h)))
            / (4.0 * h * h);
        let scale = d.value.norm().max(1e-3);
        for (what, a, b) in [
            ("value", d.value, e(u(t2, t1))),
            ("∂t₂", d.first[0], f2),
            ("∂t₁", d.first[1], f1),
            ("∂²t₂", d.second[0][0], f22),
            ("∂²t₁", d.second[1][1], f11),
            ("∂t₂∂t₁", d.second[0][1], f21),
        ] {
            assert!(
                (a - b).norm() < 1e-5 * scale.max(b.norm()),
                "({m},{n}) {what}: {a} vs {b}"
            );
        }
    }
}
