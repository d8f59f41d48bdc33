//! Tabulated structure models reproduce the functions they sample (common practice, no
//! external source): at the nodes exactly, between them within the interpolation error.

use std::sync::Arc;

use holecast::field::CVec3;
use holecast::ionization::IonizationModel;
use holecast::orbital::{Orbital, OrbitalSpec};
use holecast::recombination::{DipoleForm, RecombinationModel, ReturnMomentum};
use holecast::tunnelling::{AsymptoticOrbital, AsymptoticTerm};
use nalgebra::Vector3;
use num_complex::Complex64;

fn sigma() -> IonizationModel {
    IonizationModel::Asymptotic {
        orbital: AsymptoticOrbital::new(
            0.55,
            1.0,
            vec![
                AsymptoticTerm::new(0, 0, Complex64::new(1.2, 0.0)),
                AsymptoticTerm::new(2, 0, Complex64::new(0.7, 0.0)),
            ],
        )
        .unwrap(),
    }
}

#[test]
fn ionization_table_interpolates_an_angular_amplitude() {
    let model = sigma();
    let field = |deg: f64| {
        let t = deg.to_radians();
        Vector3::new(t.sin(), 0.0, t.cos()) * 0.05
    };
    let at = |deg: f64| model.factor(&CVec3::zeros(), &CVec3::zeros(), &field(deg));
    let nodes: Vec<f64> = (0..=90).map(|k| 2.0 * f64::from(k)).collect();
    let table = IonizationModel::Table {
        beta: nodes.iter().map(|d| d.to_radians()).collect(),
        amplitude: nodes.iter().map(|&d| at(d)).collect(),
    };
    table.validate("ionization").unwrap();
    let scale = at(0.0).norm();
    for &d in &nodes {
        let t = table.factor(&CVec3::zeros(), &CVec3::zeros(), &field(d));
        assert!((t - at(d)).norm() < 1e-13 * scale);
    }
    // Linear interpolation error ≤ h²/8 · max|f''| with h = 2°: below 1e-3 of the scale.
    for k in 0..90 {
        let d = 2.0 * f64::from(k) + 1.0;
        let t = table.factor(&CVec3::zeros(), &CVec3::zeros(), &field(d));
        assert!((t - at(d)).norm() < 1e-3 * scale, "{d}°");
    }
}

#[test]
fn recombination_table_interpolates_an_lcao_dipole() {
    let spec: OrbitalSpec = serde_json::from_str(
        r#"{ "name": "pair", "terms": [
        { "centre_bohr": [0, 0, -1.2], "exponents_inv_bohr2": [0.4], "cartesian": "s", "coefficient": [1, 0] },
        { "centre_bohr": [0, 0, 1.2], "exponents_inv_bohr2": [0.4], "cartesian": "pz", "coefficient": [0.6, 0] } ] }"#,
    )
    .unwrap();
    let lcao = RecombinationModel::Lcao {
        orbital: Arc::new(Orbital::from_spec(&spec).unwrap()),
        form: DipoleForm::Length,
        momentum: ReturnMomentum::Photon,
    };
    // Sample the LCAO dipole on (photon energy, angle) in the table's own components: along k̂
    // and perpendicular to k̂ in the (k̂, z) plane towards +z.
    let energies: Vec<f64> = (0..=40).map(|k| 0.6 + 0.025 * f64::from(k)).collect();
    let angles: Vec<f64> = (0..=60).map(|k| f64::from(3 * k).to_radians()).collect();
    let parts = |omega: f64, theta: f64| {
        let khat = Vector3::new(theta.sin(), 0.0, theta.cos());
        let perp = if theta.sin().abs() < 1e-12 {
            Vector3::x()
        } else {
            (Vector3::z() - khat * khat.z).normalize()
        };
        let k = khat * (2.0 * omega).sqrt();
        let d = lcao.vector(&k.map(|x| Complex64::new(x, 0.0)), omega);
        let dot = |a: &Vector3<f64>| d.x * a.x + d.y * a.y + d.z * a.z;
        (dot(&khat), dot(&perp), d)
    };
    let mut parallel = Vec::new();
    let mut perpendicular = Vec::new();
    for &e in &energies {
        for &t in &angles {
            let (a, b, _) = parts(e, t);
            parallel.push(a);
            perpendicular.push(b);
        }
    }
    let table = RecombinationModel::Table {
        energies: energies.clone(),
        angles: angles.clone(),
        parallel,
        perpendicular,
    };
    table.validate("recombination").unwrap();
    let scale = energies
        .iter()
        .map(|&e| parts(e, 0.0).2.norm())
        .fold(0.0, f64::max);
    let eval = |omega: f64, theta: f64| {
        let k = Vector3::new(theta.sin(), 0.0, theta.cos()) * (2.0 * omega).sqrt();
        table.vector(&k.map(|x| Complex64::new(x, 0.0)), omega)
    };
    for &(e, t) in &[
        (0.6, 0.0),
        (0.85, 0.1 * std::f64::consts::PI),
        (1.6, std::f64::consts::PI),
    ] {
        let exact = parts(e, t).2;
        assert!(
            (eval(e, t) - exact).norm() < 1e-12 * scale,
            "node ({e}, {t})"
        );
    }
    let mut worst: f64 = 0.0;
    for k in 0..40 {
        let e = 0.6125 + 0.025 * f64::from(k);
        for j in 0..60 {
            let t = f64::from(3 * j + 1).to_radians() + 0.3_f64.to_radians();
            worst = worst.max((eval(e, t) - parts(e, t).2).norm() / scale);
        }
    }
    assert!(worst < 1e-2, "bilinear interpolation error {worst}");
}
