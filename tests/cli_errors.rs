//! Clear errors for the misleading messages of issue 8, and what `check` shows.

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

fn lasers(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("lasers")
        .join(name)
}

const FIELD: [&str; 4] = ["--intensity", "1.5e14", "--wavelength", "800"];

#[test]
fn negative_returns_are_named_not_parsed_as_a_flag() {
    holecast()
        .args(["orbits", "--ip", "13.6", "--returns", "-1"])
        .args(FIELD)
        .assert()
        .code(1)
        .stderr(predicate::str::contains(
            "--returns -1: must be between 1 and 8",
        ));
    holecast()
        .args([
            "check",
            "--ip",
            "13.6",
            "--intensity",
            "-1",
            "--wavelength",
            "800",
        ])
        .assert()
        .code(1)
        .stderr(predicate::str::contains("intensity").and(predicate::str::contains("-1")));
}

#[test]
fn tiny_orders_blame_the_users_value_not_an_internal_step() {
    holecast()
        .args([
            "spectrum",
            "--ip",
            "13.6",
            "--orders",
            "1e-9:2e-9:1e-9",
            "--out",
        ])
        .arg(tempfile::tempdir().unwrap().path().join("x"))
        .args(FIELD)
        .assert()
        .code(1)
        .stderr(
            predicate::str::contains("--orders \"1e-9:2e-9:1e-9\": FIRST = 1e-9")
                .and(predicate::str::contains("smallest harmonic order"))
                .and(predicate::str::contains("photon energy =").not()),
        );
}

#[test]
fn check_does_not_offer_csv() {
    holecast()
        .args(["check", "--help"])
        .assert()
        .success()
        .stdout(predicate::str::contains("table").and(predicate::str::contains("csv").not()));
    holecast()
        .args(["check", "--ip", "13.6", "--format", "csv"])
        .args(FIELD)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("possible values: table, json"));
}

#[test]
fn options_of_the_other_method_are_refused_not_ignored() {
    let dir = tempfile::tempdir().unwrap();
    holecast()
        .args([
            "spectrum",
            "--ip",
            "13.6",
            "--excursion-cycles",
            "2",
            "--out",
        ])
        .arg(dir.path().join("a"))
        .args(FIELD)
        .assert()
        .code(1)
        .stderr(predicate::str::contains(
            "--excursion-cycles applies to --method quadrature only",
        ));
    holecast()
        .args(["spectrum", "--ip", "13.6", "--method", "saddle"])
        .args(["--window-fall-cycles", "0.2", "--out"])
        .arg(dir.path().join("b"))
        .args(FIELD)
        .assert()
        .code(1)
        .stderr(predicate::str::contains("--window-fall-cycles applies"));
    holecast()
        .args([
            "spectrum",
            "--ip",
            "13.6",
            "--method",
            "quadrature",
            "--sum",
            "plain",
        ])
        .arg("--out")
        .arg(dir.path().join("c"))
        .args(FIELD)
        .assert()
        .code(1)
        .stderr(predicate::str::contains(
            "--sum applies to the saddle method only",
        ));
    assert!(!dir.path().join("a").exists() && !dir.path().join("c").exists());
}

#[test]
fn more_than_eight_channels_says_why() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("nine.json");
    let channels: Vec<Value> = (0..9)
        .map(|i| serde_json::json!({"label": format!("C{i}"), "ip_ev": 12.0 + f64::from(i)}))
        .collect();
    std::fs::write(
        &file,
        serde_json::json!({"name": "nine", "invented": true, "channels": channels}).to_string(),
    )
    .unwrap();
    holecast()
        .arg("check")
        .arg(&file)
        .args(FIELD)
        .assert()
        .code(1)
        .stderr(
            predicate::str::contains("channels = 9 channels")
                .and(predicate::str::contains("at most 8 channels"))
                .and(predicate::str::contains(
                    "specialised per number of channels",
                )),
        );
}

