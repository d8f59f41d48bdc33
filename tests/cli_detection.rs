//! `holecast spectrum --setup` and the detection flags: the output files, determinism, and
//! errors that name the file, the key and the reason (project rules: deterministic output,
//! clear errors).

use assert_cmd::Command;
use serde_json::Value;

fn holecast() -> Command {
    Command::cargo_bin("holecast").unwrap()
}

fn root() -> String {
    env!("CARGO_MANIFEST_DIR").to_string()
}

/// Runs the demo from the working folder `cwd` into `cwd/out` (the same command line each
/// time: outputs record it in their provenance).
fn run_demo(cwd: &std::path::Path) {
    std::fs::create_dir_all(cwd).unwrap();
    holecast()
        .current_dir(cwd)
        .args([
            "spectrum",
            &format!("{}/channels/hydrogen.json", root()),
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
            "--setup",
            &format!("{}/setups/demo-jet-after-focus.json", root()),
            "--intensity-samples",
            "6",
            "--quiet",
            "--out",
            "out",
        ])
        .assert()
        .success();
}

/// The shipped setup writes detected.json/csv/svg, the spectrum and line tables, with families
/// separated; the same run twice gives the same bytes.
#[test]
fn setup_run_writes_the_detected_files_deterministically() {
    let dir = tempfile::tempdir().unwrap();
    let (a, b) = (dir.path().join("a"), dir.path().join("b"));
    run_demo(&a);
    run_demo(&b);
    let (a, b) = (a.join("out"), b.join("out"));
    for name in [
        "spectrum.json",
        "detected.json",
        "detected.csv",
        "detected-spectrum.csv",
        "detected-lines.csv",
        "detected.svg",
    ] {
        let x = std::fs::read(a.join(name)).unwrap();
        let y = std::fs::read(b.join(name)).unwrap();
        assert!(!x.is_empty(), "{name} empty");
        assert_eq!(x, y, "{name} differs between identical runs");
    }
    let doc: Value =
        serde_json::from_slice(&std::fs::read(a.join("detected.json")).unwrap()).unwrap();
    assert_eq!(doc["intensity_samples"].as_array().unwrap().len(), 6);
    let point = &doc["points"][0];
    for key in [
        "single_molecule_power",
        "combined_power",
        "single_short_power",
        "combined_long_power",
    ] {
        assert!(point.get(key).is_some(), "missing {key}");
    }
    assert!(doc["lines"][0].get("short_line_yield").is_some());
    let lines = std::fs::read_to_string(a.join("detected-lines.csv")).unwrap();
    assert!(lines.starts_with("order,energy_ev,line_yield,short_line_yield,long_line_yield"));
}

/// An unknown key names the file and the key; a bad value names the key path; the quadrature
/// method is refused with a setup; flags without a position are refused.
#[test]
fn setup_errors_name_file_key_and_reason() {
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("bad-setup.json");
    std::fs::write(
        &bad,
        r#"{"beam": {"waist_um": 40, "colour": 3}, "medium": {"geometry": {"kind": "unbounded"}, "combination": "incoherent-volume", "density_cm3": 1e17}}"#,
    )
    .unwrap();
    let out = holecast()
        .args([
            "spectrum",
            "--ip",
            "15.76",
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
        ])
        .arg("--setup")
        .arg(&bad)
        .arg("--out")
        .arg(dir.path().join("o"))
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!out.status.success());
    assert!(
        err.contains("bad-setup.json") && err.contains("colour"),
        "{err}"
    );
    std::fs::write(
        &bad,
        r#"{"beam": {"waist_um": 40}, "medium": {"geometry": {"kind": "unbounded"}, "combination": "incoherent-volume", "density_cm3": -5}}"#,
    )
    .unwrap();
    let out = holecast()
        .args([
            "spectrum",
            "--ip",
            "15.76",
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
        ])
        .arg("--setup")
        .arg(&bad)
        .arg("--out")
        .arg(dir.path().join("o"))
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("medium.density_cm3") && err.contains("-5") && err.contains("positive"),
        "{err}"
    );
    let out = holecast()
        .args([
            "spectrum",
            "--ip",
            "15.76",
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
            "--method",
            "quadrature",
            "--jet-position-mm",
            "2",
        ])
        .arg("--out")
        .arg(dir.path().join("o"))
        .output()
        .unwrap();
    assert!(String::from_utf8_lossy(&out.stderr).contains("saddle method"));
    let out = holecast()
        .args([
            "spectrum",
            "--ip",
            "15.76",
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
            "--waist-um",
            "30",
        ])
        .arg("--out")
        .arg(dir.path().join("o"))
        .output()
        .unwrap();
    assert!(String::from_utf8_lossy(&out.stderr).contains("--jet-position-mm"));
}
