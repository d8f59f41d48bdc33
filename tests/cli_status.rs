//! Flags mean what they say: the row and family statuses, the run summary and the warnings list
//! of every JSON output (issue 8, items 3 and 4).

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use serde_json::Value;

fn holecast() -> Command {
    Command::cargo_bin("holecast").unwrap()
}

fn channels(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("channels")
        .join(name)
}

fn json(path: &Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

fn codes(v: &Value) -> Vec<String> {
    v["warnings"]
        .as_array()
        .expect("a warnings list")
        .iter()
        .map(|w| {
            assert!(w["message"].is_string() && w["advice"].is_string());
            w["code"].as_str().unwrap().to_string()
        })
        .collect()
}

/// `spectrum` into a fresh folder; returns (folder guard, folder, stdout, stderr).
fn spectrum(args: &[&str]) -> (tempfile::TempDir, PathBuf, String, String) {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let result = holecast()
        .arg("spectrum")
        .args(args)
        .args(["--quiet", "--out"])
        .arg(&out)
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&result.stderr).to_string();
    assert!(result.status.success(), "{args:?}: {stderr}");
    (
        dir,
        out,
        String::from_utf8_lossy(&result.stdout).to_string(),
        stderr,
    )
}

#[test]
fn rows_below_the_threshold_are_labelled_not_complete() {
    // Formerly: intensity 0 with complete = true below Ip.
    let (_d, out, stdout, stderr) = spectrum(&[
        "--ip",
        "13.6",
        "--intensity",
        "1.5e14",
        "--wavelength",
        "800",
        "--orders",
        "5:12:1",
    ]);
    let v = json(&out.join("spectrum.json"));
    for p in v["points"].as_array().unwrap() {
        let order = p["order"].as_f64().unwrap();
        let below = order * 1.5498 < 13.6;
        assert_eq!(
            p["status"],
            if below { "below-threshold" } else { "complete" }
        );
        assert_eq!(p["complete"].as_bool().unwrap(), !below);
        if below {
            assert_eq!(p["X_to_X_short_hc0_status"], "below-threshold");
            assert_eq!(p["X_to_X_short_hc0_kernel"], "none");
        }
    }
    assert_eq!(v["summary"]["status"]["below-threshold"], 4);
    assert!(
        stdout.contains("incomplete points: 0; below every threshold: 4"),
        "{stdout}"
    );
    assert!(codes(&v).contains(&"near-threshold".to_string()));
    assert!(stderr.contains("warning [near-threshold]"));
}

#[test]
fn families_below_their_channels_threshold_are_not_failures() {
    // Formerly: the A and B families at H9–H11 of the demo (below those channels' Ip) were
    // "failed" with complete = true and "incomplete points: 0".
    let (_d, out, stdout, _) = spectrum(&[
        channels("demo-linear-triatomic.json").to_str().unwrap(),
        "--intensity",
        "1.5e14",
        "--wavelength",
        "800",
        "--orders",
        "9:13:1",
    ]);
    let v = json(&out.join("spectrum.json"));
    let points = v["points"].as_array().unwrap();
    for p in &points[..3] {
        assert_eq!(p["status"], "complete", "X recombines there");
        assert_eq!(p["A_to_A_short_hc0_status"], "below-threshold");
        assert_eq!(p["A_to_A_short_hc0_kernel"], "none");
        assert_eq!(p["X_to_X_short_hc0_status"], "summed");
        assert!(p["intensity"].as_f64().unwrap().is_finite());
    }
    assert_eq!(points[4]["A_to_A_short_hc0_status"], "summed");
    assert!(stdout.contains("incomplete points: 0"));
    let holes = json(&out.join("holes.json"));
    assert!(codes(&holes).contains(&"near-threshold".to_string()));
}

