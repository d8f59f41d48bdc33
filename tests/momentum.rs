//! Tests of `holecast::momentum`: the drift-momentum integral done exactly for Gaussian-type
//! structure.
//!
//! Sources: the Gaussian integral `∫ e^{−λq² − B·q} d³q = (π/λ)^{3/2} e^{B²/4λ}` and its first
//! moments (textbook); the s-Gaussian dipoles of physics notes §1.7; Laplace's method for the
//! limit of long excursions (textbook asymptotics); the brute-force 3-D quadrature of
//! `scripts/momentum_integral_reference.py` (NumPy/SciPy, versions in the data file).

use std::sync::Arc;

use holecast::ionization::IonizationModel;
use holecast::momentum::{
    GaussianSide, IonSide, Measure, RecSide, exact_integral, stationary_integral,
};
use holecast::orbital::{CartesianSpec, Orbital, PlaneWaveProjection, TermSpec};
use holecast::recombination::{DipoleForm, RecombinationModel, ReturnMomentum};
use nalgebra::Vector3;
use num_complex::Complex64;

type CVec = Vector3<Complex64>;

fn c(re: f64, im: f64) -> Complex64 {
    Complex64::new(re, im)
}

fn cv(x: Complex64, y: Complex64, z: Complex64) -> CVec {
    Vector3::new(x, y, z)
}

fn term(centre: [f64; 3], exponent: f64, cartesian: &str, coefficient: [f64; 2]) -> TermSpec {
    TermSpec {
        centre_bohr: centre,
        exponents_inv_bohr2: vec![exponent],
        contraction: vec![],
        cartesian: CartesianSpec::Label(cartesian.to_owned()),
        coefficient,
    }
}

fn rel(a: &CVec, b: &CVec) -> f64 {
    let scale = b.iter().map(|x| x.norm()).fold(1e-300, f64::max);
    (a - b).iter().map(|x| x.norm()).fold(0.0, f64::max) / scale
}

fn mixed_orbital() -> Arc<Orbital> {
    Arc::new(
        Orbital::new(
            "mixed",
            &[
                term([0.3, -0.2, 1.1], 0.5, "pz", [1.0, 0.0]),
                term([-0.3, 0.2, -1.1], 0.5, "pz", [-0.7, 0.2]),
                term([0.0, 0.0, 0.0], 0.8, "dxy", [0.4, 0.0]),
                term([0.0, 0.0, 0.0], 0.8, "s", [0.3, -0.1]),
                term([1.0, 0.5, 0.0], 0.35, "fxyz", [0.2, 0.0]),
            ],
        )
        .unwrap(),
    )
}

#[test]
fn gaussian_sides_reproduce_the_models_they_stand_for() {
    // Consistency: the shell form must equal the orbital module's own transforms (which are
    // checked against quadrature in tests/orbital.rs).
    let orbital = mixed_orbital();
    let ks = [
        cv(c(0.3, 0.1), c(-0.4, 0.0), c(1.2, 0.7)),
        cv(c(0.0, 0.0), c(0.0, 0.0), c(0.2, 0.9)),
        cv(c(-1.1, 0.0), c(0.5, -0.3), c(0.0, 0.4)),
    ];
    let ion = GaussianSide::ionization(&IonizationModel::Orbital {
        orbital: orbital.clone(),
    })
    .unwrap();
    let length = GaussianSide::recombination(&RecombinationModel::Lcao {
        orbital: orbital.clone(),
        form: DipoleForm::Length,
        momentum: ReturnMomentum::Saddle,
    })
    .unwrap();
    let velocity = GaussianSide::recombination(&RecombinationModel::Lcao {
        orbital: orbital.clone(),
        form: DipoleForm::Velocity,
        momentum: ReturnMomentum::Saddle,
    })
    .unwrap();
    let gauss_ion = GaussianSide::ionization(&IonizationModel::Gaussian { exponent: 0.7 }).unwrap();
    let gauss_rec =
        GaussianSide::recombination(&RecombinationModel::Gaussian { exponent: 0.6 }).unwrap();
    for k in &ks {
        assert!(rel(&ion.value(k), &orbital.dipole_length(k)) < 1e-13);
        assert!(rel(&length.value(k), &orbital.dipole_length_recombination(k)) < 1e-13);
        assert!(
            rel(
                &velocity.value(k),
                &orbital.dipole_velocity_recombination(k)
            ) < 1e-13
        );
        let g = holecast::orbital::gaussian_s_dipole(k, 0.7).unwrap();
        assert!(rel(&gauss_ion.value(k), &g) < 1e-13);
        let model = RecombinationModel::Gaussian { exponent: 0.6 };
        assert!(rel(&gauss_rec.value(k), &model.vector(k, 1.0)) < 1e-13);
    }
    // The photon-energy momentum rescales k non-analytically: no Gaussian form.
    assert!(
        GaussianSide::recombination(&RecombinationModel::Lcao {
            orbital,
            form: DipoleForm::Length,
            momentum: ReturnMomentum::Photon,
        })
        .is_none()
    );
}

