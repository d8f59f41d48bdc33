//! Tests of the ionic (hole) propagator `holecast::hole`.
//!
//! Sources: textbook quantum mechanics (unitarity, zero coupling, two-level Rabi problems),
//! the project's physics dossier `physics-notes.md` §4.3 / check #17 (exact TDSE Rabi values),
//! and SciPy 1.17.1 / NumPy 2.4.6 (`scipy.linalg.expm`, `scipy.integrate.solve_ivp`) through
//! `scripts/hole_reference.py`, whose output is `tests/data/hole_reference.json`.

mod common;

use common::{DrivenCase, cmat, euler_zyz, max_abs_diff, reference, unitarity_defect};
use holecast::hole::{
    DEFAULT_MAX_STEP, FieldSamples, HoleError, HolePropagator, IonModel, MagnusScheme,
};
use nalgebra::{DMatrix, Matrix3, Vector3};
use num_complex::Complex64;
use proptest::prelude::*;

fn c(re: f64, im: f64) -> Complex64 {
    Complex64::new(re, im)
}

fn zeros(n: usize) -> DMatrix<Complex64> {
    DMatrix::from_element(n, n, c(0.0, 0.0))
}

fn no_field(_: f64) -> Vector3<f64> {
    Vector3::zeros()
}

/// Times spread over the window, none on a grid node (an irrational fraction of the step).
fn off_grid_times(samples: &FieldSamples, count: usize) -> Vec<f64> {
    let (a, b) = (samples.t_start(), samples.t_end());
    (0..count)
        .map(|k| a + (b - a) * ((k as f64 * 0.618_033_988_749_895 + 0.1234) % 1.0))
        .collect()
}

// ---------------------------------------------------------------------------------------------
// 1. Unitarity (textbook: H Hermitian ⇒ U unitary; common practice as a numerical check).

#[test]
fn propagator_is_unitary_at_grid_and_off_grid_times() {
    let r = reference();
    for case in [&r.two_colour, &r.worst_case] {
        let samples = case.samples(DEFAULT_MAX_STEP);
        let p = HolePropagator::new(&case.ion(), &case.rotation(), &samples).unwrap();
        let mut worst: f64 = 0.0;
        // Grid nodes, paired with the window start and with each other.
        for k in (0..=samples.steps()).step_by(97) {
            let t = samples.node_time(k).unwrap();
            worst = worst.max(unitarity_defect(&p.matrix(t, samples.t_start()).unwrap()));
            let t1 = samples.node_time(k / 2).unwrap();
            worst = worst.max(unitarity_defect(&p.matrix(t, t1).unwrap()));
        }
        // Off-grid times.
        let times = off_grid_times(&samples, 40);
        for pair in times.windows(2) {
            worst = worst.max(unitarity_defect(&p.matrix(pair[1], pair[0]).unwrap()));
        }
        assert!(worst < 1e-10, "{}: unitarity defect {worst:e}", case.name);
    }
}

// ---------------------------------------------------------------------------------------------
// 2. Zero couplings (textbook: V_I = 0 ⇒ U_I = 1 and U_S = diag(e^{−i Ip (t2−t1)})).

