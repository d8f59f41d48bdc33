//! Files a physicist can load without fixing them (issue 9, "Files"): exact `order` labels, one
//! column set for JSON and CSV, provenance in every JSON output, and the same bytes whatever the
//! number of threads. Numbers are compared exactly (tolerance 0: JSON and CSV print the same
//! shortest round-trip decimal of the same `f64`).

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};

use assert_cmd::Command;
use serde_json::Value;

fn holecast() -> Command {
    Command::cargo_bin("holecast").unwrap()
}

fn repo(folder: &str, name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join(folder)
        .join(name)
}

fn run(cmd: &mut Command) -> std::process::Output {
    let out = cmd.output().unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

fn orbits(format: &str, grid: &[&str]) -> Vec<u8> {
    run(holecast()
        .arg("orbits")
        .arg(repo("channels", "hydrogen.json"))
        .args([
            "--intensity",
            "2e14",
            "--wavelength",
            "800",
            "--format",
            format,
        ])
        .args(grid))
    .stdout
}

/// The CSV header and the fields of each line (no quoted commas in these files).
fn csv(text: &str) -> (Vec<String>, Vec<Vec<String>>) {
    let mut lines = text.lines();
    let header = lines
        .next()
        .unwrap()
        .split(',')
        .map(str::to_string)
        .collect();
    let rows = lines
        .map(|l| l.split(',').map(str::to_string).collect())
        .collect();
    (header, rows)
}

/// Column `name` of a CSV file as text.
fn column(text: &str, name: &str) -> Vec<String> {
    let (header, rows) = csv(text);
    let i = header.iter().position(|h| h == name).unwrap();
    rows.into_iter().map(|r| r[i].clone()).collect()
}

#[test]
fn order_labels_are_exact_lattice_values() {
    // The rule (README, Conventions): FIRST + k·STEP computed as decimals, printed without
    // noise. In f64 arithmetic 11 + 0.1·k gives e.g. 11.700000000000001 (k = 7).
    let text = String::from_utf8(orbits("csv", &["--orders", "11:13:0.1"])).unwrap();
    let labels: BTreeSet<String> = column(&text, "order").into_iter().collect();
    let expect: BTreeSet<String> = (0..=20)
        .map(|k| {
            let tenths = 110 + k;
            if tenths % 10 == 0 {
                format!("{}", tenths / 10)
            } else {
                format!("{}.{}", tenths / 10, tenths % 10)
            }
        })
        .collect();
    assert_eq!(labels, expect);
    // The check has teeth: Ω/ω recomputed from the photon energy (what the files held before)
    // is not the lattice value for some points of this grid.
    let omega = holecast::laser::LaserSpec::monochromatic(2e14, 800.0)
        .to_field()
        .unwrap()
        .omega();
    assert!(
        (0..=20)
            .map(|k| 11.0 + 0.1 * f64::from(k))
            .any(|q| (q * omega) / omega != q),
        "no noisy value in the grid"
    );
    // JSON holds the same labels, as numbers.
    let v: Value = serde_json::from_slice(&orbits("json", &["--orders", "11:13:0.1"])).unwrap();
    let json_labels: BTreeSet<String> = v["orbits"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["order"].to_string())
        .collect();
    assert_eq!(json_labels, expect);
    assert_eq!(v["provenance"]["grid"]["first"], "11");
    assert_eq!(v["provenance"]["grid"]["step"], "0.1");
    assert_eq!(v["provenance"]["grid"]["points"], 21);
}

#[test]
fn an_energy_grid_labels_energy_ev_exactly_and_computes_the_order() {
    let text = String::from_utf8(orbits("csv", &["--energies", "20:21:0.1"])).unwrap();
    let labels: BTreeSet<String> = column(&text, "energy_ev").into_iter().collect();
    let expect: BTreeSet<String> = (0..=10)
        .map(|k| match k {
            0 => "20".to_string(),
            10 => "21".to_string(),
            _ => format!("20.{k}"),
        })
        .collect();
    assert_eq!(labels, expect);
    // The order is Ω/ω computed in floating point: 20 eV / 1.5498 eV = 12.9…
    let order: f64 = column(&text, "order")[0].parse().unwrap();
    assert!((order - 20.0 / 1.549_802).abs() < 1e-5, "{order}");
}

#[test]
fn the_default_pulse_grid_has_exact_tenths() {
    let out = run(holecast()
        .args(["orbits", "--ip", "15.76", "--format", "csv"])
        .arg("--laser")
        .arg(repo("lasers", "few-cycle-pulse.json")));
    let text = String::from_utf8(out.stdout).unwrap();
    for label in column(&text, "order") {
        let digits = label.split_once('.').map_or(0, |(_, f)| f.len());
        assert!(
            digits <= 1,
            "order {label} is not a multiple of 0.1 printed exactly"
        );
    }
}

/// JSON rows and CSV lines: same columns in the same order, same values written with the same
/// digits. The JSON file has one row object per line (README, Conventions), which lets the
/// digits be compared as text.
fn same_table(json_text: &str, key: &str, csv_text: &str) {
    let v: Value = serde_json::from_str(json_text).unwrap();
    let json_rows = v[key].as_array().unwrap();
    let json_lines: Vec<&str> = json_text
        .lines()
        .filter(|l| l.starts_with("    {\""))
        .collect();
    let (header, lines) = csv(csv_text);
    assert_eq!(json_rows.len(), lines.len());
    assert_eq!(json_lines.len(), lines.len());
    for ((row, line), json_line) in json_rows.iter().zip(&lines).zip(&json_lines) {
        let keys: Vec<&String> = row.as_object().unwrap().keys().collect();
        assert_eq!(keys, header.iter().collect::<Vec<_>>());
        for ((key, value), field) in row.as_object().unwrap().iter().zip(line) {
            let has = |text: &str| {
                json_line.contains(&format!("\"{key}\":{text},"))
                    || json_line.contains(&format!("\"{key}\":{text}}}"))
            };
            match value {
                Value::Null => {
                    assert_eq!(field, "", "{key}");
                    assert!(has("null"), "{key}");
                }
                Value::Number(_) => {
                    assert!(field.parse::<f64>().is_ok(), "{key}: {field}");
                    assert!(has(field), "{key}: {field} is not in {json_line}");
                }
                Value::Bool(b) => assert_eq!(&b.to_string(), field, "{key}"),
                Value::String(s) => assert_eq!(s, field, "{key}"),
                other => panic!("{key}: a cell is a scalar, not {other}"),
            }
        }
    }
}

#[test]
fn json_and_csv_have_one_column_set() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    run(holecast()
        .arg("spectrum")
        .arg(repo("channels", "demo-linear-triatomic.json"))
        .args([
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
            "--orders",
            "15:25:2",
        ])
        .arg("--out")
        .arg(&out));
    for name in ["spectrum", "holes"] {
        let json_text = std::fs::read_to_string(out.join(format!("{name}.json"))).unwrap();
        let text = std::fs::read_to_string(out.join(format!("{name}.csv"))).unwrap();
        same_table(&json_text, "points", &text);
        // Complex numbers are _re/_im columns in both.
        if name == "spectrum" {
            let (header, _) = csv(&text);
            for c in [
                "dipole_z_re",
                "dipole_z_im",
                "parallel_re",
                "perpendicular_im",
            ] {
                assert!(header.iter().any(|h| h == c), "{c}");
            }
            assert!(!header.iter().any(|h| h == "dipole_z"));
        }
    }
    let json_text = String::from_utf8(orbits("json", &["--orders", "21:25:2"])).unwrap();
    let text = String::from_utf8(orbits("csv", &["--orders", "21:25:2"])).unwrap();
    same_table(&json_text, "orbits", &text);
    let (header, _) = csv(&text);
    for c in ["t_ion_fs_re", "t_ion_fs_im", "t_ret_fs_re", "action_im"] {
        assert!(header.iter().any(|h| h == c), "{c}");
    }
}