#[test]
fn an_unused_dyson_orbital_is_warned_about() {
    // The demo triatomic with its models replaced by defaults: the orbitals are then unused.
    let dir = tempfile::tempdir().unwrap();
    let mut doc: Value = serde_json::from_str(
        &std::fs::read_to_string(channels("demo-linear-triatomic.json")).unwrap(),
    )
    .unwrap();
    for c in doc["channels"].as_array_mut().unwrap() {
        let c = c.as_object_mut().unwrap();
        c.remove("ionization");
        c.remove("recombination");
    }
    let file = dir.path().join("unused.json");
    std::fs::write(&file, doc.to_string()).unwrap();
    let out = holecast()
        .arg("check")
        .arg(&file)
        .args(FIELD)
        .output()
        .unwrap();
    assert!(out.status.success());
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(
        stdout.contains("its Dyson orbital is given but no model uses it"),
        "{stdout}"
    );
    assert!(
        stderr.contains("warning [unused-dyson-orbital]: channel X"),
        "{stderr}"
    );
    assert!(
        stderr.contains("\"lcao\""),
        "the warning says what to do: {stderr}"
    );
}

#[test]
fn check_shows_the_full_laser_and_the_structure_models() {
    let out = holecast()
        .arg("check")
        .arg(channels("demo-linear-triatomic.json"))
        .arg("--laser")
        .arg(lasers("few-cycle-pulse.json"))
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8_lossy(&out.stdout);
    for needle in [
        "colour 1: 800 nm, 1.500e14 W/cm², phase 0°, linear at 0° from z",
        "envelope: sin² pulse, intensity FWHM 5 fs",
        "CEP 0°",
        "structure models",
        "ionization: asymptotic (MO-ADK",
        "recombination: lcao (Dyson orbital \"X sigma_g\", length form, saddle momentum)",
    ] {
        assert!(text.contains(needle), "{needle:?} missing:\n{text}");
    }
    let out = holecast()
        .args(["check", "--ip", "13.6", "--format", "json", "--laser"])
        .arg(lasers("two-colour-orthogonal.json"))
        .output()
        .unwrap();
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let lines: Vec<&str> = v["laser_description"]
        .as_array()
        .unwrap()
        .iter()
        .map(|l| l.as_str().unwrap())
        .collect();
    assert!(lines[1].contains("2 × ω₁ (400.00 nm)") && lines[1].contains("linear at 90° from z"));
    assert!(v["channels"][0]["ionization_model"].is_string());
}

#[test]
fn absurd_physical_values_are_refused_by_a_documented_rule() {
    let dir = tempfile::tempdir().unwrap();
    let laser = dir.path().join("l.json");
    std::fs::write(
        &laser,
        r#"{"colours": [{"wavelength_nm": 8e102, "intensity_wcm2": 1.5e14}]}"#,
    )
    .unwrap();
    holecast()
        .args(["check", "--ip", "13.6", "--laser"])
        .arg(&laser)
        .assert()
        .code(1)
        .stderr(predicate::str::contains(
            "colours[0].wavelength_nm) = 8e102",
        ))
        .stderr(predicate::str::contains("between 1 nm and 1e6 nm"));
    let mut doc: Value =
        serde_json::from_str(&std::fs::read_to_string(channels("hydrogen.json")).unwrap()).unwrap();
    doc["channels"][0]["ip_ev"] = serde_json::json!(1e308);
    let target = dir.path().join("t.json");
    std::fs::write(&target, doc.to_string()).unwrap();
    holecast()
        .arg("check")
        .arg(&target)
        .args(FIELD)
        .assert()
        .code(1)
        .stderr(predicate::str::contains(
            "channels[0].ip_ev = 1e308: above 2e5 eV",
        ));
}

#[test]
fn an_excursion_window_longer_than_the_pulse_is_refused() {
    // Formerly: --excursion-cycles 7 with a 5 fs pulse (5.1 cycles in all) ran without comment.
    let dir = tempfile::tempdir().unwrap();
    holecast()
        .args(["spectrum", "--ip", "13.6", "--method", "quadrature"])
        .args(["--excursion-cycles", "7", "--orders", "11:31:4", "--laser"])
        .arg(lasers("few-cycle-pulse.json"))
        .arg("--out")
        .arg(dir.path().join("q"))
        .assert()
        .code(1)
        .stderr(predicate::str::contains(
            "--excursion-cycles 7: the excursion window is longer than the pulse (5.15 cycles",
        ));
}