#[test]
fn zero_couplings_give_identity_and_diagonal_schrodinger_phases() {
    let ip = vec![0.5, 0.55, 0.8];
    let ion = IonModel::new(ip.clone(), zeros(3), [zeros(3), zeros(3), zeros(3)]).unwrap();
    assert!(ion.is_uncoupled());
    let field = |t: f64| Vector3::new(0.05 * (0.057 * t).cos(), 0.02, -0.03 * (0.1 * t).sin());
    let samples = FieldSamples::new(&field, -40.0, 300.0, DEFAULT_MAX_STEP).unwrap();
    let p = HolePropagator::new(&ion, &euler_zyz(0.3, 1.1, -0.4), &samples).unwrap();
    for (t2, t1) in [
        (250.3, -12.7),
        (17.01, 17.01),
        (-30.5, 200.0),
        (300.0, -40.0),
    ] {
        let u = p.matrix(t2, t1).unwrap();
        // The steps run in the Schrödinger picture and the Bohr phases are removed analytically,
        // so what is left is rounding accumulated over ~3000 steps (observed 3e-14).
        let d = max_abs_diff(&u, &DMatrix::identity(3, 3));
        assert!(d < 1e-12, "{d:e}");
        for m in 0..3 {
            for n in 0..3 {
                // Schrödinger element e^{−i Ip_m t2} [U_I]_mn e^{+i Ip_n t1}.
                let s = Complex64::cis(-ip[m] * t2)
                    * p.element(m, n, t2, t1).unwrap()
                    * Complex64::cis(ip[n] * t1);
                let want = if m == n {
                    Complex64::cis(-ip[m] * (t2 - t1))
                } else {
                    c(0.0, 0.0)
                };
                assert!((s - want).norm() < 1e-12, "({m},{n}) at ({t2},{t1})");
            }
        }
    }
}

#[test]
fn diagonal_dipoles_give_stark_phases() {
    // Textbook: with diagonal V − E·μ, i dU_nn/dt = (V_nn − E(t) μ_nn) U_nn, so
    // U_I(t2,t1)_nn = exp(−i V_nn (t2−t1) + i μ_nn ∫E dt), ∫_{t1}^{t2} F cos ωt dt = F (sin ωt2 − sin ωt1)/ω.
    let (f, w) = (0.07, 0.057);
    let mu_z = DMatrix::from_diagonal(&nalgebra::DVector::from_vec(vec![
        c(1.3, 0.0),
        c(-0.4, 0.0),
    ]));
    let v = DMatrix::from_diagonal(&nalgebra::DVector::from_vec(vec![
        c(0.0, 0.0),
        c(0.01, 0.0),
    ]));
    let ion = IonModel::new(
        vec![0.5, 0.7],
        v.clone(),
        [zeros(2), zeros(2), mu_z.clone()],
    )
    .unwrap();
    assert!(ion.is_uncoupled());
    let field = move |t: f64| Vector3::new(0.0, 0.0, f * (w * t).cos());
    let samples = FieldSamples::new(&field, 0.0, 331.0, DEFAULT_MAX_STEP).unwrap();
    let p = HolePropagator::new(&ion, &Matrix3::identity(), &samples).unwrap();
    for (t2, t1) in [(300.7, 12.3), (155.55, 0.0), (331.0, 200.1)] {
        let integral = f * ((w * t2).sin() - (w * t1).sin()) / w;
        for n in 0..2 {
            let want = Complex64::cis(-v[(n, n)].re * (t2 - t1) + mu_z[(n, n)].re * integral);
            let got = p.element(n, n, t2, t1).unwrap();
            assert!((got - want).norm() < 1e-10, "channel {n}: {got} vs {want}");
        }
        assert!(p.element(0, 1, t2, t1).unwrap().norm() < 1e-15);
    }
}

// ---------------------------------------------------------------------------------------------
// 3. Static degenerate coupling (textbook two-level problem: |U21(t)|² = sin²(V12 t);
//    value 0.31882112 from physics-notes.md §4.3 / check #17).

#[test]
fn static_degenerate_coupling_transfers_sin_squared() {
    let mut v = zeros(2);
    v[(0, 1)] = c(0.02, 0.0);
    v[(1, 0)] = c(0.02, 0.0);
    let ion = IonModel::new(vec![0.5, 0.5], v, [zeros(2), zeros(2), zeros(2)]).unwrap();
    assert!(!ion.is_uncoupled());
    let samples = FieldSamples::new(&no_field, 0.0, 30.0, DEFAULT_MAX_STEP).unwrap();
    let p = HolePropagator::new(&ion, &Matrix3::identity(), &samples).unwrap();
    let population = p.element(1, 0, 30.0, 0.0).unwrap().norm_sqr();
    assert!((population - 0.31882112).abs() < 5e-9, "{population}");
    assert!((population - 0.6_f64.sin().powi(2)).abs() < 1e-13);
    // Off-grid time, same formula.
    let t = 17.3456;
    let population = p.element(1, 0, t, 0.0).unwrap().norm_sqr();
    assert!((population - (0.02 * t).sin().powi(2)).abs() < 1e-12);
}