fn sha256_hex(bytes: &[u8]) -> String {
    use sha2::{Digest, Sha256};
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

fn check_provenance(v: &Value, inputs: &[(&str, &Path)]) {
    let p = &v["provenance"];
    assert_eq!(p["holecast_version"], env!("CARGO_PKG_VERSION"));
    let commit = p["git_commit"].as_str().unwrap();
    assert!(
        commit == "unknown"
            || (commit.len() == 40 && commit.bytes().all(|b| b.is_ascii_hexdigit())),
        "{commit}"
    );
    assert!(["clean", "modified", "unknown"].contains(&p["git_tree"].as_str().unwrap()));
    let line: Vec<&str> = p["command_line"]
        .as_array()
        .unwrap()
        .iter()
        .map(|a| a.as_str().unwrap())
        .collect();
    assert!(line[0].starts_with("holecast"), "{line:?}");
    let recorded = p["inputs"].as_array().unwrap();
    assert_eq!(recorded.len(), inputs.len());
    for ((role, path), r) in inputs.iter().zip(recorded) {
        let bytes = std::fs::read(path).unwrap();
        assert_eq!(r["role"], *role);
        assert_eq!(r["bytes"], bytes.len());
        assert_eq!(r["sha256"], sha256_hex(&bytes));
        assert!(line.contains(&path.to_str().unwrap()));
    }
    let models = &p["models"];
    assert!(models["channels"].as_array().unwrap().iter().all(|c| {
        c["ionization"].is_string() && c["recombination"].is_string() && c["label"].is_string()
    }));
    assert!(models["alignment"].is_string() && models["orientation_grid"].is_string());
    assert!(models["returns"].is_u64());
}

#[test]
fn every_json_output_carries_its_provenance() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let target = repo("channels", "demo-linear-triatomic.json");
    // A laser file (written here: the shipped ones are not linear along z, which the demo's
    // β-only orientation grid needs).
    let laser = dir.path().join("laser.json");
    std::fs::write(
        &laser,
        r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1.5e14,
            "polarization": {"kind": "linear", "angle_deg": 0}}],
            "envelope": {"kind": "continuous"}}"#,
    )
    .unwrap();
    run(holecast()
        .arg("spectrum")
        .arg(&target)
        .arg("--laser")
        .arg(&laser)
        .args(["--orders", "15:19:2", "--quiet", "--out"])
        .arg(&out));
    let inputs = [("target", target.as_path()), ("laser", laser.as_path())];
    for name in ["spectrum.json", "holes.json"] {
        let v: Value = serde_json::from_slice(&std::fs::read(out.join(name)).unwrap()).unwrap();
        check_provenance(&v, &inputs);
        let p = &v["provenance"];
        assert_eq!(p["approximations"]["method"], "saddle", "{name}");
        assert!(p["approximations"]["hole_times"].is_string(), "{name}");
        assert_eq!(p["grid"]["unit"], "order");
        assert!(
            p["grid"]["rule"]
                .as_str()
                .unwrap()
                .contains("--orders 15:19:2")
        );
    }
    let hydrogen = repo("channels", "hydrogen.json");
    let v: Value = serde_json::from_slice(&orbits("json", &["--orders", "21:23:2"])).unwrap();
    check_provenance(&v, &[("target", hydrogen.as_path())]);
    assert!(v["provenance"]["approximations"]["method_note"].is_string());
    let check = run(holecast()
        .args(["check", "--format", "json"])
        .arg(&hydrogen)
        .args(["--intensity", "2e14", "--wavelength", "800"]));
    let v: Value = serde_json::from_slice(&check.stdout).unwrap();
    check_provenance(&v, &[("target", hydrogen.as_path())]);
    // A default grid records its rule.
    let v: Value = serde_json::from_slice(&orbits("json", &[])).unwrap();
    assert!(
        v["provenance"]["grid"]["rule"]
            .as_str()
            .unwrap()
            .starts_with("default")
    );
}