#[test]
fn two_s_gaussians_match_the_hand_derived_gaussian_moment() {
    // Textbook Gaussian integral with first and second moments. With the s-Gaussian dipoles of
    // physics notes §1.7, d(k) = −i k/(2a) N_a e^{−k²/4a}, d̄(k) = +i k/(2b) N_b e^{−k²/4b}
    // (N = (2πα)^{−3/4}), the integral is
    //   N_a N_b/(4ab) (π/λ)^{3/2} e^{B²/4λ + c₀} [(μ + v_r)(e·(μ + v_i)) + σ² e],
    // with λ = ρ/2 + 1/4a + 1/4b, B = v_i/2a + v_r/2b, c₀ = −v_i²/4a − v_r²/4b, μ = −B/2λ,
    // σ² = 1/2λ.
    let (a, b) = (0.7, 0.45);
    let v_i = cv(c(0.1, 0.0), c(0.0, -0.05), c(0.2, 0.95));
    let v_r = cv(c(0.0, 0.02), c(0.1, 0.0), c(-1.3, 0.04));
    let e = cv(c(0.01, 0.0), c(0.0, 0.0), c(0.05, 0.003));
    let ion = GaussianSide::ionization(&IonizationModel::Gaussian { exponent: a }).unwrap();
    let rec = GaussianSide::recombination(&RecombinationModel::Gaussian { exponent: b }).unwrap();
    for rho in [
        c(0.0, 3.0),
        c(0.2, 25.0),
        c(0.0, 60.0) - c(0.0, 0.0) + c(1.5, 0.0),
    ] {
        let got = exact_integral(
            IonSide::Gaussian(&ion),
            RecSide::Gaussian(&rec),
            &v_i,
            &v_r,
            &e,
            rho,
        );
        let zero = Vector3::zeros();
        let m = Measure::new(0.25 / a, &zero, 0.25 / b, &zero, &v_i, &v_r, rho);
        let na = (2.0 * std::f64::consts::PI * a).powf(-0.75);
        let nb = (2.0 * std::f64::consts::PI * b).powf(-0.75);
        let sigma2 = 0.5 / m.lambda;
        let kr = v_r + m.mean;
        let ki = v_i + m.mean;
        let e_ki = e.x * ki.x + e.y * ki.y + e.z * ki.z;
        let moment = kr * e_ki + e * sigma2;
        let expected = moment * (na * nb / (4.0 * a * b) * m.spreading * m.exponent.exp());
        assert!(
            rel(&got, &expected) < 1e-13,
            "ρ = {rho}: {got:?} vs {expected:?}"
        );
    }
}

