//! The command-line program, run as a user would: outputs, required keys, determinism and
//! clear errors on bad input (no panic, non-zero exit, nothing half-written).

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

fn json(bytes: &[u8]) -> Value {
    serde_json::from_slice(bytes).expect("valid JSON")
}

#[test]
fn check_prints_derived_quantities() {
    holecast()
        .args([
            "check",
            "--ip",
            "13.598",
            "--intensity",
            "2e14",
            "--wavelength",
            "800",
        ])
        .assert()
        .success()
        .stdout(predicate::str::contains("Up = 11.952 eV"))
        .stdout(predicate::str::contains("0.7542"))
        .stdout(predicate::str::contains("quantum cutoff"));
    let out = holecast()
        .args(["check", "--format", "json"])
        .arg(channels("hydrogen.json"))
        .args(["--intensity", "2e14", "--wavelength", "800"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let v = json(&out.stdout);
    assert!((v["up_ev"].as_f64().unwrap() - 11.9517).abs() < 1e-3);
    assert!(
        v["cutoff"]["quantum_ev"].as_f64().unwrap() > v["cutoff"]["classical_ev"].as_f64().unwrap()
    );
}

#[test]
fn orbits_json_has_the_documented_keys() {
    let out = holecast()
        .args([
            "orbits",
            "--ip",
            "15.76",
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
        ])
        .args(["--orders", "15:35:2", "--format", "json"])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v = json(&out.stdout);
    for key in ["up_ev", "keldysh", "photon_ev"] {
        assert!(v[key].is_number(), "{key}");
    }
    assert!(v["cutoff"]["classical_ev"].is_number() && v["cutoff"]["quantum_ev"].is_number());
    let orbits = v["orbits"].as_array().unwrap();
    // Below the cutoff two families (short, long) per half cycle; beyond it only the physical
    // (decaying) member is listed.
    let cutoff_order = v["cutoff"]["quantum_order"].as_f64().unwrap();
    for q in (15..=35).step_by(2) {
        for hc in 0..2 {
            let n = orbits
                .iter()
                .filter(|o| {
                    o["order"].as_f64().unwrap().round() as i32 == q && o["half_cycle"] == hc
                })
                .count();
            assert_eq!(
                n,
                if f64::from(q) < cutoff_order { 2 } else { 1 },
                "H{q} half cycle {hc}"
            );
        }
    }
    for o in orbits {
        for key in ["order", "energy_ev", "residual"] {
            assert!(o[key].is_number(), "{key}");
        }
        assert!(o["family"].is_string() && o["half_cycle"].is_i64());
        assert!(o["converged"].as_bool().unwrap());
        for key in ["t_ion_fs", "t_ret_fs", "action"] {
            for part in ["re", "im"] {
                assert!(o[format!("{key}_{part}")].is_number(), "{key}_{part}");
            }
        }
        // The physical ionization saddle has Im t_i > 0.
        assert!(o["t_ion_fs_im"].as_f64().unwrap() > 0.0);
    }
    let families: std::collections::BTreeSet<_> = orbits
        .iter()
        .map(|o| o["family"].as_str().unwrap().to_string())
        .collect();
    assert_eq!(families.into_iter().collect::<Vec<_>>(), ["long", "short"]);
}

#[test]
fn spectrum_writes_json_csv_and_svg_deterministically() {
    let dir = tempfile::tempdir().unwrap();
    // Two runs of the same command line (the JSON records it) from two working folders.
    let run = |sub: &str| {
        let cwd = dir.path().join(sub);
        std::fs::create_dir_all(&cwd).unwrap();
        holecast()
            .current_dir(&cwd)
            .arg("spectrum")
            .arg(channels("demo-model-atom.json"))
            .args([
                "--intensity",
                "1.5e14",
                "--wavelength",
                "800",
                "--quiet",
                "--out",
                "out",
            ])
            .assert()
            .success();
        cwd.join("out")
    };
    let (a, b) = (run("a"), run("b"));
    for name in ["spectrum.json", "spectrum.csv", "spectrum.svg"] {
        let x = std::fs::read(a.join(name)).unwrap();
        let y = std::fs::read(b.join(name)).unwrap();
        assert!(!x.is_empty());
        assert_eq!(x, y, "{name} differs between identical runs");
    }
    let v = json(&std::fs::read(a.join("spectrum.json")).unwrap());
    let points = v["points"].as_array().unwrap();
    // The default grid of a symmetric field: odd orders from Ip + Up/4 to 20% past the cutoff
    // (H11–H33 here; it held every order from H8 before issue 9).
    assert!(points.len() >= 10, "{} rows", points.len());
    assert!(points.iter().all(|p| p["complete"].as_bool().unwrap()));
    // CSV has the same columns as the JSON rows, in the same order (complex numbers are
    // _re/_im columns in both).
    let csv = std::fs::read_to_string(a.join("spectrum.csv")).unwrap();
    let header: Vec<&str> = csv.lines().next().unwrap().split(',').collect();
    let expect: Vec<&str> = points[0]
        .as_object()
        .unwrap()
        .keys()
        .map(String::as_str)
        .collect();
    assert_eq!(header, expect);
    assert_eq!(csv.lines().count(), points.len() + 1);
    assert!(
        std::fs::read_to_string(a.join("spectrum.svg"))
            .unwrap()
            .starts_with("<svg")
    );
}

/// Runs a failing command and checks that the message names what is wrong and that no output
/// file was created in `out`.
fn fails_with(args: &[&str], out: &Path, needles: &[&str]) {
    let result = holecast()
        .args(args)
        .arg("--out")
        .arg(out)
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&result.stderr);
    assert!(!result.status.success(), "{args:?} should fail");
    assert!(!stderr.contains("panicked"), "{args:?} panicked: {stderr}");
    for n in needles {
        assert!(
            stderr.contains(n),
            "{args:?}: message {stderr:?} lacks {n:?}"
        );
    }
    let leftovers: Vec<_> = std::fs::read_dir(out)
        .map(|d| d.filter_map(|e| e.ok()).map(|e| e.file_name()).collect())
        .unwrap_or_default();
    assert!(leftovers.is_empty(), "{args:?} left {leftovers:?}");
}

#[test]
fn bad_laser_values_are_named_and_leave_nothing_behind() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let base = ["spectrum", "--ip", "13.6"];
    let cases: [(&[&str], &[&str]); 7] = [
        (&["--wavelength", "800"], &["--intensity"]),
        (
            &["--intensity", "-1e14", "--wavelength", "800"],
            &["intensity", "-100000000000000", "positive"],
        ),
        (
            &["--intensity", "0", "--wavelength", "800"],
            &["intensity", "0", "positive"],
        ),
        (
            &["--intensity", "NaN", "--wavelength", "800"],
            &["intensity", "NaN", "finite"],
        ),
        (
            &["--intensity", "1e14", "--wavelength", "0"],
            &["wavelength", "0", "positive"],
        ),
        (
            &["--intensity", "1e14", "--wavelength", "inf"],
            &["wavelength", "inf", "finite"],
        ),
        (
            &["--intensity", "1e14", "--wavelength", "-800"],
            &["wavelength", "-800", "positive"],
        ),
    ];
    for (extra, needles) in cases {
        let args: Vec<&str> = base.iter().chain(extra.iter()).copied().collect();
        fails_with(&args, &out, needles);
    }
}