/// Every file of a spectrum run of the demo, with RAYON_NUM_THREADS = `threads`, in a fresh
/// folder (the command line, hence the provenance, is the same in both runs).
fn demo_run(threads: &str) -> Vec<(String, Vec<u8>)> {
    let dir = tempfile::tempdir().unwrap();
    run(holecast()
        .current_dir(dir.path())
        .env("RAYON_NUM_THREADS", threads)
        .arg("spectrum")
        .arg(repo("channels", "demo-linear-triatomic.json"))
        .args([
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
            "--orders",
            "13:31:1",
        ])
        .args(["--quiet", "--out", "out"]));
    let mut files: Vec<(String, Vec<u8>)> = std::fs::read_dir(dir.path().join("out"))
        .unwrap()
        .map(|e| {
            let e = e.unwrap();
            (
                e.file_name().to_string_lossy().into_owned(),
                std::fs::read(e.path()).unwrap(),
            )
        })
        .collect();
    files.sort();
    files
}

#[test]
fn same_bytes_with_one_and_two_threads() {
    let (one, two) = (demo_run("1"), demo_run("2"));
    let names: Vec<&str> = one.iter().map(|(n, _)| n.as_str()).collect();
    assert_eq!(
        names,
        [
            "holes.csv",
            "holes.json",
            "holes.svg",
            "manifest-spectrum.json",
            "spectrum.csv",
            "spectrum.json",
            "spectrum.svg"
        ]
    );
    for ((name, a), (_, b)) in one.iter().zip(&two) {
        assert!(!a.is_empty(), "{name}");
        assert!(a == b, "{name} differs between 1 and 2 threads");
    }
    let orbits_with = |threads: &str| {
        run(holecast()
            .env("RAYON_NUM_THREADS", threads)
            .arg("orbits")
            .arg(repo("channels", "demo-linear-triatomic.json"))
            .args([
                "--intensity",
                "1.5e14",
                "--wavelength",
                "800",
                "--format",
                "json",
            ])
            .args(["--orders", "13:31:0.5"]))
        .stdout
    };
    assert!(orbits_with("1") == orbits_with("2"));
}