#[test]
fn when_every_saddle_fails_the_data_are_written_and_the_failures_counted() {
    // Formerly: a harmonic-300 colour ended with "nothing to plot", exit 1 and no files.
    let dir = tempfile::tempdir().unwrap();
    let laser = dir.path().join("h300.json");
    std::fs::write(
        &laser,
        r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1.5e14},
                        {"harmonic_of_first": 300, "intensity_ratio": 0.1}]}"#,
    )
    .unwrap();
    let (_d, out, stdout, stderr) = spectrum(&["--ip", "13.6", "--laser", laser.to_str().unwrap()]);
    let v = json(&out.join("spectrum.json"));
    let c = codes(&v);
    for code in [
        "weak-colour-amplified",
        "all-saddles-failed",
        "plot-not-drawn",
    ] {
        assert!(c.contains(&code.to_string()), "{code} missing from {c:?}");
    }
    let rows = v["summary"]["rows"].as_u64().unwrap();
    assert_eq!(v["summary"]["status"]["failed"].as_u64(), Some(rows));
    assert!(
        v["summary"]["failed_family_points"]["failed-no-start"]
            .as_u64()
            .unwrap()
            > 0
    );
    assert!(out.join("spectrum.csv").exists());
    assert!(
        !out.join("spectrum.svg").exists(),
        "the figure cannot be drawn"
    );
    let manifest = json(&out.join("manifest-spectrum.json"));
    assert_eq!(manifest["files"].as_array().unwrap().len(), 2);
    assert!(stdout.contains(&format!("incomplete points: {rows}")));
    assert!(stderr.contains("warning [all-saddles-failed]"));
}

#[test]
fn validity_warnings_reach_stderr_and_every_json_output() {
    // Photon energy above Ip (10 nm), multiphoton regime (γ = 10.7), over the barrier and
    // depletion (argon-like at 6e14 W/cm²).
    let (_d, out, _, _) = spectrum(&[
        "--ip",
        "13.6",
        "--intensity",
        "1.5e14",
        "--wavelength",
        "10",
    ]);
    assert!(codes(&json(&out.join("spectrum.json"))).contains(&"photon-energy-above-ip".into()));
    let (_d, out, _, _) = spectrum(&["--ip", "13.6", "--intensity", "1e12", "--wavelength", "800"]);
    assert!(codes(&json(&out.join("spectrum.json"))).contains(&"multiphoton-regime".into()));
    let o = holecast()
        .arg("orbits")
        .arg(channels("argon-like.json"))
        .args([
            "--intensity",
            "6e14",
            "--wavelength",
            "800",
            "--orders",
            "21:25:4",
        ])
        .args(["--format", "json"])
        .output()
        .unwrap();
    assert!(o.status.success());
    let v: Value = serde_json::from_slice(&o.stdout).unwrap();
    let c = codes(&v);
    assert!(c.contains(&"over-the-barrier".into()) && c.contains(&"ground-state-depletion".into()));
    assert!(String::from_utf8_lossy(&o.stderr).contains("warning [over-the-barrier]"));
    assert!(v["summary"]["status"]["summed"].as_u64().unwrap() > 0);
}

#[test]
fn orbits_can_list_the_excluded_saddles_with_their_reason() {
    let run = |extra: &[&str]| -> Vec<Value> {
        let o = holecast()
            .args([
                "orbits",
                "--ip",
                "15.76",
                "--intensity",
                "1.5e14",
                "--wavelength",
                "800",
            ])
            .args(["--orders", "31:35:2", "--format", "json"])
            .args(extra)
            .output()
            .unwrap();
        assert!(o.status.success());
        let v: Value = serde_json::from_slice(&o.stdout).unwrap();
        v["orbits"].as_array().unwrap().clone()
    };
    let plain = run(&[]);
    let all = run(&["--include-excluded"]);
    assert!(plain.iter().all(|o| o["status"] == "summed"));
    let excluded: Vec<&Value> = all
        .iter()
        .filter(|o| o["status"].as_str().unwrap().starts_with("excluded-"))
        .collect();
    assert_eq!(all.len(), plain.len() + excluded.len());
    assert!(
        excluded
            .iter()
            .any(|o| o["status"] == "excluded-growing-beyond-cutoff"),
        "beyond the cutoff the growing member is excluded"
    );
}