// ---------------------------------------------------------------------------------------------
// 4. Resonant Rabi oscillation: ΔE = ω = 0.1, E(t) = F cos ωt ẑ, μ_z off-diagonal with μF = 0.005.
//    Exact TDSE values P2(π/2Ω_R) = 0.499860, P2(π/Ω_R) = 0.999844 (physics-notes.md §4.3, NUM;
//    recomputed by scripts/hole_reference.py with SciPy solve_ivp); RWA P2 = sin²(Ω_R t/2),
//    Ω_R = μF (textbook), differing by the Bloch–Siegert size ~(Ω_R/4ω)².

#[test]
fn resonant_rabi_oscillation_matches_exact_tdse_and_rwa() {
    let r = reference().rabi;
    let (w, f) = (r.w, r.f);
    let mut mu_z = zeros(2);
    mu_z[(0, 1)] = c(1.0, 0.0);
    mu_z[(1, 0)] = c(1.0, 0.0);
    let ion = IonModel::new(r.energies.clone(), zeros(2), [zeros(2), zeros(2), mu_z]).unwrap();
    let rabi = f;
    let field = move |t: f64| Vector3::new(0.0, 0.0, f * (w * t).cos());
    let t_end = std::f64::consts::PI / rabi;
    let samples = FieldSamples::new(&field, 0.0, t_end, DEFAULT_MAX_STEP).unwrap();
    let p = HolePropagator::new(&ion, &Matrix3::identity(), &samples).unwrap();
    let dossier = [0.499860, 0.999844];
    let bloch_siegert = (rabi / (4.0 * w)).powi(2);
    for (k, &t) in r.times.iter().enumerate() {
        let population = p.element(1, 0, t, 0.0).unwrap().norm_sqr();
        assert!(
            (population - dossier[k]).abs() < 1e-5,
            "t = {t}: {population}"
        );
        assert!(
            (population - r.population_2[k]).abs() < 1e-9,
            "t = {t}: {population}"
        );
        let rwa = (rabi * t / 2.0).sin().powi(2);
        let gap = (population - rwa).abs();
        assert!(
            gap < 2.0 * bloch_siegert && gap > 0.1 * bloch_siegert,
            "RWA gap {gap:e}"
        );
    }
}

// ---------------------------------------------------------------------------------------------
// 5. SciPy references (scripts/hole_reference.py; SciPy 1.17.1, NumPy 2.4.6).

#[test]
fn reference_data_records_its_provenance() {
    let r = reference();
    assert_eq!(r.script, "scripts/hole_reference.py");
    assert_eq!(r.libraries.scipy, "1.17.1");
    assert_eq!(r.libraries.numpy, "2.4.6");
}

