//! The default grid of the binary (issue 9): odd orders for the demo, a pulse grid that is the
//! same for every carrier-envelope phase, and exact lattice values in the files.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use serde_json::Value;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn spectrum(dir: &Path, name: &str, args: &[&str]) -> (Value, String) {
    let out = dir.join(name);
    let result = Command::cargo_bin("holecast")
        .unwrap()
        .arg("spectrum")
        .args(args)
        .args(["--quiet", "--out"])
        .arg(&out)
        .assert()
        .success();
    let stdout = String::from_utf8(result.get_output().stdout.clone()).unwrap();
    let v =
        serde_json::from_str(&std::fs::read_to_string(out.join("spectrum.json")).unwrap()).unwrap();
    (v, stdout)
}

fn orders(v: &Value) -> Vec<f64> {
    v["points"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| p["order"].as_f64().unwrap())
        .collect()
}

fn channels(name: &str) -> PathBuf {
    root().join("channels").join(name)
}

#[test]
fn the_demo_default_grid_has_odd_orders_only() {
    // Formerly H9–H39 in steps of one: half the rows were even orders at ~1e-21 of the odd
    // ones, and the first were below channels A and B's thresholds.
    let dir = tempfile::tempdir().unwrap();
    let (v, stdout) = spectrum(
        dir.path(),
        "demo",
        &[
            channels("demo-linear-triatomic.json").to_str().unwrap(),
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
        ],
    );
    let q = orders(&v);
    // Highest Ip 18.1 eV + Up/4 (Up = 8.96 eV at 1.5e14 W/cm², 800 nm) = 20.34 eV = H13.1.
    assert_eq!(q[0].round(), 15.0);
    assert!(
        q.iter().all(|o| (o.round() as i64).rem_euclid(2) == 1),
        "{q:?}"
    );
    assert!(q.windows(2).all(|w| (w[1] - w[0] - 2.0).abs() < 1e-9));
    assert!(stdout.contains("from H15.00"), "{stdout}");
    // No near-threshold warning on the default grid.
    let codes: Vec<&str> = v["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["code"].as_str().unwrap())
        .collect();
    assert!(!codes.contains(&"near-threshold"), "{codes:?}");
}

#[test]
fn a_pulse_grid_does_not_depend_on_the_cep() {
    // Formerly 268–272 energies depending on the CEP, so CEP scans did not line up.
    let dir = tempfile::tempdir().unwrap();
    let mut grids = Vec::new();
    for cep in [0, 90, 135] {
        let laser = dir.path().join(format!("cep{cep}.json"));
        std::fs::write(
            &laser,
            format!(
                r#"{{"colours": [{{"wavelength_nm": 800, "intensity_wcm2": 1.5e14, "phase_deg": {cep}}}],
                    "envelope": {{"kind": "sin2", "fwhm_fs": 8}}}}"#
            ),
        )
        .unwrap();
        let (v, _) = spectrum(
            dir.path(),
            &format!("out{cep}"),
            &[
                channels("argon-like.json").to_str().unwrap(),
                "--laser",
                laser.to_str().unwrap(),
            ],
        );
        grids.push(orders(&v));
    }
    assert!(grids[0].len() > 100);
    assert_eq!(grids[0], grids[1], "CEP 0° and 90°");
    assert_eq!(grids[0], grids[2], "CEP 0° and 135°");
    // Steps of a tenth of an order.
    for q in &grids[0] {
        assert!((q * 10.0 - (q * 10.0).round()).abs() < 1e-6, "{q}");
    }
}