#[test]
fn orbit_status_counts_are_those_of_the_rows() {
    // The JSON summary of `orbits` counts statuses without building the rows; it must agree
    // with the rows themselves, with and without the excluded saddles.
    use holecast::multichannel::{MultichannelSettings, trajectory_stage};
    use holecast::report::orbits::{LabelledTable, OrbitRows};
    let field = holecast::laser::LaserSpec::monochromatic(1.5e14, 800.0)
        .to_field()
        .unwrap();
    let w = field.omega();
    let target = holecast::target::Target::atom(15.76).unwrap();
    let energies: Vec<f64> = (0..=60).map(|k| (11.0 + 0.5 * f64::from(k)) * w).collect();
    let settings = MultichannelSettings {
        group_delays: holecast::multichannel::GroupDelays::Skip,
        ..MultichannelSettings::default()
    };
    let stage = trajectory_stage(&field, &target, &energies, &settings).unwrap();
    let tables: Vec<LabelledTable<'_>> = stage
        .pairs
        .iter()
        .map(|p| LabelledTable {
            ionized: "X",
            recombined: "X",
            table: &p.table,
        })
        .collect();
    for include_excluded in [false, true] {
        let rows = OrbitRows {
            tables: &tables,
            omega: w,
            grid: None,
            include_excluded,
        };
        let counted = holecast::report::count_text(&rows, "status").unwrap();
        assert_eq!(
            rows.status_counts(),
            counted,
            "include_excluded = {include_excluded}"
        );
        if include_excluded {
            assert!(
                counted.keys().any(|k| k.starts_with("excluded")),
                "{counted:?}"
            );
        }
    }
}
