//! Bounded work, run as a user would: the reproducers of issue 8 that aborted, panicked or ran
//! for minutes are refused at once with the estimate and the flag that lets them run.

use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

use assert_cmd::Command;
use serde_json::Value;

fn holecast() -> Command {
    let mut c = Command::cargo_bin("holecast").unwrap();
    c.timeout(Duration::from_secs(60));
    c
}

fn channels(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("channels")
        .join(name)
}

/// Runs, expects failure within `seconds`, no panic, the needles in stderr, nothing written.
fn refused(args: &[&str], seconds: f64, needles: &[&str]) {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let start = Instant::now();
    let result = holecast()
        .args(args)
        .arg("--out")
        .arg(&out)
        .output()
        .unwrap();
    let elapsed = start.elapsed().as_secs_f64();
    let stderr = String::from_utf8_lossy(&result.stderr);
    assert_eq!(result.status.code(), Some(1), "{args:?}: {stderr}");
    assert!(!stderr.contains("panicked"), "{stderr}");
    assert!(elapsed < seconds, "{args:?} took {elapsed:.1} s");
    for n in needles {
        assert!(stderr.contains(n), "{args:?}: {stderr:?} lacks {n:?}");
    }
    assert!(!out.exists(), "{args:?} wrote {out:?}");
}

#[test]
fn ip_1e30_capacity_overflow_is_a_named_error() {
    refused(
        &[
            "spectrum",
            "--ip",
            "1e30",
            "--intensity",
            "2e14",
            "--wavelength",
            "800",
        ],
        5.0,
        &["--ip", "1e30", "above 2e5 eV"],
    );
}

#[test]
fn ip_1e18_abort_on_allocation_is_a_named_error() {
    refused(
        &[
            "spectrum",
            "--ip",
            "1e18",
            "--intensity",
            "2e14",
            "--wavelength",
            "800",
        ],
        5.0,
        &["--ip", "above 2e5 eV"],
    );
}

#[test]
fn wavelength_1e6_default_grid_out_of_memory_is_refused_with_the_estimate() {
    // Formerly: the default grid of ~4e10 points aborted out of memory.
    refused(
        &[
            "spectrum",
            "--ip",
            "13.6",
            "--intensity",
            "1.5e14",
            "--wavelength",
            "1e6",
        ],
        5.0,
        &["estimated", "above the limit", "far beyond"],
    );
}

#[test]
fn intensity_1e18_default_grid_of_2_gb_names_the_flag_that_lets_it_run() {
    refused(
        &[
            "spectrum",
            "--ip",
            "13.6",
            "--intensity",
            "1e18",
            "--wavelength",
            "800",
        ],
        5.0,
        &["estimated", "continuation steps", "--work-limit-factor 1.6"],
    );
}

#[test]
fn sin2_pulse_of_8000_fs_is_refused_in_well_under_a_second_of_work() {
    let dir = tempfile::tempdir().unwrap();
    let laser = dir.path().join("long.json");
    std::fs::write(
        &laser,
        r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1.5e14}],
            "envelope": {"kind": "sin2", "fwhm_fs": 8000}}"#,
    )
    .unwrap();
    refused(
        &[
            "spectrum",
            "--ip",
            "13.6",
            "--laser",
            laser.to_str().unwrap(),
        ],
        10.0,
        &["classical seed trajectories", "--work-limit-factor"],
    );
}

#[test]
fn explicit_grid_over_the_energy_limit_names_the_flag() {
    refused(
        &[
            "spectrum",
            "--ip",
            "13.6",
            "--intensity",
            "1e14",
            "--wavelength",
            "800",
            "--orders",
            "10:20:0.000001",
        ],
        5.0,
        &["--orders", "photon-energy grid", "--work-limit-factor"],
    );
}

#[test]
fn amplitude_stage_and_memory_limits_are_checked_before_the_work() {
    // The demo triatomic at 0.01-order steps is 3001 energies × 36 families × 16 orientations.
    let base = [
        "spectrum".to_string(),
        channels("demo-linear-triatomic.json")
            .to_str()
            .unwrap()
            .to_string(),
    ];
    let args = |extra: &[&str]| -> Vec<String> {
        let mut v: Vec<String> = base.to_vec();
        v.extend(
            [
                "--intensity",
                "1.5e14",
                "--wavelength",
                "800",
                "--orders",
                "10:40:0.01",
            ]
            .iter()
            .chain(extra)
            .map(|s| s.to_string()),
        );
        v
    };
    let a = args(&["--max-memory-mb", "100"]);
    refused(
        &a.iter().map(String::as_str).collect::<Vec<_>>(),
        5.0,
        &["memory of the spectrum", "3001 energies", "--max-memory-mb"],
    );
    let b = args(&["--work-limit-factor", "0.1"]);
    refused(
        &b.iter().map(String::as_str).collect::<Vec<_>>(),
        5.0,
        &["amplitude stage", "saddle terms", "--work-limit-factor"],
    );
}

#[test]
fn work_limit_factor_lets_a_refused_run_go_ahead() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let run = |factor: &str| {
        holecast()
            .args([
                "--quiet",
                "spectrum",
                "--ip",
                "13.6",
                "--intensity",
                "1.5e14",
                "--wavelength",
                "800",
                "--work-limit-factor",
                factor,
                "--out",
            ])
            .arg(&out)
            .output()
            .unwrap()
    };
    let low = run("0.0001");
    assert_eq!(low.status.code(), Some(1));
    let stderr = String::from_utf8_lossy(&low.stderr);
    assert!(stderr.contains("--work-limit-factor"), "{stderr}");
    assert!(run("1").status.success());
    assert!(out.join("spectrum.json").exists());
}

#[test]
fn check_at_1e20_wcm2_reports_the_work_limit_as_a_warning_at_once() {
    // Formerly > 60 s with no output.
    let start = Instant::now();
    let out = holecast()
        .args([
            "check",
            "--ip",
            "13.6",
            "--intensity",
            "1e20",
            "--wavelength",
            "800",
            "--format",
            "json",
        ])
        .output()
        .unwrap();
    assert!(start.elapsed() < Duration::from_secs(5));
    assert!(out.status.success());
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let codes: Vec<&str> = v["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["code"].as_str().unwrap())
        .collect();
    assert!(codes.contains(&"work-limit"), "{codes:?}");
    assert!(codes.contains(&"over-the-barrier"), "{codes:?}");
    assert!(v["cutoff"].is_null());
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.contains("warning [work-limit]") && stderr.contains("--work-limit-factor 157"));
}