#[test]
fn long_excursions_tend_to_the_stationary_momentum_shortcut() {
    // Laplace's method (textbook): for |ρ| → ∞ the Gaussian e^{−ρq²/2} concentrates at q = 0 and
    // the exact integral tends to (2π/ρ)^{3/2} d̄(v_r)[e·d(v_i)], with a relative correction
    // O(1/|ρ|). The difference must fall about tenfold per tenfold |ρ|.
    let orbital = mixed_orbital();
    let ion_model = IonizationModel::Orbital {
        orbital: orbital.clone(),
    };
    let rec_model = RecombinationModel::Lcao {
        orbital: orbital.clone(),
        form: DipoleForm::Length,
        momentum: ReturnMomentum::Saddle,
    };
    let ion = GaussianSide::ionization(&ion_model).unwrap();
    let rec = GaussianSide::recombination(&rec_model).unwrap();
    let v_i = cv(c(0.05, 0.0), c(0.0, 0.0), c(0.1, 0.8));
    let v_r = cv(c(0.0, 0.0), c(0.2, 0.0), c(-1.1, 0.02));
    let e = cv(c(0.0, 0.0), c(0.0, 0.0), c(0.05, 0.01));
    let mut previous = f64::INFINITY;
    for tau in [1e2, 1e3, 1e4, 1e5] {
        let rho = c(0.0, tau);
        let exact = exact_integral(
            IonSide::Gaussian(&ion),
            RecSide::Gaussian(&rec),
            &v_i,
            &v_r,
            &e,
            rho,
        );
        let ion_value = e.x * orbital.dipole_length(&v_i).x
            + e.y * orbital.dipole_length(&v_i).y
            + e.z * orbital.dipole_length(&v_i).z;
        let shortcut =
            stationary_integral(&orbital.dipole_length_recombination(&v_r), ion_value, rho);
        let d = rel(&exact, &shortcut);
        if previous.is_finite() {
            let ratio = previous / d;
            assert!(
                (7.0..14.0).contains(&ratio),
                "τ = {tau}: ratio {ratio} ({previous} → {d})"
            );
        }
        previous = d;
    }
    assert!(previous < 1e-3, "at τ = 1e5 the difference is {previous}");
}

#[test]
fn constant_and_opaque_sides_fall_back_as_documented() {
    // A constant ionization amplitude and a non-Gaussian recombination model give exactly the
    // shortcut; a constant amplitude with a Gaussian recombination side is the Gaussian
    // integral of that side alone, which for an s-Gaussian is
    // N_b i/(2b) (π/λ)^{3/2} e^{B²/4λ + c₀} (μ + v_r) with λ = ρ/2 + 1/4b (textbook).
    let amplitude = c(0.3, -0.2);
    let v_i = cv(c(0.0, 0.0), c(0.0, 0.0), c(0.0, 0.9));
    let v_r = cv(c(0.1, 0.0), c(0.0, 0.0), c(-1.2, 0.01));
    let e = cv(c(0.0, 0.0), c(0.0, 0.0), c(0.05, 0.0));
    let rho = c(0.0, 40.0);
    let hydrogenic = RecombinationModel::Hydrogenic { ip: 0.5 };
    let got = exact_integral(
        IonSide::Constant(amplitude),
        RecSide::Model(&hydrogenic, 1.0),
        &v_i,
        &v_r,
        &e,
        rho,
    );
    let expected = stationary_integral(&hydrogenic.vector(&v_r, 1.0), amplitude, rho);
    assert!(rel(&got, &expected) < 1e-15);

    let b = 0.55;
    let rec = GaussianSide::recombination(&RecombinationModel::Gaussian { exponent: b }).unwrap();
    let got = exact_integral(
        IonSide::Constant(amplitude),
        RecSide::Gaussian(&rec),
        &v_i,
        &v_r,
        &e,
        rho,
    );
    let zero = Vector3::zeros();
    let m = Measure::new(0.0, &zero, 0.25 / b, &zero, &v_i, &v_r, rho);
    let nb = (2.0 * std::f64::consts::PI * b).powf(-0.75);
    let expected =
        (v_r + m.mean) * (c(0.0, 0.5 / b) * nb * m.spreading * m.exponent.exp() * amplitude);
    assert!(rel(&got, &expected) < 1e-13, "{got:?} vs {expected:?}");
}