#[test]
fn bad_ip_values_are_named() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    for (ip, needle) in [
        ("-3", "positive"),
        ("0", "positive"),
        ("nan", "finite"),
        ("inf", "finite"),
    ] {
        fails_with(
            &[
                "spectrum",
                "--ip",
                ip,
                "--intensity",
                "1e14",
                "--wavelength",
                "800",
            ],
            &out,
            &["--ip", needle],
        );
    }
}

#[test]
fn bad_target_files_are_named() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let write = |name: &str, text: &str| {
        let p = dir.path().join(name);
        std::fs::write(&p, text).unwrap();
        p
    };
    let good = std::fs::read_to_string(channels("hydrogen.json")).unwrap();
    let cases = [
        (
            "unknown.json",
            good.replace("\"ip_ev\"", "\"ip_eV\""),
            vec!["unknown.json", "ip_eV"],
        ),
        (
            "extra.json",
            good.replace(
                "\"invented\": false,",
                "\"invented\": false, \"colour\": 3,",
            ),
            vec!["extra.json", "unknown field `colour`"],
        ),
        (
            "model.json",
            good.replace("\"hydrogenic\"", "\"hydrogenik\""),
            vec!["model.json", "hydrogenik"],
        ),
        (
            "negative.json",
            good.replace("13.598434599702", "-13.6"),
            vec!["negative.json", "channels[0].ip_ev", "-13.6", "positive"],
        ),
        (
            "malformed.json",
            good.replace("\"channels\": [", "\"channels\": [[")
                .to_string(),
            vec!["malformed.json", "line"],
        ),
        ("empty.json", "".to_string(), vec!["empty.json"]),
        (
            "exponent.json",
            good.replace(
                "{ \"model\": \"gaussian\" }",
                "{ \"model\": \"gaussian\", \"exponent_au\": 0 }",
            ),
            vec!["exponent.json", "exponent_au", "positive"],
        ),
    ];
    for (name, text, needles) in cases {
        let p = write(name, &text);
        let path = p.to_string_lossy().to_string();
        let args = [
            "spectrum",
            path.as_str(),
            "--intensity",
            "1e14",
            "--wavelength",
            "800",
        ];
        fails_with(&args, &out, &needles);
    }
    fails_with(
        &[
            "spectrum",
            "no-such-file.json",
            "--intensity",
            "1e14",
            "--wavelength",
            "800",
        ],
        &out,
        &["no-such-file.json"],
    );
}