#[test]
fn static_hamiltonians_match_scipy_expm() {
    // scipy.linalg.expm(-1j H t) with H = diag(Ip) + V − (Rᵀ E)·μ, compared in the Schrödinger
    // picture: U_S(t, 0)_mn = e^{−i Ip_m t} [U_I(t, 0)]_mn.
    for case in reference().static_cases {
        let ion = IonModel::new(
            case.energies.clone(),
            cmat(&case.coupling),
            [
                cmat(&case.dipole[0]),
                cmat(&case.dipole[1]),
                cmat(&case.dipole[2]),
            ],
        )
        .unwrap();
        let e = Vector3::from(case.field_lab);
        let field = move |_: f64| e;
        let t_end = case.times.iter().copied().fold(0.0, f64::max);
        let samples = FieldSamples::new(&field, 0.0, t_end, DEFAULT_MAX_STEP).unwrap();
        let [a, b, g] = case.euler_zyz;
        let p = HolePropagator::new(&ion, &euler_zyz(a, b, g), &samples).unwrap();
        for (t, want) in case.times.iter().zip(&case.schrodinger) {
            let want = cmat(want);
            let u = p.matrix(*t, 0.0).unwrap();
            let s = DMatrix::from_fn(3, 3, |m, n| {
                Complex64::cis(-case.energies[m] * t) * u[(m, n)]
            });
            let d = max_abs_diff(&s, &want);
            assert!(d < 1e-11, "{} at t = {t}: {d:e}", case.name);
        }
    }
}

fn compare_driven(case: &DrivenCase, max_step: f64, tolerance: f64) -> f64 {
    // The rotation built here must be the one the script used.
    let r = case.rotation();
    for i in 0..3 {
        for j in 0..3 {
            assert!((r[(i, j)] - case.rotation[i][j]).abs() < 1e-15);
        }
    }
    let samples = case.samples(max_step);
    let p = HolePropagator::new(&case.ion(), &r, &samples).unwrap();
    let mut worst: f64 = 0.0;
    for pair in &case.pairs {
        let want = cmat(&pair.u_interaction);
        let got = p.matrix(pair.t2, pair.t1).unwrap();
        worst = worst.max(max_abs_diff(&got, &want));
        for m in 0..3 {
            for n in 0..3 {
                let e = p.element(m, n, pair.t2, pair.t1).unwrap();
                assert!((e - got[(m, n)]).norm() < 1e-15);
            }
        }
    }
    assert!(
        worst < tolerance,
        "{}: max deviation {worst:e} (reference's own error ≈ {:e})",
        case.name,
        case.integration_error_estimate
    );
    worst
}

#[test]
fn two_colour_field_matches_scipy_solve_ivp() {
    // Includes a backward pair (t2 < t1) and off-grid times throughout.
    let r = reference();
    compare_driven(&r.two_colour, DEFAULT_MAX_STEP, 1e-9);
}

#[test]
fn default_step_meets_1e_10_in_the_worst_specified_case() {
    // Ip differences up to 1 a.u., dipole elements up to 3 a.u., |E| < 0.1 a.u. (ω and 2ω at
    // 800 nm), 4-cycle window; reference integrated with rtol = atol = 1e-13.
    let r = reference();
    assert!(r.worst_case.integration_error_estimate < 2e-11);
    compare_driven(&r.worst_case, DEFAULT_MAX_STEP, 1e-10);
}

// ---------------------------------------------------------------------------------------------
// 6. Convergence order (common practice: the global error of an order-p method falls by 2^p
//    when the step is halved; Magnus orders from Blanes, Casas, Oteo, Ros, Phys. Rep. 470, 151
//    (2009)). Errors are measured at grid nodes against SciPy solve_ivp, well above rounding.

fn error_at_nodes(
    case: &DrivenCase,
    pair_index: usize,
    max_step: f64,
    scheme: MagnusScheme,
) -> f64 {
    let pair = &case.pairs[pair_index];
    let field = case.field();
    let samples = FieldSamples::new(&field, pair.t1, pair.t2, max_step).unwrap();
    let p = HolePropagator::with_scheme(&case.ion(), &case.rotation(), &samples, scheme).unwrap();
    max_abs_diff(
        &p.matrix(pair.t2, pair.t1).unwrap(),
        &cmat(&pair.u_interaction),
    )
}

