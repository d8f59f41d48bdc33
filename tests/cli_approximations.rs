//! Every spectrum and holes file names the approximations it used, under one key, and the
//! command line's defaults are the library's.

use assert_cmd::Command;
use holecast::multichannel::MultichannelSettings;
use serde_json::Value;

fn run(dir: &std::path::Path, command: &str, extra: &[&str]) -> Value {
    let mut cmd = Command::cargo_bin("holecast").unwrap();
    cmd.args([
        "--quiet",
        command,
        concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/channels/demo-coupled-diatomic.json"
        ),
        "--intensity",
        "1.5e14",
        "--wavelength",
        "800",
        "--orders",
        "21:25:2",
        "--out",
    ])
    .arg(dir)
    .args(extra)
    .assert()
    .success();
    let file = if command == "holes" {
        "holes.json"
    } else {
        "spectrum.json"
    };
    serde_json::from_slice(&std::fs::read(dir.join(file)).unwrap()).unwrap()
}

#[test]
fn defaults_are_the_library_defaults_and_are_recorded() {
    let dir = tempfile::tempdir().unwrap();
    let s = run(dir.path(), "spectrum", &[]);
    let a = &s["provenance"]["approximations"];
    let lib = MultichannelSettings::default();
    assert_eq!(a["method"], "saddle");
    assert_eq!(a["saddle_sum"], serde_json::to_value(lib.sum).unwrap());
    assert_eq!(
        a["hole_times"],
        serde_json::to_value(lib.hole_contour).unwrap()
    );
    assert_eq!(
        a["ionization_structure"],
        serde_json::to_value(lib.ionization_structure).unwrap()
    );
    assert_eq!(
        a["recombination_structure"],
        serde_json::to_value(lib.recombination_structure).unwrap()
    );
    assert_eq!(a["hole_times"], "complex");
    assert_eq!(a["ionization_structure"], "phase");
    assert_eq!(a["recombination_structure"], "auto");
    // The holes file carries the same record.
    let h = run(&dir.path().join("holes"), "holes", &[]);
    assert_eq!(
        h["provenance"]["approximations"],
        s["provenance"]["approximations"]
    );
}

#[test]
fn options_change_the_record_and_the_numbers() {
    let dir = tempfile::tempdir().unwrap();
    let base = run(&dir.path().join("a"), "spectrum", &[]);
    let frozen = run(
        &dir.path().join("b"),
        "spectrum",
        &[
            "--hole-times",
            "real",
            "--ionization-structure",
            "prefactor",
            "--recombination-structure",
            "prefactor",
        ],
    );
    assert_eq!(frozen["provenance"]["approximations"]["hole_times"], "real");
    assert_eq!(
        frozen["provenance"]["approximations"]["ionization_structure"],
        "prefactor"
    );
    let i = |v: &Value| v["points"][0]["intensity"].as_f64().unwrap();
    assert!(
        (i(&base) / i(&frozen) - 1.0).abs() > 1e-3,
        "the options must matter"
    );
    let quad = run(
        &dir.path().join("c"),
        "spectrum",
        &[
            "--method",
            "quadrature",
            "--momentum-integral",
            "stationary",
        ],
    );
    assert_eq!(quad["provenance"]["approximations"]["method"], "quadrature");
    assert_eq!(
        quad["provenance"]["approximations"]["momentum"],
        "stationary"
    );
}