// Brute-force 3-D quadrature reference ----------------------------------------------------------

#[derive(serde::Deserialize)]
struct Primitive {
    coefficient: f64,
    centre_bohr: [f64; 3],
    exponent: f64,
    powers: [u8; 3],
}

#[derive(serde::Deserialize)]
struct QuadratureCase {
    name: String,
    tau: [f64; 2],
    p0: [[f64; 2]; 3],
    a_ion: [[f64; 2]; 3],
    a_rec: [[f64; 2]; 3],
    momentum_integral: [f64; 2],
    error_estimate_rel: f64,
    stationary_momentum_value: [f64; 2],
}

#[derive(serde::Deserialize)]
struct QuadratureReference {
    ion_orbital: Vec<Primitive>,
    rec_orbital: Vec<Primitive>,
    e_ion: [f64; 3],
    e_rec: [f64; 3],
    cases: Vec<QuadratureCase>,
}

#[test]
fn exact_integral_matches_brute_force_quadrature_of_a_two_centre_p_orbital() {
    // Reference: scripts/momentum_integral_reference.py (NumPy 3-D trapezoid rule on two grids,
    // cross-checked by products of 1-D mpmath integrals; relative error ≤ 1e-11). Ionization
    // side: p_z Gaussians on a tilted bond (two centres); recombination side: an s Gaussian at
    // the origin plus a p_x Gaussian off-axis; real and complex τ, complex momenta.
    use holecast::momentum::Form;
    let data: QuadratureReference =
        serde_json::from_str(include_str!("data/gaussian_momentum_integral.json")).unwrap();
    let prims = |list: &[Primitive]| -> Vec<(Vector3<f64>, f64, [u8; 3], Complex64)> {
        list.iter()
            .map(|p| {
                (
                    Vector3::from(p.centre_bohr),
                    p.exponent,
                    p.powers,
                    c(p.coefficient, 0.0),
                )
            })
            .collect()
    };
    let ion = GaussianSide::from_primitives(Form::IonizationLength, &prims(&data.ion_orbital));
    let rec = GaussianSide::from_primitives(Form::RecombinationLength, &prims(&data.rec_orbital));
    let v = |x: &[[f64; 2]; 3]| {
        cv(
            c(x[0][0], x[0][1]),
            c(x[1][0], x[1][1]),
            c(x[2][0], x[2][1]),
        )
    };
    let e_i = Vector3::from(data.e_ion).map(|x| c(x, 0.0));
    let e_r = Vector3::from(data.e_rec).map(|x| c(x, 0.0));
    for case in &data.cases {
        let tau = c(case.tau[0], case.tau[1]);
        let p0 = v(&case.p0);
        let v_i = p0 + v(&case.a_ion);
        let v_r = p0 + v(&case.a_rec);
        let rho = c(0.0, 1.0) * tau;
        let j = exact_integral(
            IonSide::Gaussian(&ion),
            RecSide::Gaussian(&rec),
            &v_i,
            &v_r,
            &e_i,
            rho,
        );
        let got = e_r.x * j.x + e_r.y * j.y + e_r.z * j.z;
        let want = c(case.momentum_integral[0], case.momentum_integral[1]);
        let err = (got - want).norm() / want.norm();
        assert!(
            err < 1e-10 + 10.0 * case.error_estimate_rel,
            "{}: {got} vs {want} (relative {err:e})",
            case.name
        );
        println!("{}: relative error {err:.1e}", case.name);
        // The shortcut differs by far more than the tolerance (the test can fail).
        let shortcut = c(
            case.stationary_momentum_value[0],
            case.stationary_momentum_value[1],
        );
        assert!(
            (shortcut - want).norm() / want.norm() > 1e-2,
            "{}",
            case.name
        );
    }
}