#[test]
fn fourth_order_scheme_error_falls_sixteen_fold_per_halving() {
    let r = reference();
    let coarse = error_at_nodes(&r.worst_case, 3, 0.4, MagnusScheme::Fourth);
    let fine = error_at_nodes(&r.worst_case, 3, 0.2, MagnusScheme::Fourth);
    assert!(fine > 1e3 * r.worst_case.integration_error_estimate);
    let ratio = coarse / fine;
    assert!(
        (10.0..=22.0).contains(&ratio),
        "ratio {ratio} ({coarse:e} → {fine:e})"
    );
}

#[test]
fn sixth_order_scheme_error_falls_sixty_four_fold_per_halving() {
    let r = reference();
    let coarse = error_at_nodes(&r.worst_case, 3, 0.4, MagnusScheme::Sixth);
    let fine = error_at_nodes(&r.worst_case, 3, 0.2, MagnusScheme::Sixth);
    assert!(fine > 20.0 * r.worst_case.integration_error_estimate);
    let ratio = coarse / fine;
    assert!(
        (45.0..=85.0).contains(&ratio),
        "ratio {ratio} ({coarse:e} → {fine:e})"
    );
}

#[test]
fn fourth_and_sixth_order_schemes_agree_at_a_fine_step() {
    // Slow and obvious beside fast (STYLE.md): the plain fourth-order path at a small step
    // reproduces the default path.
    let r = reference();
    let case = &r.two_colour;
    let slow = HolePropagator::with_scheme(
        &case.ion(),
        &case.rotation(),
        &case.samples(0.02),
        MagnusScheme::Fourth,
    )
    .unwrap();
    let fast = HolePropagator::new(
        &case.ion(),
        &case.rotation(),
        &case.samples(DEFAULT_MAX_STEP),
    )
    .unwrap();
    for pair in &case.pairs {
        let d = max_abs_diff(
            &slow.matrix(pair.t2, pair.t1).unwrap(),
            &fast.matrix(pair.t2, pair.t1).unwrap(),
        );
        assert!(d < 1e-10, "{d:e}");
    }
}

// ---------------------------------------------------------------------------------------------
// Group property and frame convention (textbook: U(t3,t1) = U(t3,t2) U(t2,t1), U(t,t) = 1,
// U(t1,t2) = U(t2,t1)†; E_lab·μ_lab = (Rᵀ E_lab)·μ_mol by definition of R).

#[test]
fn rotation_enters_only_through_the_transposed_field() {
    let r = reference();
    let case = &r.two_colour;
    let rot = case.rotation();
    let lab = case.field();
    let molecular = move |t: f64| rot.transpose() * lab(t);
    let (a, b) = (case.window[0], case.window[1]);
    let rotated = HolePropagator::new(&case.ion(), &rot, &case.samples(DEFAULT_MAX_STEP)).unwrap();
    let samples = FieldSamples::new(&molecular, a, b, DEFAULT_MAX_STEP).unwrap();
    let unrotated = HolePropagator::new(&case.ion(), &Matrix3::identity(), &samples).unwrap();
    for pair in &case.pairs {
        let d = max_abs_diff(
            &rotated.matrix(pair.t2, pair.t1).unwrap(),
            &unrotated.matrix(pair.t2, pair.t1).unwrap(),
        );
        assert!(d < 1e-13, "{d:e}");
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]
    #[test]
    fn composition_identity_and_inverse_hold_at_off_grid_times(
        x1 in 0.0..1.0f64, x2 in 0.0..1.0f64, x3 in 0.0..1.0f64,
        alpha in -3.1..3.1f64, beta in 0.0..3.1f64, gamma in -3.1..3.1f64,
    ) {
        let r = reference();
        let case = &r.worst_case;
        let samples = case.samples(DEFAULT_MAX_STEP);
        let p = HolePropagator::new(&case.ion(), &euler_zyz(alpha, beta, gamma), &samples).unwrap();
        let (a, b) = (samples.t_start(), samples.t_end());
        let [t1, t2, t3] = [x1, x2, x3].map(|x| a + (b - a) * x);
        let direct = p.matrix(t3, t1).unwrap();
        let composed = p.matrix(t3, t2).unwrap() * p.matrix(t2, t1).unwrap();
        prop_assert!(max_abs_diff(&direct, &composed) < 1e-10);
        prop_assert!(unitarity_defect(&direct) < 1e-10);
        prop_assert!(max_abs_diff(&p.matrix(t2, t2).unwrap(), &DMatrix::identity(3, 3)) < 1e-10);
        prop_assert!(max_abs_diff(&p.matrix(t1, t3).unwrap(), &direct.adjoint()) < 1e-14);
    }
}