#[test]
fn bad_laser_files_are_named() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let cases = [
        (
            r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1e14, "polarisation": {}}]}"#,
            vec!["unknown field `polarisation`"],
        ),
        (
            r#"{"colours": [{"wavelength_nm": 800}]}"#,
            vec!["colours[0].intensity", "missing"],
        ),
        (
            r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1e14, "polarization": {"kind": "elliptical", "ellipticity": 1.5}}]}"#,
            vec!["ellipticity", "1.5"],
        ),
        (
            r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1e14}], "envelope": {"kind": "sin2", "fwhm_fs": -5}}"#,
            vec!["fwhm_fs", "-5", "positive"],
        ),
        (r#"{"colours": []}"#, vec!["colours", "at least one"]),
        (
            r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1e14}], "envelope": {"kind": "continuous", "fwhm_fs": 5}}"#,
            vec!["unknown field `fwhm_fs`"],
        ),
        (
            r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1e14}, {"harmonic_of_first": 1.41421356, "intensity_ratio": 0.1}]}"#,
            vec!["frequency ratio", "periodic"],
        ),
    ];
    for (k, (text, needles)) in cases.into_iter().enumerate() {
        let p = dir.path().join(format!("laser{k}.json"));
        std::fs::write(&p, text).unwrap();
        let path = p.to_string_lossy().to_string();
        let mut n: Vec<&str> = needles.clone();
        let fname = format!("laser{k}.json");
        n.push(&fname);
        fails_with(
            &["spectrum", "--ip", "13.6", "--laser", path.as_str()],
            &out,
            &n,
        );
    }
}

#[test]
fn bad_grids_are_named() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    for (grid, needle) in [
        ("10:5:1", "LAST"),
        ("1:5", "FIRST:LAST:STEP"),
        ("1:5:0", "STEP"),
        ("a:5:1", "not a number"),
        ("0:5:1", "FIRST"),
    ] {
        fails_with(
            &[
                "spectrum",
                "--ip",
                "13.6",
                "--intensity",
                "1e14",
                "--wavelength",
                "800",
                "--orders",
                grid,
            ],
            &out,
            &["--orders", needle],
        );
    }
}

#[test]
fn molecular_spectrum_writes_pairs_and_holes() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("tri");
    holecast()
        .arg("spectrum")
        .arg(channels("demo-linear-triatomic.json"))
        .args([
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
            "--orders",
            "15:25:2",
            "--quiet",
            "--out",
        ])
        .arg(&out)
        .assert()
        .success();
    let v = json(&std::fs::read(out.join("spectrum.json")).unwrap());
    let p = &v["points"][0];
    for key in [
        "X_to_X_intensity",
        "X_to_A_intensity",
        "A_to_B_intensity",
        "incoherent_pair_sum",
        "ellipticity",
        "X_to_A_short_hc0_emission_time_fs",
    ] {
        assert!(p.get(key).is_some(), "{key}");
    }
    assert_eq!(v["couplings"].as_array().unwrap().len(), 2);
    let h = json(&std::fs::read(out.join("holes.json")).unwrap());
    let rows = h["points"].as_array().unwrap();
    assert_eq!(
        rows.len(),
        6 * 4,
        "six energies × four families of channel X"
    );
    for r in rows {
        let sum: f64 = ["population_X", "population_A", "population_B"]
            .iter()
            .map(|k| r[k].as_f64().unwrap())
            .sum();
        assert!((sum - 1.0).abs() < 1e-12);
        assert!(r["delay_fs"].as_f64().unwrap() > 0.0);
    }
    // The holes command writes the same hole table, and nothing else.
    let out2 = dir.path().join("holes-only");
    holecast()
        .arg("holes")
        .arg(channels("demo-linear-triatomic.json"))
        .args([
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
            "--orders",
            "15:25:2",
            "--quiet",
            "--out",
        ])
        .arg(&out2)
        .assert()
        .success();
    assert_eq!(
        std::fs::read(out.join("holes.csv")).unwrap(),
        std::fs::read(out2.join("holes.csv")).unwrap()
    );
    assert!(!out2.join("spectrum.json").exists());
}
