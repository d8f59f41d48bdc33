//! Structure models in the molecular frame: the asymptotic (MO-ADK) ionization amplitude and
//! target-file validation of molecules.

use holecast::field::CVec3;
use holecast::ionization::IonizationModel;
use holecast::target::TargetSpec;
use holecast::tunnelling::{AsymptoticOrbital, AsymptoticTerm, adk_static_rate};
use nalgebra::Vector3;
use num_complex::Complex64;

fn asymptotic(ip: f64, terms: Vec<AsymptoticTerm>) -> IonizationModel {
    IonizationModel::Asymptotic {
        orbital: AsymptoticOrbital::new(ip, 1.0, terms).unwrap(),
    }
}

fn factor(model: &IonizationModel, field: Vector3<f64>) -> Complex64 {
    // The asymptotic model only reads the exit field; the complex saddle quantities are unused.
    model.factor(&CVec3::zeros(), &CVec3::zeros(), &field)
}

#[test]
fn asymptotic_amplitude_reproduces_the_static_tunnelling_rates() {
    // |a|² e^{−2κ³/3F} is the MO-ADK static rate (Tong, Zhao, Lin, PRA 66, 033402 (2002)); for
    // hydrogen (C₀ = 2) it must equal the Landau–Lifshitz weak-field rate 4/F e^{−2/(3F)}
    // (Landau & Lifshitz, QM §77), and for an l = 1, m = 0 atom the ADK rate (Ammosov, Delone,
    // Krainov, JETP 64, 1191 (1986)) with the ADK-equivalent coefficient C = sqrt(C²_{n*l*} κ^{2n*+1}).
    let h = asymptotic(
        0.5,
        vec![AsymptoticTerm::new(0, 0, Complex64::new(2.0, 0.0))],
    );
    for &f in &[0.04, 0.05, 0.06, 0.08, 0.1] {
        let a = factor(&h, Vector3::new(0.0, 0.0, f));
        let rate = a.norm_sqr() * (-2.0 / (3.0 * f)).exp();
        let ll = 4.0 / f * (-2.0 / (3.0 * f)).exp();
        assert!((rate / ll - 1.0).abs() < 1e-12, "F = {f}: {rate} vs {ll}");
    }
    let ip: f64 = 15.7596 / 27.211386245988;
    let kappa = (2.0 * ip).sqrt();
    let n = 1.0 / kappa;
    let c2 = holecast::tunnelling::adk_coefficient_squared(ip, 1.0).unwrap();
    let c = (c2 * kappa.powf(2.0 * n + 1.0)).sqrt();
    let ar = asymptotic(ip, vec![AsymptoticTerm::new(1, 0, Complex64::new(c, 0.0))]);
    for &f in &[0.04, 0.0534, 0.0755] {
        let a = factor(&ar, Vector3::new(0.0, 0.0, f));
        let rate = a.norm_sqr() * (-2.0 * kappa.powi(3) / (3.0 * f)).exp();
        let adk = adk_static_rate(ip, 1.0, 1, 0, f).unwrap();
        assert!((rate / adk - 1.0).abs() < 1e-10, "F = {f}: {rate} vs {adk}");
    }
}

fn scan(model: &IonizationModel) -> Vec<(f64, f64)> {
    (0..=180)
        .map(|d| {
            let t = f64::from(d).to_radians();
            let a = factor(model, Vector3::new(t.sin(), 0.0, t.cos()) * 0.05);
            (f64::from(d), a.norm_sqr())
        })
        .collect()
}

#[test]
fn sigma_orbitals_ionize_along_the_bond_pi_orbitals_at_45_degrees() {
    // Tong, Zhao, Lin 2002: a σ orbital's tunnelling peaks for the field along the bond; a π
    // orbital's leading (m = 0) term vanishes along the bond and, for a πg-like (l = 2) orbital,
    // peaks at 45°.
    let sigma = asymptotic(
        0.57,
        vec![
            AsymptoticTerm::new(0, 0, Complex64::new(1.4, 0.0)),
            AsymptoticTerm::new(2, 0, Complex64::new(0.9, 0.0)),
        ],
    );
    let s = scan(&sigma);
    let peak = s.iter().max_by(|a, b| a.1.total_cmp(&b.1)).unwrap();
    assert!(peak.0 == 0.0 || peak.0 == 180.0, "σ peak at {}", peak.0);
    assert!(s[90].1 < s[0].1);
    // Real π_x combination of m' = ±1: (Y_{2,−1} − Y_{2,1})/√2.
    let r = std::f64::consts::FRAC_1_SQRT_2;
    let pi = asymptotic(
        0.45,
        vec![
            AsymptoticTerm::new(2, 1, Complex64::new(-r, 0.0)),
            AsymptoticTerm::new(2, -1, Complex64::new(r, 0.0)),
        ],
    );
    let p = scan(&pi);
    assert!(
        p[0].1 < 1e-28 && p[180].1 < 1e-28,
        "π along the bond: {}",
        p[0].1
    );
    let peak = p[..=90].iter().max_by(|a, b| a.1.total_cmp(&b.1)).unwrap();
    assert_eq!(peak.0, 45.0);
}