// ---------------------------------------------------------------------------------------------
// 7. Validation: typed errors that name the element or value (project rule, BRIEF.md).

fn hermitian3() -> DMatrix<Complex64> {
    DMatrix::from_row_slice(
        3,
        3,
        &[
            c(0.1, 0.0),
            c(0.3, 0.2),
            c(0.0, -0.4),
            c(0.3, -0.2),
            c(-0.5, 0.0),
            c(0.7, 0.1),
            c(0.0, 0.4),
            c(0.7, -0.1),
            c(0.2, 0.0),
        ],
    )
}

fn ion_with(
    energies: Vec<f64>,
    v: DMatrix<Complex64>,
    mu: [DMatrix<Complex64>; 3],
) -> Result<IonModel, HoleError> {
    IonModel::new(energies, v, mu)
}

#[test]
fn non_hermitian_dipole_is_rejected_naming_the_element() {
    let mut mu_y = hermitian3();
    mu_y[(2, 0)] = c(0.0, -0.3999); // conj of (0,2) would be (0, 0.4)... broken on purpose
    mu_y[(0, 2)] = c(0.0, -0.4);
    let err = ion_with(
        vec![0.5, 0.6, 0.7],
        zeros(3),
        [hermitian3(), mu_y, hermitian3()],
    )
    .unwrap_err();
    match &err {
        HoleError::NotHermitian {
            parameter,
            row,
            col,
            ..
        } => {
            assert_eq!((*parameter, *row, *col), ("dipole_y", 0, 2));
        }
        other => panic!("wrong error {other:?}"),
    }
    let text = err.to_string();
    assert!(
        text.contains("dipole_y") && text.contains("(0, 2)") && text.contains("Hermitian"),
        "{text}"
    );
}

#[test]
fn non_hermitian_coupling_and_complex_diagonal_are_rejected() {
    let mut v = zeros(3);
    v[(1, 1)] = c(0.0, 0.1);
    let err = ion_with(vec![0.5, 0.6, 0.7], v, [zeros(3), zeros(3), zeros(3)]).unwrap_err();
    assert!(
        matches!(
            err,
            HoleError::NotHermitian {
                parameter: "coupling",
                row: 1,
                col: 1,
                ..
            }
        ),
        "{err:?}"
    );
    let mut v = zeros(3);
    v[(0, 1)] = c(0.02, 0.0);
    v[(1, 0)] = c(0.03, 0.0);
    let err = ion_with(vec![0.5, 0.6, 0.7], v, [zeros(3), zeros(3), zeros(3)]).unwrap_err();
    assert!(
        matches!(
            err,
            HoleError::NotHermitian {
                parameter: "coupling",
                row: 0,
                col: 1,
                ..
            }
        ),
        "{err:?}"
    );
}

#[test]
fn hermiticity_within_tolerance_is_accepted_and_symmetrised() {
    let mut mu = hermitian3();
    mu[(0, 1)] = c(0.3 + 1e-12, 0.2);
    let ion = ion_with(vec![0.5, 0.6, 0.7], zeros(3), [mu, zeros(3), zeros(3)]).unwrap();
    let kept = &ion.dipole()[0];
    assert_eq!(kept[(0, 1)], kept[(1, 0)].conj());
    assert!((kept[(0, 1)].re - (0.3 + 0.5e-12)).abs() < 1e-15);
}

