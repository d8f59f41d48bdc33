//! `holecast spectrum --method quadrature`, run as a user would: same rows and keys as the saddle
//! method, the method recorded, and a clear error for models without a time-domain form.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use predicates::prelude::*;
use serde_json::Value;

fn holecast() -> Command {
    Command::cargo_bin("holecast").unwrap()
}

fn channels(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("channels")
        .join(name)
}

fn spectrum(dir: &Path, method: &str) -> Value {
    holecast()
        .args(["--quiet", "spectrum"])
        .arg(channels("hydrogen.json"))
        .args([
            "--intensity",
            "2e14",
            "--wavelength",
            "800",
            "--orders",
            "11:41:2",
        ])
        .args(["--method", method, "--out"])
        .arg(dir)
        .assert()
        .success();
    serde_json::from_slice(&std::fs::read(dir.join("spectrum.json")).unwrap()).unwrap()
}

#[test]
fn quadrature_method_writes_the_same_rows_and_records_itself() {
    let dir = tempfile::tempdir().unwrap();
    let q = spectrum(&dir.path().join("q"), "quadrature");
    let s = spectrum(&dir.path().join("s"), "saddle");
    assert_eq!(q["provenance"]["approximations"]["method"], "quadrature");
    assert_eq!(s["provenance"]["approximations"]["method"], "saddle");
    assert_eq!(s["provenance"]["approximations"]["hole_times"], "complex");
    assert!(
        q["provenance"]["approximations"]["steps_per_cycle"]
            .as_u64()
            .unwrap()
            >= 16
    );
    let (qp, sp) = (
        q["points"].as_array().unwrap(),
        s["points"].as_array().unwrap(),
    );
    assert_eq!(qp.len(), sp.len());
    // Same physics to the accuracy of the saddle-point approximation (docs/validation.md,
    // hydrogen at 800 nm, 2×10¹⁴ W/cm²: single orbits within a few per cent, but short–long
    // interference minima such as H17 amplify that to more than a decade); here only the
    // plumbing is checked: every line within 1.5 decades, the median within 0.3 decades.
    let mut deltas = Vec::new();
    for (a, b) in qp.iter().zip(sp) {
        assert_eq!(a["order"], b["order"]);
        let r = a["intensity"].as_f64().unwrap() / b["intensity"].as_f64().unwrap();
        assert!(r.log10().abs() < 1.5, "order {}: {r}", a["order"]);
        deltas.push(r.log10().abs());
    }
    deltas.sort_by(f64::total_cmp);
    assert!(
        deltas[deltas.len() / 2] < 0.3,
        "median {}",
        deltas[deltas.len() / 2]
    );
    for f in ["spectrum.csv", "spectrum.svg"] {
        assert!(dir.path().join("q").join(f).exists());
    }
}

#[test]
fn quadrature_refuses_the_asymptotic_model_by_name() {
    let dir = tempfile::tempdir().unwrap();
    holecast()
        .args(["spectrum"])
        .arg(channels("demo-linear-triatomic.json"))
        .args([
            "--intensity",
            "2e14",
            "--wavelength",
            "800",
            "--method",
            "quadrature",
            "--out",
        ])
        .arg(dir.path())
        .assert()
        .failure()
        .stderr(
            predicate::str::contains("asymptotic")
                .and(predicate::str::contains("no time-domain form")),
        );
    assert!(!dir.path().join("spectrum.json").exists());
}