fn error_of(text: &str) -> String {
    match TargetSpec::from_json(text) {
        Err(e) => e.to_string(),
        Ok(spec) => match spec.validate() {
            Err(e) => e.to_string(),
            Ok(_) => panic!("expected an error for {text}"),
        },
    }
}

const BASE: &str = r#"{ "name": "t", "invented": true,
  "atoms": [ATOMS],
  "channels": [
    { "label": "X", "ip_ev": 14 },
    { "label": "A", "ip_ev": 16 }
  ],
  "couplings": [COUPLINGS] }"#;

fn target(atoms: &str, couplings: &str) -> String {
    BASE.replace("ATOMS", atoms).replace("COUPLINGS", couplings)
}

#[test]
fn molecule_validation_names_the_key_and_the_reason() {
    // Our validation rules (docs/target-file.md); each message must name key, value, reason.
    let cases: Vec<(String, Vec<&str>)> = vec![
        (
            target("", "").replace(r#""label": "A""#, r#""label": "X""#),
            vec!["channels[1].label", "\"X\"", "duplicates"],
        ),
        (
            target("", r#"{ "channels": ["X", "Q"], "dipole_au": [0, 0, 1] }"#),
            vec!["couplings[0].channels[1]", "\"Q\"", "names no channel"],
        ),
        (
            target(
                "",
                r#"{ "channels": ["X", "A"], "dipole_au": [0, 0, 1] }, { "channels": ["A", "X"], "dipole_au": [0, 0, 2] }"#,
            ),
            vec!["couplings[1].channels", "Hermitian"],
        ),
        (
            target("", r#"{ "channels": ["X", "X"], "dipole_au": [[0, 1], [0, 0], [0, 0]] }"#),
            vec!["couplings[0].dipole_au", "permanent dipole must be real"],
        ),
        (
            target("", r#"{ "channels": ["X", "A"] }"#),
            vec!["couplings[0].channels", "dipole_au, dipole_debye or energy_ev"],
        ),
        (
            target("", r#"{ "channels": ["X", "A"], "dipole_au": [0, 0, 1], "dipole_debye": [0, 0, 2] }"#),
            vec!["couplings[0].dipole_au", "one unit"],
        ),
        (
            target(r#"{ "element": "O", "position": [0, 0, 1] }"#, ""),
            vec!["unknown field `position`"],
        ),
        (
            target(r#"{ "element": "O" }"#, ""),
            vec!["atoms[0].position_angstrom", "unit must be stated"],
        ),
        (
            target("", "").replace(r#"{ "label": "A", "ip_ev": 16 }"#, r#"{ "label": "A", "ip_ev": 16, "recombination": { "model": "lcao" } }"#),
            vec!["channels[1].recombination", "Dyson orbital"],
        ),
        (
            target("", "").replace(
                r#"{ "label": "A", "ip_ev": 16 }"#,
                r#"{ "label": "A", "ip_ev": 16, "dyson_orbital": { "name": "cancels", "terms": [
                    { "centre_bohr": [0, 0, 0], "exponents_inv_bohr2": [0.5], "cartesian": "s", "coefficient": [1, 0] },
                    { "centre_bohr": [0, 0, 0], "exponents_inv_bohr2": [0.5], "cartesian": "s", "coefficient": [-1, 0] } ] } }"#,
            ),
            vec!["channels[1].dyson_orbital", "cancels"],
        ),
        (
            target("", "").replace(r#""label": "A""#, r#""label": "A to B""#),
            vec!["channels[1].label", "letters"],
        ),
        (
            target("", "").replace(r#""channels": ["#, r#""alignment": { "model": "exp_cos2", "mean_cos2": 1.5 }, "channels": ["#),
            vec!["alignment", "1.5"],
        ),
    ];
    for (text, needles) in cases {
        let msg = error_of(&text);
        for n in needles {
            assert!(msg.contains(n), "message {msg:?} lacks {n:?}");
        }
    }
}

#[test]
fn couplings_fill_a_hermitian_matrix_in_atomic_units() {
    // 1 D = 0.393430 e·a0 (CODATA-derived); the (n, m) element is the conjugate of (m, n).
    let text = target(
        "",
        r#"{ "channels": ["X", "A"], "dipole_debye": [[0, 0], [0, 0], [1, 0.5]], "energy_ev": 0.27211386245988 }"#,
    );
    let t = TargetSpec::from_json(&text).unwrap().validate().unwrap();
    let mu = &t.ion.dipole()[2];
    assert!((mu[(0, 1)].re - 0.393_430_3).abs() < 1e-6);
    assert!((mu[(1, 0)] - mu[(0, 1)].conj()).norm() < 1e-15);
    assert!((t.ion.coupling()[(0, 1)].re - 0.01).abs() < 1e-15);
}