#[test]
fn wrong_sizes_are_rejected() {
    let v = DMatrix::from_element(2, 3, c(0.0, 0.0));
    let err = ion_with(vec![0.5, 0.6, 0.7], v, [zeros(3), zeros(3), zeros(3)]).unwrap_err();
    assert_eq!(
        err,
        HoleError::Shape {
            parameter: "coupling",
            rows: 2,
            cols: 3,
            expected: 3
        }
    );
    assert!(err.to_string().contains("2×3"));
    let err = ion_with(
        vec![0.5, 0.6, 0.7],
        zeros(3),
        [zeros(3), zeros(3), zeros(2)],
    )
    .unwrap_err();
    assert_eq!(
        err,
        HoleError::Shape {
            parameter: "dipole_z",
            rows: 2,
            cols: 2,
            expected: 3
        }
    );
    let err = ion_with(vec![], zeros(0), [zeros(0), zeros(0), zeros(0)]).unwrap_err();
    assert!(matches!(err, HoleError::ChannelCount { found: 0, .. }));
    let err = ion_with(vec![0.5; 9], zeros(9), [zeros(9), zeros(9), zeros(9)]).unwrap_err();
    assert!(matches!(err, HoleError::ChannelCount { found: 9, max: 8 }));
    assert!(err.to_string().contains('9'));
}

#[test]
fn non_finite_entries_are_rejected() {
    let err = ion_with(
        vec![0.5, f64::NAN, 0.7],
        zeros(3),
        [zeros(3), zeros(3), zeros(3)],
    )
    .unwrap_err();
    assert!(matches!(err, HoleError::NonFiniteEnergy { index: 1, .. }));
    assert!(err.to_string().contains("energies[1]"));
    let mut mu = zeros(3);
    mu[(1, 2)] = c(f64::INFINITY, 0.0);
    let err = ion_with(vec![0.5, 0.6, 0.7], zeros(3), [mu, zeros(3), zeros(3)]).unwrap_err();
    assert!(matches!(
        err,
        HoleError::NonFiniteElement {
            parameter: "dipole_x",
            row: 1,
            col: 2,
            ..
        }
    ));
    assert!(err.to_string().contains("dipole_x[(1, 2)]"));
    let field = |t: f64| Vector3::new(0.0, if t > 10.0 { f64::NAN } else { 0.0 }, 0.0);
    let err = FieldSamples::new(&field, 0.0, 20.0, 0.5).unwrap_err();
    assert!(
        matches!(err, HoleError::NonFiniteField { component: "y", .. }),
        "{err:?}"
    );
}

#[test]
fn lookups_outside_the_window_or_channels_are_rejected() {
    let ion = ion_with(
        vec![0.5, 0.6, 0.7],
        zeros(3),
        [hermitian3(), zeros(3), zeros(3)],
    )
    .unwrap();
    let field = |t: f64| Vector3::new(0.05 * t.cos(), 0.0, 0.0);
    let samples = FieldSamples::new(&field, -10.0, 50.0, DEFAULT_MAX_STEP).unwrap();
    let p = HolePropagator::new(&ion, &Matrix3::identity(), &samples).unwrap();
    let err = p.element(0, 1, 50.001, 0.0).unwrap_err();
    assert_eq!(
        err,
        HoleError::TimeOutsideWindow {
            parameter: "t2",
            value: 50.001,
            t_start: -10.0,
            t_end: 50.0
        }
    );
    assert!(err.to_string().contains("t2 = 50.001"));
    let err = p.element(0, 1, 1.0, -10.5).unwrap_err();
    assert!(matches!(
        err,
        HoleError::TimeOutsideWindow {
            parameter: "t1",
            ..
        }
    ));
    let err = p.matrix(1.0, f64::NAN).unwrap_err();
    assert!(matches!(
        err,
        HoleError::TimeOutsideWindow {
            parameter: "t1",
            ..
        }
    ));
    let err = p.element(3, 0, 1.0, 0.0).unwrap_err();
    assert_eq!(
        err,
        HoleError::ChannelIndex {
            parameter: "m",
            value: 3,
            channels: 3
        }
    );
    let err = p.element(0, 7, 1.0, 0.0).unwrap_err();
    assert!(matches!(
        err,
        HoleError::ChannelIndex {
            parameter: "n",
            value: 7,
            ..
        }
    ));
    // The window ends themselves are inside.
    assert!(p.element(0, 0, 50.0, -10.0).is_ok());
}

#[test]
fn bad_windows_steps_and_rotations_are_rejected() {
    for (a, b) in [
        (10.0, 10.0),
        (10.0, -1.0),
        (f64::NAN, 1.0),
        (0.0, f64::INFINITY),
        (-f64::MAX, f64::MAX),
    ] {
        let err = FieldSamples::new(&no_field, a, b, 0.1).unwrap_err();
        assert!(
            matches!(err, HoleError::Window { .. }),
            "({a}, {b}): {err:?}"
        );
    }
    for step in [0.0, -0.1, f64::NAN, f64::INFINITY, 1e-9] {
        let err = FieldSamples::new(&no_field, 0.0, 300.0, step).unwrap_err();
        assert!(matches!(err, HoleError::MaxStep { .. }), "{step}: {err:?}");
        assert!(err.to_string().contains("max_step"));
    }
    let ion = ion_with(
        vec![0.5, 0.6, 0.7],
        zeros(3),
        [hermitian3(), zeros(3), zeros(3)],
    )
    .unwrap();
    let samples = FieldSamples::new(&no_field, 0.0, 10.0, 0.5).unwrap();
    let err = HolePropagator::new(&ion, &(Matrix3::identity() * 1.01), &samples).unwrap_err();
    assert!(matches!(err, HoleError::Rotation { .. }));
    assert!(err.to_string().contains("not orthogonal"));
    let mut r = Matrix3::identity();
    r[(1, 2)] = f64::NAN;
    assert!(matches!(
        HolePropagator::new(&ion, &r, &samples),
        Err(HoleError::Rotation { .. })
    ));
}

// ---------------------------------------------------------------------------------------------
// Times resolved once on the grid (common practice: same arithmetic, so bit-identical results).

#[test]
fn located_times_give_the_same_elements_and_reject_another_grid() {
    let r = reference();
    let case = &r.two_colour;
    let samples = case.samples(DEFAULT_MAX_STEP);
    let p = HolePropagator::new(&case.ion(), &case.rotation(), &samples).unwrap();
    for pair in &case.pairs {
        let (t2, t1) = (
            samples.locate(pair.t2).unwrap(),
            samples.locate(pair.t1).unwrap(),
        );
        assert_eq!(t2.time(), pair.t2);
        for m in 0..3 {
            for n in 0..3 {
                assert_eq!(
                    p.element_at(m, n, &t2, &t1).unwrap(),
                    p.element(m, n, pair.t2, pair.t1).unwrap()
                );
            }
        }
    }
    let err = samples.locate(1e4).unwrap_err();
    assert!(matches!(
        err,
        HoleError::TimeOutsideWindow { parameter: "t", .. }
    ));
    let other = case.samples(0.1);
    let t = other.locate(100.0).unwrap();
    let ok = samples.locate(100.0).unwrap();
    let err = p.element_at(0, 1, &ok, &t).unwrap_err();
    assert!(
        matches!(
            err,
            HoleError::GridMismatch {
                parameter: "t1",
                ..
            }
        ),
        "{err:?}"
    );
    assert!(err.to_string().contains("locate it with the FieldSamples"));
    let err = p.element_at(4, 1, &ok, &ok).unwrap_err();
    assert!(matches!(
        err,
        HoleError::ChannelIndex {
            parameter: "m",
            value: 4,
            ..
        }
    ));
}
